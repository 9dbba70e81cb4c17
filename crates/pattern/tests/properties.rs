//! Invariants of matching, over generated patterns and a few molecules.

use proptest::prelude::*;

/// Molecules with rings, aromatic and charged atoms, branches.
const MOLECULES: &[&str] = &[
    "CC(=O)Nc1ccc(O)cc1",
    "c1ccc2[nH]ccc2c1",
    "C[N+](C)(C)CC(=O)[O-]",
    "C1CCC2(CC1)OCCO2",
    "OC(=O)CC(N)C(=O)O",
    "Cc1nc(N)sc1C#N",
];

fn check(text: &str) {
    let p = pattern::Pattern::parse(text).expect("generated patterns are valid");
    let bonds = p.bonds();
    for smiles in MOLECULES {
        let m = mol::parse(smiles).expect("test molecule");
        let n = m.atoms().len();
        for atom in 0..n {
            let avoid = [(atom + 1) % n];
            let found = p.matches_at(&m, atom, &avoid);
            assert_eq!(
                !found.is_empty(),
                p.is_match_at(&m, atom, &avoid),
                "{text} {smiles}"
            );
            if !p.could_anchor(&m, atom) {
                assert!(found.is_empty(), "{text} {smiles}: filter refused a match");
            }
            let mut sets = Vec::new();
            for hit in &found {
                assert_eq!(hit.atoms.len(), p.len());
                assert_eq!(hit.atoms[p.anchor()], atom);
                assert!(!hit.atoms.contains(&avoid[0]));
                let mut set = hit.atoms.clone();
                set.sort_unstable();
                set.dedup();
                assert_eq!(set.len(), p.len(), "{text} {smiles}: an atom used twice");
                for &(a, b) in &bonds {
                    assert!(m.bond_between(hit.atoms[a], hit.atoms[b]).is_some());
                }
                assert!(!sets.contains(&set), "{text} {smiles}: duplicate atom set");
                sets.push(set);
            }
        }
    }
}

fn atom() -> impl Strategy<Value = String> {
    let organic = prop::sample::select(vec!["C", "N", "O", "c", "n", "o", "s", "*", "a", "A"]);
    let primitive = prop::sample::select(vec![
        "C",
        "N",
        "O",
        "c",
        "n",
        "#6",
        "#7",
        "H0",
        "H1",
        "H2",
        "D1",
        "D2",
        "D3",
        "X3",
        "X4",
        "R",
        "R0",
        "r5",
        "r6",
        "+",
        "-",
        "+0",
        "a",
        "A",
        "$(C=O)",
        "$(*~[#7])",
    ]);
    let operator = prop::sample::select(vec!["", "&", ",", ";", "!", ",!", ";!"]);
    let bracket = (
        primitive.clone(),
        prop::collection::vec((operator, primitive), 0..3),
    )
        .prop_map(|(first, rest)| {
            let mut t = format!("[{first}");
            for (op, p) in rest {
                t.push_str(op);
                t.push_str(p);
            }
            t.push(']');
            t
        });
    prop_oneof![organic.prop_map(str::to_string), bracket]
}

fn bond() -> impl Strategy<Value = &'static str> {
    prop::sample::select(vec!["", "", "-", "=", ":", "~", "@", "!@", "-,=", "!:"])
}

/// Chains with optional branches and an optional ring closure from the first atom to the
/// last: always valid pattern text.
fn pattern_text() -> impl Strategy<Value = String> {
    (
        atom(),
        prop::collection::vec((bond(), atom(), any::<bool>()), 0..6),
        any::<bool>(),
    )
        .prop_map(|(first, rest, ring)| {
            let last = rest.len();
            // The closure joins the first atom to the last main-chain one; it needs a
            // main-chain atom between them, or it would double a bond.
            let main_chain = rest
                .iter()
                .enumerate()
                .filter(|(i, (_, _, branch))| !branch || i + 1 == last)
                .count();
            let ring = ring && main_chain >= 2;
            let mut t = first;
            if ring {
                t.push('1');
            }
            for (i, (b, a, branch)) in rest.into_iter().enumerate() {
                let branch = branch && i + 1 < last;
                if branch {
                    t.push('(');
                }
                t.push_str(b);
                t.push_str(&a);
                if branch {
                    t.push(')');
                }
            }
            if ring {
                t.push('1');
            }
            t
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn matches_are_embeddings(text in pattern_text()) {
        prop_assert!(pattern::Pattern::parse(&text).is_ok(), "{} does not parse", text);
        check(&text);
    }
}

#[test]
fn patterns_are_send_and_sync() {
    fn assert_send_sync<T: Send + Sync>() {}
    assert_send_sync::<pattern::Pattern>();
    assert_send_sync::<pattern::PatternError>();
}
