//! Writing a molecule as SMILES.
//!
//! A depth-first walk per component (iterative, so any size is safe), branches in
//! parentheses, ring closures with the lowest free number (`%nn` past 9). Aromatic atoms are
//! written lower case with the bonds between them elided; an atom goes in brackets when its
//! charge, isotope, class or hydrogen count is not what a reader would infer without them.
//! Stereo marks are not written (the molecule does not keep them).
//!
//! Protonation microstates are written through an overlay of proton moves (see
//! [`write_smiles_with_protons`]) rather than a modified copy of the molecule: a record writes
//! several species of one parent, and copying the whole molecule for each cost more than
//! writing it.

use crate::elements::{allowed_valences, organic_valences, symbol};
use crate::molecule::Molecule;

/// Writes SMILES and returns, for each atom in the order written, its index in `m`.
pub fn write_smiles_ordered(m: &Molecule) -> (String, Vec<usize>) {
    let w = SmilesWriter::new(m);
    (w.plain, w.order)
}

/// Writes the molecule with protons moved, as [`Molecule::with_protons`] would move them:
/// `write_smiles_with_protons(m, edits) == write_smiles(&m.with_protons(edits))`, without
/// the copy.
pub fn write_smiles_with_protons(m: &Molecule, edits: &[(usize, i8)]) -> String {
    SmilesWriter::new(m).write(edits)
}

/// A molecule's SMILES walk, made once and written any number of times with different
/// protons moved: the walk (atom order, branches, ring-closure digits) depends only on
/// the bonds, so the species of one parent share it.
///
/// ```
/// let m = mol::parse("NCC(=O)O")?;
/// let w = mol::SmilesWriter::new(&m);
/// assert_eq!(w.write(&[]), mol::write_smiles(&m));
/// assert_eq!(w.write(&[(0, 1), (4, -1)]), "[NH3+]CC(=O)[O-]");
/// # Ok::<(), mol::Error>(())
/// ```
pub struct SmilesWriter<'a> {
    m: &'a Molecule,
    order: Vec<usize>,
    /// The SMILES with no protons moved, written once: species of one parent differ from
    /// it only at the atoms whose protons move (and in the case of aromatic atoms, perhaps
    /// in how their component is written), so the rest is copied from here.
    plain: String,
    /// Per component: written lower case with no protons moved.
    plain_lower: Vec<bool>,
    /// Per atom: where its text sits in `plain`.
    plain_atom: Vec<(usize, usize)>,
    /// Per component: where its text sits in `plain` (without the `.` before it).
    plain_component: Vec<(usize, usize)>,
}

/// One step of the written walk of a component.
#[derive(Clone, Copy)]
enum Op {
    Atom(usize),
    /// The bond symbol, if any, of a bond entered or a ring bond opened.
    Bond(usize),
    /// A branch's parenthesis.
    Text(char),
    Digit(usize),
}

/// Appends the text of one step, the component written lower case or not.
#[inline]
fn push_op(v: &View, op: Op, lower: bool, out: &mut String) {
    match op {
        Op::Atom(i) => atom_text(v, i, lower, out),
        Op::Bond(b) => {
            if let Some(c) = bond_symbol(v.m, b, lower) {
                out.push(c);
            }
        }
        Op::Text(c) => out.push(c),
        Op::Digit(d) => push_digit(out, d),
    }
}

