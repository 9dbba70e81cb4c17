//! A bracket atom: an atom expression and an optional atom map.

use crate::error::PatternError;
use crate::expr::Expr;
use crate::primitive::AtomPrim;

use super::parser::Parser;

impl Parser<'_> {
    // <bracket> ::= '[' <low_and> ( ':' <number> )? ']'
    /// Reads a bracket atom: its expression and its map number.
    pub(crate) fn bracket(&mut self) -> Result<(Expr<AtomPrim>, Option<u16>), PatternError> {
        let open = self.pos;
        self.pos += 1;
        if self.peek() == Some(b']') {
            return Err(self.error_at("empty bracket atom", open, self.pos + 1));
        }
        self.hydrogen_at = self.hydrogen_element_at();
        let expr = self.low_and::<AtomPrim>()?;
        let mut map = None;
        if self.peek() == Some(b':') {
            let colon = self.pos;
            self.pos += 1;
            match self.number(u16::MAX as u32)? {
                Some(n) => map = Some(n as u16),
                None => {
                    return Err(self.error_at(
                        "expected an atom-map number after ':'",
                        colon,
                        colon + 1,
                    ))
                }
            }
        }
        match self.peek() {
            Some(b']') => {
                self.pos += 1;
                Ok((expr, map))
            }
            None => Err(self.error_at("bracket atom is never closed", open, open + 1)),
            Some(_) => Err(self.error_here(format!("expected ']', found {}", self.found()))),
        }
    }

    /// Where `H` names the element hydrogen: `[H]`, `[2H]`, `[H+]`, `[H:1]` (Daylight: an `H`
    /// first in the bracket and followed by nothing but a charge or a map).
    fn hydrogen_element_at(&self) -> Option<usize> {
        let bytes = self.text.as_bytes();
        let mut i = self.pos;
        while bytes.get(i).is_some_and(u8::is_ascii_digit) {
            i += 1;
        }
        (bytes.get(i) == Some(&b'H') && matches!(bytes.get(i + 1), Some(b']' | b'+' | b'-' | b':')))
            .then_some(i)
    }
}
