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
//! trees with precedence applied, the placement order from the anchor, bond expressions as
//! masks over sixteen bond kinds, and a pre-filter per pattern atom. The pre-filter is one
//! bit set per projection (element/aromatic pair, charge, `H`, `h`, `D`, `X`, `R`, `r`),
//! which decides an atom like `[CX4;H1,H2;+0]` alone, plus what the atom's pattern
//! neighbours and their neighbours need of the molecule (element class and bond kind, held
//! against a per-atom signature of its neighbours), the pattern bonds at it, and the first
//! atom of each `$()` environment it names. A molecule atom's values are read once into a
//! table, so a filter test is a handful of bit tests. The search looks one step ahead
//! (every pattern neighbour still to place needs a free molecule neighbour of its own
//! passing its filter) and first checks that the molecule holds as many atoms of each
//! element as the pattern names. All of these only rule out what cannot match: matches and
//! their order are those of a plain search (`reference.rs` checks it).
//!
//! A search allocates nothing for patterns up to 32 atoms besides the matches it returns;
//! `$()` environments are memoized per (environment, atom) within one call, the first 16
//! answers without allocating. [`Matcher`] runs many patterns on one molecule: every
//! environment and every atom expression gets a process-wide id from its text at parse
//! time, so answers are kept per molecule and shared between patterns (`!$(NC=O)` written
//! in ten site classes is searched once per atom), in buffers reused from one matcher to
//! the next on a thread. [`AtomKey`] lets a caller keep, per kind of atom, which patterns
//! can anchor there. [`Pattern::first_match_at`] stops at the first match and
//! [`Matcher::least_match_at`] keeps only the least. `benches/match.rs` measures anchored
//! site matching over a drug-like sample.
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
mod features;
mod filter;
mod graph;
mod matcher;
mod parse;
mod primitive;
#[cfg(test)]
mod reference;

pub use error::PatternError;

use mol::Molecule;

use std::collections::HashMap;
use std::sync::{Mutex, OnceLock};

use graph::Graph;
use matcher::{Distinct, EnvMemo, Least, Search};

/// A compiled pattern.
#[derive(Clone, Debug)]
pub struct Pattern {
    text: String,
    main: Graph,
    /// Recursive environments, referred to by index from `$()` primitives.
    subs: Vec<Graph>,
    /// Process-wide id per environment, the same for the same `$()` text in any pattern, so
    /// a [`Matcher`] shares answers about an environment between patterns.
    env_ids: Vec<u32>,
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

/// What the anchor pre-filter of every pattern sees of one molecule atom (element,
/// aromaticity, charge, hydrogens, connections, rings, neighbours): atoms with equal keys,
/// in any molecules, get the same answer from [`Matcher::could_anchor`] for any pattern,
/// so a caller may keep that answer by key.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct AtomKey(features::AtomFeatures);

/// One match: for each pattern atom (in pattern order), the molecule atom it matched.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Match {
    /// Molecule atom per pattern atom.
    pub atoms: Vec<usize>,
}