impl<'a> SmilesWriter<'a> {
    /// Walks the molecule once, writing the SMILES with no protons moved on the way.
    pub fn new(m: &'a Molecule) -> Self {
        let v = View { m, edits: &[] };
        let mut order = Vec::with_capacity(m.atoms.len());
        let mut out = String::with_capacity(m.input.len() + 16);
        let mut lowers = vec![false; m.components.len()];
        let mut texts: Vec<(usize, usize)> = Vec::with_capacity(m.components.len());
        let mut places = vec![(0, 0); m.atoms.len()];
        with_scratch(m, |scratch| {
            // Per atom, whether it is written without brackets, where the case test of its
            // component worked that out already (every aromatic atom of a component written
            // lower case).
            let mut organic = std::mem::take(&mut scratch.organic);
            organic.clear();
            organic.resize(m.atoms.len(), false);
            for (k, component) in m.components.iter().enumerate() {
                if k > 0 {
                    out.push('.');
                }
                let from = out.len();
                let lower = aromatic_writable_noting(&v, component, &mut organic);
                lowers[k] = lower;
                walk_component(m, component, scratch, |op| match op {
                    Op::Atom(i) => {
                        order.push(i);
                        let from = out.len();
                        let known = (lower && m.atoms[i].aromatic).then(|| organic[i]);
                        atom_text_known(&v, i, lower, known, &mut out);
                        places[i] = (from, out.len());
                    }
                    op => push_op(&v, op, lower, &mut out),
                });
                texts.push((from, out.len()));
            }
            scratch.organic = organic;
        });
        SmilesWriter {
            m,
            order,
            plain: out,
            plain_lower: lowers,
            plain_atom: places,
            plain_component: texts,
        }
    }

    /// For each atom in the order written, its index in the molecule.
    pub fn order(&self) -> &[usize] {
        &self.order
    }

    /// The SMILES with protons moved by `edits` (each `(atom, delta)` as in
    /// [`Molecule::with_protons`]; empty for the molecule itself).
    pub fn write(&self, edits: &[(usize, i8)]) -> String {
        if edits.is_empty() {
            return self.plain.clone();
        }
        let v = View { m: self.m, edits };
        let m = self.m;
        let mut out = String::with_capacity(self.plain.len() + 8);
        let in_component = |a: usize, k: usize| m.atoms.get(a).is_some_and(|x| x.component == k);
        for (k, &(text_from, text_to)) in self.plain_component.iter().enumerate() {
            if k > 0 {
                out.push('.');
            }
            // A component with no protons moved reads as it does with none moved anywhere.
            if !edits.iter().any(|&(a, _)| in_component(a, k)) {
                out.push_str(&self.plain[text_from..text_to]);
                continue;
            }
            let lower = aromatic_writable(&v, &m.components[k]);
            if lower == self.plain_lower[k] {
                // Written in the same case as with no protons moved: bonds, ring digits and
                // the atoms whose protons do not move read as they do there, so the text is
                // the plain one with the moved atoms rewritten, taken in the order written.
                let mut cursor = text_from;
                while let Some((from, a)) = edits
                    .iter()
                    .filter(|&&(a, _)| in_component(a, k))
                    .map(|&(a, _)| (self.plain_atom[a].0, a))
                    .filter(|&(from, _)| from >= cursor)
                    .min()
                {
                    out.push_str(&self.plain[cursor..from]);
                    atom_text(&v, a, lower, &mut out);
                    cursor = self.plain_atom[a].1;
                }
                out.push_str(&self.plain[cursor..text_to]);
                continue;
            }
            // In the other case (rare): the component walked again, the same walk (it
            // depends on the bonds alone), every step written afresh.
            with_scratch(m, |scratch| {
                walk_component(m, &m.components[k], scratch, |op| {
                    push_op(&v, op, lower, &mut out)
                });
            });
        }
        out
    }
}

/// The molecule as written: its own atoms, with hydrogens and charges changed by `edits`.
struct View<'a> {
    m: &'a Molecule,
    edits: &'a [(usize, i8)],
}

impl View<'_> {
    /// Hydrogens and charge of atom `i`, after the edits (applied in order, as
    /// [`Molecule::with_protons`] does).
    #[inline]
    fn hc(&self, i: usize) -> (u8, i8) {
        let a = &self.m.atoms[i];
        let (mut h, mut c) = (a.hydrogens, a.charge);
        for &(atom, delta) in self.edits {
            if atom == i {
                h = (h as i16 + delta as i16).max(0) as u8;
                c = c.wrapping_add(delta);
            }
        }
        (h, c)
    }
}

