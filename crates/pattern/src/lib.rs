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
//! ```
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
//! pre-filter (a bit set of element/aromatic pairs and one of charges, per pattern atom; an
//! atom like `C` or `[c,n]` is decided by it alone). A search allocates nothing for patterns
//! up to 32 atoms besides the matches it returns; `$()` environments are memoized per
//! (environment, atom) within one call, the first 16 answers without allocating.
//! `benches/match.rs` measures anchored site matching over a drug-like sample.
//!
//! # Checked against
//!
//! `tests/rdkit_counts.rs` and `tests/rdkit_sample.rs` compare match counts and anchor atoms
//! with RDKit's (expected values produced by the scripts beside them). Where RDKit departs
//! from Daylight this crate follows Daylight: `h` counts bracket hydrogens too. `R<n>` in a
//! bridged system (adamantane) depends on which rings the molecule's SSSR holds, a choice
//! made in `mol`; RDKit keeps a symmetrized set there, so counts can differ.
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
    /// The anchored atom's filter, kept inline: `could_anchor` runs for every
    /// (pattern, atom) pair, so one pointer less matters.
    anchor_filter: filter::AtomFilter,
}

impl std::str::FromStr for Pattern {
    type Err = PatternError;
    fn from_str(text: &str) -> Result<Pattern, PatternError> {
        Pattern::parse(text)
    }
}

impl std::fmt::Display for Pattern {
    /// The text the pattern was compiled from.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.text)
    }
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
        let anchor_filter = main.filters[main.root];
        Ok(Pattern {
            text: text.to_string(),
            main,
            subs,
            anchor_filter,
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
    /// The pattern's bonds, as pairs of pattern atoms (ring closures included).
    pub fn bonds(&self) -> Vec<(usize, usize)> {
        self.main.bonds.iter().map(|b| (b.a, b.b)).collect()
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
        atom < molecule.atoms().len() && self.anchor_filter.admits(molecule, atom)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn molecule(smiles: &str) -> Molecule {
        mol::parse(smiles).unwrap_or_else(|e| panic!("{smiles}: {e}"))
    }
    fn pattern(text: &str) -> Pattern {
        Pattern::parse(text).unwrap_or_else(|e| panic!("{e}"))
    }

    #[test]
    fn match_atoms_are_in_pattern_order() {
        let m = molecule("CC(=O)O");
        let p = pattern("[CX3](=O)[OX2H1:1]");
        assert_eq!(p.anchor(), 2);
        assert_eq!(
            p.matches_at(&m, 3, &[]),
            vec![Match {
                atoms: vec![1, 2, 3]
            }]
        );
        assert!(p.matches_at(&m, 2, &[]).is_empty());
    }

    #[test]
    fn avoided_atoms_are_never_matched() {
        let m = molecule("CC(=O)O");
        let p = pattern("[CX3](=O)[OX2H1:1]");
        assert!(p.matches_at(&m, 3, &[2]).is_empty());
        assert!(!p.is_match_at(&m, 3, &[1]));
        assert!(!p.is_match_at(&m, 3, &[3]));
        assert!(p.is_match_at(&m, 3, &[0]));
    }

    #[test]
    fn avoid_does_not_reach_into_environments() {
        // The environment describes the oxygen's surroundings in the whole molecule.
        let m = molecule("CC(=O)O");
        let p = pattern("[OH;$(OC=O)]");
        assert!(p.is_match_at(&m, 3, &[1, 2]));
    }

    #[test]
    fn avoid_picks_the_other_branch() {
        // From the amine N of ethylenediamine-like chain, avoiding one side leaves the other.
        let m = molecule("NCC(N)CO");
        let p = pattern("[NH2:1]CC");
        assert_eq!(p.matches_at(&m, 0, &[]).len(), 1);
        let p = pattern("[NH2:1]C*");
        // N3 sits on C2, whose other neighbours are C1 and C4.
        assert_eq!(p.matches_at(&m, 3, &[]).len(), 2);
        assert_eq!(
            p.matches_at(&m, 3, &[1]),
            vec![Match {
                atoms: vec![3, 2, 4]
            }]
        );
    }

    #[test]
    fn automorphic_matches_collapse_to_one() {
        let m = molecule("CC(C)(C)C");
        let p = pattern("C(C)(C)(C)C");
        assert_eq!(p.matches_at(&m, 1, &[]).len(), 1);
        assert_eq!(pattern("C~C").matches_at(&m, 1, &[]).len(), 4);
    }

    #[test]
    fn ring_closures_must_close_in_the_molecule() {
        let m = molecule("CCCCCC");
        assert!(!pattern("C1CCCCC1").is_match_at(&m, 0, &[]));
        let m = molecule("C1CCCCC1");
        assert!(pattern("C1CCCCC1").is_match_at(&m, 0, &[]));
        assert!(!pattern("C1CCCC1").is_match_at(&m, 0, &[]));
    }

    #[test]
    fn out_of_range_atoms_match_nothing() {
        let m = molecule("CO");
        let p = pattern("[OH]");
        assert!(!p.could_anchor(&m, 2));
        assert!(p.matches_at(&m, 2, &[]).is_empty());
        assert!(!p.is_match_at(&m, usize::MAX, &[]));
    }

    #[test]
    fn could_anchor_rules_out_by_element_aromaticity_charge() {
        let m = molecule("CC(=O)[O-].c1ccncc1");
        let acid_anion = pattern("[O-:1]C=O");
        assert!(acid_anion.could_anchor(&m, 3));
        assert!(!acid_anion.could_anchor(&m, 2)); // neutral O
        assert!(!acid_anion.could_anchor(&m, 1)); // carbon
        let pyridine = pattern("[nX2:1]");
        assert!(pyridine.could_anchor(&m, 7));
        assert!(!pyridine.could_anchor(&m, 5)); // aromatic carbon
                                                // A filter pass is only a maybe: H count is not part of it.
        let hydroxyl = pattern("[OH1]");
        assert!(hydroxyl.could_anchor(&m, 2));
        assert!(!hydroxyl.is_match_at(&m, 2, &[]));
    }

    #[test]
    fn explicit_hydrogen_atoms_count_in_h_and_d() {
        let m = molecule("[H]OC");
        assert!(pattern("[OH1]").is_match_at(&m, 1, &[]));
        assert!(pattern("[OD2]").is_match_at(&m, 1, &[]));
        assert!(pattern("[#1]O").is_match_at(&m, 0, &[]));
        assert!(pattern("[H]O").is_match_at(&m, 0, &[]));
    }

    #[test]
    fn maps_are_listed() {
        let p = pattern("[O:2]C[N:1]");
        assert_eq!(p.mapped(1), Some(2));
        assert_eq!(p.mapped(2), Some(0));
        assert_eq!(p.mapped(3), None);
        assert_eq!(p.maps(), vec![(2, 0), (1, 2)]);
        assert_eq!(p.anchor(), 2);
        assert_eq!(p.len(), 3);
        assert!(!p.is_empty());
        assert_eq!(p.text(), "[O:2]C[N:1]");
        assert_eq!(p.to_string(), "[O:2]C[N:1]");
        assert_eq!("[O:2]C[N:1]".parse::<Pattern>().map(|p| p.len()), Ok(3));
    }

    #[test]
    fn matches_over_the_molecule_are_distinct_sets() {
        let m = molecule("OC(=O)CC(=O)O");
        let found = pattern("[CX3](=O)[OX2H1:1]").matches(&m);
        assert_eq!(found.len(), 2);
        let m = molecule("CCC");
        assert_eq!(pattern("CC").matches(&m).len(), 2);
    }
}
