//! Atom and bond primitives and what they mean against a perceived molecule.
//!
//! # Reference
//!
//! Daylight Chemical Information Systems, "SMARTS - A Language for Describing Molecular
//! Patterns", Daylight Theory Manual, ch. 4 (primitive meanings: `H` total hydrogen count,
//! `D` explicit connections, `X` total connections, `R` SSSR ring membership, `r` smallest
//! SSSR ring size, implicit bond = single or aromatic). Cited from memory; the RDKit checks
//! in `tests/` confirm the meanings on real molecules.

use mol::Molecule;

use crate::features::{AtomFeatures, COUNT_CAP};

/// One atom primitive.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub(crate) enum AtomPrim {
    /// `*`: any atom.
    Any,
    /// `a` (true) or `A` (false).
    Aromatic(bool),
    /// An element: `C` (aliphatic), `c` (aromatic) or `#6` (either, `aromatic` None).
    Element {
        /// Atomic number.
        number: u8,
        /// Required aromaticity, if any.
        aromatic: Option<bool>,
    },
    /// `<n>` before the element: mass number.
    Isotope(u16),
    /// `H<n>`: total hydrogen count.
    TotalH(u8),
    /// `h<n>`: hydrogens not written as atoms; `h` alone means at least one.
    ImplicitH(Option<u8>),
    /// `D<n>`: explicit connections.
    Degree(u8),
    /// `X<n>`: total connections, hydrogens included.
    Connectivity(u8),
    /// `R<n>`: number of SSSR rings holding the atom; `R` alone means at least one.
    RingCount(Option<u8>),
    /// `r<n>`: size of the smallest SSSR ring holding the atom; `r` alone means in a ring.
    RingSize(Option<u8>),
    /// `+`, `-`, `+<n>`, `--`: formal charge.
    Charge(i8),
    /// `$(...)`: index into the pattern's recursive environments.
    Recursive(u32),
}

impl AtomPrim {
    /// Whether this primitive (other than recursion, which the matcher handles) holds.
    #[inline]
    pub(crate) fn holds(&self, molecule: &Molecule, atom: usize) -> bool {
        let a = &molecule.atoms()[atom];
        match *self {
            AtomPrim::Any => true,
            AtomPrim::Aromatic(want) => a.aromatic == want,
            AtomPrim::Element { number, aromatic } => {
                // No requirement, or the one written.
                a.element == number && aromatic != Some(!a.aromatic)
            }
            AtomPrim::Isotope(mass) => a.isotope == Some(mass),
            AtomPrim::TotalH(n) => molecule.total_hydrogens(atom) == n as usize,
            AtomPrim::ImplicitH(None) => a.hydrogens > 0,
            AtomPrim::ImplicitH(Some(n)) => a.hydrogens == n,
            AtomPrim::Degree(n) => molecule.degree(atom) == n as usize,
            AtomPrim::Connectivity(n) => molecule.total_degree(atom) == n as usize,
            AtomPrim::RingCount(None) => a.ring_count > 0,
            AtomPrim::RingCount(Some(n)) => a.ring_count == n,
            AtomPrim::RingSize(None) => a.smallest_ring > 0,
            AtomPrim::RingSize(Some(n)) => a.smallest_ring == n,
            AtomPrim::Charge(c) => a.charge == c,
            // The matcher answers these before asking here.
            AtomPrim::Recursive(_) => false,
        }
    }

    /// Like [`AtomPrim::holds`], with the atom's counts read from `f` (its values).
    #[inline]
    pub(crate) fn holds_with(&self, f: &AtomFeatures, molecule: &Molecule, atom: usize) -> bool {
        // Counts at or beyond the cap share a value in `f`: those are read afresh.
        match *self {
            AtomPrim::TotalH(n) if n < COUNT_CAP => f.total_h == n,
            AtomPrim::ImplicitH(Some(n)) if n < COUNT_CAP => f.implicit_h == n,
            AtomPrim::ImplicitH(None) => f.implicit_h > 0,
            AtomPrim::Degree(n) if n < COUNT_CAP => f.degree == n,
            AtomPrim::Connectivity(n) if n < COUNT_CAP => f.connectivity == n,
            AtomPrim::RingCount(Some(n)) if n < COUNT_CAP => f.ring_count == n,
            AtomPrim::RingCount(None) => f.ring_count > 0,
            AtomPrim::RingSize(Some(n)) if n < COUNT_CAP => f.smallest_ring == n,
            AtomPrim::RingSize(None) => f.smallest_ring > 0,
            _ => self.holds(molecule, atom),
        }
    }
}

/// One bond primitive.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum BondPrim {
    /// `-`: single, not aromatic.
    Single,
    /// `=`: double, not aromatic (the Kekulé double of an aromatic ring does not count).
    Double,
    /// `#`: triple.
    Triple,
    /// `:`: aromatic as perceived.
    Aromatic,
    /// `~`: any bond.
    Any,
    /// `@`: ring bond.
    Ring,
    /// No bond symbol written: single or aromatic.
    Implicit,
}

impl BondPrim {
    /// Whether this primitive holds for a bond with these properties (the only ones any
    /// bond primitive reads).
    #[inline]
    pub(crate) fn holds_parts(&self, aromatic: bool, order: u8, in_ring: bool) -> bool {
        match self {
            BondPrim::Single => !aromatic && order == 1,
            BondPrim::Double => !aromatic && order == 2,
            BondPrim::Triple => !aromatic && order == 3,
            BondPrim::Aromatic => aromatic,
            BondPrim::Any => true,
            BondPrim::Ring => in_ring,
            BondPrim::Implicit => aromatic || order == 1,
        }
    }
}
