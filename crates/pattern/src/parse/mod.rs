//! Reading pattern text into graphs: one grammar rule per file.

mod atom;
mod atom_primitive;
mod bond;
mod bracket;
mod branch;
mod chain;
mod element;
mod expression;
mod parser;
mod pattern;
mod recursive;
mod ring_closure;

#[cfg(test)]
pub(crate) use pattern::parse;
pub(crate) use pattern::parse_unfiltered;
