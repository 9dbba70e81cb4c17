//! The atom pre-filter: which element/aromatic pairs, charges, hydrogen counts,
//! connection counts and ring values a pattern atom could possibly match, worked out once
//! at parse time. On the anchored atom it is `could_anchor`; on the others it spares most
//! expression walks during the search.
//!
//! Each projection over-approximates: a conjunction intersects, a disjunction unites, and a
//! negation complements only when its operand depends on that projection alone (otherwise
//! it may hold anywhere). So a `false` from the filter is certain, a `true` is a maybe. An
//! expression built only of conjunctions of one-projection parts (`[CX4;H1,H2;+0]`) is the
//! box the projections span, so for it the filter is the answer (`exact`).

use mol::Molecule;

use crate::expr::Expr;
use crate::features::{self, AtomFeatures, COUNT_CAP, ELEMENT_CAP};
use crate::primitive::{AtomPrim, BondPrim};

/// The count projections, by index into `AtomFilter::counts`.
const TOTAL_H: usize = 0;
const IMPLICIT_H: usize = 1;
const DEGREE: usize = 2;
const CONNECTIVITY: usize = 3;
const RING_COUNT: usize = 4;
const SMALLEST_RING: usize = 5;
const COUNTS: usize = 6;

/// Support bits: which projections an expression depends on.
const S_ELEMENTS: u16 = 1;
const S_CHARGES: u16 = 2;
const fn s_count(k: usize) -> u16 {
    4 << k
}
/// Something no projection holds (an environment, a mass number, a count beyond the cap).
const S_OTHER: u16 = 1 << 15;

/// A box: one set per projection. Element/aromatic pairs at bit [`features::element_bit`],
/// charges at bit [`features::charge_bit`], counts at bit `min(count, COUNT_CAP)`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
struct Sets {
    elements: [u64; 4],
    charges: u64,
    counts: [u32; COUNTS],
}

impl Sets {
    const FULL: Sets = Sets {
        elements: [u64::MAX; 4],
        charges: u64::MAX,
        counts: [u32::MAX; COUNTS],
    };
    fn meet(self, o: Sets) -> Sets {
        Sets {
            elements: std::array::from_fn(|i| self.elements[i] & o.elements[i]),
            charges: self.charges & o.charges,
            counts: std::array::from_fn(|i| self.counts[i] & o.counts[i]),
        }
    }
    fn join(self, o: Sets) -> Sets {
        Sets {
            elements: std::array::from_fn(|i| self.elements[i] | o.elements[i]),
            charges: self.charges | o.charges,
            counts: std::array::from_fn(|i| self.counts[i] | o.counts[i]),
        }
    }
    /// Full everywhere but in the projection `support` names (one bit), which is
    /// complemented.
    fn complement_in(self, support: u16) -> Sets {
        let mut out = Sets::FULL;
        match support {
            S_ELEMENTS => out.elements = self.elements.map(|w| !w),
            S_CHARGES => out.charges = !self.charges,
            _ => {
                for k in 0..COUNTS {
                    if support == s_count(k) {
                        out.counts[k] = !self.counts[k];
                    }
                }
            }
        }
        out
    }
    fn element(mut self, element: u8, aromatic: bool) -> Sets {
        let bit = features::element_bit(element, aromatic) as usize;
        self.elements[bit / 64] |= 1 << (bit % 64);
        self
    }
    fn has_element(&self, bit: u8) -> bool {
        self.elements[bit as usize / 64] >> (bit % 64) & 1 != 0
    }
    #[inline]
    fn admits(&self, f: &AtomFeatures) -> bool {
        self.has_element(f.element_bit)
            && self.charges >> f.charge_bit & 1 != 0
            && self.counts[TOTAL_H] >> f.total_h & 1 != 0
            && self.counts[CONNECTIVITY] >> f.connectivity & 1 != 0
            && self.counts[DEGREE] >> f.degree & 1 != 0
            && self.counts[IMPLICIT_H] >> f.implicit_h & 1 != 0
            && self.counts[RING_COUNT] >> f.ring_count & 1 != 0
            && self.counts[SMALLEST_RING] >> f.smallest_ring & 1 != 0
    }
}

/// What one projection of an expression is: its box, the projections it depends on, and
/// whether membership in the box is the expression's answer.
#[derive(Clone, Copy, Debug)]
struct Projected {
    sets: Sets,
    /// Neighbour requirements (see `AtomFilter::needs`), from environments.
    needs: Needs,
    support: u16,
    exact: bool,
}

