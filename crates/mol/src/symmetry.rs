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
    packed_classes(m).unwrap_or_else(|| general_classes(m))
}

/// Most neighbours an atom may have for [`packed_classes`].
const PACKED_DEGREE: usize = 6;

/// The same classes as [`general_classes`], for molecules whose keys fit in fixed-width
/// integers (fewer than 2^24 atoms, at most [`PACKED_DEGREE`] neighbours, small counts):
/// each key is packed so that integer order is the key's order, and ranks come from one
/// sort of packed keys instead of a sort comparing tuples and slices. `None` otherwise.
fn packed_classes(m: &Molecule) -> Option<Vec<u32>> {
    let n = m.atoms.len();
    if n >= 1 << 24 {
        return None;
    }
    // (element, isotope, charge, degree, hydrogens, aromatic, in ring) in 8, 16, 8, 8, 9,
    // 1 and 1 bits, most significant first; the charge offset by 128 keeps its order.
    let mut keyed: Vec<(u64, u32)> = Vec::with_capacity(n);
    for i in 0..n {
        let a = &m.atoms[i];
        let (degree, hydrogens) = (m.degree(i), m.total_hydrogens(i));
        if degree > PACKED_DEGREE || hydrogens >= 1 << 9 {
            return None;
        }
        let key = (a.element as u64) << 43
            | (a.isotope.unwrap_or(0) as u64) << 27
            | ((a.charge as i16 + 128) as u64) << 19
            | (degree as u64) << 11
            | (hydrogens as u64) << 2
            | (a.aromatic as u64) << 1
            | (a.ring_count > 0) as u64;
        keyed.push((key, i as u32));
    }
    keyed.sort_unstable();
    let mut classes = vec![0u32; n];
    let mut class = 0u32;
    for k in 0..n {
        if k > 0 && keyed[k].0 != keyed[k - 1].0 {
            class += 1;
        }
        classes[keyed[k].1 as usize] = class;
    }
    let mut count = distinct(&classes);
    // A round's key: the atom's class, then its neighbour entries (class, bond order,
    // aromatic) sorted, each in 32 bits (24, 7 and 1, ordered as the tuple), two to a word;
    // unused places stay 0, below any entry (bond orders are at least 1), which orders a
    // shorter list before a longer one with the same start, as slices compare.
    let mut round: Vec<([u64; 4], u32)> = Vec::with_capacity(n);
    let mut entries = [0u32; PACKED_DEGREE];
    let mut next = vec![0u32; n];
    for _ in 0..n {
        if count == n {
            break;
        }
        round.clear();
        for i in 0..n {
            let nbs = &m.neighbors[i];
            for (e, nb) in entries.iter_mut().zip(nbs.iter()) {
                let b = &m.bonds[nb.bond];
                let order = if b.aromatic { 4 } else { b.order };
                *e = classes[nb.atom] << 8 | (order as u32) << 1 | b.aromatic as u32;
            }
            let list = &mut entries[..nbs.len()];
            list.sort_unstable();
            let mut words = [0u32; 8];
            words[0] = classes[i];
            words[1..1 + list.len()].copy_from_slice(list);
            let key = [
                (words[0] as u64) << 32 | words[1] as u64,
                (words[2] as u64) << 32 | words[3] as u64,
                (words[4] as u64) << 32 | words[5] as u64,
                (words[6] as u64) << 32 | words[7] as u64,
            ];
            round.push((key, i as u32));
        }
        round.sort_unstable();
        let mut class = 0u32;
        for k in 0..n {
            if k > 0 && round[k].0 != round[k - 1].0 {
                class += 1;
            }
            next[round[k].1 as usize] = class;
        }
        let c = distinct(&next);
        std::mem::swap(&mut classes, &mut next);
        if c == count {
            break;
        }
        count = c;
    }
    Some(classes)
}

/// [`symmetry_classes`] for any molecule, over tuple and slice keys.
fn general_classes(m: &Molecule) -> Vec<u32> {
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
    fn packed_keys_give_the_general_classes() {
        // Our sample, and the MOSES sample when present (not part of the repository).
        let root = concat!(env!("CARGO_MANIFEST_DIR"), "/../..");
        let mut text = std::fs::read_to_string(format!("{root}/tests/data/sample.smi"))
            .expect("tests/data/sample.smi");
        text.push_str(
            &std::fs::read_to_string(format!("{root}/../shared/data/moses-sample.smi"))
                .unwrap_or_default(),
        );
        let mut compared = 0;
        for line in text.lines().filter(|l| !l.starts_with('#')) {
            let Some(s) = line.split_whitespace().next() else {
                continue;
            };
            let Ok(m) = parse(s) else { continue };
            let packed = super::packed_classes(&m).expect("drug-like molecules fit the packing");
            assert_eq!(packed, super::general_classes(&m), "{s}");
            compared += 1;
        }
        assert!(compared > 50);
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
