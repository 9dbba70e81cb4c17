//! One `purr` atom kind into our atom fields.

use purr::feature::{AtomKind, BracketSymbol};

use crate::elements;

/// The fields of an atom as written.
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

/// `purr` writes symbols through Display; its element enum has no numeric value.
fn number_of(symbol: &str) -> u8 {
    let mut chars = symbol.chars();
    let title: String = match chars.next() {
        Some(c) => c.to_uppercase().chain(chars).collect(),
        None => return 0,
    };
    elements::atomic_number(&title).unwrap_or(0)
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
        AtomKind::Aliphatic(a) => atom.element = number_of(&a.to_string()),
        AtomKind::Aromatic(a) => {
            atom.element = number_of(&a.to_string());
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
                BracketSymbol::Element(e) => atom.element = number_of(&e.to_string()),
                BracketSymbol::Aromatic(e) => {
                    atom.element = number_of(&e.to_string());
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
