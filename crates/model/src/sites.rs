//! Finding ionizable sites: every class pattern tried on the atoms it can anchor on, one
//! site per atom, overlaps resolved by class priority.
use std::collections::HashMap;

use mol::Molecule;

use crate::library::site_index;
use crate::Library;

/// A site found by a class pattern.
#[derive(Clone, Debug, PartialEq)]
pub struct FoundSite {
    /// Index of the class in `Library::classes`.
    pub class: usize,
    /// The atom that gains or loses the proton.
    pub atom: usize,
    /// The matched atoms, per pattern atom.
    pub matched: Vec<usize>,
    /// Molecule atom per atom-map number present in the pattern: `(map, atom)`.
    pub mapped: Vec<(u16, usize)>,
    /// Symmetry group: sites with the same group are equivalent.
    pub group: usize,
}

/// Finds every site in the molecule, one per atom, overlaps resolved by class priority.
///
/// For each atom (in molecule order) the classes whose site atom can be its element are
/// tried from the highest priority down; the first whose pattern matches with its `:1`
/// atom on that atom wins the atom. Equal priorities go to the class loaded first (site
/// files in name order, classes in file order), so the outcome never depends on anything
/// but the library. Where the winning pattern matches in several ways, the match with the
/// smallest list of atoms (compared atom by atom) is kept, so the scored substituents do
/// not depend on search order.
///
/// Sites on symmetry-equivalent atoms (`mol::symmetry_classes`) share a group; groups are
/// numbered from 0 in order of first appearance. Several protons on one atom (NH2, CH2) are
/// one site. Atoms of any component are searched; callers pass the standardized parent.
pub fn find_sites(library: &Library, molecule: &Molecule) -> Vec<FoundSite> {
    let index = site_index(library);
    let atoms = molecule.atoms();
    let mut sites = Vec::new();
    // Shared by every class tried on this molecule: an environment (`!$(NC=O)`) written in
    // many classes is worked out once per atom.
    let mut matcher = pattern::Matcher::with_all_atoms(molecule);
    for (atom, a) in atoms.iter().enumerate() {
        // Explicit hydrogens never carry a site themselves: their heavy atom does.
        if a.element == 1 {
            continue;
        }
        for &class in index.candidates(a.element, a.aromatic) {
            let Some(pattern) = index.patterns[class] else {
                continue;
            };
            // Most classes are ruled out here, from the matcher's table, before any search
            // is set up.
            if !matcher.could_anchor(pattern, atom) {
                continue;
            }
            let Some(best) = matcher.least_match_at(pattern, atom, &[]) else {
                continue;
            };
            let mapped = index.maps[class]
                .iter()
                .filter_map(|&(map, p)| best.get(p).map(|&at| (map, at)))
                .collect();
            sites.push(FoundSite {
                class,
                atom,
                matched: best,
                mapped,
                group: 0,
            });
            break;
        }
    }
    number_groups(molecule, &mut sites);
    sites
}

/// Numbers the symmetry groups of `sites` (in molecule order) from 0 in order of first
/// appearance.
///
/// Symmetry classes only split the classes of their starting invariant
/// (`mol::symmetry_classes`: element, isotope, charge, degree, hydrogens, aromaticity, ring
/// membership), so sites whose atoms all differ in it are all apart, each its own group,
/// and the classes are worked out only when two site atoms share it.
fn number_groups(molecule: &Molecule, sites: &mut [FoundSite]) {
    let invariant = |atom: usize| {
        let a = &molecule.atoms()[atom];
        (
            a.element,
            a.isotope.unwrap_or(0),
            a.charge,
            molecule.degree(atom),
            molecule.total_hydrogens(atom),
            a.aromatic,
            a.ring_count > 0,
        )
    };
    let mut invariants: Vec<_> = sites.iter().map(|s| invariant(s.atom)).collect();
    invariants.sort_unstable();
    let shared = invariants.windows(2).any(|w| w[0] == w[1]);
    if !shared {
        for (i, s) in sites.iter_mut().enumerate() {
            s.group = i;
        }
        return;
    }
    let symmetry = mol::symmetry_classes(molecule);
    let mut groups: HashMap<u32, usize> = HashMap::new();
    for s in sites.iter_mut() {
        // An atom without a symmetry class (never expected) is its own group.
        let key = symmetry
            .get(s.atom)
            .copied()
            .map_or(u32::MAX - s.atom as u32, |k| k);
        let next = groups.len();
        s.group = *groups.entry(key).or_insert(next);
    }
}
