//! Writing a molecule as SMILES.
//!
//! A depth-first walk per component (iterative, so any size is safe), branches in
//! parentheses, ring closures with the lowest free number (`%nn` past 9). Aromatic atoms are
//! written lower case with the bonds between them elided; an atom goes in brackets when its
//! charge, isotope, class or hydrogen count is not what a reader would infer without them.
//! Stereo marks are not written (the molecule does not keep them).

use crate::elements::{allowed_valences, organic_valences, symbol};
use crate::molecule::Molecule;

/// Writes SMILES and returns, for each atom in the order written, its index in `m`.
pub fn write_smiles_ordered(m: &Molecule) -> (String, Vec<usize>) {
    let mut out = String::new();
    let mut order = Vec::with_capacity(m.atoms.len());
    for (k, component) in m.components.iter().enumerate() {
        if k > 0 {
            out.push('.');
        }
        let lower = aromatic_writable(m, component);
        write_component(m, component, lower, &mut out, &mut order);
    }
    (out, order)
}

/// Whether the component can be written with lower-case aromatic atoms such that a reader
/// infers the same hydrogens and the same Kekulé needs; if not it is written in Kekulé
/// form, which the aromaticity model perceives the same way.
fn aromatic_writable(m: &Molecule, component: &[usize]) -> bool {
    component.iter().all(|&i| {
        let a = &m.atoms[i];
        if !a.aromatic {
            return true;
        }
        if !matches!(a.element, 5 | 6 | 7 | 8 | 15 | 16 | 33 | 34) {
            return false;
        }
        let has_double = m.neighbors[i]
            .iter()
            .any(|n| m.bonds[n.bond].aromatic && m.bonds[n.bond].order == 2);
        if organic_form(m, i, true) {
            return true;
        }
        // In brackets the hydrogens are given; the free valence must still call for the
        // double bond exactly when the Kekulé form has one.
        let used = written_bond_sum(m, i, true) + a.hydrogens as u32;
        let free = allowed_valences(a.element, a.charge)
            .and_then(|v| v.iter().map(|&t| t as u32).find(|&t| t >= used))
            .map_or(0, |t| t - used);
        (free >= 1) == has_double
    })
}

/// Bond sum as a reader counts it: aromatic bonds as 1 when written lower case.
fn written_bond_sum(m: &Molecule, i: usize, lower: bool) -> u32 {
    m.neighbors[i]
        .iter()
        .map(|n| {
            let b = &m.bonds[n.bond];
            if lower && b.aromatic {
                1
            } else {
                b.order as u32
            }
        })
        .sum()
}

/// Whether the atom can be written without brackets and read back with the same
/// hydrogens (and, for aromatic atoms, the same need for a ring double bond).
fn organic_form(m: &Molecule, i: usize, lower: bool) -> bool {
    let a = &m.atoms[i];
    if a.charge != 0 || a.isotope.is_some() || a.atom_class.is_some() {
        return false;
    }
    if a.element == 0 {
        return a.hydrogens == 0;
    }
    let aromatic = lower && a.aromatic;
    if aromatic && !matches!(a.element, 5 | 6 | 7 | 8 | 15 | 16) {
        return false;
    }
    let targets = organic_valences(a.element);
    if targets.is_empty() {
        return false;
    }
    let sum = written_bond_sum(m, i, lower);
    // Past the highest default valence OpenSMILES adds no hydrogens, but some readers fill
    // to the next valence they know (RDKit reads bare `I` with two bonds as `[IH]`):
    // brackets leave no doubt.
    let Some(target) = targets.iter().map(|&t| t as u32).find(|&t| t >= sum) else {
        return false;
    };
    // Pentavalent N from the organic subset (OpenSMILES allows it) is read by RDKit as
    // trivalent; brackets keep its hydrogens explicit.
    if a.element == 7 && target == 5 {
        return false;
    }
    let free = target - sum;
    if aromatic {
        let has_double = m.neighbors[i]
            .iter()
            .any(|n| m.bonds[n.bond].aromatic && m.bonds[n.bond].order == 2);
        (free >= 1) == has_double && free.saturating_sub(1) == a.hydrogens as u32
    } else {
        free == a.hydrogens as u32
    }
}

