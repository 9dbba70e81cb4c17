//! The backtracking search.
//!
//! # Reference
//!
//! Depth-first backtracking over a spanning tree of the pattern, extending each partial
//! match only along the molecule's neighbour lists and checking ring-closure bonds when both
//! ends are placed (the scheme of J. R. Ullmann, "An Algorithm for Subgraph Isomorphism",
//! J. ACM 1976, 23, 31, cited from memory, without its refinement step; common practice for
//! small patterns).

use std::collections::HashSet;

use mol::Molecule;

use crate::expr::Expr;
use crate::features::{FeatureTable, COUNT_CAP};
use crate::graph::Graph;
use crate::primitive::AtomPrim;
use crate::Match;

/// Marks a pattern atom not placed yet.
const UNPLACED: usize = usize::MAX;
/// Pattern neighbours ahead of an atom up to this many are checked for distinct
/// candidates; beyond, each only for one.
const HALL_AHEAD: usize = 4;

/// Patterns up to this size search in a stack buffer, those up to `SMALL` in a smaller one.
const INLINE: usize = 32;
const SMALL: usize = 8;

/// Environment answers kept without allocating; one anchored call rarely asks more.
const MEMO_INLINE: usize = 16;

/// Expression ids and table rows room is made for at once: about what trying a whole
/// library on one molecule touches, so growing rarely reallocates.
const EXPR_ROWS_FIRST: usize = 512;
const TABLE_ROWS_FIRST: usize = 32;

/// Marks an environment with no row in the table yet.
const NO_ROW: u32 = u32::MAX;

/// Answers about environments on one molecule, keyed by the environment's process-wide id
/// (the same `$()` text in any pattern has the same id), so that every pattern tried on
/// the molecule shares them.
#[derive(Clone, Debug)]
pub(crate) struct EnvMemo {
    /// Atoms in the molecule (row length).
    atoms: usize,
    /// The first answers: (environment, atom, holds).
    recent: [(u32, u32, bool); MEMO_INLINE],
    recent_len: usize,
    /// Row start in `table` per environment id, `NO_ROW` until one is needed.
    rows: Vec<u32>,
    /// Whether atom-expression answers are kept too (worth it only when many patterns run
    /// on one molecule), and their row starts per expression id.
    keep_atoms: bool,
    expr_rows: Vec<u32>,
    /// Environment and expression ids given a row, so that `reuse` clears only those.
    touched_env: Vec<u32>,
    touched_expr: Vec<u32>,
    /// Per (row, atom): 0 not asked yet, 1 no, 2 yes.
    table: Vec<u8>,
    /// The atoms' values the primitives test; empty (every atom read afresh) for a single
    /// call, kept for a matcher.
    pub(crate) features: FeatureTable,
    /// Room for the atom sets a [`Least`] has seen, handed from one call to the next.
    pub(crate) least_keys: Vec<usize>,
}

impl EnvMemo {
    pub(crate) fn new(atoms: usize) -> EnvMemo {
        EnvMemo {
            atoms,
            recent: [(0, 0, false); MEMO_INLINE],
            recent_len: 0,
            rows: Vec::new(),
            keep_atoms: false,
            expr_rows: Vec::new(),
            touched_env: Vec::new(),
            touched_expr: Vec::new(),
            table: Vec::new(),
            features: FeatureTable::default(),
            least_keys: Vec::new(),
        }
    }

    /// Forgets every answer, keeping the buffers, for `molecule`.
    pub(crate) fn reuse(&mut self, molecule: &Molecule) {
        let atoms = molecule.atoms().len();
        self.atoms = atoms;
        self.recent_len = 0;
        for &e in &self.touched_env {
            self.rows[e as usize] = NO_ROW;
        }
        for &e in &self.touched_expr {
            self.expr_rows[e as usize] = NO_ROW;
        }
        self.touched_env.clear();
        self.touched_expr.clear();
        self.table.clear();
        self.features.reset(molecule);
    }

    /// A memo that also keeps atom-expression answers, for many patterns on one molecule.
    pub(crate) fn for_molecule(molecule: &Molecule) -> EnvMemo {
        let mut memo = EnvMemo {
            keep_atoms: true,
            ..EnvMemo::new(molecule.atoms().len())
        };
        memo.features.reset(molecule);
        memo
    }