/// One level of neighbour requirements: each slot a set of neighbour-signature bits one
/// of which the atom's signature must have; [`features::SIGNATURE_ALWAYS`] (set in every
/// signature) when unused.
type Slots = [u64; NEEDS];

const NO_SLOTS: Slots = [features::SIGNATURE_ALWAYS; NEEDS];

/// Both sets of requirements, the most selective (fewest bits) first, as many as there are
/// slots for (dropping one only weakens the filter).
fn slots_meet(a: Slots, b: Slots) -> Slots {
    // The usual cases while projecting an expression: one side asks nothing, and the other
    // is already as this leaves requirements.
    if b == NO_SLOTS && canonical(&a) {
        return a;
    }
    if a == NO_SLOTS && canonical(&b) {
        return b;
    }
    // On the stack: patterns compile by the hundred, each atom meeting its neighbours'.
    let mut real = [0u64; 2 * NEEDS];
    let mut len = 0;
    for n in a.into_iter().chain(b) {
        if n != features::SIGNATURE_ALWAYS {
            real[len] = n;
            len += 1;
        }
    }
    let real = &mut real[..len];
    // The key is the whole value, so an unstable sort orders as a stable one would.
    real.sort_unstable_by_key(|n| (n.count_ones(), *n));
    let mut out = NO_SLOTS;
    let mut slot = 0;
    for (i, &need) in real.iter().enumerate() {
        if slot == NEEDS {
            break;
        }
        if i > 0 && real[i - 1] == need {
            continue;
        }
        out[slot] = need;
        slot += 1;
    }
    out
}

/// Whether requirements are as [`slots_meet`] leaves them: the real ones first, in the
/// order it sorts them, none twice, the unused slots after.
fn canonical(a: &Slots) -> bool {
    let key = |n: u64| (n.count_ones(), n);
    let real = a
        .iter()
        .take_while(|&&n| n != features::SIGNATURE_ALWAYS)
        .count();
    a[real..].iter().all(|&n| n == features::SIGNATURE_ALWAYS)
        && a[..real].windows(2).all(|w| key(w[0]) < key(w[1]))
}

/// What either set of requirements implies: slot by slot, one or the other.
fn slots_join(a: Slots, b: Slots) -> Slots {
    std::array::from_fn(|i| a[i] | b[i])
}

/// Neighbour requirements: on the atom's neighbours (`near`, against its signature) and on
/// their neighbours (`far`, against the union of its neighbours' signatures).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Needs {
    near: Slots,
    far: Slots,
}

impl Needs {
    const NONE: Needs = Needs {
        near: NO_SLOTS,
        far: NO_SLOTS,
    };
    fn meet(self, o: Needs) -> Needs {
        Needs {
            near: slots_meet(self.near, o.near),
            far: slots_meet(self.far, o.far),
        }
    }
    fn join(self, o: Needs) -> Needs {
        Needs {
            near: slots_join(self.near, o.near),
            far: slots_join(self.far, o.far),
        }
    }
    #[inline]
    fn admits(&self, f: &AtomFeatures) -> bool {
        self.near.iter().all(|&n| f.neighbors & n != 0) && self.far.iter().all(|&n| f.far & n != 0)
    }
}

/// The box of one count value, or `None` (not decided by the mask) beyond the cap.
fn count_set(k: usize, value: u8) -> Option<Projected> {
    if value >= COUNT_CAP {
        return None;
    }
    let mut sets = Sets::FULL;
    sets.counts[k] = 1 << value;
    Some(Projected {
        sets,
        needs: Needs::NONE,
        support: s_count(k),
        exact: true,
    })
}

/// Every count from one up ("at least one"): `h`, `R` and `r` written without a number.
fn at_least_one(k: usize) -> Projected {
    let mut sets = Sets::FULL;
    sets.counts[k] = !1;
    Projected {
        sets,
        needs: Needs::NONE,
        support: s_count(k),
        exact: true,
    }
}

