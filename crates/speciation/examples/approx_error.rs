//! Measures what splitting costs: for invented 20-site chains, compares each cluster limit
//! with the exact answer (limit 20), over pH 0..14. Couplings fall off either as 1/distance
//! (unscreened, the benchmark's system) or by half per step along the chain (attenuated).
//!
//! `cargo run --release -p pkarta-speciation --example approx_error`

use speciation::{Kind, Microstates, SiteInput, System};

fn chain(n: usize, attenuated: bool) -> System {
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
                        let size = if attenuated {
                            0.8 * 0.5f64.powf(d - 1.0)
                        } else {
                            0.8 / d
                        };
                        size * sign(sites[i].kind) * sign(sites[j].kind)
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

fn main() -> Result<(), Box<dyn std::error::Error>> {
    for attenuated in [false, true] {
        println!(
            "{} couplings",
            if attenuated {
                "attenuated (x0.5 per step)"
            } else {
                "unscreened 1/d"
            }
        );
        report(&chain(20, attenuated))?;
    }
    Ok(())
}

fn report(system: &System) -> Result<(), Box<dyn std::error::Error>> {
    let exact = Microstates::with_max_cluster(system, 20)?;
    println!("  reference: {}", exact.method());
    for cap in [16, 12, 8, 4] {
        let approx = Microstates::with_max_cluster(system, cap)?;
        let mut charge_err: f64 = 0.0;
        for i in 0..=1400 {
            let ph = i as f64 * 0.01;
            charge_err = charge_err.max((approx.charge(ph) - exact.charge(ph)).abs());
        }
        let pka_err = exact
            .macro_pka()
            .iter()
            .zip(approx.macro_pka())
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max);
        let pi_err = match (exact.isoelectric_point(), approx.isoelectric_point()) {
            (Some(a), Some(b)) => format!("{:.3}", (a - b).abs()),
            _ => "n/a".to_string(),
        };
        println!(
            "  limit {cap:2}: max |charge error| {charge_err:.3}, max |macro pKa error| {pka_err:.3}, |pI error| {pi_err}; {}",
            approx.method()
        );
    }
    Ok(())
}
