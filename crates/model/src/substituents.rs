//! Recognizing substituents by pattern (substituents helper).
use mol::Molecule;

use crate::{Library, SubstituentEntry};

/// A substituent recognized at an attachment point.
#[derive(Clone, Debug)]
pub struct Recognized<'a> {
    /// The table entry.
    pub entry: &'a SubstituentEntry,
    /// The atoms it covers.
    pub atoms: Vec<usize>,
    /// No entry matched exactly; `entry` is the nearest type and the estimate should widen.
    pub approximate: bool,
}

/// Recognizes the substituent whose first atom is `atom`, bonded to `from` (the ring or
/// chain atom), never entering `avoid`.
pub fn recognize<'a>(
    library: &'a Library,
    molecule: &Molecule,
    atom: usize,
    from: usize,
    avoid: &[usize],
) -> Option<Recognized<'a>> {
    let _ = (library, molecule, atom, from, avoid);
    todo!("substituents helper")
}