    /// Adds one row to the table, reserving room for many at the first.
    fn grow_table(&mut self) {
        if self.table.capacity() == 0 {
            self.table.reserve(self.atoms * TABLE_ROWS_FIRST);
        }
        self.table.resize(self.table.len() + self.atoms, 0);
    }

    /// The cell of atom expression `expr` on `atom`: 0 not asked yet, 1 no, 2 yes.
    #[inline]
    fn atom_cell(&mut self, expr: u32, atom: usize) -> &mut u8 {
        let e = expr as usize;
        if self.expr_rows.len() <= e {
            // Grown in big steps: a fresh memo meets ids in no particular order.
            let want = (e + 1).max(self.expr_rows.len() * 2).max(EXPR_ROWS_FIRST);
            self.expr_rows.resize(want, NO_ROW);
        }
        if self.expr_rows[e] == NO_ROW {
            self.expr_rows[e] = self.table.len() as u32;
            self.touched_expr.push(expr);
            self.grow_table();
        }
        &mut self.table[self.expr_rows[e] as usize + atom]
    }

    #[inline]
    fn recall(&self, env: u32, atom: usize) -> Option<bool> {
        let key = (env, atom as u32);
        if self.keep_atoms {
            // A memo for many patterns keeps everything in the table.
            return self.recall_table(env, atom);
        }
        if let Some(&(_, _, holds)) = self.recent[..self.recent_len]
            .iter()
            .find(|r| (r.0, r.1) == key)
        {
            return Some(holds);
        }
        self.recall_table(env, atom)
    }

    #[inline]
    fn recall_table(&self, env: u32, atom: usize) -> Option<bool> {
        let row = *self.rows.get(env as usize)?;
        if row == NO_ROW {
            return None;
        }
        match self.table.get(row as usize + atom) {
            Some(1) => Some(false),
            Some(2) => Some(true),
            _ => None,
        }
    }

    fn remember(&mut self, env: u32, atom: usize, holds: bool) {
        if !self.keep_atoms && self.recent_len < MEMO_INLINE {
            self.recent[self.recent_len] = (env, atom as u32, holds);
            self.recent_len += 1;
            return;
        }
        let e = env as usize;
        if self.rows.len() <= e {
            let want = (e + 1).max(self.rows.len() * 2);
            self.rows.resize(want, NO_ROW);
        }
        if self.rows[e] == NO_ROW {
            self.rows[e] = self.table.len() as u32;
            self.touched_env.push(env);
            self.grow_table();
        }
        if let Some(m) = self.table.get_mut(self.rows[e] as usize + atom) {
            *m = if holds { 2 } else { 1 };
        }
    }
}

/// One matching call: the molecule, the pattern's environments, and the answers about
/// environments found so far.
pub(crate) struct Search<'a> {
    molecule: &'a Molecule,
    subs: &'a [Graph],
    /// Process-wide id per environment of `subs`.
    env_ids: &'a [u32],
    memo: &'a mut EnvMemo,
}

