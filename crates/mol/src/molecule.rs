/// Hybridization of an atom, as perceived.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Hybridization {
    /// No orbital model applies (hydrogen, metal ions, wildcard).
    Other,
    /// sp
    Sp,
    /// sp2 (including aromatic atoms)
    Sp2,
    /// sp3
    Sp3,
}

/// An atom, as read and perceived.
#[derive(Clone, Debug, PartialEq)]
pub struct Atom {
    /// Atomic number; 0 for the `*` wildcard.
    pub element: u8,
    /// Mass number, where written.
    pub isotope: Option<u16>,
    /// Formal charge.
    pub charge: i8,
    /// Attached hydrogens not written as atoms: implicit (organic subset) or bracket count.
    pub hydrogens: u8,
    /// Written in brackets.
    pub bracket: bool,
    /// Written lower case (aromatic) in the input.
    pub written_aromatic: bool,
    /// Aromatic as perceived.
    pub aromatic: bool,
    /// Atom class (`[CH4:3]`), where written.
    pub atom_class: Option<u16>,
    /// Hybridization as perceived.
    pub hybridization: Hybridization,
    /// Where the atom was written in the input.
    pub span: crate::Span,
    /// Index of the component (`.`-separated part) the atom belongs to.
    pub component: usize,
    /// Number of rings of the smallest set of smallest rings that contain the atom (SMARTS `R`).
    pub ring_count: u8,
    /// Size of the smallest ring that contains the atom, 0 if none (SMARTS `r`).
    pub smallest_ring: u8,
}

/// A bond between two atoms.
#[derive(Clone, Debug, PartialEq)]
pub struct Bond {
    /// First atom (lower index).
    pub a: usize,
    /// Second atom.
    pub b: usize,
    /// Kekulé order: 1, 2 or 3 (aromatic bonds get the order of one Kekulé form).
    pub order: u8,
    /// Aromatic as perceived.
    pub aromatic: bool,
    /// Written aromatic (`:` or between two lower-case atoms) in the input.
    pub written_aromatic: bool,
    /// Member of a ring.
    pub in_ring: bool,
}

/// One neighbour of an atom: the atom and the bond that leads to it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Neighbor {
    /// The neighbouring atom.
    pub atom: usize,
    /// The bond between them.
    pub bond: usize,
}

/// Neighbour lists of all atoms, in bond order, back to back in one list: atom `i`'s are
/// `list[spans[i].0..spans[i].1]`. Two allocations per molecule (and per copy of one)
/// instead of one per atom; the span of an atom is one load, and the slice is taken
/// without a second bounds check (the spans are built here and always lie in the list), so
/// the pattern matcher's innermost loops pay no more than with one list per atom.
#[derive(Clone, Debug, Default, PartialEq)]
pub(crate) struct Adjacency {
    spans: Vec<(u32, u32)>,
    list: Vec<Neighbor>,
}

impl Adjacency {
    /// The lists of `atoms` atoms joined by `bonds` (`(a, b)` per bond, in bond order).
    pub(crate) fn build(atoms: usize, bonds: impl Iterator<Item = (usize, usize)> + Clone) -> Self {
        let mut spans = vec![(0u32, 0u32); atoms];
        let mut count = 0u32;
        for (a, b) in bonds.clone() {
            spans[a].1 += 1;
            spans[b].1 += 1;
        }
        // Each span starts where the one before ends; `.1` counts up from the start as the
        // list fills, and ends at the span's end.
        for span in spans.iter_mut() {
            let degree = span.1;
            *span = (count, count);
            count += degree;
        }
        let mut list = vec![Neighbor { atom: 0, bond: 0 }; count as usize];
        for (i, (a, b)) in bonds.enumerate() {
            list[spans[a].1 as usize] = Neighbor { atom: b, bond: i };
            spans[a].1 += 1;
            list[spans[b].1 as usize] = Neighbor { atom: a, bond: i };
            spans[b].1 += 1;
        }
        Adjacency { spans, list }
    }
}

impl Adjacency {
    /// Each atom's `(start, end)` in [`Adjacency::list`]; the spans follow one another in
    /// atom order, so together they cover the list from 0 to its end.
    #[inline]
    pub(crate) fn spans(&self) -> &[(u32, u32)] {
        &self.spans
    }

    /// All neighbour lists back to back, in atom order.
    #[inline]
    pub(crate) fn list(&self) -> &[Neighbor] {
        &self.list
    }
}

impl std::ops::Index<usize> for Adjacency {
    type Output = [Neighbor];
    #[inline]
    fn index(&self, atom: usize) -> &[Neighbor] {
        let (start, end) = self.spans[atom];
        debug_assert!(start <= end && end as usize <= self.list.len());
        // SAFETY: `build` is the only place spans are made; each lies within `list` (the
        // spans partition it) and `list` is never changed afterwards.
        unsafe { self.list.get_unchecked(start as usize..end as usize) }
    }
}

