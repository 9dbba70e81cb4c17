//! Data-driven cases from `tests/data/speciation_*.toml` at the repository root.
//!
//! Each case gives sites either as microscopic constants (used as they are) or as
//! macroscopic constants. Macroscopic constants are turned into the independent-site system
//! with the same binding polynomial (its sites' constants are the polynomial's roots), which
//! exists when the polynomial has only real roots, as it does for the well-separated
//! constants used here; a case where it does not fails with that message.

use std::path::{Path, PathBuf};

use speciation::{try_speciate, Kind, SiteInput, System};
use toml::Value;

fn data_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../tests/data")
}

fn files() -> Vec<PathBuf> {
    let mut out: Vec<PathBuf> = std::fs::read_dir(data_dir())
        .expect("tests/data exists")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| {
            let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("");
            name.starts_with("speciation_") && name.ends_with(".toml")
        })
        .collect();
    out.sort();
    out
}

fn f(v: &Value, key: &str) -> Option<f64> {
    v.get(key)
        .and_then(|x| x.as_float().or_else(|| x.as_integer().map(|i| i as f64)))
}

fn num(v: &Value) -> f64 {
    v.as_float()
        .or_else(|| v.as_integer().map(|i| i as f64))
        .expect("a number")
}

/// Roots of the binding polynomial `sum_p 10^(-sum_{k<=p} pK_k) t^p` are `t = -10^(pK_i)`
/// for the equivalent independent sites; found as sign changes of the polynomial at
/// `t = -10^u` on a fine grid of `u`, refined by bisection.
fn sites_from_macro(pks: &[f64]) -> Result<Vec<f64>, String> {
    let mut sorted = pks.to_vec();
    sorted.sort_by(f64::total_cmp);
    let mut lb = vec![0.0];
    for pk in &sorted {
        let last = *lb.last().unwrap_or(&0.0);
        lb.push(last - pk);
    }
    // Sign of the polynomial at t = -10^u, with terms scaled by the largest.
    let value = |u: f64| {
        let logs: Vec<f64> = lb
            .iter()
            .enumerate()
            .map(|(p, b)| b + p as f64 * u)
            .collect();
        let top = logs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        logs.iter()
            .enumerate()
            .map(|(p, l)| if p % 2 == 0 { 1.0 } else { -1.0 } * 10f64.powf(l - top))
            .sum::<f64>()
    };
    let mut roots = Vec::new();
    let (start, end, step) = (-30.0, 30.0, 1e-3);
    let mut u = start;
    let mut prev = value(u);
    while u < end {
        let next_u = u + step;
        let cur = value(next_u);
        if prev == 0.0 || prev.signum() != cur.signum() {
            let (mut lo, mut hi) = (u, next_u);
            for _ in 0..100 {
                let mid = 0.5 * (lo + hi);
                if value(mid).signum() == value(lo).signum() {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            roots.push(0.5 * (lo + hi));
        }
        prev = cur;
        u = next_u;
    }
    if roots.len() != pks.len() {
        return Err(format!(
            "macroscopic constants {pks:?} have no equivalent independent-site system ({} real roots)",
            roots.len()
        ));
    }
    Ok(roots)
}

fn kind(s: &str) -> Kind {
    match s {
        "acid" => Kind::Acid,
        "base" => Kind::Base,
        other => panic!("kind must be acid or base, not {other:?}"),
    }
}

fn build(case: &Value, name: &str) -> System {
    let sites = case
        .get("sites")
        .and_then(Value::as_array)
        .unwrap_or_else(|| panic!("{name}: no sites"));
    let mut parsed: Vec<SiteInput> = sites
        .iter()
        .map(|s| SiteInput {
            kind: kind(s.get("kind").and_then(Value::as_str).unwrap_or("")),
            pka: f(s, "pka").unwrap_or_else(|| panic!("{name}: site without pka")),
        })
        .collect();
    let constants = case
        .get("constants")
        .and_then(Value::as_str)
        .unwrap_or("microscopic");
    if constants == "macroscopic" {
        let pks: Vec<f64> = parsed.iter().map(|s| s.pka).collect();
        let roots = sites_from_macro(&pks).unwrap_or_else(|e| panic!("{name}: {e}"));
        // Sites take the roots in the order of their tabulated constants.
        let mut order: Vec<usize> = (0..parsed.len()).collect();
        order.sort_by(|&a, &b| parsed[a].pka.total_cmp(&parsed[b].pka));
        for (rank, &i) in order.iter().enumerate() {
            parsed[i].pka = roots[rank];
        }
    } else {
        assert_eq!(
            constants, "microscopic",
            "{name}: constants must be microscopic or macroscopic"
        );
    }
    let interaction = case
        .get("interaction")
        .and_then(Value::as_array)
        .map(|rows| {
            rows.iter()
                .map(|r| {
                    r.as_array()
                        .map(|r| r.iter().map(num).collect())
                        .unwrap_or_default()
                })
                .collect()
        })
        .unwrap_or_default();
    let base_charge = case
        .get("base_charge")
        .and_then(Value::as_integer)
        .unwrap_or(0) as i32;
    System {
        sites: parsed,
        interaction,
        base_charge,
    }
}

#[test]
fn data_cases() {
    let mut checked = 0;
    let mut failures = Vec::new();
    for path in files() {
        let text = std::fs::read_to_string(&path).expect("readable");
        let doc: Value =
            toml::from_str(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
        let cases = doc
            .get("case")
            .and_then(Value::as_array)
            .cloned()
            .unwrap_or_default();
        for case in &cases {
            let name = format!(
                "{}: {}",
                path.file_name().and_then(|n| n.to_str()).unwrap_or("?"),
                case.get("name").and_then(Value::as_str).unwrap_or("?")
            );
            assert!(
                case.get("source")
                    .and_then(Value::as_str)
                    .is_some_and(|s| !s.is_empty()),
                "{name}: no source"
            );
            let system = build(case, &name);
            let ph = f(case, "ph").unwrap_or(7.0);
            let result = try_speciate(&system, ph);
            if let Some(expected) = case.get("error").and_then(Value::as_str) {
                checked += 1;
                match result {
                    Err(e) if e.to_string() == expected => {}
                    Err(e) => failures.push(format!(
                        "{name}: error {:?}, expected {expected:?}",
                        e.to_string()
                    )),
                    Ok(_) => {
                        failures.push(format!("{name}: accepted, expected error {expected:?}"))
                    }
                }
                continue;
            }
            let r = match result {
                Ok(r) => r,
                Err(e) => {
                    failures.push(format!("{name}: {e}"));
                    continue;
                }
            };
            let mut any = false;
            if let Some(want) = f(case, "charge") {
                any = true;
                let tol = f(case, "charge_tolerance").expect("charge_tolerance");
                if (r.charge_at_ph - want).abs() > tol {
                    failures.push(format!(
                        "{name}: charge {} at pH {ph}, expected {want} +- {tol}",
                        r.charge_at_ph
                    ));
                }
            }
            if let Some(want) = case.get("macro_pka").and_then(Value::as_array) {
                any = true;
                let tol = f(case, "macro_tolerance").expect("macro_tolerance");
                let want: Vec<f64> = want.iter().map(num).collect();
                let ok = want.len() == r.macro_pka.len()
                    && want
                        .iter()
                        .zip(&r.macro_pka)
                        .all(|(a, b)| (a - b).abs() <= tol);
                if !ok {
                    failures.push(format!(
                        "{name}: macro pKa {:?}, expected {want:?} +- {tol}",
                        r.macro_pka
                    ));
                }
            }
            if let Some(v) = case.get("isoelectric_point") {
                any = true;
                match (v.as_bool(), r.isoelectric_point) {
                    (Some(false), None) => {}
                    (Some(false), Some(p)) => {
                        failures.push(format!("{name}: pI {p}, expected none"))
                    }
                    _ => {
                        let want = num(v);
                        let tol = f(case, "pi_tolerance").expect("pi_tolerance");
                        match r.isoelectric_point {
                            Some(p) if (p - want).abs() <= tol => {}
                            other => failures
                                .push(format!("{name}: pI {other:?}, expected {want} +- {tol}")),
                        }
                    }
                }
            }
            if let Some(list) = case.get("fractions").and_then(Value::as_array) {
                any = true;
                let tol = f(case, "fraction_tolerance").expect("fraction_tolerance");
                for item in list {
                    let charged: Vec<bool> = item
                        .get("charged")
                        .and_then(Value::as_array)
                        .map(|a| a.iter().map(|b| b.as_bool().unwrap_or(false)).collect())
                        .unwrap_or_default();
                    let want = f(item, "fraction").expect("fraction");
                    let got = r
                        .species
                        .iter()
                        .find(|s| s.charged == charged)
                        .map(|s| s.fraction)
                        .unwrap_or(0.0);
                    if (got - want).abs() > tol {
                        failures.push(format!(
                            "{name}: fraction of {charged:?} {got}, expected {want} +- {tol}"
                        ));
                    }
                }
            }
            assert!(any, "{name}: case checks nothing");
            checked += 1;
        }
    }
    assert!(
        checked >= 20,
        "only {checked} cases found under {}",
        data_dir().display()
    );
    assert!(
        failures.is_empty(),
        "{} of {checked} cases failed:\n{}",
        failures.len(),
        failures.join("\n")
    );
}

#[test]
fn macro_conversion_round_trips_independent_sites() {
    // Independent sites 3.0 and 5.0 have stepwise constants 2.9957 and 5.0043; converting
    // those back must give the sites again.
    let k = |p: f64| 10f64.powf(-p);
    let pk1 = -(k(3.0) + k(5.0)).log10();
    let pk2 = -(k(3.0) * k(5.0)).log10() - pk1;
    let roots = sites_from_macro(&[pk1, pk2]).unwrap();
    assert!(
        (roots[0] - 3.0).abs() < 1e-9 && (roots[1] - 5.0).abs() < 1e-9,
        "{roots:?}"
    );
}
