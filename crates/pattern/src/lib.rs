//! A SMARTS subset (the trade's substructure language) and an anchored matcher.
//!
//! INTERFACE NOTE (remove when implemented): the public items below are the contract the
//! model crate codes against; the pattern helper writes the bodies and may add items.
#![deny(missing_docs)]

use mol::Molecule;

/// A compiled pattern.
#[derive(Clone, Debug)]
pub struct Pattern {
    text: String,
}

/// An error in pattern text: the text, the byte span at fault, and what is wrong.
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

impl std::fmt::Display for PatternError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} at byte {}", self.message, self.start)
    }
}
impl std::error::Error for PatternError {}

/// One match: for each pattern atom (in pattern order), the molecule atom it matched.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Match {
    /// Molecule atom per pattern atom.
    pub atoms: Vec<usize>,
}

impl Pattern {
    /// Compiles pattern text.
    pub fn parse(text: &str) -> Result<Pattern, PatternError> {
        Ok(Pattern { text: text.to_string() })
    }
    /// The text it was compiled from.
    pub fn text(&self) -> &str {
        &self.text
    }
    /// The pattern atom that carries atom-map number `map` (`[OH:1]`), if any.
    pub fn mapped(&self, map: u16) -> Option<usize> {
        let _ = map;
        todo!("pattern helper")
    }
    /// Number of pattern atoms.
    pub fn len(&self) -> usize {
        todo!("pattern helper")
    }
    /// Whether the pattern has no atoms.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
    /// All matches in which the pattern atom mapped `:1` (or, without a map, pattern atom 0)
    /// sits on `atom`. Atoms listed in `avoid` are never matched. Distinct atom sets only
    /// (automorphic duplicates of the same set dropped).
    pub fn matches_at(&self, molecule: &Molecule, atom: usize, avoid: &[usize]) -> Vec<Match> {
        let _ = (molecule, atom, avoid);
        todo!("pattern helper")
    }
    /// Whether any match sits on `atom` (cheaper than [`Pattern::matches_at`]).
    pub fn is_match_at(&self, molecule: &Molecule, atom: usize, avoid: &[usize]) -> bool {
        let _ = (molecule, atom, avoid);
        todo!("pattern helper")
    }
    /// All matches anywhere in the molecule.
    pub fn matches(&self, molecule: &Molecule) -> Vec<Match> {
        let _ = molecule;
        todo!("pattern helper")
    }
    /// A quick pre-filter: whether the anchored pattern atom could match `atom` at all
    /// (element, aromaticity, charge). Lets callers skip most atoms without a search.
    pub fn could_anchor(&self, molecule: &Molecule, atom: usize) -> bool {
        let _ = (molecule, atom);
        todo!("pattern helper")
    }
}
