//! Pattern texts that must be refused, with the exact error each must render
//! (cases in `tests/data/errors.toml`).

use serde::Deserialize;

#[derive(Deserialize)]
struct Cases {
    case: Vec<Case>,
}

#[derive(Deserialize)]
struct Case {
    name: String,
    pattern: String,
    /// The full `Display` text.
    error: String,
    start: usize,
    end: usize,
}

#[test]
fn every_bad_pattern_gets_its_message() {
    let text = include_str!("data/errors.toml");
    let cases: Cases = toml::from_str(text).expect("errors.toml is valid");
    assert!(!cases.case.is_empty());
    let mut failures = Vec::new();
    for case in &cases.case {
        match pattern::Pattern::parse(&case.pattern) {
            Ok(_) => failures.push(format!("{}: {:?} parsed", case.name, case.pattern)),
            Err(e) => {
                let shown = e.to_string();
                if shown != case.error || e.start != case.start || e.end != case.end {
                    failures.push(format!(
                        "{}: expected ({}..{})\n{}\ngot ({}..{})\n{}",
                        case.name, case.start, case.end, case.error, e.start, e.end, shown
                    ));
                }
            }
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n\n"));
}

#[test]
fn case_names_are_unique() {
    let cases: Cases = toml::from_str(include_str!("data/errors.toml")).expect("valid");
    let mut names: Vec<&str> = cases.case.iter().map(|c| c.name.as_str()).collect();
    names.sort_unstable();
    let before = names.len();
    names.dedup();
    assert_eq!(before, names.len());
}
