//! Recognizing substituents by pattern.
//!
//! The table (`fragments/substituents/groups.toml`) gives each group a pattern whose atom
//! mapped `:1` is the atom bonded to the ring or chain. [`recognize`] tries every entry
//! anchored on that atom, keeps out of the ring or chain, and picks the best match; when
//! nothing matches it falls back to the nearest type by the first atom alone and says so.
use std::cell::RefCell;
use std::collections::HashMap;
use std::rc::Rc;

use once_cell::sync::Lazy;

use mol::{Hybridization, Molecule};
use pattern::Pattern;

use crate::sites::BuildFx;
use crate::{Library, SubstituentEntry};

/// A substituent recognized at an attachment point.
#[derive(Clone, Debug)]
pub struct Recognized<'a> {
    /// The table entry.
    pub entry: &'a SubstituentEntry,
    /// The atoms it covers.
    pub atoms: Vec<usize>,
    /// No entry matched exactly; `entry` is the nearest type and the estimate should widen.
    pub approximate: bool,
}

/// Whether an entry stands for a member of the site's own ring (aza, azonia, ring O/S/NH,
/// fused ring). Those are looked up by id by the aromatic scorer; they are not groups
/// hanging off an atom, so [`recognize`] never returns them.
pub fn is_ring_member(entry: &SubstituentEntry) -> bool {
    entry.id.starts_with("ring-") || entry.id.starts_with("fused-")
}

/// The entry with the given id, if the library has one (the first, should ids repeat).
pub fn entry_by_id<'a>(library: &'a Library, id: &str) -> Option<&'a SubstituentEntry> {
    // The scorer asks for a few fixed ids on every site: for the built-in library they are
    // looked up in a table rather than by comparing ids along the list.
    if std::ptr::eq(library, Library::builtin()) {
        return BUILTIN_IDS.get(id).map(|&i| &library.substituents[i]);
    }
    library.substituents.iter().find(|e| e.id == id)
}

/// Entry index by id in the built-in library, the first entry holding each id.
static BUILTIN_IDS: Lazy<HashMap<&'static str, usize, BuildFx>> = Lazy::new(|| {
    let mut ids = HashMap::with_hasher(BuildFx::default());
    for (i, e) in Library::builtin().substituents.iter().enumerate() {
        ids.entry(e.id.as_str()).or_insert(i);
    }
    ids
});

/// Recognizes the substituent whose first atom is `atom`, bonded to `from` (the ring or
/// chain atom), never entering `avoid`.
///
/// The highest-priority entry whose pattern matches with its `:1` atom on `atom` wins; at
/// equal priority the match covering more atoms (the more specific group) wins, then the
/// entry written first. With no match, the nearest type by the first atom's element,
/// charge, hybridization and neighbours is returned with `approximate = true`; `None` when
/// there is no sensible nearest type (an unusual element, an anionic nitrogen or sulfur) or
/// the indices are out of range.
///
/// Each distinct pattern text is compiled once per process (the library's checks and this
/// index share the compiled patterns); the index is built once per library (once per
/// process for the built-in one, once per thread for others, keyed by their pattern texts
/// and ids so that a user library or an edited one is indexed afresh) by the element and
/// aromaticity their first atom can have; a pattern that does not compile is skipped here
/// and reported by the library's own validation.
pub fn recognize<'a>(
    library: &'a Library,
    molecule: &Molecule,
    atom: usize,
    from: usize,
    avoid: &[usize],
) -> Option<Recognized<'a>> {
    recognize_with(
        library,
        &mut pattern::Matcher::new(molecule),
        atom,
        from,
        avoid,
    )
}

/// [`recognize`] on the molecule of `matcher`, which keeps what it works out about the
/// molecule's atoms and environments for the next call: a caller recognizing many groups
/// on one molecule (the scorer) makes one matcher for them all. The answer is the one
/// [`recognize`] gives.
pub fn recognize_with<'a>(
    library: &'a Library,
    matcher: &mut pattern::Matcher<'_>,
    atom: usize,
    from: usize,
    avoid: &[usize],
) -> Option<Recognized<'a>> {
    let molecule = matcher.molecule();
    let n = molecule.atoms().len();
    if atom >= n {
        return None;
    }
    // The scorer's fence already holds the attachment: no copy is needed then.
    let extended: Vec<usize>;
    let fence: &[usize] = if from >= n || avoid.contains(&from) {
        avoid
    } else {
        extended = avoid.iter().copied().chain([from]).collect();
        &extended
    };
    if fence.contains(&atom) {
        return None;
    }

    let index = substituent_index(library);
    let key = matcher.atom_key(atom)?;
    let candidates = candidates(&index, molecule, atom, key);
    best_match(library, &index, matcher, &candidates, atom, fence)
}

