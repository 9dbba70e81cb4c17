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

    /// Whether any primitive satisfies `test`.
    pub(crate) fn any_prim(&self, test: &impl Fn(&P) -> bool) -> bool {
        match self {
            Expr::Prim(p) => test(p),
            Expr::Not(e) => e.any_prim(test),
            Expr::And(es) | Expr::Or(es) => es.iter().any(|e| e.any_prim(test)),
        }
    }

    /// Moves operands holding a costly primitive after the others, at every level. The
    /// operators are side-effect free, so the answer is unchanged while short-circuiting
    /// skips more of the costly ones (`[$(...);CX4]` tests the element first). In a
    /// conjunction a costly primitive also comes before a negated one: an environment
    /// written plainly usually fails where the atom is not the one wanted, a negated one
    /// usually holds, so the plain one more often ends the walk.
    pub(crate) fn cheap_first(&mut self, costly: &impl Fn(&P) -> bool) {
        let conjunction = matches!(self, Expr::And(_));
        match self {
            Expr::Prim(_) => {}
            Expr::Not(e) => e.cheap_first(costly),
            Expr::And(es) | Expr::Or(es) => {
                es.iter_mut().for_each(|e| e.cheap_first(costly));
                // Stable, so equal-cost operands keep the written order. A costly primitive
                // on its own ranks last; a compound holding one may still end early.
                es.sort_by_key(|e| match e {
                    Expr::Prim(p) if costly(p) => 2,
                    Expr::Not(inner) if matches!(**inner, Expr::Prim(ref p) if costly(p)) => {
                        2 + conjunction as u8
                    }
                    e if e.any_prim(costly) => 1,
                    _ => 0,
                });
            }
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
