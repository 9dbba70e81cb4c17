//! What the atom primitives test, read off one molecule atom once: element, aromaticity,
//! charge, hydrogen counts, connections and rings as small numbers, so that the pre-filter
//! is a handful of bit tests and a primitive a field comparison (no walk over neighbour
//! lists for `H` or `X` on every test).

use mol::Molecule;

/// Counts from this value up share one bit in the filter masks ("this many or more"); a
/// primitive asking for such a count is not decided by the mask.
pub(crate) const COUNT_CAP: u8 = 31;

/// Elements from this atomic number up share one element/aromatic bit pair.
pub(crate) const ELEMENT_CAP: u8 = 127;

/// Charges outside `-CHARGE_CAP..=CHARGE_CAP - 1` share the outermost bits.
pub(crate) const CHARGE_CAP: i8 = 31;

/// The element/aromatic bit of the filter masks.
#[inline]
pub(crate) const fn element_bit(element: u8, aromatic: bool) -> u8 {
    let element = if element < ELEMENT_CAP {
        element
    } else {
        ELEMENT_CAP
    };
    element * 2 + aromatic as u8
}

/// The charge bit of the filter masks: 1 to 62 for charges -31 to 30, 0 and 63 for the
/// charges beyond.
#[inline]
pub(crate) fn charge_bit(charge: i8) -> u8 {
    (charge.clamp(-CHARGE_CAP - 1, CHARGE_CAP) as i16 + 32) as u8
}

/// Whether a charge has a bit of its own (then the bit decides equality).
pub(crate) fn charge_exact(charge: i8) -> bool {
    (-CHARGE_CAP..CHARGE_CAP).contains(&charge)
}

/// Element classes of the neighbour signature: C, c, N, n, O, o, S, s, P (either), the
/// halogens, H, anything else.
pub(crate) const ELEMENT_CLASSES: u32 = 12;

/// [`element_class`] of every element/aromatic bit, worked out at compile time.
const ELEMENT_CLASS: [u8; 256] = {
    let mut table = [0u8; 256];
    let mut bit = 0;
    while bit < 256 {
        table[bit] = element_class(bit as u8) as u8;
        bit += 1;
    }
    table
};

/// [`bond_group`] of every bond kind.
const BOND_GROUP: [u8; 16] = {
    let mut table = [0u8; 16];
    let mut kind = 0;
    while kind < 16 {
        table[kind] = bond_group(kind as u32) as u8;
        kind += 1;
    }
    table
};

/// The signature bit of a neighbour `t` through `bond`.
#[inline]
fn neighbor_bit(t: &mol::Atom, bond: &mol::Bond) -> u64 {
    let class = ELEMENT_CLASS[element_bit(t.element, t.aromatic) as usize] as u32;
    let group = BOND_GROUP[crate::filter::bond_kind(bond) as usize] as u32;
    signature_bit(class, group)
}

/// The neighbour-signature element class of an element/aromatic bit.
pub(crate) const fn element_class(element_bit: u8) -> u32 {
    let (element, aromatic) = (element_bit / 2, element_bit % 2 == 1);
    match element {
        6 | 7 | 8 | 16 => {
            let base = match element {
                6 => 0,
                7 => 2,
                8 => 4,
                _ => 6,
            };
            base + aromatic as u32
        }
        15 => 8,
        9 | 17 | 35 | 53 => 9,
        1 => 10,
        _ => 11,
    }
}

/// Bond groups of the neighbour signature, by bond kind (`filter::bond_kind`): single not
/// in a ring, double, triple or any other order, aromatic, single in a ring.
pub(crate) const fn bond_group(kind: u32) -> u32 {
    if kind & 1 != 0 {
        3
    } else {
        match (kind >> 1) & 3 {
            0 if kind & 8 != 0 => 4,
            0 => 0,
            1 => 1,
            _ => 2,
        }
    }
}

/// The signature bit of a neighbour of this class through a bond of this group.
pub(crate) const fn signature_bit(class: u32, group: u32) -> u64 {
    1 << (group * ELEMENT_CLASSES + class)
}

/// Set in every signature, never in a requirement from a neighbour: an unused requirement
/// slot holds only it, so it always passes.
pub(crate) const SIGNATURE_ALWAYS: u64 = 1 << 63;

/// The count bit of the filter masks.
#[inline]
fn count(value: usize) -> u8 {
    value.min(COUNT_CAP as usize) as u8
}

