//! A direct reader for the common shape of valid SMILES, tried before `purr`.
//!
//! It follows `purr`'s grammar step for step (the same greedy choices, the same events in
//! the same order, the same ring-bond rules as the builder), over ASCII text, without the
//! per-character vector, the recursion and the per-atom conversions that made `purr` the
//! largest part of reading. It only says yes: at anything it does not handle (every error,
//! a `.` inside a branch, stereo classes other than `@`/`@@`, the `At` and `Ts` organic
//! symbols, `%73` beside `%74`, non-ASCII text) it gives up and `purr` reads the text, so
//! errors keep their messages and carets. `tests/fast_reader.rs` checks it against `purr`.

use super::atom_kind::WrittenAtom;
use super::builder::{Symbol, Written};
use crate::elements;
use crate::Span;

/// Nothing open on a ring number.
const CLOSED: usize = usize::MAX;

/// Ring-closure bonds up to this many are checked for repeats one by one.
const FEW_CLOSURES: usize = 8;

// <smiles> ::= <atom> <body>*
// <body> ::= <branch> | <split> | <union>
// <branch> ::= "(" <bond>? <smiles> ")"
// <split> ::= "." <smiles>
// <union> ::= <bond>? ( <smiles> | <rnum> )
/// The atoms and bonds of `smiles` as `purr` and the builder would give them, or `None`
/// when the text is outside what this reader handles (including every invalid text).
pub(crate) fn read_fast(smiles: &str) -> Option<Written> {
    let b = smiles.as_bytes();
    if !b.is_ascii() {
        return None;
    }
    let mut atoms: Vec<WrittenAtom> = Vec::with_capacity(b.len());
    let mut spans: Vec<Span> = Vec::with_capacity(b.len());
    let mut bonds: Vec<(usize, usize, Symbol)> = Vec::with_capacity(b.len() + 4);
    // The builder's stack of atoms: its top is the atom the next one bonds to.
    let mut stack: Vec<usize> = Vec::with_capacity(b.len());
    // Per atom, the atom its chain bond comes from (`CLOSED` for the first of a part).
    let mut chain_from: Vec<usize> = Vec::with_capacity(b.len());
    // Stack heights at each open branch: a branch's close pops what it pushed.
    let mut branches: Vec<usize> = Vec::new();
    let mut open_atom = [CLOSED; 100];
    let mut open_symbol = [Symbol::Elided; 100];
    let mut opens = 0usize;
    // Ring-closure bonds by index into `bonds`, the first few: only they can repeat a bond.
    let mut closures = [0usize; FEW_CLOSURES];
    let mut closure_count = 0usize;
    let mut i = 0usize;
    // The bond into the next atom: `None` for the first atom of a part (after `.` or at the
    // start), which roots a new chain.
    let mut incoming: Option<Symbol> = None;
    let mut need_atom = true;
    loop {
        if need_atom {
            let start = i;
            let atom = read_atom(b, &mut i)?;
            let id = atoms.len();
            if let Some(symbol) = incoming {
                let head = *stack.last()?;
                bonds.push((head.min(id), head.max(id), symbol));
                chain_from.push(head);
            } else {
                chain_from.push(CLOSED);
            }
            atoms.push(atom);
            spans.push(Span::new(start, i));
            stack.push(id);
            need_atom = false;
            continue;
        }
        let Some(&c) = b.get(i) else {
            break;
        };
        match c {
            b'(' => {
                i += 1;
                if b.get(i) == Some(&b'.') {
                    return None;
                }
                let symbol = read_bond(b, &mut i)?;
                branches.push(stack.len());
                incoming = Some(symbol);
                need_atom = true;
            }
            b')' => {
                let height = branches.pop()?;
                stack.truncate(height);
                i += 1;
            }
            b'.' => {
                if !branches.is_empty() {
                    return None;
                }
                i += 1;
                incoming = None;
                need_atom = true;
            }
            _ => {
                let symbol = read_bond(b, &mut i)?;
                match b.get(i) {
                    Some(&d) if d.is_ascii_digit() || d == b'%' => {
                        let rnum = read_rnum(b, &mut i)?;
                        let head = *stack.last()?;
                        if open_atom[rnum] == CLOSED {
                            open_atom[rnum] = head;
                            open_symbol[rnum] = symbol;
                            opens += 1;
                        } else {
                            let (other, first) = (open_atom[rnum], open_symbol[rnum]);
                            open_atom[rnum] = CLOSED;
                            opens -= 1;
                            let merged = match (first, symbol) {
                                (Symbol::Elided, s) | (s, Symbol::Elided) => s,
                                (x, y) if x == y => x,
                                _ => return None,
                            };
                            if other == head {
                                return None;
                            }
                            if closure_count < FEW_CLOSURES {
                                closures[closure_count] = bonds.len();
                            }
                            closure_count += 1;
                            bonds.push((other.min(head), other.max(head), merged));
                        }
                    }
                    _ => {
                        // A bond symbol must lead to an atom; without one the body ends,
                        // which only the end of the text or a branch's `)` may follow.
                        if symbol == Symbol::Elided && !starts_atom(b.get(i).copied()) {
                            return None;
                        }
                        incoming = Some(symbol);
                        need_atom = true;
                    }
                }
            }
        }
    }
    if !branches.is_empty() || opens != 0 || atoms.is_empty() {
        return None;
    }
    // Two bonds between one pair of atoms are an error the full reader names. A chain bond
    // always leads to a new atom, so a repeat involves a ring-closure bond: a few of those
    // are compared with each other and with the one chain bond that could match (the one
    // into the later atom, from the earlier), many are found by sorting all pairs.
    if closure_count <= FEW_CLOSURES {
        let few = &closures[..closure_count];
        let repeated = few.iter().enumerate().any(|(k, &c)| {
            let (a, b, _) = bonds[c];
            chain_from[b] == a
                || few[k + 1..].iter().any(|&d| {
                    let (x, y, _) = bonds[d];
                    x == a && y == b
                })
        });
        if repeated {
            return None;
        }
    } else {
        let mut pairs: Vec<(usize, usize)> = bonds.iter().map(|&(a, b, _)| (a, b)).collect();
        pairs.sort_unstable();
        if pairs.windows(2).any(|w| w[0] == w[1]) {
            return None;
        }
    }
    Some(Written {
        atoms,
        spans,
        bonds,
    })
}