impl<'a> Search<'a> {
    pub(crate) fn new(
        molecule: &'a Molecule,
        subs: &'a [Graph],
        env_ids: &'a [u32],
        memo: &'a mut EnvMemo,
    ) -> Search<'a> {
        Search {
            molecule,
            subs,
            env_ids,
            memo,
        }
    }

    /// Whether molecule atom `atom` satisfies an atom expression.
    pub(crate) fn atom_matches(&mut self, expr: &Expr<AtomPrim>, atom: usize) -> bool {
        let molecule = self.molecule;
        let f = self.memo.features.get(molecule, atom);
        expr.eval(&mut |p| match p {
            AtomPrim::Recursive(id) => self.environment(*id as usize, atom),
            _ => p.holds_with(&f, molecule, atom),
        })
    }

    /// Whether molecule atom `atom` can sit on pattern atom `at`: the filter first, the
    /// expression only when the filter cannot decide. The filter part is inlined into the
    /// search, the walk kept apart: most tests end at the filter, and a call saving the
    /// registers the walk needs cost them more than the test.
    #[inline(always)]
    fn atom_ok(&mut self, graph: &Graph, at: usize, atom: usize) -> bool {
        let filter = &graph.filters[at];
        if !filter.admits_features(&self.memo.features.get(self.molecule, atom)) {
            return false;
        }
        // The filter holds the pattern bonds at the atom up to the cap only.
        let min = graph.min_degree[at];
        if min > COUNT_CAP as usize && self.molecule.degree(atom) < min {
            return false;
        }
        if filter.exact {
            return true;
        }
        self.atom_walk(graph, at, atom)
    }

    /// The part of [`Search::atom_ok`] past the filter: the expression, through the memo.
    #[inline(never)]
    fn atom_walk(&mut self, graph: &Graph, at: usize, atom: usize) -> bool {
        match graph.expr_ids.get(at) {
            Some(&id) if self.memo.keep_atoms && graph.keep_answers[at] => {
                let known = *self.memo.atom_cell(id, atom);
                if known != 0 {
                    return known == 2;
                }
                let holds = self.atom_matches(&graph.residual[at], atom);
                // The evaluation may have grown the table: look the cell up again.
                *self.memo.atom_cell(id, atom) = if holds { 2 } else { 1 };
                holds
            }
            _ => self.atom_matches(&graph.residual[at], atom),
        }
    }

    /// Whether environment `id` holds with its first atom on `atom`, memoized.
    fn environment(&mut self, id: usize, atom: usize) -> bool {
        let Some(&env) = self.env_ids.get(id) else {
            return false;
        };
        if let Some(holds) = self.memo.recall(env, atom) {
            return holds;
        }
        let subs = self.subs;
        let found = match subs.get(id) {
            Some(graph) => {
                let mut found = false;
                self.search(graph, atom, &[], &mut |_| {
                    found = true;
                    true
                });
                found
            }
            None => false,
        };
        self.memo.remember(env, atom, found);
        found
    }

    /// Every match of `graph` with its root on `anchor`, one per distinct atom set, in the
    /// order the search finds them.
    pub(crate) fn distinct_matches(
        &mut self,
        graph: &Graph,
        anchor: usize,
        avoid: &[usize],
    ) -> Vec<Match> {
        let mut distinct = Distinct::default();
        self.search(graph, anchor, avoid, &mut |a| {
            distinct.add(a);
            false
        });
        distinct.into_matches()
    }

    /// Runs `graph` with its root on `anchor`, giving each complete match (molecule atom per
    /// pattern atom) to `sink`; `sink` returns true to stop. Returns whether it stopped.
    pub(crate) fn search(
        &mut self,
        graph: &Graph,
        anchor: usize,
        avoid: &[usize],
        sink: &mut dyn FnMut(&[usize]) -> bool,
    ) -> bool {
        let n = graph.atoms.len();
        if n == 0
            || anchor >= self.molecule.atoms().len()
            || avoid.contains(&anchor)
            // A molecule short of the atoms the pattern names cannot hold it anywhere.
            || !self.memo.features.has(&graph.census)
            || !self.atom_ok(graph, graph.root, anchor)
        {
            return false;
        }
        if !self.ahead_ok(graph, graph.root, anchor, avoid) {
            return false;
        }
        // A buffer no larger than the pattern needs: a search is set up for every (pattern,
        // atom) pair tried, and most patterns are small.
        if n <= SMALL {
            let mut small = [UNPLACED; SMALL];
            self.start(graph, anchor, &mut small[..n], avoid, sink)
        } else if n <= INLINE {
            let mut inline = [UNPLACED; INLINE];
            self.start(graph, anchor, &mut inline[..n], avoid, sink)
        } else {
            let mut heap = vec![UNPLACED; n];
            self.start(graph, anchor, &mut heap, avoid, sink)
        }
    }

    /// Places the root on `anchor` and the rest after it.
    #[inline(always)]
    fn start(
        &mut self,
        graph: &Graph,
        anchor: usize,
        assign: &mut [usize],
        avoid: &[usize],
        sink: &mut dyn FnMut(&[usize]) -> bool,
    ) -> bool {
        assign[graph.root] = anchor;
        self.extend(graph, 0, assign, avoid, sink)
    }

    /// Whether every pattern neighbour of the root still has somewhere to go once `atom`
    /// sits on it: a molecule neighbour outside `avoid` through an admitted bond, passing
    /// its filter, and, for up to [`HALL_AHEAD`] of them, a different one each (Hall's
    /// condition: every group of them has as many candidates between them). A necessary
    /// condition, so it only cuts branches that hold no match, and matches are found in the
    /// same order; it spares walking a ring or chain around an anchor that lacks what the
    /// pattern needs further on.
    ///
    /// Asked only at the root, and only with two or more pattern neighbours there: on the
    /// first 2,000 MOSES test molecules (callgrind, site finding) looking with one
    /// neighbour ahead cost about 2,000 instructions per molecule more than the branches it
    /// cut saved (the search tries that neighbour soon after anyway), and looking again at
    /// every later step about 1,700 more. Skipping a necessary check changes no match and
    /// no order.
    #[inline]
    fn ahead_ok(&mut self, graph: &Graph, at: usize, atom: usize, avoid: &[usize]) -> bool {
        let ahead = &graph.ahead[at];
        if ahead.len() < 2 {
            return true;
        }
        let molecule = self.molecule;
        let bonds = molecule.bonds();
        let features = &mut self.memo.features;
        let neighbors = molecule.neighbors(atom);
        // Nothing is placed yet: only `avoid` fences neighbours off.
        let free = |nb: &mol::Neighbor| !avoid.contains(&nb.atom);
        if ahead.len() > HALL_AHEAD || neighbors.len() > 32 {
            return ahead.iter().all(|&(next, mask)| {
                neighbors.iter().any(|nb| {
                    mask >> features.bond_kind(bonds, nb.bond) & 1 != 0
                        && graph.filters[next].admits_features(&features.get(molecule, nb.atom))
                        && free(nb)
                })
            });
        }
        // Candidates per pattern neighbour, as bits over the molecule neighbours; each
        // molecule neighbour read once.
        let mut candidates = [0u32; HALL_AHEAD];
        for (i, nb) in neighbors.iter().enumerate() {
            let kind = features.bond_kind(bonds, nb.bond);
            let mut f = None;
            for (k, &(next, mask)) in ahead.iter().enumerate() {
                if mask >> kind & 1 == 0 {
                    continue;
                }
                let f = *f.get_or_insert_with(|| features.get(molecule, nb.atom));
                if graph.filters[next].admits_features(&f) {
                    candidates[k] |= 1 << i;
                }
            }
            // A neighbour fenced off is no candidate after all.
            if candidates[..ahead.len()].iter().any(|c| c >> i & 1 != 0) && !free(nb) {
                for c in &mut candidates {
                    *c &= !(1 << i);
                }
            }
        }
        if candidates[..ahead.len()].contains(&0) {
            return false;
        }
        (3u32..1 << ahead.len())
            .filter(|group| group.count_ones() > 1)
            .all(|group| {
                let union = (0..ahead.len())
                    .filter(|k| group >> k & 1 != 0)
                    .fold(0u32, |u, k| u | candidates[k]);
                union.count_ones() >= group.count_ones()
            })
    }

    /// Places step `step` and the ones after it.
    fn extend(
        &mut self,
        graph: &Graph,
        step: usize,
        assign: &mut [usize],
        avoid: &[usize],
        sink: &mut dyn FnMut(&[usize]) -> bool,
    ) -> bool {
        let Some(s) = graph.steps.get(step) else {
            return sink(assign);
        };
        let molecule = self.molecule;
        let bonds = molecule.bonds();
        let from = assign[s.parent];
        let mask = graph.bond_masks[s.bond];
        for nb in molecule.neighbors(from) {
            let candidate = nb.atom;
            if mask >> self.memo.features.bond_kind(bonds, nb.bond) & 1 == 0 {
                continue;
            }
            if assign.contains(&candidate) || avoid.contains(&candidate) {
                continue;
            }
            if !self.atom_ok(graph, s.atom, candidate) {
                continue;
            }
            let features = &self.memo.features;
            let closed = s.closures.iter().all(|&(other, bond)| {
                molecule
                    .bond_between(candidate, assign[other])
                    .is_some_and(|mb| {
                        graph.bond_masks[bond] >> features.bond_kind(bonds, mb) & 1 != 0
                    })
            });
            if !closed {
                continue;
            }
            assign[s.atom] = candidate;
            let stop = self.extend(graph, step + 1, assign, avoid, sink);
            assign[s.atom] = UNPLACED;
            if stop {
                return true;
            }
        }
        false
    }
}

