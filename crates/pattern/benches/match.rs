//! Anchored site-pattern matching over drug-like molecules.
//!
//! Reads `../shared/data/moses-sample.smi` (beside the repository; skipped when absent),
//! compiles about thirty ionizable-site patterns, and for every molecule tries each pattern
//! anchored at each candidate atom (heteroatoms and carbons bearing hydrogen), the way site
//! finding uses them. One iteration handles one molecule, cycling through the sample, so the
//! reported time is per molecule.
//!
//! A second run uses every site pattern in `fragments/sites/*.toml` (skipped when none).
//!
//! Run: `cargo bench -p pkarta-pattern --bench match`

use std::hint::black_box;

use criterion::Criterion;
use mol::Molecule;
use pattern::Pattern;

/// Site patterns of the kind `fragments/sites` holds (written for this benchmark).
const PATTERNS: &[&str] = &[
    "[CX3](=O)[OX2H1:1]",
    "[NX3;H2;!$(NC=[O,S,N]);!$(Na):1]",
    "[NX3;H1;!$(NC=[O,S,N]);!$(Na):1]([CX4])[CX4]",
    "[NX3;H0;!$(NC=[O,S,N]);!$(Na);!$(N=*):1]([CX4])([CX4])[CX4]",
    "[nX2:1]",
    "[nX2;r5:1]",
    "[nX2;$(n1ccccc1):1]",
    "[OH:1]c",
    "[NX3;H2,H1;!$(NC=O);!$(NS=O):1]c",
    "[SX2H1:1]",
    "[SH:1]c",
    "[NX3;H2,H1:1]S(=O)=O",
    "[nH:1]1nnnc1",
    "[nH:1]1nccc1",
    "[nH:1]1ccc2ccccc12",
    "[NX3;H2,H1:1]C=[NX2]",
    "[NX2:1]=C(N)N",
    "[NH:1](C=O)C=O",
    "[OH:1][NX3]C=O",
    "[OX2H1;$(O[CX4]):1]",
    "[CX4;H1,H2:1](C=O)C=O",
    "[OX2H1:1]S(=O)=O",
    "[OX2H1:1]P=O",
    "[NX3;H1,H2:1]C=O",
    "[NH:1](C=O)N",
    "[OH:1]N=C",
    "[OH:1]C=C",
    "[NX3;H2:1]N",
    "[NX3;R;!$(NC=O):1]1CCOCC1",
    "[NX3;!$(NC=O):1]1CCNCC1",
    "[CX4;!H0:1]C#N",
    "[N+:1](=O)[O-]",
];

/// Every `pattern` string in the repository's `fragments/sites/*.toml`: the site classes
/// the library actually runs. Empty when the directory is absent or unreadable.
fn library_patterns() -> Vec<Pattern> {
    fn walk(value: &toml::Value, out: &mut Vec<String>) {
        match value {
            toml::Value::Table(t) => {
                for (k, v) in t {
                    match v {
                        toml::Value::String(s) if k == "pattern" => out.push(s.clone()),
                        _ => walk(v, out),
                    }
                }
            }
            toml::Value::Array(a) => a.iter().for_each(|v| walk(v, out)),
            _ => {}
        }
    }
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/../../fragments/sites");
    let mut texts = Vec::new();
    let mut files: Vec<_> = std::fs::read_dir(dir)
        .map(|d| d.filter_map(|e| e.ok()).map(|e| e.path()).collect())
        .unwrap_or_default();
    files.sort();
    for path in files
        .iter()
        .filter(|p| p.extension().is_some_and(|e| e == "toml"))
    {
        if let Some(value) = std::fs::read_to_string(path)
            .ok()
            .and_then(|t| t.parse::<toml::Value>().ok())
        {
            walk(&value, &mut texts);
        }
    }
    texts
        .iter()
        .filter_map(|t| Pattern::parse(t).ok())
        .collect()
}

fn load() -> Option<Vec<Molecule>> {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../../shared/data/moses-sample.smi"
    );
    let text = std::fs::read_to_string(path).ok()?;
    let molecules: Vec<Molecule> = text
        .lines()
        .filter_map(|line| line.split_whitespace().next())
        .filter_map(|smiles| mol::parse(smiles).ok())
        .collect();
    (!molecules.is_empty()).then_some(molecules)
}

