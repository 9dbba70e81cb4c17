//! Inputs that stress the reader's recursion and size limits: they must give a molecule or
//! a clear error, never a stack overflow or a panic, even on a small thread stack.

use mol::{parse, ErrorKind, MAX_LENGTH};

/// Runs `f` on a thread with a 2 MiB stack, the default for spawned threads (and rayon's).
fn on_small_stack<T: Send + 'static>(f: impl FnOnce() -> T + Send + 'static) -> T {
    std::thread::Builder::new()
        .stack_size(2 << 20)
        .spawn(f)
        .expect("spawn test thread")
        .join()
        .expect("no panic")
}

#[test]
fn ten_thousand_atom_chain_is_read() {
    let m = on_small_stack(|| parse(&"C".repeat(10_000)).map(|m| m.atoms().len()));
    assert_eq!(m, Ok(10_000));
}

#[test]
fn five_thousand_nested_branches_are_read() {
    let smiles = format!("{}C{}", "C(".repeat(5_000), ")".repeat(5_000));
    let n = on_small_stack(move || parse(&smiles).map(|m| m.atoms().len()));
    assert_eq!(n, Ok(5_001));
}

#[test]
fn poly_para_phenylene_of_nine_thousand_atoms_is_perceived() {
    // 1,500 benzene rings joined para: every ring found, every atom aromatic.
    let s = "c1ccc(cc1)".repeat(1_500);
    let r = on_small_stack(move || {
        parse(&s).map(|m| {
            (
                m.atoms().len(),
                m.rings().len(),
                m.atoms().iter().all(|a| a.aromatic),
            )
        })
    });
    assert_eq!(r, Ok((9_000, 1_500, true)));
}

#[test]
fn input_over_the_limit_is_refused() {
    let s = "C".repeat(MAX_LENGTH + 1);
    let e = parse(&s).unwrap_err();
    assert!(matches!(e.kind, ErrorKind::TooLarge(_)));
    assert_eq!(
        e.message(),
        format!(
            "input of {} bytes exceeds the limit of {} bytes",
            MAX_LENGTH + 1,
            MAX_LENGTH
        )
    );
}

#[test]
fn input_at_the_limit_is_read_on_a_small_stack() {
    let s = "C".repeat(MAX_LENGTH);
    let n = on_small_stack(move || parse(&s).map(|m| m.atoms().len()));
    assert_eq!(n, Ok(MAX_LENGTH));
}
