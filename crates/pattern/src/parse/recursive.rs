//! A recursive environment `$(...)`.

use crate::error::PatternError;
use crate::primitive::AtomPrim;

use super::parser::Parser;

impl Parser<'_> {
    // <recursive> ::= '$(' <graph> ')'
    /// Reads an environment; the cursor sits on `$`.
    pub(crate) fn recursive(&mut self) -> Result<AtomPrim, PatternError> {
        let start = self.pos;
        if self.peek_at(1) != Some(b'(') {
            return Err(self.error_at("'$' must be followed by '('", start, start + 1));
        }
        self.enter(start)?;
        self.pos += 2;
        // Reserve the slot first, so environments are numbered in reading order.
        let id = self.subs.len();
        self.subs.push(None);
        let saved = self.hydrogen_at.take();
        let graph = self.graph(false)?;
        self.hydrogen_at = saved;
        if !self.eat(b')') {
            return Err(self.error_at("'$(' is never closed", start, start + 2));
        }
        self.subs[id] = Some(graph);
        self.leave();
        Ok(AtomPrim::Recursive(id as u32))
    }
}
