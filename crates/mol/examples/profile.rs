//! Runs one molecule-stage operation over every SMILES of a file, for profilers
//! (callgrind): `cargo run --release -p pkarta-mol --example profile -- FILE [parse|standardize|write|symmetry]`.
use std::hint::black_box;

fn main() {
    let mut args = std::env::args().skip(1);
    let path = args
        .next()
        .unwrap_or_else(|| "tests/data/sample.smi".to_string());
    let what = args.next().unwrap_or_else(|| "parse".to_string());
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| {
        eprintln!("cannot read {path}: {e}");
        std::process::exit(2)
    });
    let smiles: Vec<&str> = text
        .lines()
        .filter_map(|l| l.split_whitespace().next())
        .collect();
    let molecules: Vec<mol::Molecule> = if what == "parse" {
        Vec::new()
    } else {
        smiles.iter().filter_map(|s| mol::parse(s).ok()).collect()
    };
    let mut n = 0usize;
    match what.as_str() {
        "parse" => {
            for s in &smiles {
                n += mol::parse(black_box(s)).is_ok() as usize;
            }
        }
        "standardize" => {
            for m in &molecules {
                n += mol::standardize(black_box(m)).is_ok() as usize;
            }
        }
        "write" => {
            for m in &molecules {
                n += mol::write_smiles(black_box(m)).len();
            }
        }
        "symmetry" => {
            for m in &molecules {
                n += mol::symmetry_classes(black_box(m)).len();
            }
        }
        "dump" => {
            // Everything perception gives, through the public interface, one line per
            // input: for comparing two builds.
            for s in &smiles {
                match mol::parse(s) {
                    Ok(m) => {
                        let nbs: Vec<_> = (0..m.atoms().len())
                            .map(|i| m.neighbors(i).to_vec())
                            .collect();
                        println!(
                            "{:?} {:?} {:?} {:?} {:?}",
                            m.atoms(),
                            m.bonds(),
                            nbs,
                            m.rings(),
                            m.components()
                        );
                        match mol::standardize(&m) {
                            Ok(st) => println!(
                                "{:?} {:?} {:?} {:?} {:?} {:?} {}",
                                st.parent.atoms(),
                                st.parent.bonds(),
                                st.parent.rings(),
                                st.origin,
                                st.others,
                                st.changes,
                                mol::write_smiles(&st.parent)
                            ),
                            Err(e) => println!("standardize error: {e}"),
                        }
                        println!("{:?}", mol::symmetry_classes(&m));
                    }
                    Err(e) => println!("error: {e:?} {e}"),
                }
                n += 1;
            }
        }
        other => {
            eprintln!("unknown operation {other}");
            std::process::exit(2)
        }
    }
    println!("{what}: {n}");
}
