//! The atom pre-filter: which (element, aromatic) pairs and charges a pattern atom could
//! possibly match, worked out once at parse time. On the anchored atom it is
//! `could_anchor`; on the others it spares most expression walks during the search.
//!
//! Each projection over-approximates: a conjunction intersects, a disjunction unites, and a
//! negation complements only when its operand depends on that projection alone (otherwise
//! it may hold anywhere). So a `false` from the filter is certain, a `true` is a maybe.

use mol::Molecule;

use crate::expr::Expr;
use crate::primitive::AtomPrim;

/// Sets the projections are computed in.
trait Lattice: Copy {
    fn full() -> Self;
    fn empty() -> Self;
    fn meet(self, other: Self) -> Self;
    fn join(self, other: Self) -> Self;
    fn complement(self) -> Self;
}

/// (element, aromatic) pairs, bit `element * 2 + aromatic`, elements 0 to 127.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Elements([u64; 4]);

impl Lattice for Elements {
    fn full() -> Self {
        Elements([u64::MAX; 4])
    }
    fn empty() -> Self {
        Elements([0; 4])
    }
    fn meet(self, o: Self) -> Self {
        Elements(std::array::from_fn(|i| self.0[i] & o.0[i]))
    }
    fn join(self, o: Self) -> Self {
        Elements(std::array::from_fn(|i| self.0[i] | o.0[i]))
    }
    fn complement(self) -> Self {
        Elements(std::array::from_fn(|i| !self.0[i]))
    }
}

impl Elements {
    fn with(mut self, element: u8, aromatic: bool) -> Self {
        let bit = element as usize * 2 + aromatic as usize;
        if bit < 256 {
            self.0[bit / 64] |= 1 << (bit % 64);
        }
        self
    }
    fn contains(&self, element: u8, aromatic: bool) -> bool {
        let bit = element as usize * 2 + aromatic as usize;
        bit >= 256 || self.0[bit / 64] & (1 << (bit % 64)) != 0
    }
}

/// Formal charges -32 to +31, bit `charge + 32`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Charges(u64);

impl Lattice for Charges {
    fn full() -> Self {
        Charges(u64::MAX)
    }
    fn empty() -> Self {
        Charges(0)
    }
    fn meet(self, o: Self) -> Self {
        Charges(self.0 & o.0)
    }
    fn join(self, o: Self) -> Self {
        Charges(self.0 | o.0)
    }
    fn complement(self) -> Self {
        Charges(!self.0)
    }
}

impl Charges {
    fn bit(charge: i8) -> Option<u32> {
        let b = charge as i32 + 32;
        (0..64).contains(&b).then_some(b as u32)
    }
    fn contains(&self, charge: i8) -> bool {
        match Charges::bit(charge) {
            Some(b) => self.0 & (1 << b) != 0,
            None => true,
        }
    }
}

/// Projects an expression: the set, and whether it is exact (depends on this projection
/// only).
fn project<L: Lattice>(expr: &Expr<AtomPrim>, prim: &impl Fn(&AtomPrim) -> Option<L>) -> (L, bool) {
    match expr {
        Expr::Prim(p) => match prim(p) {
            Some(set) => (set, true),
            None => (L::full(), false),
        },
        Expr::Not(e) => match project(e, prim) {
            (set, true) => (set.complement(), true),
            (_, false) => (L::full(), false),
        },
        Expr::And(es) => es.iter().fold((L::full(), true), |(s, x), e| {
            let (t, y) = project(e, prim);
            (s.meet(t), x && y)
        }),
        Expr::Or(es) => es.iter().fold((L::empty(), true), |(s, x), e| {
            let (t, y) = project(e, prim);
            (s.join(t), x && y)
        }),
    }
}

fn elements_of(p: &AtomPrim) -> Option<Elements> {
    match *p {
        AtomPrim::Any => Some(Elements::full()),
        AtomPrim::Aromatic(want) => {
            Some((0..128u8).fold(Elements::empty(), |s, e| s.with(e, want)))
        }
        AtomPrim::Element { number, aromatic } => Some(match aromatic {
            Some(want) => Elements::empty().with(number, want),
            None => Elements::empty().with(number, false).with(number, true),
        }),
        _ => None,
    }
}

