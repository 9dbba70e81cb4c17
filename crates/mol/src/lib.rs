//! Reading SMILES into a perceived molecule, standardizing it and writing it back.
//!
//! # Overview
//!
//! [`parse`] reads SMILES text (common valid SMILES by a direct reader, everything else,
//! errors included, through `purr`) and perceives it: implicit hydrogens
//! (OpenSMILES default valences), rings (smallest set of smallest rings), aromaticity (one
//! Hückel model, the same for aromatic and Kekulé input), Kekulé bond orders and
//! hybridization. [`standardize`] picks the parent component and brings it to its neutral
//! form. [`write_smiles`] writes a molecule back; reading the output gives the same atoms,
//! charges, hydrogens and bonds. [`symmetry_classes`] groups equivalent atoms.
//!
//! # Example
//!
//! ```
//! let m = mol::parse("CC(=O)[O-].[Na+]")?;
//! assert_eq!(m.components().len(), 2);
//! assert_eq!(m.atoms()[0].hydrogens, 3);
//!
//! let s = mol::standardize(&m)?;
//! assert_eq!(mol::write_smiles(&s.parent), "CC(=O)O");
//! assert_eq!(s.others, vec!["[Na+]".to_string()]);
//!
//! let e = mol::parse("C1CC").unwrap_err();
//! assert_eq!(e.to_string(), "unclosed ring bond '1'\nC1CC\n ^");
//! Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Aromaticity model
//!
//! A ring, or a combination of up to three rings fused through shared bonds, is aromatic
//! when every atom has a p orbital in the Kekulé form and the pi electrons number 4n+2:
//! one per atom with a ring double bond, two per lone-pair atom (pyrrole N-H, furan O,
//! thiophene S, azolide N-), none for a carbon whose double bond goes out to a more
//! electronegative atom (2-pyridone's C=O) or for a carbocation. Atoms written aromatic
//! that fail the rule keep their Kekulé bonds and are not aromatic.
//!
//! # Performance
//!
//! Reading and perception are linear in the size of the input for ordinary molecules;
//! ring perception and Kekulé matching work per ring system. `cargo bench -p pkarta-mol`
//! measures each step over `tests/data/sample.smi` (106 drug-like molecules); on the
//! shared development machine (2 cores, other builds running, 2026-12-01) one core read
//! and perceived about 50,000 molecules per second, standardized 90,000, wrote 360,000
//! and computed symmetry classes for 210,000; repeated runs varied by up to a factor of
//! two with the load. An 8,100-atom square lattice of 7,921 fused rings reads in about
//! 2 s in a debug build.
//!
//! # Untrusted input
//!
//! No input panics or overflows the stack. Input longer than [`MAX_LENGTH`] bytes is
//! refused with [`ErrorKind::TooLarge`]; `purr` reads recursively, so input longer than
//! [`MAX_INLINE_LENGTH`] characters is read on a helper thread whose stack is sized for it.
//! Every error names what is wrong and where, as byte offsets with a caret line.
#![deny(missing_docs)]

mod elements;
mod error;
mod molecule;
mod perceive;
mod read;
mod standardize;
mod symmetry;
mod write;

pub use error::{Error, ErrorKind, Span};
pub use molecule::{Atom, Bond, Hybridization, Molecule, Neighbor};
pub use read::{MAX_INLINE_LENGTH, MAX_LENGTH};
pub use write::{write_smiles_ordered, write_smiles_with_protons, SmilesWriter};

/// Reads SMILES text and perceives it (hydrogens, rings, aromaticity, Kekulé form,
/// hybridization). All components are kept, in input order.
pub fn parse(smiles: &str) -> Result<Molecule, Error> {
    let written = read::read(smiles)?;
    perceive::perceive(smiles, written)
}

/// As [`parse`], reading through `purr` alone, without the direct reader for common
/// SMILES; for checking that the direct reader gives the same molecule.
#[doc(hidden)]
pub fn parse_with_purr(smiles: &str) -> Result<Molecule, Error> {
    let written = read::read_with_purr(smiles)?;
    perceive::perceive(smiles, written)
}

/// The parent component chosen by [`standardize`], in its neutral form where one exists.
#[derive(Clone, Debug)]
pub struct Standardized {
    /// The parent: one component, renumbered from 0, perceived.
    pub parent: Molecule,
    /// For each parent atom, the index of the atom it came from in the input molecule.
    pub origin: Vec<usize>,
    /// The other components (counter-ions, solvent), written as SMILES, in input order.
    pub others: Vec<String>,
    /// What was changed to reach the neutral form, in words (for warnings).
    pub changes: Vec<String>,
}

/// Picks the parent component (largest organic one) and neutralizes charges that have a
/// neutral form, keeping permanent ones (quaternary N, nitro, N-oxide, sulfonium).
pub fn standardize(molecule: &Molecule) -> Result<Standardized, Error> {
    standardize::standardize(molecule)
}

/// As [`standardize`], taking the molecule: a molecule that needs no change (one
/// component, nothing to neutralize or fold) becomes the parent without being copied. The
/// result is the same as `standardize(&molecule)`.
pub fn standardize_owned(molecule: Molecule) -> Result<Standardized, Error> {
    standardize::standardize_owned(molecule)
}

/// The full standardizing path for every molecule, without the shortcut for molecules that
/// need no change; for checking that the shortcut gives the same result.
#[doc(hidden)]
pub fn standardize_without_shortcut(molecule: &Molecule) -> Result<Standardized, Error> {
    standardize::standardize_full(molecule)
}

/// `n` in decimal, as `Display` writes it, in `buf` (no allocation): the writer's ring
/// numbers, charges and isotopes, and the crates above it for the numbers in their texts.
///
/// ```
/// for n in [0, 7, 10, 99, 100, 12345, u64::MAX] {
///     assert_eq!(mol::decimal(n, &mut [0; 20]), n.to_string());
/// }
/// ```
pub fn decimal(n: u64, buf: &mut [u8; 20]) -> &str {
    let mut i = buf.len();
    let mut n = n;
    loop {
        i -= 1;
        buf[i] = b'0' + (n % 10) as u8;
        n /= 10;
        if n == 0 {
            break;
        }
    }
    // Only ASCII digits were written.
    std::str::from_utf8(&buf[i..]).unwrap_or_default()
}

/// Writes a molecule as SMILES (aromatic atoms lower case, charges and hydrogens in brackets
/// where needed). Reading the output back gives the same molecule.
pub fn write_smiles(molecule: &Molecule) -> String {
    write::write_smiles_ordered(molecule).0
}

/// Symmetry classes: atoms with the same number are topologically equivalent (iterated
/// graph invariants, refined until stable). Used to group equivalent sites.
pub fn symmetry_classes(molecule: &Molecule) -> Vec<u32> {
    symmetry::symmetry_classes(molecule)
}

/// The element symbol for an atomic number (`*` for 0), e.g. `Cl` for 17.
pub fn element_symbol(element: u8) -> &'static str {
    elements::symbol(element)
}
