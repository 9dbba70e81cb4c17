//! A branch: a side chain in parentheses.

use crate::error::PatternError;
use crate::expr::Expr;
use crate::graph::PatternBond;
use crate::primitive::BondPrim;

use super::parser::{Builder, Parser};

impl Parser<'_> {
    // <branch> ::= '(' <bond>? <atom> <chain> ')'
    /// Reads a branch hanging off atom `from`.
    pub(crate) fn branch(
        &mut self,
        builder: &mut Builder,
        from: usize,
    ) -> Result<(), PatternError> {
        let open = self.pos;
        self.enter(open)?;
        self.pos += 1;
        let bond = self.bond()?;
        let first = self.atom(builder)?;
        builder.bonds.push(PatternBond {
            a: from,
            b: first,
            expr: bond.unwrap_or(Expr::Prim(BondPrim::Implicit)),
        });
        self.chain(builder, first)?;
        if !self.eat(b')') {
            return Err(self.error_at("branch is never closed", open, open + 1));
        }
        self.leave();
        Ok(())
    }
}
