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
use crate::graph::Graph;
use crate::primitive::AtomPrim;

/// Marks a pattern atom not placed yet.
const UNPLACED: usize = usize::MAX;
/// Patterns up to this size search in a stack buffer.
const INLINE: usize = 32;

/// Environment answers kept without allocating; one anchored call rarely asks more.
const MEMO_INLINE: usize = 16;

/// One matching call: the molecule, the pattern's environments, and the answers about
/// environments found so far.
pub(crate) struct Search<'a> {
    molecule: &'a Molecule,
    subs: &'a [Graph],
    /// The first answers: (environment, atom, holds).
    recent: [(u32, u32, bool); MEMO_INLINE],
    recent_len: usize,
    /// Past those, per (environment, atom): 0 not asked yet, 1 no, 2 yes.
    memo: Vec<u8>,
}

impl<'a> Search<'a> {
    pub(crate) fn new(molecule: &'a Molecule, subs: &'a [Graph]) -> Search<'a> {
        Search {
            molecule,
            subs,
            recent: [(0, 0, false); MEMO_INLINE],
            recent_len: 0,
            memo: Vec::new(),
        }
    }

    fn recall(&self, id: usize, atom: usize) -> Option<bool> {
        let key = (id as u32, atom as u32);
        if let Some(&(_, _, holds)) = self.recent[..self.recent_len]
            .iter()
            .find(|r| (r.0, r.1) == key)
        {
            return Some(holds);
        }
        match self.memo.get(id * self.molecule.atoms().len() + atom) {
            Some(1) => Some(false),
            Some(2) => Some(true),
            _ => None,
        }
    }

    fn remember(&mut self, id: usize, atom: usize, holds: bool) {
        if self.recent_len < MEMO_INLINE {
            self.recent[self.recent_len] = (id as u32, atom as u32, holds);
            self.recent_len += 1;
            return;
        }
        let n = self.molecule.atoms().len();
        if self.memo.is_empty() {
            self.memo = vec![0; self.subs.len() * n];
        }
        if let Some(m) = self.memo.get_mut(id * n + atom) {
            *m = if holds { 2 } else { 1 };
        }
    }

    /// Whether molecule atom `atom` satisfies an atom expression.
    pub(crate) fn atom_matches(&mut self, expr: &Expr<AtomPrim>, atom: usize) -> bool {
        let molecule = self.molecule;
        expr.eval(&mut |p| match p {
            AtomPrim::Recursive(id) => self.environment(*id as usize, atom),
            _ => p.holds(molecule, atom),
        })
    }

    /// Whether molecule atom `atom` can sit on pattern atom `at`: the filter first, the
    /// expression only when the filter cannot decide.
    #[inline]
    fn atom_ok(&mut self, graph: &Graph, at: usize, atom: usize) -> bool {
        let filter = &graph.filters[at];
        if self.molecule.degree(atom) < graph.min_degree[at] || !filter.admits(self.molecule, atom)
        {
            return false;
        }
        filter.exact || self.atom_matches(&graph.atoms[at].expr, atom)
    }

    /// Whether environment `id` holds with its first atom on `atom`, memoized.
    fn environment(&mut self, id: usize, atom: usize) -> bool {
        if let Some(holds) = self.recall(id, atom) {
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
        self.remember(id, atom, found);
        found
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
            || !self.atom_ok(graph, graph.root, anchor)
        {
            return false;
        }
        let mut inline = [UNPLACED; INLINE];
        let mut heap = Vec::new();
        let assign: &mut [usize] = if n <= INLINE {
            &mut inline[..n]
        } else {
            heap.resize(n, UNPLACED);
            &mut heap
        };
        assign[graph.root] = anchor;
        self.extend(graph, 0, assign, avoid, sink)
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
        let bond_expr = &graph.bonds[s.bond].expr;
        for nb in molecule.neighbors(from) {
            let candidate = nb.atom;
            if assign.contains(&candidate) || avoid.contains(&candidate) {
                continue;
            }
            if !bond_expr.eval(&mut |b| b.holds(&bonds[nb.bond])) {
                continue;
            }
            if !self.atom_ok(graph, s.atom, candidate) {
                continue;
            }
            let closed = s.closures.iter().all(|&(other, bond)| {
                molecule
                    .bond_between(candidate, assign[other])
                    .is_some_and(|mb| graph.bonds[bond].expr.eval(&mut |b| b.holds(&bonds[mb])))
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
    pub(crate) matches: Vec<Vec<usize>>,
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
}
