//! Builds atoms and bonds from `purr`'s reading events and turns its errors into ours.

use std::collections::HashMap;

use purr::feature::{AtomKind, BondKind, Rnum};
use purr::read::Trace;
use purr::walk::Follower;

use super::atom_kind::{convert, WrittenAtom};
use super::fast::read_fast;
use super::scan::{scan, Scan, MAX_INLINE_LENGTH, MAX_LENGTH};
use crate::{Error, ErrorKind, Span};

/// A bond symbol as written.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) enum Symbol {
    /// No symbol: single, or aromatic between two aromatic atoms.
    Elided,
    /// `-`, `/` or `\`.
    Single,
    /// `=`
    Double,
    /// `#`
    Triple,
    /// `$`
    Quadruple,
    /// `:`
    Aromatic,
}

impl Symbol {
    fn of(kind: &BondKind) -> Symbol {
        match kind {
            BondKind::Elided => Symbol::Elided,
            BondKind::Single | BondKind::Up | BondKind::Down => Symbol::Single,
            BondKind::Double => Symbol::Double,
            BondKind::Triple => Symbol::Triple,
            BondKind::Quadruple => Symbol::Quadruple,
            BondKind::Aromatic => Symbol::Aromatic,
        }
    }
}

/// Atoms and bonds as written, before perception.
pub(crate) struct Written {
    pub atoms: Vec<WrittenAtom>,
    /// Byte spans of the atoms.
    pub spans: Vec<Span>,
    /// (first atom, second atom, symbol), first atom the lower.
    pub bonds: Vec<(usize, usize, Symbol)>,
}

struct Open {
    atom: usize,
    symbol: Symbol,
    join: usize,
}

/// The `purr` follower: records atoms and bonds; remembers the first meaning error (it
/// cannot return one) to report after the reading.
#[derive(Default)]
struct Builder {
    atoms: Vec<WrittenAtom>,
    bonds: Vec<(usize, usize, Symbol, usize)>,
    stack: Vec<usize>,
    opens: HashMap<Rnum, Open>,
    joins: usize,
    // (problem, index of the join whose digit is at fault)
    error: Option<(JoinError, usize)>,
}

/// A ring bond that cannot be made; named after reading, from the text at its digit.
#[derive(Clone, Copy)]
enum JoinError {
    SelfLoop,
    Conflict,
}

impl Follower for Builder {
    fn root(&mut self, root: AtomKind) {
        self.stack.push(self.atoms.len());
        self.atoms.push(convert(&root));
    }

    fn extend(&mut self, bond_kind: BondKind, atom_kind: AtomKind) {
        let id = self.atoms.len();
        if let Some(&head) = self.stack.last() {
            self.bonds
                .push((head, id, Symbol::of(&bond_kind), usize::MAX));
        }
        self.atoms.push(convert(&atom_kind));
        self.stack.push(id);
    }

    fn join(&mut self, bond_kind: BondKind, rnum: Rnum) {
        let join = self.joins;
        self.joins += 1;
        let Some(&head) = self.stack.last() else {
            return;
        };
        let symbol = Symbol::of(&bond_kind);
        match self.opens.remove(&rnum) {
            None => {
                self.opens.insert(
                    rnum,
                    Open {
                        atom: head,
                        symbol,
                        join,
                    },
                );
            }
            Some(open) => {
                let merged = match (open.symbol, symbol) {
                    (Symbol::Elided, s) | (s, Symbol::Elided) => Some(s),
                    (a, b) if a == b => Some(a),
                    _ => None,
                };
                if self.error.is_none() {
                    if open.atom == head {
                        self.error = Some((JoinError::SelfLoop, join));
                    } else if merged.is_none() {
                        self.error = Some((JoinError::Conflict, join));
                    }
                }
                if let Some(s) = merged {
                    if open.atom != head {
                        self.bonds.push((open.atom, head, s, join));
                    }
                }
            }
        }
    }

    fn pop(&mut self, depth: usize) {
        let keep = self.stack.len().saturating_sub(depth);
        self.stack.truncate(keep);
    }
}

/// Byte offset of each character, plus the length at the end.
fn byte_offsets(smiles: &str) -> Vec<usize> {
    let mut v: Vec<usize> = smiles.char_indices().map(|(i, _)| i).collect();
    v.push(smiles.len());
    v
}

