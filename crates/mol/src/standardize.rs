//! Standardizing: the parent component in its neutral form.
//!
//! The rules, in order:
//!
//! 1. Parent: the component with the most heavy atoms among those containing carbon (or
//!    among all, if none does); ties go to the first. The others are reported as SMILES.
//! 2. Explicit hydrogen atoms (`[H]`, not isotopes, one heavy neighbour) are folded into
//!    their neighbour's hydrogen count.
//! 3. Pentavalent nitrogen written with `=O` (nitro `N(=O)=O`, N-oxide `N(=O)`) becomes the
//!    charge-separated `[N+][O-]`, so both spellings give one parent.
//! 4. Permanent cations are those with no hydrogen to lose (quaternary N+, `[n+]`,
//!    sulfonium, oxonium without H). An anion bonded to one of them is part of an ylide or
//!    a dipolar group (nitro, N-oxide, azide) and is kept.
//! 5. Every other anion on O, S, Se, N or C gains a proton (carboxylate, phenolate,
//!    thiolate, sulfonate, phosphate, azolide, sulfonamide anion); every cation on N, P, O
//!    or S with a hydrogen loses one (ammonium, iminium, pyridinium `[nH+]`).
//!
//! A molecule with a permanent cation and a remote anion (a betaine) therefore ends as the
//! cation with its acid protonated: whatever protonation state it was written in, the same
//! parent comes out. These are common practice in structure standardization.

use crate::molecule::Molecule;
use crate::perceive::reperceive;
use crate::write::write_smiles_ordered;
use crate::{Error, ErrorKind, Span, Standardized};

/// The atoms `keep` (sorted) as a molecule of their own, renumbered from 0, with bonds
/// among them; perception fields are copied, not recomputed.
pub(crate) fn submolecule(m: &Molecule, keep: &[usize]) -> Molecule {
    let mut index = vec![usize::MAX; m.atoms.len()];
    for (k, &a) in keep.iter().enumerate() {
        index[a] = k;
    }
    let atoms = keep.iter().map(|&a| m.atoms[a].clone()).collect();
    let bonds = m
        .bonds
        .iter()
        .filter(|b| index[b.a] != usize::MAX && index[b.b] != usize::MAX)
        .map(|b| {
            let mut b = b.clone();
            let (x, y) = (index[b.a], index[b.b]);
            b.a = x.min(y);
            b.b = x.max(y);
            b
        })
        .collect();
    let mut sub = Molecule {
        input: m.input.clone(),
        atoms,
        bonds,
        neighbors: Default::default(),
        rings: Vec::new(),
        components: Vec::new(),
    };
    sub.rebuild_graph();
    let ring_map: Vec<Vec<usize>> = m
        .rings
        .iter()
        .filter(|r| r.iter().all(|&a| index[a] != usize::MAX))
        .map(|r| r.iter().map(|&a| index[a]).collect())
        .collect();
    sub.rings = ring_map;
    sub
}

/// Whether the rules above would leave the molecule as it is: one component, no charges,
/// no hydrogen atoms, no ionic metal and no pentavalent nitrogen. Such a molecule is its
/// own parent (the full path would copy it, re-perceive it and get the same molecule back,
/// which `tests/standardize_fast_path.rs` checks over the reference sets).
fn unchanged(m: &Molecule) -> bool {
    if m.components.len() != 1 || m.atoms.is_empty() {
        return false;
    }
    m.atoms.iter().enumerate().all(|(i, a)| {
        if a.charge != 0 || a.element == 1 || is_ionic_metal(a.element) {
            return false;
        }
        if a.element == 7 {
            let valence: u32 = m.neighbors[i]
                .iter()
                .map(|n| m.bonds[n.bond].order as u32)
                .sum::<u32>()
                + a.hydrogens as u32;
            if valence == 5 {
                return false;
            }
        }
        true
    })
}

