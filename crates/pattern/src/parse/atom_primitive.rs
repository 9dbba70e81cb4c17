//! Atom primitives inside brackets.

use crate::error::PatternError;
use crate::primitive::AtomPrim;

use super::element::{atomic_number, AROMATIC};
use super::expression::Operand;
use super::parser::Parser;

/// Largest charge accepted.
const MAX_CHARGE: u32 = 15;

impl Operand for AtomPrim {
    const NAME: &'static str = "an atom primitive";

    fn starts(byte: u8) -> bool {
        byte.is_ascii_alphanumeric() || matches!(byte, b'*' | b'#' | b'$' | b'+' | b'-' | b'@')
    }

    // <atom_primitive> ::= '*' | 'a' | 'A' | <element> | <aromatic_element> | '#' <number>
    //     | <number> | 'H' <number>? | 'h' <number>? | 'D' <number>? | 'X' <number>?
    //     | 'R' <number>? | 'r' <number>? | <charge> | <recursive>
    fn primitive(p: &mut Parser<'_>) -> Result<AtomPrim, PatternError> {
        let start = p.pos;
        let Some(first) = p.peek() else {
            return Err(p.error_here("expected an atom primitive, found the end"));
        };
        match first {
            b'*' => {
                p.pos += 1;
                Ok(AtomPrim::Any)
            }
            b'$' => p.recursive(),
            b'@' => Err(p.error_here("chirality ('@') is not supported in atoms")),
            b'+' | b'-' => p.charge(),
            b'#' => {
                p.pos += 1;
                match p.number(118)? {
                    Some(n) => Ok(AtomPrim::Element {
                        number: n as u8,
                        aromatic: None,
                    }),
                    None => {
                        Err(p.error_at("expected an atomic number after '#'", start, start + 1))
                    }
                }
            }
            b'0'..=b'9' => {
                let mass = p.number(u16::MAX as u32)?.unwrap_or(0);
                Ok(AtomPrim::Isotope(mass as u16))
            }
            b'A'..=b'Z' => p.upper_primitive(),
            _ => p.lower_primitive(),
        }
    }
}

impl Parser<'_> {
    /// Primitives that start with an upper-case letter: aliphatic elements, `A`, counts.
    fn upper_primitive(&mut self) -> Result<AtomPrim, PatternError> {
        let start = self.pos;
        let first = self.peek().unwrap_or(b'A');
        // A two-letter symbol wins over a one-letter one followed by a primitive (`Cl`, `Na`).
        if let Some(second @ b'a'..=b'z') = self.peek_at(1) {
            let symbol = [first, second];
            if let Some(number) = std::str::from_utf8(&symbol).ok().and_then(atomic_number) {
                self.pos += 2;
                return Ok(AtomPrim::Element {
                    number,
                    aromatic: Some(false),
                });
            }
        }
        self.pos += 1;
        let count = |p: &mut Parser<'_>, default: u32| -> Result<u8, PatternError> {
            Ok(p.number(u8::MAX as u32)?.unwrap_or(default) as u8)
        };
        match first {
            b'A' => Ok(AtomPrim::Aromatic(false)),
            b'H' if self.hydrogen_at == Some(start) => Ok(AtomPrim::Element {
                number: 1,
                aromatic: Some(false),
            }),
            b'H' => Ok(AtomPrim::TotalH(count(self, 1)?)),
            b'D' => Ok(AtomPrim::Degree(count(self, 1)?)),
            b'X' => Ok(AtomPrim::Connectivity(count(self, 1)?)),
            b'R' => Ok(AtomPrim::RingCount(
                self.number(u8::MAX as u32)?.map(|n| n as u8),
            )),
            _ => match atomic_number(&(first as char).to_string()) {
                Some(number) => Ok(AtomPrim::Element {
                    number,
                    aromatic: Some(false),
                }),
                None => Err(self.error_at(
                    format!("unknown atom primitive '{}'", first as char),
                    start,
                    start + 1,
                )),
            },
        }
    }

    /// Primitives that start with a lower-case letter: aromatic elements, `a`, `h`, `r`.
    fn lower_primitive(&mut self) -> Result<AtomPrim, PatternError> {
        let start = self.pos;
        let rest = &self.text[start..];
        for (symbol, number) in AROMATIC {
            if rest.starts_with(symbol) {
                self.pos += symbol.len();
                return Ok(AtomPrim::Element {
                    number,
                    aromatic: Some(true),
                });
            }
        }
        let first = self.peek().unwrap_or(b'a');
        self.pos += 1;
        match first {
            b'a' => Ok(AtomPrim::Aromatic(true)),
            b'h' => Ok(AtomPrim::ImplicitH(
                self.number(u8::MAX as u32)?.map(|n| n as u8),
            )),
            b'r' => Ok(AtomPrim::RingSize(
                self.number(u8::MAX as u32)?.map(|n| n as u8),
            )),
            b'v' | b'x' => Err(self.error_at(
                format!("atom primitive '{}' is not supported", first as char),
                start,
                start + 1,
            )),
            _ => Err(self.error_at(
                format!("unknown atom primitive '{}'", first as char),
                start,
                start + 1,
            )),
        }
    }

    // <charge> ::= '+' <number>? | '-' <number>? | '+'+ | '-'+
    fn charge(&mut self) -> Result<AtomPrim, PatternError> {
        let start = self.pos;
        let sign = self.peek().unwrap_or(b'+');
        self.pos += 1;
        let magnitude = match self.number(MAX_CHARGE)? {
            Some(n) => n,
            None => {
                let mut n = 1;
                while self.eat(sign) {
                    n += 1;
                }
                if n > MAX_CHARGE {
                    return Err(self.error_at(
                        format!("charge is larger than {MAX_CHARGE}"),
                        start,
                        self.pos,
                    ));
                }
                n
            }
        };
        let value = magnitude as i8;
        Ok(AtomPrim::Charge(if sign == b'-' { -value } else { value }))
    }
}