/// Matches kept in a list before the seen-set is built; anchored calls rarely find more.
const DISTINCT_LINEAR: usize = 8;

/// Collects matches, dropping those whose atom set was seen already.
#[derive(Default)]
pub(crate) struct Distinct {
    /// Sorted atom sets of the kept matches, while there are few.
    keys: Vec<Vec<usize>>,
    /// All sorted atom sets, once there are many (built late: even an empty std set costs
    /// a random seed).
    seen: Option<HashSet<Vec<usize>>>,
    matches: Vec<Vec<usize>>,
}

impl Distinct {
    pub(crate) fn add(&mut self, atoms: &[usize]) {
        let mut key = atoms.to_vec();
        key.sort_unstable();
        if self.matches.len() < DISTINCT_LINEAR {
            if self.keys.contains(&key) {
                return;
            }
            self.keys.push(key);
        } else {
            let seen = self
                .seen
                .get_or_insert_with(|| self.keys.drain(..).collect());
            if !seen.insert(key) {
                return;
            }
        }
        self.matches.push(atoms.to_vec());
    }

    /// The kept matches, in the order first found.
    pub(crate) fn into_matches(self) -> Vec<Match> {
        self.matches
            .into_iter()
            .map(|atoms| Match { atoms })
            .collect()
    }
}