/// The entries whose first atom can sit on `atom`, whose key is `key`, in entry order.
fn candidates(
    index: &IndexRef,
    molecule: &Molecule,
    atom: usize,
    key: pattern::AtomKey,
) -> Rc<[usize]> {
    let a = &molecule.atoms()[atom];
    // Only entries whose first atom can sit on an atom like this one, in entry order: the
    // others could not anchor here, so leaving them out changes nothing. The same for
    // every atom with the key, so kept by it.
    CANDIDATES.with(|cache| {
        let mut cache = cache.borrow_mut();
        if !cache.index.as_ref().is_some_and(|i| i.same(index))
            || cache.entries.len() >= CANDIDATE_KEYS
        {
            cache.index = Some(index.clone());
            cache.entries.clear();
        }
        Rc::clone(cache.entries.entry(key).or_insert_with(|| {
            index
                .candidates(a.element, a.aromatic)
                .iter()
                .copied()
                .filter(|&i| {
                    index.compiled[i]
                        .as_ref()
                        .is_some_and(|p| pattern::Matcher::could_anchor_key(p, &key))
                })
                .collect()
        }))
    })
}

/// The best of `candidates` anchored on `atom` outside `fence` (which does not hold
/// `atom`), else the nearest type: the choice [`recognize_with`] describes.
fn best_match<'a>(
    library: &'a Library,
    index: &SubstituentIndex,
    matcher: &mut pattern::Matcher<'_>,
    candidates: &[usize],
    atom: usize,
    fence: &[usize],
) -> Option<Recognized<'a>> {
    // (priority, atoms covered, entry index, matched atoms)
    let mut best: Option<(i32, usize, usize, Vec<usize>)> = None;
    for &i in candidates {
        let entry = &library.substituents[i];
        let Some(p) = &index.compiled[i] else {
            continue;
        };
        if let Some((prio, size, _, _)) = &best {
            // A pattern cannot cover more atoms than it has, so entries that cannot beat the
            // current best are skipped before the search.
            if entry.priority < *prio || (entry.priority == *prio && p.len() <= *size) {
                continue;
            }
        }
        // The search tries the anchor's pre-filter first: no `could_anchor` needed.
        let Some(m) = matcher.first_match_at(p, atom, fence) else {
            continue;
        };
        let size = m.atoms.len();
        let better = match &best {
            None => true,
            Some((prio, bsize, _, _)) => {
                entry.priority > *prio || (entry.priority == *prio && size > *bsize)
            }
        };
        if better {
            best = Some((entry.priority, size, i, m.atoms));
        }
    }
    if let Some((_, _, i, atoms)) = best {
        return Some(Recognized {
            entry: &library.substituents[i],
            atoms,
            approximate: false,
        });
    }
    let molecule = matcher.molecule();
    let id = nearest_type(molecule, atom, fence)?;
    let entry = entry_by_id(library, id)?;
    Some(Recognized {
        entry,
        atoms: vec![atom],
        approximate: !is_bridge_heteroatom(molecule, atom, fence, id),
    })
}

/// Recognition of many groups on one molecule (the scorer's): [`recognize_with`] with one
/// matcher for them all, made on the first recognition (many molecules score no group).
pub struct Recognizer<'a, 'm> {
    library: &'a Library,
    molecule: &'m Molecule,
    matcher: Option<pattern::Matcher<'m>>,
}

impl<'a, 'm> Recognizer<'a, 'm> {
    /// A recognizer of `library`'s groups on `molecule`, with nothing worked out yet.
    pub fn new(library: &'a Library, molecule: &'m Molecule) -> Recognizer<'a, 'm> {
        Recognizer {
            library,
            molecule,
            matcher: None,
        }
    }

