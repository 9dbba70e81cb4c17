//! Maximum matching in a general graph, for the Kekulé form.
//!
//! Aromatic systems are not bipartite (azulene, any five-membered ring), so a bipartite
//! augmenting-path search can miss a perfect matching; Edmonds' blossom contraction cannot.

const NONE: usize = usize::MAX;

/// Adjacency lists in one allocation: vertex `v`'s neighbours are
/// `items[start[v]..start[v + 1]]`.
pub(crate) struct Lists {
    pub(crate) start: Vec<usize>,
    pub(crate) items: Vec<usize>,
}

impl Lists {
    fn len(&self) -> usize {
        self.start.len() - 1
    }

    #[cfg(test)]
    fn from_vecs(adj: &[Vec<usize>]) -> Lists {
        let mut start = vec![0];
        let mut items = Vec::new();
        for l in adj {
            items.extend_from_slice(l);
            start.push(items.len());
        }
        Lists { start, items }
    }
}

impl std::ops::Index<usize> for Lists {
    type Output = [usize];
    #[inline]
    fn index(&self, v: usize) -> &[usize] {
        &self.items[self.start[v]..self.start[v + 1]]
    }
}

/// A maximum matching of the graph given by adjacency lists: `mate[v]` is the vertex
/// matched to `v`, or `None`.
///
/// # Reference
///
/// J. Edmonds, "Paths, trees, and flowers", Canad. J. Math. 1965, 17, 449-467 (blossom
/// algorithm), in its O(V^3) breadth-first form.
#[cfg(test)]
pub(crate) fn maximum_matching(adj: &Lists) -> Vec<Option<usize>> {
    let mut arrays = Arrays::default();
    maximum_matching_in(adj, &mut arrays)
        .iter()
        .map(|&m| if m == NONE { None } else { Some(m) })
        .collect()
}

/// The arrays of the search, kept by the caller between calls.
#[derive(Default)]
pub(crate) struct Arrays {
    mate: Vec<usize>,
    parent: Vec<usize>,
    base: Vec<usize>,
    used: Vec<bool>,
    blossom: Vec<bool>,
    queue: Vec<usize>,
}

/// As [`maximum_matching`], in `arrays`: `mate[v]` is the vertex matched to `v`, or
/// `usize::MAX`.
pub(crate) fn maximum_matching_in<'a>(adj: &Lists, arrays: &'a mut Arrays) -> &'a [usize] {
    let n = adj.len();
    let Arrays {
        mate,
        parent,
        base,
        used,
        blossom,
        queue,
    } = arrays;
    mate.clear();
    mate.resize(n, NONE);
    parent.clear();
    parent.resize(n, NONE);
    base.clear();
    base.extend(0..n);
    used.clear();
    used.resize(n, false);
    blossom.clear();
    blossom.resize(n, false);
    queue.clear();
    let mut s = Search {
        adj,
        mate,
        parent,
        base,
        used,
        blossom,
        queue,
    };
    // A greedy start leaves few vertices for the search.
    for v in 0..n {
        if s.mate[v] == NONE {
            if let Some(&w) = adj[v].iter().find(|&&w| s.mate[w] == NONE && w != v) {
                s.mate[v] = w;
                s.mate[w] = v;
            }
        }
    }
    for v in 0..n {
        if s.mate[v] == NONE {
            let end = s.find_path(v);
            let mut v = end;
            while v != NONE {
                let pv = s.parent[v];
                let ppv = s.mate[pv];
                s.mate[v] = pv;
                s.mate[pv] = v;
                v = ppv;
            }
        }
    }
    &arrays.mate
}

struct Search<'a> {
    adj: &'a Lists,
    mate: &'a mut Vec<usize>,
    parent: &'a mut Vec<usize>,
    base: &'a mut Vec<usize>,
    used: &'a mut Vec<bool>,
    blossom: &'a mut Vec<bool>,
    queue: &'a mut Vec<usize>,
}

impl Search<'_> {
    fn lca(&self, mut a: usize, mut b: usize) -> usize {
        let mut seen = vec![false; self.adj.len()];
        loop {
            a = self.base[a];
            seen[a] = true;
            if self.mate[a] == NONE {
                break;
            }
            a = self.parent[self.mate[a]];
        }
        loop {
            b = self.base[b];
            if seen[b] {
                return b;
            }
            b = self.parent[self.mate[b]];
        }
    }

    fn mark_path(&mut self, mut v: usize, b: usize, mut child: usize) {
        while self.base[v] != b {
            self.blossom[self.base[v]] = true;
            self.blossom[self.base[self.mate[v]]] = true;
            self.parent[v] = child;
            child = self.mate[v];
            v = self.parent[self.mate[v]];
        }
    }

    /// Breadth-first search for an augmenting path from `root`; returns its free end.
    fn find_path(&mut self, root: usize) -> usize {
        let n = self.adj.len();
        self.used.iter_mut().for_each(|u| *u = false);
        self.parent.iter_mut().for_each(|p| *p = NONE);
        for (i, b) in self.base.iter_mut().enumerate() {
            *b = i;
        }
        self.used[root] = true;
        self.queue.clear();
        self.queue.push(root);
        let mut head = 0;
        while head < self.queue.len() {
            let v = self.queue[head];
            head += 1;
            for k in 0..self.adj[v].len() {
                let to = self.adj[v][k];
                if self.base[v] == self.base[to] || self.mate[v] == to {
                    continue;
                }
                if to == root || (self.mate[to] != NONE && self.parent[self.mate[to]] != NONE) {
                    let cur = self.lca(v, to);
                    self.blossom.iter_mut().for_each(|b| *b = false);
                    self.mark_path(v, cur, to);
                    self.mark_path(to, cur, v);
                    for i in 0..n {
                        if self.blossom[self.base[i]] {
                            self.base[i] = cur;
                            if !self.used[i] {
                                self.used[i] = true;
                                self.queue.push(i);
                            }
                        }
                    }
                } else if self.parent[to] == NONE {
                    self.parent[to] = v;
                    if self.mate[to] == NONE {
                        return to;
                    }
                    let next = self.mate[to];
                    self.used[next] = true;
                    self.queue.push(next);
                }
            }
        }
        NONE
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ring(n: usize) -> Vec<Vec<usize>> {
        (0..n).map(|i| vec![(i + n - 1) % n, (i + 1) % n]).collect()
    }

    #[test]
    fn even_ring_is_perfectly_matched() {
        let m = maximum_matching(&Lists::from_vecs(&ring(6)));
        assert!(m.iter().all(Option::is_some));
    }

    #[test]
    fn odd_ring_leaves_one_vertex() {
        let m = maximum_matching(&Lists::from_vecs(&ring(5)));
        assert_eq!(m.iter().filter(|x| x.is_none()).count(), 1);
    }

    #[test]
    fn blossom_is_needed_for_a_triangle_with_tails() {
        // Triangle 0-1-2, tails 2-3 and 0-4 and 1-5: a perfect matching exists.
        let adj = vec![
            vec![1, 2, 4],
            vec![0, 2, 5],
            vec![0, 1, 3],
            vec![2],
            vec![0],
            vec![1],
        ];
        let m = maximum_matching(&Lists::from_vecs(&adj));
        assert!(m.iter().all(Option::is_some));
    }
}