fn project_prim(p: &AtomPrim, envs: &[AtomFilter]) -> Projected {
    let other = Projected {
        sets: Sets::FULL,
        needs: Needs::NONE,
        support: S_OTHER,
        exact: false,
    };
    let elements = |sets: Sets| Projected {
        sets,
        needs: Needs::NONE,
        support: S_ELEMENTS,
        exact: true,
    };
    let no_elements = Sets {
        elements: [0; 4],
        ..Sets::FULL
    };
    match *p {
        AtomPrim::Any => Projected {
            sets: Sets::FULL,
            needs: Needs::NONE,
            support: 0,
            exact: true,
        },
        AtomPrim::Aromatic(want) => {
            elements((0..=ELEMENT_CAP).fold(no_elements, |s, e| s.element(e, want)))
        }
        // Elements from the cap up share their bits: only below it does the bit decide.
        AtomPrim::Element { number, .. } if number >= ELEMENT_CAP => other,
        AtomPrim::Element { number, aromatic } => elements(match aromatic {
            Some(want) => no_elements.element(number, want),
            None => no_elements.element(number, false).element(number, true),
        }),
        AtomPrim::Charge(c) if features::charge_exact(c) => Projected {
            sets: Sets {
                charges: 1 << features::charge_bit(c),
                ..Sets::FULL
            },
            needs: Needs::NONE,
            support: S_CHARGES,
            exact: true,
        },
        AtomPrim::TotalH(n) => count_set(TOTAL_H, n).unwrap_or(other),
        AtomPrim::ImplicitH(Some(n)) => count_set(IMPLICIT_H, n).unwrap_or(other),
        AtomPrim::ImplicitH(None) => at_least_one(IMPLICIT_H),
        AtomPrim::Degree(n) => count_set(DEGREE, n).unwrap_or(other),
        AtomPrim::Connectivity(n) => count_set(CONNECTIVITY, n).unwrap_or(other),
        AtomPrim::RingCount(Some(n)) => count_set(RING_COUNT, n).unwrap_or(other),
        AtomPrim::RingCount(None) => at_least_one(RING_COUNT),
        AtomPrim::RingSize(Some(n)) => count_set(SMALLEST_RING, n).unwrap_or(other),
        AtomPrim::RingSize(None) => at_least_one(SMALLEST_RING),
        // An environment holds only where its first atom can sit.
        AtomPrim::Recursive(id) => envs.get(id as usize).map_or(other, |env| Projected {
            sets: env.sets,
            needs: env.needs,
            support: S_OTHER,
            exact: false,
        }),
        AtomPrim::Charge(_) | AtomPrim::Isotope(_) => other,
    }
}

fn project(expr: &Expr<AtomPrim>, envs: &[AtomFilter]) -> Projected {
    let project = |e| project(e, envs);
    match expr {
        Expr::Prim(p) => project_prim(p, envs),
        Expr::Not(e) => {
            let inner = project(e);
            if !inner.exact || inner.support.count_ones() > 1 {
                return Projected {
                    sets: Sets::FULL,
                    needs: Needs::NONE,
                    support: inner.support | S_OTHER,
                    exact: false,
                };
            }
            // An exact operand with no support holds everywhere (`*`): its negation holds
            // nowhere, which the element projection can say.
            let support = if inner.support == 0 {
                S_ELEMENTS
            } else {
                inner.support
            };
            Projected {
                sets: inner.sets.complement_in(support),
                needs: Needs::NONE,
                support,
                exact: true,
            }
        }
        Expr::And(es) => es.iter().map(project).fold(
            Projected {
                sets: Sets::FULL,
                needs: Needs::NONE,
                support: 0,
                exact: true,
            },
            |acc, p| Projected {
                sets: acc.sets.meet(p.sets),
                needs: acc.needs.meet(p.needs),
                support: acc.support | p.support,
                exact: acc.exact && p.exact,
            },
        ),
        Expr::Or(es) => {
            let parts: Vec<Projected> = es.iter().map(project).collect();
            let support = parts.iter().fold(0, |s, p| s | p.support);
            let sets = parts.iter().skip(1).fold(
                parts.first().map_or(
                    Sets {
                        elements: [0; 4],
                        ..Sets::FULL
                    },
                    |p| p.sets,
                ),
                |s, p| s.join(p.sets),
            );
            let needs = parts
                .iter()
                .skip(1)
                .fold(parts.first().map_or(Needs::NONE, |p| p.needs), |n, p| {
                    n.join(p.needs)
                });
            Projected {
                sets,
                needs,
                support,
                // A union of boxes is a box only when they differ in one projection.
                exact: parts.iter().all(|p| p.exact) && support.count_ones() <= 1,
            }
        }
    }
}