/// Whether the component can be written with lower-case aromatic atoms such that a reader
/// infers the same hydrogens and the same Kekulé needs; if not it is written in Kekulé
/// form, which the aromaticity model perceives the same way.
fn aromatic_writable(v: &View, component: &[usize]) -> bool {
    aromatic_writable_with(v, component, |_, _| {})
}

/// [`aromatic_writable`], noting in `organic` for each aromatic atom it looks at whether
/// it is written without brackets in lower case ([`organic_form`]).
fn aromatic_writable_noting(v: &View, component: &[usize], organic: &mut [bool]) -> bool {
    aromatic_writable_with(v, component, |i, o| organic[i] = o)
}

fn aromatic_writable_with(
    v: &View,
    component: &[usize],
    mut note: impl FnMut(usize, bool),
) -> bool {
    let m = v.m;
    component.iter().all(|&i| {
        let a = &m.atoms[i];
        if !a.aromatic {
            return true;
        }
        if !matches!(a.element, 5 | 6 | 7 | 8 | 15 | 16 | 33 | 34) {
            return false;
        }
        let facts = bond_facts(m, i, true);
        let organic = organic_form_with(v, i, true, facts);
        note(i, organic);
        if organic {
            return true;
        }
        // In brackets the hydrogens are given; the free valence must still call for the
        // double bond exactly when the Kekulé form has one.
        let (used, has_double) = facts;
        let (hydrogens, charge) = v.hc(i);
        let used = used + hydrogens as u32;
        let free = allowed_valences(a.element, charge)
            .and_then(|v| v.iter().map(|&t| t as u32).find(|&t| t >= used))
            .map_or(0, |t| t - used);
        (free >= 1) == has_double
    })
}

/// Bond sum as a reader counts it (aromatic bonds as 1 when written lower case), and
/// whether the atom has an aromatic bond of order 2 in the Kekulé form: one pass over its
/// bonds for both.
#[inline]
fn bond_facts(m: &Molecule, i: usize, lower: bool) -> (u32, bool) {
    let mut sum = 0;
    let mut has_double = false;
    for n in &m.neighbors[i] {
        let b = &m.bonds[n.bond];
        sum += if lower && b.aromatic {
            1
        } else {
            b.order as u32
        };
        has_double |= b.aromatic && b.order == 2;
    }
    (sum, has_double)
}

/// Whether the atom can be written without brackets and read back with the same
/// hydrogens (and, for aromatic atoms, the same need for a ring double bond).
fn organic_form(v: &View, i: usize, lower: bool) -> bool {
    organic_form_with(v, i, lower, bond_facts(v.m, i, lower))
}

/// [`organic_form`], given the atom's [`bond_facts`].
#[inline]
fn organic_form_with(v: &View, i: usize, lower: bool, (sum, has_double): (u32, bool)) -> bool {
    let m = v.m;
    let a = &m.atoms[i];
    let (hydrogens, charge) = v.hc(i);
    if charge != 0 || a.isotope.is_some() || a.atom_class.is_some() {
        return false;
    }
    if a.element == 0 {
        return hydrogens == 0;
    }
    let aromatic = lower && a.aromatic;
    if aromatic && !matches!(a.element, 5 | 6 | 7 | 8 | 15 | 16) {
        return false;
    }
    let targets = organic_valences(a.element);
    // Past the highest default valence OpenSMILES adds no hydrogens, but some readers fill
    // to the next valence they know (RDKit reads bare `I` with two bonds as `[IH]`):
    // brackets leave no doubt. (No default valence at all: not in the organic subset.)
    let Some(target) = targets.iter().map(|&t| t as u32).find(|&t| t >= sum) else {
        return false;
    };
    // Pentavalent N from the organic subset (OpenSMILES allows it) is read by RDKit as
    // trivalent; brackets keep its hydrogens explicit.
    if a.element == 7 && target == 5 {
        return false;
    }
    let free = target - sum;
    if aromatic {
        (free >= 1) == has_double && free.saturating_sub(1) == hydrogens as u32
    } else {
        free == hydrogens as u32
    }
}

