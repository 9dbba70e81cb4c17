//! Partition of the sites into groups that are enumerated exactly.

/// The partition and what it left out.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct Partition {
    /// Site indices per group, each ascending; groups ordered by their first site.
    pub(crate) groups: Vec<Vec<usize>>,
    /// Non-zero couplings between different groups (ignored by the model).
    pub(crate) dropped: usize,
    /// Largest `|w|` among them.
    pub(crate) dropped_max: f64,
}

struct UnionFind {
    parent: Vec<usize>,
    size: Vec<usize>,
}

impl UnionFind {
    fn new(n: usize) -> Self {
        Self {
            parent: (0..n).collect(),
            size: vec![1; n],
        }
    }

    fn find(&mut self, mut x: usize) -> usize {
        while self.parent[x] != x {
            self.parent[x] = self.parent[self.parent[x]];
            x = self.parent[x];
        }
        x
    }

    /// Joins the sets of `a` and `b` if the union has at most `cap` members.
    fn union_capped(&mut self, a: usize, b: usize, cap: usize) {
        let (ra, rb) = (self.find(a), self.find(b));
        if ra == rb || self.size[ra] + self.size[rb] > cap {
            return;
        }
        let (big, small) = if self.size[ra] >= self.size[rb] {
            (ra, rb)
        } else {
            (rb, ra)
        };
        self.parent[small] = big;
        self.size[big] += self.size[small];
    }
}

/// Groups sites joined by non-zero couplings, strongest first, never past `cap` sites per
/// group. When no group would exceed `cap` this is the connected-component partition, and
/// nothing is dropped.
///
/// # Reference
///
/// Single-linkage clustering with a size cap, i.e. Kruskal's maximum spanning forest
/// (J. B. Kruskal, Proc. Amer. Math. Soc. 1956, 7, 48; from memory) stopped from joining
/// trees past the cap.
pub(crate) fn partition(w: &[Vec<f64>], n: usize, cap: usize) -> Partition {
    let cap = cap.max(1);
    let mut edges: Vec<(f64, usize, usize)> = Vec::new();
    if !w.is_empty() {
        for (i, row) in w.iter().enumerate().take(n) {
            for (j, v) in row.iter().enumerate().take(n).skip(i + 1) {
                let a = v.abs();
                if a > 0.0 {
                    edges.push((a, i, j));
                }
            }
        }
    }
    // Ties broken by index so the partition does not depend on the sort's stability.
    edges.sort_by(|x, y| y.0.total_cmp(&x.0).then(x.1.cmp(&y.1)).then(x.2.cmp(&y.2)));
    let mut uf = UnionFind::new(n);
    for &(_, i, j) in &edges {
        uf.union_capped(i, j, cap);
    }
    let mut root_group = vec![usize::MAX; n];
    let mut groups: Vec<Vec<usize>> = Vec::new();
    for i in 0..n {
        let r = uf.find(i);
        if root_group[r] == usize::MAX {
            root_group[r] = groups.len();
            groups.push(Vec::new());
        }
        groups[root_group[r]].push(i);
    }
    let mut dropped = 0;
    let mut dropped_max: f64 = 0.0;
    for &(a, i, j) in &edges {
        if uf.find(i) != uf.find(j) {
            dropped += 1;
            dropped_max = dropped_max.max(a);
        }
    }
    Partition {
        groups,
        dropped,
        dropped_max,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn chain(n: usize, near: f64) -> Vec<Vec<f64>> {
        (0..n)
            .map(|i| {
                (0..n)
                    .map(|j| {
                        if i == j {
                            0.0
                        } else {
                            near / (i as f64 - j as f64).abs()
                        }
                    })
                    .collect()
            })
            .collect()
    }

    #[test]
    fn uncoupled_sites_are_separate_and_exact() {
        let p = partition(&[], 5, 16);
        assert_eq!(p.groups.len(), 5);
        assert_eq!(p.dropped, 0);
    }

    #[test]
    fn small_coupled_system_is_one_group() {
        let p = partition(&chain(6, 1.0), 6, 16);
        assert_eq!(p.groups, vec![(0..6).collect::<Vec<_>>()]);
        assert_eq!(p.dropped, 0);
    }

    #[test]
    fn large_group_is_split_within_cap_dropping_weak_couplings() {
        let p = partition(&chain(40, 1.0), 40, 16);
        assert!(p.groups.iter().all(|g| g.len() <= 16));
        assert_eq!(p.groups.iter().map(Vec::len).sum::<usize>(), 40);
        assert!(p.dropped > 0);
        // Nearest neighbours (|w| = 1) are always the first to be joined, so at most the
        // few boundaries between groups cut one.
        assert!(p.dropped_max <= 1.0);
    }
}
