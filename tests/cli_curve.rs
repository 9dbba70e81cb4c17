//! `pkarta curve`: species fractions and charge over a pH range.

use crate::util::pkarta;

#[test]
fn curve_csv_fractions_sum_to_one_and_charge_falls() {
    // Glycine: cation at low pH, zwitterion in between, anion at high pH.
    let run = pkarta(
        &[
            "curve", "NCC(=O)O", "--from", "0", "--to", "14", "--step", "1", "--format", "csv",
        ],
        b"",
    );
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let mut reader = csv::Reader::from_reader(run.stdout.as_slice());
    let header = reader.headers().expect("header").clone();
    assert_eq!(&header[0], "ph");
    assert_eq!(&header[1], "charge");
    let rows: Vec<csv::StringRecord> = reader.records().map(|r| r.expect("row")).collect();
    assert_eq!(rows.len(), 15);
    let mut last_charge = f64::INFINITY;
    for row in &rows {
        let charge: f64 = row[1].parse().expect("charge");
        assert!(
            charge <= last_charge + 1e-9,
            "charge rises at pH {}",
            &row[0]
        );
        last_charge = charge;
        let total: f64 = row
            .iter()
            .skip(2)
            .map(|f| f.parse::<f64>().expect("fraction"))
            .sum();
        assert!(
            (total - 1.0).abs() < 0.02,
            "fractions sum to {total} at pH {}",
            &row[0]
        );
    }
    let first: f64 = rows[0][1].parse().expect("charge");
    let last: f64 = rows[14][1].parse().expect("charge");
    assert!(
        first > 0.5 && last < -0.5,
        "charge {first} at pH 0, {last} at pH 14"
    );
}

#[test]
fn curve_writes_an_svg_file() {
    let dir = std::env::temp_dir().join(format!("pkarta-cli-curve-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let svg = dir.join("acetic.svg");
    let run = pkarta(
        &[
            "curve",
            "CC(=O)O",
            "--svg",
            svg.to_str().expect("path"),
            "--format",
            "jsonl",
        ],
        b"",
    );
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let text = std::fs::read_to_string(&svg).expect("svg written");
    assert!(
        text.trim_start().starts_with("<svg") || text.trim_start().starts_with("<?xml"),
        "{text}"
    );
    let lines = run.jsonl();
    assert_eq!(lines.len(), 29, "0 to 14 by 0.5");
    std::fs::remove_dir_all(&dir).expect("clean up");
}

#[test]
fn curve_of_bad_input_is_exit_1_with_caret() {
    let run = pkarta(&["curve", "C1CC"], b"");
    assert_eq!(run.status, Some(1), "{}", run.stderr);
    assert!(run.text().contains('^'), "{}", run.text());
}