/// As [`standardize`], taking the molecule: one that needs no change becomes the parent
/// without a copy.
pub(crate) fn standardize_owned(m: Molecule) -> Result<Standardized, Error> {
    if unchanged(&m) {
        let origin = (0..m.atoms.len()).collect();
        return Ok(Standardized {
            parent: m,
            origin,
            others: Vec::new(),
            changes: Vec::new(),
        });
    }
    standardize_full(&m)
}

pub(crate) fn standardize(m: &Molecule) -> Result<Standardized, Error> {
    if unchanged(m) {
        return Ok(Standardized {
            parent: m.clone(),
            origin: (0..m.atoms.len()).collect(),
            others: Vec::new(),
            changes: Vec::new(),
        });
    }
    standardize_full(m)
}

/// The rules applied step by step (what [`standardize`] does for every molecule that may
/// change).
pub(crate) fn standardize_full(m: &Molecule) -> Result<Standardized, Error> {
    if m.atoms.is_empty() {
        return Err(Error::new(
            ErrorKind::Empty,
            &m.input,
            Span::new(0, m.input.len()),
        ));
    }
    let mut changes = Vec::new();
    let disconnected = disconnect_metals(m, &mut changes);
    let m = &disconnected;
    let key = |c: &Vec<usize>| {
        let organic = c.iter().any(|&a| m.atoms[a].element == 6);
        let heavy = c.iter().filter(|&&a| m.atoms[a].element > 1).count();
        (organic, heavy)
    };
    let mut parent_index = 0;
    for (k, c) in m.components.iter().enumerate() {
        if key(c) > key(&m.components[parent_index]) {
            parent_index = k;
        }
    }
    let others: Vec<String> = m
        .components
        .iter()
        .enumerate()
        .filter(|(k, _)| *k != parent_index)
        .map(|(_, c)| write_smiles_ordered(&submolecule(m, c)).0)
        .collect();
    if !others.is_empty() {
        changes.push(format!(
            "kept the largest component; removed {}",
            others.join(", ")
        ));
    }

    // Explicit hydrogens fold into counts.
    let component = &m.components[parent_index];
    let mut extra_h = vec![0u8; m.atoms.len()];
    let mut keep = Vec::with_capacity(component.len());
    let mut folded = 0;
    for &a in component {
        let atom = &m.atoms[a];
        let foldable = atom.element == 1
            && atom.isotope.is_none()
            && atom.charge == 0
            && atom.hydrogens == 0
            && m.neighbors[a].len() == 1
            && m.atoms[m.neighbors[a][0].atom].element > 1;
        if foldable {
            extra_h[m.neighbors[a][0].atom] += 1;
            folded += 1;
        } else {
            keep.push(a);
        }
    }
    if folded > 0 {
        changes.push(format!(
            "folded {folded} explicit hydrogen atom(s) into counts"
        ));
    }
    let mut p = submolecule(m, &keep);
    for (k, &a) in keep.iter().enumerate() {
        p.atoms[k].hydrogens = p.atoms[k].hydrogens.saturating_add(extra_h[a]);
    }

    // Pentavalent N=O becomes N+-O-.
    for i in 0..p.atoms.len() {
        let a = &p.atoms[i];
        if a.element != 7 || a.charge != 0 {
            continue;
        }
        let valence: u32 = p.neighbors[i]
            .iter()
            .map(|n| p.bonds[n.bond].order as u32)
            .sum::<u32>()
            + a.hydrogens as u32;
        if valence != 5 {
            continue;
        }
        let oxo = p.neighbors[i].iter().copied().find(|n| {
            let o = &p.atoms[n.atom];
            o.element == 8
                && o.charge == 0
                && p.neighbors[n.atom].len() == 1
                && p.bonds[n.bond].order == 2
        });
        if let Some(n) = oxo {
            p.atoms[i].charge = 1;
            p.atoms[n.atom].charge = -1;
            p.bonds[n.bond].order = 1;
            p.atoms[i].bracket = true;
            p.atoms[n.atom].bracket = true;
            changes.push(format!("wrote N=O at atom {} as [N+][O-]", keep[i]));
        }
    }

    // S+-O- and P+-O- are the same groups as S=O and P=O (sulfoxide, sulfone, phosphine
    // oxide, phosphate written charge-separated); the double-bond form is the standard.
    loop {
        let mut merged = false;
        for i in 0..p.atoms.len() {
            if !matches!(p.atoms[i].element, 15 | 16 | 34) || p.atoms[i].charge < 1 {
                continue;
            }
            let oxide = p.neighbors[i].iter().copied().find(|n| {
                let o = &p.atoms[n.atom];
                o.element == 8
                    && o.charge == -1
                    && o.hydrogens == 0
                    && p.neighbors[n.atom].len() == 1
                    && p.bonds[n.bond].order == 1
            });
            if let Some(n) = oxide {
                p.atoms[i].charge -= 1;
                p.atoms[n.atom].charge = 0;
                p.bonds[n.bond].order = 2;
                changes.push(format!(
                    "wrote {}+ O- at atom {} as a double bond",
                    crate::element_symbol(p.atoms[i].element),
                    keep[i]
                ));
                merged = true;
            }
        }
        if !merged {
            break;
        }
    }

    let permanent: Vec<bool> = p
        .atoms
        .iter()
        .enumerate()
        .map(|(i, a)| a.charge > 0 && p.total_hydrogens(i) == 0)
        .collect();
    for i in 0..p.atoms.len() {
        let a = &p.atoms[i];
        let symbol = crate::element_symbol(a.element);
        if a.charge == -1 && matches!(a.element, 6 | 7 | 8 | 16 | 34) {
            if p.neighbors[i].iter().any(|n| permanent[n.atom]) {
                continue;
            }
            let a = &mut p.atoms[i];
            a.charge = 0;
            a.hydrogens += 1;
            a.bracket = true;
            changes.push(format!("added H+ to {symbol}- at atom {}", keep[i]));
        } else if a.charge == 1 && matches!(a.element, 7 | 8 | 15 | 16) && a.hydrogens > 0 {
            let a = &mut p.atoms[i];
            a.charge = 0;
            a.hydrogens -= 1;
            a.bracket = true;
            changes.push(format!("removed H+ from {symbol}+ at atom {}", keep[i]));
        }
    }
    reperceive(&mut p);
    Ok(Standardized {
        parent: p,
        origin: keep,
        others,
        changes,
    })
}

