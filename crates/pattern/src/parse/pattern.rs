//! The whole pattern, and one connected graph (also used inside `$()`).

use crate::error::PatternError;
use crate::graph::Graph;

use super::parser::{Builder, Parser};

/// Reads pattern text: the main graph and the recursive environments it refers to.
// <pattern> ::= <graph> end-of-text
pub(crate) fn parse(text: &str) -> Result<(Graph, Vec<Graph>), PatternError> {
    let mut parser = Parser::new(text);
    if text.is_empty() {
        return Err(parser.error_at("empty pattern", 0, 0));
    }
    let main = parser.graph(true)?;
    if !parser.at_end() {
        // graph() stops only at the end or at ')'.
        return Err(parser.error_here("unmatched ')'"));
    }
    let subs = parser.subs.into_iter().collect::<Option<Vec<Graph>>>();
    match subs {
        Some(subs) => Ok((main, subs)),
        None => Err(PatternError::new(
            "internal error: unfinished environment",
            text,
            0,
            0,
        )),
    }
}

impl Parser<'_> {
    // <graph> ::= <atom> <chain>
    /// Reads one connected graph up to the end of the text or an unmatched `)`. The anchor
    /// is the atom mapped `:1` when `use_map` (the main pattern), else the first atom (as
    /// Daylight defines `$()` environments).
    pub(crate) fn graph(&mut self, use_map: bool) -> Result<Graph, PatternError> {
        let mut builder = Builder::default();
        let first = self.atom(&mut builder)?;
        self.chain(&mut builder, first)?;
        if let Some((label, open)) = builder.open.iter().next() {
            return Err(self.error_at(
                format!("ring bond {label} is never closed"),
                open.span.0,
                open.span.1,
            ));
        }
        let root = if use_map {
            builder
                .atoms
                .iter()
                .position(|a| a.map == Some(1))
                .unwrap_or(0)
        } else {
            0
        };
        Ok(Graph::new(builder.atoms, builder.bonds, root))
    }
}
