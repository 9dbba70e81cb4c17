//! Benchmarks of the molecule stage over our own sample of drug-like SMILES
//! (tests/data/sample.smi): read and perceive, standardize, write, symmetry classes.
use criterion::{criterion_group, criterion_main, Criterion, Throughput};

fn sample() -> Vec<String> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../../tests/data/sample.smi");
    std::fs::read_to_string(path)
        .expect("tests/data/sample.smi")
        .lines()
        .filter_map(|l| l.split_whitespace().next().map(str::to_string))
        .collect()
}

fn bench(c: &mut Criterion) {
    let smiles = sample();
    let molecules: Vec<mol::Molecule> = smiles
        .iter()
        .map(|s| mol::parse(s).expect("sample reads"))
        .collect();
    let mut g = c.benchmark_group("mol");
    g.throughput(Throughput::Elements(smiles.len() as u64));
    g.bench_function("parse", |b| {
        b.iter(|| smiles.iter().filter(|s| mol::parse(s).is_ok()).count())
    });
    g.bench_function("standardize", |b| {
        b.iter(|| {
            molecules
                .iter()
                .filter(|m| mol::standardize(m).is_ok())
                .count()
        })
    });
    g.bench_function("write_smiles", |b| {
        b.iter(|| {
            molecules
                .iter()
                .map(|m| mol::write_smiles(m).len())
                .sum::<usize>()
        })
    });
    g.bench_function("symmetry_classes", |b| {
        b.iter(|| {
            molecules
                .iter()
                .map(|m| mol::symmetry_classes(m).len())
                .sum::<usize>()
        })
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
