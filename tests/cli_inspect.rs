//! `pkarta inspect`: the molecule as read and perceived, per the JSON Lines contract in
//! DESIGN.md.

use crate::util::{error_message, pkarta};

fn inspect_one(smiles: &str) -> serde_json::Value {
    let run = pkarta(
        &["inspect", "--format", "jsonl"],
        format!("{smiles}\n").as_bytes(),
    );
    let mut records = run.jsonl();
    assert_eq!(records.len(), 1);
    records.remove(0)
}

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
fn record_fields_are_the_contract() {
    let r = inspect_one("CC(=O)[O-].[Na+]");
    assert_eq!(
        keys(&r),
        ["atoms", "bonds", "components", "error", "id", "input"]
    );
    assert_eq!(
        keys(&r["atoms"][0]),
        ["aromatic", "charge", "element", "hydrogens", "in_ring"]
    );
    assert_eq!(keys(&r["bonds"][0]), ["a", "aromatic", "b", "order"]);
    assert!(r["error"].is_null());
}

#[test]
fn components_in_input_order_with_counter_ion() {
    // Sodium acetate written with its counter-ion: two components, acetate first.
    let r = inspect_one("CC(=O)[O-].[Na+]");
    assert_eq!(r["components"], serde_json::json!([[0, 1, 2, 3], [4]]));
    assert_eq!(r["atoms"][3]["charge"], -1);
    assert_eq!(r["atoms"][4]["element"], "Na");
    assert_eq!(r["atoms"][4]["charge"], 1);
    assert_eq!(r["atoms"][4]["hydrogens"], 0);
}

#[test]
fn hydrogens_and_aromaticity_of_pyridine() {
    // Pyridine: six aromatic ring atoms, the nitrogen without hydrogen, carbons with one
    // (OpenSMILES default valences).
    let r = inspect_one("c1ccncc1");
    let atoms = r["atoms"].as_array().expect("atoms");
    assert_eq!(atoms.len(), 6);
    for (i, a) in atoms.iter().enumerate() {
        assert_eq!(a["aromatic"], true, "atom {i}");
        assert_eq!(a["in_ring"], true, "atom {i}");
        let h = if a["element"] == "N" { 0 } else { 1 };
        assert_eq!(a["hydrogens"], h, "atom {i}");
    }
    assert_eq!(r["bonds"].as_array().expect("bonds").len(), 6);
}

#[test]
fn kekule_and_aromatic_benzene_read_alike() {
    let aromatic = inspect_one("c1ccccc1");
    let kekule = inspect_one("C1=CC=CC=C1");
    assert_eq!(aromatic["atoms"], kekule["atoms"]);
}

#[test]
fn errors_carry_a_caret_under_the_bad_part() {
    let r = inspect_one("C1CC");
    let message = error_message(&r).expect("fails");
    let lines: Vec<&str> = message.lines().collect();
    assert!(lines.len() >= 3, "{message}");
    assert!(lines.contains(&"C1CC"), "{message}");
    assert!(r["atoms"].as_array().expect("atoms").is_empty());
}

#[test]
fn table_shows_atoms_bonds_and_components() {
    let run = pkarta(&["inspect", "--format", "table"], b"CCO ethanol\n");
    assert_eq!(run.status, Some(0));
    let text = run.text();
    assert!(text.starts_with("#1  ethanol  CCO\n"), "{text}");
    assert!(
        text.contains("  atom  element  charge  H  aromatic  ring\n"),
        "{text}"
    );
    assert!(
        text.contains("     2  O             0  1  no        no\n"),
        "{text}"
    );
    assert!(text.contains("  components: [0 1 2]\n"), "{text}");
}

#[test]
fn csv_input_is_inspected_by_its_smiles_column() {
    let run = pkarta(
        &["inspect", "--format", "jsonl", "--input-format", "csv"],
        b"name,SMILES\nwater,O\n",
    );
    assert_eq!(run.status, Some(0), "{}", run.stderr);
    let records = run.jsonl();
    assert_eq!(records[0]["id"], "water");
    assert_eq!(records[0]["atoms"][0]["hydrogens"], 2);
}
