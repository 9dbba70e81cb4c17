//! Cost of preparing and evaluating peptide-like systems of 12, 20 and 40 sites.
//!
//! Sites alternate acid / base along a chain; couplings fall off as 1/distance with the sign
//! of the charge product (like charges repel). The numbers are invented for the benchmark.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use speciation::{speciate, Kind, Microstates, SiteInput, System};

fn chain(n: usize) -> System {
    let sites: Vec<SiteInput> = (0..n)
        .map(|i| {
            if i % 2 == 0 {
                SiteInput {
                    kind: Kind::Acid,
                    pka: 3.5 + (i % 5) as f64 * 0.4,
                }
            } else {
                SiteInput {
                    kind: Kind::Base,
                    pka: 9.0 + (i % 3) as f64 * 0.6,
                }
            }
        })
        .collect();
    let sign = |k: Kind| if k == Kind::Acid { -1.0 } else { 1.0 };
    let interaction = (0..n)
        .map(|i| {
            (0..n)
                .map(|j| {
                    if i == j {
                        0.0
                    } else {
                        let d = (i as f64 - j as f64).abs();
                        0.8 / d * sign(sites[i].kind) * sign(sites[j].kind)
                    }
                })
                .collect()
        })
        .collect();
    System {
        sites,
        interaction,
        base_charge: 0,
    }
}

fn bench(c: &mut Criterion) {
    for n in [12, 20, 40] {
        let system = chain(n);
        c.bench_function(&format!("speciate {n} sites"), |b| {
            b.iter(|| speciate(black_box(&system), 7.4))
        });
    }
    let system = chain(40);
    let states = Microstates::new(&system).expect("valid benchmark system");
    c.bench_function("curve 40 sites, 0..14 step 0.1 (prepared)", |b| {
        b.iter(|| states.curve(0.0, 14.0, 0.1).expect("valid range"))
    });
    let system = chain(200);
    let mut group = c.benchmark_group("large");
    group.sample_size(10);
    group.bench_function("speciate 200 sites", |b| {
        b.iter(|| speciate(black_box(&system), 7.4))
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