    /// The molecule it recognizes groups on.
    pub fn molecule(&self) -> &'m Molecule {
        self.molecule
    }

    /// What [`recognize_with`] answers for these arguments on the recognizer's molecule.
    pub fn recognize(
        &mut self,
        atom: usize,
        from: usize,
        avoid: &[usize],
    ) -> Option<Recognized<'a>> {
        let molecule = self.molecule;
        let matcher = self
            .matcher
            .get_or_insert_with(|| pattern::Matcher::new(molecule));
        recognize_with(self.library, matcher, atom, from, avoid)
    }
}

/// The id of the nearest tabulated type for a first atom no pattern matched.
///
/// Common practice in fragment schemes: an unknown group is scored as the commonest group
/// with the same first atom in the same bonding state, and the estimate is widened.
/// Whether `atom` is a saturated N, O or S whose every heavy neighbour lies inside the
/// fence (the ring O of a sugar, the far NH of a homopiperazine, reached along one side of
/// the ring while the other side is already walked): its groups are the chain atoms already
/// scored, so the alkylamino, dialkylamino, alkoxy or alkylthio entry is the group itself,
/// not a nearest type.
fn is_bridge_heteroatom(molecule: &Molecule, atom: usize, fence: &[usize], id: &str) -> bool {
    let a = &molecule.atoms()[atom];
    matches!(id, "alkylamino" | "dialkylamino" | "alkoxy" | "alkylthio")
        && a.charge == 0
        && !a.aromatic
        && molecule
            .neighbors(atom)
            .iter()
            .all(|nb| fence.contains(&nb.atom) || molecule.atoms()[nb.atom].element == 1)
}

