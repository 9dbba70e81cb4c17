//! Perception (stage 2): hydrogens, rings, Kekulé form, aromaticity, hybridization.

mod aromaticity;
mod hybridization;
mod hydrogens;
mod kekulize;
mod matching;
mod rings;

pub(crate) use aromaticity::perceive_aromaticity;
pub(crate) use hybridization::perceive_hybridization;
pub(crate) use hydrogens::{bond_sums, check_valences, implicit_hydrogens};
pub(crate) use kekulize::kekulize;
pub(crate) use rings::perceive_rings;

use crate::molecule::{Atom, Bond, Hybridization, Molecule};
use crate::read::{Symbol, Written};
use crate::{Error, ErrorKind};

/// Builds the molecule from what was written and perceives it.
pub(crate) fn perceive(input: &str, written: Written) -> Result<Molecule, Error> {
    let atoms: Vec<Atom> = written
        .atoms
        .iter()
        .zip(&written.spans)
        .map(|(w, &span)| Atom {
            element: w.element,
            isotope: w.isotope,
            charge: w.charge,
            hydrogens: w.hcount.unwrap_or(0),
            bracket: w.bracket,
            written_aromatic: w.aromatic,
            aromatic: false,
            atom_class: w.atom_class,
            hybridization: Hybridization::Other,
            span,
            component: 0,
            ring_count: 0,
            smallest_ring: 0,
        })
        .collect();
    let bonds: Vec<Bond> = written
        .bonds
        .iter()
        .map(|&(a, b, symbol)| {
            let both = atoms[a].written_aromatic && atoms[b].written_aromatic;
            Bond {
                a,
                b,
                order: match symbol {
                    Symbol::Double => 2,
                    Symbol::Triple => 3,
                    _ => 1,
                },
                aromatic: false,
                written_aromatic: symbol == Symbol::Aromatic || (symbol == Symbol::Elided && both),
                in_ring: false,
            }
        })
        .collect();
    let mut m = Molecule {
        input: input.to_string(),
        atoms,
        bonds,
        neighbors: Default::default(),
        rings: Vec::new(),
        components: Vec::new(),
    };
    // Without a `.` the text is one component (ring bonds join atoms already joined).
    m.rebuild_graph_known(!input.contains('.'));
    perceive_rings(&mut m);
    for (i, a) in m.atoms.iter().enumerate() {
        if a.written_aromatic && a.ring_count == 0 {
            return Err(Error::new(
                ErrorKind::Other("atom written aromatic (lower case) is not in a ring".to_string()),
                input,
                m.atoms[i].span,
            ));
        }
    }
    let needs_pi = implicit_hydrogens(&mut m, &written);
    kekulize(&mut m, &needs_pi)?;
    // Aromaticity changes no bond order: the sums serve both.
    let sums = bond_sums(&m);
    check_valences(&m, &sums)?;
    perceive_aromaticity(&mut m);
    perceive_hybridization(&mut m, &sums);
    Ok(m)
}

/// Re-perceives a molecule whose atoms and bond orders were edited (hydrogens given, bonds
/// in Kekulé form): rings, aromaticity, hybridization.
pub(crate) fn reperceive(m: &mut Molecule) {
    m.rebuild_graph();
    perceive_rings(m);
    for a in &mut m.atoms {
        a.aromatic = false;
    }
    for b in &mut m.bonds {
        b.aromatic = false;
    }
    perceive_aromaticity(m);
    let sums = bond_sums(m);
    perceive_hybridization(m, &sums);
}