/// Reads SMILES text into atoms and bonds as written.
///
/// Valid text is read once without `purr`'s trace (its maps of every bond cost more than
/// the rest of the reading), the atoms' spans taken from the text itself; anything that
/// goes wrong is read again with the trace, which places the error.
pub(crate) fn read(smiles: &str) -> Result<Written, Error> {
    // The direct reader first; it declines everything it does not handle, and the
    // ring-number workaround below may have to refuse a text it would read.
    if smiles.len() <= MAX_LENGTH && !(smiles.contains("%73") && smiles.contains("%74")) {
        if let Some(written) = read_fast(smiles) {
            if cfg!(debug_assertions) {
                let full = read_with_purr(smiles);
                debug_assert!(
                    matches!(&full, Ok(t) if t.atoms == written.atoms && t.spans == written.spans && t.bonds == written.bonds),
                    "the direct reading differs from purr's for {smiles}"
                );
            }
            return Ok(written);
        }
    }
    read_with_purr(smiles)
}

/// [`read`] through `purr` only: untraced where that is safe, traced otherwise.
pub(crate) fn read_with_purr(smiles: &str) -> Result<Written, Error> {
    let info = scan(smiles)?;
    let text = ring_number_workaround(smiles)?;
    if info.chars <= MAX_INLINE_LENGTH {
        let (builder, _, result) = run_purr(&text, false);
        if let Some(written) = untraced(smiles, builder, result) {
            if cfg!(debug_assertions) {
                let traced = read_traced(smiles, &info, &text);
                debug_assert!(
                    matches!(&traced, Ok(t) if t.spans == written.spans && t.bonds == written.bonds),
                    "untraced reading differs from the traced one for {smiles}"
                );
            }
            return Ok(written);
        }
    }
    read_traced(smiles, &info, &text)
}

/// The result of an untraced reading when it is a valid molecule whose atom spans the
/// text gives unambiguously; `None` when the traced reading must decide (every error).
fn untraced(
    smiles: &str,
    builder: Builder,
    result: Result<(), purr::read::Error>,
) -> Option<Written> {
    if result.is_err() || builder.error.is_some() || !builder.opens.is_empty() {
        return None;
    }
    let spans = atom_spans(smiles, builder.atoms.len())?;
    let mut bonds: Vec<(usize, usize, Symbol)> = Vec::with_capacity(builder.bonds.len());
    for &(a, b, symbol, _) in &builder.bonds {
        if symbol == Symbol::Quadruple {
            return None;
        }
        bonds.push((a.min(b), a.max(b), symbol));
    }
    let mut pairs: Vec<(usize, usize)> = bonds.iter().map(|&(a, b, _)| (a, b)).collect();
    pairs.sort_unstable();
    if pairs.windows(2).any(|w| w[0] == w[1]) {
        return None;
    }
    Some(Written {
        atoms: builder.atoms,
        spans,
        bonds,
    })
}

/// Byte spans of the atoms of valid SMILES text, in the order written: a bracket atom from
/// `[` to `]`, `Cl` and `Br`, and every other letter or `*` outside brackets (the only
/// letters valid SMILES has there are atom symbols). `None` when the count does not match
/// the reader's (two-letter symbols such as `At`), so that the trace decides.
fn atom_spans(smiles: &str, count: usize) -> Option<Vec<Span>> {
    let b = smiles.as_bytes();
    let mut spans = Vec::with_capacity(count);
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        if c == b'[' {
            let close = i + 1 + b[i + 1..].iter().position(|&x| x == b']')?;
            spans.push(Span::new(i, close + 1));
            i = close + 1;
        } else if c.is_ascii_alphabetic() || c == b'*' {
            let two = matches!((c, b.get(i + 1)), (b'C', Some(b'l')) | (b'B', Some(b'r')));
            let len = if two { 2 } else { 1 };
            spans.push(Span::new(i, i + len));
            i += len;
        } else {
            i += 1;
        }
    }
    (spans.len() == count).then_some(spans)
}

