//! Finding ionizable sites: every class pattern tried on the atoms it can anchor on, one
//! site per atom, overlaps resolved by class priority.
use std::cell::RefCell;
use std::collections::HashMap;

use mol::Molecule;

use crate::library::{site_index, IndexRef};
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
///
/// # Performance
///
/// Each thread keeps, for the library it used last, which classes can anchor on each kind
/// of atom ([`pattern::AtomKey`], at most 16,384 kinds before it starts afresh), so most
/// atoms go straight to the few searches that can succeed; the symmetry classes are worked
/// out only for the rare molecules whose site atoms three refinement rounds do not tell
/// apart. `benches/stages.rs` (`find-sites`) measures it.
pub fn find_sites(library: &Library, molecule: &Molecule) -> Vec<FoundSite> {
    let index = site_index(library);
    let atoms = molecule.atoms();
    let mut sites = Vec::new();
    // Shared by every class tried on this molecule: an environment (`!$(NC=O)`) written in
    // many classes is worked out once per atom.
    let mut matcher = pattern::Matcher::with_all_atoms(molecule);
    CANDIDATES.with(|cache| {
        let mut cache = cache.borrow_mut();
        let cache = cache.for_index(&index);
        for (atom, a) in atoms.iter().enumerate() {
            // Explicit hydrogens never carry a site themselves: their heavy atom does.
            if a.element == 1 {
                continue;
            }
            let Some(key) = matcher.atom_key(atom) else {
                continue;
            };
            // The classes whose anchor can sit on an atom like this one, in precedence
            // order: the same for every atom with the key, so worked out once.
            let classes = cache.entry(key).or_insert_with(|| {
                index
                    .candidates(a.element, a.aromatic)
                    .iter()
                    .copied()
                    .filter(|&class| {
                        index.patterns[class]
                            .is_some_and(|p| pattern::Matcher::could_anchor_key(p, &key))
                    })
                    .collect()
            });
            for &class in classes.iter() {
                let Some(pattern) = index.patterns[class] else {
                    continue;
                };
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
    });
    number_groups(molecule, &mut sites);
    sites
}

/// Keys kept before the cache starts afresh: enough for the atom kinds of a large
/// screening set, a bound on memory whatever the input.
const CANDIDATE_KEYS: usize = 1 << 14;

/// Per thread, the candidate classes by atom key for the index last used. The index is
/// held, so it cannot be freed and another built at its address while it is kept.
#[derive(Default)]
struct CandidateCache {
    index: Option<IndexRef>,
    classes: HashMap<pattern::AtomKey, Vec<usize>, BuildFx>,
}

impl CandidateCache {
    /// The map for `index`, emptied if it was kept for another one or grew too large.
    fn for_index(
        &mut self,
        index: &IndexRef,
    ) -> &mut HashMap<pattern::AtomKey, Vec<usize>, BuildFx> {
        if !self.index.as_ref().is_some_and(|i| i.same(index))
            || self.classes.len() >= CANDIDATE_KEYS
        {
            self.index = Some(index.clone());
            self.classes.clear();
        }
        &mut self.classes
    }
}

thread_local! {
    static CANDIDATES: RefCell<CandidateCache> = RefCell::new(CandidateCache::default());
}

/// The hash of the caches keyed by atom key (see [`pattern::QuickHasher`]).
pub(crate) type BuildFx = pattern::BuildQuickHasher;

/// Rounds of neighbour refinement tried on the site atoms before the full symmetry
/// classes are asked for.
const QUICK_ROUNDS: usize = 3;

/// Numbers the symmetry groups of `sites` (in molecule order) from 0 in order of first
/// appearance.
///
/// `mol::symmetry_classes` refines a starting invariant (element, isotope, charge, degree,
/// hydrogens, aromaticity, ring membership) by the classes of the neighbours and the bonds
/// to them, round after round, and classes only ever split. So two atoms apart after some
/// rounds of the same refinement are apart in the end: when every pair of site atoms is
/// apart within [`QUICK_ROUNDS`] rounds (almost always: truly equivalent sites are rare),
/// each site is its own group and the classes are never worked out. Otherwise they are,
/// and sites share a group by them. `quick_groups_agree_with_symmetry_classes` checks the
/// two ways against each other.
fn number_groups(molecule: &Molecule, sites: &mut [FoundSite]) {
    if !quick_groups_apart(molecule, sites) {
        let symmetry = mol::symmetry_classes(molecule);
        groups_by_classes(&symmetry, sites);
        return;
    }
    for (i, s) in sites.iter_mut().enumerate() {
        s.group = i;
    }
}

/// Whether the site atoms are pairwise apart within [`QUICK_ROUNDS`] refinement rounds (of
/// the refinement `mol::symmetry_classes` runs). `false` when they are not.
///
/// The rounds carry a 64-bit hash of each atom's refined key rather than a class number,
/// so no round sorts the atoms: atoms with equal keys get equal hashes (by induction over
/// the rounds: equal classes and equal multisets of neighbour classes and bonds hash the
/// same, the multiset hashed as a sum, which no order of the neighbours changes), so site
/// atoms whose hashes differ are truly apart. Two different keys may share a hash; then
/// the sites look alike here and the full symmetry classes decide, which costs time but
/// never changes the groups.
fn quick_groups_apart(molecule: &Molecule, sites: &[FoundSite]) -> bool {
    let atoms = molecule.atoms();
    let n = atoms.len();
    // The starting invariant, packed into one integer: element, isotope, charge, degree,
    // hydrogens (at most 255 in counts plus one per neighbour), aromaticity, ring
    // membership.
    let explicit_h = atoms.iter().any(|a| a.element == 1);
    let invariant = |atom: usize| -> u64 {
        let a = &atoms[atom];
        let hydrogens = if explicit_h {
            molecule.total_hydrogens(atom)
        } else {
            a.hydrogens as usize
        };
        (a.element as u64) << 50
            | (a.isotope.unwrap_or(0) as u64) << 34
            | ((a.charge as i16 + 128) as u64) << 26
            | (molecule.degree(atom) as u64) << 18
            | (hydrogens as u64) << 2
            | (a.aromatic as u64) << 1
            | (a.ring_count > 0) as u64
    };
    if apart(sites.iter().map(|s| invariant(s.atom))) {
        return true;
    }
    let mut hashes: Vec<u64> = (0..n).map(|i| mix(invariant(i))).collect();
    let mut next = vec![0u64; n];
    // Bond label per neighbour: order (4 for aromatic) and aromaticity, as the refinement
    // compares them.
    let label = |b: &mol::Bond| -> u64 {
        let order = if b.aromatic { 4 } else { b.order as u64 };
        order << 1 | b.aromatic as u64
    };
    for _ in 0..QUICK_ROUNDS {
        let bonds = molecule.bonds();
        for (i, slot) in next.iter_mut().enumerate() {
            // Each neighbour as one word from its hash and the bond, summed (a sum needs no
            // sorting and cannot tell orders apart), then mixed with the atom's own hash.
            let around = molecule.neighbors(i).iter().fold(0u64, |sum, nb| {
                sum.wrapping_add(mix(hashes[nb.atom] ^ label(&bonds[nb.bond])))
            });
            *slot = mix(hashes[i].rotate_left(23) ^ around);
        }
        std::mem::swap(&mut hashes, &mut next);
        if apart(sites.iter().map(|s| hashes[s.atom])) {
            return true;
        }
    }
    false
}

/// A 64-bit mixing function (the finalizer of SplitMix64, common practice): nearby inputs
/// give unrelated outputs, so different keys rarely share a hash.
fn mix(x: u64) -> u64 {
    let mut z = x.wrapping_add(0x9e37_79b9_7f4a_7c15);
    z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
    z ^ (z >> 31)
}

/// Whether no two keys are equal.
fn apart(keys: impl Iterator<Item = u64>) -> bool {
    // Sites per molecule are few: a small list compared pairwise needs no allocation.
    let mut few = [0u64; 16];
    let mut len = 0;
    let mut many: Vec<u64> = Vec::new();
    for k in keys {
        if len < few.len() {
            if few[..len].contains(&k) {
                return false;
            }
            few[len] = k;
            len += 1;
        } else {
            if many.is_empty() {
                many.extend_from_slice(&few);
            }
            many.push(k);
        }
    }
    many.sort_unstable();
    many.windows(2).all(|w| w[0] != w[1])
}

/// Groups numbered from 0 in order of first appearance, sites on atoms of one symmetry
/// class sharing one.
fn groups_by_classes(symmetry: &[u32], sites: &mut [FoundSite]) {
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

#[cfg(test)]
mod tests {
    use super::*;

    /// The groups the full symmetry classes give, for comparison.
    fn by_classes(molecule: &Molecule, sites: &[FoundSite]) -> Vec<usize> {
        let mut sites = sites.to_vec();
        groups_by_classes(&mol::symmetry_classes(molecule), &mut sites);
        sites.iter().map(|s| s.group).collect()
    }

    fn check(smiles: &str) -> Vec<usize> {
        let molecule = mol::parse(smiles).unwrap_or_else(|e| panic!("{smiles}: {e}"));
        let parent = mol::standardize(&molecule)
            .unwrap_or_else(|e| panic!("{smiles}: {e}"))
            .parent;
        let sites = find_sites(Library::builtin(), &parent);
        let groups: Vec<usize> = sites.iter().map(|s| s.group).collect();
        assert_eq!(groups, by_classes(&parent, &sites), "{smiles}");
        groups
    }

    #[test]
    fn quick_groups_agree_with_symmetry_classes() {
        // Symmetric diacids, diamines and rings (groups shared), near-symmetric ones
        // (apart only after some rounds) and the far ends of long chains (apart only
        // beyond the quick rounds).
        let shared = |g: Vec<usize>| g.iter().enumerate().any(|(i, x)| g[..i].contains(x));
        assert!(shared(check("OC(=O)CCC(=O)O")));
        assert!(shared(check("NCCCCN")));
        assert!(!shared(check("NCCCCNC")));
        check("OC(=O)CCCC(=O)OC");
        assert!(!shared(check("NCCCCC(C)CCCCCCCN")));
        check("OC(=O)CCCCCCCCCCC(=O)OCC");
        check("C1CNCCN1");
        check("Oc1ccc(O)cc1");
        check("Oc1cccc(O)c1C");
        check("c1cc(N)ccc1Cc1ccc(N)cc1");
        check("c1cc(N)ccc1Cc1ccc(N)cc1C");
        check("OC(=O)c1cc(C(=O)O)cc(C(=O)O)c1");
    }

    #[test]
    fn quick_groups_agree_with_symmetry_classes_over_the_moses_sample() {
        // Reference data beside the repository; skipped when absent.
        let path = concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/../../../shared/data/moses-sample.smi"
        );
        let Ok(text) = std::fs::read_to_string(path) else {
            eprintln!("note: {path} not found; skipped");
            return;
        };
        let mut merged = 0;
        for line in text.lines() {
            let Some(smiles) = line.split_whitespace().next() else {
                continue;
            };
            let Ok(molecule) = mol::parse(smiles) else {
                continue;
            };
            let Ok(std) = mol::standardize(&molecule) else {
                continue;
            };
            let sites = find_sites(Library::builtin(), &std.parent);
            let groups: Vec<usize> = sites.iter().map(|s| s.group).collect();
            assert_eq!(groups, by_classes(&std.parent, &sites), "{smiles}");
            merged += groups
                .iter()
                .enumerate()
                .any(|(i, g)| groups[..i].contains(g)) as usize;
        }
        // Some molecules of the sample do have equivalent sites, so both ways were taken.
        assert!(merged > 0);
    }
}
