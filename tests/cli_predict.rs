//! `pkarta predict`: records per the JSON Lines contract, CSV/TSV pass-through, tables.

use crate::util::{data, demo, error_message, pkarta};

/// The JSON Lines record fields of DESIGN.md's contract, plus `sites_outside_window`.
const RECORD_FIELDS: &[&str] = &[
    "charge_at_ph",
    "error",
    "id",
    "input",
    "isoelectric_point",
    "macro_pka",
    "ph",
    "sites",
    "sites_outside_window",
    "smiles",
    "species",
    "warnings",
];

/// The pkarta_* columns added to CSV/TSV output, in order.
const COLUMNS: &[&str] = &[
    "pkarta_parent",
    "pkarta_acid_pka",
    "pkarta_base_pka",
    "pkarta_macro_pka",
    "pkarta_charge",
    "pkarta_species",
    "pkarta_species_fraction",
    "pkarta_isoelectric_point",
    "pkarta_warnings",
    "pkarta_error",
];

fn keys(value: &serde_json::Value) -> Vec<&str> {
    let mut keys: Vec<&str> = value
        .as_object()
        .expect("object")
        .keys()
        .map(String::as_str)
        .collect();
    keys.sort();
    keys
}

#[test]
fn error_records_have_every_contract_field() {
    let run = pkarta(&["predict", "--format", "jsonl", "--ph", "3"], b"\n");
    let records = run.jsonl();
    assert_eq!(keys(&records[0]), RECORD_FIELDS);
    assert_eq!(records[0]["ph"], 3.0);
    assert!(records[0]["smiles"].is_null());
    assert!(records[0]["charge_at_ph"].is_null());
}

#[test]
fn estimated_records_have_the_contract_fields() {
    // Acetic acid: one acidic site, handbook pKa 4.76 (CRC Handbook of Chemistry and
    // Physics, "Dissociation constants of organic acids and bases").
    let run = pkarta(&["predict", "--format", "jsonl"], b"CC(=O)O acetic acid\n");
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let r = &run.jsonl()[0];
    assert_eq!(keys(r), RECORD_FIELDS);
    assert_eq!(r["id"], "acetic acid");
    assert!(r["error"].is_null());
    let site = &r["sites"][0];
    for field in ["atom", "kind", "pka", "uncertainty", "group", "terms"] {
        assert!(site.get(field).is_some(), "site lacks {field}: {site}");
    }
    assert_eq!(site["kind"], "acid");
    assert_eq!(site["atom"], 3);
    let pka = site["pka"].as_f64().expect("pka");
    assert!((pka - 4.76).abs() < 1.0, "acetic acid pKa {pka}");
    for term in site["terms"].as_array().expect("terms") {
        for field in ["label", "contribution", "source"] {
            assert!(term.get(field).is_some(), "term lacks {field}: {term}");
        }
    }
    let species = &r["species"][0];
    assert_eq!(keys(species), ["charge", "fraction", "smiles"]);
    // At pH 7.4, about three units above its pKa, acetate dominates.
    assert_eq!(species["charge"], -1);
    let macro_pka = r["macro_pka"].as_array().expect("macro_pka");
    assert_eq!(macro_pka.len(), 1);
}

#[test]
fn a_failed_record_does_not_stop_the_batch_and_sets_exit_1() {
    let run = pkarta(
        &["predict", "--format", "jsonl"],
        b"CC(=O)O\nC1CC\nc1ccncc1\n",
    );
    assert_eq!(run.status, Some(1), "{}", run.stderr);
    let records = run.jsonl();
    assert_eq!(records.len(), 3);
    assert!(error_message(&records[0]).is_none());
    assert!(error_message(&records[1])
        .expect("ring left open")
        .contains('^'));
    assert!(error_message(&records[2]).is_none());
}

#[test]
fn all_estimated_is_exit_0() {
    let run = pkarta(&["predict", "--format", "jsonl"], b"CC(=O)O\nc1ccncc1\n");
    assert_eq!(run.status, Some(0), "{}", run.stderr);
}

#[test]
fn order_is_kept_with_two_threads() {
    let mut input = String::new();
    let shapes = [
        "CC(=O)O",
        "Oc1ccccc1",
        "C1CC",
        "CCN",
        "c1ccncc1",
        "",
        "NCC(=O)O",
    ];
    for i in 0..400 {
        input.push_str(&format!("{} id-{i}\n", shapes[i % shapes.len()]));
    }
    let run = pkarta(
        &["predict", "--threads", "2", "--format", "jsonl"],
        input.as_bytes(),
    );
    let records = run.jsonl();
    assert_eq!(records.len(), 400);
    for (i, r) in records.iter().enumerate() {
        let shape = shapes[i % shapes.len()];
        // A blank SMILES leaves the name as the only word: it becomes the SMILES text.
        let (input, id) = if shape.is_empty() {
            (format!("id-{i}"), None)
        } else {
            (shape.to_string(), Some(format!("id-{i}")))
        };
        assert_eq!(r["input"], input, "record {i}");
        assert_eq!(r["id"].as_str(), id.as_deref(), "record {i}");
    }
    let one = pkarta(
        &["predict", "--threads", "1", "--format", "jsonl"],
        input.as_bytes(),
    );
    assert_eq!(
        one.stdout, run.stdout,
        "one thread and two give the same bytes"
    );
    assert_eq!(one.status, run.status);
}

