//! Data-driven tests: every `tests/data/smiles_*.toml` file at the repository root holds
//! named cases, one feature per file. A case gives an input and what must hold for it;
//! only the keys given are checked. Inputs that must fail give the exact error text.
//!
//! Keys:
//! - `smiles` (required), `name` (required), `source` (where the expectation comes from),
//!   `repeat` (the input is `smiles` repeated that many times)
//! - `error`: the whole Display text of the error (message, input, carets)
//! - `atoms`, `heavy_atoms`, `aromatic_atoms`, `rings`, `components`, `net_charge`,
//!   `total_hydrogens`: counts
//! - `hydrogens`, `charges`, `isotopes` (0 for none), `aromatic` (0/1), `ring_sizes`
//!   (smallest ring per atom, 0 when none): per-atom lists in input order
//! - `same_as`: another SMILES for the same molecule with atoms in the same order; both
//!   must be perceived identically (atoms, bond orders of non-aromatic bonds, aromaticity)
//! - `parent_same_as`: the standardized parent must equal that of this SMILES (compared by
//!   an order-free graph signature); `others`: the SMILES of the other components
//! - `parent_charge`: net charge of the standardized parent

use std::collections::BTreeMap;
use std::path::PathBuf;

use mol::{parse, standardize, Molecule};
use serde::Deserialize;

#[derive(Deserialize)]
struct File {
    case: Vec<Case>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct Case {
    name: String,
    smiles: String,
    /// The input is `smiles` repeated this many times (for size limits).
    repeat: Option<usize>,
    #[serde(default)]
    source: Option<String>,
    error: Option<String>,
    atoms: Option<usize>,
    heavy_atoms: Option<usize>,
    aromatic_atoms: Option<usize>,
    rings: Option<usize>,
    components: Option<usize>,
    net_charge: Option<i32>,
    total_hydrogens: Option<usize>,
    hydrogens: Option<Vec<u8>>,
    charges: Option<Vec<i8>>,
    isotopes: Option<Vec<u16>>,
    aromatic: Option<Vec<u8>>,
    ring_sizes: Option<Vec<u8>>,
    same_as: Option<String>,
    parent_same_as: Option<String>,
    others: Option<Vec<String>>,
    parent_charge: Option<i32>,
}

fn data_dir() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../tests/data")
}

/// Per-atom description that does not depend on atom order: the atom and its sorted
/// neighbours (element, charge, hydrogens, aromatic, bond kind), refined twice.
fn signature(m: &Molecule) -> Vec<String> {
    let n = m.atoms().len();
    let mut label: Vec<String> = (0..n)
        .map(|i| {
            let a = &m.atoms()[i];
            format!(
                "{}{:+}h{}{}i{}",
                a.element,
                a.charge,
                m.total_hydrogens(i),
                if a.aromatic { "a" } else { "" },
                a.isotope.unwrap_or(0)
            )
        })
        .collect();
    for _ in 0..3 {
        label = (0..n)
            .map(|i| {
                let mut nb: Vec<String> = m
                    .neighbors(i)
                    .iter()
                    .map(|x| {
                        let b = &m.bonds()[x.bond];
                        let kind = if b.aromatic {
                            "ar".to_string()
                        } else {
                            b.order.to_string()
                        };
                        format!("{kind}:{}", label[x.atom])
                    })
                    .collect();
                nb.sort();
                format!("{}({})", label[i], nb.join(","))
            })
            .collect();
    }
    label.sort();
    label
}

