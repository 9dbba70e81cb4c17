//! Ring perception: ring bonds, the smallest set of smallest rings, per-atom ring counts.

use std::collections::{HashSet, VecDeque};

use crate::molecule::Molecule;

/// Ring systems with more atoms than this take only the shortest cycle through each bond as
/// candidates; smaller ones also take Horton's vertex-rooted candidates, which guarantee a
/// minimum cycle basis. Bounds the work on very large fused systems.
const HORTON_LIMIT: usize = 300;

/// Finds ring bonds, the SSSR (stored in ring order), and each atom's ring count and
/// smallest ring.
///
/// # Reference
///
/// J. D. Horton, "A polynomial-time algorithm to find the shortest cycle basis of a graph",
/// SIAM J. Comput. 1987, 16, 358-366: candidate cycles, then a greedy choice of the
/// shortest linearly independent ones (Gaussian elimination over GF(2)). The number of
/// rings is the cyclomatic number E - V + C.
pub(crate) fn perceive_rings(m: &mut Molecule) {
    let done = SPARE_SCRATCH
        .try_with(|spare| {
            let mut s = spare.try_borrow_mut().ok()?;
            s.prepare(m);
            perceive_rings_with(m, &mut s);
            Some(())
        })
        .ok()
        .flatten();
    if done.is_none() {
        // The thread's arrays are in use or gone (thread teardown): new ones.
        let mut s = Scratch::default();
        s.prepare(m);
        perceive_rings_with(m, &mut s);
    }
}

fn perceive_rings_with(m: &mut Molecule, s: &mut Scratch) {
    let n = m.atoms.len();
    for a in &mut m.atoms {
        a.ring_count = 0;
        a.smallest_ring = 0;
    }
    let mut ring_bond = std::mem::take(&mut s.ring_bond);
    ring_bonds(m, s, &mut ring_bond);
    for (b, &r) in m.bonds.iter_mut().zip(&ring_bond) {
        b.in_ring = r;
    }
    if !ring_bond.iter().any(|&r| r) {
        m.rings = Vec::new();
        s.ring_bond = ring_bond;
        return;
    }
    // Ring systems: components of the ring-bond subgraph, their atoms and bonds (each
    // ascending) back to back in two lists, in the order of their lowest atoms. The
    // components of the depth-first tree without its bridges are the ring systems: in
    // preorder, an atom joins its parent's system over a ring bond and starts one
    // otherwise (provisional numbers, atoms outside rings included).
    let mut system = std::mem::take(&mut s.system);
    let mut system_atoms = std::mem::take(&mut s.system_atoms);
    let mut system_bonds = std::mem::take(&mut s.system_bonds);
    let mut systems = std::mem::take(&mut s.systems);
    let mut renumber = std::mem::take(&mut s.renumber);
    system.clear();
    system.resize(n, usize::MAX);
    // An atom with a ring bond has one in the tree too (a ring bond off the tree closes a
    // cycle of tree bonds through both its ends), so the atoms in rings are marked on the
    // way.
    let in_ring = &mut s.in_ring;
    in_ring.clear();
    in_ring.resize(n, false);
    let mut provisional = 0;
    for &(v, parent, via) in &s.preorder {
        if via != usize::MAX && ring_bond[via] {
            system[v] = system[parent];
            in_ring[v] = true;
            in_ring[parent] = true;
        } else {
            system[v] = provisional;
            provisional += 1;
        }
    }
    // Atoms outside rings leave the numbering; the systems are numbered by lowest atom
    // and sized (atoms and bonds) on the way.
    renumber.clear();
    renumber.resize(provisional, usize::MAX);
    systems.clear();
    for a in 0..n {
        if !in_ring[a] {
            system[a] = usize::MAX;
            continue;
        }
        let id = &mut renumber[system[a]];
        if *id == usize::MAX {
            *id = systems.len();
            systems.push((0, 0, 0, 0));
        }
        system[a] = *id;
        systems[*id].1 += 1;
    }
    for (bond, &r) in m.bonds.iter().zip(&ring_bond) {
        if r {
            systems[system[bond.a]].3 += 1;
        }
    }
    let (mut atoms_at, mut bonds_at) = (0, 0);
    for range in systems.iter_mut() {
        let (atoms, bonds) = (range.1, range.3);
        *range = (atoms_at, atoms_at, bonds_at, bonds_at);
        atoms_at += atoms;
        bonds_at += bonds;
    }
    system_atoms.clear();
    system_atoms.resize(atoms_at, 0);
    system_bonds.clear();
    system_bonds.resize(bonds_at, 0);
    for a in 0..n {
        if system[a] != usize::MAX {
            let range = &mut systems[system[a]];
            system_atoms[range.1] = a;
            range.1 += 1;
        }
    }
    for (b, (bond, &r)) in m.bonds.iter().zip(&ring_bond).enumerate() {
        if r {
            let range = &mut systems[system[bond.a]];
            system_bonds[range.3] = b;
            range.3 += 1;
        }
    }
    // As many rings as the cyclomatic number of the ring bonds.
    let wanted: usize = systems
        .iter()
        .map(|&(a0, a1, b0, b1)| (b1 - b0 + 1).saturating_sub(a1 - a0))
        .sum();
    let mut rings = Vec::with_capacity(wanted);
    for &(a0, a1, b0, b1) in &systems {
        let (atoms, bonds) = (&system_atoms[a0..a1], &system_bonds[b0..b1]);
        system_rings(m, atoms, bonds, &ring_bond, s, &mut rings);
    }
    for ring in &rings {
        for &a in ring {
            let atom = &mut m.atoms[a];
            atom.ring_count = atom.ring_count.saturating_add(1);
            let size = ring.len().min(255) as u8;
            if atom.smallest_ring == 0 || size < atom.smallest_ring {
                atom.smallest_ring = size;
            }
        }
    }
    m.rings = rings;
    s.ring_bond = ring_bond;
    s.system = system;
    s.system_atoms = system_atoms;
    s.system_bonds = system_bonds;
    s.systems = systems;
    s.renumber = renumber;
}

