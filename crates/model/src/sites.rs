//! Finding ionizable sites (sites helper).
use mol::Molecule;

use crate::Library;

/// A site found by a class pattern.
#[derive(Clone, Debug, PartialEq)]
pub struct FoundSite {
    /// Index of the class in `Library::classes`.
    pub class: usize,
    /// The atom that gains or loses the proton.
    pub atom: usize,
    /// The matched atoms, per pattern atom.
    pub matched: Vec<usize>,
    /// Molecule atom per atom-map number present in the pattern: `(map, atom)`.
    pub mapped: Vec<(u16, usize)>,
    /// Symmetry group: sites with the same group are equivalent.
    pub group: usize,
}

/// Finds every site in the molecule, one per atom, overlaps resolved by class priority.
pub fn find_sites(library: &Library, molecule: &Molecule) -> Vec<FoundSite> {
    let _ = (library, molecule);
    todo!("sites helper")
}
