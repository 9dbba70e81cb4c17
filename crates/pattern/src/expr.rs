//! Boolean expressions over primitives, shared by atoms and bonds.

/// An expression tree: the parser builds it with SMARTS precedence already applied, so
/// evaluation is a plain walk.
#[derive(Clone, Debug, PartialEq)]
pub(crate) enum Expr<P> {
    /// A single primitive.
    Prim(P),
    /// Negation (`!`).
    Not(Box<Expr<P>>),
    /// Conjunction (`&`, `;` or implicit).
    And(Vec<Expr<P>>),
    /// Disjunction (`,`).
    Or(Vec<Expr<P>>),
}

impl<P> Expr<P> {
    /// Evaluates with `test` deciding each primitive; short-circuits left to right.
    #[inline]
    pub(crate) fn eval(&self, test: &mut impl FnMut(&P) -> bool) -> bool {
        match self {
            Expr::Prim(p) => test(p),
            Expr::Not(e) => !e.eval(test),
            Expr::And(es) => es.iter().all(|e| e.eval(test)),
            Expr::Or(es) => es.iter().any(|e| e.eval(test)),
        }
    }

    /// Joins operands: one operand stays as it is, so simple atoms stay one primitive deep.
    pub(crate) fn and(mut operands: Vec<Expr<P>>) -> Expr<P> {
        if operands.len() == 1 {
            operands.pop().expect("one operand")
        } else {
            Expr::And(operands)
        }
    }

    /// Like [`Expr::and`], for `,`.
    pub(crate) fn or(mut operands: Vec<Expr<P>>) -> Expr<P> {
        if operands.len() == 1 {
            operands.pop().expect("one operand")
        } else {
            Expr::Or(operands)
        }
    }
}
