//! Kekulé bond orders for atoms written aromatic.

use super::matching::{maximum_matching_in, Arrays, Lists};
use crate::molecule::Molecule;
use crate::{Error, ErrorKind};

/// Gives each written-aromatic atom that has a free valence exactly one double bond among
/// its written-aromatic bonds; the other written-aromatic bonds become single.
///
/// Fails with [`ErrorKind::Kekulize`] when no such assignment exists (e.g. `c1cccc1`, or
/// pyrrole written without its `[nH]`).
pub(crate) fn kekulize(m: &mut Molecule, needs_pi: &[bool]) -> Result<(), Error> {
    if !needs_pi.contains(&true) {
        return Ok(());
    }
    let done = SPARE_SCRATCH
        .try_with(|spare| {
            let mut s = spare.try_borrow_mut().ok()?;
            Some(kekulize_with(m, needs_pi, &mut s))
        })
        .ok()
        .flatten();
    match done {
        Some(result) => result,
        // The thread's arrays are in use or gone (thread teardown): new ones.
        None => kekulize_with(m, needs_pi, &mut Scratch::default()),
    }
}

/// Arrays of the Kekulé assignment, kept per thread between molecules (allocating them
/// afresh for each molecule cost a good part of the work); each is cleared and sized
/// before use.
#[derive(Default)]
struct Scratch {
    needy: Vec<usize>,
    index: Vec<usize>,
    start: Vec<usize>,
    fill: Vec<usize>,
    items: Vec<usize>,
    /// The bonds between needy atoms: (bond, place of one atom, place of the other).
    edges: Vec<(usize, usize, usize)>,
    matching: Arrays,
}

thread_local! {
    /// The arrays of the last Kekulé assignment on this thread, used where they lie.
    static SPARE_SCRATCH: std::cell::RefCell<Scratch> = std::cell::RefCell::default();
}

fn kekulize_with(m: &mut Molecule, needs_pi: &[bool], s: &mut Scratch) -> Result<(), Error> {
    let needy = &mut s.needy;
    needy.clear();
    let index = &mut s.index;
    index.clear();
    index.resize(m.atoms.len(), usize::MAX);
    for (i, &needs) in needs_pi.iter().enumerate() {
        if needs {
            index[i] = needy.len();
            needy.push(i);
        }
    }
    // The bonds between needy atoms, in bond order (bond, and its two atoms' places among
    // the needy), read once; then as adjacency lists (counted, then filled: the same
    // lists, in the same order, as pushing bond by bond).
    let found = &mut s.edges;
    found.clear();
    for (k, b) in m.bonds.iter().enumerate() {
        if b.written_aromatic && needs_pi[b.a] && needs_pi[b.b] {
            found.push((k, index[b.a], index[b.b]));
        }
    }
    let edges = || found.iter().map(|&(_, a, b)| (a, b));
    let mut start = std::mem::take(&mut s.start);
    start.clear();
    start.resize(needy.len() + 1, 0);
    for (a, b) in edges() {
        start[a + 1] += 1;
        start[b + 1] += 1;
    }
    for v in 0..needy.len() {
        start[v + 1] += start[v];
    }
    let fill = &mut s.fill;
    fill.clear();
    fill.extend_from_slice(&start);
    let mut items = std::mem::take(&mut s.items);
    items.clear();
    items.resize(start[needy.len()], 0);
    for (a, b) in edges() {
        items[fill[a]] = b;
        fill[a] += 1;
        items[fill[b]] = a;
        fill[b] += 1;
    }
    let adj = Lists { start, items };
    let result = assign(m, needy, found, &adj, &mut s.matching);
    s.start = adj.start;
    s.items = adj.items;
    result
}

/// The double bonds from a maximum matching of the needy atoms, or the error when some
/// atom is left without one.
fn assign(
    m: &mut Molecule,
    needy: &[usize],
    edges: &[(usize, usize, usize)],
    adj: &Lists,
    arrays: &mut Arrays,
) -> Result<(), Error> {
    let mate = maximum_matching_in(adj, arrays);
    if let Some(k) = mate.iter().position(|&w| w == usize::MAX) {
        // No single atom is to blame: the carets cover the aromatic system it sits in.
        let mut seen = vec![false; needy.len()];
        let mut stack = vec![k];
        seen[k] = true;
        let mut span = m.atoms[needy[k]].span;
        while let Some(v) = stack.pop() {
            let s = m.atoms[needy[v]].span;
            span.start = span.start.min(s.start);
            span.end = span.end.max(s.end);
            for &w in &adj[v] {
                if !seen[w] {
                    seen[w] = true;
                    stack.push(w);
                }
            }
        }
        return Err(Error::new(ErrorKind::Kekulize, &m.input, span));
    }
    for &(bond, ka, kb) in edges {
        if mate[ka] == kb {
            m.bonds[bond].order = 2;
        }
    }
    Ok(())
}