/// Keeps the least (atom by atom) of the matches a [`Distinct`] would keep, without
/// storing them: a match counts only when its atom set was not seen before, as there.
pub(crate) struct Least {
    /// Sorted atom sets seen, back to back, while there are few: a buffer handed in, so
    /// the sets of one call after another take no allocation.
    keys: Vec<usize>,
    /// How many sets `keys` holds.
    count: usize,
    /// All sorted atom sets, once there are many.
    seen: Option<HashSet<Vec<usize>>>,
    /// The least match kept so far.
    pub(crate) best: Option<Vec<usize>>,
}

impl Least {
    /// Keeps the sets seen in `keys` (emptied first).
    pub(crate) fn with_keys(mut keys: Vec<usize>) -> Least {
        keys.clear();
        Least {
            keys,
            count: 0,
            seen: None,
            best: None,
        }
    }

    /// The least match and the buffer handed in.
    pub(crate) fn finish(self) -> (Option<Vec<usize>>, Vec<usize>) {
        (self.best, self.keys)
    }

    pub(crate) fn add(&mut self, atoms: &[usize]) {
        let n = atoms.len();
        if self.count < DISTINCT_LINEAR {
            // The new set is sorted in place after the others and dropped again if seen.
            let start = self.keys.len();
            self.keys.extend_from_slice(atoms);
            self.keys[start..].sort_unstable();
            let (seen, key) = self.keys.split_at(start);
            let repeated = if n == 0 {
                self.count > 0
            } else {
                seen.chunks_exact(n).any(|k| k == key)
            };
            if repeated {
                self.keys.truncate(start);
                return;
            }
            self.count += 1;
        } else {
            let mut key = atoms.to_vec();
            key.sort_unstable();
            let seen = self.seen.get_or_insert_with(|| {
                if n == 0 {
                    std::iter::once(Vec::new()).collect()
                } else {
                    self.keys.chunks_exact(n).map(<[usize]>::to_vec).collect()
                }
            });
            if !seen.insert(key) {
                return;
            }
            self.count += 1;
        }
        match &mut self.best {
            Some(best) if best.as_slice() <= atoms => {}
            Some(best) => {
                best.clear();
                best.extend_from_slice(atoms);
            }
            None => self.best = Some(atoms.to_vec()),
        }
    }
}