/// Heteroatoms and carbons that carry hydrogen: the atoms a site can sit on.
fn candidates(m: &Molecule) -> Vec<usize> {
    (0..m.atoms().len())
        .filter(|&a| m.atoms()[a].element != 6 || m.total_hydrogens(a) > 0)
        .collect()
}

fn sites(patterns: &[Pattern], m: &Molecule, candidates: &[usize]) -> usize {
    let mut found = 0;
    for &a in candidates {
        for p in patterns {
            if p.could_anchor(m, a) {
                found += p.matches_at(m, a, &[]).len();
            }
        }
    }
    found
}

fn main() {
    let Some(molecules) = load() else {
        eprintln!("match bench skipped: ../shared/data/moses-sample.smi not found");
        return;
    };
    let patterns: Vec<Pattern> = PATTERNS
        .iter()
        .map(|t| Pattern::parse(t).unwrap_or_else(|e| panic!("bench pattern: {e}")))
        .collect();
    let prepared: Vec<(Molecule, Vec<usize>)> = molecules
        .into_iter()
        .map(|m| {
            let c = candidates(&m);
            (m, c)
        })
        .collect();
    let atoms: usize = prepared.iter().map(|(m, _)| m.atoms().len()).sum();
    let cands: usize = prepared.iter().map(|(_, c)| c.len()).sum();
    let hits: usize = prepared.iter().map(|(m, c)| sites(&patterns, m, c)).sum();
    let passed: usize = prepared
        .iter()
        .map(|(m, c)| {
            c.iter()
                .map(|&a| patterns.iter().filter(|p| p.could_anchor(m, a)).count())
                .sum::<usize>()
        })
        .sum();
    eprintln!(
        "{} molecules, {:.1} heavy atoms and {:.1} candidate atoms each, {} patterns, \
         {:.1} (pattern, atom) pairs per molecule pass could_anchor, {} matches",
        prepared.len(),
        atoms as f64 / prepared.len() as f64,
        cands as f64 / prepared.len() as f64,
        patterns.len(),
        passed as f64 / prepared.len() as f64,
        hits
    );

    let mut c = Criterion::default().configure_from_args();
    let mut i = 0;
    c.bench_function("matches_at, all patterns, one molecule", |b| {
        b.iter(|| {
            let (m, cands) = &prepared[i % prepared.len()];
            i += 1;
            black_box(sites(&patterns, m, cands))
        })
    });
    let mut i = 0;
    c.bench_function("is_match_at, all patterns, one molecule", |b| {
        b.iter(|| {
            let (m, cands) = &prepared[i % prepared.len()];
            i += 1;
            let mut n = 0;
            for &a in cands {
                for p in &patterns {
                    n += (p.could_anchor(m, a) && p.is_match_at(m, a, &[])) as usize;
                }
            }
            black_box(n)
        })
    });
    let library = library_patterns();
    if library.is_empty() {
        eprintln!("library bench skipped: no patterns in fragments/sites");
    } else {
        eprintln!("{} site patterns from fragments/sites", library.len());
        let mut i = 0;
        c.bench_function("matches_at, fragments/sites patterns, one molecule", |b| {
            b.iter(|| {
                let (m, cands) = &prepared[i % prepared.len()];
                i += 1;
                black_box(sites(&library, m, cands))
            })
        });
        // The same work through one `Matcher` per molecule, as site finding does: answers
        // about environments and atom expressions are shared between the patterns.
        let mut i = 0;
        c.bench_function("Matcher, fragments/sites patterns, one molecule", |b| {
            b.iter(|| {
                let (m, cands) = &prepared[i % prepared.len()];
                i += 1;
                let mut matcher = pattern::Matcher::new(m);
                let mut found = 0;
                for &a in cands {
                    for p in &library {
                        if matcher.could_anchor(p, a) {
                            found += matcher.matches_at(p, a, &[]).len();
                        }
                    }
                }
                black_box(found)
            })
        });
    }
    c.bench_function("parse all patterns", |b| {
        b.iter(|| {
            for t in PATTERNS {
                black_box(Pattern::parse(t).ok());
            }
        })
    });
    c.final_summary();
}