/// One atom's values, each as the bit it sets in the filter masks. The exact values that
/// matter beyond the caps are read from the molecule.
#[derive(Clone, Copy, Debug, Default)]
pub(crate) struct AtomFeatures {
    /// [`element_bit`].
    pub(crate) element_bit: u8,
    /// [`charge_bit`].
    pub(crate) charge_bit: u8,
    /// `H`: hydrogens in counts and as atoms, capped.
    pub(crate) total_h: u8,
    /// `h`: hydrogens in counts (not written as atoms), capped.
    pub(crate) implicit_h: u8,
    /// `D`: explicit connections, capped.
    pub(crate) degree: u8,
    /// `X`: connections with hydrogens, capped.
    pub(crate) connectivity: u8,
    /// `R`: SSSR rings holding the atom, capped.
    pub(crate) ring_count: u8,
    /// `r`: smallest SSSR ring size, capped (0: not in a ring).
    pub(crate) smallest_ring: u8,
    /// The neighbours by element class and bond group ([`signature_bit`]), with
    /// [`SIGNATURE_ALWAYS`].
    pub(crate) neighbors: u64,
    /// The union of the neighbours' signatures, with [`SIGNATURE_ALWAYS`].
    pub(crate) far: u64,
}

/// The neighbour signature of `atom`: its neighbours by element class and bond group.
fn signature(molecule: &Molecule, atom: usize) -> u64 {
    let atoms = molecule.atoms();
    let bonds = molecule.bonds();
    molecule
        .neighbors(atom)
        .iter()
        .fold(SIGNATURE_ALWAYS, |sig, nb| {
            sig | neighbor_bit(&atoms[nb.atom], &bonds[nb.bond])
        })
}

impl AtomFeatures {
    /// The eight small values as one word.
    #[inline]
    fn packed(&self) -> u64 {
        u64::from_le_bytes([
            self.element_bit,
            self.charge_bit,
            self.total_h,
            self.implicit_h,
            self.degree,
            self.connectivity,
            self.ring_count,
            self.smallest_ring,
        ])
    }
}

/// Three comparisons instead of ten, as for the hash below.
impl PartialEq for AtomFeatures {
    #[inline]
    fn eq(&self, other: &AtomFeatures) -> bool {
        self.packed() == other.packed()
            && self.neighbors == other.neighbors
            && self.far == other.far
    }
}

impl Eq for AtomFeatures {}

/// Three words instead of one per field: the keys are looked up once per atom in site
/// finding, where a hasher round per byte field was a good part of the lookup. Every
/// field goes in whole, so equal values hash alike and values that differ feed the hasher
/// different words.
impl std::hash::Hash for AtomFeatures {
    fn hash<H: std::hash::Hasher>(&self, state: &mut H) {
        state.write_u64(self.packed());
        state.write_u64(self.neighbors);
        state.write_u64(self.far);
    }
}

impl AtomFeatures {
    /// Reads atom `atom` of `molecule` (which must be in range).
    pub(crate) fn of(molecule: &Molecule, atom: usize) -> AtomFeatures {
        let far = molecule
            .neighbors(atom)
            .iter()
            .fold(SIGNATURE_ALWAYS, |far, nb| {
                far | signature(molecule, nb.atom)
            });
        AtomFeatures::with_signatures(molecule, atom, signature(molecule, atom), far)
    }

    /// Reads atom `atom`, its signature and its neighbours' worked out already.
    fn with_signatures(molecule: &Molecule, atom: usize, signature: u64, far: u64) -> AtomFeatures {
        let atoms = molecule.atoms();
        let a = &atoms[atom];
        let neighbors = molecule.neighbors(atom);
        let degree = neighbors.len();
        let explicit_h = neighbors
            .iter()
            .filter(|nb| atoms[nb.atom].element == 1)
            .count();
        AtomFeatures::from_parts(
            a,
            element_bit(a.element, a.aromatic),
            degree,
            explicit_h,
            signature,
            far,
        )
    }

    /// The values of atom `a` from what was worked out about it: its element bit, its
    /// degree, its explicit hydrogen neighbours, its own and its neighbours' signatures.
    #[inline]
    fn from_parts(
        a: &mol::Atom,
        element_bit: u8,
        degree: usize,
        explicit_h: usize,
        signature: u64,
        far: u64,
    ) -> AtomFeatures {
        AtomFeatures {
            element_bit,
            charge_bit: charge_bit(a.charge),
            total_h: count(a.hydrogens as usize + explicit_h),
            implicit_h: count(a.hydrogens as usize),
            degree: count(degree),
            connectivity: count(degree + a.hydrogens as usize),
            ring_count: count(a.ring_count as usize),
            smallest_ring: count(a.smallest_ring as usize),
            neighbors: signature,
            far,
        }
    }

    /// Whether the values were worked out (a signature always has a bit set).
    #[inline]
    fn known(&self) -> bool {
        self.neighbors != 0
    }
}