fn starts_atom(c: Option<u8>) -> bool {
    matches!(c, Some(c) if c.is_ascii_alphabetic() || c == b'[' || c == b'*')
}

// <bond> ::= "-" | "=" | "#" | "$" | ":" | "/" | "\"
/// A bond symbol, or `Elided` when none is written; `None` for `$` (quadruple bonds are
/// refused, by the full reader).
fn read_bond(b: &[u8], i: &mut usize) -> Option<Symbol> {
    let symbol = match b.get(*i) {
        Some(b'-') | Some(b'/') | Some(b'\\') => Symbol::Single,
        Some(b'=') => Symbol::Double,
        Some(b'#') => Symbol::Triple,
        Some(b':') => Symbol::Aromatic,
        Some(b'$') => return None,
        _ => return Some(Symbol::Elided),
    };
    *i += 1;
    Some(symbol)
}

// <rnum> ::= <digit> | "%" <digit> <digit>
fn read_rnum(b: &[u8], i: &mut usize) -> Option<usize> {
    match b.get(*i) {
        Some(&d) if d.is_ascii_digit() => {
            *i += 1;
            Some((d - b'0') as usize)
        }
        Some(b'%') => {
            let (x, y) = (*b.get(*i + 1)?, *b.get(*i + 2)?);
            if !x.is_ascii_digit() || !y.is_ascii_digit() {
                return None;
            }
            *i += 3;
            Some(((x - b'0') * 10 + (y - b'0')) as usize)
        }
        _ => None,
    }
}

fn organic(element: u8, aromatic: bool) -> WrittenAtom {
    WrittenAtom {
        element,
        isotope: None,
        charge: 0,
        hcount: None,
        bracket: false,
        aromatic,
        atom_class: None,
        chiral: false,
    }
}

// <atom> ::= <organic> | <bracket> | <star>
fn read_atom(b: &[u8], i: &mut usize) -> Option<WrittenAtom> {
    let c = *b.get(*i)?;
    let next = b.get(*i + 1).copied();
    let (atom, len) = match c {
        b'B' if next == Some(b'r') => (organic(35, false), 2),
        b'C' if next == Some(b'l') => (organic(17, false), 2),
        b'B' => (organic(5, false), 1),
        b'C' => (organic(6, false), 1),
        b'N' => (organic(7, false), 1),
        b'O' => (organic(8, false), 1),
        b'P' => (organic(15, false), 1),
        b'S' => (organic(16, false), 1),
        b'F' => (organic(9, false), 1),
        b'I' => (organic(53, false), 1),
        b'b' => (organic(5, true), 1),
        b'c' => (organic(6, true), 1),
        b'n' => (organic(7, true), 1),
        b'o' => (organic(8, true), 1),
        b'p' => (organic(15, true), 1),
        b's' => (organic(16, true), 1),
        b'*' => {
            let mut star = organic(0, false);
            star.hcount = Some(0);
            (star, 1)
        }
        b'[' => {
            *i += 1;
            return read_bracket(b, i);
        }
        _ => return None,
    };
    *i += len;
    Some(atom)
}