#[test]
fn csv_round_trips_quoted_fields_and_extra_columns() {
    let path = data("cli_quoted.csv");
    let run = pkarta(
        &["predict", "--format", "csv", path.to_str().expect("path")],
        b"",
    );
    assert_eq!(run.status, Some(1), "two rows fail: {}", run.stderr);
    let mut input = csv::Reader::from_path(&path).expect("input csv");
    let mut output = csv::Reader::from_reader(run.stdout.as_slice());
    let in_header = input.headers().expect("header").clone();
    let out_header = output.headers().expect("header").clone();
    let expected: Vec<&str> = in_header.iter().chain(COLUMNS.iter().copied()).collect();
    assert_eq!(out_header.iter().collect::<Vec<_>>(), expected);
    let in_rows: Vec<csv::StringRecord> = input.records().map(|r| r.expect("row")).collect();
    let out_rows: Vec<csv::StringRecord> = output.records().map(|r| r.expect("row")).collect();
    assert_eq!(in_rows.len(), out_rows.len());
    let error_col = expected.len() - 1;
    for (i, (a, b)) in in_rows.iter().zip(&out_rows).enumerate() {
        assert_eq!(
            a.iter().collect::<Vec<_>>(),
            b.iter().take(a.len()).collect::<Vec<_>>(),
            "row {i}"
        );
        assert_eq!(b.len(), expected.len(), "row {i}");
    }
    assert_eq!(&out_rows[3][error_col], "empty input");
    assert!(!out_rows[2][error_col].is_empty(), "the open ring fails");
    assert!(!out_rows[2][error_col].contains('\n'), "one line per cell");
}

#[test]
fn tsv_keeps_input_lines_byte_for_byte() {
    let path = data("cli_tabs.tsv");
    let run = pkarta(
        &["predict", "--format", "tsv", path.to_str().expect("path")],
        b"",
    );
    let input = std::fs::read_to_string(&path).expect("input");
    let output = run.text();
    let in_lines: Vec<&str> = input.lines().collect();
    let out_lines: Vec<&str> = output.lines().collect();
    assert_eq!(in_lines.len(), out_lines.len(), "{output}");
    assert_eq!(
        out_lines[0],
        format!("{}\t{}", in_lines[0], COLUMNS.join("\t"))
    );
    for (a, b) in in_lines.iter().zip(&out_lines).skip(1) {
        assert!(
            b.starts_with(&format!("{a}\t")),
            "{b:?} does not start with {a:?}"
        );
        assert_eq!(b.split('\t').count(), 4 + COLUMNS.len(), "{b:?}");
    }
    assert!(
        !out_lines[3].ends_with('\t'),
        "the unknown element is reported"
    );
}

#[test]
fn smiles_file_to_csv_has_input_and_id_columns() {
    let run = pkarta(&["predict", "--format", "csv"], b"\nC\xffC odd\n");
    let mut reader = csv::Reader::from_reader(run.stdout.as_slice());
    let header: Vec<String> = reader
        .headers()
        .expect("header")
        .iter()
        .map(String::from)
        .collect();
    let mut expected = vec!["input".to_string(), "id".to_string()];
    expected.extend(COLUMNS.iter().map(|c| c.to_string()));
    assert_eq!(header, expected);
    let rows: Vec<csv::StringRecord> = reader.records().map(|r| r.expect("row")).collect();
    assert_eq!(rows.len(), 2);
    assert_eq!(&rows[1][1], "odd");
    assert_eq!(
        &rows[1][expected.len() - 1],
        "input is not valid UTF-8 at byte 1"
    );
}

#[test]
fn empty_input_gives_a_header_only_csv() {
    let run = pkarta(
        &["predict", "--format", "csv"],
        b"# nothing but a comment\n",
    );
    assert_eq!(run.status, Some(0));
    assert_eq!(run.text(), format!("input,id,{}\n", COLUMNS.join(",")));
}

