//! The aromaticity model: Hückel's 4n+2 rule over single rings and fused ring combinations.
//!
//! Each ring atom donates pi electrons according to its Kekulé neighbourhood:
//!
//! - one, if it carries a double bond inside a ring (benzene carbon, pyridine nitrogen);
//! - none, if its double bond leaves the ring towards a more electronegative atom (the C=O
//!   carbon of 2-pyridone or uracil), or if it is a carbocation (tropylium);
//! - two, if it has a lone pair and no double bond (pyrrole NH, furan O, thiophene S,
//!   azolide anion N-, cyclopentadienide C-);
//! - it breaks aromaticity otherwise (sp3 atoms, more than three connections, no p orbital).
//!
//! A ring, or a set of rings fused through shared bonds, is aromatic when every atom takes
//! part and the electrons number 4n+2; its atoms and ring bonds are then marked aromatic.
//! The model is applied to the Kekulé form, so aromatic and Kekulé input give the same
//! result. It follows the rules RDKit documents for its default model (RDKit Book,
//! "Aromaticity"), since results are checked against RDKit; differences are listed in
//! docs/rdkit-crosscheck.md.

use crate::elements::{allowed_valences, electronegativity, outer_electrons};
use crate::molecule::Molecule;

/// Largest number of fused rings taken together. Three covers the systems whose aromaticity
/// shows only in a combination (azulene needs two; pyromellitic dianhydride's anhydride rings
/// need the benzene ring and each other, three). Larger envelopes around quinone-like rings
/// would make C=O carbons of big polycyclic diones aromatic, which RDKit does not do; the
/// limit also keeps large fused sheets linear in time. Measured on the NCI 5K sample: limits
/// 2 to 5 agree with RDKit on all but one molecule (docs/rdkit-crosscheck.md).
const MAX_COMBINATION: usize = 3;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Donor {
    /// Not a candidate: breaks any ring it is in.
    No,
    /// An empty p orbital: 0 electrons.
    Vacant,
    One,
    Two,
}

impl Donor {
    fn electrons(self) -> usize {
        match self {
            Donor::No | Donor::Vacant => 0,
            Donor::One => 1,
            Donor::Two => 2,
        }
    }
}

fn donor(m: &Molecule, i: usize) -> Donor {
    let a = &m.atoms[i];
    if a.ring_count == 0 || !matches!(a.element, 5 | 6 | 7 | 8 | 15 | 16 | 33 | 34 | 52) {
        return Donor::No;
    }
    let degree = m.neighbors[i].len() as i32 + a.hydrogens as i32;
    if degree > 3 {
        return Donor::No;
    }
    let Some(dv) = allowed_valences(a.element, 0).and_then(|v| v.first().copied()) else {
        return Donor::No;
    };
    let dv = dv as i32;
    let mut multiple = 0;
    let mut cyclic_multiple = false;
    let mut exocyclic: Option<usize> = None;
    let mut unsaturation = 0;
    for nb in &m.neighbors[i] {
        let b = &m.bonds[nb.bond];
        if b.order >= 2 {
            multiple += 1;
            unsaturation += b.order as i32 - 1;
            if b.in_ring {
                cyclic_multiple = true;
            } else {
                exocyclic = Some(nb.atom);
            }
        }
    }
    if multiple > 1 {
        return Donor::No;
    }
    // Electrons the atom could give: free valence plus lone-pair electrons.
    let lone = (outer_electrons(a.element) - dv - a.charge as i32).max(0);
    let mut electrons = (dv - degree) + lone;
    if electrons > 1 && unsaturation > 1 {
        electrons = 1;
    }
    match electrons {
        e if e < 0 => Donor::No,
        0 => {
            if exocyclic.is_some() {
                Donor::Vacant
            } else if cyclic_multiple {
                Donor::One
            } else {
                Donor::No
            }
        }
        1 => {
            if let Some(other) = exocyclic {
                if electronegativity(m.atoms[other].element) > electronegativity(a.element) {
                    Donor::Vacant
                } else {
                    Donor::One
                }
            } else if multiple > 0 {
                Donor::One
            } else if a.charge == 1 {
                Donor::Vacant
            } else {
                Donor::No
            }
        }
        // A lone pair, unless a double bond (in the ring or out of it) already uses the
        // p orbital.
        _ => {
            if multiple > 0 {
                Donor::One
            } else {
                Donor::Two
            }
        }
    }
}