fn read_traced(smiles: &str, info: &Scan, text: &str) -> Result<Written, Error> {
    let (builder, trace, result) = if info.chars <= MAX_INLINE_LENGTH {
        run_purr(text, true)
    } else {
        // Deep recursion: a helper thread with a stack sized for it. purr uses a few
        // hundred bytes per character in release builds and about 1 KiB in debug builds
        // (measured: a 2,000-atom chain fits 2 MiB in debug); twice that, plus 1 MiB.
        let stack = 2 * 1024 * info.chars + (1 << 20);
        let handle = std::thread::Builder::new()
            .name("mol-read".to_string())
            .stack_size(stack)
            .spawn({
                let text = text.to_string();
                move || run_purr(&text, true)
            });
        match handle.map(|h| h.join()) {
            Ok(Ok(r)) => r,
            _ => {
                return Err(Error::new(
                    ErrorKind::TooLarge(format!(
                        "could not start a reader for an input of {} characters",
                        info.chars
                    )),
                    smiles,
                    Span::new(0, smiles.len()),
                ))
            }
        }
    };
    let offsets = byte_offsets(smiles);
    let at = |c: usize| offsets.get(c).copied().unwrap_or(smiles.len());
    if let Err(e) = result {
        return Err(reader_error(smiles, info, e, &offsets));
    }
    let rnum_span = |join: usize| {
        trace
            .rnum(join)
            .map_or(Span::new(smiles.len(), smiles.len()), |r| {
                Span::new(at(r.start), at(r.end))
            })
    };
    if let Some((problem, join)) = builder.error {
        let span = rnum_span(join);
        let digit = smiles.get(span.start..span.end).unwrap_or("");
        let message = match problem {
            JoinError::SelfLoop => format!("ring bond '{digit}' joins an atom to itself"),
            JoinError::Conflict => {
                format!("ring bond '{digit}' is written with two different bond symbols")
            }
        };
        return Err(Error::new(ErrorKind::Other(message), smiles, span));
    }
    if let Some(open) = builder.opens.values().min_by_key(|o| o.join) {
        return Err(Error::new(
            ErrorKind::UnclosedRing,
            smiles,
            rnum_span(open.join),
        ));
    }
    let spans: Vec<Span> = (0..builder.atoms.len())
        .map(|i| {
            trace
                .atom(i)
                .map_or(Span::default(), |r| Span::new(at(r.start), at(r.end)))
        })
        .collect();
    let mut seen = std::collections::HashSet::new();
    let mut bonds = Vec::with_capacity(builder.bonds.len());
    for (a, b, symbol, join) in builder.bonds {
        let span = if join == usize::MAX {
            // A chain bond's symbol sits just before its second atom.
            match trace.bond(a, b) {
                Some(c) if symbol != Symbol::Elided => Span::new(at(c), at(c + 1)),
                _ => spans[b],
            }
        } else {
            rnum_span(join)
        };
        if !seen.insert((a.min(b), a.max(b))) {
            return Err(Error::new(
                ErrorKind::Other("two bonds between the same pair of atoms".to_string()),
                smiles,
                span,
            ));
        }
        if symbol == Symbol::Quadruple {
            return Err(Error::new(
                ErrorKind::Other("quadruple bonds are not supported".to_string()),
                smiles,
                span,
            ));
        }
        bonds.push((a.min(b), a.max(b), symbol));
    }
    Ok(Written {
        atoms: builder.atoms,
        spans,
        bonds,
    })
}

/// purr 0.9 reads the ring number `%73` as `%74` (its table maps 73 to R74), so a SMILES
/// using both would join the wrong atoms. When both occur, `%73` is rewritten to a
/// two-digit number the text does not use; the rewrite keeps every offset, so spans and
/// carets still point into the original text.
fn ring_number_workaround(smiles: &str) -> Result<std::borrow::Cow<'_, str>, Error> {
    if !(smiles.contains("%73") && smiles.contains("%74")) {
        return Ok(std::borrow::Cow::Borrowed(smiles));
    }
    let spare = (10..100)
        .filter(|&n| n != 73 && n != 74)
        .find(|n| !smiles.contains(&format!("%{n}")));
    match spare {
        Some(n) => Ok(std::borrow::Cow::Owned(
            smiles.replace("%73", &format!("%{n}")),
        )),
        None => {
            let at = smiles.find("%73").unwrap_or(0);
            Err(Error::new(
                ErrorKind::Other(
                    "ring bond '%73' cannot be read while every other number from %10 to %99 is also used"
                        .to_string(),
                ),
                smiles,
                Span::new(at, at + 3),
            ))
        }
    }
}

fn run_purr(smiles: &str, traced: bool) -> (Builder, Trace, Result<(), purr::read::Error>) {
    let mut builder = Builder::default();
    let mut trace = Trace::new();
    let result = purr::read::read(smiles, &mut builder, traced.then_some(&mut trace));
    (builder, trace, result)
}

