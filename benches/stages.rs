//! Benchmarks per stage (criterion): read + perceive, standardize, find sites, score,
//! speciate, and the end-to-end estimate, each over the same molecule sets:
//!
//! - `drug-like`: the fixed list of 20 drug-like molecules below;
//! - `moses`: `../shared/data/moses-sample.smi` (2,000 molecules of the MOSES benchmark's
//!   test split) when that file is present; skipped with a note when it is not.
//!
//! Each stage is timed on inputs prepared by the stages before it, outside the timed loop,
//! so a group measures its own stage only. Throughput is reported in molecules per second.
//!
//! Run: `cargo bench -p pkarta --bench stages` (from the repository root).

use std::hint::black_box;
use std::path::PathBuf;
use std::time::Duration;

use criterion::{criterion_group, criterion_main, BenchmarkGroup, Criterion, Throughput};
use pkarta::{model, mol, speciation};

/// Twenty drug-like molecules covering the common site classes (carboxylic acids, phenols,
/// amines, pyridines, imidazoles, sulfonamides, zwitterions, salts). Structures of
/// well-known medicines, written here by hand.
const DRUG_LIKE: &[&str] = &[
    "CC(=O)Oc1ccccc1C(=O)O",                       // aspirin
    "CC(C)Cc1ccc(cc1)C(C)C(=O)O",                  // ibuprofen
    "CC(=O)Nc1ccc(O)cc1",                          // paracetamol
    "Cn1cnc2c1c(=O)n(C)c(=O)n2C",                  // caffeine
    "CN1CCC[C@H]1c1cccnc1",                        // nicotine
    "CN(C)CCOC(c1ccccc1)c1ccccc1",                 // diphenhydramine
    "CCN(CC)CC(=O)Nc1c(C)cccc1C",                  // lidocaine
    "CCN(CC)CCOC(=O)c1ccc(N)cc1",                  // procaine
    "CN(C)C(=N)N=C(N)N",                           // metformin
    "OC(=O)c1cn(C2CC2)c2cc(N3CCNCC3)c(F)cc2c1=O",  // ciprofloxacin
    "Cc1cc(NS(=O)(=O)c2ccc(N)cc2)no1",             // sulfamethoxazole
    "NCCc1c[nH]cn1",                               // histamine
    "NCCc1ccc(O)c(O)c1",                           // dopamine
    "COc1ccc2cc(ccc2c1)[C@H](C)C(=O)O",            // naproxen
    "CC(=O)CC(c1ccccc1)c1c(O)c2ccccc2oc1=O",       // warfarin
    "OC(=O)COCCN1CCN(CC1)C(c1ccccc1)c1ccc(Cl)cc1", // cetirizine
    "CC1(C)S[C@@H]2[C@H](NC(=O)[C@H](N)c3ccc(O)cc3)C(=O)N2[C@H]1C(=O)O", // amoxicillin
    "Cn1c(=O)c2[nH]cnc2n(C)c1=O",                  // theophylline
    "NC(Cc1ccc(O)cc1)C(=O)O",                      // tyrosine
    "CC[NH+](CC)CC.[Cl-]",                         // a salt with its counter-ion
];

fn moses_sample() -> Option<Vec<String>> {
    let path =
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../../shared/data/moses-sample.smi");
    match std::fs::read_to_string(&path) {
        Ok(text) => Some(
            text.lines()
                .filter_map(|l| l.split_whitespace().next())
                .map(str::to_string)
                .collect(),
        ),
        Err(_) => {
            eprintln!(
                "note: {} not found; the moses set is skipped",
                path.display()
            );
            None
        }
    }
}

/// The molecule sets, by name.
fn sets() -> Vec<(&'static str, Vec<String>)> {
    let mut sets = vec![(
        "drug-like",
        DRUG_LIKE.iter().map(|s| s.to_string()).collect(),
    )];
    if let Some(moses) = moses_sample() {
        sets.push(("moses", moses));
    }
    sets
}

/// Everything the stages produce for one molecule, prepared once outside timed loops.
struct Prepared {
    molecule: mol::Molecule,
    parent: mol::Molecule,
    found: Vec<model::FoundSite>,
    system: speciation::System,
}

fn prepare(library: &model::Library, smiles: &[String]) -> Vec<Prepared> {
    smiles
        .iter()
        .filter_map(|s| {
            let molecule = mol::parse(s).ok()?;
            let parent = mol::standardize(&molecule).ok()?.parent;
            let found = model::find_sites(library, &parent);
            let sites: Vec<model::Site> = model::score_sites(library, &parent, &found)
                .into_iter()
                .filter(|s| s.in_window)
                .collect();
            let interaction = model::interactions(library, &parent, &sites);
            let system = speciation::System {
                sites: sites
                    .iter()
                    .map(|s| speciation::SiteInput {
                        kind: match s.kind {
                            model::Kind::Acid => speciation::Kind::Acid,
                            model::Kind::Base => speciation::Kind::Base,
                        },
                        pka: s.pka,
                    })
                    .collect(),
                interaction,
                base_charge: parent.atoms().iter().map(|a| a.charge as i32).sum(),
            };
            Some(Prepared {
                molecule,
                parent,
                found,
                system,
            })
        })
        .collect()
}

