use std::fmt;

/// A byte range in the input text.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default, serde::Serialize)]
pub struct Span {
    /// First byte.
    pub start: usize,
    /// One past the last byte.
    pub end: usize,
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
}

/// An error about input: the input, the span at fault, and what is wrong.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Error {
    /// What is wrong.
    pub kind: ErrorKind,
    /// The input text.
    pub input: String,
    /// Where in the input (byte offsets).
    pub span: Span,
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        // mol helper: message, then the input, then a caret line under the span.
        write!(f, "{:?} at byte {}", self.kind, self.span.start)
    }
}

impl std::error::Error for Error {}