/// Bonds on a cycle (not bridges), by an iterative low-link depth-first search, into
/// `ring_bond`.
fn ring_bonds(m: &Molecule, s: &mut Scratch, ring_bond: &mut Vec<bool>) {
    let n = m.atoms.len();
    let Scratch {
        order,
        low,
        dfs,
        preorder,
        ..
    } = s;
    preorder.clear();
    order.clear();
    order.resize(n, usize::MAX);
    low.clear();
    low.resize(n, 0);
    // Every bond a ring bond until found to be a bridge.
    ring_bond.clear();
    ring_bond.resize(m.bonds.len(), true);
    let mut counter = 0;
    let spans = m.neighbors.spans();
    let list = m.neighbors.list();
    // (atom, bond we came by, next place in `list`, end of the atom's neighbours)
    let stack = dfs;
    stack.clear();
    for root in 0..n {
        if order[root] != usize::MAX {
            continue;
        }
        let (from, to) = spans[root];
        stack.push((root, usize::MAX, from as usize, to as usize));
        preorder.push((root, usize::MAX, usize::MAX));
        order[root] = counter;
        low[root] = counter;
        counter += 1;
        // The neighbours of the atom on top are read in one run, up to the first atom not
        // reached yet; the atom's low point stays in a register meanwhile.
        'walk: while let Some(top) = stack.last_mut() {
            let (v, via, mut next, end) = *top;
            let mut low_v = low[v];
            while next < end {
                let nb = list[next];
                next += 1;
                if nb.bond == via {
                    continue;
                }
                let seen = order[nb.atom];
                if seen == usize::MAX {
                    top.2 = next;
                    low[v] = low_v;
                    order[nb.atom] = counter;
                    low[nb.atom] = counter;
                    counter += 1;
                    let (from, to) = spans[nb.atom];
                    stack.push((nb.atom, nb.bond, from as usize, to as usize));
                    preorder.push((nb.atom, v, nb.bond));
                    continue 'walk;
                }
                low_v = low_v.min(seen);
            }
            low[v] = low_v;
            stack.pop();
            if let Some(&(parent, _, _, _)) = stack.last() {
                low[parent] = low[parent].min(low_v);
                if low_v > order[parent] {
                    ring_bond[via] = false;
                }
            }
        }
    }
}