/// Alkali and alkaline-earth metals, whose bonds to non-metals are ionic: written as bonds
/// (`CC(=O)O[Na]`) they are the same salt as the separated ions.
fn is_ionic_metal(element: u8) -> bool {
    matches!(element, 3 | 11 | 19 | 37 | 55 | 4 | 12 | 20 | 38 | 56)
}

/// Breaks bonds between ionic metals and O, N, S or halogens into ion pairs: the metal
/// takes +1 and the other atom -1 per bond. Common practice in structure standardization.
fn disconnect_metals(m: &Molecule, changes: &mut Vec<String>) -> Molecule {
    let mut out = m.clone();
    let mut removed = vec![false; m.bonds.len()];
    for (k, b) in m.bonds.iter().enumerate() {
        let (x, y) = if is_ionic_metal(m.atoms[b.a].element) {
            (b.a, b.b)
        } else {
            (b.b, b.a)
        };
        if !is_ionic_metal(m.atoms[x].element)
            || !matches!(m.atoms[y].element, 7 | 8 | 9 | 16 | 17 | 35 | 53)
            || b.order != 1
        {
            continue;
        }
        removed[k] = true;
        out.atoms[x].charge = out.atoms[x].charge.saturating_add(1);
        out.atoms[y].charge = out.atoms[y].charge.saturating_sub(1);
        out.atoms[x].bracket = true;
        out.atoms[y].bracket = true;
        changes.push(format!(
            "separated the {}-{} bond (atoms {x}, {y}) into ions",
            crate::element_symbol(m.atoms[x].element),
            crate::element_symbol(m.atoms[y].element)
        ));
    }
    if removed.iter().any(|&r| r) {
        let mut k = 0;
        out.bonds.retain(|_| {
            k += 1;
            !removed[k - 1]
        });
        out.rebuild_graph();
    }
    out
}
