//! Site finding on whole molecules: precedence cases from `data/site_cases.toml`, molecules
//! that must have no site inside the aqueous window, symmetry groups, and the coverage of
//! the IUPAC digitized pKa dataset when it sits beside the project
//! (`cargo test -p pkarta-model --test sites coverage -- --nocapture` prints the misses).
use std::collections::{BTreeMap, HashSet};
use std::path::PathBuf;

use model::{find_sites, FoundSite, Kind, Library, AQUEOUS_WINDOW};

fn molecule(smiles: &str) -> mol::Molecule {
    let read = mol::parse(smiles).unwrap_or_else(|e| panic!("{smiles}: {e}"));
    mol::standardize(&read)
        .unwrap_or_else(|e| panic!("{smiles}: {e}"))
        .parent
}

fn sites(smiles: &str) -> (mol::Molecule, Vec<FoundSite>) {
    let m = molecule(smiles);
    let s = find_sites(Library::builtin(), &m);
    (m, s)
}

fn class_id(site: &FoundSite) -> &'static str {
    &Library::builtin().classes[site.class].id
}

fn describe(m: &mol::Molecule, s: &[FoundSite]) -> String {
    s.iter()
        .map(|x| {
            format!(
                "{}{}={}",
                mol::element_symbol(m.atoms()[x.atom].element),
                x.atom,
                class_id(x)
            )
        })
        .collect::<Vec<_>>()
        .join(" ")
}

// ---------------------------------------------------------------- named cases

#[derive(serde::Deserialize)]
struct Case {
    name: String,
    smiles: String,
    /// `atom index = class id` the site finder must report.
    #[serde(default)]
    sites: BTreeMap<String, String>,
    /// Atoms that must carry no site.
    #[serde(default)]
    no_site: Vec<usize>,
    /// Whether `sites` lists every site of the molecule.
    #[serde(default)]
    complete: bool,
    /// Groups of atoms whose sites must share a symmetry group.
    #[serde(default)]
    same_group: Vec<Vec<usize>>,
}

#[derive(serde::Deserialize)]
struct Cases {
    case: Vec<Case>,
}