fn nearest_type(molecule: &Molecule, atom: usize, fence: &[usize]) -> Option<&'static str> {
    let a = &molecule.atoms()[atom];
    // Neighbours beyond the attachment: (element, bond order, neighbour charge).
    let beyond: Vec<(u8, u8, i8, usize)> = molecule
        .neighbors(atom)
        .iter()
        .filter(|nb| !fence.contains(&nb.atom))
        .map(|nb| {
            let b = &molecule.bonds()[nb.bond];
            let order = if b.aromatic { 4 } else { b.order };
            let t = &molecule.atoms()[nb.atom];
            (t.element, order, t.charge, nb.atom)
        })
        .collect();
    let double_to = |el: u8| beyond.iter().any(|&(e, o, _, _)| e == el && o == 2);
    // A carbon beyond with two or more F on it (CF3, CF2CF3, CF2H); asked only of O and S.
    let perfluoro = || {
        beyond.iter().any(|&(e, _, _, t)| {
            e == 6
                && molecule
                    .neighbors(t)
                    .iter()
                    .filter(|n| molecule.atoms()[n.atom].element == 9)
                    .count()
                    >= 2
        })
    };
    let has = |el: u8| beyond.iter().any(|&(e, _, _, _)| e == el);
    // Oxygens that are terminal (=O or -O-) count as the "oxo" of an oxoacid group.
    let terminal_o = beyond
        .iter()
        .filter(|&&(e, _, _, t)| e == 8 && molecule.total_degree(t) == 1)
        .count();
    match a.element {
        6 => {
            if a.aromatic {
                // A heteroaryl bonded through a carbon beside a pyridine-type ring N
                // (pyrimidin-2-yl, thiazol-2-yl, benzoxazol-2-yl) is nearer 2-pyridyl, an
                // acceptor, than phenyl.
                let beside_aza = beyond.iter().any(|&(e, o, c, t)| {
                    e == 7
                        && o == 4
                        && c == 0
                        && molecule.degree(t) == 2
                        && molecule.total_hydrogens(t) == 0
                });
                if beside_aza {
                    Some("pyridin-2-yl")
                } else {
                    Some("phenyl")
                }
            } else if a.hybridization == Hybridization::Sp3 || molecule.total_degree(atom) == 4 {
                // A saturated carbon that carries an O or N (a CH(OH)R, C(OH)R2, CH(OR)R,
                // CH(NH2)R group) is no plain alkyl: the nearest type keeps its first-carbon
                // heteroatom, as CH2OH, CH2OCH3 or CH2NH2, and so is not counted with the
                // hydrocarbon alkyls (common practice: the nearest group by first atom and
                // what it bears).
                // Only an open-chain carbon: a ring CH2 of a partly saturated fused ring is
                // walked with its ring.
                let open_chain = !molecule.rings().iter().any(|r| r.contains(&atom));
                let o_h = beyond
                    .iter()
                    .any(|&(e, o, _, t)| e == 8 && o == 1 && molecule.total_hydrogens(t) > 0);
                if open_chain && o_h {
                    Some("hydroxymethyl")
                } else if open_chain && beyond.iter().any(|&(e, o, _, _)| e == 8 && o == 1) {
                    Some("methoxymethyl")
                } else if open_chain
                    && beyond
                        .iter()
                        .any(|&(e, o, c, _)| e == 7 && o == 1 && c == 0)
                {
                    Some("aminomethyl")
                } else {
                    Some("alkyl")
                }
            } else if double_to(8) || double_to(16) {
                if has(7) {
                    Some("alkylcarbamoyl")
                } else if beyond.iter().any(|&(e, o, _, _)| e == 8 && o == 1) {
                    Some("ester")
                } else {
                    Some("acyl")
                }
            } else if a.hybridization == Hybridization::Sp {
                Some("ethynyl")
            } else {
                Some("alkenyl")
            }
        }
        7 => {
            if a.charge > 0 {
                if a.aromatic {
                    None
                } else if molecule.total_hydrogens(atom) > 0 {
                    Some("ammonio")
                } else {
                    Some("trimethylammonio")
                }
            } else if a.charge < 0 {
                None
            } else if a.aromatic {
                Some("pyrrol-1-yl")
            } else if beyond.iter().any(|&(e, o, _, t)| {
                // An N-nitro or N-nitroso N (nitramine, nitrosamine) gives its lone pair to
                // the N=O as an amide N gives it to the C=O: acylamino is the nearer type.
                (e == 6 || e == 16 || e == 7) && o == 1 && carries_oxo(molecule, t, atom)
            }) {
                Some("acylamino")
            } else {
                match molecule.total_hydrogens(atom) {
                    0 => Some("dialkylamino"),
                    1 => Some("alkylamino"),
                    _ => Some("amino"),
                }
            }
        }
        8 => {
            if a.charge < 0 {
                Some("oxido")
            } else if a.charge > 0 {
                None
            } else if beyond
                .iter()
                .any(|&(e, _, _, t)| e == 6 && molecule.atoms()[t].aromatic)
            {
                Some("phenoxy")
            } else if beyond.iter().any(|&(e, o, _, t)| {
                (e == 6 || e == 16) && o == 1 && carries_oxo(molecule, t, atom)
            }) {
                Some("acyloxy")
            } else if perfluoro() {
                // A perfluoroalkoxy O (OCF2CF3, OCF2CHF2) withdraws as OCF3 does, not as an
                // alkoxy donates: its fluorines take the O lone pairs.
                Some("trifluoromethoxy")
            } else {
                Some("alkoxy")
            }
        }
        16 => {
            let hydroxy_o = beyond
                .iter()
                .any(|&(e, _, _, t)| e == 8 && molecule.total_hydrogens(t) > 0);
            match terminal_o {
                // SCF2CF3 as SCF3, for the reason given for the perfluoroalkoxy O.
                0 if a.charge == 0 && perfluoro() => Some("trifluoromethylthio"),
                0 if a.charge == 0 => Some("alkylthio"),
                0 => None,
                1 => Some("sulfinyl"),
                // A free sulfonic acid is ionized at any aqueous pH: score it as sulfonate.
                2 if hydroxy_o => Some("sulfonate"),
                2 if has(7) => Some("sulfamoyl"),
                2 => Some("sulfonyl"),
                _ => Some("sulfonate"),
            }
        }
        9 => Some("fluoro"),
        17 => Some("chloro"),
        35 => Some("bromo"),
        53 => Some("iodo"),
        _ => None,
    }
}