/// Appends a number in decimal without a temporary string.
fn push_number(out: &mut String, x: u32) {
    out.push_str(crate::decimal(u64::from(x), &mut [0; 20]));
}

#[inline]
fn push_symbol(out: &mut String, element: u8, aromatic: bool) {
    // Symbols are one or two ASCII letters: pushed one by one, cheaper than a copy.
    for &c in symbol(element).as_bytes() {
        out.push(if aromatic { c.to_ascii_lowercase() } else { c } as char);
    }
}

fn atom_text(v: &View, i: usize, lower: bool, out: &mut String) {
    atom_text_known(v, i, lower, None, out);
}

/// [`atom_text`], with [`organic_form`] given where it is known already.
fn atom_text_known(v: &View, i: usize, lower: bool, organic: Option<bool>, out: &mut String) {
    let a = &v.m.atoms[i];
    let aromatic = lower && a.aromatic;
    if organic.unwrap_or_else(|| organic_form(v, i, lower)) {
        push_symbol(out, a.element, aromatic);
        return;
    }
    let (hydrogens, charge) = v.hc(i);
    out.push('[');
    if let Some(iso) = a.isotope {
        push_number(out, iso as u32);
    }
    push_symbol(out, a.element, aromatic);
    match hydrogens {
        0 => {}
        1 => out.push('H'),
        h => {
            out.push('H');
            push_number(out, h as u32);
        }
    }
    match charge {
        0 => {}
        1 => out.push('+'),
        -1 => out.push('-'),
        c => {
            out.push(if c > 0 { '+' } else { '-' });
            push_number(out, (c as i32).unsigned_abs());
        }
    }
    if let Some(class) = a.atom_class {
        out.push(':');
        push_number(out, class as u32);
    }
    out.push(']');
}

/// The symbol written for a bond, if any (one character, pushed as such rather than
/// copied as text).
#[inline]
fn bond_symbol(m: &Molecule, bond: usize, lower: bool) -> Option<char> {
    let b = &m.bonds[bond];
    if lower && b.aromatic {
        return None;
    }
    match b.order {
        2 => Some('='),
        3 => Some('#'),
        _ if lower && m.atoms[b.a].aromatic && m.atoms[b.b].aromatic => Some('-'),
        _ => None,
    }
}

/// One step of the depth-first walk, in the order taken.
#[derive(Clone, Copy)]
enum Event {
    /// An atom reached from `parent` by bond `via` (both `usize::MAX` at the root).
    Enter {
        atom: usize,
        via: usize,
        parent: usize,
    },
    /// The walk is done with the atom and all reached from it.
    Exit { atom: usize, parent: usize },
}

/// What the walk has made of a bond so far.
const UNSEEN: u8 = 0;
const TREE: u8 = 1;
const CLOSURE: u8 = 2;

/// Per-molecule arrays of the walk, left ready (`false`, [`UNSEEN`], `usize::MAX`, empty)
/// for the next component. Kept per thread between molecules and used where they lie: a
/// record writes one molecule after another, and allocating the arrays afresh for each
/// cost more than the walk.
#[derive(Default)]
struct Scratch {
    visited: Vec<bool>,
    /// Per bond: [`UNSEEN`], [`TREE`] or [`CLOSURE`].
    state: Vec<u8>,
    digit_of: Vec<usize>,
    /// The molecule's neighbour lists, each sorted by (atom, bond), at the molecule's own
    /// spans.
    sorted: Vec<crate::Neighbor>,
    /// Per atom: the last atom reached from it (its last branch, written without
    /// parentheses), `usize::MAX` if none.
    last_child: Vec<usize>,
    /// Ring-closure bonds at each atom, in the order found.
    closures: Vec<Vec<usize>>,
    /// Depth-first stack: atom, next place in `sorted`, end of its list.
    stack: Vec<(usize, usize, usize)>,
    free: Vec<bool>,
    rings: Vec<usize>,
    freed: Vec<usize>,
    /// The walk of the component, and its ring-closure bonds.
    events: Vec<Event>,
    closure_bonds: Vec<usize>,
    /// Per atom, for the plain text: written without brackets (see [`SmilesWriter::new`]).
    organic: Vec<bool>,
}