#[test]
fn named_cases() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/data/site_cases.toml");
    let text = std::fs::read_to_string(path).expect("read site_cases.toml");
    let cases: Cases = toml::from_str(&text).expect("site_cases.toml fits the case schema");
    let mut failures = Vec::new();
    for case in &cases.case {
        let (m, found) = sites(&case.smiles);
        let at: BTreeMap<usize, &FoundSite> = found.iter().map(|s| (s.atom, s)).collect();
        let mut fail = |why: String| {
            failures.push(format!("{}: {} ({})", case.name, why, describe(&m, &found)))
        };
        for (atom, want) in &case.sites {
            let atom: usize = atom.parse().expect("atom index");
            match at.get(&atom) {
                Some(s) if class_id(s) == want => {}
                Some(s) => fail(format!("atom {atom} is {} not {want}", class_id(s))),
                None => fail(format!("atom {atom} has no site, want {want}")),
            }
        }
        for atom in &case.no_site {
            if let Some(s) = at.get(atom) {
                fail(format!(
                    "atom {atom} must have no site, has {}",
                    class_id(s)
                ));
            }
        }
        if case.complete && found.len() != case.sites.len() {
            fail(format!(
                "{} sites, want exactly {}",
                found.len(),
                case.sites.len()
            ));
        }
        for atoms in &case.same_group {
            let groups: HashSet<Option<usize>> =
                atoms.iter().map(|a| at.get(a).map(|s| s.group)).collect();
            if groups.len() != 1 || groups.contains(&None) {
                fail(format!("atoms {atoms:?} do not share one group"));
            }
        }
    }
    assert!(
        failures.is_empty(),
        "{} failing cases:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

// ---------------------------------------------------------------- invariants

/// Molecules with no measurable aqueous pKa (common practice; CRC lists none in the
/// window for them): their sites, if any, must all have parents outside the window.
#[test]
fn no_site_inside_the_window_for_inert_molecules() {
    let inert = [
        ("benzene", "c1ccccc1"),
        ("hexane", "CCCCCC"),
        ("diethyl ether", "CCOCC"),
        ("ethyl acetate", "CCOC(C)=O"),
        ("acetonitrile", "CC#N"),
        ("acetone", "CC(C)=O"),
        ("toluene", "Cc1ccccc1"),
    ];
    let lib = Library::builtin();
    for (name, smiles) in inert {
        let (m, found) = sites(smiles);
        for s in &found {
            let p = lib.classes[s.class].parent_pka;
            assert!(
                p < AQUEOUS_WINDOW.0 || p > AQUEOUS_WINDOW.1,
                "{name}: site {} has parent {p} inside the window ({})",
                class_id(s),
                describe(&m, &found)
            );
        }
    }
}

#[test]
fn one_site_per_atom_and_groups_numbered_in_order() {
    for smiles in [
        "OC(=O)CCC(=O)O",
        "NCCN",
        "OP(=O)(O)OCC(O)CO",
        "Nc1ccc(cc1)S(N)(=O)=O",
        "OC(=O)c1ccc(O)cc1",
    ] {
        let (_, found) = sites(smiles);
        let atoms: HashSet<usize> = found.iter().map(|s| s.atom).collect();
        assert_eq!(atoms.len(), found.len(), "{smiles}: two sites on one atom");
        let mut next = 0;
        for s in &found {
            assert!(s.group <= next, "{smiles}: group {} before {next}", s.group);
            if s.group == next {
                next += 1;
            }
            assert!(
                s.matched.contains(&s.atom),
                "{smiles}: site atom not in its match"
            );
            assert!(
                s.mapped.contains(&(1, s.atom)),
                "{smiles}: map 1 is not the site atom"
            );
        }
    }
}

#[test]
fn kekule_and_aromatic_input_give_the_same_sites() {
    for (aromatic, kekule) in [
        ("OC(=O)c1ccccc1", "OC(=O)C1=CC=CC=C1"),
        ("Oc1ccccc1", "OC1=CC=CC=C1"),
        ("c1ccncc1", "C1=CC=NC=C1"),
        ("Nc1ccncc1", "NC1=CC=NC=C1"),
        ("c1c[nH]cn1", "C1=CNC=N1"),
    ] {
        let (_, a) = sites(aromatic);
        let (_, k) = sites(kekule);
        let ids = |s: &[FoundSite]| s.iter().map(|x| (x.atom, x.class)).collect::<Vec<_>>();
        assert_eq!(ids(&a), ids(&k), "{aromatic} vs {kekule}");
    }
}

#[test]
fn a_user_library_finds_the_same_sites_as_the_builtin() {
    let lib = Library::builtin();
    let copy = Library::new(
        lib.classes.clone(),
        lib.substituents.clone(),
        lib.calibration.clone(),
    )
    .expect("builtin data loads through Library::new");
    for smiles in ["OC(=O)c1ccccc1", "CCN(CC)CC", "Nc1ccncc1", "OP(=O)(O)O"] {
        let m = molecule(smiles);
        assert_eq!(find_sites(lib, &m), find_sites(&copy, &m), "{smiles}");
    }
}

// ---------------------------------------------------------------- reference data

fn data_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../../shared/data")
}

/// SMILES column of a reference CSV (first column; SMILES hold no commas).
fn smiles_column(path: &PathBuf) -> Vec<String> {
    let text = std::fs::read_to_string(path).expect("read reference csv");
    let mut lines = text.lines();
    let header = lines.next().unwrap_or_default();
    assert!(
        header.starts_with("smiles,"),
        "{}: unexpected header {header}",
        path.display()
    );
    lines
        .filter_map(|l| l.split(',').next())
        .filter(|s| !s.is_empty())
        .map(str::to_string)
        .collect()
}