/// Whether `atom` carries a terminal oxygen (C=O, S=O) other than through `except`, or is a
/// thiocarbonyl carbon (C=S): the N of a thioamide, thiourea or dithiocarbamate, and the O
/// of a thionocarbamate, give their lone pair to the C=S as an amide's N gives it to the
/// C=O, more so if anything (common practice: thioamides turn more slowly about the C-N
/// bond than amides), so they are acylamino and acyloxy types, not alkylamino and alkoxy.
fn carries_oxo(molecule: &Molecule, atom: usize, except: usize) -> bool {
    let carbon = molecule.atoms()[atom].element == 6;
    molecule.neighbors(atom).iter().any(|nb| {
        let t = &molecule.atoms()[nb.atom];
        nb.atom != except
            && molecule.total_degree(nb.atom) == 1
            && (t.element == 8
                || (carbon && t.element == 16 && molecule.bonds()[nb.bond].order == 2))
    })
}

/// Recognition data of one library, worked out once: compiled patterns in entry order
/// (`None` where a pattern does not compile: the loader reports those; recognition skips
/// them) and, per (element, aromatic) of the first atom, the entries that can start there.
struct SubstituentIndex {
    compiled: Vec<Option<&'static Pattern>>,
    /// Entry indices (ring members and non-compiling patterns left out), in entry order,
    /// at `element * 2 + aromatic`.
    by_first_atom: Vec<Vec<usize>>,
    /// Every usable entry, for elements beyond the table.
    all: Vec<usize>,
}

/// Elements indexed (atomic numbers below this); others try every entry.
const INDEXED_ELEMENTS: usize = 128;

impl SubstituentIndex {
    fn build(entries: &[SubstituentEntry]) -> SubstituentIndex {
        // From the process-wide store, where the library's checks compiled them already.
        let compiled: Vec<Option<&'static Pattern>> = entries
            .iter()
            .map(|e| crate::library::intern(&e.pattern))
            .collect();
        let all: Vec<usize> = (0..entries.len())
            .filter(|&i| !is_ring_member(&entries[i]) && compiled[i].is_some())
            .collect();
        let by_first_atom = (0..INDEXED_ELEMENTS * 2)
            .map(|key| {
                let (element, aromatic) = ((key / 2) as u8, key % 2 == 1);
                all.iter()
                    .copied()
                    .filter(|&i| {
                        compiled[i]
                            .as_ref()
                            .is_some_and(|p| p.could_anchor_element(element, aromatic))
                    })
                    .collect()
            })
            .collect();
        SubstituentIndex {
            compiled,
            by_first_atom,
            all,
        }
    }

    fn candidates(&self, element: u8, aromatic: bool) -> &[usize] {
        self.by_first_atom
            .get(element as usize * 2 + aromatic as usize)
            .unwrap_or(&self.all)
    }
}

/// Keys kept before the candidate cache starts afresh: a bound on memory whatever the
/// input.
const CANDIDATE_KEYS: usize = 1 << 14;

/// Per thread, the candidate entries by atom key for the index last used (held, so that
/// no other index can be built at its address while it is kept).
#[derive(Default)]
struct CandidateCache {
    index: Option<IndexRef>,
    entries: HashMap<pattern::AtomKey, Rc<[usize]>, BuildFx>,
}

thread_local! {
    static CANDIDATES: RefCell<CandidateCache> = RefCell::new(CandidateCache::default());
}

/// One cached index, keyed by the pattern texts and ids themselves so that a library
/// edited in place or rebuilt at the same address is never served stale patterns.
struct Slot {
    key: Vec<(String, String)>,
    index: Rc<SubstituentIndex>,
}

/// Libraries other than the built-in one, kept compiled per thread. Per-thread, so that
/// batch runs over rayon take no lock on every call; a handful of slots, since a process
/// rarely holds more libraries.
const SLOTS: usize = 4;

thread_local! {
    static CACHE: RefCell<Vec<Slot>> = const { RefCell::new(Vec::new()) };
}

/// The built-in library cannot change (it is only ever handed out shared), so its index is
/// built once per process and found without comparing any text.
static BUILTIN_INDEX: Lazy<SubstituentIndex> =
    Lazy::new(|| SubstituentIndex::build(&Library::builtin().substituents));

