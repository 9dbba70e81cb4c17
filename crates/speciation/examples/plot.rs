//! Writes a speciation plot for a small invented diamino acid ("compound K-7", sites made up
//! for the demo) to the path given, or `speciation.svg`.
//!
//! `cargo run -p pkarta-speciation --example plot -- out.svg`

use speciation::{svg_plot, Kind, Microstates, PlotOptions, SiteInput, System};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let path = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "speciation.svg".to_string());
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
