//! Hybridization from bond orders.

use crate::molecule::{Hybridization, Molecule};

/// Sp for a triple bond or two double bonds, Sp2 for one double bond or an aromatic atom,
/// Sp3 otherwise, for the main-group elements B to I; Other for hydrogen, metals and `*`.
/// Lone pairs conjugated with a pi system (amide N, aniline N) stay Sp3: the model decides
/// from bond orders alone.
///
/// `sums` are the atoms' bond-order sums (see `bond_sums`): the pi bonds at an atom are its
/// bond-order sum less its connections.
pub(crate) fn perceive_hybridization(m: &mut Molecule, sums: &[u32]) {
    for (i, &sum) in sums.iter().enumerate().take(m.atoms.len()) {
        let a = &m.atoms[i];
        let main = matches!(a.element, 5..=9 | 14..=17 | 33..=35 | 52 | 53);
        let h = if !main {
            Hybridization::Other
        } else if a.aromatic {
            Hybridization::Sp2
        } else {
            // Orders are 1 to 3, so each bond adds its order less one.
            let pi = sum.saturating_sub(m.neighbors[i].len() as u32);
            match pi {
                0 => Hybridization::Sp3,
                1 => Hybridization::Sp2,
                _ => Hybridization::Sp,
            }
        };
        m.atoms[i].hybridization = h;
    }
}