/// An index shared across threads or local to one.
#[derive(Clone)]
enum IndexRef {
    /// The built-in library's, which lives as long as the process: a plain reference, so
    /// that handing it out on every call costs no atomic count.
    Shared(&'static SubstituentIndex),
    Local(Rc<SubstituentIndex>),
}

impl IndexRef {
    /// Whether both refer to the same index.
    fn same(&self, other: &IndexRef) -> bool {
        std::ptr::eq::<SubstituentIndex>(&**self, &**other)
    }
}

impl std::ops::Deref for IndexRef {
    type Target = SubstituentIndex;
    fn deref(&self) -> &SubstituentIndex {
        match self {
            IndexRef::Shared(a) => a,
            IndexRef::Local(r) => r,
        }
    }
}

/// The recognition index of `library`, built on first use (per process for the built-in
/// library, per thread for others).
fn substituent_index(library: &Library) -> IndexRef {
    if std::ptr::eq(library, Library::builtin()) {
        return IndexRef::Shared(&BUILTIN_INDEX);
    }
    let entries = &library.substituents;
    CACHE.with(|cache| {
        let mut cache = cache.borrow_mut();
        // Ring membership is read from the id, so ids are part of the key with the texts.
        let hit = cache.iter().position(|slot| {
            slot.key.len() == entries.len()
                && slot
                    .key
                    .iter()
                    .zip(entries)
                    .all(|((t, id), e)| *t == e.pattern && *id == e.id)
        });
        if let Some(i) = hit {
            // Most recently used first, so the usual single library is found at once.
            let slot = cache.remove(i);
            let index = Rc::clone(&slot.index);
            cache.insert(0, slot);
            return IndexRef::Local(index);
        }
        let index = Rc::new(SubstituentIndex::build(entries));
        cache.insert(
            0,
            Slot {
                key: entries
                    .iter()
                    .map(|e| (e.pattern.clone(), e.id.clone()))
                    .collect(),
                index: Rc::clone(&index),
            },
        );
        cache.truncate(SLOTS);
        IndexRef::Local(index)
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Drug-like molecules written by hand (aspirin, lidocaine, ciprofloxacin, a sulfonamide,
    /// a nitro phenol, an ester and a nitrile), and the MOSES sample when it sits beside the
    /// project.
    fn molecules() -> Vec<Molecule> {
        let mut smiles: Vec<String> = [
            "CC(=O)Oc1ccccc1C(=O)O",
            "CCN(CC)CC(=O)Nc1c(C)cccc1C",
            "OC(=O)c1cn(C2CC2)c2cc(N3CCNCC3)c(F)cc2c1=O",
            "Cc1cc(NS(=O)(=O)c2ccc(N)cc2)no1",
            "Oc1ccc(cc1[N+](=O)[O-])C(F)(F)F",
            "COC(=O)CC(C#N)c1ccc(Br)s1",
        ]
        .iter()
        .map(|s| s.to_string())
        .collect();
        let sample = concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/../../../shared/data/moses-sample.smi"
        );
        if let Ok(text) = std::fs::read_to_string(sample) {
            smiles.extend(
                text.lines()
                    .take(300)
                    .filter_map(|l| l.split_whitespace().next())
                    .map(str::to_string),
            );
        }
        smiles.iter().filter_map(|s| mol::parse(s).ok()).collect()
    }

    fn summary(r: Option<Recognized<'_>>) -> Option<(String, Vec<usize>, bool)> {
        r.map(|r| (r.entry.id.clone(), r.atoms, r.approximate))
    }

    #[test]
    fn one_matcher_per_molecule_answers_as_a_matcher_per_call() {
        let builtin = Library::builtin();
        // A copy is not the built-in library: it takes the path of user libraries.
        let copy = builtin.clone();
        for library in [builtin, &copy] {
            let mut compared = 0;
            for m in molecules() {
                let mut matcher = pattern::Matcher::new(&m);
                for atom in 0..m.atoms().len() {
                    for nb in m.neighbors(atom) {
                        // Without a fence, and with one that holds the attachment already.
                        for avoid in [vec![], vec![nb.atom, atom + 1]] {
                            let alone = recognize(library, &m, atom, nb.atom, &avoid);
                            let shared =
                                recognize_with(library, &mut matcher, atom, nb.atom, &avoid);
                            assert_eq!(
                                summary(shared),
                                summary(alone),
                                "atom {atom} from {}",
                                nb.atom
                            );
                            compared += 1;
                        }
                    }
                }
            }
            assert!(compared > 100, "only {compared} cases compared");
        }
    }

    #[test]
    fn a_recognizer_answers_as_recognize_with_the_whole_fence() {
        let builtin = Library::builtin();
        let copy = builtin.clone();
        for library in [builtin, &copy] {
            let mut compared = 0;
            for m in molecules() {
                let n = m.atoms().len();
                let mut recognizer = Recognizer::new(library, &m);
                // Each atom from each side, under fences near and far, fenced itself, out of
                // range; asked twice, with the one matcher the recognizer keeps.
                for round in 0..2 {
                    for atom in 0..n + 1 {
                        let sides: Vec<usize> = if atom < n {
                            m.neighbors(atom).iter().map(|nb| nb.atom).collect()
                        } else {
                            vec![0]
                        };
                        for from in sides {
                            for avoid in [
                                vec![],
                                vec![from],
                                vec![from, (atom + 2) % n.max(1)],
                                (0..n).filter(|&x| x != atom && x % 3 == round).collect(),
                                vec![atom, n + 5],
                            ] {
                                let alone = recognize(library, &m, atom, from, &avoid);
                                let shared = recognizer.recognize(atom, from, &avoid);
                                assert_eq!(
                                    summary(shared),
                                    summary(alone),
                                    "atom {atom} from {from} avoiding {avoid:?}"
                                );
                                compared += 1;
                            }
                        }
                    }
                }
            }
            assert!(compared > 100, "only {compared} cases compared");
        }
    }

    #[test]
    fn a_saturated_carbon_bearing_o_or_n_is_no_plain_alkyl_as_nearest_type() {
        let library = Library::builtin();
        // Diphenyl(hydroxy)methyl, 1-methoxyethyl, 1-aminoethyl (no pattern of their own),
        // each seen from the ring carbon it is bonded to.
        for (smiles, atom, from, id) in [
            ("OC(c1ccccc1)(c1ccccc1)c1ccccn1", 1, 14, "hydroxymethyl"),
            ("COC(C)c1ccccc1", 2, 4, "methoxymethyl"),
            ("NC(C)c1ccccc1", 1, 3, "aminomethyl"),
        ] {
            let m = mol::parse(smiles).expect("parses");
            let found = summary(recognize(library, &m, atom, from, &[]));
            assert_eq!(
                found.map(|r| (r.0, r.2)),
                Some((id.to_string(), true)),
                "{smiles}"
            );
        }
        // A plain branched alkyl stays one.
        let m = mol::parse("CC(CC)c1ccccc1").expect("parses");
        let alkyl = summary(recognize(library, &m, 1, 4, &[]));
        assert_eq!(alkyl.map(|r| r.0), Some("alkyl-secondary".to_string()));
    }

    #[test]
    fn a_heteroaryl_carbon_beside_a_ring_n_is_nearer_2_pyridyl_than_phenyl() {
        let library = Library::builtin();
        // Thiazol-2-yl and pyrimidin-2-yl on a benzene ring (atom 0 seen from the phenyl
        // carbon, atom 1), and a thiophen-3-yl, which has no ring N beside its bond.
        for (smiles, want) in [
            ("c1(-c2ccccc2)nccs1", "pyridin-2-yl"),
            ("c1(-c2ccccc2)ncccn1", "pyridin-2-yl"),
            ("c1(-c2ccccc2)ccsc1", "phenyl"),
        ] {
            let m = mol::parse(smiles).expect("test SMILES parses");
            let from = 1;
            let r = summary(recognize(library, &m, 0, from, &[]));
            assert_eq!(
                r.map(|r| (r.0, r.2)),
                Some((want.to_string(), true)),
                "{smiles}"
            );
        }
    }

    #[test]
    fn entry_by_id_table_finds_what_the_list_does() {
        let builtin = Library::builtin();
        let ids = builtin.substituents.iter().map(|e| e.id.as_str()).chain([
            "no-such-group",
            "",
            "ring-",
        ]);
        for id in ids {
            let listed = builtin.substituents.iter().find(|e| e.id == id);
            assert_eq!(
                entry_by_id(builtin, id).map(|e| e as *const SubstituentEntry),
                listed.map(|e| e as *const SubstituentEntry),
                "{id}"
            );
        }
    }
}
