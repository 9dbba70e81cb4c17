//! A SMARTS subset (the trade's substructure language) and an anchored matcher.
//!
//! # Overview
//!
//! [`Pattern::parse`] compiles pattern text once; [`Pattern::matches_at`] then finds the
//! matches whose anchored atom (the one mapped `:1`, else the first) sits on a given
//! molecule atom, and [`Pattern::could_anchor`] rules most atoms out before any search.
//!
//! The language, with Daylight SMARTS meanings:
//!
//! - atoms: organic-subset shorthand (`C`, `c`, `Cl`, `Br`, `*`, `a`, `A`) or brackets
//!   holding primitives: element symbols (upper case aliphatic, lower case aromatic),
//!   `#n`, mass number, `H<n>` total hydrogens, `h<n>` hydrogens not written as atoms,
//!   `D<n>` explicit connections, `X<n>` total connections, `R`/`R<n>` SSSR ring count,
//!   `r`/`r<n>` smallest ring size, charges `+ - +2 --`, environments `$(...)`, and an
//!   atom map `:n` at the end;
//! - operators `!`, `&` (or nothing), `,`, `;`, binding in that order;
//! - bonds `-` `=` `#` (never aromatic), `:` aromatic, `~` any, `@` ring bond, combined with
//!   the same operators; no bond written means single or aromatic;
//! - branches and ring-closure digits (`1`, `%12`).
//!
//! Not supported (refused with an error): `.`, chirality, directional bonds, `v`, `x`.
//!
//! # Example
//!
//! ```no_run
//! let acid = pattern::Pattern::parse("[CX3](=O)[OX2H1:1]")?;
//! let molecule = mol::parse("CC(=O)O")?;
//! let sites: Vec<usize> = (0..molecule.atoms().len())
//!     .filter(|&a| acid.could_anchor(&molecule, a) && acid.is_match_at(&molecule, a, &[]))
//!     .collect();
//! assert_eq!(sites, vec![3]);
//! Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Performance
//!
//! Everything that depends only on the pattern is worked out at parse time: expression
//! trees with precedence applied, the placement order from the anchor, and the anchor
//! pre-filter (a bit set of element/aromatic pairs and one of charges). A search allocates
//! nothing for patterns up to 32 atoms besides the returned matches; `$()` environments are
//! memoized per (environment, atom) within one call. `benches/match.rs` measures it.
//!
//! # Untrusted input
//!
//! Bad pattern text gives a [`PatternError`] with a byte span, never a panic. Nesting is
//! limited to 64 levels and patterns to 512 atoms. Matching is subgraph isomorphism, which
//! can take exponential time on pathological patterns (long chains of `*~*`) against large
//! molecules; site patterns are small and anchored, so it stays fast in practice.
#![deny(missing_docs)]

mod error;
mod expr;
mod filter;
mod graph;
mod matcher;
mod parse;
mod primitive;

pub use error::PatternError;

use mol::Molecule;

use graph::Graph;
use matcher::{Distinct, Search};

/// A compiled pattern.
#[derive(Clone, Debug)]
pub struct Pattern {
    text: String,
    main: Graph,
    /// Recursive environments, referred to by index from `$()` primitives.
    subs: Vec<Graph>,
}

/// One match: for each pattern atom (in pattern order), the molecule atom it matched.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Match {
    /// Molecule atom per pattern atom.
    pub atoms: Vec<usize>,
}

impl Pattern {
    /// Compiles pattern text.
    pub fn parse(text: &str) -> Result<Pattern, PatternError> {
        let (main, subs) = parse::parse(text)?;
        Ok(Pattern {
            text: text.to_string(),
            main,
            subs,
        })
    }
    /// The text it was compiled from.
    pub fn text(&self) -> &str {
        &self.text
    }
    /// The pattern atom that carries atom-map number `map` (`[OH:1]`), if any.
    pub fn mapped(&self, map: u16) -> Option<usize> {
        self.main.atoms.iter().position(|a| a.map == Some(map))
    }
    /// Every atom-map number written, with its pattern atom, in pattern order.
    pub fn maps(&self) -> Vec<(u16, usize)> {
        self.main
            .atoms
            .iter()
            .enumerate()
            .filter_map(|(i, a)| a.map.map(|m| (m, i)))
            .collect()
    }
    /// The anchored pattern atom: the one mapped `:1`, else atom 0.
    pub fn anchor(&self) -> usize {
        self.main.root
    }
    /// Number of pattern atoms.
    pub fn len(&self) -> usize {
        self.main.atoms.len()
    }
    /// Whether the pattern has no atoms.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }
    /// All matches in which the pattern atom mapped `:1` (or, without a map, pattern atom 0)
    /// sits on `atom`. Atoms listed in `avoid` are never matched. Distinct atom sets only
    /// (automorphic duplicates of the same set dropped).
    ///
    /// `avoid` applies to the pattern's own atoms; `$()` environments look at the whole
    /// molecule, since they describe an atom's surroundings. An `atom` out of range has
    /// no matches.
    pub fn matches_at(&self, molecule: &Molecule, atom: usize, avoid: &[usize]) -> Vec<Match> {
        let mut search = Search::new(molecule, &self.subs);
        let mut distinct = Distinct::default();
        search.search(&self.main, atom, avoid, &mut |a| {
            distinct.add(a);
            false
        });
        distinct
            .matches
            .into_iter()
            .map(|atoms| Match { atoms })
            .collect()
    }
    /// Whether any match sits on `atom` (cheaper than [`Pattern::matches_at`]).
    pub fn is_match_at(&self, molecule: &Molecule, atom: usize, avoid: &[usize]) -> bool {
        let mut search = Search::new(molecule, &self.subs);
        search.search(&self.main, atom, avoid, &mut |_| true)
    }
    /// All matches anywhere in the molecule, distinct atom sets only, ordered by anchor atom.
    pub fn matches(&self, molecule: &Molecule) -> Vec<Match> {
        let mut search = Search::new(molecule, &self.subs);
        let mut distinct = Distinct::default();
        for atom in 0..molecule.atoms().len() {
            search.search(&self.main, atom, &[], &mut |a| {
                distinct.add(a);
                false
            });
        }
        distinct
            .matches
            .into_iter()
            .map(|atoms| Match { atoms })
            .collect()
    }
    /// A quick pre-filter: whether the anchored pattern atom could match `atom` at all
    /// (element, aromaticity, charge). Lets callers skip most atoms without a search.
    /// `false` is certain; `true` means a search is needed.
    pub fn could_anchor(&self, molecule: &Molecule, atom: usize) -> bool {
        atom < molecule.atoms().len() && self.main.filter.admits(molecule, atom)
    }
}