fn charges_of(p: &AtomPrim) -> Option<Charges> {
    match *p {
        AtomPrim::Any => Some(Charges::full()),
        AtomPrim::Charge(c) => Some(Charges::bit(c).map_or(Charges::empty(), |b| Charges(1 << b))),
        _ => None,
    }
}

/// What a pattern atom could match, by element/aromaticity and by charge.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct AtomFilter {
    elements: Elements,
    charges: Charges,
    /// The expression depends on one projection only (`C`, `[c,n]`, `[+]`), so passing the
    /// filter is the answer and the expression need not be walked.
    pub(crate) exact: bool,
}

impl AtomFilter {
    pub(crate) fn new(expr: &Expr<AtomPrim>) -> AtomFilter {
        let (elements, by_element) = project(expr, &elements_of);
        let (charges, by_charge) = project(expr, &charges_of);
        // An expression exact in one projection has the other one full (every primitive it
        // holds projects to "anything" there), so `admits` alone decides it.
        AtomFilter {
            elements,
            charges,
            exact: by_element || by_charge,
        }
    }
    /// The element/aromatic projection alone.
    pub(crate) fn admits_element(&self, element: u8, aromatic: bool) -> bool {
        self.elements.contains(element, aromatic)
    }
    #[inline]
    pub(crate) fn admits(&self, molecule: &Molecule, atom: usize) -> bool {
        let a = &molecule.atoms()[atom];
        self.elements.contains(a.element, a.aromatic) && self.charges.contains(a.charge)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn filter(text: &str) -> AtomFilter {
        let (graph, _) = crate::parse::parse(text).expect("parses");
        graph.filters[graph.root]
    }
    fn admits_element(f: &AtomFilter, element: u8, aromatic: bool) -> bool {
        f.elements.contains(element, aromatic)
    }

    #[test]
    fn element_sets_follow_the_expression() {
        let f = filter("[N,O;H1]");
        assert!(admits_element(&f, 7, false));
        assert!(admits_element(&f, 8, false));
        assert!(!admits_element(&f, 7, true));
        assert!(!admits_element(&f, 6, false));
        let f = filter("[#7]");
        assert!(admits_element(&f, 7, false) && admits_element(&f, 7, true));
        let f = filter("[a;!c]");
        assert!(admits_element(&f, 7, true));
        assert!(!admits_element(&f, 6, true));
        assert!(!admits_element(&f, 7, false));
    }

    #[test]
    fn negated_non_element_primitives_admit_everything() {
        // `!H1` says nothing about the element, so it must not exclude any.
        let f = filter("[!H1]");
        assert!(admits_element(&f, 6, false) && admits_element(&f, 17, false));
        // The conjunction still narrows to nitrogen.
        let f = filter("[N;!$(NC=O)]");
        assert!(admits_element(&f, 7, false));
        assert!(!admits_element(&f, 8, false));
        let f = filter("[!$(C=O)]");
        assert!(admits_element(&f, 6, false));
    }

    #[test]
    fn charge_sets_follow_the_expression() {
        let f = filter("[N+,N+0]");
        assert!(f.charges.contains(1) && f.charges.contains(0));
        assert!(!f.charges.contains(-1));
        let f = filter("[O-]");
        assert!(f.charges.contains(-1) && !f.charges.contains(0));
        let f = filter("[!-;O]");
        assert!(f.charges.contains(0) && !f.charges.contains(-1));
        // Charges outside the table are never ruled out.
        assert!(f.charges.contains(-100));
        let f = filter("C");
        assert!(f.charges.contains(-1) && f.charges.contains(0));
    }

    #[test]
    fn exact_only_when_one_projection_decides() {
        assert!(filter("C").exact);
        assert!(filter("[c,n]").exact);
        assert!(filter("[!#6]").exact);
        assert!(filter("[+]").exact);
        assert!(filter("*").exact);
        assert!(!filter("[O-]").exact);
        assert!(!filter("[CH3]").exact);
        assert!(!filter("[C;$(C=O)]").exact);
        assert!(!filter("[R]").exact);
    }
}
