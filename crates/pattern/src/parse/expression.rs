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
            // `&` written, or the next primitive (or `!`) written right after: both conjoin.
            if self.eat(b'&') || self.peek().is_some_and(|b| b == b'!' || P::starts(b)) {
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

#[cfg(test)]
mod tests {
    use crate::expr::Expr;
    use crate::primitive::AtomPrim::{self, *};
    use crate::primitive::BondPrim;

    fn atom_expr(text: &str) -> Expr<AtomPrim> {
        let (graph, _) = super::super::parse(text).expect("parses");
        graph.atoms[0].expr.clone()
    }
    fn p(prim: AtomPrim) -> Expr<AtomPrim> {
        Expr::Prim(prim)
    }
    const C: AtomPrim = Element {
        number: 6,
        aromatic: Some(false),
    };
    const N: AtomPrim = Element {
        number: 7,
        aromatic: Some(false),
    };
    const O: AtomPrim = Element {
        number: 8,
        aromatic: Some(false),
    };

    #[test]
    fn comma_binds_tighter_than_semicolon() {
        assert_eq!(
            atom_expr("[C,N;H1]"),
            Expr::And(vec![Expr::Or(vec![p(C), p(N)]), p(TotalH(1))])
        );
    }

    #[test]
    fn ampersand_binds_tighter_than_comma() {
        assert_eq!(
            atom_expr("[C&H1,N]"),
            Expr::Or(vec![Expr::And(vec![p(C), p(TotalH(1))]), p(N)])
        );
    }

    #[test]
    fn implicit_and_binds_like_ampersand() {
        assert_eq!(atom_expr("[CH1,N]"), atom_expr("[C&H1,N]"));
    }

    #[test]
    fn not_binds_tightest() {
        assert_eq!(
            atom_expr("[!C&!N,O]"),
            Expr::Or(vec![
                Expr::And(vec![Expr::Not(Box::new(p(C))), Expr::Not(Box::new(p(N)))]),
                p(O)
            ])
        );
    }

    #[test]
    fn environments_are_tested_after_cheap_primitives() {
        assert_eq!(
            atom_expr("[$(C=O);C,$(CN),N]"),
            Expr::And(vec![
                Expr::Or(vec![p(C), p(N), p(Recursive(1))]),
                p(Recursive(0))
            ])
        );
    }

    #[test]
    fn double_negation_cancels() {
        assert_eq!(atom_expr("[!!C]"), p(C));
    }

    #[test]
    fn semicolon_joins_disjunctions() {
        assert_eq!(
            atom_expr("[C,N;O,H1]"),
            Expr::And(vec![
                Expr::Or(vec![p(C), p(N)]),
                Expr::Or(vec![p(O), p(TotalH(1))])
            ])
        );
    }

    #[test]
    fn bond_expressions_share_the_precedence() {
        let (graph, _) = super::super::parse("C-,=;@C").expect("parses");
        assert_eq!(
            graph.bonds[0].expr,
            Expr::And(vec![
                Expr::Or(vec![
                    Expr::Prim(BondPrim::Single),
                    Expr::Prim(BondPrim::Double)
                ]),
                Expr::Prim(BondPrim::Ring)
            ])
        );
        let (graph, _) = super::super::parse("C!:C").expect("parses");
        assert_eq!(
            graph.bonds[0].expr,
            Expr::Not(Box::new(Expr::Prim(BondPrim::Aromatic)))
        );
        let (graph, _) = super::super::parse("C-@C").expect("parses");
        assert_eq!(
            graph.bonds[0].expr,
            Expr::And(vec![
                Expr::Prim(BondPrim::Single),
                Expr::Prim(BondPrim::Ring)
            ])
        );
    }
}
