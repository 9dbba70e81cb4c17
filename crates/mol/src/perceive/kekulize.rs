//! Kekulé bond orders for atoms written aromatic.

use super::matching::{maximum_matching, Lists};
use crate::molecule::Molecule;
use crate::{Error, ErrorKind};

/// Gives each written-aromatic atom that has a free valence exactly one double bond among
/// its written-aromatic bonds; the other written-aromatic bonds become single.
///
/// Fails with [`ErrorKind::Kekulize`] when no such assignment exists (e.g. `c1cccc1`, or
/// pyrrole written without its `[nH]`).
pub(crate) fn kekulize(m: &mut Molecule, needs_pi: &[bool]) -> Result<(), Error> {
    let needy: Vec<usize> = (0..m.atoms.len()).filter(|&i| needs_pi[i]).collect();
    if needy.is_empty() {
        return Ok(());
    }
    let mut index = vec![usize::MAX; m.atoms.len()];
    for (k, &a) in needy.iter().enumerate() {
        index[a] = k;
    }
    // The bonds between needy atoms, in bond order, as adjacency lists (counted, then
    // filled: the same lists, in the same order, as pushing bond by bond).
    let edges = || {
        m.bonds
            .iter()
            .filter(|b| b.written_aromatic && needs_pi[b.a] && needs_pi[b.b])
            .map(|b| (index[b.a], index[b.b]))
    };
    let mut start = vec![0usize; needy.len() + 1];
    for (a, b) in edges() {
        start[a + 1] += 1;
        start[b + 1] += 1;
    }
    for v in 0..needy.len() {
        start[v + 1] += start[v];
    }
    let mut fill = start.clone();
    let mut items = vec![0usize; start[needy.len()]];
    for (a, b) in edges() {
        items[fill[a]] = b;
        fill[a] += 1;
        items[fill[b]] = a;
        fill[b] += 1;
    }
    let adj = Lists { start, items };
    let mate = maximum_matching(&adj);
    if let Some(k) = mate.iter().position(Option::is_none) {
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
    for b in &mut m.bonds {
        if b.written_aromatic && needs_pi[b.a] && needs_pi[b.b] {
            let (ka, kb) = (index[b.a], index[b.b]);
            if mate[ka] == Some(kb) {
                b.order = 2;
            }
        }
    }
    Ok(())
}