/// Shortest path from `from` to `to` over ring bonds of the system, not using bond `skip`;
/// returns the atoms in order.
fn shortest_path(
    m: &Molecule,
    from: usize,
    to: usize,
    skip: usize,
    ring_bond: &[bool],
    search: &mut Search,
) -> Option<Vec<usize>> {
    let mut path = Vec::new();
    shortest_path_into(m, from, to, skip, ring_bond, search, &mut path).then_some(path)
}

/// As [`shortest_path`], appending the path to `out`; whether there is one (`out` is left
/// as it was when there is not).
fn shortest_path_into(
    m: &Molecule,
    from: usize,
    to: usize,
    skip: usize,
    ring_bond: &[bool],
    search: &mut Search,
    out: &mut Vec<usize>,
) -> bool {
    let Search {
        prev,
        queue,
        touched,
    } = search;
    touched.clear();
    touched.push(from);
    prev[from] = from;
    // A list read from the front serves as the queue: nothing is ever taken off it.
    queue.clear();
    queue.push(from);
    let mut head = 0;
    let mut found = false;
    'search: while let Some(&v) = queue.get(head) {
        head += 1;
        for nb in &m.neighbors[v] {
            if nb.bond == skip || !ring_bond[nb.bond] || prev[nb.atom] != usize::MAX {
                continue;
            }
            prev[nb.atom] = v;
            touched.push(nb.atom);
            if nb.atom == to {
                found = true;
                break 'search;
            }
            queue.push(nb.atom);
        }
    }
    if found {
        let begin = out.len();
        out.push(to);
        let mut v = to;
        while v != from {
            v = prev[v];
            out.push(v);
        }
        out[begin..].reverse();
    }
    for &t in touched.iter() {
        prev[t] = usize::MAX;
    }
    found
}

/// The breadth-first search's buffers, borrowed from [`Scratch`].
struct Search<'a> {
    prev: &'a mut [usize],
    queue: &'a mut Vec<usize>,
    touched: &'a mut Vec<usize>,
}

/// Breadth-first tree from `root`: parent of each atom (`usize::MAX` outside the tree).
fn bfs_tree(m: &Molecule, root: usize, ring_bond: &[bool], n: usize) -> (Vec<usize>, Vec<usize>) {
    let mut parent = vec![usize::MAX; n];
    let mut depth = vec![usize::MAX; n];
    parent[root] = root;
    depth[root] = 0;
    let mut queue = VecDeque::from([root]);
    while let Some(v) = queue.pop_front() {
        for nb in &m.neighbors[v] {
            if ring_bond[nb.bond] && depth[nb.atom] == usize::MAX {
                depth[nb.atom] = depth[v] + 1;
                parent[nb.atom] = v;
                queue.push_back(nb.atom);
            }
        }
    }
    (parent, depth)
}

fn path_to_root(parent: &[usize], mut v: usize) -> Vec<usize> {
    let mut p = vec![v];
    while parent[v] != v {
        v = parent[v];
        p.push(v);
    }
    p
}

