//! The site-class tables (`fragments/sites/*.toml`) and the loader: ids unique and sorted
//! within each file, every pattern compiles, every value cited, every class wins the site
//! atom of its examples and no atom of its near-misses, and the loader's errors name the
//! file, the entry and (for patterns) the bad bytes.
use std::collections::HashSet;

use model::{find_sites, Kind, Library, Scale};

fn molecule(smiles: &str) -> mol::Molecule {
    let read = mol::parse(smiles).unwrap_or_else(|e| panic!("{smiles}: {e}"));
    mol::standardize(&read)
        .unwrap_or_else(|e| panic!("{smiles}: {e}"))
        .parent
}

// ---------------------------------------------------------------- tables

#[test]
fn ids_are_unique_and_sorted_within_each_file() {
    let mut all = HashSet::new();
    for (name, text) in Library::builtin_site_files() {
        let table: toml::Table = toml::from_str(text).expect("valid TOML");
        let ids: Vec<String> = table["class"]
            .as_array()
            .expect("[[class]] array")
            .iter()
            .map(|c| c["id"].as_str().expect("id").to_string())
            .collect();
        let mut sorted = ids.clone();
        sorted.sort();
        assert_eq!(ids, sorted, "{name}: class ids not sorted");
        for id in ids {
            assert!(all.insert(id.clone()), "{name}: id {id} used twice");
        }
    }
    assert_eq!(all.len(), Library::builtin().classes.len());
}

#[test]
fn ids_name_their_kind() {
    for c in &Library::builtin().classes {
        let prefix = match c.kind {
            Kind::Acid => "acid.",
            Kind::Base => "base.",
        };
        assert!(c.id.starts_with(prefix), "{}: kind {:?}", c.id, c.kind);
    }
}

#[test]
fn site_files_are_the_files_on_disk() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/../../fragments/sites");
    let mut on_disk: Vec<String> = std::fs::read_dir(dir)
        .expect("fragments/sites")
        .filter_map(|e| e.ok())
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".toml"))
        .collect();
    on_disk.sort();
    let built_in: Vec<String> = Library::builtin_site_files()
        .iter()
        .map(|(n, _)| n.rsplit('/').next().unwrap_or(n).to_string())
        .collect();
    assert_eq!(
        on_disk, built_in,
        "a site file is not compiled in (library.rs)"
    );
}

#[test]
fn every_pattern_compiles_and_marks_its_site() {
    let lib = Library::builtin();
    for (i, c) in lib.classes.iter().enumerate() {
        let p = lib
            .pattern(i)
            .unwrap_or_else(|| panic!("{}: pattern does not compile", c.id));
        assert_eq!(
            p.mapped(1),
            Some(p.anchor()),
            "{}: :1 is not the anchor",
            c.id
        );
        if let Some(a) = c.anchor {
            assert!(p.mapped(a).is_some(), "{}: anchor map {a} missing", c.id);
        }
        if c.scale == Scale::Taft || c.anchor.is_some() {
            // A Taft class scores the groups on its anchor; it must have some room to.
            assert!(c.rho > 0.0, "{}: scored class with rho {}", c.id, c.rho);
        }
    }
}

#[test]
fn every_value_is_cited() {
    for c in &Library::builtin().classes {
        assert!(!c.name.trim().is_empty(), "{}: no name", c.id);
        assert!(
            c.parent_source.len() > 10,
            "{}: parent_pka source too short",
            c.id
        );
        if c.scale != Scale::None {
            assert!(c.rho_source.len() > 10, "{}: rho source too short", c.id);
            assert!(
                c.rho > 0.0,
                "{}: rho must be positive (pKa = parent - rho sum sigma)",
                c.id
            );
        }
        if c.ortho_term != 0.0 {
            // The ortho term is a constant of its own: its origin is told in the notes.
            assert!(
                c.notes.contains("ortho"),
                "{}: ortho_term without a note",
                c.id
            );
        }
        if c.geminal_interaction.is_some() {
            assert!(
                !c.geminal_source.trim().is_empty(),
                "{}: geminal value uncited",
                c.id
            );
        }
        assert!(
            c.uncertainty >= 0.1 && c.uncertainty <= 3.0,
            "{}: uncertainty {}",
            c.id,
            c.uncertainty
        );
        assert!(
            (-15.0..=50.0).contains(&c.parent_pka),
            "{}: parent {}",
            c.id,
            c.parent_pka
        );
    }
}

