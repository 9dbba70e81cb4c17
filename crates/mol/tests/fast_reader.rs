//! The direct reader for common SMILES against `purr`: `mol::parse` (direct reader first)
//! and `mol::parse_with_purr` (purr alone) must give the same molecule, or the same error
//! text, for every input: our sample, the shared reference sets when present, those lines
//! mutated at random, and generated strings over the SMILES alphabet.

use mol::{parse, parse_with_purr, Molecule};
use proptest::prelude::*;

/// Everything perception gives, through the public interface.
fn summary(m: &Molecule) -> String {
    let neighbors: Vec<_> = (0..m.atoms().len())
        .map(|i| m.neighbors(i).to_vec())
        .collect();
    format!(
        "{:?} {:?} {:?} {:?} {:?}",
        m.atoms(),
        m.bonds(),
        neighbors,
        m.rings(),
        m.components()
    )
}

fn outcome(r: Result<Molecule, mol::Error>) -> String {
    match r {
        Ok(m) => summary(&m),
        Err(e) => format!("error {:?}: {e}", e.kind),
    }
}

fn same(smiles: &str) -> Result<(), String> {
    let direct = outcome(parse(smiles));
    let purr = outcome(parse_with_purr(smiles));
    if direct == purr {
        Ok(())
    } else {
        Err(format!("{smiles:?}:\n direct: {direct}\n purr:   {purr}"))
    }
}

fn lines(path: &str) -> Vec<String> {
    std::fs::read_to_string(path)
        .map(|t| {
            t.lines()
                .filter(|l| !l.starts_with('#'))
                .filter_map(|l| l.split([' ', '\t', ',']).next().map(str::to_string))
                .collect()
        })
        .unwrap_or_default()
}

fn corpus() -> Vec<String> {
    let root = concat!(env!("CARGO_MANIFEST_DIR"), "/../..");
    let mut all = lines(&format!("{root}/tests/data/sample.smi"));
    // Reference sets, when present (they are not part of the repository).
    for f in ["moses-sample.smi", "iupac-acids.csv", "iupac-bases.csv"] {
        all.extend(lines(&format!("{root}/../shared/data/{f}")));
    }
    all
}

#[test]
fn direct_reader_agrees_with_purr_on_the_corpus() {
    let corpus = corpus();
    assert!(corpus.len() > 50, "the sample is missing");
    let failures: Vec<String> = corpus.iter().filter_map(|s| same(s).err()).collect();
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn direct_reader_agrees_with_purr_on_bracket_atoms() {
    // Every element symbol, in and out of brackets, with the bracket fields purr reads.
    let mut cases = Vec::new();
    for z in 0..=118u8 {
        let s = mol::element_symbol(z);
        for t in [
            format!("[{s}]"),
            format!("[{}]", s.to_lowercase()),
            format!("C[13{s}@@H2+3:12]C"),
            format!("[{s}@TH1]"),
            format!("[{s}H-]"),
            format!("[{s}+11]"),
            format!("[{s}--]"),
            format!("[{s}+0]"),
            format!("{s}"),
            format!("C{s}C"),
        ] {
            cases.push(t);
        }
    }
    for s in [
        "[G]", "[Gx]", "[Hx]", "[se]", "[as]", "[te]", "[1000C]", "[C:1000]", "[C:]",
    ] {
        cases.push(s.to_string());
    }
    let failures: Vec<String> = cases.iter().filter_map(|s| same(s).err()).collect();
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn direct_reader_agrees_with_purr_on_grammar_corners() {
    for s in [
        "C1.C1",
        "C(C.C)C",
        "C(.C)C",
        "C=1CC1",
        "C=1CC-1",
        "C=1CC#1",
        "C1CC1C1CC1",
        "C%10CC%10",
        "C%1CC",
        "C%73CC%73",
        "C%73CC%74C%74C%73",
        "C(C)(C)(C)C",
        "C(=O)",
        "C=(C)C",
        "C(1)C",
        "C)C",
        "(C)C",
        "CC(",
        "C.",
        ".C",
        "C..C",
        "C-",
        "C$C",
        "C11",
        "C12CC12",
        "CC/C=C\\C",
        "c1ccccc1:c",
        "AtC",
        "TsC",
        "C\u{e9}C",
        "C C",
        "",
        " ",
        "*",
        "[*]",
        "C*C",
    ] {
        if let Err(e) = same(s) {
            panic!("{e}");
        }
    }
}

/// The sample's lines with up to three characters deleted, inserted or replaced.
fn mutated() -> impl Strategy<Value = String> {
    const ALPHABET: &[&str] = &[
        "C", "N", "O", "S", "c", "n", "o", "s", "(", ")", "[", "]", "=", "#", "$", ":", "/", "\\",
        ".", "%", "0", "1", "2", "9", "+", "-", "@", "H", "Br", "Cl", "*", "[nH]", "[O-]", "%10",
        "[13CH3]", "[C@@H]", "[se]", "Na", "[Fe+2]",
    ];
    let sample = corpus();
    (
        0..sample.len(),
        proptest::collection::vec((0usize..200, 0usize..ALPHABET.len(), 0u8..3), 1..4),
    )
        .prop_map(move |(k, edits)| {
            let mut s: Vec<char> = sample[k].chars().collect();
            for (at, what, op) in edits {
                let at = at % (s.len() + 1);
                match op {
                    0 if at < s.len() => {
                        s.remove(at);
                    }
                    1 => {
                        for (j, c) in ALPHABET[what].chars().enumerate() {
                            s.insert(at + j, c);
                        }
                    }
                    _ if at < s.len() => s[at] = ALPHABET[what].chars().next().unwrap_or('C'),
                    _ => {}
                }
            }
            s.into_iter().collect()
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    #[test]
    fn direct_reader_agrees_with_purr_on_mutated_lines(s in mutated()) {
        prop_assert!(same(&s).is_ok(), "{}", same(&s).unwrap_err());
    }

    #[test]
    fn direct_reader_agrees_with_purr_on_generated_text(s in "[CNOcnos()\\[\\]=#:.%0-9+\\-@HBrl*]{1,30}") {
        prop_assert!(same(&s).is_ok(), "{}", same(&s).unwrap_err());
    }
}