fn configure<'a>(
    c: &'a mut Criterion,
    stage: &str,
) -> BenchmarkGroup<'a, criterion::measurement::WallTime> {
    let mut group = c.benchmark_group(stage);
    // The machines this runs on are small and shared: fewer, shorter samples.
    group
        .sample_size(20)
        .measurement_time(Duration::from_secs(4))
        .warm_up_time(Duration::from_secs(1));
    group
}

fn stages(c: &mut Criterion) {
    let library = model::Library::builtin();
    let sets: Vec<(&str, Vec<String>, Vec<Prepared>)> = sets()
        .into_iter()
        .map(|(name, smiles)| {
            let prepared = prepare(library, &smiles);
            (name, smiles, prepared)
        })
        .collect();

    let mut group = configure(c, "read+perceive");
    for (name, smiles, _) in &sets {
        group.throughput(Throughput::Elements(smiles.len() as u64));
        group.bench_function(*name, |b| {
            b.iter(|| {
                smiles
                    .iter()
                    .filter(|s| mol::parse(black_box(s)).is_ok())
                    .count()
            })
        });
    }
    group.finish();

    let mut group = configure(c, "standardize");
    for (name, _, prepared) in &sets {
        group.throughput(Throughput::Elements(prepared.len() as u64));
        group.bench_function(*name, |b| {
            b.iter(|| {
                prepared
                    .iter()
                    .filter(|p| mol::standardize(black_box(&p.molecule)).is_ok())
                    .count()
            })
        });
    }
    group.finish();

    let mut group = configure(c, "find-sites");
    for (name, _, prepared) in &sets {
        group.throughput(Throughput::Elements(prepared.len() as u64));
        group.bench_function(*name, |b| {
            b.iter(|| {
                prepared
                    .iter()
                    .map(|p| model::find_sites(library, black_box(&p.parent)).len())
                    .sum::<usize>()
            })
        });
    }
    group.finish();

    let mut group = configure(c, "score");
    for (name, _, prepared) in &sets {
        group.throughput(Throughput::Elements(prepared.len() as u64));
        group.bench_function(*name, |b| {
            b.iter(|| {
                prepared
                    .iter()
                    .map(|p| {
                        let sites = model::score_sites(library, black_box(&p.parent), &p.found);
                        let w = model::interactions(library, &p.parent, &sites);
                        sites.len() + w.len()
                    })
                    .sum::<usize>()
            })
        });
    }
    group.finish();

    let mut group = configure(c, "speciate");
    for (name, _, prepared) in &sets {
        group.throughput(Throughput::Elements(prepared.len() as u64));
        group.bench_function(*name, |b| {
            b.iter(|| {
                prepared
                    .iter()
                    .map(|p| {
                        speciation::speciate(black_box(&p.system), 7.4)
                            .species
                            .len()
                    })
                    .sum::<usize>()
            })
        });
    }
    group.finish();

    let mut group = configure(c, "estimate");
    let options = pkarta::Options::default();
    for (name, smiles, _) in &sets {
        group.throughput(Throughput::Elements(smiles.len() as u64));
        group.bench_function(*name, |b| {
            b.iter(|| {
                smiles
                    .iter()
                    .filter(|s| {
                        pkarta::estimate(black_box(s), None, &options)
                            .error
                            .is_none()
                    })
                    .count()
            })
        });
    }
    group.finish();

    // A set where many molecules fail to parse would time less work than it claims.
    for (name, smiles, prepared) in &sets {
        if prepared.len() < smiles.len() {
            eprintln!(
                "note: {name}: {} of {} molecules did not parse or standardize",
                smiles.len() - prepared.len(),
                smiles.len()
            );
        }
    }
}

/// A 30-residue peptide written residue by residue (ten kinds of residue, three times):
/// about 90 ionizable sites, the case where speciation must fall back to clusters.
fn peptide(residues: usize) -> String {
    const SIDE: [&str; 10] = [
        "(CCCCN)",        // lysine
        "(CC(=O)O)",      // aspartic acid
        "(CCC(=O)O)",     // glutamic acid
        "(Cc1c[nH]cn1)",  // histidine
        "(Cc1ccc(O)cc1)", // tyrosine
        "",               // glycine
        "(C)",            // alanine
        "(CO)",           // serine
        "(CCCNC(=N)N)",   // arginine
        "(CS)",           // cysteine
    ];
    let mut s: String = (0..residues)
        .map(|i| format!("NC{}C(=O)", SIDE[i % SIDE.len()]))
        .collect();
    s.push('O');
    s
}

fn long_peptide(c: &mut Criterion) {
    let smiles = peptide(30);
    let mut group = c.benchmark_group("peptide");
    group.sample_size(10);
    group.bench_function("estimate 30 residues", |b| {
        b.iter(|| {
            let r = pkarta::estimate(
                std::hint::black_box(&smiles),
                None,
                &pkarta::Options::default(),
            );
            assert!(r.error.is_none());
            r
        })
    });
    group.finish();
}

criterion_group!(benches, stages, long_peptide);
criterion_main!(benches);