thread_local! {
    /// The arrays of the last walk on this thread.
    static SPARE_SCRATCH: std::cell::RefCell<Scratch> = std::cell::RefCell::default();
}

/// Runs `f` on the thread's arrays, made ready for `m` (or on new ones while the thread's
/// are in use or gone, during thread teardown).
fn with_scratch<R>(m: &Molecule, f: impl FnOnce(&mut Scratch) -> R) -> R {
    let mut f = Some(f);
    let done = SPARE_SCRATCH
        .try_with(|spare| {
            let mut s = spare.try_borrow_mut().ok()?;
            let f = f.take()?;
            s.prepare(m);
            Some(f(&mut s))
        })
        .ok()
        .flatten();
    match (done, f) {
        (Some(r), _) => r,
        (None, Some(f)) => {
            let mut s = Scratch::default();
            s.prepare(m);
            f(&mut s)
        }
        (None, None) => unreachable!("the walk ran but gave no result"),
    }
}

impl Scratch {
    /// Makes the arrays ready for `m`. Every array is reset here, so arrays from a walk
    /// that did not finish are as good as new ones.
    fn prepare(&mut self, m: &Molecule) {
        let s = self;
        let n = m.atoms.len();
        let nb = m.bonds.len();
        s.visited.clear();
        s.visited.resize(n, false);
        s.state.clear();
        s.state.resize(nb, UNSEEN);
        s.digit_of.clear();
        s.digit_of.resize(nb, usize::MAX);
        s.sorted.clear();
        s.sorted.extend_from_slice(m.neighbors.list());
        for &(from, to) in m.neighbors.spans() {
            let list = &mut s.sorted[from as usize..to as usize];
            // Most lists come in order already (bonds are numbered as written). No two
            // bonds join the same pair of atoms, so the atoms alone tell the order; a tie
            // would only take the sort below.
            if !list.windows(2).all(|w| w[0].atom < w[1].atom) {
                list.sort_unstable_by_key(|nb| (nb.atom, nb.bond));
            }
        }
        s.last_child.clear();
        s.last_child.resize(n, usize::MAX);
        for c in &mut s.closures {
            c.clear();
        }
    }
}