/// Arrays of the ring perception, kept per thread between molecules: a batch perceives
/// one molecule after another, and allocating them afresh for each cost more than some of
/// the work they hold. `prev` and `column` are all `usize::MAX` between ring systems, so
/// many small systems cost no more than one big one.
#[derive(Default)]
struct Scratch {
    prev: Vec<usize>,
    column: Vec<usize>,
    queue: Vec<usize>,
    touched: Vec<usize>,
    /// Ring bonds, and the depth-first search that finds them.
    ring_bond: Vec<bool>,
    order: Vec<usize>,
    low: Vec<usize>,
    dfs: Vec<(usize, usize, usize, usize)>,
    /// Ring systems: system per atom, their atoms and bonds back to back, ranges.
    system: Vec<usize>,
    system_atoms: Vec<usize>,
    system_bonds: Vec<usize>,
    systems: Vec<(usize, usize, usize, usize)>,
    /// Provisional system number to final one.
    renumber: Vec<usize>,
    /// The depth-first search's atoms in the order reached, each with its parent and the
    /// bond from it (`usize::MAX` for roots); atoms with a ring bond.
    preorder: Vec<(usize, usize, usize)>,
    in_ring: Vec<bool>,
    /// Candidate cycles of a small system, and its reduced rows.
    flat: Vec<usize>,
    candidates: Vec<(usize, usize, u64)>,
    canon: Vec<usize>,
    rows: Vec<(u32, u64)>,
    /// Per atom: its number within the small ring system being perceived.
    local: Vec<usize>,
}

thread_local! {
    /// The arrays of the last ring perception on this thread, used where they lie.
    static SPARE_SCRATCH: std::cell::RefCell<Scratch> = std::cell::RefCell::default();
}

impl Scratch {
    /// Makes the arrays ready for `m`: `prev` and `column` all `usize::MAX` (set here, so
    /// arrays of a perception that did not finish do no harm).
    fn prepare(&mut self, m: &Molecule) {
        self.prev.clear();
        self.prev.resize(m.atoms.len(), usize::MAX);
        self.column.clear();
        self.column.resize(m.bonds.len(), usize::MAX);
        // Only ever read where just written.
        if self.local.len() < m.atoms.len() {
            self.local.resize(m.atoms.len(), 0);
        }
    }
}

/// The rings of one ring system, appended to `out`.
fn system_rings(
    m: &Molecule,
    atoms: &[usize],
    bonds: &[usize],
    ring_bond: &[bool],
    scratch: &mut Scratch,
    out: &mut Vec<Vec<usize>>,
) {
    if atoms.len() == bonds.len() {
        out.push(simple_cycle(
            m,
            atoms[0],
            ring_bond,
            atoms.len(),
            &mut scratch.flat,
        ));
        return;
    }
    for (k, &b) in bonds.iter().enumerate() {
        scratch.column[b] = k;
    }
    let Scratch {
        prev,
        column,
        queue,
        touched,
        flat,
        candidates,
        canon,
        rows,
        local,
        ..
    } = scratch;
    let mut search = Search {
        prev,
        queue,
        touched,
    };
    let done = if bonds.len() <= 64 {
        let mut buffers = SmallBuffers {
            flat,
            candidates,
            canon,
            rows,
        };
        small_system_rings(m, atoms, bonds, ring_bond, local, column, &mut buffers, out)
    } else {
        false
    };
    if !done {
        out.extend(system_rings_with(
            m,
            atoms,
            bonds,
            ring_bond,
            &mut search,
            column,
        ));
    }
    for &b in bonds {
        scratch.column[b] = usize::MAX;
    }
}

/// The one ring of a system with as many bonds as atoms (a single ring, fused to nothing):
/// walked from `start` (into `walk`) and put in canonical form, as the general path would
/// choose it (its only candidate is that cycle).
fn simple_cycle(
    m: &Molecule,
    start: usize,
    ring_bond: &[bool],
    size: usize,
    walk: &mut Vec<usize>,
) -> Vec<usize> {
    walk.clear();
    walk.push(start);
    let mut prev = usize::MAX;
    let mut v = start;
    loop {
        let next = m.neighbors[v]
            .iter()
            .find(|nb| ring_bond[nb.bond] && nb.atom != prev)
            .map(|nb| nb.atom);
        match next {
            Some(w) if w != start => {
                walk.push(w);
                prev = v;
                v = w;
            }
            _ => break,
        }
    }
    let mut cycle = Vec::with_capacity(size);
    canonical_into(walk, &mut cycle);
    cycle
}

/// The buffers [`small_system_rings`] works in, borrowed from [`Scratch`].
struct SmallBuffers<'a> {
    flat: &'a mut Vec<usize>,
    candidates: &'a mut Vec<(usize, usize, u64)>,
    canon: &'a mut Vec<usize>,
    rows: &'a mut Vec<(u32, u64)>,
}

