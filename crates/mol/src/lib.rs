//! Reading SMILES into a perceived molecule, standardizing it and writing it back.
//!
//! # Overview
//!
//! [`parse`] reads SMILES text (through `purr`) and perceives it: implicit hydrogens,
//! rings, aromaticity, Kekulé bond orders, hybridization. [`standardize`] picks the parent
//! component and brings it to its neutral form. [`write_smiles`] writes a molecule back.
//!
//! INTERFACE NOTE (remove when implemented): the public items below are the contract the
//! other crates code against. Their bodies are for the mol helper to write; their names and
//! signatures stay.
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
pub use write::write_smiles_ordered;

/// Reads SMILES text and perceives it (hydrogens, rings, aromaticity, Kekulé form,
/// hybridization). All components are kept, in input order.
pub fn parse(smiles: &str) -> Result<Molecule, Error> {
    let written = read::read(smiles)?;
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
