//! Hybridization from bond orders.

use crate::molecule::{Hybridization, Molecule};

/// Sp for a triple bond or two double bonds, Sp2 for one double bond or an aromatic atom,
/// Sp3 otherwise, for the main-group elements B to I; Other for hydrogen, metals and `*`.
/// Lone pairs conjugated with a pi system (amide N, aniline N) stay Sp3: the model decides
/// from bond orders alone.
pub(crate) fn perceive_hybridization(m: &mut Molecule) {
    for i in 0..m.atoms.len() {
        let a = &m.atoms[i];
        let main = matches!(a.element, 5..=9 | 14..=17 | 33..=35 | 52 | 53);
        let h = if !main {
            Hybridization::Other
        } else if a.aromatic {
            Hybridization::Sp2
        } else {
            let pi: u32 = m.neighbors[i]
                .iter()
                .map(|nb| m.bonds[nb.bond].order.saturating_sub(1) as u32)
                .sum();
            match pi {
                0 => Hybridization::Sp3,
                1 => Hybridization::Sp2,
                _ => Hybridization::Sp,
            }
        };
        m.atoms[i].hybridization = h;
    }
}
