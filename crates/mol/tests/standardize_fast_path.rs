//! The shortcut for molecules that need no standardizing must give exactly what the full
//! rules give: the same parent (atoms, bonds, rings, perception), origin, others and
//! changes. Checked over the repository's sample and, when present, the shared reference
//! sets (MOSES sample, handbook acids and bases); those are skipped cleanly when absent.

use std::path::PathBuf;

fn smiles_of(path: &PathBuf, csv: bool) -> Option<Vec<String>> {
    let text = std::fs::read_to_string(path).ok()?;
    let lines = text.lines().skip(usize::from(csv));
    Some(
        lines
            .filter_map(|l| {
                let field = if csv {
                    l.split(',').next()
                } else {
                    l.split_whitespace().next()
                };
                field.map(str::to_string)
            })
            .filter(|s| !s.is_empty() && !s.starts_with('#'))
            .collect(),
    )
}

fn check(set: &[String]) -> (usize, usize) {
    let (mut compared, mut shortcut) = (0, 0);
    for s in set {
        let Ok(m) = mol::parse(s) else { continue };
        let full = mol::standardize_without_shortcut(&m);
        let fast = mol::standardize(&m);
        let owned = mol::standardize_owned(m.clone());
        match (full, fast, owned) {
            (Ok(a), Ok(b), Ok(c)) => {
                for x in [&b, &c] {
                    assert_eq!(a.parent, x.parent, "{s}");
                    assert_eq!(a.origin, x.origin, "{s}");
                    assert_eq!(a.others, x.others, "{s}");
                    assert_eq!(a.changes, x.changes, "{s}");
                }
                if a.changes.is_empty() && a.others.is_empty() {
                    shortcut += 1;
                }
            }
            (Err(a), Err(b), Err(c)) => {
                assert_eq!(a.to_string(), b.to_string(), "{s}");
                assert_eq!(a.to_string(), c.to_string(), "{s}");
            }
            (a, b, c) => panic!("{s}: {:?} / {:?} / {:?}", a.is_ok(), b.is_ok(), c.is_ok()),
        }
        compared += 1;
    }
    (compared, shortcut)
}

#[test]
fn shortcut_matches_the_full_rules_on_the_repository_sample() {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../tests/data/sample.smi");
    let set = smiles_of(&path, false).expect("the sample is part of the repository");
    let (compared, _) = check(&set);
    assert!(compared > 50, "only {compared} molecules read");
}

#[test]
fn shortcut_matches_the_full_rules_on_the_shared_reference_sets() {
    let shared = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../../shared/data");
    for (name, csv) in [
        ("moses-sample.smi", false),
        ("iupac-acids.csv", true),
        ("iupac-bases.csv", true),
    ] {
        let Some(set) = smiles_of(&shared.join(name), csv) else {
            eprintln!("note: {name} not found; skipped");
            continue;
        };
        let (compared, shortcut) = check(&set);
        eprintln!("{name}: {compared} compared, {shortcut} needed no change");
        assert!(compared > 0);
    }
}
