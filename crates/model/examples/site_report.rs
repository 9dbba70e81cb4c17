//! Per-class report over the IUPAC digitized pKa dataset (../shared/data, read in place,
//! skipped when absent): for each molecule, the strongest site of the file's kind (lowest
//! acid pKa, highest base pKa) as scored with the published (uncalibrated) constants,
//! against the measured constant, grouped by the class of that site. A quick way to see
//! which classes are mis-assigned or far off before calibration.
//!
//! `cargo run -p pkarta-model --example site_report [-- --worst N]`
use std::collections::BTreeMap;
use std::path::PathBuf;

use model::{find_sites, score_sites, Kind, Library};

fn main() {
    let worst: usize = std::env::args()
        .skip_while(|a| a != "--worst")
        .nth(1)
        .and_then(|n| n.parse().ok())
        .unwrap_or(0);
    let data = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../../shared/data");
    let lib = Library::builtin();
    for (file, column_kind) in [
        ("iupac-acids.csv", Kind::Acid),
        ("iupac-bases.csv", Kind::Base),
    ] {
        let path = data.join(file);
        let Ok(text) = std::fs::read_to_string(&path) else {
            println!("skipped: {} not found", path.display());
            continue;
        };
        let mut per_class: BTreeMap<String, (usize, f64, f64)> = BTreeMap::new();
        let mut rows = Vec::new();
        let (mut n, mut covered, mut abs) = (0usize, 0usize, 0.0f64);
        for line in text.lines().skip(1) {
            let mut cols = line.split(',');
            let (Some(smiles), Some(value)) = (cols.next(), cols.next()) else {
                continue;
            };
            let Ok(measured) = value.parse::<f64>() else {
                continue;
            };
            let Ok(read) = mol::parse(smiles) else {
                continue;
            };
            let Ok(std) = mol::standardize(&read) else {
                continue;
            };
            n += 1;
            let found = find_sites(lib, &std.parent);
            let scored = score_sites(lib, &std.parent, &found);
            let best = scored
                .iter()
                .filter(|s| s.kind == column_kind)
                .min_by(|a, b| {
                    let (x, y) = match column_kind {
                        Kind::Acid => (a.pka, b.pka),
                        Kind::Base => (-a.pka, -b.pka),
                    };
                    x.total_cmp(&y)
                });
            let Some(best) = best else { continue };
            covered += 1;
            let e = best.pka - measured;
            abs += e.abs();
            let slot = per_class.entry(best.class.clone()).or_default();
            slot.0 += 1;
            slot.1 += e.abs();
            slot.2 += e;
            rows.push((
                e.abs(),
                e,
                smiles.to_string(),
                best.class.clone(),
                measured,
                best.pka,
            ));
        }
        println!(
            "{file}: {covered}/{n} with a site, MAE of the strongest site {:.2}",
            abs / covered.max(1) as f64
        );
        let mut classes: Vec<_> = per_class.into_iter().collect();
        classes.sort_by_key(|c| std::cmp::Reverse(c.1 .0));
        println!("  {:<40} {:>5} {:>6} {:>6}", "class", "n", "MAE", "bias");
        for (class, (k, a, s)) in classes {
            println!(
                "  {class:<40} {k:>5} {:>6.2} {:>6.2}",
                a / k as f64,
                s / k as f64
            );
        }
        rows.sort_by(|a, b| b.0.total_cmp(&a.0));
        for (_, e, smiles, class, measured, predicted) in rows.iter().take(worst) {
            println!("  worst {e:+6.2} {class:<36} measured {measured:6.2} predicted {predicted:6.2} {smiles}");
        }
    }
}