/// A ring system of at most 64 bonds with its atoms numbered from 0 (in the system's
/// order) and each atom's ring bonds, in the molecule's neighbour order, as (neighbour,
/// column of the bond): the breadth-first searches of [`small_system_rings`] run over this,
/// on the stack, rather than over the whole molecule.
struct LocalGraph {
    spans: [(u8, u8); 64],
    list: [(u8, u8); 128],
}

impl LocalGraph {
    /// `None` if the system does not fit (more than 64 atoms cannot happen with at most 64
    /// bonds and a cycle, but is checked).
    fn new(
        m: &Molecule,
        atoms: &[usize],
        ring_bond: &[bool],
        column: &[usize],
        local: &mut [usize],
    ) -> Option<Self> {
        if atoms.len() > 64 {
            return None;
        }
        for (k, &a) in atoms.iter().enumerate() {
            local[a] = k;
        }
        let mut g = LocalGraph {
            spans: [(0, 0); 64],
            list: [(0, 0); 128],
        };
        let mut next = 0usize;
        for (k, &a) in atoms.iter().enumerate() {
            let from = next;
            for nb in &m.neighbors[a] {
                if !ring_bond[nb.bond] {
                    continue;
                }
                // Each of at most 64 bonds is listed from its two ends.
                g.list[next] = (local[nb.atom] as u8, column[nb.bond] as u8);
                next += 1;
            }
            g.spans[k] = (from as u8, next as u8);
        }
        Some(g)
    }

    /// Shortest path from local atom `from` to `to` not using the bond in column `skip`, as
    /// [`shortest_path_into`] finds it (the same neighbour order, so the same path): its
    /// atoms (of the molecule) appended to `out`, and its bond set with the skipped bond
    /// (the cycle's). `None` (and `out` as it was) when there is none.
    fn cycle_into(
        &self,
        atoms: &[usize],
        from: usize,
        to: usize,
        skip: u8,
        out: &mut Vec<usize>,
    ) -> Option<u64> {
        let mut prev = [u8::MAX; 64];
        let mut via = [0u8; 64];
        let mut queue = [0u8; 64];
        let (mut head, mut tail) = (0usize, 1usize);
        queue[0] = from as u8;
        prev[from] = from as u8;
        let mut found = false;
        'search: while head < tail {
            let v = queue[head] as usize;
            head += 1;
            let (start, end) = self.spans[v];
            for &(w, c) in &self.list[start as usize..end as usize] {
                if c == skip || prev[w as usize] != u8::MAX {
                    continue;
                }
                prev[w as usize] = v as u8;
                via[w as usize] = c;
                if w as usize == to {
                    found = true;
                    break 'search;
                }
                queue[tail] = w;
                tail += 1;
            }
        }
        if !found {
            return None;
        }
        // The path read back from `to`, then appended from `from`.
        let mut bits = 1u64 << skip;
        let mut path = [0u8; 64];
        let mut len = 1;
        path[0] = to as u8;
        let mut v = to;
        while v != from {
            bits |= 1u64 << via[v];
            v = prev[v] as usize;
            path[len] = v as u8;
            len += 1;
        }
        out.extend(path[..len].iter().rev().map(|&l| atoms[l as usize]));
        Some(bits)
    }
}

