//! Ring-closure digits.

use crate::error::PatternError;
use crate::expr::Expr;
use crate::graph::PatternBond;
use crate::primitive::BondPrim;

use super::parser::{Builder, OpenRing, Parser};

impl Parser<'_> {
    // <ring_closure> ::= <digit> | '%' <digit> <digit>
    /// Opens or closes a ring bond at atom `at`; `bond` is the bond written before it.
    pub(crate) fn ring_closure(
        &mut self,
        builder: &mut Builder,
        at: usize,
        bond: Option<Expr<BondPrim>>,
    ) -> Result<(), PatternError> {
        let start = self.pos;
        let label = if self.eat(b'%') {
            match (self.peek(), self.peek_at(1)) {
                (Some(a @ b'0'..=b'9'), Some(b @ b'0'..=b'9')) => {
                    self.pos += 2;
                    (a - b'0') as u16 * 10 + (b - b'0') as u16
                }
                _ => {
                    return Err(self.error_at(
                        "'%' must be followed by two digits",
                        start,
                        start + 1,
                    ))
                }
            }
        } else {
            let d = self.peek().unwrap_or(b'0');
            self.pos += 1;
            (d - b'0') as u16
        };
        let span = (start, self.pos);
        match builder.open.remove(&label) {
            None => {
                builder.open.insert(
                    label,
                    OpenRing {
                        atom: at,
                        bond,
                        span,
                    },
                );
            }
            Some(open) => {
                if open.atom == at {
                    return Err(self.error_at(
                        format!("ring bond {label} joins an atom to itself"),
                        start,
                        self.pos,
                    ));
                }
                if builder.bonded(open.atom, at) {
                    return Err(self.error_at(
                        format!("ring bond {label} joins atoms already bonded"),
                        start,
                        self.pos,
                    ));
                }
                let expr = match (open.bond, bond) {
                    (Some(a), Some(b)) if a != b => {
                        return Err(self.error_at(
                            format!("ring bond {label} has different bonds at its two ends"),
                            start,
                            self.pos,
                        ))
                    }
                    (Some(a), _) => a,
                    (None, Some(b)) => b,
                    (None, None) => Expr::Prim(BondPrim::Implicit),
                };
                builder.bonds.push(PatternBond {
                    a: open.atom,
                    b: at,
                    expr,
                });
            }
        }
        Ok(())
    }
}
