//! Symmetry classes by iterated refinement of atom invariants.

use crate::molecule::Molecule;

/// Class numbers such that topologically equivalent atoms share one.
///
/// Atoms start from an invariant (element, isotope, charge, degree, hydrogens, aromaticity,
/// ring membership); each round an atom's class is refined by the sorted classes of its
/// neighbours and the bonds to them, until the number of classes stops growing. Classes are
/// numbered by the rank of their invariants, so they do not depend on input order.
///
/// # Reference
///
/// H. L. Morgan, "The generation of a unique machine description for chemical structures",
/// J. Chem. Doc. 1965, 5, 107-113 (iterated neighbour refinement; here on ranks rather than
/// sums, so classes only split and the loop ends within n rounds).
pub fn symmetry_classes(m: &Molecule) -> Vec<u32> {
    let n = m.atoms.len();
    let initial: Vec<(u8, u16, i8, usize, usize, bool, bool)> = (0..n)
        .map(|i| {
            let a = &m.atoms[i];
            (
                a.element,
                a.isotope.unwrap_or(0),
                a.charge,
                m.degree(i),
                m.total_hydrogens(i),
                a.aromatic,
                a.ring_count > 0,
            )
        })
        .collect();
    let mut classes = rank(&initial);
    let mut count = distinct(&classes);
    // Each round's keys, flat: an atom's sorted neighbour entries sit at
    // `flat[start[i]..start[i + 1]]`, each entry (class, bond order, aromatic) packed in a
    // u64 so that integer order is tuple order.
    let mut start = Vec::with_capacity(n + 1);
    start.push(0);
    for i in 0..n {
        start.push(start[i] + m.neighbors[i].len());
    }
    let mut flat = vec![0u64; start[n]];
    let mut idx: Vec<usize> = Vec::with_capacity(n);
    let mut next = vec![0u32; n];
    for _ in 0..n {
        // All atoms already apart: a round would rank by the classes alone and give them
        // back unchanged.
        if count == n {
            break;
        }
        for i in 0..n {
            let entries = &mut flat[start[i]..start[i + 1]];
            for (e, nb) in entries.iter_mut().zip(m.neighbors[i].iter()) {
                let b = &m.bonds[nb.bond];
                // Aromatic bonds compare as one kind whatever their Kekulé order.
                let order = if b.aromatic { 4 } else { b.order };
                *e = (classes[nb.atom] as u64) << 16 | (order as u64) << 8 | b.aromatic as u64;
            }
            entries.sort_unstable();
        }
        let key = |i: usize| (classes[i], &flat[start[i]..start[i + 1]]);
        idx.clear();
        idx.extend(0..n);
        // Equal keys get one class whatever their order: no need for a stable sort.
        idx.sort_unstable_by(|&a, &b| key(a).cmp(&key(b)));
        let mut class = 0u32;
        for k in 0..n {
            if k > 0 && key(idx[k]) != key(idx[k - 1]) {
                class += 1;
            }
            next[idx[k]] = class;
        }
        let c = distinct(&next);
        std::mem::swap(&mut classes, &mut next);
        if c == count {
            break;
        }
        count = c;
    }
    classes
}

fn rank<T: Ord>(keys: &[T]) -> Vec<u32> {
    let mut idx: Vec<usize> = (0..keys.len()).collect();
    idx.sort_unstable_by(|&a, &b| keys[a].cmp(&keys[b]));
    let mut out = vec![0u32; keys.len()];
    let mut class = 0u32;
    for k in 0..idx.len() {
        if k > 0 && keys[idx[k]] != keys[idx[k - 1]] {
            class += 1;
        }
        out[idx[k]] = class;
    }
    out
}

fn distinct(classes: &[u32]) -> usize {
    classes.iter().max().map_or(0, |&m| m as usize + 1)
}

#[cfg(test)]
mod tests {
    use crate::{parse, symmetry_classes};

    fn classes(s: &str) -> Vec<u32> {
        symmetry_classes(&parse(s).expect("test SMILES reads"))
    }

    #[test]
    fn piperazine_nitrogens_are_equivalent() {
        let c = classes("C1CNCCN1");
        assert_eq!(c[2], c[5]);
        assert_eq!(c[0], c[1]);
        assert_ne!(c[0], c[2]);
    }

    #[test]
    fn succinic_acid_carboxyls_are_equivalent() {
        // O0 C1 (=O2) C3 C4 C5 (O6) =O7
        let c = classes("OC(=O)CCC(O)=O");
        assert_eq!(c[1], c[5]);
        assert_eq!(c[0], c[6]);
        assert_eq!(c[2], c[7]);
        assert_ne!(c[0], c[2]);
    }

    #[test]
    fn substituted_pyridine_positions_differ() {
        // 4-methylpyridine: C2/C6 alike, C3/C5 alike, N and C4 apart.
        let c = classes("Cc1ccncc1");
        assert_eq!(c[2], c[6]);
        assert_eq!(c[3], c[5]);
        assert_ne!(c[2], c[3]);
        assert_ne!(c[4], c[1]);
        // 3-methylpyridine has no mirror: every ring atom differs.
        let c = classes("Cc1cccnc1");
        let ring = &c[1..];
        let mut sorted = ring.to_vec();
        sorted.sort_unstable();
        sorted.dedup();
        assert_eq!(sorted.len(), ring.len());
    }

    #[test]
    fn classes_do_not_depend_on_atom_order() {
        let a = classes("OCC(=O)O");
        let b = classes("OC(=O)CO");
        let mut x = a.clone();
        let mut y = b.clone();
        x.sort_unstable();
        y.sort_unstable();
        assert_eq!(x, y);
        // The alcohol O (atom 0 / atom 4) has the same class number in both.
        assert_eq!(a[0], b[4]);
    }
}