/// The rings of a system of at most 64 bonds, each bond set one `u64`: the same candidates,
/// order and choice as [`system_rings_with`] without a vector per candidate, appended to
/// `out`. `false` (and `out` as it was) when the shortest cycles through each bond do not
/// give a full basis, which the general path (with Horton's candidates) then finds.
#[allow(clippy::too_many_arguments)]
fn small_system_rings(
    m: &Molecule,
    atoms: &[usize],
    bonds: &[usize],
    ring_bond: &[bool],
    local: &mut [usize],
    column: &[usize],
    buffers: &mut SmallBuffers,
    out: &mut Vec<Vec<usize>>,
) -> bool {
    let wanted = bonds.len() + 1 - atoms.len();
    let Some(graph) = LocalGraph::new(m, atoms, ring_bond, column, local) else {
        return false;
    };
    // Candidate cycles back to back in `flat`, each as (start, end, bond set).
    let SmallBuffers {
        flat,
        candidates,
        canon,
        rows,
    } = buffers;
    flat.clear();
    candidates.clear();
    for (k, &b) in bonds.iter().enumerate() {
        let (x, y) = (local[m.bonds[b].a], local[m.bonds[b].b]);
        let begin = flat.len();
        if let Some(v) = graph.cycle_into(atoms, x, y, k as u8, flat) {
            if candidates.iter().any(|c| c.2 == v) {
                flat.truncate(begin);
            } else {
                candidates.push((begin, flat.len(), v));
            }
        }
    }
    if candidates.len() < wanted {
        return false;
    }
    // Canonical forms, in place: the same bond set, read the same way however found.
    canon.clear();
    for c in candidates.iter_mut() {
        let begin = canon.len();
        canonical_into(&flat[c.0..c.1], canon);
        *c = (begin, canon.len(), c.2);
    }
    candidates.sort_by(|a, b| {
        (a.1 - a.0)
            .cmp(&(b.1 - b.0))
            .then_with(|| canon[a.0..a.1].cmp(&canon[b.0..b.1]))
    });
    rows.clear();
    let first = out.len();
    for &(begin, end, mut v) in candidates.iter() {
        if out.len() - first == wanted {
            break;
        }
        for &(pivot, row) in rows.iter() {
            if v >> pivot & 1 == 1 {
                v ^= row;
            }
        }
        if v == 0 {
            continue;
        }
        let pivot = v.trailing_zeros();
        let at = rows.partition_point(|&(p, _)| p < pivot);
        rows.insert(at, (pivot, v));
        out.push(canon[begin..end].to_vec());
    }
    if out.len() - first == wanted {
        true
    } else {
        out.truncate(first);
        false
    }
}

fn system_rings_with(
    m: &Molecule,
    atoms: &[usize],
    bonds: &[usize],
    ring_bond: &[bool],
    search: &mut Search,
    column: &[usize],
) -> Vec<Vec<usize>> {
    let n = m.atoms.len();
    let wanted = bonds.len() + 1 - atoms.len();
    let words = bonds.len().div_ceil(64);
    let mut candidates: Vec<Vec<usize>> = Vec::new();
    // Distinct bond sets. Most systems have a few dozen candidates at most: a list is
    // cheaper than hashing there.
    let mut seen = Seen::new(bonds.len() > 64);
    let mut add = |cycle: Vec<usize>, candidates: &mut Vec<Vec<usize>>| {
        let v = bits(m, &cycle, column, words);
        if seen.insert(v) {
            candidates.push(cycle);
        }
    };
    for &b in bonds {
        let (x, y) = (m.bonds[b].a, m.bonds[b].b);
        if let Some(path) = shortest_path(m, x, y, b, ring_bond, search) {
            add(path, &mut candidates);
        }
    }
    let mut basis = choose(m, &candidates, column, words, wanted);
    if basis.len() < wanted && atoms.len() <= HORTON_LIMIT {
        for &r in atoms {
            let (parent, depth) = bfs_tree(m, r, ring_bond, n);
            for &b in bonds {
                let (x, y) = (m.bonds[b].a, m.bonds[b].b);
                if depth[x] == usize::MAX || depth[y] == usize::MAX {
                    continue;
                }
                if parent[x] == y || parent[y] == x {
                    continue;
                }
                let px = path_to_root(&parent, x);
                let py = path_to_root(&parent, y);
                // The two tree paths may meet only at the root.
                let sx: HashSet<usize> = px[..px.len() - 1].iter().copied().collect();
                if py[..py.len() - 1].iter().any(|a| sx.contains(a)) {
                    continue;
                }
                let mut cycle = px;
                cycle.pop();
                cycle.extend(py.into_iter().rev());
                add(cycle, &mut candidates);
            }
        }
        basis = choose(m, &candidates, column, words, wanted);
    }
    basis
}