impl Pattern {
    /// Compiles pattern text.
    pub fn parse(text: &str) -> Result<Pattern, PatternError> {
        let (main, subs) = parse::parse_unfiltered(text)?;
        let (mut main, mut subs) = (main, subs);
        // An environment's own environments are numbered after it, so working from the last
        // one back, each graph's environments have their filters when it is refiltered.
        let mut env_filters =
            vec![filter::AtomFilter::new(&expr::Expr::Prim(primitive::AtomPrim::Any)); subs.len()];
        for id in (0..subs.len()).rev() {
            subs[id].refilter(&env_filters);
            env_filters[id] = subs[id].filters[subs[id].root];
        }
        main.refilter(&env_filters);
        let anchor_filter = main.filters[main.root];
        let env_ids = environment_ids(text, subs.len());
        for graph in std::iter::once(&mut main).chain(subs.iter_mut()) {
            graph.expr_ids = graph
                .atoms
                .iter()
                .map(|a| expression_id(&a.expr, &env_ids))
                .collect();
        }
        Ok(Pattern {
            text: text.to_string(),
            main,
            subs,
            env_ids,
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
        let mut memo = EnvMemo::new(molecule.atoms().len());
        Search::new(molecule, &self.subs, &self.env_ids, &mut memo)
            .distinct_matches(&self.main, atom, avoid)
    }
    /// Whether any match sits on `atom` (cheaper than [`Pattern::matches_at`]).
    pub fn is_match_at(&self, molecule: &Molecule, atom: usize, avoid: &[usize]) -> bool {
        let mut memo = EnvMemo::new(molecule.atoms().len());
        let mut search = Search::new(molecule, &self.subs, &self.env_ids, &mut memo);
        search.search(&self.main, atom, avoid, &mut |_| true)
    }
    /// The first match [`Pattern::matches_at`] would list, found without searching further
    /// (cheaper when only one is wanted).
    pub fn first_match_at(
        &self,
        molecule: &Molecule,
        atom: usize,
        avoid: &[usize],
    ) -> Option<Match> {
        let mut memo = EnvMemo::new(molecule.atoms().len());
        let mut search = Search::new(molecule, &self.subs, &self.env_ids, &mut memo);
        let mut first = None;
        search.search(&self.main, atom, avoid, &mut |a| {
            first = Some(a.to_vec());
            true
        });
        first.map(|atoms| Match { atoms })
    }
    /// All matches anywhere in the molecule, distinct atom sets only, ordered by anchor atom.
    pub fn matches(&self, molecule: &Molecule) -> Vec<Match> {
        let mut memo = EnvMemo::new(molecule.atoms().len());
        let mut search = Search::new(molecule, &self.subs, &self.env_ids, &mut memo);
        let mut distinct = Distinct::default();
        for atom in 0..molecule.atoms().len() {
            search.search(&self.main, atom, &[], &mut |a| {
                distinct.add(a);
                false
            });
        }
        distinct.into_matches()
    }
    /// A quick pre-filter: whether the anchored pattern atom could match `atom` at all
    /// (element, aromaticity, charge, hydrogens, connections, rings, and what the pattern
    /// needs of its neighbours). Lets callers skip most atoms without a search. `false` is
    /// certain; `true` means a search is needed.
    pub fn could_anchor(&self, molecule: &Molecule, atom: usize) -> bool {
        atom < molecule.atoms().len() && self.anchor_filter.admits(molecule, atom)
    }
    /// Whether the anchored pattern atom could match some atom of this element and
    /// aromaticity, whatever its charge: lets callers index patterns by anchor element once.
    /// `false` is certain; for an atom with this element and aromaticity, `false` here
    /// implies [`Pattern::could_anchor`] is `false`.
    pub fn could_anchor_element(&self, element: u8, aromatic: bool) -> bool {
        self.anchor_filter.admits_element(element, aromatic)
    }
}

/// The text of each `$(...)` environment of `text`, in the order their `$(` stands, which
/// is the order the parser numbers them in. Only called on text that parsed, where every
/// `$` opens an environment and parentheses balance.
fn environment_texts(text: &str) -> Vec<&str> {
    let bytes = text.as_bytes();
    let mut out = Vec::new();
    for (start, _) in text.match_indices("$(") {
        let mut depth = 0usize;
        let mut end = bytes.len();
        for (j, &b) in bytes.iter().enumerate().skip(start + 1) {
            match b {
                b'(' => depth += 1,
                b')' => {
                    depth -= 1;
                    if depth == 0 {
                        end = j + 1;
                        break;
                    }
                }
                _ => {}
            }
        }
        out.push(&text[start..end]);
    }
    out
}

/// Ids by key, handed out in the order keys are first met (so the hash function decides
/// nothing but speed).
type IdMap<K> = HashMap<K, u32, BuildQuickHasher>;

/// Builds [`QuickHasher`]s, for hash maps keyed by the library's own texts and atom keys.
pub type BuildQuickHasher = std::hash::BuildHasherDefault<QuickHasher>;

/// A quick hash for keys the program makes itself (multiply and rotate per word, after the
/// one in rustc's own hash maps; common practice): the id maps here, keyed by pattern text
/// compiled at start-up, and the caches per atom key of the site and substituent indexes.
/// The standard hash, made for keys an attacker chooses, was a good part of their cost.
#[derive(Default)]
pub struct QuickHasher(u64);

impl std::hash::Hasher for QuickHasher {
    fn finish(&self) -> u64 {
        self.0
    }
    fn write(&mut self, bytes: &[u8]) {
        for chunk in bytes.chunks(8) {
            let mut word = [0u8; 8];
            word[..chunk.len()].copy_from_slice(chunk);
            self.write_u64(u64::from_le_bytes(word));
        }
    }
    fn write_u8(&mut self, n: u8) {
        self.write_u64(n as u64);
    }
    fn write_u16(&mut self, n: u16) {
        self.write_u64(n as u64);
    }
    fn write_u32(&mut self, n: u32) {
        self.write_u64(n as u64);
    }
    fn write_usize(&mut self, n: usize) {
        self.write_u64(n as u64);
    }
    fn write_u64(&mut self, n: u64) {
        self.0 = (self.0.rotate_left(5) ^ n).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95);
    }
}

/// Process-wide ids of environment texts, handed out at parse time.
static ENVIRONMENT_IDS: OnceLock<Mutex<IdMap<String>>> = OnceLock::new();

/// The process-wide id of each environment of a parsed pattern. Two environments with the
/// same text compile to the same graph, so they may share answers; where the texts cannot
/// be lined up with the parsed environments (never expected), each gets an id of its own.
fn environment_ids(text: &str, count: usize) -> Vec<u32> {
    if count == 0 {
        return Vec::new();
    }
    let texts = environment_texts(text);
    let mut ids = ENVIRONMENT_IDS
        .get_or_init(|| Mutex::new(IdMap::default()))
        .lock()
        .unwrap_or_else(|e| e.into_inner());
    let fresh = |ids: &mut IdMap<String>| {
        // A key no text can have (a NUL byte and a counter), so it is never shared.
        let key = format!("\0{}", ids.len());
        let id = ids.len() as u32;
        ids.insert(key, id);
        id
    };
    if texts.len() != count {
        return (0..count).map(|_| fresh(&mut ids)).collect();
    }
    texts
        .iter()
        .map(|t| match ids.get(*t) {
            Some(&id) => id,
            None => {
                let id = ids.len() as u32;
                ids.insert(t.to_string(), id);
                id
            }
        })
        .collect()
}

/// Process-wide ids of atom expressions, handed out at parse time.
static EXPRESSION_IDS: OnceLock<Mutex<IdMap<ExprKey>>> = OnceLock::new();

/// An atom expression as a key: its structure, with environments named by their
/// process-wide ids (local numbers differ from pattern to pattern). Kept as a tree rather
/// than written out as text: patterns compile by the hundred, and formatting every
/// primitive cost more than the rest of numbering them.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
enum ExprKey {
    Prim(primitive::AtomPrim),
    /// An environment, by its process-wide id.
    Environment(u32),
    /// An environment out of range (never expected), by its local number: it never holds.
    Stray(u32),
    Not(Box<ExprKey>),
    And(Vec<ExprKey>),
    Or(Vec<ExprKey>),
}

impl ExprKey {
    fn of(expr: &expr::Expr<primitive::AtomPrim>, env_ids: &[u32]) -> ExprKey {
        let all = |es: &[expr::Expr<primitive::AtomPrim>]| {
            es.iter().map(|e| ExprKey::of(e, env_ids)).collect()
        };
        match expr {
            expr::Expr::Prim(primitive::AtomPrim::Recursive(id)) => {
                match env_ids.get(*id as usize) {
                    Some(&env) => ExprKey::Environment(env),
                    None => ExprKey::Stray(*id),
                }
            }
            expr::Expr::Prim(p) => ExprKey::Prim(*p),
            expr::Expr::Not(e) => ExprKey::Not(Box::new(ExprKey::of(e, env_ids))),
            expr::Expr::And(es) => ExprKey::And(all(es)),
            expr::Expr::Or(es) => ExprKey::Or(all(es)),
        }
    }
}

/// The process-wide id of an atom expression: equal expressions (environments by their
/// ids) share it, so their answers on one molecule may be shared.
fn expression_id(expr: &expr::Expr<primitive::AtomPrim>, env_ids: &[u32]) -> u32 {
    let key = ExprKey::of(expr, env_ids);
    let mut ids = EXPRESSION_IDS
        .get_or_init(|| Mutex::new(IdMap::default()))
        .lock()
        .unwrap_or_else(|e| e.into_inner());
    let next = ids.len() as u32;
    *ids.entry(key).or_insert(next)
}

/// Matching state for one molecule, reused across many patterns and atoms: answers about
/// `$()` environments are kept for the molecule and shared by every pattern holding the
/// same environment text, so site finding over a whole library evaluates each environment
/// on each atom at most once. Results are exactly those of the [`Pattern`] methods of the
/// same names.
///
/// ```
/// let molecule = mol::parse("NCC(=O)O")?;
/// let amine = pattern::Pattern::parse("[NX3;!$(NC=O):1]")?;
/// let acid = pattern::Pattern::parse("[OX2H1;!$(ON):1]C=O")?;
/// let mut matcher = pattern::Matcher::new(&molecule);
/// assert!(matcher.is_match_at(&amine, 0, &[]));
/// assert_eq!(matcher.matches_at(&acid, 4, &[]).len(), 1);
/// Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Clone, Debug)]
pub struct Matcher<'m> {
    molecule: &'m Molecule,
    /// Boxed, so handing the buffers to and from the thread's spare slot moves a pointer;
    /// `None` only while being dropped.
    memo: Option<Box<EnvMemo>>,
}

