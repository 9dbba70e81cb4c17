//! The parser state shared by the grammar rules.

use std::collections::BTreeMap;

use crate::error::PatternError;
use crate::expr::Expr;
use crate::graph::{Graph, PatternAtom, PatternBond};
use crate::primitive::BondPrim;

/// Deepest nesting of branches and `$()` accepted; keeps hostile input off the stack limit.
pub(crate) const MAX_DEPTH: usize = 64;
/// Most atoms in one pattern graph; keeps the matcher's recursion shallow.
pub(crate) const MAX_ATOMS: usize = 512;

/// A ring closure waiting for its partner.
#[derive(Clone, Debug)]
pub(crate) struct OpenRing {
    pub(crate) atom: usize,
    pub(crate) bond: Option<Expr<BondPrim>>,
    pub(crate) span: (usize, usize),
}

/// One graph under construction (the main pattern or one `$()` environment).
#[derive(Debug, Default)]
pub(crate) struct Builder {
    pub(crate) atoms: Vec<PatternAtom>,
    pub(crate) bonds: Vec<PatternBond>,
    pub(crate) open: BTreeMap<u16, OpenRing>,
}

impl Builder {
    /// Whether two atoms are already bonded (a second bond would make a multigraph).
    pub(crate) fn bonded(&self, a: usize, b: usize) -> bool {
        self.bonds
            .iter()
            .any(|x| (x.a == a && x.b == b) || (x.a == b && x.b == a))
    }
}

/// Cursor over the text plus everything collected so far.
pub(crate) struct Parser<'t> {
    pub(crate) text: &'t str,
    pub(crate) pos: usize,
    /// Recursive environments, in the order their `$(` was read.
    pub(crate) subs: Vec<Option<Graph>>,
    pub(crate) depth: usize,
    /// Where an `H` stands for the element rather than a hydrogen count (`[H]`, `[2H+]`).
    pub(crate) hydrogen_at: Option<usize>,
}

impl<'t> Parser<'t> {
    pub(crate) fn new(text: &'t str) -> Parser<'t> {
        Parser {
            text,
            pos: 0,
            subs: Vec::new(),
            depth: 0,
            hydrogen_at: None,
        }
    }

    pub(crate) fn peek(&self) -> Option<u8> {
        self.text.as_bytes().get(self.pos).copied()
    }

    pub(crate) fn peek_at(&self, offset: usize) -> Option<u8> {
        self.text.as_bytes().get(self.pos + offset).copied()
    }

    pub(crate) fn at_end(&self) -> bool {
        self.pos >= self.text.len()
    }

    /// Takes `byte` if it is next.
    pub(crate) fn eat(&mut self, byte: u8) -> bool {
        if self.peek() == Some(byte) {
            self.pos += 1;
            true
        } else {
            false
        }
    }

    /// An error over `start..end`.
    pub(crate) fn error_at(
        &self,
        message: impl Into<String>,
        start: usize,
        end: usize,
    ) -> PatternError {
        PatternError::new(message, self.text, start, end)
    }

    /// An error at the next character (or at the end).
    pub(crate) fn error_here(&self, message: impl Into<String>) -> PatternError {
        let end = self.pos + self.char_len();
        self.error_at(message, self.pos, end)
    }

    /// Byte length of the next character; 0 at the end (the caret still shows there).
    pub(crate) fn char_len(&self) -> usize {
        self.text
            .get(self.pos..)
            .and_then(|s| s.chars().next())
            .map_or(0, char::len_utf8)
    }

    /// The next character, for messages.
    pub(crate) fn next_char(&self) -> Option<char> {
        self.text.get(self.pos..).and_then(|s| s.chars().next())
    }

    /// Describes what sits at the cursor, for "expected ..." messages.
    pub(crate) fn found(&self) -> String {
        match self.next_char() {
            Some(c) => format!("'{}'", c.escape_debug()),
            None => "the end".to_string(),
        }
    }

    // <number> ::= <digit>+
    /// Reads decimal digits, if any, refusing values above `max`.
    pub(crate) fn number(&mut self, max: u32) -> Result<Option<u32>, PatternError> {
        let start = self.pos;
        let mut value: u32 = 0;
        while let Some(d @ b'0'..=b'9') = self.peek() {
            value = value.saturating_mul(10).saturating_add((d - b'0') as u32);
            self.pos += 1;
        }
        if self.pos == start {
            return Ok(None);
        }
        if value > max {
            return Err(self.error_at(
                format!(
                    "number {} is larger than {max}",
                    &self.text[start..self.pos]
                ),
                start,
                self.pos,
            ));
        }
        Ok(Some(value))
    }

    /// Enters one level of nesting (branch or `$()`), refusing to go past [`MAX_DEPTH`].
    pub(crate) fn enter(&mut self, start: usize) -> Result<(), PatternError> {
        self.depth += 1;
        if self.depth > MAX_DEPTH {
            return Err(self.error_at(
                format!("nesting deeper than {MAX_DEPTH} levels"),
                start,
                start + 1,
            ));
        }
        Ok(())
    }

    pub(crate) fn leave(&mut self) {
        self.depth -= 1;
    }
}
