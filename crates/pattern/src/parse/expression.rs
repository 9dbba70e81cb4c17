//! Logical expressions over primitives, for atoms and bonds alike.
//!
//! Precedence, tightest first: `!`, `&` (and writing two primitives side by side), `,`,
//! `;` (Daylight SMARTS).

use crate::error::PatternError;
use crate::expr::Expr;

use super::parser::Parser;

/// A kind of primitive the expression grammar can be built over.
pub(crate) trait Operand: Sized {
    /// Whether `byte` can start a primitive of this kind.
    fn starts(byte: u8) -> bool;
    /// What a primitive of this kind is called, for messages.
    const NAME: &'static str;
    /// Reads one primitive (the cursor is on a byte for which `starts` holds).
    fn primitive(parser: &mut Parser<'_>) -> Result<Self, PatternError>;
}

impl Parser<'_> {
    // <low_and> ::= <or> ( ';' <or> )*
    pub(crate) fn low_and<P: Operand>(&mut self) -> Result<Expr<P>, PatternError> {
        let mut operands = vec![self.or::<P>()?];
        while self.eat(b';') {
            operands.push(self.or::<P>()?);
        }
        Ok(Expr::and(operands))
    }

    // <or> ::= <high_and> ( ',' <high_and> )*
    fn or<P: Operand>(&mut self) -> Result<Expr<P>, PatternError> {
        let mut operands = vec![self.high_and::<P>()?];
        while self.eat(b',') {
            operands.push(self.high_and::<P>()?);
        }
        Ok(Expr::or(operands))
    }

    // <high_and> ::= <not> ( '&'? <not> )*
    fn high_and<P: Operand>(&mut self) -> Result<Expr<P>, PatternError> {
        let mut operands = vec![self.not::<P>()?];
        loop {
            if self.eat(b'&') {
                operands.push(self.not::<P>()?);
            } else if self.peek().is_some_and(|b| b == b'!' || P::starts(b)) {
                operands.push(self.not::<P>()?);
            } else {
                return Ok(Expr::and(operands));
            }
        }
    }

    // <not> ::= '!'* <primitive>
    fn not<P: Operand>(&mut self) -> Result<Expr<P>, PatternError> {
        let mut negations = 0usize;
        while self.eat(b'!') {
            negations += 1;
        }
        match self.peek() {
            Some(b) if P::starts(b) => {
                let prim = Expr::Prim(P::primitive(self)?);
                Ok(if negations % 2 == 1 {
                    Expr::Not(Box::new(prim))
                } else {
                    prim
                })
            }
            _ => Err(self.error_here(format!("expected {}, found {}", P::NAME, self.found()))),
        }
    }
}
