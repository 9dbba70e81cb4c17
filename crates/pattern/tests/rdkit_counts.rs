//! Match counts and anchor atoms checked against RDKit.
//!
//! The expected values in `tests/data/rdkit_counts.toml` were produced by RDKit (an outside
//! library), by `tests/gen_rdkit_counts.py`; rerun that script to regenerate them. A
//! disagreement can come from this crate or from molecule perception in `mol` (aromaticity,
//! rings, hydrogens), so the failure message shows both.

use serde::Deserialize;

#[derive(Deserialize)]
struct Cases {
    case: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    smiles: String,
    smarts: String,
    /// Distinct matched atom sets, from RDKit.
    count: usize,
    /// Molecule atoms the anchored pattern atom sits on, from RDKit.
    anchors: Vec<usize>,
}

fn cases() -> Vec<Case> {
    let cases: Cases =
        toml::from_str(include_str!("data/rdkit_counts.toml")).expect("rdkit_counts.toml");
    cases.case
}

#[test]
fn counts_and_anchors_agree_with_rdkit() {
    let cases = cases();
    assert!(cases.len() > 50);
    let mut failures = Vec::new();
    for case in &cases {
        let molecule = match mol::parse(&case.smiles) {
            Ok(m) => m,
            Err(e) => {
                failures.push(format!(
                    "{}: mol could not read {}: {e}",
                    case.name, case.smiles
                ));
                continue;
            }
        };
        let pattern = match pattern::Pattern::parse(&case.smarts) {
            Ok(p) => p,
            Err(e) => {
                failures.push(format!("{}: {e}", case.name));
                continue;
            }
        };
        let count = pattern.matches(&molecule).len();
        let anchors: Vec<usize> = (0..molecule.atoms().len())
            .filter(|&a| pattern.is_match_at(&molecule, a, &[]))
            .collect();
        if count != case.count || anchors != case.anchors {
            failures.push(format!(
                "{}: {} in {}: RDKit {} matches on {:?}, we {} on {:?}",
                case.name, case.smarts, case.smiles, case.count, case.anchors, count, anchors
            ));
        }
        for a in 0..molecule.atoms().len() {
            let found = !pattern.matches_at(&molecule, a, &[]).is_empty();
            if found != pattern.is_match_at(&molecule, a, &[]) {
                failures.push(format!(
                    "{}: matches_at and is_match_at differ at {a}",
                    case.name
                ));
            }
            if found && !pattern.could_anchor(&molecule, a) {
                failures.push(format!(
                    "{}: could_anchor refused matching atom {a}",
                    case.name
                ));
            }
        }
    }
    assert!(
        failures.is_empty(),
        "{} of {} cases:\n{}",
        failures.len(),
        cases.len(),
        failures.join("\n")
    );
}

#[test]
fn case_names_are_unique() {
    let cases = cases();
    let mut names: Vec<&str> = cases.iter().map(|c| c.name.as_str()).collect();
    names.sort_unstable();
    let before = names.len();
    names.dedup();
    assert_eq!(before, names.len());
}
