//! Reading SMILES text into atoms and bonds as written (stage 1), through `purr`.

mod atom_kind;
mod builder;
mod fast;
mod scan;

pub(crate) use builder::{read, read_with_purr, Symbol, Written};
pub use scan::{MAX_INLINE_LENGTH, MAX_LENGTH};
