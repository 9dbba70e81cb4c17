//! Reads SMILES lines (`SMILES [name]`) from standard input and prints, per line, a JSON
//! object with the perceived atoms (`element`, `charge`, `hydrogens`, `aromatic`, `in_ring`),
//! `bonds`, `components`, `rings` and `error`: the fields of `pkarta inspect --format
//! jsonl`, for checking this crate on its own. With `--parent`, each record also holds
//! `parent` (the standardized parent as SMILES), `parent_charge`, `parent_heavy` and
//! `written` (the molecule as read, written back).
use std::io::{BufRead, Write};

fn main() {
    let with_parent = std::env::args().any(|a| a == "--parent");
    let stdin = std::io::stdin();
    let stdout = std::io::stdout();
    let mut out = std::io::BufWriter::new(stdout.lock());
    for line in stdin.lock().lines() {
        let Ok(line) = line else { break };
        let smiles = line.split_whitespace().next().unwrap_or("");
        let record = match mol::parse(smiles) {
            Ok(m) if with_parent => match mol::standardize(&m) {
                Ok(p) => serde_json::json!({
                    "input": smiles,
                    "parent": mol::write_smiles(&p.parent),
                    "written": mol::write_smiles(&m),
                    "parent_charge": p.parent.atoms().iter().map(|a| a.charge as i32).sum::<i32>(),
                    "parent_heavy": p.parent.atoms().iter().filter(|a| a.element > 1).count(),
                    "error": null,
                }),
                Err(e) => serde_json::json!({"input": smiles, "error": {"message": e.to_string()}}),
            },
            Ok(m) => serde_json::json!({
                "input": smiles,
                "atoms": m.atoms().iter().map(|a| serde_json::json!({
                    "element": mol::element_symbol(a.element),
                    "charge": a.charge,
                    "hydrogens": a.hydrogens,
                    "aromatic": a.aromatic,
                    "in_ring": a.ring_count > 0,
                })).collect::<Vec<_>>(),
                "bonds": m.bonds().iter().map(|b| serde_json::json!({
                    "a": b.a, "b": b.b, "order": b.order, "aromatic": b.aromatic,
                })).collect::<Vec<_>>(),
                "components": m.components(),
                "rings": m.rings().len(),
                "error": null,
            }),
            Err(e) => serde_json::json!({
                "input": smiles,
                "atoms": [],
                "bonds": [],
                "components": [],
                "error": {"message": e.to_string()},
            }),
        };
        if writeln!(out, "{record}").is_err() {
            break;
        }
    }
}