/// Walks one component, handing each step to `emit` in the order written.
fn walk_component(m: &Molecule, component: &[usize], s: &mut Scratch, mut emit: impl FnMut(Op)) {
    let Some(&root) = component.first() else {
        return;
    };
    let spans = m.neighbors.spans();
    // Pass 1: depth-first walk (neighbours in atom order), tree and ring-closure bonds.
    // The atoms are written in the order it enters them, each branch but an atom's last in
    // parentheses; only the ring-closure digits need the whole walk first.
    let mut events = std::mem::take(&mut s.events);
    let mut closure_bonds = std::mem::take(&mut s.closure_bonds);
    events.clear();
    closure_bonds.clear();
    s.visited[root] = true;
    s.stack.clear();
    let (from, to) = spans[root];
    s.stack.push((root, from as usize, to as usize));
    events.push(Event::Enter {
        atom: root,
        via: usize::MAX,
        parent: usize::MAX,
    });
    while let Some(top) = s.stack.last_mut() {
        let (at, next, end) = *top;
        if next >= end {
            s.stack.pop();
            let parent = s.stack.last().map_or(usize::MAX, |t| t.0);
            events.push(Event::Exit { atom: at, parent });
            continue;
        }
        top.1 = next + 1;
        let nb = s.sorted[next];
        let (w, b) = (nb.atom, nb.bond);
        if s.state[b] != UNSEEN {
            continue;
        }
        if !s.visited[w] {
            s.state[b] = TREE;
            s.visited[w] = true;
            s.last_child[at] = w;
            events.push(Event::Enter {
                atom: w,
                via: b,
                parent: at,
            });
            let (from, to) = spans[w];
            s.stack.push((w, from as usize, to as usize));
        } else {
            s.state[b] = CLOSURE;
            closure_bonds.push(b);
        }
    }
    // Ring-closure bonds at each of their two atoms, in the order found.
    let has_closures = !closure_bonds.is_empty();
    if has_closures {
        if s.closures.len() < m.atoms.len() {
            s.closures.resize_with(m.atoms.len(), Vec::new);
        }
        for &b in &closure_bonds {
            let (x, y) = (m.bonds[b].a, m.bonds[b].b);
            s.closures[x].push(b);
            s.closures[y].push(b);
        }
    }
    // Pass 2: emit in the same order.
    // Index 0 is never used; past 99 the list grows (see `push_digit`).
    s.free.clear();
    s.free.resize(100, true);
    s.free[0] = false;
    for &event in &events {
        let (at, via) = match event {
            Event::Exit { atom, parent } => {
                if parent != usize::MAX && s.last_child[parent] != atom {
                    emit(Op::Text(')'));
                }
                continue;
            }
            Event::Enter { atom, via, parent } => {
                if parent != usize::MAX && s.last_child[parent] != atom {
                    emit(Op::Text('('));
                }
                (atom, via)
            }
        };
        if via != usize::MAX {
            emit(Op::Bond(via));
        }
        emit(Op::Atom(at));
        if has_closures && !s.closures[at].is_empty() {
            s.rings.clear();
            s.rings.extend_from_slice(&s.closures[at]);
            // Closings first (their digits free up for the openings), each in bond order.
            let digit_of = &s.digit_of;
            s.rings.sort_by_key(|&b| (digit_of[b] == usize::MAX, b));
            s.freed.clear();
            for k in 0..s.rings.len() {
                let b = s.rings[k];
                match s.digit_of[b] {
                    usize::MAX => {
                        let d = match (1..s.free.len()).find(|&d| s.free[d]) {
                            Some(d) => d,
                            None => {
                                s.free.push(true);
                                s.free.len() - 1
                            }
                        };
                        s.free[d] = false;
                        s.digit_of[b] = d;
                        emit(Op::Bond(b));
                        emit(Op::Digit(d));
                    }
                    d => {
                        s.freed.push(d);
                        emit(Op::Digit(d));
                    }
                }
            }
            // Freed only now, so no digit closes and reopens on one atom.
            for &d in &s.freed {
                s.free[d] = true;
            }
        }
    }
    // Leave the scratch arrays ready for the next component.
    for &event in &events {
        if let Event::Enter { atom, via, .. } = event {
            s.visited[atom] = false;
            s.last_child[atom] = usize::MAX;
            if via != usize::MAX {
                s.state[via] = UNSEEN;
            }
        }
    }
    for &b in &closure_bonds {
        s.state[b] = UNSEEN;
        s.digit_of[b] = usize::MAX;
        let (x, y) = (m.bonds[b].a, m.bonds[b].b);
        s.closures[x].clear();
        s.closures[y].clear();
    }
    s.events = events;
    s.closure_bonds = closure_bonds;
}

/// Ring numbers 1 to 9 as digits, 10 to 99 as `%nn`. SMILES has no number past 99; a
/// molecule that needs more ring bonds open at once (only large two-dimensional sheets)
/// gets `%(nnn)`, the extension RDKit reads, which this crate's reader refuses.
fn push_digit(out: &mut String, d: usize) {
    if d < 10 {
        out.push((b'0' + d as u8) as char);
    } else if d < 100 {
        out.push('%');
        push_number(out, d as u32);
    } else {
        out.push_str("%(");
        push_number(out, d as u32);
        out.push(')');
    }
}

