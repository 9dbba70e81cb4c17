//! Implicit hydrogens by the OpenSMILES default valences, and the valence check.

use crate::elements::{allowed_valences, organic_valences, symbol};
use crate::molecule::Molecule;
use crate::read::Written;
use crate::{Error, ErrorKind};

/// Sum of bond orders at each atom (aromatic bonds as their order in the molecule): one
/// pass over the bonds rather than one over each atom's neighbours.
pub(crate) fn bond_sums(m: &Molecule) -> Vec<u32> {
    let mut sums = vec![0u32; m.atoms.len()];
    for b in &m.bonds {
        sums[b.a] += b.order as u32;
        sums[b.b] += b.order as u32;
    }
    sums
}

/// Sets the implicit hydrogens of organic-subset atoms and returns, per atom, whether a
/// written-aromatic atom still has a free valence for one double bond of the Kekulé form.
///
/// # Reference
///
/// OpenSMILES specification, section 3.5 "Implicit hydrogens" and 3.5.1 on aromatic atoms:
/// the implicit count fills the atom to its lowest default valence that is at least its
/// bond sum; an aromatic atom keeps one of those valences for its ring double bond.
pub(crate) fn implicit_hydrogens(m: &mut Molecule, written: &Written) -> Vec<bool> {
    let n = m.atoms.len();
    let mut needs_pi = vec![false; n];
    let sums = bond_sums(m);
    for i in 0..n {
        let sum = sums[i];
        let a = &m.atoms[i];
        let organic = written.atoms[i].hcount.is_none();
        let targets: &[u8] = if organic {
            organic_valences(a.element)
        } else {
            allowed_valences(a.element, a.charge).unwrap_or(&[])
        };
        let used = sum + a.hydrogens as u32;
        let free = targets
            .iter()
            .map(|&t| t as u32)
            .find(|&t| t >= used)
            .map(|t| t - used);
        let free = free.unwrap_or(0);
        if a.written_aromatic && free >= 1 {
            needs_pi[i] = true;
        }
        if organic {
            let h = if a.written_aromatic {
                free.saturating_sub(1)
            } else {
                free
            };
            m.atoms[i].hydrogens = h as u8;
        }
    }
    needs_pi
}

/// Refuses atoms whose valence (Kekulé bond orders plus hydrogens) exceeds the most their
/// element allows at their charge; `sums` are the [`bond_sums`] of the Kekulé form.
pub(crate) fn check_valences(m: &Molecule, sums: &[u32]) -> Result<(), Error> {
    // Atoms without a valence rule (metals): most molecules have none, and then no
    // neighbour needs looking at below.
    let metal = |e: u8| e != 0 && allowed_valences(e, 0).is_none();
    let any_metal = m.atoms.iter().any(|a| metal(a.element));
    for (i, a) in m.atoms.iter().enumerate() {
        let Some(allowed) = allowed_valences(a.element, a.charge) else {
            continue;
        };
        let Some(&max) = allowed.last() else { continue };
        // Bonds to metals are often coordinative (ferrocene, Grignards); no octet count
        // covers them, so such atoms are not checked.
        if any_metal
            && m.neighbors[i]
                .iter()
                .any(|n| metal(m.atoms[n.atom].element))
        {
            continue;
        }
        let valence = sums[i] + a.hydrogens as u32;
        if valence > max as u32 {
            let what = match a.charge {
                0 => format!("neutral {}", symbol(a.element)),
                c => format!("{} with charge {c:+}", symbol(a.element)),
            };
            return Err(Error::new(
                ErrorKind::Valence(format!(
                    "impossible valence {valence} on {what} (at most {max})"
                )),
                &m.input,
                a.span,
            ));
        }
    }
    Ok(())
}
