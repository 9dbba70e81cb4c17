//! A linear pre-scan of the text before `purr` reads it.
//!
//! `purr` reads by recursive descent: every atom along a chain and every open branch adds
//! stack frames. The pre-scan bounds the work and decides where the recursion may run, so
//! that no input can overflow the stack. It also finds unbalanced parentheses and brackets,
//! which it can name more clearly than the reader's "unexpected character".

use crate::{Error, ErrorKind, Span};

/// Longest input read (bytes). Longer text is refused with [`ErrorKind::TooLarge`]: no
/// single molecule for pKa work comes near it, and it bounds time and memory per record.
pub const MAX_LENGTH: usize = 100_000;

/// Inputs up to this many characters are read on the calling thread; longer ones on a
/// helper thread whose stack is sized for the reader's recursion depth. Chosen so the
/// recursion fits a 2 MiB stack with room to spare in a debug build.
pub const MAX_INLINE_LENGTH: usize = 500;

/// What the pre-scan learnt about the text.
pub(crate) struct Scan {
    /// Number of characters.
    pub chars: usize,
    /// Byte offset of a `(` that is never closed.
    pub unclosed_branch: Option<usize>,
    /// Byte offset of a `[` that is never closed.
    pub unclosed_bracket: Option<usize>,
    /// Byte offsets of `)` that close no branch.
    pub unmatched_close: Option<usize>,
}

/// Checks sizes and notes unbalanced parentheses and brackets.
pub(crate) fn scan(smiles: &str) -> Result<Scan, Error> {
    if smiles.trim().is_empty() {
        return Err(Error::new(
            ErrorKind::Empty,
            smiles,
            Span::new(0, smiles.len()),
        ));
    }
    if smiles.len() > MAX_LENGTH {
        return Err(Error::new(
            ErrorKind::TooLarge(format!(
                "input of {} bytes exceeds the limit of {} bytes",
                smiles.len(),
                MAX_LENGTH
            )),
            smiles,
            Span::new(MAX_LENGTH, MAX_LENGTH),
        ));
    }
    let mut open_branches: Vec<usize> = Vec::new();
    let mut open_bracket: Option<usize> = None;
    let mut unmatched_close = None;
    let mut chars = 0;
    for (i, c) in smiles.char_indices() {
        chars += 1;
        match (c, open_bracket) {
            ('[', None) => open_bracket = Some(i),
            (']', Some(_)) => open_bracket = None,
            (_, Some(_)) => {}
            ('(', None) => open_branches.push(i),
            (')', None) => {
                if open_branches.pop().is_none() && unmatched_close.is_none() {
                    unmatched_close = Some(i);
                }
            }
            _ => {}
        }
    }
    Ok(Scan {
        chars,
        unclosed_branch: open_branches.first().copied(),
        unclosed_bracket: open_bracket,
        unmatched_close,
    })
}
