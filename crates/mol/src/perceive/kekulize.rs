//! Kekulé bond orders for atoms written aromatic.

use super::matching::maximum_matching;
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
    let mut adj = vec![Vec::new(); needy.len()];
    for b in &m.bonds {
        if b.written_aromatic && needs_pi[b.a] && needs_pi[b.b] {
            adj[index[b.a]].push(index[b.b]);
            adj[index[b.b]].push(index[b.a]);
        }
    }
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