/// Every value here was written from memory of a published source, derived from such
/// values, or is common practice; the source text must say which (house rule).
#[test]
fn every_source_says_how_it_was_obtained() {
    let how = ["from memory", "common practice", "derived", "by definition"];
    for c in &Library::builtin().classes {
        for (field, text) in [
            ("parent_source", &c.parent_source),
            ("rho_source", &c.rho_source),
            ("geminal_source", &c.geminal_source),
        ] {
            if text.is_empty() {
                continue;
            }
            let refers = text.starts_with("as acid.") || text.starts_with("as base.");
            assert!(
                refers || how.iter().any(|h| text.contains(h)),
                "{}: {field} does not say how it was obtained: {text}",
                c.id
            );
        }
    }
}

#[test]
fn every_class_wins_its_examples_and_none_of_its_near_misses() {
    let lib = Library::builtin();
    let mut failures = Vec::new();
    for (i, c) in lib.classes.iter().enumerate() {
        assert!(!c.examples.is_empty(), "{}: no examples", c.id);
        assert!(!c.near_misses.is_empty(), "{}: no near-misses", c.id);
        for smiles in &c.examples {
            let m = molecule(smiles);
            let won: Vec<usize> = find_sites(lib, &m)
                .iter()
                .filter(|s| s.class == i)
                .map(|s| s.atom)
                .collect();
            let pattern = lib.pattern(i).expect("compiles");
            if won.is_empty() {
                failures.push(format!("{}: example {smiles} not won", c.id));
            }
            for atom in won {
                // The atom won is the site atom of a match of the class itself.
                if !pattern.is_match_at(&m, atom, &[]) {
                    failures.push(format!(
                        "{}: {smiles} atom {atom} won without a match",
                        c.id
                    ));
                }
            }
        }
        for smiles in &c.near_misses {
            let m = molecule(smiles);
            if find_sites(lib, &m).iter().any(|s| s.class == i) {
                failures.push(format!("{}: near-miss {smiles} won", c.id));
            }
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

/// The element pre-filter read from each pattern must never exclude an atom that the
/// pattern matches (it would silently drop sites).
#[test]
fn anchor_element_filter_is_sound() {
    let lib = Library::builtin();
    let mut molecules = Vec::new();
    for c in &lib.classes {
        molecules.extend(c.examples.iter().chain(&c.near_misses).map(|s| molecule(s)));
    }
    let mut restricted = 0;
    for (i, c) in lib.classes.iter().enumerate() {
        let Some(elements) = lib.anchor_elements(i) else {
            continue;
        };
        restricted += 1;
        let p = lib.pattern(i).expect("compiles");
        for m in &molecules {
            for (atom, a) in m.atoms().iter().enumerate() {
                if p.is_match_at(m, atom, &[]) {
                    assert!(
                        elements.contains(&a.element),
                        "{}: matches element {} outside its filter {elements:?}",
                        c.id,
                        a.element
                    );
                }
            }
        }
    }
    // Every class here names its site element, so the filter applies to all of them.
    assert_eq!(restricted, lib.classes.len());
}

// ---------------------------------------------------------------- loader

const GOOD: &str = r#"
[[class]]
id = "acid.test"
name = "test acid"
kind = "acid"
pattern = '[CX3](=O)[OX2H1:1]'
priority = 1
parent_pka = 4.76
parent_source = "acetic acid, from memory of CRC"
scale = "none"
uncertainty = 0.5
examples = ["CC(=O)O"]
near_misses = ["CCO"]
"#;

fn load(text: &str) -> Result<Library, String> {
    Library::from_sources(&[("test.toml", text)], &[], &[]).map_err(|e| e.to_string())
}

#[test]
fn loads_a_minimal_library() {
    let lib = load(GOOD).expect("loads");
    assert_eq!(lib.classes.len(), 1);
    assert_eq!(lib.class_index("acid.test"), Some(0));
    let m = molecule("CC(=O)O");
    let found = find_sites(&lib, &m);
    assert_eq!(found.len(), 1);
    assert_eq!(found[0].atom, 3);
}

#[test]
fn bad_pattern_error_names_file_class_and_bytes() {
    let err = load(&GOOD.replace("[CX3](=O)[OX2H1:1]", "[CX3](=O)[OX2H1:1")).unwrap_err();
    assert!(
        err.starts_with("test.toml: class `acid.test`: pattern does not compile"),
        "{err}"
    );
    assert!(err.contains("\n    [CX3](=O)[OX2H1:1\n"), "{err}");
    assert!(err.contains('^'), "{err}");
}

#[test]
fn pattern_without_site_map_is_refused() {
    let err = load(&GOOD.replace("[OX2H1:1]", "[OX2H1]")).unwrap_err();
    assert!(err.contains("marks no site atom (atom map :1)"), "{err}");
}

#[test]
fn anchor_without_map_is_refused() {
    let err = load(&GOOD.replace("priority = 1", "priority = 1\nanchor = 2")).unwrap_err();
    assert!(err.contains("anchor 2 names no atom map"), "{err}");
}

#[test]
fn ring_scale_flags_on_a_parent_only_class_are_refused() {
    for flag in ["n_alkyl_counted", "para_to_site_carbon"] {
        let err = load(&GOOD.replace("priority = 1", &format!("priority = 1\n{flag} = true")))
            .unwrap_err();
        assert!(
            err.contains(&format!("{flag} is read on a Hammett scale only")),
            "{err}"
        );
    }
}

#[test]
fn duplicate_ids_are_refused_across_files() {
    let err = Library::from_sources(&[("a.toml", GOOD), ("b.toml", GOOD)], &[], &[])
        .unwrap_err()
        .to_string();
    assert_eq!(
        err,
        "b.toml: class `acid.test`: id used twice (first in a.toml)"
    );
}

#[test]
fn unknown_fields_and_missing_sources_are_refused() {
    let err = load(&GOOD.replace("priority = 1", "priority = 1\nprioritty = 2")).unwrap_err();
    assert!(
        err.starts_with("test.toml:") && err.contains("prioritty"),
        "{err}"
    );
    let err = load(&GOOD.replace("acetic acid, from memory of CRC", " ")).unwrap_err();
    assert!(err.contains("parent_pka has no source"), "{err}");
    let err = load(&GOOD.replace("scale = \"none\"", "scale = \"taft\"")).unwrap_err();
    assert!(err.contains("rho has no source"), "{err}");
    let err = load(&GOOD.replace("near_misses = [\"CCO\"]", "near_misses = []")).unwrap_err();
    assert!(err.contains("no near-misses"), "{err}");
}

#[test]
fn calibration_for_an_unknown_class_is_refused() {
    let fit = r#"
[[calibration]]
class = "acid.nothing"
parent_pka = 1.0
rho = 1.0
points = 3
rmse = 0.1
cv_mae = 0.1
source = "test"
"#;
    let err = Library::from_sources(&[("test.toml", GOOD)], &[], &[("fit.toml", fit)])
        .unwrap_err()
        .to_string();
    assert!(
        err.contains("calibration for `acid.nothing`: no class"),
        "{err}"
    );
    let ok = fit.replace("acid.nothing", "acid.test");
    let lib =
        Library::from_sources(&[("test.toml", GOOD)], &[], &[("fit.toml", &ok)]).expect("loads");
    assert_eq!(lib.calibration_for("acid.test").map(|c| c.points), Some(3));
}

#[test]
fn from_dir_reads_the_fragments_tree() {
    let root = concat!(env!("CARGO_MANIFEST_DIR"), "/../../fragments");
    let lib = Library::from_dir(std::path::Path::new(root)).expect("fragments/ loads");
    let builtin = Library::builtin();
    let ids = |l: &Library| l.classes.iter().map(|c| c.id.clone()).collect::<Vec<_>>();
    assert_eq!(ids(&lib), ids(builtin));
    assert_eq!(lib.substituents.len(), builtin.substituents.len());
    let missing = Library::from_dir(std::path::Path::new("/nonexistent/fragments")).unwrap_err();
    assert!(
        missing
            .to_string()
            .starts_with("/nonexistent/fragments/sites: cannot read"),
        "{missing}"
    );
}

#[test]
fn pattern_error_text_is_exact() {
    let err = load(&GOOD.replace("[OX2H1:1]", "[OX2Q1:1]")).unwrap_err();
    assert_eq!(
        err,
        "test.toml: class `acid.test`: pattern does not compile: unknown atom primitive 'Q' \
         at byte 13\n    [CX3](=O)[OX2Q1:1]\n                 ^"
    );
}
