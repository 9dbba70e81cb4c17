//! An atom: bracketed, or organic-subset shorthand.

use crate::error::PatternError;
use crate::expr::Expr;
use crate::graph::PatternAtom;
use crate::primitive::AtomPrim;

use super::element::atomic_number;
use super::parser::{Builder, Parser, MAX_ATOMS};

impl Parser<'_> {
    // <atom> ::= <bracket> | '*' | 'a' | 'A' | <organic> | <aromatic_organic>
    // <organic> ::= 'B' | 'C' | 'N' | 'O' | 'P' | 'S' | 'F' | 'Cl' | 'Br' | 'I'
    // <aromatic_organic> ::= 'b' | 'c' | 'n' | 'o' | 'p' | 's'
    /// Reads one atom and adds it to the graph; returns its index.
    pub(crate) fn atom(&mut self, builder: &mut Builder) -> Result<usize, PatternError> {
        let start = self.pos;
        if builder.atoms.len() >= MAX_ATOMS {
            return Err(self.error_here(format!("pattern has more than {MAX_ATOMS} atoms")));
        }
        let (expr, map) = match self.peek() {
            Some(b'[') => self.bracket()?,
            Some(b'*') => {
                self.pos += 1;
                (Expr::Prim(AtomPrim::Any), None)
            }
            Some(b'a') => {
                self.pos += 1;
                (Expr::Prim(AtomPrim::Aromatic(true)), None)
            }
            Some(b'A') => {
                self.pos += 1;
                (Expr::Prim(AtomPrim::Aromatic(false)), None)
            }
            Some(b'C') if self.peek_at(1) == Some(b'l') => self.organic("Cl", false),
            Some(b'B') if self.peek_at(1) == Some(b'r') => self.organic("Br", false),
            Some(c @ (b'B' | b'C' | b'N' | b'O' | b'P' | b'S' | b'F' | b'I')) => {
                self.organic(&(c as char).to_string(), false)
            }
            Some(c @ (b'b' | b'c' | b'n' | b'o' | b'p' | b's')) => {
                self.organic(&(c as char).to_ascii_uppercase().to_string(), true)
            }
            Some(b'%' | b'0'..=b'9') => {
                return Err(self.error_here("ring bond digit needs an atom before it"))
            }
            _ => return Err(self.error_here(format!("expected an atom, found {}", self.found()))),
        };
        builder.atoms.push(PatternAtom {
            expr,
            map,
            span: (start, self.pos),
        });
        Ok(builder.atoms.len() - 1)
    }

    /// Takes an organic-subset symbol (already checked to be next).
    fn organic(&mut self, symbol: &str, aromatic: bool) -> (Expr<AtomPrim>, Option<u16>) {
        self.pos += symbol.len();
        let number = atomic_number(symbol).unwrap_or(0);
        (
            Expr::Prim(AtomPrim::Element {
                number,
                aromatic: Some(aromatic),
            }),
            None,
        )
    }
}
