//! Atom and bond primitives and what they mean against a perceived molecule.
//!
//! # Reference
//!
//! Daylight Chemical Information Systems, "SMARTS - A Language for Describing Molecular
//! Patterns", Daylight Theory Manual, ch. 4 (primitive meanings: `H` total hydrogen count,
//! `D` explicit connections, `X` total connections, `R` SSSR ring membership, `r` smallest
//! SSSR ring size, implicit bond = single or aromatic). Cited from memory; the RDKit checks
//! in `tests/` confirm the meanings on real molecules.

use mol::{Bond, Molecule};

/// One atom primitive.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
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
    /// Whether this primitive holds for the bond.
    #[inline]
    pub(crate) fn holds(&self, bond: &Bond) -> bool {
        match self {
            BondPrim::Single => !bond.aromatic && bond.order == 1,
            BondPrim::Double => !bond.aromatic && bond.order == 2,
            BondPrim::Triple => !bond.aromatic && bond.order == 3,
            BondPrim::Aromatic => bond.aromatic,
            BondPrim::Any => true,
            BondPrim::Ring => bond.in_ring,
            BondPrim::Implicit => bond.aromatic || bond.order == 1,
        }
    }
}