/// Ring bonds of a ring given in ring order.
fn ring_bond_list(m: &Molecule, ring: &[usize]) -> Vec<usize> {
    (0..ring.len())
        .filter_map(|k| m.bond_between(ring[k], ring[(k + 1) % ring.len()]))
        .collect()
}

/// Marks aromatic atoms and bonds by the model above.
///
/// # Reference
///
/// E. Hückel, Z. Physik 1931, 70, 204 (the 4n+2 rule); the per-atom electron counts follow
/// the RDKit Book, "Aromaticity", default model.
pub(crate) fn perceive_aromaticity(m: &mut Molecule) {
    let donors: Vec<Donor> = (0..m.atoms.len()).map(|i| donor(m, i)).collect();
    // Candidate rings as (index into `m.rings`, ring bonds).
    let rings: Vec<(usize, Vec<usize>)> = m
        .rings
        .iter()
        .enumerate()
        .filter(|(_, r)| r.iter().all(|&a| donors[a] != Donor::No))
        .map(|(i, r)| (i, ring_bond_list(m, r)))
        .collect();
    let k = rings.len();
    if k == 0 {
        return;
    }
    // Fused: rings sharing a bond.
    let mut rings_of_bond: Vec<Vec<usize>> = vec![Vec::new(); m.bonds.len()];
    for (r, (_, bonds)) in rings.iter().enumerate() {
        for &b in bonds {
            rings_of_bond[b].push(r);
        }
    }
    let fused: Vec<Vec<usize>> = (0..k)
        .map(|i| {
            let mut f: Vec<usize> = rings[i]
                .1
                .iter()
                .flat_map(|&b| rings_of_bond[b].iter().copied())
                .filter(|&j| j != i)
                .collect();
            f.sort_unstable();
            f.dedup();
            f
        })
        .collect();
    let mut group = vec![usize::MAX; k];
    let mut groups: Vec<Vec<usize>> = Vec::new();
    for s in 0..k {
        if group[s] != usize::MAX {
            continue;
        }
        let id = groups.len();
        group[s] = id;
        let mut members = vec![s];
        let mut stack = vec![s];
        while let Some(r) = stack.pop() {
            for &o in &fused[r] {
                if group[o] == usize::MAX {
                    group[o] = id;
                    members.push(o);
                    stack.push(o);
                }
            }
        }
        groups.push(members);
    }
    let mut aromatic_rings = vec![false; k];
    for members in &groups {
        for subset in connected_subsets(members, &fused) {
            if subset.iter().all(|&r| aromatic_rings[r]) {
                continue;
            }
            let mut atoms: Vec<usize> = subset
                .iter()
                .flat_map(|&r| m.rings[rings[r].0].iter().copied())
                .collect();
            atoms.sort_unstable();
            atoms.dedup();
            let electrons: usize = atoms.iter().map(|&a| donors[a].electrons()).sum();
            if electrons % 4 == 2 {
                for &r in &subset {
                    aromatic_rings[r] = true;
                }
            }
        }
    }
    for (r, (ring, bonds)) in rings.iter().enumerate() {
        if !aromatic_rings[r] {
            continue;
        }
        for &a in &m.rings[*ring] {
            m.atoms[a].aromatic = true;
        }
        for &b in bonds {
            m.bonds[b].aromatic = true;
        }
    }
}

/// Connected subsets of a fused ring group of up to [`MAX_COMBINATION`] rings.
fn connected_subsets(members: &[usize], fused: &[Vec<usize>]) -> Vec<Vec<usize>> {
    let limit = members.len().min(MAX_COMBINATION);
    let mut out: Vec<Vec<usize>> = Vec::new();
    let mut seen = std::collections::HashSet::new();
    let mut frontier: Vec<Vec<usize>> = members.iter().map(|&r| vec![r]).collect();
    for _ in 0..limit {
        let mut next = Vec::new();
        for s in frontier {
            if !seen.insert(s.clone()) {
                continue;
            }
            for &r in &s {
                for &o in &fused[r] {
                    if !s.contains(&o) {
                        let mut t = s.clone();
                        t.push(o);
                        t.sort_unstable();
                        next.push(t);
                    }
                }
            }
            out.push(s);
        }
        next.sort();
        next.dedup();
        frontier = next;
    }
    out
}
