//! `pkarta curve`: species fractions and net charge over a pH range.

use anyhow::{bail, Context};
use pkarta::{Curve, Options};

use crate::batch;
use crate::flags::{CurveArgs, CurveFormat};
use crate::fmt::{align, hang, num, CAUTION};

/// Most points a curve may have; more is almost surely a typo in `--step`.
const MAX_POINTS: f64 = 10_000.0;

/// Runs `curve`; returns whether the molecule failed.
pub fn run(args: &CurveArgs) -> anyhow::Result<bool> {
    if !(args.step.is_finite() && args.step > 0.0) {
        bail!("--step must be a positive number, not {}", args.step);
    }
    if args.from > args.to {
        bail!("--from {} is above --to {}", args.from, args.to);
    }
    if (args.to - args.from) / args.step + 1.0 > MAX_POINTS {
        bail!(
            "--step {} gives more than {MAX_POINTS} points from {} to {}",
            args.step,
            args.from,
            args.to
        );
    }
    let curve = match pkarta::curve(
        &args.smiles,
        &Options { ph: args.ph.ph },
        args.from,
        args.to,
        args.step,
    ) {
        Ok(curve) => curve,
        Err(e) => {
            let text = format!(
                "input  {}\nerror  {}\n",
                args.smiles,
                hang(&e.message, "       ")
            );
            batch::write_all_quiet(&mut batch::stdout(), text.as_bytes())?;
            return Ok(true);
        }
    };
    if let Some(path) = &args.svg {
        std::fs::write(path, pkarta::plot_svg(&curve))
            .with_context(|| format!("cannot write {}", path.display()))?;
    }
    let text = match args.format {
        CurveFormat::Table => table(&curve),
        CurveFormat::Csv => csv_text(&curve)?,
        CurveFormat::Jsonl => jsonl(&curve)?,
    };
    batch::write_all_quiet(&mut batch::stdout(), text.as_bytes())?;
    Ok(false)
}

fn table(curve: &Curve) -> String {
    let mut s = format!("parent  {}\n", curve.smiles);
    for (i, sp) in curve.species.iter().enumerate() {
        s.push_str(
            &format!("  S{}  charge {:+}  {}\n", i + 1, sp.charge, sp.smiles).replace("+0 ", "0 "),
        );
    }
    let mut header = vec!["pH".to_string(), "charge".to_string()];
    header.extend((1..=curve.species.len()).map(|i| format!("S{i}")));
    let mut rows = vec![header];
    for p in &curve.points {
        let mut row = vec![num(p.ph), num(p.charge)];
        row.extend(p.fractions.iter().map(|&f| format!("{:.3}", f)));
        rows.push(row);
    }
    let right: Vec<usize> = (0..rows[0].len()).collect();
    s.push_str(&align(&rows, &right, ""));
    s.push_str(&format!(
        "fractions of each species S1.. at each pH; pH of interest {}\n",
        num(curve.ph)
    ));
    s.push_str(CAUTION);
    s.push('\n');
    s
}

fn csv_text(curve: &Curve) -> anyhow::Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["ph".to_string(), "charge".to_string()];
    header.extend(curve.species.iter().map(|s| s.smiles.clone()));
    w.write_record(&header)?;
    for p in &curve.points {
        let mut row = vec![num(p.ph), format!("{:.4}", p.charge)];
        row.extend(p.fractions.iter().map(|f| format!("{f:.6}")));
        w.write_record(&row)?;
    }
    Ok(String::from_utf8(w.into_inner()?)?)
}

fn jsonl(curve: &Curve) -> anyhow::Result<String> {
    let mut s = String::new();
    for p in &curve.points {
        let fractions: serde_json::Map<String, serde_json::Value> = curve
            .species
            .iter()
            .zip(&p.fractions)
            .map(|(sp, &f)| (sp.smiles.clone(), f.into()))
            .collect();
        let line = serde_json::json!({ "smiles": curve.smiles, "ph": p.ph, "charge": p.charge, "fractions": fractions });
        s.push_str(&serde_json::to_string(&line)?);
        s.push('\n');
    }
    Ok(s)
}
