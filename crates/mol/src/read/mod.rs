//! Reading SMILES text into atoms and bonds as written (stage 1): a direct reader for
//! common valid SMILES, `purr` for the rest and for every error.

mod atom_kind;
mod builder;
mod fast;
mod scan;

pub(crate) use builder::{read, read_with_purr, Symbol, Written};
pub use scan::{MAX_INLINE_LENGTH, MAX_LENGTH};
