//! Bonds and bond primitives.

use crate::error::PatternError;
use crate::expr::Expr;
use crate::primitive::BondPrim;

use super::expression::Operand;
use super::parser::Parser;

impl Operand for BondPrim {
    const NAME: &'static str = "a bond primitive";

    fn starts(byte: u8) -> bool {
        matches!(byte, b'-' | b'=' | b'#' | b':' | b'~' | b'@' | b'/' | b'\\')
    }

    // <bond_primitive> ::= '-' | '=' | '#' | ':' | '~' | '@'
    fn primitive(parser: &mut Parser<'_>) -> Result<BondPrim, PatternError> {
        let prim = match parser.peek() {
            Some(b'-') => BondPrim::Single,
            Some(b'=') => BondPrim::Double,
            Some(b'#') => BondPrim::Triple,
            Some(b':') => BondPrim::Aromatic,
            Some(b'~') => BondPrim::Any,
            Some(b'@') => BondPrim::Ring,
            _ => return Err(parser.error_here("directional bonds ('/', '\\') are not supported")),
        };
        parser.pos += 1;
        Ok(prim)
    }
}

impl Parser<'_> {
    // <bond> ::= <low_and>   (over bond primitives)
    /// Reads a bond expression if one is written here.
    pub(crate) fn bond(&mut self) -> Result<Option<Expr<BondPrim>>, PatternError> {
        match self.peek() {
            Some(b) if b == b'!' || BondPrim::starts(b) => Ok(Some(self.low_and::<BondPrim>()?)),
            _ => Ok(None),
        }
    }
}