/// The values of the atoms of one molecule, worked out on first use (a matcher made for
/// one substituent touches a few atoms only); empty for a single call, which reads each
/// atom afresh.
#[derive(Clone, Debug, Default)]
pub(crate) struct FeatureTable {
    atoms: Vec<AtomFeatures>,
    /// Atoms per element/aromatic bit, saturating, when `census_taken`.
    census: Option<Box<[u16; 256]>>,
    census_taken: bool,
    /// The kind (`filter::bond_kind`) of every bond, when filled; empty otherwise.
    bond_kinds: Vec<u8>,
    /// Scratch for `fill`: signatures, their unions, hydrogens written as atoms, element
    /// bits.
    signatures: Vec<u64>,
    far: Vec<u64>,
    h: Vec<usize>,
    bits: Vec<u8>,
}

impl FeatureTable {
    /// Forgets every atom, for `molecule`, keeping the buffers.
    pub(crate) fn reset(&mut self, molecule: &Molecule) {
        let n = molecule.atoms().len();
        // A matcher made for a few searches does without the census.
        self.census_taken = false;
        self.atoms.clear();
        self.atoms.resize(n, AtomFeatures::default());
        // 0: not worked out (a signature always has a bit set).
        self.signatures.clear();
        self.signatures.resize(n, 0);
        self.bond_kinds.clear();
    }

    /// The kind of bond `bond` of `bonds` (the molecule's), from the table when filled.
    #[inline(always)]
    pub(crate) fn bond_kind(&self, bonds: &[mol::Bond], bond: usize) -> u32 {
        match self.bond_kinds.get(bond) {
            Some(&kind) => kind as u32,
            None => crate::filter::bond_kind(&bonds[bond]),
        }
    }

    /// Whether the molecule has at least `count` atoms of each element/aromatic bit listed
    /// (always, when no census was taken).
    #[inline]
    pub(crate) fn has(&self, wanted: &[(u8, u16)]) -> bool {
        match &self.census {
            Some(census) if self.census_taken => wanted
                .iter()
                .all(|&(bit, count)| census[bit as usize] >= count),
            _ => true,
        }
    }

    /// The signature of `atom`, kept once worked out.
    #[inline]
    fn signature(&mut self, molecule: &Molecule, atom: usize) -> u64 {
        match self.signatures.get_mut(atom) {
            Some(s) if *s != 0 => *s,
            Some(s) => {
                *s = signature(molecule, atom);
                *s
            }
            None => signature(molecule, atom),
        }
    }

    /// Works `atom` out, reusing the signatures already known.
    fn work_out(&mut self, molecule: &Molecule, atom: usize) -> AtomFeatures {
        let own = self.signature(molecule, atom);
        let far = molecule
            .neighbors(atom)
            .iter()
            .fold(SIGNATURE_ALWAYS, |far, nb| {
                far | self.signature(molecule, nb.atom)
            });
        AtomFeatures::with_signatures(molecule, atom, own, far)
    }

    /// Works out every atom of `molecule` at once, keeping the buffers: one pass over the
    /// atoms for their element bits and the census, one over the bonds for the signatures,
    /// one for the unions (and one for the hydrogens written as atoms, when there are any).
    pub(crate) fn fill(&mut self, molecule: &Molecule) {
        let atoms = molecule.atoms();
        let bonds = molecule.bonds();
        let n = atoms.len();
        let census = self.census.get_or_insert_with(|| Box::new([0; 256]));
        census.fill(0);
        self.census_taken = true;
        let (signatures, far, explicit_h, bits) = (
            &mut self.signatures,
            &mut self.far,
            &mut self.h,
            &mut self.bits,
        );
        // Each atom's element bit read once, not once per bond end.
        bits.clear();
        bits.extend(atoms.iter().map(|a| element_bit(a.element, a.aromatic)));
        for &bit in bits.iter() {
            let c = &mut census[bit as usize];
            *c = c.saturating_add(1);
        }
        let hydrogens_as_atoms =
            census[element_bit(1, false) as usize] > 0 || census[element_bit(1, true) as usize] > 0;
        signatures.clear();
        signatures.resize(n, SIGNATURE_ALWAYS);
        far.clear();
        far.resize(n, SIGNATURE_ALWAYS);
        explicit_h.clear();
        explicit_h.resize(n, 0);
        self.bond_kinds.clear();
        self.bond_kinds
            .extend(bonds.iter().map(|b| crate::filter::bond_kind(b) as u8));
        let class = |bit: u8| ELEMENT_CLASS[bit as usize] as u32;
        for (b, &kind) in bonds.iter().zip(&self.bond_kinds) {
            // `neighbor_bit` both ways, the bond's group worked out once.
            let group = BOND_GROUP[kind as usize] as u32;
            signatures[b.a] |= signature_bit(class(bits[b.b]), group);
            signatures[b.b] |= signature_bit(class(bits[b.a]), group);
        }
        if hydrogens_as_atoms {
            for b in bonds {
                explicit_h[b.a] += (atoms[b.b].element == 1) as usize;
                explicit_h[b.b] += (atoms[b.a].element == 1) as usize;
            }
        }
        for b in bonds {
            far[b.a] |= signatures[b.b];
            far[b.b] |= signatures[b.a];
        }
        self.atoms.clear();
        let per_atom = atoms
            .iter()
            .zip(bits.iter())
            .zip(signatures.iter().zip(far.iter()))
            .zip(explicit_h.iter());
        self.atoms.extend(per_atom.enumerate().map(
            |(i, (((a, &bit), (&signature, &far)), &explicit_h))| {
                AtomFeatures::from_parts(a, bit, molecule.degree(i), explicit_h, signature, far)
            },
        ));
    }

