use std::fmt;

/// A byte range in the input text.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize)]
pub struct Span {
    /// First byte.
    pub start: usize,
    /// One past the last byte.
    pub end: usize,
}

impl Span {
    /// A span from `start` to `end` (byte offsets).
    pub fn new(start: usize, end: usize) -> Span {
        Span { start, end }
    }
}

/// What went wrong reading or perceiving a molecule.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum ErrorKind {
    /// The input was empty.
    Empty,
    /// A character that cannot start or continue SMILES here.
    UnexpectedCharacter,
    /// The input ended in the middle of an atom, bond or branch.
    UnexpectedEnd,
    /// A ring bond was opened and never closed.
    UnclosedRing,
    /// A valence no element allows (e.g. a five-bonded neutral carbon).
    Valence(String),
    /// Atoms written aromatic for which no Kekulé form exists.
    Kekulize,
    /// The input exceeds a size limit.
    TooLarge(String),
    /// Any other problem, in words.
    Other(String),
    /// A `(` never closed, or a `)` that closes no branch.
    UnmatchedParenthesis,
    /// An element symbol that does not exist, or one outside the organic subset written
    /// without brackets.
    UnknownElement,
}

/// An error about input: the input, the span at fault, and what is wrong.
///
/// Displayed as the message, the input on the next line and carets under the span:
///
/// ```text
/// unclosed ring bond '1'
/// C1CC
///  ^
/// ```
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Error {
    /// What is wrong.
    pub kind: ErrorKind,
    /// The input text.
    pub input: String,
    /// Where in the input (byte offsets).
    pub span: Span,
}

impl Error {
    /// An error of `kind` at `span` of `input`.
    pub fn new(kind: ErrorKind, input: &str, span: Span) -> Error {
        Error {
            kind,
            input: input.to_string(),
            span,
        }
    }

    /// The text under the span, or "" when the span is empty or not on char boundaries.
    pub fn spanned(&self) -> &str {
        self.input.get(self.span.start..self.span.end).unwrap_or("")
    }

    /// The message alone, without the input and carets.
    pub fn message(&self) -> String {
        let text = self.spanned();
        match &self.kind {
            ErrorKind::Empty => "empty input: no SMILES to read".to_string(),
            ErrorKind::UnexpectedCharacter => match text.chars().next() {
                Some(c) if c.is_control() || c.is_whitespace() => {
                    format!("unexpected character {:?} (U+{:04X})", c, c as u32)
                }
                Some(c) => format!("unexpected character '{c}'"),
                None => "unexpected character".to_string(),
            },
            ErrorKind::UnexpectedEnd => "unexpected end of input".to_string(),
            ErrorKind::UnclosedRing => format!("unclosed ring bond '{text}'"),
            ErrorKind::Valence(m) | ErrorKind::TooLarge(m) | ErrorKind::Other(m) => m.clone(),
            ErrorKind::Kekulize => {
                "no Kekulé form: the aromatic atoms cannot all take one double bond".to_string()
            }
            ErrorKind::UnmatchedParenthesis => {
                if text == ")" {
                    "unmatched ')': it closes no branch".to_string()
                } else {
                    "unmatched '(': branch never closed".to_string()
                }
            }
            ErrorKind::UnknownElement => {
                format!("unknown element '{text}' (symbols outside B C N O P S F Cl Br I go in brackets)")
            }
        }
    }
}

/// Inputs longer than this many characters are shown as a window around the span.
const SHOWN_WHOLE: usize = 120;
/// Characters shown on each side of the span in a window.
const CONTEXT: usize = 50;
/// Carets drawn at most; a longer span is marked by its first carets.
const MAX_CARETS: usize = 100;

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        // Offsets are bytes; the caret column counts characters so it lines up under
        // multi-byte text.
        let start = floor_boundary(&self.input, self.span.start);
        let end = floor_boundary(&self.input, self.span.end.max(start));
        let column = self.input[..start].chars().count();
        let width = self.input[start..end].chars().count().max(1);
        let total = self.input.chars().count();
        if total <= SHOWN_WHOLE {
            return write!(
                f,
                "{}\n{}\n{}{}",
                self.message(),
                self.input,
                " ".repeat(column),
                "^".repeat(width)
            );
        }
        // A long input (a polymer, a whole file pasted on one line) is cut to a window so
        // the message stays readable; "..." marks the cuts.
        let from = column.saturating_sub(CONTEXT);
        let to = (column + width.min(MAX_CARETS) + CONTEXT).min(total);
        let shown: String = self.input.chars().skip(from).take(to - from).collect();
        let (lead, offset) = if from > 0 { ("...", 3) } else { ("", 0) };
        let tail = if to < total { "..." } else { "" };
        write!(
            f,
            "{}\n{lead}{shown}{tail}\n{}{}",
            self.message(),
            " ".repeat(column - from + offset),
            "^".repeat(width.min(MAX_CARETS))
        )
    }
}

fn floor_boundary(s: &str, mut i: usize) -> usize {
    i = i.min(s.len());
    while !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

impl std::error::Error for Error {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn caret_counts_characters_before_the_span() {
        let input = "é)";
        let e = Error::new(ErrorKind::UnmatchedParenthesis, input, Span::new(2, 3));
        assert_eq!(e.to_string(), "unmatched ')': it closes no branch\né)\n ^");
    }

    #[test]
    fn long_input_is_shown_as_a_window_around_the_span() {
        let input = format!("{}X{}", "C".repeat(200), "C".repeat(200));
        let e = Error::new(ErrorKind::UnexpectedCharacter, &input, Span::new(200, 201));
        let want = format!(
            "unexpected character 'X'\n...{}X{}...\n{}^",
            "C".repeat(50),
            "C".repeat(50),
            " ".repeat(53)
        );
        assert_eq!(e.to_string(), want);
    }

    #[test]
    fn caret_at_end_of_input() {
        let e = Error::new(ErrorKind::UnexpectedEnd, "CC(", Span::new(3, 3));
        assert_eq!(e.to_string(), "unexpected end of input\nCC(\n   ^");
    }
}
