//! Per-pattern match totals over the drug-like sample, checked against RDKit.
//!
//! The expected totals in `tests/data/rdkit_sample_totals.toml` were produced by RDKit (an
//! outside library) by `tests/gen_rdkit_sample_totals.py`, over
//! `../shared/data/moses-sample.smi` (MOSES test split). The sample lives beside the
//! repository; without it this test says so and passes without checking.

use serde::Deserialize;

#[derive(Deserialize)]
struct Totals {
    molecules: usize,
    pattern: Vec<Expected>,
}

#[derive(Deserialize)]
struct Expected {
    smarts: String,
    /// Distinct matched atom sets, summed over molecules.
    matches: usize,
    /// Distinct anchor atoms, summed over molecules.
    anchors: usize,
    /// Molecules with at least one match.
    molecules: usize,
}

#[test]
fn totals_over_the_sample_agree_with_rdkit() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../../shared/data/moses-sample.smi"
    );
    let Ok(text) = std::fs::read_to_string(path) else {
        eprintln!("skipped: {path} not found");
        return;
    };
    let totals: Totals =
        toml::from_str(include_str!("data/rdkit_sample_totals.toml")).expect("totals file");
    let mut molecules = Vec::new();
    for smiles in text.lines().filter_map(|l| l.split_whitespace().next()) {
        match mol::parse(smiles) {
            Ok(m) => molecules.push(m),
            Err(e) => panic!("mol could not read {smiles}: {e}"),
        }
    }
    assert_eq!(
        molecules.len(),
        totals.molecules,
        "sample size differs from the one RDKit saw"
    );
    let mut failures = Vec::new();
    for expected in &totals.pattern {
        let p = pattern::Pattern::parse(&expected.smarts).unwrap_or_else(|e| panic!("{e}"));
        let (mut matches, mut anchors, mut hit) = (0, 0, 0);
        for m in &molecules {
            let n = p.matches(m).len();
            matches += n;
            hit += (n > 0) as usize;
            anchors += (0..m.atoms().len())
                .filter(|&a| p.is_match_at(m, a, &[]))
                .count();
        }
        if (matches, anchors, hit) != (expected.matches, expected.anchors, expected.molecules) {
            failures.push(format!(
                "{}: RDKit {} matches / {} anchors / {} molecules, we {matches} / {anchors} / {hit}",
                expected.smarts, expected.matches, expected.anchors, expected.molecules
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}
