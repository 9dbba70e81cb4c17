//! Writes a speciation plot for an invented compound to the path given, or `speciation.svg`.
//!
//! `cargo run -p pkarta-speciation --example plot -- out.svg [k7|chain]`
//!
//! `k7`: a small diamino acid, "compound K-7"; `chain`: "oligomer C-12", eight alternating
//! acid and base sites along a chain. All constants are made up for the demo.

use speciation::{svg_plot, Kind, Microstates, PlotOptions, SiteInput, System};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let path = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "speciation.svg".to_string());
    if std::env::args().nth(2).as_deref() == Some("chain") {
        return chain(&path);
    }
    // Carboxylic acid, alpha-ammonium, side-chain ammonium; invented but chemically plain.
    let sites = vec![
        SiteInput {
            kind: Kind::Acid,
            pka: 3.6,
        },
        SiteInput {
            kind: Kind::Base,
            pka: 8.2,
        },
        SiteInput {
            kind: Kind::Base,
            pka: 10.1,
        },
    ];
    let interaction = vec![
        vec![0.0, -1.2, -0.3],
        vec![-1.2, 0.0, 0.5],
        vec![-0.3, 0.5, 0.0],
    ];
    let system = System {
        sites,
        interaction,
        base_charge: 0,
    };
    let states = Microstates::new(&system)?;
    let curve = states.curve(0.0, 14.0, 0.05)?;
    let smiles = |c: &[bool]| {
        format!(
            "{}CCCC{}C(=O){}",
            if c[2] { "[NH3+]" } else { "N" },
            if c[1] { "([NH3+])" } else { "(N)" },
            if c[0] { "[O-]" } else { "O" }
        )
    };
    let labels: Vec<String> = curve.species.iter().map(|s| smiles(&s.charged)).collect();
    let options = PlotOptions {
        title: Some("compound K-7: microspecies vs pH".to_string()),
        ph: Some(7.4),
        isoelectric_point: states.isoelectric_point(),
        ..PlotOptions::default()
    };
    std::fs::write(&path, svg_plot(&curve, &labels, &options))?;
    println!(
        "macro pKa {:?}, pI {:?}, {}",
        states.macro_pka(),
        states.isoelectric_point(),
        states.method()
    );
    Ok(())
}

fn chain(path: &str) -> Result<(), Box<dyn std::error::Error>> {
    let n = 8;
    let sites: Vec<SiteInput> = (0..n)
        .map(|i| {
            if i % 2 == 0 {
                SiteInput {
                    kind: Kind::Acid,
                    pka: 3.8 + 0.3 * i as f64,
                }
            } else {
                SiteInput {
                    kind: Kind::Base,
                    pka: 8.6 + 0.25 * i as f64,
                }
            }
        })
        .collect();
    let z = |k: Kind| if k == Kind::Acid { -1.0 } else { 1.0 };
    let interaction = (0..n)
        .map(|i| {
            (0..n)
                .map(|j| {
                    if i == j {
                        0.0
                    } else {
                        0.7 / (i as f64 - j as f64).abs() * z(sites[i].kind) * z(sites[j].kind)
                    }
                })
                .collect()
        })
        .collect();
    let system = System {
        sites,
        interaction,
        base_charge: 0,
    };
    let states = Microstates::new(&system)?;
    let curve = states.curve(0.0, 14.0, 0.05)?;
    let labels: Vec<String> = curve
        .species
        .iter()
        .map(|s| {
            s.charged
                .iter()
                .map(|&c| if c { '*' } else { '.' })
                .collect::<String>()
        })
        .collect();
    let options = PlotOptions {
        title: Some("oligomer C-12: microspecies vs pH (* = charged site)".to_string()),
        ph: Some(7.4),
        isoelectric_point: states.isoelectric_point(),
        ..PlotOptions::default()
    };
    std::fs::write(path, svg_plot(&curve, &labels, &options))?;
    println!(
        "{} species; macro pKa {:?}; {}",
        curve.species.len(),
        states.macro_pka(),
        states.method()
    );
    Ok(())
}