/// Elements `purr` reads from one letter in brackets.
const ONE_LETTER: &[u8] = b"BCFHIKNOPSUVWY";

// <bracket> ::= "[" <isotope>? <symbol> <chiral>? <hcount>? <charge>? <class>? "]"
/// A bracket atom after its `[`.
fn read_bracket(b: &[u8], i: &mut usize) -> Option<WrittenAtom> {
    let mut atom = WrittenAtom {
        element: 0,
        isotope: None,
        charge: 0,
        hcount: Some(0),
        bracket: true,
        aromatic: false,
        atom_class: None,
        chiral: false,
    };
    atom.isotope = read_number(b, i, 3);
    let c = *b.get(*i)?;
    let next = b.get(*i + 1).copied();
    match c {
        b'*' => *i += 1,
        b'a' if next == Some(b's') => {
            atom.element = 33;
            atom.aromatic = true;
            *i += 2;
        }
        b's' if next == Some(b'e') => {
            atom.element = 34;
            atom.aromatic = true;
            *i += 2;
        }
        b'b' | b'c' | b'n' | b'o' | b'p' | b's' => {
            atom.element = elements::atomic_number(&(c.to_ascii_uppercase() as char).to_string())?;
            atom.aromatic = true;
            *i += 1;
        }
        b'A'..=b'Z' => match next {
            Some(l) if l.is_ascii_lowercase() => {
                let two = [c, l];
                // purr 0.9 names caesium "Ac" (its Display table), so `[Cs]` reads as
                // actinium there; that reading is left to purr.
                if two == *b"Cs" {
                    return None;
                }
                let symbol = std::str::from_utf8(&two).ok()?;
                atom.element = elements::atomic_number(symbol)?;
                *i += 2;
            }
            _ => {
                if !ONE_LETTER.contains(&c) {
                    return None;
                }
                atom.element = elements::atomic_number(&(c as char).to_string())?;
                *i += 1;
            }
        },
        _ => return None,
    }
    // <chiral> ::= "@" | "@@" | ... ; the longer classes (@TH1, @AL1, ...) go to purr.
    if b.get(*i) == Some(&b'@') {
        *i += 1;
        match b.get(*i) {
            Some(b'@') => *i += 1,
            Some(b'A') | Some(b'O') | Some(b'S') | Some(b'T') => return None,
            _ => {}
        }
        atom.chiral = true;
    }
    // <hcount> ::= "H" <digit>?
    if b.get(*i) == Some(&b'H') {
        *i += 1;
        match b.get(*i) {
            Some(&d) if d.is_ascii_digit() => {
                atom.hcount = Some(d - b'0');
                *i += 1;
            }
            _ => atom.hcount = Some(1),
        }
    }
    // <charge> ::= "+" | "++" | "+" <fifteen> | "-" | "--" | "-" <fifteen>
    if let Some(&sign) = b.get(*i).filter(|&&s| s == b'+' || s == b'-') {
        *i += 1;
        let magnitude = match b.get(*i) {
            Some(&d) if (b'1'..=b'9').contains(&d) => {
                *i += 1;
                match b.get(*i) {
                    Some(&e) if d == b'1' && (b'1'..=b'5').contains(&e) => {
                        *i += 1;
                        10 + (e - b'0') as i8
                    }
                    _ => (d - b'0') as i8,
                }
            }
            Some(&s) if s == sign => {
                *i += 1;
                2
            }
            _ => 1,
        };
        atom.charge = if sign == b'+' { magnitude } else { -magnitude };
    }
    // <class> ::= ":" <digit> <digit>? <digit>?
    if b.get(*i) == Some(&b':') {
        *i += 1;
        atom.atom_class = Some(read_number(b, i, 3)?);
    }
    if b.get(*i) != Some(&b']') {
        return None;
    }
    *i += 1;
    Some(atom)
}

/// Up to `max` digits as a number; `None` when there is no digit.
fn read_number(b: &[u8], i: &mut usize, max: usize) -> Option<u16> {
    let mut value: Option<u16> = None;
    for _ in 0..max {
        match b.get(*i) {
            Some(&d) if d.is_ascii_digit() => {
                value = Some(value.unwrap_or(0) * 10 + (d - b'0') as u16);
                *i += 1;
            }
            _ => break,
        }
    }
    value
}
