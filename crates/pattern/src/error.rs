//! The error for bad pattern text.

/// An error in pattern text: the text, the byte span at fault, and what is wrong.
///
/// `Display` renders the message, the text and a caret line under the bad part:
///
/// ```text
/// unknown atom primitive 'Q' at byte 2
///   [CQ]
///     ^
/// ```
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub struct PatternError {
    /// What is wrong, in words.
    pub message: String,
    /// The pattern text.
    pub text: String,
    /// Byte offsets of the bad part.
    pub start: usize,
    /// One past the last bad byte.
    pub end: usize,
}

impl PatternError {
    pub(crate) fn new(message: impl Into<String>, text: &str, start: usize, end: usize) -> Self {
        PatternError {
            message: message.into(),
            text: text.to_string(),
            start,
            end,
        }
    }
}

impl std::fmt::Display for PatternError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        // Columns count characters, not bytes, so the carets sit under the right glyph even
        // when the text holds non-ASCII bytes; control characters would break the line up,
        // so they are shown as '?'.
        let shown: String = self
            .text
            .chars()
            .map(|c| if c.is_control() { '?' } else { c })
            .collect();
        let column = self
            .text
            .get(..self.start)
            .map_or(self.start, |s| s.chars().count());
        let width = self
            .text
            .get(self.start..self.end.max(self.start))
            .map_or(1, |s| s.chars().count())
            .max(1);
        write!(
            f,
            "{} at byte {}\n  {}\n  {}{}",
            self.message,
            self.start,
            shown,
            " ".repeat(column),
            "^".repeat(width)
        )
    }
}

impl std::error::Error for PatternError {}
