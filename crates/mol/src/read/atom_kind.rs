//! One `purr` atom kind into our atom fields.

use purr::feature::{Aliphatic, Aromatic, AtomKind, BracketSymbol};

use crate::elements;

/// The fields of an atom as written.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct WrittenAtom {
    pub element: u8,
    pub isotope: Option<u16>,
    pub charge: i8,
    /// Bracket hydrogen count; `None` for organic-subset atoms (implicit, counted later).
    pub hcount: Option<u8>,
    pub bracket: bool,
    pub aromatic: bool,
    pub atom_class: Option<u16>,
    pub chiral: bool,
}

/// `purr` writes symbols through Display; its element enum has no numeric value. The
/// symbol is written into a small buffer on the stack: no allocation per atom.
fn number_of(symbol: &dyn std::fmt::Display) -> u8 {
    use std::fmt::Write;
    struct Buf {
        bytes: [u8; 8],
        len: usize,
    }
    impl Write for Buf {
        fn write_str(&mut self, s: &str) -> std::fmt::Result {
            let end = self.len + s.len();
            if end > self.bytes.len() {
                return Err(std::fmt::Error);
            }
            self.bytes[self.len..end].copy_from_slice(s.as_bytes());
            self.len = end;
            Ok(())
        }
    }
    let mut buf = Buf {
        bytes: [0; 8],
        len: 0,
    };
    if write!(buf, "{symbol}").is_err() || buf.len == 0 {
        return 0;
    }
    buf.bytes[0] = buf.bytes[0].to_ascii_uppercase();
    match std::str::from_utf8(&buf.bytes[..buf.len]) {
        Ok(title) => elements::atomic_number(title).unwrap_or(0),
        Err(_) => 0,
    }
}

/// Organic-subset symbols by variant, without formatting.
fn aliphatic_number(a: &Aliphatic) -> u8 {
    match a {
        Aliphatic::B => 5,
        Aliphatic::C => 6,
        Aliphatic::N => 7,
        Aliphatic::O => 8,
        Aliphatic::S => 16,
        Aliphatic::P => 15,
        Aliphatic::F => 9,
        Aliphatic::Cl => 17,
        Aliphatic::Br => 35,
        Aliphatic::I => 53,
        other => number_of(other),
    }
}

fn aromatic_number(a: &Aromatic) -> u8 {
    match a {
        Aromatic::B => 5,
        Aromatic::C => 6,
        Aromatic::N => 7,
        Aromatic::O => 8,
        Aromatic::P => 15,
        Aromatic::S => 16,
    }
}

// <atom> ::= <organic> | <bracket> | <star>
pub(crate) fn convert(kind: &AtomKind) -> WrittenAtom {
    let mut atom = WrittenAtom {
        element: 0,
        isotope: None,
        charge: 0,
        hcount: None,
        bracket: false,
        aromatic: false,
        atom_class: None,
        chiral: false,
    };
    match kind {
        AtomKind::Star => atom.hcount = Some(0),
        AtomKind::Aliphatic(a) => atom.element = aliphatic_number(a),
        AtomKind::Aromatic(a) => {
            atom.element = aromatic_number(a);
            atom.aromatic = true;
        }
        AtomKind::Bracket {
            isotope,
            symbol,
            configuration,
            hcount,
            charge,
            map,
        } => {
            atom.bracket = true;
            match symbol {
                BracketSymbol::Star => {}
                BracketSymbol::Element(e) => atom.element = number_of(e),
                BracketSymbol::Aromatic(e) => {
                    atom.element = number_of(e);
                    atom.aromatic = true;
                }
            }
            atom.isotope = isotope.as_ref().map(u16::from);
            atom.hcount = Some(hcount.as_ref().map_or(0, |h| h.into()));
            atom.charge = charge.as_ref().map_or(0, |c| c.into());
            atom.atom_class = map.as_ref().map(u16::from);
            atom.chiral = configuration.is_some();
        }
    }
    atom
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn organic_symbols_match_their_written_form() {
        use Aliphatic::*;
        for a in [B, C, N, O, S, P, F, Cl, Br, I, At, Ts] {
            let title = a.to_string();
            assert_eq!(
                aliphatic_number(&a),
                elements::atomic_number(&title).unwrap_or(0)
            );
        }
        for a in [
            Aromatic::B,
            Aromatic::C,
            Aromatic::N,
            Aromatic::O,
            Aromatic::P,
            Aromatic::S,
        ] {
            let s = a.to_string();
            let title = s[..1].to_uppercase() + &s[1..];
            assert_eq!(
                aromatic_number(&a),
                elements::atomic_number(&title).unwrap_or(0)
            );
        }
    }
}
