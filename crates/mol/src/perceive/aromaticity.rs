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
// The counting below enumerates combinations of one, two and three rings only.
const _: () = assert!(MAX_COMBINATION <= 3);

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

/// Marks aromatic atoms and bonds by the model above.
///
/// Every connected combination of up to [`MAX_COMBINATION`] candidate rings (a ring, two
/// rings sharing a bond, three rings of which one shares a bond with each of the others)
/// is counted; a ring is aromatic when any combination containing it has 4n+2 electrons.
/// The outcome does not depend on the order the combinations are counted in.
///
/// # Reference
///
/// E. Hückel, Z. Physik 1931, 70, 204 (the 4n+2 rule); the per-atom electron counts follow
/// the RDKit Book, "Aromaticity", default model.
pub(crate) fn perceive_aromaticity(m: &mut Molecule) {
    if m.rings.is_empty() {
        return;
    }
    let done = SPARE_SCRATCH
        .try_with(|spare| {
            let mut s = spare.try_borrow_mut().ok()?;
            perceive_with(m, &mut s);
            Some(())
        })
        .ok()
        .flatten();
    if done.is_none() {
        // The thread's arrays are in use or gone (thread teardown): new ones.
        perceive_with(m, &mut Scratch::default());
    }
}

/// Arrays of the aromaticity perception, kept per thread between molecules (allocating
/// them afresh for each molecule cost more than some of the counting); each is cleared
/// and sized before use.
#[derive(Default)]
struct Scratch {
    donors: Vec<Donor>,
    rings: Vec<usize>,
    bond_start: Vec<usize>,
    bonds: Vec<usize>,
    per_bond: Vec<usize>,
    fill: Vec<usize>,
    rings_of_bond: Vec<usize>,
    fused_start: Vec<usize>,
    fused: Vec<usize>,
    aromatic_rings: Vec<bool>,
    stamp: Vec<u32>,
}

thread_local! {
    /// The arrays of the last aromaticity perception on this thread, used where they lie.
    static SPARE_SCRATCH: std::cell::RefCell<Scratch> = std::cell::RefCell::default();
}

fn perceive_with(m: &mut Molecule, s: &mut Scratch) {
    let Scratch {
        donors,
        rings,
        bond_start,
        bonds,
        per_bond,
        fill,
        rings_of_bond,
        fused_start,
        fused,
        aromatic_rings,
        stamp,
    } = s;
    donors.clear();
    // Atoms outside rings (about half) are no candidates, known without a call.
    donors.extend(m.atoms.iter().enumerate().map(|(i, a)| {
        if a.ring_count == 0 {
            Donor::No
        } else {
            donor(m, i)
        }
    }));
    // Candidate rings (index into `m.rings`), their ring bonds back to back in `bonds`.
    rings.clear();
    bond_start.clear();
    bond_start.push(0);
    bonds.clear();
    for (i, r) in m.rings.iter().enumerate() {
        if r.iter().any(|&a| donors[a] == Donor::No) {
            continue;
        }
        rings.push(i);
        bonds.extend((0..r.len()).filter_map(|k| m.bond_between(r[k], r[(k + 1) % r.len()])));
        bond_start.push(bonds.len());
    }
    let k = rings.len();
    if k == 0 {
        return;
    }
    let ring_bonds = |r: usize| &bonds[bond_start[r]..bond_start[r + 1]];
    // Fused: rings sharing a bond, found through the rings of each bond (counted, then
    // filled), each ring's list sorted and without repeats.
    per_bond.clear();
    per_bond.resize(m.bonds.len() + 1, 0);
    for &b in bonds.iter() {
        per_bond[b + 1] += 1;
    }
    for b in 0..m.bonds.len() {
        per_bond[b + 1] += per_bond[b];
    }
    fill.clear();
    fill.extend_from_slice(per_bond);
    rings_of_bond.clear();
    rings_of_bond.resize(bonds.len(), 0);
    for r in 0..k {
        for &b in ring_bonds(r) {
            rings_of_bond[fill[b]] = r;
            fill[b] += 1;
        }
    }
    fused_start.clear();
    fused_start.push(0);
    fused.clear();
    for r in 0..k {
        let from = fused.len();
        for &b in ring_bonds(r) {
            fused.extend(
                rings_of_bond[per_bond[b]..per_bond[b + 1]]
                    .iter()
                    .copied()
                    .filter(|&o| o != r),
            );
        }
        fused[from..].sort_unstable();
        let mut kept = from;
        for j in from..fused.len() {
            if j == from || fused[j] != fused[kept - 1] {
                fused[kept] = fused[j];
                kept += 1;
            }
        }
        fused.truncate(kept);
        fused_start.push(fused.len());
    }
    let fused_of = |r: usize| &fused[fused_start[r]..fused_start[r + 1]];
    aromatic_rings.clear();
    aromatic_rings.resize(k, false);
    // Atoms of the combination being counted carry its stamp, so shared atoms count once.
    stamp.clear();
    stamp.resize(m.atoms.len(), 0);
    let mut current = 0u32;
    let mut count = |subset: &[usize], aromatic_rings: &mut [bool]| {
        if subset.iter().all(|&r| aromatic_rings[r]) {
            return;
        }
        current += 1;
        let mut electrons = 0usize;
        for &r in subset {
            for &a in &m.rings[rings[r]] {
                if stamp[a] != current {
                    stamp[a] = current;
                    electrons += donors[a].electrons();
                }
            }
        }
        if electrons % 4 == 2 {
            for &r in subset {
                aromatic_rings[r] = true;
            }
        }
    };
    for r in 0..k {
        count(&[r], aromatic_rings);
    }
    if MAX_COMBINATION >= 2 {
        for r in 0..k {
            for &o in fused_of(r).iter().filter(|&&o| o > r) {
                count(&[r, o], aromatic_rings);
            }
        }
    }
    if MAX_COMBINATION >= 3 {
        // Three connected rings: one in the middle sharing a bond with each of the others.
        for r in 0..k {
            let f = fused_of(r);
            for x in 0..f.len() {
                for y in x + 1..f.len() {
                    count(&[r, f[x], f[y]], aromatic_rings);
                }
            }
        }
    }
    for r in 0..k {
        if !aromatic_rings[r] {
            continue;
        }
        for &a in &m.rings[rings[r]] {
            m.atoms[a].aromatic = true;
        }
        for &b in ring_bonds(r) {
            m.bonds[b].aromatic = true;
        }
    }
}