fn check(case: &Case) -> Result<(), String> {
    let input = case.smiles.repeat(case.repeat.unwrap_or(1));
    let result = parse(&input);
    if let Some(want) = &case.error {
        return match result {
            Ok(_) => Err(format!("parsed, but should fail with:\n{want}")),
            Err(e) if &e.to_string() == want => Ok(()),
            Err(e) => Err(format!("error text differs:\n got: {e:?}\nwant: {want:?}")),
        };
    }
    let m = result.map_err(|e| format!("unexpected error:\n{e}"))?;
    let atoms = m.atoms();
    let mut fail = Vec::new();
    let mut eq = |what: &str, got: String, want: String| {
        if got != want {
            fail.push(format!("{what}: got {got}, want {want}"));
        }
    };
    if let Some(w) = case.atoms {
        eq("atoms", atoms.len().to_string(), w.to_string());
    }
    if let Some(w) = case.heavy_atoms {
        let got = atoms.iter().filter(|a| a.element > 1).count();
        eq("heavy_atoms", got.to_string(), w.to_string());
    }
    if let Some(w) = case.aromatic_atoms {
        let got = atoms.iter().filter(|a| a.aromatic).count();
        eq("aromatic_atoms", got.to_string(), w.to_string());
    }
    if let Some(w) = case.rings {
        eq("rings", m.rings().len().to_string(), w.to_string());
    }
    if let Some(w) = case.components {
        eq(
            "components",
            m.components().len().to_string(),
            w.to_string(),
        );
    }
    if let Some(w) = case.net_charge {
        let got: i32 = atoms.iter().map(|a| a.charge as i32).sum();
        eq("net_charge", got.to_string(), w.to_string());
    }
    if let Some(w) = case.total_hydrogens {
        let got: usize = (0..atoms.len())
            .map(|i| {
                if atoms[i].element == 1 {
                    1
                } else {
                    atoms[i].hydrogens as usize
                }
            })
            .sum();
        eq("total_hydrogens", got.to_string(), w.to_string());
    }
    if let Some(w) = &case.hydrogens {
        let got: Vec<u8> = atoms.iter().map(|a| a.hydrogens).collect();
        eq("hydrogens", format!("{got:?}"), format!("{w:?}"));
    }
    if let Some(w) = &case.charges {
        let got: Vec<i8> = atoms.iter().map(|a| a.charge).collect();
        eq("charges", format!("{got:?}"), format!("{w:?}"));
    }
    if let Some(w) = &case.isotopes {
        let got: Vec<u16> = atoms.iter().map(|a| a.isotope.unwrap_or(0)).collect();
        eq("isotopes", format!("{got:?}"), format!("{w:?}"));
    }
    if let Some(w) = &case.aromatic {
        let got: Vec<u8> = atoms.iter().map(|a| a.aromatic as u8).collect();
        eq("aromatic", format!("{got:?}"), format!("{w:?}"));
    }
    if let Some(w) = &case.ring_sizes {
        let got: Vec<u8> = atoms.iter().map(|a| a.smallest_ring).collect();
        eq("ring_sizes", format!("{got:?}"), format!("{w:?}"));
    }
    if let Some(other) = &case.same_as {
        let o = parse(other).map_err(|e| format!("same_as does not parse:\n{e}"))?;
        let describe = |m: &Molecule| {
            let a: Vec<_> = m
                .atoms()
                .iter()
                .map(|a| {
                    (
                        a.element,
                        a.charge,
                        a.hydrogens,
                        a.aromatic,
                        a.ring_count,
                        a.hybridization,
                    )
                })
                .collect();
            let b: BTreeMap<(usize, usize), (bool, u8)> = m
                .bonds()
                .iter()
                .map(|b| {
                    (
                        (b.a, b.b),
                        (b.aromatic, if b.aromatic { 0 } else { b.order }),
                    )
                })
                .collect();
            format!("{a:?} {b:?}")
        };
        eq("same_as", describe(&m), describe(&o));
    }
    if case.parent_same_as.is_some() || case.others.is_some() || case.parent_charge.is_some() {
        let s = standardize(&m).map_err(|e| format!("standardize failed:\n{e}"))?;
        if let Some(other) = &case.parent_same_as {
            let o = parse(other).map_err(|e| format!("parent_same_as does not parse:\n{e}"))?;
            let o = standardize(&o).map_err(|e| format!("standardize failed:\n{e}"))?;
            if signature(&s.parent) != signature(&o.parent) {
                eq(
                    "parent",
                    mol::write_smiles(&s.parent),
                    mol::write_smiles(&o.parent),
                );
            }
        }
        if let Some(w) = &case.others {
            eq("others", format!("{:?}", s.others), format!("{w:?}"));
        }
        if let Some(w) = case.parent_charge {
            let got: i32 = s.parent.atoms().iter().map(|a| a.charge as i32).sum();
            eq("parent_charge", got.to_string(), w.to_string());
        }
    }
    if fail.is_empty() {
        Ok(())
    } else {
        Err(fail.join("\n"))
    }
}

#[test]
fn smiles_data_files() {
    let mut files: Vec<PathBuf> = std::fs::read_dir(data_dir())
        .expect("tests/data exists")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| {
            p.file_name()
                .and_then(|n| n.to_str())
                .is_some_and(|n| n.starts_with("smiles_") && n.ends_with(".toml"))
        })
        .collect();
    files.sort();
    assert!(
        files.len() >= 6,
        "expected the smiles_*.toml files, found {files:?}"
    );
    let mut failures = Vec::new();
    let mut count = 0;
    for path in &files {
        let text = std::fs::read_to_string(path).expect("readable");
        let file: File =
            toml::from_str(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
        let mut names = std::collections::HashSet::new();
        for case in &file.case {
            count += 1;
            assert!(
                names.insert(case.name.clone()),
                "{}: duplicate case {}",
                path.display(),
                case.name
            );
            let _ = &case.source;
            if let Err(e) = check(case) {
                failures.push(format!(
                    "{} / {} ({}):\n{e}",
                    path.file_name().and_then(|n| n.to_str()).unwrap_or("?"),
                    case.name,
                    case.smiles
                ));
            }
        }
    }
    assert!(count > 0);
    assert!(
        failures.is_empty(),
        "{} of {count} cases failed:\n\n{}",
        failures.len(),
        failures.join("\n\n")
    );
}