    /// The values of `atom`, from the table when they were worked out, else afresh (not
    /// kept).
    #[inline]
    pub(crate) fn peek(&self, molecule: &Molecule, atom: usize) -> AtomFeatures {
        match self.atoms.get(atom) {
            Some(f) if f.known() => *f,
            _ => AtomFeatures::of(molecule, atom),
        }
    }

    /// The values of `atom` (in range of the molecule).
    #[inline(always)]
    pub(crate) fn get(&mut self, molecule: &Molecule, atom: usize) -> AtomFeatures {
        match self.atoms.get(atom) {
            Some(f) if f.known() => *f,
            Some(_) => {
                let f = self.work_out(molecule, atom);
                self.atoms[atom] = f;
                f
            }
            None => AtomFeatures::of(molecule, atom),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Keeps the words a value feeds a hasher.
    #[derive(Default)]
    struct Words(Vec<u64>);

    impl std::hash::Hasher for Words {
        fn finish(&self) -> u64 {
            0
        }
        fn write(&mut self, bytes: &[u8]) {
            self.0.extend(bytes.iter().map(|&b| b as u64));
        }
        fn write_u64(&mut self, n: u64) {
            self.0.push(n);
        }
    }

    fn words(f: &AtomFeatures) -> Vec<u64> {
        let mut w = Words::default();
        std::hash::Hash::hash(f, &mut w);
        w.0
    }

    #[test]
    fn atoms_that_differ_in_any_value_feed_the_hasher_different_words() {
        let m = mol::parse("CC(=O)[O-].c1ccncc1[NH3+]").expect("reads");
        let base = AtomFeatures::of(&m, 1);
        assert_eq!(words(&base), words(&AtomFeatures::of(&m, 1)));
        let changes: [fn(&mut AtomFeatures); 10] = [
            |f| f.element_bit += 1,
            |f| f.charge_bit += 1,
            |f| f.total_h += 1,
            |f| f.implicit_h += 1,
            |f| f.degree += 1,
            |f| f.connectivity += 1,
            |f| f.ring_count += 1,
            |f| f.smallest_ring += 1,
            |f| f.neighbors ^= 1,
            |f| f.far ^= 1,
        ];
        for (i, change) in changes.iter().enumerate() {
            let mut other = base;
            change(&mut other);
            assert_ne!(other, base, "change {i}");
            assert_ne!(words(&other), words(&base), "change {i}");
        }
        // Every atom of a molecule whose atoms all differ.
        let all: Vec<Vec<u64>> = (0..m.atoms().len())
            .map(|a| words(&AtomFeatures::of(&m, a)))
            .collect();
        for a in 0..all.len() {
            for b in 0..all.len() {
                let same = AtomFeatures::of(&m, a) == AtomFeatures::of(&m, b);
                assert_eq!(all[a] == all[b], same, "atoms {a} and {b}");
            }
        }
    }

    #[test]
    fn the_table_reads_every_atom_as_a_single_read_does() {
        for smiles in [
            "CC(=O)[O-].c1ccncc1[NH3+]",
            "[H]OC([H])([H])C#N",
            "C1CC2CCC1CC2",
            "O=S(=O)(N)c1ccc(Cl)cc1",
            "[13CH3][Na]",
        ] {
            let m = mol::parse(smiles).unwrap_or_else(|e| panic!("{smiles}: {e}"));
            let mut filled = FeatureTable::default();
            filled.fill(&m);
            let mut lazy = FeatureTable::default();
            lazy.reset(&m);
            for atom in 0..m.atoms().len() {
                let single = AtomFeatures::of(&m, atom);
                assert_eq!(filled.get(&m, atom), single, "{smiles} {atom}");
                assert_eq!(lazy.get(&m, atom), single, "{smiles} {atom}");
                assert_eq!(lazy.peek(&m, atom), single, "{smiles} {atom}");
            }
        }
    }
}