thread_local! {
    /// Buffers handed back by the last matcher dropped on this thread.
    static SPARE_MEMO: std::cell::RefCell<Option<Box<EnvMemo>>> =
        const { std::cell::RefCell::new(None) };
}

impl Drop for Matcher<'_> {
    fn drop(&mut self) {
        let Some(memo) = self.memo.take() else {
            return;
        };
        // During thread teardown the slot may be gone; the buffers are then just freed.
        let _ = SPARE_MEMO.try_with(|spare| *spare.borrow_mut() = Some(memo));
    }
}

impl<'m> Matcher<'m> {
    /// A matcher for `molecule`, with nothing remembered yet.
    pub fn new(molecule: &'m Molecule) -> Matcher<'m> {
        // The buffers of the thread's last matcher, when there is one: site finding makes
        // a matcher per molecule, and recognition one per substituent.
        let memo = SPARE_MEMO
            .with(|spare| spare.borrow_mut().take())
            .map(|mut memo| {
                memo.reuse(molecule);
                memo
            })
            .unwrap_or_else(|| Box::new(EnvMemo::for_molecule(molecule)));
        Matcher {
            molecule,
            memo: Some(memo),
        }
    }
    fn memo(&mut self) -> &mut EnvMemo {
        let molecule = self.molecule;
        self.memo
            .get_or_insert_with(|| Box::new(EnvMemo::for_molecule(molecule)))
    }
    /// The molecule it matches against.
    pub fn molecule(&self) -> &'m Molecule {
        self.molecule
    }
    /// A matcher for `molecule` that works out what the primitives test on every atom at
    /// once, instead of on first use: for trying many patterns on every atom (site
    /// finding), where [`Matcher::could_anchor`] then reads a table.
    pub fn with_all_atoms(molecule: &'m Molecule) -> Matcher<'m> {
        let mut matcher = Matcher::new(molecule);
        matcher.memo().features.fill(molecule);
        matcher
    }
    /// The key of `atom` (see [`AtomKey`]); `None` out of range.
    pub fn atom_key(&mut self, atom: usize) -> Option<AtomKey> {
        let molecule = self.molecule;
        (atom < molecule.atoms().len()).then(|| AtomKey(self.memo().features.get(molecule, atom)))
    }
    /// Whether the anchored pattern atom could match an atom with this key: what
    /// [`Matcher::could_anchor`] answers for every atom with it.
    #[inline]
    pub fn could_anchor_key(pattern: &Pattern, key: &AtomKey) -> bool {
        pattern.anchor_filter.admits_features(&key.0)
    }
    /// Like [`Pattern::could_anchor`], from the matcher's table of atom values where the
    /// atom is in it.
    #[inline]
    pub fn could_anchor(&self, pattern: &Pattern, atom: usize) -> bool {
        let molecule = self.molecule;
        atom < molecule.atoms().len()
            && match &self.memo {
                Some(memo) => pattern
                    .anchor_filter
                    .admits_features(&memo.features.peek(molecule, atom)),
                None => pattern.anchor_filter.admits(molecule, atom),
            }
    }
    /// The anchor's pre-filter, from the table (filling it): a search set up only to fail
    /// there costs more than the test.
    #[inline]
    fn anchor_ok(&mut self, pattern: &Pattern, atom: usize) -> bool {
        let molecule = self.molecule;
        atom < molecule.atoms().len()
            && pattern
                .anchor_filter
                .admits_features(&self.memo().features.get(molecule, atom))
    }
    /// Like [`Pattern::is_match_at`].
    pub fn is_match_at(&mut self, pattern: &Pattern, atom: usize, avoid: &[usize]) -> bool {
        if !self.anchor_ok(pattern, atom) {
            return false;
        }
        let mut search = Search::new(self.molecule, &pattern.subs, &pattern.env_ids, self.memo());
        search.search(&pattern.main, atom, avoid, &mut |_| true)
    }
    /// Like [`Pattern::matches_at`].
    pub fn matches_at(&mut self, pattern: &Pattern, atom: usize, avoid: &[usize]) -> Vec<Match> {
        if !self.anchor_ok(pattern, atom) {
            return Vec::new();
        }
        Search::new(self.molecule, &pattern.subs, &pattern.env_ids, self.memo()).distinct_matches(
            &pattern.main,
            atom,
            avoid,
        )
    }
    /// The least (compared atom by atom) of the matches [`Pattern::matches_at`] would
    /// list, found without building the list: what a caller wanting one match that does
    /// not depend on search order picks.
    pub fn least_match_at(
        &mut self,
        pattern: &Pattern,
        atom: usize,
        avoid: &[usize],
    ) -> Option<Vec<usize>> {
        // Callers trying many patterns ask `could_anchor` first; the search repeats the
        // test anyway.
        let mut least = Least::with_keys(std::mem::take(&mut self.memo().least_keys));
        let mut search = Search::new(self.molecule, &pattern.subs, &pattern.env_ids, self.memo());
        search.search(&pattern.main, atom, avoid, &mut |a| {
            least.add(a);
            false
        });
        let (best, keys) = least.finish();
        self.memo().least_keys = keys;
        best
    }
    /// Like [`Pattern::first_match_at`].
    pub fn first_match_at(
        &mut self,
        pattern: &Pattern,
        atom: usize,
        avoid: &[usize],
    ) -> Option<Match> {
        if !self.anchor_ok(pattern, atom) {
            return None;
        }
        let mut search = Search::new(self.molecule, &pattern.subs, &pattern.env_ids, self.memo());
        let mut first = None;
        search.search(&pattern.main, atom, avoid, &mut |a| {
            first = Some(a.to_vec());
            true
        });
        first.map(|atoms| Match { atoms })
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
                                                // Hydrogen counts and connections are part of it too.
        assert!(!pattern("[OH1]").could_anchor(&m, 2)); // C=O
        assert!(!pattern("[OX2]").could_anchor(&m, 2));
        assert!(!pattern("C[O:1]C").could_anchor(&m, 3)); // one bond, pattern has two
                                                          // A pass is only a maybe where an environment is involved.
        let ester = pattern("[OX1;$(O=C[OX2][#6])]");
        assert!(ester.could_anchor(&m, 2));
        assert!(!ester.is_match_at(&m, 2, &[]));
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
    fn matcher_answers_as_single_calls_do() {
        // The same environments numbered differently in each pattern, one nested: shared
        // answers must follow the text, not the local number.
        let patterns: Vec<Pattern> = [
            "[N;!$(NC=O);$(NCC)]",
            "[N;$(NCC);!$(NC=O)]",
            "[C;$(C[$(N)])]",
            "[#7;$(N)]",
            "[$(C=O):1]N",
            "[OX2H1:1]C=O",
            "[CX4;H1,H2;+0:1]C(=O)[#7]",
        ]
        .iter()
        .map(|t| pattern(t))
        .collect();
        for smiles in ["NCC(=O)O", "CC(=O)NCC", "c1ccncc1CN", "OC(=O)CC(N)C(=O)N"] {
            let m = molecule(smiles);
            let mut matcher = Matcher::new(&m);
            for p in &patterns {
                for atom in 0..m.atoms().len() + 1 {
                    let single = p.matches_at(&m, atom, &[]);
                    assert_eq!(
                        matcher.matches_at(p, atom, &[]),
                        single,
                        "{p} {smiles} {atom}"
                    );
                    assert_eq!(matcher.is_match_at(p, atom, &[]), !single.is_empty());
                    assert_eq!(
                        matcher.first_match_at(p, atom, &[]),
                        single.first().cloned()
                    );
                    assert_eq!(p.first_match_at(&m, atom, &[]), single.first().cloned());
                    let least = single.iter().map(|m| m.atoms.clone()).min();
                    assert_eq!(matcher.least_match_at(p, atom, &[]), least);
                }
            }
        }
    }

    #[test]
    fn anchor_element_test_agrees_with_could_anchor() {
        let m = molecule("CC(=O)[O-].c1ccncc1[NH3+]");
        for text in ["[O-:1]C=O", "[nX2:1]", "[#7;+:1]", "[!#6]", "[a;!c]", "*"] {
            let p = pattern(text);
            for (i, a) in m.atoms().iter().enumerate() {
                if p.could_anchor(&m, i) {
                    assert!(p.could_anchor_element(a.element, a.aromatic), "{text} {i}");
                }
            }
        }
        assert!(!pattern("[nX2:1]").could_anchor_element(7, false));
        assert!(pattern("[nX2:1]").could_anchor_element(7, true));
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