fn atom_text(m: &Molecule, i: usize, lower: bool, out: &mut String) {
    let a = &m.atoms[i];
    let aromatic = lower && a.aromatic;
    let sym = symbol(a.element);
    let sym = if aromatic {
        sym.to_ascii_lowercase()
    } else {
        sym.to_string()
    };
    if organic_form(m, i, lower) {
        out.push_str(&sym);
        return;
    }
    out.push('[');
    if let Some(iso) = a.isotope {
        out.push_str(&iso.to_string());
    }
    out.push_str(&sym);
    match a.hydrogens {
        0 => {}
        1 => out.push('H'),
        h => {
            out.push('H');
            out.push_str(&h.to_string());
        }
    }
    match a.charge {
        0 => {}
        1 => out.push('+'),
        -1 => out.push('-'),
        c => out.push_str(&format!("{c:+}")),
    }
    if let Some(class) = a.atom_class {
        out.push(':');
        out.push_str(&class.to_string());
    }
    out.push(']');
}

fn bond_text(m: &Molecule, bond: usize, lower: bool) -> &'static str {
    let b = &m.bonds[bond];
    if lower && b.aromatic {
        return "";
    }
    match b.order {
        2 => "=",
        3 => "#",
        _ if lower && m.atoms[b.a].aromatic && m.atoms[b.b].aromatic => "-",
        _ => "",
    }
}

enum Task {
    Atom { atom: usize, via: Option<usize> },
    Text(&'static str),
}

fn write_component(
    m: &Molecule,
    component: &[usize],
    lower: bool,
    out: &mut String,
    order: &mut Vec<usize>,
) {
    let Some(&root) = component.first() else {
        return;
    };
    let n = m.atoms.len();
    // Pass 1: depth-first tree, preorder, ring-closure bonds.
    let mut pre = vec![usize::MAX; n];
    let mut children: Vec<Vec<(usize, usize)>> = vec![Vec::new(); n];
    let mut closures: Vec<Vec<usize>> = vec![Vec::new(); n];
    let mut is_closure = vec![false; m.bonds.len()];
    let mut tree = vec![false; m.bonds.len()];
    let mut counter = 0;
    pre[root] = counter;
    counter += 1;
    let mut stack: Vec<(usize, usize)> = vec![(root, 0)];
    let sorted: Vec<Vec<(usize, usize)>> = component
        .iter()
        .map(|&v| {
            let mut s: Vec<(usize, usize)> =
                m.neighbors[v].iter().map(|nb| (nb.atom, nb.bond)).collect();
            s.sort_unstable();
            s
        })
        .collect();
    let mut local = vec![usize::MAX; n];
    for (k, &v) in component.iter().enumerate() {
        local[v] = k;
    }
    while let Some(&mut (v, ref mut k)) = stack.last_mut() {
        let list = &sorted[local[v]];
        if *k >= list.len() {
            stack.pop();
            continue;
        }
        let (w, b) = list[*k];
        *k += 1;
        if tree[b] || is_closure[b] {
            continue;
        }
        if pre[w] == usize::MAX {
            tree[b] = true;
            pre[w] = counter;
            counter += 1;
            children[v].push((w, b));
            stack.push((w, 0));
        } else {
            is_closure[b] = true;
            closures[v].push(b);
            closures[w].push(b);
        }
    }
    // Pass 2: emit in the same order.
    let mut digit_of: Vec<Option<usize>> = vec![None; m.bonds.len()];
    // Index 0 is never used; past 99 the list grows (see `push_digit`).
    let mut free: Vec<bool> = vec![true; 100];
    free[0] = false;
    let mut tasks = vec![Task::Atom {
        atom: root,
        via: None,
    }];
    while let Some(task) = tasks.pop() {
        let (v, via) = match task {
            Task::Text(t) => {
                out.push_str(t);
                continue;
            }
            Task::Atom { atom, via } => (atom, via),
        };
        if let Some(b) = via {
            out.push_str(bond_text(m, b, lower));
        }
        atom_text(m, v, lower, out);
        order.push(v);
        let mut rings = closures[v].clone();
        // Closings first (their digits free up for the openings), each in bond order.
        rings.sort_by_key(|&b| (digit_of[b].is_none(), b));
        let mut freed = Vec::new();
        for b in rings {
            match digit_of[b] {
                Some(d) => {
                    freed.push(d);
                    push_digit(out, d);
                }
                None => {
                    let d = match (1..free.len()).find(|&d| free[d]) {
                        Some(d) => d,
                        None => {
                            free.push(true);
                            free.len() - 1
                        }
                    };
                    free[d] = false;
                    digit_of[b] = Some(d);
                    out.push_str(bond_text(m, b, lower));
                    push_digit(out, d);
                }
            }
        }
        // Freed only now, so no digit closes and reopens on one atom.
        for d in freed {
            free[d] = true;
        }
        let kids = &children[v];
        if let Some((&(last, lb), rest)) = kids.split_last() {
            tasks.push(Task::Atom {
                atom: last,
                via: Some(lb),
            });
            for &(c, cb) in rest.iter().rev() {
                tasks.push(Task::Text(")"));
                tasks.push(Task::Atom {
                    atom: c,
                    via: Some(cb),
                });
                tasks.push(Task::Text("("));
            }
        }
    }
}

/// Ring numbers 1 to 9 as digits, 10 to 99 as `%nn`. SMILES has no number past 99; a
/// molecule that needs more ring bonds open at once (only large two-dimensional sheets)
/// gets `%(nnn)`, the extension RDKit reads, which this crate's reader refuses.
fn push_digit(out: &mut String, d: usize) {
    if d < 10 {
        out.push((b'0' + d as u8) as char);
    } else if d < 100 {
        out.push('%');
        out.push_str(&d.to_string());
    } else {
        out.push_str(&format!("%({d})"));
    }
}

#[cfg(test)]
mod tests {
    use crate::{parse, write_smiles};

