//! A chain of atoms, branches and ring closures after an atom.

use crate::error::PatternError;
use crate::expr::Expr;
use crate::graph::PatternBond;
use crate::primitive::BondPrim;

use super::parser::{Builder, Parser};

impl Parser<'_> {
    // <chain> ::= ( <branch> | <bond>? <ring_closure> | <bond>? <atom> )*
    /// Reads what follows atom `prev` until the end of the text, a `)` or a stray `]`.
    pub(crate) fn chain(
        &mut self,
        builder: &mut Builder,
        mut prev: usize,
    ) -> Result<(), PatternError> {
        loop {
            match self.peek() {
                // `]` ends a `$()` left open inside a bracket; the caller names the error.
                None | Some(b')' | b']') => return Ok(()),
                Some(b'(') => self.branch(builder, prev)?,
                Some(b'.') => {
                    return Err(self.error_here("disconnected patterns ('.') are not supported"))
                }
                _ => {
                    let bond = self.bond()?;
                    if matches!(self.peek(), Some(b'0'..=b'9' | b'%')) {
                        self.ring_closure(builder, prev, bond)?;
                    } else {
                        let next = self.atom(builder)?;
                        builder.bonds.push(PatternBond {
                            a: prev,
                            b: next,
                            expr: bond.unwrap_or(Expr::Prim(BondPrim::Implicit)),
                        });
                        prev = next;
                    }
                }
            }
        }
    }
}
