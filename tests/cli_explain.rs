//! `pkarta explain` and the `debug` views.

use crate::util::pkarta;

#[test]
fn debug_graph_is_the_inspect_table() {
    let graph = pkarta(&["debug", "graph", "CCO"], b"");
    let table = pkarta(&["inspect", "--format", "table"], b"CCO\n");
    assert_eq!(graph.status, Some(0));
    assert_eq!(graph.stdout, table.stdout);
}

#[test]
fn debug_graph_of_bad_input_fails_with_caret() {
    let run = pkarta(&["debug", "graph", "CC(C"], b"");
    assert_eq!(run.status, Some(1));
    let text = run.text();
    assert!(text.contains("error:") && text.contains('^'), "{text}");
}

#[test]
fn explain_terms_add_up_to_the_estimate() {
    // 4-nitrobenzoic acid: a para substituent term on the benzoic acid parent.
    let run = pkarta(&["explain", "O=C(O)c1ccc(cc1)[N+](=O)[O-]"], b"");
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let text = run.text();
    assert!(text.contains("site 1: atom"), "{text}");
    assert!(text.contains("total = estimate"), "{text}");
    assert!(text.contains("para"), "{text}");
    assert!(text.contains("macro pKa"), "{text}");
    assert!(text.contains("species at pH 7.40"), "{text}");
    // Each total line shows the same number as the pKa line below it.
    let lines: Vec<&str> = text.lines().collect();
    for (i, line) in lines.iter().enumerate() {
        if line.trim_start().starts_with("total = estimate") {
            let total = line.split_whitespace().last().expect("total");
            let pka = lines[i + 1].split_whitespace().nth(1).expect("pKa");
            assert_eq!(total, pka, "{text}");
        }
    }
}

#[test]
fn debug_terms_is_json_with_sites() {
    let run = pkarta(&["debug", "terms", "CC(=O)O"], b"");
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let value: serde_json::Value = serde_json::from_slice(&run.stdout).expect("JSON");
    let sites = value["sites"].as_array().expect("sites");
    assert_eq!(sites.len(), 1);
    let sum: f64 = sites[0]["terms"]
        .as_array()
        .expect("terms")
        .iter()
        .map(|t| t["contribution"].as_f64().expect("number"))
        .sum();
    let pka = sites[0]["pka"].as_f64().expect("pka");
    assert!((sum - pka).abs() < 1e-9, "terms {sum} vs pKa {pka}");
}

#[test]
fn debug_sites_lists_the_carboxylic_oxygen() {
    let run = pkarta(&["debug", "sites", "CC(=O)O"], b"");
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let text = run.text();
    let row = text
        .lines()
        .find(|l| l.trim_start().starts_with("3 "))
        .unwrap_or_else(|| panic!("no row for atom 3: {text}"));
    assert!(row.contains("acid.carboxylic"), "{row}");
}