/// A molecule as read and perceived: atoms, bonds, rings and components.
#[derive(Clone, Debug, PartialEq)]
pub struct Molecule {
    pub(crate) input: String,
    pub(crate) atoms: Vec<Atom>,
    pub(crate) bonds: Vec<Bond>,
    pub(crate) neighbors: Adjacency,
    pub(crate) rings: Vec<Vec<usize>>,
    pub(crate) components: Vec<Vec<usize>>,
}

impl Molecule {
    /// The text the molecule was read from.
    #[inline]
    pub fn input(&self) -> &str {
        &self.input
    }
    /// All atoms, in input order.
    #[inline]
    pub fn atoms(&self) -> &[Atom] {
        &self.atoms
    }
    /// All bonds.
    #[inline]
    pub fn bonds(&self) -> &[Bond] {
        &self.bonds
    }
    /// The neighbours of an atom (atoms written explicitly, hydrogens in counts excluded).
    #[inline]
    pub fn neighbors(&self, atom: usize) -> &[Neighbor] {
        &self.neighbors[atom]
    }
    /// The bond between two atoms, if any.
    #[inline]
    pub fn bond_between(&self, a: usize, b: usize) -> Option<usize> {
        self.neighbors[a]
            .iter()
            .find(|n| n.atom == b)
            .map(|n| n.bond)
    }
    /// The smallest set of smallest rings, each as atoms in ring order.
    #[inline]
    pub fn rings(&self) -> &[Vec<usize>] {
        &self.rings
    }
    /// Components (`.`-separated parts) as atom lists, in input order.
    #[inline]
    pub fn components(&self) -> &[Vec<usize>] {
        &self.components
    }
    /// Explicit connections (SMARTS `D`).
    #[inline]
    pub fn degree(&self, atom: usize) -> usize {
        self.neighbors[atom].len()
    }
    /// Total connections including hydrogens in counts (SMARTS `X`).
    #[inline]
    pub fn total_degree(&self, atom: usize) -> usize {
        self.neighbors[atom].len() + self.atoms[atom].hydrogens as usize
    }
    /// Total hydrogens on an atom: in counts plus explicit `[H]` neighbours (SMARTS `H`).
    #[inline]
    pub fn total_hydrogens(&self, atom: usize) -> usize {
        self.atoms[atom].hydrogens as usize
            + self.neighbors[atom]
                .iter()
                .filter(|n| self.atoms[n.atom].element == 1)
                .count()
    }
    /// A copy of the molecule with protons moved: each `(atom, delta)` adds `delta`
    /// hydrogens to the atom and changes its formal charge by `delta`. Used to write
    /// protonation microstates.
    pub fn with_protons(&self, edits: &[(usize, i8)]) -> Molecule {
        let mut m = self.clone();
        for &(atom, delta) in edits {
            let a = &mut m.atoms[atom];
            a.hydrogens = (a.hydrogens as i16 + delta as i16).max(0) as u8;
            a.charge += delta;
            a.bracket = true;
        }
        m
    }

    /// Rebuilds neighbour lists and components from the bonds.
    pub(crate) fn rebuild_graph(&mut self) {
        self.rebuild_graph_known(false);
    }

    /// [`Molecule::rebuild_graph`], told whether the atoms are known to form one component
    /// (SMILES text without a `.`: every atom is bonded to one written before it), which
    /// then needs no search.
    pub(crate) fn rebuild_graph_known(&mut self, connected: bool) {
        self.neighbors = Adjacency::build(self.atoms.len(), self.bonds.iter().map(|b| (b.a, b.b)));
        let n = self.atoms.len();
        // Debug builds search anyway and check the claim below.
        if connected && n > 0 && !cfg!(debug_assertions) {
            for a in &mut self.atoms {
                a.component = 0;
            }
            self.components = vec![(0..n).collect()];
            return;
        }
        // Components numbered by their lowest atom; then each one's atoms, ascending, in a
        // list of the exact size.
        let mut label = vec![usize::MAX; n];
        let mut sizes: Vec<usize> = Vec::new();
        let mut stack: Vec<usize> = Vec::with_capacity(n);
        for start in 0..n {
            if label[start] != usize::MAX {
                continue;
            }
            let id = sizes.len();
            let mut size = 1;
            label[start] = id;
            stack.push(start);
            while let Some(a) = stack.pop() {
                for nb in &self.neighbors[a] {
                    if label[nb.atom] == usize::MAX {
                        label[nb.atom] = id;
                        size += 1;
                        stack.push(nb.atom);
                    }
                }
            }
            sizes.push(size);
        }
        let mut out: Vec<Vec<usize>> = sizes.iter().map(|&s| Vec::with_capacity(s)).collect();
        for (a, &c) in label.iter().enumerate() {
            out[c].push(a);
            self.atoms[a].component = c;
        }
        debug_assert!(
            !connected || out.len() == 1,
            "text without '.' read as parts"
        );
        self.components = out;
    }
}