/// A set of bond sets: a list for small ring systems, a hash set for large ones.
enum Seen {
    List(Vec<Vec<u64>>),
    Hashed(HashSet<Vec<u64>>),
}

impl Seen {
    fn new(large: bool) -> Self {
        if large {
            Seen::Hashed(HashSet::new())
        } else {
            Seen::List(Vec::new())
        }
    }

    /// Adds `v`; whether it was new.
    fn insert(&mut self, v: Vec<u64>) -> bool {
        match self {
            Seen::List(list) => {
                if list.contains(&v) {
                    false
                } else {
                    list.push(v);
                    true
                }
            }
            Seen::Hashed(set) => set.insert(v),
        }
    }
}

fn bits(m: &Molecule, cycle: &[usize], column: &[usize], words: usize) -> Vec<u64> {
    let mut v = vec![0u64; words];
    for k in 0..cycle.len() {
        let (a, b) = (cycle[k], cycle[(k + 1) % cycle.len()]);
        if let Some(bond) = m.bond_between(a, b) {
            let c = column[bond];
            if c != usize::MAX {
                v[c / 64] |= 1 << (c % 64);
            }
        }
    }
    v
}

/// Greedy choice of short, independent cycles: Gaussian elimination over GF(2).
fn choose(
    m: &Molecule,
    candidates: &[Vec<usize>],
    column: &[usize],
    words: usize,
    wanted: usize,
) -> Vec<Vec<usize>> {
    // Canonical forms make the order, and so the chosen rings, independent of how the
    // candidates were found.
    let mut candidates: Vec<Vec<usize>> = candidates.iter().map(|c| canonical(c)).collect();
    candidates.sort_by(|a, b| a.len().cmp(&b.len()).then_with(|| a.cmp(b)));
    // Reduced rows, each with its pivot bit.
    let mut rows: Vec<(usize, Vec<u64>)> = Vec::new();
    let mut chosen = Vec::new();
    for cycle in candidates {
        if chosen.len() == wanted {
            break;
        }
        let mut v = bits(m, &cycle, column, words);
        for (pivot, row) in &rows {
            if v[pivot / 64] >> (pivot % 64) & 1 == 1 {
                for (x, y) in v.iter_mut().zip(row) {
                    *x ^= y;
                }
            }
        }
        let Some(pivot) = first_bit(&v) else { continue };
        // Rows stay sorted by their lowest bit, so one pass in order reduces fully.
        let at = rows.partition_point(|(p, _)| *p < pivot);
        rows.insert(at, (pivot, v));
        chosen.push(cycle);
    }
    chosen
}

fn first_bit(v: &[u64]) -> Option<usize> {
    v.iter()
        .enumerate()
        .find(|(_, w)| **w != 0)
        .map(|(i, w)| i * 64 + w.trailing_zeros() as usize)
}

/// [`canonical`], appended to `out`.
fn canonical_into(cycle: &[usize], out: &mut Vec<usize>) {
    let n = cycle.len();
    let Some(start) = (0..n).min_by_key(|&i| cycle[i]) else {
        return;
    };
    if n > 1 && cycle[(start + n - 1) % n] < cycle[(start + 1) % n] {
        out.extend((0..n).map(|k| cycle[(start + n - k) % n]));
    } else {
        out.extend((0..n).map(|k| cycle[(start + k) % n]));
    }
}

/// The ring rotated to start at its lowest atom, going towards the lower neighbour: the same
/// ring always reads the same way.
fn canonical(cycle: &[usize]) -> Vec<usize> {
    let n = cycle.len();
    let Some(start) = (0..n).min_by_key(|&i| cycle[i]) else {
        return Vec::new();
    };
    // backward[1] is the atom before the start, forward[1] the one after.
    if n > 1 && cycle[(start + n - 1) % n] < cycle[(start + 1) % n] {
        (0..n).map(|k| cycle[(start + n - k) % n]).collect()
    } else {
        (0..n).map(|k| cycle[(start + k) % n]).collect()
    }
}