    fn written(s: &str) -> String {
        write_smiles(&parse(s).expect("test SMILES reads"))
    }

    #[test]
    fn aromatic_rings_are_written_lower_case_with_nh() {
        assert_eq!(written("C1=CC=CN1"), "c1ccc[nH]1");
        assert_eq!(written("O=C1C=CC=CN1"), "O=c1cccc[nH]1");
    }

    #[test]
    fn single_bond_between_aromatic_atoms_is_explicit() {
        assert_eq!(written("c1ccccc1c1ccccc1"), "c1ccccc1-c1ccccc1");
    }

    #[test]
    fn ladder_needs_two_digit_ring_numbers() {
        // Eleven ring bonds open at once when the walk runs down one rail of the ladder.
        let s = "C1C2C3C4C5C6C7C8C9C%10C%11CCC%11C%10C9C8C7C6C5C4C3C2C1";
        let w = written(s);
        assert!(w.contains("%10") && w.contains("%11"), "{w}");
        assert_eq!(parse(&w).map(|m| m.rings().len()), Ok(11));
    }

    #[test]
    fn moved_protons_go_in_brackets() {
        let acid = parse("CC(=O)O").expect("reads");
        assert_eq!(write_smiles(&acid.with_protons(&[(3, -1)])), "CC(=O)[O-]");
        let amine = parse("CN").expect("reads");
        assert_eq!(write_smiles(&amine.with_protons(&[(1, 1)])), "C[NH3+]");
        let pyridine = parse("c1ccncc1").expect("reads");
        assert_eq!(
            write_smiles(&pyridine.with_protons(&[(3, 1)])),
            "c1cc[nH+]cc1"
        );
    }

    #[test]
    fn atoms_past_their_default_valence_get_brackets() {
        // Diaryliodonium-like iodine with two bonds and no hydrogen (NCI 5K sample).
        assert_eq!(written("c1ccccc1[I]c1ccccc1"), "c1ccccc1[I]c1ccccc1");
        assert_eq!(written("CS(=O)(=O)C"), "CS(=O)(=O)C");
    }

    #[test]
    fn isotopes_classes_and_charges_are_kept() {
        assert_eq!(written("[13CH3:4][O-]"), "[13CH3:4][O-]");
        assert_eq!(written("[Fe+3]"), "[Fe+3]");
        assert_eq!(written("[O-2]"), "[O-2]");
    }
}