/// The element/aromatic bits (as in `Sets::elements`) of each neighbour-signature element
/// class ([`features::element_class`]).
const CLASS_ELEMENTS: [[u64; 4]; features::ELEMENT_CLASSES as usize] = {
    let mut table = [[0u64; 4]; features::ELEMENT_CLASSES as usize];
    let mut bit = 0;
    while bit < 256 {
        let class = features::element_class(bit as u8) as usize;
        table[class][bit / 64] |= 1 << (bit % 64);
        bit += 1;
    }
    table
};

/// Every signature bit a neighbour can set: a requirement of all of them says nothing.
const ALL_SIGNATURE_BITS: u64 = {
    let mut all = 0;
    let mut class = 0;
    while class < features::ELEMENT_CLASSES {
        let mut group = 0;
        while group < 5 {
            all |= features::signature_bit(class, group);
            group += 1;
        }
        class += 1;
    }
    all
};

/// Neighbour requirements kept per pattern atom (more are dropped, which only weakens the
/// filter).
const NEEDS: usize = 4;

/// What a pattern atom could match, as one set per projection.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct AtomFilter {
    sets: Sets,
    /// What the molecule atom's neighbours and theirs must offer (`features::signature_bit`).
    needs: Needs,
    /// Passing the filter is the answer: the expression need not be walked.
    pub(crate) exact: bool,
}

impl AtomFilter {
    /// The filter of an expression whose environments are not known yet (each may hold
    /// anywhere).
    pub(crate) fn new(expr: &Expr<AtomPrim>) -> AtomFilter {
        AtomFilter::with_environments(expr, &[])
    }
    /// The filter of an expression, given the filter of each environment's first atom
    /// (`envs[id]` for `$()` number `id`): an environment narrows the filter to where its
    /// first atom can sit.
    pub(crate) fn with_environments(expr: &Expr<AtomPrim>, envs: &[AtomFilter]) -> AtomFilter {
        let p = project(expr, envs);
        AtomFilter {
            sets: p.sets,
            needs: p.needs,
            exact: p.exact,
        }
    }
    /// Also requires at least `min` explicit connections (the pattern bonds at the atom):
    /// a requirement of the search, not of the expression, so `exact` is unchanged.
    /// Counts beyond the cap are left to the caller.
    pub(crate) fn with_min_degree(mut self, min: usize) -> AtomFilter {
        if min <= COUNT_CAP as usize {
            self.sets.counts[DEGREE] &= u32::MAX << min;
        }
        self
    }
    /// Also requires, for each pattern neighbour (its filter, the bond kinds between), a
    /// molecule neighbour of an element class and bond group it admits: a requirement of
    /// the search, not of the expression, so `exact` is unchanged.
    pub(crate) fn with_neighbors(mut self, neighbors: &[(AtomFilter, u16)]) -> AtomFilter {
        let mut own = NO_SLOTS;
        let mut slot = 0;
        for (filter, mask) in neighbors {
            if slot == NEEDS {
                break;
            }
            // A class is admitted when any of its element/aromatic bits is: four word tests
            // per class rather than one test per bit (patterns compile by the hundred).
            let classes = (0..features::ELEMENT_CLASSES)
                .filter(|&class| {
                    let bits = &CLASS_ELEMENTS[class as usize];
                    (0..4).any(|w| filter.sets.elements[w] & bits[w] != 0)
                })
                .fold(0u32, |c, class| c | 1 << class);
            let groups = (0..16u32)
                .filter(|&k| mask >> k & 1 != 0)
                .fold(0u32, |g, k| g | 1 << features::bond_group(k));
            let mut need = 0u64;
            for class in 0..features::ELEMENT_CLASSES {
                for group in 0..5 {
                    if classes >> class & 1 != 0 && groups >> group & 1 != 0 {
                        need |= features::signature_bit(class, group);
                    }
                }
            }
            // One that any neighbour meets says nothing.
            if need != ALL_SIGNATURE_BITS {
                own[slot] = need;
                slot += 1;
            }
        }
        self.needs.near = slots_meet(own, self.needs.near);
        self
    }
    /// Also requires what each pattern neighbour (its filter, with its own neighbour
    /// requirements) needs of its neighbours, of this atom's neighbours' neighbours: the
    /// molecule atom on the pattern neighbour is one of this atom's neighbours, so its
    /// signature is part of the union.
    pub(crate) fn with_far_neighbors(mut self, neighbors: &[AtomFilter]) -> AtomFilter {
        for filter in neighbors {
            self.needs.far = slots_meet(self.needs.far, filter.needs.near);
        }
        self
    }
    /// The one element/aromatic bit the filter admits, if it admits only one.
    pub(crate) fn single_element(&self) -> Option<u8> {
        let words = &self.sets.elements;
        let ones: u32 = words.iter().map(|w| w.count_ones()).sum();
        if ones != 1 {
            return None;
        }
        let (i, w) = words.iter().enumerate().find(|(_, w)| **w != 0)?;
        Some((i * 64) as u8 + w.trailing_zeros() as u8)
    }
    /// The element/aromatic projection alone.
    pub(crate) fn admits_element(&self, element: u8, aromatic: bool) -> bool {
        self.sets
            .has_element(features::element_bit(element, aromatic))
    }
    /// Whether an atom with these values could match.
    #[inline]
    pub(crate) fn admits_features(&self, f: &AtomFeatures) -> bool {
        self.sets.admits(f) && self.needs.admits(f)
    }
    /// Whether atom `atom` of `molecule` (in range) could match.
    pub(crate) fn admits(&self, molecule: &Molecule, atom: usize) -> bool {
        self.admits_features(&AtomFeatures::of(molecule, atom))
    }
}