struct Coverage {
    molecules: usize,
    unreadable: Vec<String>,
    any: usize,
    in_window: usize,
    misses: Vec<String>,
}

fn coverage(file: &str, kind: Kind) -> Option<Coverage> {
    let path = data_dir().join(file);
    if !path.exists() {
        return None;
    }
    let lib = Library::builtin();
    let mut c = Coverage {
        molecules: 0,
        unreadable: Vec::new(),
        any: 0,
        in_window: 0,
        misses: Vec::new(),
    };
    for smiles in smiles_column(&path) {
        let Ok(read) = mol::parse(&smiles) else {
            c.unreadable.push(smiles);
            continue;
        };
        let Ok(std) = mol::standardize(&read) else {
            c.unreadable.push(smiles);
            continue;
        };
        c.molecules += 1;
        let found = find_sites(lib, &std.parent);
        let of_kind: Vec<&FoundSite> = found
            .iter()
            .filter(|s| lib.classes[s.class].kind == kind)
            .collect();
        if of_kind.is_empty() {
            c.misses.push(smiles);
            continue;
        }
        c.any += 1;
        if of_kind.iter().any(|s| {
            let p = lib.classes[s.class].parent_pka;
            (AQUEOUS_WINDOW.0..=AQUEOUS_WINDOW.1).contains(&p)
        }) {
            c.in_window += 1;
        }
    }
    Some(c)
}

/// Source: IUPAC Digitized pKa Dataset v1.0 (Zheng et al., DOI 10.5281/zenodo.7236452),
/// curated into ../shared/data/iupac-{acids,bases}.csv. Every molecule there has a measured
/// constant of that kind, so it must get at least one site of that kind.
#[test]
fn coverage_of_the_iupac_dataset() {
    let mut ran = false;
    for (file, kind) in [
        ("iupac-acids.csv", Kind::Acid),
        ("iupac-bases.csv", Kind::Base),
    ] {
        let Some(c) = coverage(file, kind) else {
            println!("skipped: {} not found", data_dir().join(file).display());
            continue;
        };
        ran = true;
        let share = 100.0 * c.any as f64 / c.molecules.max(1) as f64;
        println!(
            "{file}: {}/{} molecules ({share:.1} %) with at least one {kind:?} site, {} with one whose parent is inside the window; {} unreadable",
            c.any,
            c.molecules,
            c.in_window,
            c.unreadable.len()
        );
        for m in &c.misses {
            println!("  miss {m}");
        }
        for m in &c.unreadable {
            println!("  unreadable {m}");
        }
        assert!(share >= 97.0, "{file}: only {share:.1} % covered");
    }
    if !ran {
        println!("skipped");
    }
}

/// Every molecule of the drug-like sample goes through site finding without a panic, and
/// every site atom is matched by its class at the site.
#[test]
fn drug_like_sample_runs() {
    let path = data_dir().join("moses-sample.smi");
    let Ok(text) = std::fs::read_to_string(&path) else {
        println!("skipped: {} not found", path.display());
        return;
    };
    let lib = Library::builtin();
    let (mut molecules, mut with_sites, mut total) = (0, 0, 0);
    for line in text.lines() {
        let Some(smiles) = line.split_whitespace().next() else {
            continue;
        };
        let Ok(read) = mol::parse(smiles) else {
            continue;
        };
        let Ok(std) = mol::standardize(&read) else {
            continue;
        };
        molecules += 1;
        let found = find_sites(lib, &std.parent);
        for s in &found {
            let p = lib.pattern(s.class).expect("compiled");
            assert!(
                p.is_match_at(&std.parent, s.atom, &[]),
                "{smiles}: site not matched"
            );
        }
        with_sites += usize::from(!found.is_empty());
        total += found.len();
    }
    println!("{molecules} drug-like molecules, {with_sites} with sites, {total} sites");
    assert!(molecules > 0);
}