#[cfg(test)]
mod tests {
    use crate::expr::Expr;
    use crate::primitive::AtomPrim::{self, *};

    /// The primitives of a one-atom pattern, flattened from a top-level conjunction.
    fn prims(text: &str) -> Vec<AtomPrim> {
        let (graph, _) = super::super::parse(text).expect("parses");
        match &graph.atoms[0].expr {
            Expr::Prim(p) => vec![*p],
            Expr::And(es) => es
                .iter()
                .map(|e| match e {
                    Expr::Prim(p) => *p,
                    other => panic!("not a primitive: {other:?}"),
                })
                .collect(),
            other => panic!("not a conjunction: {other:?}"),
        }
    }
    fn el(number: u8, aromatic: Option<bool>) -> AtomPrim {
        Element { number, aromatic }
    }

    #[test]
    fn organic_shorthand() {
        assert_eq!(prims("C"), vec![el(6, Some(false))]);
        assert_eq!(prims("c"), vec![el(6, Some(true))]);
        assert_eq!(prims("Cl"), vec![el(17, Some(false))]);
        assert_eq!(prims("Br"), vec![el(35, Some(false))]);
        assert_eq!(prims("*"), vec![Any]);
        assert_eq!(prims("a"), vec![Aromatic(true)]);
        assert_eq!(prims("A"), vec![Aromatic(false)]);
    }

    #[test]
    fn bracket_elements() {
        assert_eq!(prims("[Cl]"), vec![el(17, Some(false))]);
        assert_eq!(prims("[Na]"), vec![el(11, Some(false))]);
        assert_eq!(prims("[se]"), vec![el(34, Some(true))]);
        assert_eq!(prims("[#7]"), vec![el(7, None)]);
        assert_eq!(prims("[#0]"), vec![el(0, None)]);
    }

    #[test]
    fn one_letter_element_then_primitive() {
        assert_eq!(prims("[CR]"), vec![el(6, Some(false)), RingCount(None)]);
        assert_eq!(prims("[Ch]"), vec![el(6, Some(false)), ImplicitH(None)]);
        assert_eq!(prims("[nH]"), vec![el(7, Some(true)), TotalH(1)]);
    }

    #[test]
    fn counts() {
        assert_eq!(prims("[NH2]"), vec![el(7, Some(false)), TotalH(2)]);
        assert_eq!(prims("[CH]"), vec![el(6, Some(false)), TotalH(1)]);
        assert_eq!(prims("[H0]"), vec![TotalH(0)]);
        assert_eq!(prims("[D3]"), vec![Degree(3)]);
        assert_eq!(prims("[D]"), vec![Degree(1)]);
        assert_eq!(prims("[X4]"), vec![Connectivity(4)]);
        assert_eq!(prims("[h2]"), vec![ImplicitH(Some(2))]);
        assert_eq!(prims("[R]"), vec![RingCount(None)]);
        assert_eq!(prims("[R0]"), vec![RingCount(Some(0))]);
        assert_eq!(prims("[R2]"), vec![RingCount(Some(2))]);
        assert_eq!(prims("[r]"), vec![RingSize(None)]);
        assert_eq!(prims("[r6]"), vec![RingSize(Some(6))]);
    }

    #[test]
    fn hydrogen_as_element() {
        assert_eq!(prims("[H]"), vec![el(1, Some(false))]);
        assert_eq!(prims("[2H]"), vec![Isotope(2), el(1, Some(false))]);
        assert_eq!(prims("[H+]"), vec![el(1, Some(false)), Charge(1)]);
        assert_eq!(prims("[H:1]"), vec![el(1, Some(false))]);
    }

    #[test]
    fn charges() {
        assert_eq!(prims("[+]"), vec![Charge(1)]);
        assert_eq!(prims("[-]"), vec![Charge(-1)]);
        assert_eq!(prims("[+2]"), vec![Charge(2)]);
        assert_eq!(prims("[--]"), vec![Charge(-2)]);
        assert_eq!(prims("[+++]"), vec![Charge(3)]);
        assert_eq!(prims("[N+0]"), vec![el(7, Some(false)), Charge(0)]);
        assert_eq!(prims("[O-1]"), vec![el(8, Some(false)), Charge(-1)]);
    }

    #[test]
    fn isotope() {
        assert_eq!(prims("[13C]"), vec![Isotope(13), el(6, Some(false))]);
    }

    #[test]
    fn recursive_environments_are_numbered_in_reading_order() {
        let (graph, subs) = super::super::parse("[C;$(C=O),$(C[$(N)])]").expect("parses");
        assert_eq!(subs.len(), 3);
        assert_eq!(subs[0].atoms.len(), 2);
        assert_eq!(subs[1].atoms.len(), 2);
        assert_eq!(subs[2].atoms.len(), 1);
        assert_eq!(
            graph.atoms[0].expr,
            Expr::And(vec![
                Expr::Prim(el(6, Some(false))),
                Expr::Or(vec![Expr::Prim(Recursive(0)), Expr::Prim(Recursive(1))])
            ])
        );
    }
}