/// Bond kinds: aromatic, order (1, 2, 3, other) and ring membership, `aromatic + 2 *
/// order class + 8 * in ring`. Every bond primitive is a function of these, so a bond
/// expression is a 16-bit mask, exact.
fn bond_kind_parts(kind: u32) -> (bool, u8, bool) {
    let order = match (kind >> 1) & 3 {
        0 => 1,
        1 => 2,
        2 => 3,
        // Any order but 1, 2 and 3 answers every primitive alike.
        _ => 0,
    };
    (kind & 1 != 0, order, kind & 8 != 0)
}

/// The bond kinds of ring bonds.
pub(crate) const RING_KINDS: u16 = 0xff00;

/// The kind of a molecule bond, as [`bond_kind_parts`] reads it.
#[inline]
pub(crate) fn bond_kind(bond: &mol::Bond) -> u32 {
    let order = match bond.order {
        1 => 0,
        2 => 1,
        3 => 2,
        _ => 3,
    };
    bond.aromatic as u32 | order << 1 | (bond.in_ring as u32) << 3
}

/// The bond kinds a bond expression holds for, as a mask over [`bond_kind`].
pub(crate) fn bond_mask(expr: &Expr<BondPrim>) -> u16 {
    (0..16u32)
        .filter(|&k| {
            let (aromatic, order, in_ring) = bond_kind_parts(k);
            expr.eval(&mut |p| p.holds_parts(aromatic, order, in_ring))
        })
        .fold(0, |m, k| m | 1 << k)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn filter(text: &str) -> AtomFilter {
        let (graph, _) = crate::parse::parse(text).expect("parses");
        graph.filters[graph.root]
    }
    fn admits_element(f: &AtomFilter, element: u8, aromatic: bool) -> bool {
        f.admits_element(element, aromatic)
    }
    fn has_charge(f: &AtomFilter, charge: i8) -> bool {
        f.sets.charges >> features::charge_bit(charge) & 1 != 0
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
        assert!(has_charge(&f, 1) && has_charge(&f, 0));
        assert!(!has_charge(&f, -1));
        let f = filter("[O-]");
        assert!(has_charge(&f, -1) && !has_charge(&f, 0));
        let f = filter("[!-;O]");
        assert!(has_charge(&f, 0) && !has_charge(&f, -1));
        // Charges beyond the table share a bit no single charge rules out.
        assert!(has_charge(&f, -100));
        let f = filter("C");
        assert!(has_charge(&f, -1) && has_charge(&f, 0));
    }

    #[test]
    fn count_sets_follow_the_expression() {
        let f = filter("[CX4;H1,H2]");
        assert_eq!(f.sets.counts[TOTAL_H], 0b110);
        assert_eq!(f.sets.counts[CONNECTIVITY], 1 << 4);
        assert_eq!(f.sets.counts[DEGREE], u32::MAX);
        let f = filter("[R;!r5]");
        assert_eq!(f.sets.counts[RING_COUNT], !1);
        assert_eq!(f.sets.counts[SMALLEST_RING], !(1 << 5));
        // The pattern bonds at the atom: at least two connections.
        let f = filter("C[N:1]C");
        assert_eq!(f.sets.counts[DEGREE], u32::MAX << 2);
        // A count beyond the cap is not decided by the mask.
        let f = filter("[H40]");
        assert_eq!(f.sets.counts[TOTAL_H], u32::MAX);
        assert!(!f.exact);
    }

    #[test]
    fn exact_when_the_projections_span_the_expression() {
        assert!(filter("C").exact);
        assert!(filter("[c,n]").exact);
        assert!(filter("[!#6]").exact);
        assert!(filter("[+]").exact);
        assert!(filter("*").exact);
        assert!(filter("[O-]").exact);
        assert!(filter("[CH3]").exact);
        assert!(filter("[CX4;H1,H2,H3;+0]").exact);
        assert!(filter("[R]").exact);
        assert!(filter("[!R;C]").exact);
        // A union across projections is no box.
        assert!(!filter("[C,H1]").exact);
        assert!(filter("[!CH3]").exact); // `!` binds to C alone
        assert!(!filter("[!C,!H3]").exact);
        assert!(!filter("[C;$(C=O)]").exact);
        assert!(!filter("[13C]").exact);
    }

    #[test]
    fn class_tables_agree_with_the_classes_bit_by_bit() {
        // The element classes a filter admits, one test per element/aromatic bit, as
        // `with_neighbors` worked them out before it read `CLASS_ELEMENTS`.
        for text in [
            "C",
            "c",
            "[#7]",
            "[a;!c]",
            "*",
            "[!#6]",
            "[F,Cl,Br,I]",
            "[#1]",
            "[Se]",
            "[O,S;X1]",
        ] {
            let f = filter(text);
            let plain = (0..=255u8)
                .filter(|&bit| f.sets.has_element(bit))
                .fold(0u32, |c, bit| c | 1 << features::element_class(bit));
            let quick = (0..features::ELEMENT_CLASSES)
                .filter(|&class| {
                    (0..4).any(|w| f.sets.elements[w] & CLASS_ELEMENTS[class as usize][w] != 0)
                })
                .fold(0u32, |c, class| c | 1 << class);
            assert_eq!(quick, plain, "{text}");
        }
        let all = (0..features::ELEMENT_CLASSES)
            .flat_map(|c| (0..5).map(move |g| features::signature_bit(c, g)))
            .fold(0, |a, b| a | b);
        assert_eq!(ALL_SIGNATURE_BITS, all);
    }

    #[test]
    fn negated_any_admits_nothing() {
        let f = filter("[!*]");
        assert!(f.exact);
        assert!(!admits_element(&f, 6, false) && !admits_element(&f, 7, true));
    }

    #[test]
    fn bond_masks_follow_the_primitives() {
        let mask = |text: &str| {
            let (graph, _) = crate::parse::parse(text).expect("parses");
            graph.bond_masks[0]
        };
        let m = crate::parse::parse("C1CCCCC1").expect("parses").0;
        assert_eq!(m.bond_masks.len(), 6);
        let single_chain = bond_kind(&mol::parse("CC").expect("reads").bonds()[0]);
        let aromatic = bond_kind(&mol::parse("c1ccccc1").expect("reads").bonds()[0]);
        let double = bond_kind(&mol::parse("C=C").expect("reads").bonds()[0]);
        let has = |m: u16, k: u32| m >> k & 1 != 0;
        assert!(has(mask("CC"), single_chain) && has(mask("CC"), aromatic));
        assert!(!has(mask("CC"), double));
        assert!(has(mask("C-C"), single_chain) && !has(mask("C-C"), aromatic));
        assert!(has(mask("C=C"), double) && !has(mask("C=C"), aromatic));
        assert!(has(mask("C:C"), aromatic) && !has(mask("C:C"), single_chain));
        assert!(has(mask("C~C"), double) && has(mask("C~C"), aromatic));
        assert!(has(mask("C@C"), aromatic) && !has(mask("C@C"), single_chain));
        assert!(!has(mask("C!@C"), aromatic) && has(mask("C!@C"), double));
    }
}