#[cfg(test)]
mod tests {
    use crate::{parse, write_smiles};

    fn written(s: &str) -> String {
        write_smiles(&parse(s).expect("test SMILES reads"))
    }

    #[test]
    fn aromatic_rings_are_written_lower_case_with_nh() {
        assert_eq!(written("C1=CC=CN1"), "c1ccc[nH]1");
        assert_eq!(written("O=C1C=CC=CN1"), "O=c1cccc[nH]1");
    }

    #[test]
    fn single_bond_between_aromatic_atoms_is_explicit() {
        assert_eq!(written("c1ccccc1c1ccccc1"), "c1ccccc1-c1ccccc1");
    }

    #[test]
    fn ladder_needs_two_digit_ring_numbers() {
        // Eleven ring bonds open at once when the walk runs down one rail of the ladder.
        let s = "C1C2C3C4C5C6C7C8C9C%10C%11CCC%11C%10C9C8C7C6C5C4C3C2C1";
        let w = written(s);
        assert!(w.contains("%10") && w.contains("%11"), "{w}");
        assert_eq!(parse(&w).map(|m| m.rings().len()), Ok(11));
    }

    #[test]
    fn moved_protons_go_in_brackets() {
        let acid = parse("CC(=O)O").expect("reads");
        assert_eq!(write_smiles(&acid.with_protons(&[(3, -1)])), "CC(=O)[O-]");
        let amine = parse("CN").expect("reads");
        assert_eq!(write_smiles(&amine.with_protons(&[(1, 1)])), "C[NH3+]");
        let pyridine = parse("c1ccncc1").expect("reads");
        assert_eq!(
            write_smiles(&pyridine.with_protons(&[(3, 1)])),
            "c1cc[nH+]cc1"
        );
    }

    #[test]
    fn proton_overlay_writes_what_a_modified_copy_writes() {
        // Every single and double proton move on acids, bases, aromatic N and an atom moved
        // twice: the overlay must give the copy's text exactly.
        for s in [
            "CC(=O)O",
            "NCCc1c[nH]cn1",
            "c1ccncc1C(=O)[O-]",
            "OC(=O)c1cn(C2CC2)c2cc(N3CCNCC3)c(F)cc2c1=O",
            "[13CH3:4]N",
            "c1ccc2[nH]ccc2c1.[Na+]",
        ] {
            let m = parse(s).expect("test SMILES reads");
            let n = m.atoms().len();
            for i in 0..n {
                for d in [-1i8, 1] {
                    let edits = [(i, d)];
                    assert_eq!(
                        crate::write_smiles_with_protons(&m, &edits),
                        write_smiles(&m.with_protons(&edits)),
                        "{s} {edits:?}"
                    );
                    let twice = [(i, d), ((i + 1) % n, -d), (i, d)];
                    assert_eq!(
                        crate::write_smiles_with_protons(&m, &twice),
                        write_smiles(&m.with_protons(&twice)),
                        "{s} {twice:?}"
                    );
                }
            }
        }
    }

    #[test]
    fn atoms_past_their_default_valence_get_brackets() {
        // Diaryliodonium-like iodine with two bonds and no hydrogen (NCI 5K sample).
        assert_eq!(written("c1ccccc1[I]c1ccccc1"), "c1ccccc1[I]c1ccccc1");
        assert_eq!(written("CS(=O)(=O)C"), "CS(=O)(=O)C");
    }

    #[test]
    fn isotopes_classes_and_charges_are_kept() {
        assert_eq!(written("[13CH3:4][O-]"), "[13CH3:4][O-]");
        assert_eq!(written("[Fe+3]"), "[Fe+3]");
        assert_eq!(written("[O-2]"), "[O-2]");
    }
}