#[test]
fn table_ends_with_the_caution_line() {
    let run = pkarta(&["predict", "--format", "table"], b"\n");
    let text = run.text();
    assert!(text.starts_with("#1  \n  error: empty input\n"), "{text}");
    assert!(
        text.trim_end()
            .ends_with("before choosing strong acids or bases for lab work."),
        "{text}"
    );
}

#[test]
fn demo_file_runs_and_its_bad_rows_fail() {
    let path = demo("compounds.smi");
    let run = pkarta(
        &["predict", "--format", "jsonl", path.to_str().expect("path")],
        b"",
    );
    assert_eq!(run.status, Some(1), "the demo has bad rows on purpose");
    let records = run.jsonl();
    let failed: Vec<&str> = records
        .iter()
        .filter(|r| error_message(r).is_some())
        .map(|r| r["id"].as_str().unwrap_or(""))
        .collect();
    assert!(failed.len() >= 3 && failed.len() <= 5, "{failed:?}");
    assert!(records.len() >= 30);
}

#[test]
fn library_file_adds_its_classes() {
    let file = data("cli_extra_sites.toml");
    let with = pkarta(
        &[
            "predict",
            "--format",
            "jsonl",
            "--library",
            file.to_str().expect("path"),
        ],
        b"C[Si](C)(C)O\n",
    );
    assert_eq!(with.status, Some(0), "{}", with.stderr);
    let record = &with.jsonl()[0];
    let classes: Vec<&str> = record["sites"]
        .as_array()
        .expect("sites")
        .iter()
        .map(|s| s["class"].as_str().expect("class"))
        .collect();
    assert_eq!(classes, ["acid.silanol.user"]);
    // A `none`-scale class gives its parent value unchanged.
    assert_eq!(record["sites"][0]["pka"], 11.0);
    let without = pkarta(&["predict", "--format", "jsonl"], b"C[Si](C)(C)O\n");
    let sites = &without.jsonl()[0]["sites"];
    assert!(sites
        .as_array()
        .expect("sites")
        .iter()
        .all(|s| s["class"] != "acid.silanol.user"));
}

#[test]
fn library_directory_replaces_the_builtin_one() {
    // The shipped fragments/ directory loaded from disk gives what the built-in copy gives.
    let dir = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../fragments");
    let input = b"CC(=O)O\nc1ccncc1\nNCC(=O)O\nOc1ccccc1\n";
    let from_dir = pkarta(
        &[
            "predict",
            "--format",
            "jsonl",
            "--library",
            dir.to_str().expect("path"),
        ],
        input,
    );
    let builtin = pkarta(&["predict", "--format", "jsonl"], input);
    assert_eq!(from_dir.status, Some(0), "{}", from_dir.stderr);
    assert_eq!(from_dir.stdout, builtin.stdout);
}

#[test]
fn broken_library_is_exit_2_naming_the_file() {
    let file = data("cli_quoted.csv");
    let run = pkarta(
        &["predict", "--library", file.to_str().expect("path")],
        b"CCO\n",
    );
    assert_eq!(run.status, Some(2));
    assert!(
        run.stderr.starts_with("pkarta: ") && run.stderr.contains("cli_quoted.csv"),
        "{}",
        run.stderr
    );
    assert!(run.stdout.is_empty());
}

#[test]
fn demo_reagents_csv_keeps_its_columns() {
    let path = demo("reagents.csv");
    let run = pkarta(
        &["predict", "--format", "csv", path.to_str().expect("path")],
        b"",
    );
    assert_eq!(
        run.status,
        Some(1),
        "one reagent row is broken on purpose: {}",
        run.stderr
    );
    let mut input = csv::Reader::from_path(&path).expect("demo csv");
    let mut output = csv::Reader::from_reader(run.stdout.as_slice());
    let in_rows: Vec<csv::StringRecord> = input.records().map(|r| r.expect("row")).collect();
    let out_rows: Vec<csv::StringRecord> = output.records().map(|r| r.expect("row")).collect();
    assert_eq!(in_rows.len(), out_rows.len());
    for (a, b) in in_rows.iter().zip(&out_rows) {
        assert_eq!(
            a.iter().collect::<Vec<_>>(),
            b.iter().take(a.len()).collect::<Vec<_>>()
        );
    }
    let failed = out_rows
        .iter()
        .filter(|r| !r[r.len() - 1].is_empty())
        .count();
    assert_eq!(failed, 1);
}

#[test]
fn csv_row_longer_than_its_header_is_flagged() {
    let run = pkarta(
        &["predict", "--format", "csv", "--input-format", "csv"],
        b"smiles,name\nO,water,extra\n",
    );
    let text = run.text();
    let row = text.lines().nth(1).expect("one row");
    assert!(row.starts_with("O,water,extra,"), "{row}");
    assert!(
        row.contains("row has 3 fields, the header 2: pkarta columns are shifted"),
        "{row}"
    );
}
