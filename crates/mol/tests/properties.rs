//! Property tests: no input panics; writing and reading back keeps the molecule.

use mol::{parse, standardize, write_smiles_ordered, Molecule};
use proptest::prelude::*;

/// Hand-written drug-like molecules of our own (tests/data/sample.smi).
fn sample() -> Vec<String> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../../tests/data/sample.smi");
    std::fs::read_to_string(path)
        .expect("tests/data/sample.smi")
        .lines()
        .filter_map(|l| l.split_whitespace().next().map(str::to_string))
        .collect()
}

/// Protonation moves as the speciation stage makes them, over the sample: a neutral
/// trivalent N gains a proton; a neutral N, O or S with a hydrogen loses one.
fn moves() -> &'static [(String, usize, i8)] {
    static MOVES: std::sync::OnceLock<Vec<(String, usize, i8)>> = std::sync::OnceLock::new();
    MOVES.get_or_init(find_moves)
}

fn find_moves() -> Vec<(String, usize, i8)> {
    let mut out = Vec::new();
    for s in sample() {
        let m = parse(&s).expect("sample reads");
        for i in 0..m.atoms().len() {
            let a = &m.atoms()[i];
            if a.charge != 0 {
                continue;
            }
            let valence: u32 = m
                .neighbors(i)
                .iter()
                .map(|n| m.bonds()[n.bond].order as u32)
                .sum::<u32>()
                + a.hydrogens as u32;
            if a.element == 7 && valence == 3 {
                out.push((s.clone(), i, 1));
            }
            if matches!(a.element, 7 | 8 | 16) && a.hydrogens > 0 {
                out.push((s.clone(), i, -1));
            }
        }
    }
    out
}

/// Reads back what was written and compares atom by atom (through the written order) and
/// bond by bond. Aromatic bonds compare by aromaticity, others by order.
fn round_trip(m: &Molecule, compare_aromatic: bool) -> Result<(), String> {
    let (text, order) = write_smiles_ordered(m);
    let back = parse(&text).map_err(|e| format!("written SMILES does not read:\n{e}"))?;
    if back.atoms().len() != m.atoms().len() || order.len() != m.atoms().len() {
        return Err(format!(
            "{text}: {} atoms back for {}",
            back.atoms().len(),
            m.atoms().len()
        ));
    }
    for (k, &i) in order.iter().enumerate() {
        let (a, b) = (&m.atoms()[i], &back.atoms()[k]);
        let same = a.element == b.element
            && a.isotope == b.isotope
            && a.charge == b.charge
            && a.hydrogens == b.hydrogens
            && a.atom_class == b.atom_class
            && (!compare_aromatic || a.aromatic == b.aromatic);
        if !same {
            return Err(format!("{text}: atom {i} was {a:?}, reads back as {b:?}"));
        }
    }
    if back.bonds().len() != m.bonds().len() {
        return Err(format!("{text}: bond count differs"));
    }
    for b in back.bonds() {
        let (x, y) = (order[b.a], order[b.b]);
        let Some(ob) = m.bond_between(x, y) else {
            return Err(format!("{text}: bond {x}-{y} is new"));
        };
        let o = &m.bonds()[ob];
        if compare_aromatic && (o.aromatic != b.aromatic || (!o.aromatic && o.order != b.order)) {
            return Err(format!(
                "{text}: bond {x}-{y} was {o:?}, reads back as {b:?}"
            ));
        }
        if !compare_aromatic && !o.aromatic && !b.aromatic && o.order != b.order {
            return Err(format!(
                "{text}: bond {x}-{y} order {} became {}",
                o.order, b.order
            ));
        }
    }
    Ok(())
}

#[test]
fn every_sample_molecule_round_trips() {
    for s in sample() {
        let m = parse(&s).unwrap_or_else(|e| panic!("{s}:\n{e}"));
        if let Err(e) = round_trip(&m, true) {
            panic!("{s}: {e}");
        }
        let p = standardize(&m).unwrap_or_else(|e| panic!("{s}:\n{e}"));
        if let Err(e) = round_trip(&p.parent, true) {
            panic!("{s} (parent): {e}");
        }
    }
}

proptest! {
    #[test]
    fn arbitrary_text_never_panics(s in any::<String>()) {
        let _ = parse(&s);
    }

    #[test]
    fn smiles_like_text_never_panics_and_what_reads_round_trips(
        s in "[CNOSPcnosBrClF0-9()=#:/\\\\@+\\-\\[\\]%.*H]{0,40}"
    ) {
        if let Ok(m) = parse(&s) {
            let _ = standardize(&m);
            let _ = mol::symmetry_classes(&m);
            prop_assert!(round_trip(&m, true).is_ok(), "{}: {:?}", s, round_trip(&m, true));
        }
    }

    #[test]
    fn edited_sample_molecules_never_panic_and_what_reads_round_trips(
        index in 0usize..1000,
        edits in proptest::collection::vec((0usize..200, 0usize..40, any::<bool>()), 1..4)
    ) {
        // Real molecules with a few characters replaced or inserted: near-valid input that
        // reaches perception, where random text rarely gets.
        const ALPHABET: &[u8] = b"CNOcnos()=#[]+-123%0H.@/\\:*B";
        let all = sample();
        let mut text: Vec<u8> = all[index % all.len()].clone().into_bytes();
        for (at, ch, insert) in edits {
            let at = at % (text.len() + 1);
            let c = ALPHABET[ch % ALPHABET.len()];
            if insert || at == text.len() {
                text.insert(at, c);
            } else {
                text[at] = c;
            }
        }
        let s = String::from_utf8(text).expect("ASCII edits");
        if let Ok(m) = parse(&s) {
            let _ = mol::symmetry_classes(&m);
            if let Ok(p) = standardize(&m) {
                prop_assert!(round_trip(&p.parent, true).is_ok(), "{} parent: {:?}", s, round_trip(&p.parent, true));
            }
            prop_assert!(round_trip(&m, true).is_ok(), "{}: {:?}", s, round_trip(&m, true));
        }
    }

    #[test]
    fn moved_protons_are_written_correctly(pick in 0usize..100_000) {
        let all = moves();
        let (smiles, atom, delta) = &all[pick % all.len()];
        let m = parse(smiles).expect("sample reads");
        let edited = m.with_protons(&[(*atom, *delta)]);
        // The edit may change aromaticity; the atoms, charges, hydrogens must survive.
        prop_assert!(round_trip(&edited, false).is_ok(), "{:?}", round_trip(&edited, false));
    }
}

/// The MOSES sample beside the repository (../shared/data, read in place): every molecule
/// reads, writes and reads back the same. Skips when the folder is absent.
#[test]
fn moses_sample_round_trips_when_present() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../../../shared/data/moses-sample.smi"
    );
    let Ok(text) = std::fs::read_to_string(path) else {
        eprintln!("skipped: {path} absent");
        return;
    };
    let mut failures = Vec::new();
    let mut n = 0;
    for s in text.lines().filter_map(|l| l.split_whitespace().next()) {
        n += 1;
        match parse(s) {
            Ok(m) => {
                if let Err(e) = round_trip(&m, true) {
                    failures.push(format!("{s}: {e}"));
                }
            }
            Err(e) => failures.push(format!("{s}: {e}")),
        }
    }
    assert!(n > 0);
    assert!(
        failures.is_empty(),
        "{} of {n}:\n{}",
        failures.len(),
        failures[..failures.len().min(10)].join("\n")
    );
}