/// purr reports a character index, or the end of the line; name the problem and its place.
fn reader_error(smiles: &str, info: &Scan, e: purr::read::Error, offsets: &[usize]) -> Error {
    let end = smiles.len();
    match e {
        purr::read::Error::EndOfLine => {
            if let Some(i) = info.unclosed_bracket {
                Error::new(
                    ErrorKind::Other("unclosed '[': bracket atom never closed".to_string()),
                    smiles,
                    Span::new(i, i + 1),
                )
            } else if let Some(i) = info.unclosed_branch {
                Error::new(ErrorKind::UnmatchedParenthesis, smiles, Span::new(i, i + 1))
            } else {
                Error::new(ErrorKind::UnexpectedEnd, smiles, Span::new(end, end))
            }
        }
        purr::read::Error::Character(c) => {
            let start = offsets.get(c).copied().unwrap_or(end);
            let rest = &smiles[start..];
            let mut chars = rest.chars();
            let Some(first) = chars.next() else {
                return Error::new(ErrorKind::UnexpectedEnd, smiles, Span::new(end, end));
            };
            let one = Span::new(start, start + first.len_utf8());
            if first == ')' && info.unmatched_close == Some(start) {
                return Error::new(ErrorKind::UnmatchedParenthesis, smiles, one);
            }
            let open = smiles[..start].rfind('[');
            let in_bracket = open.is_some() && open > smiles[..start].rfind(']');
            if let (true, Some(open)) = (in_bracket, open) {
                // The symbol follows the bracket and its isotope digits; name all of it.
                let body = &smiles[open + 1..];
                let digits = body.chars().take_while(|c| c.is_ascii_digit()).count();
                let sym_start = open + 1 + digits;
                let letters = smiles[sym_start..]
                    .chars()
                    .take_while(|c| c.is_ascii_alphabetic())
                    .count()
                    .min(3);
                // Upper case, then lower case letters only, make one symbol.
                let len = if letters > 0 {
                    1 + smiles[sym_start + 1..sym_start + letters]
                        .chars()
                        .take_while(|c| c.is_ascii_lowercase())
                        .count()
                } else {
                    0
                };
                let sym = &smiles[sym_start..sym_start + len];
                let known = crate::elements::atomic_number(&title_case(sym)).is_some();
                if len > 0 && !known && start >= sym_start && start <= sym_start + len {
                    return Error::new(
                        ErrorKind::UnknownElement,
                        smiles,
                        Span::new(sym_start, sym_start + len),
                    );
                }
            }
            if first.is_ascii_alphabetic() && !in_bracket {
                // An element outside the organic subset, written bare: `Na`, `Si`, `Zn`.
                let before = smiles[..start]
                    .chars()
                    .last()
                    .filter(|c| c.is_ascii_uppercase());
                let candidates = [
                    before.map(|b| (start - 1, format!("{b}{first}"))),
                    rest[1..]
                        .chars()
                        .next()
                        .filter(|c| first.is_ascii_uppercase() && c.is_ascii_lowercase())
                        .map(|c| (start, format!("{first}{c}"))),
                ];
                for (at, sym) in candidates.into_iter().flatten() {
                    if crate::elements::atomic_number(&sym).is_some() {
                        return Error::new(
                            ErrorKind::Other(format!(
                                "element '{sym}' is outside the organic subset: write it in brackets, as [{sym}]"
                            )),
                            smiles,
                            Span::new(at, at + 2),
                        );
                    }
                }
            }
            if first.is_ascii_alphabetic() {
                let mut len = 1;
                if first.is_ascii_uppercase() || in_bracket {
                    len += rest[1..]
                        .chars()
                        .take_while(|c| c.is_ascii_lowercase())
                        .count()
                        .min(2);
                }
                return Error::new(
                    ErrorKind::UnknownElement,
                    smiles,
                    Span::new(start, start + len),
                );
            }
            Error::new(ErrorKind::UnexpectedCharacter, smiles, one)
        }
    }
}

/// `se` -> `Se`: aromatic bracket symbols are written lower case.
fn title_case(symbol: &str) -> String {
    let mut chars = symbol.chars();
    match chars.next() {
        Some(c) => c.to_ascii_uppercase().to_string() + chars.as_str(),
        None => String::new(),
    }
}
