//! A plain matcher for tests: the same placement order, but every atom tested by walking
//! its whole expression and every bond by its expression, with no pre-filter, no
//! look-ahead and no memo. The matcher must find exactly the matches this one finds, in
//! the same order, whatever its shortcuts.

use mol::Molecule;

use crate::graph::Graph;
use crate::primitive::AtomPrim;
use crate::Pattern;

fn atom_holds(
    pattern: &Pattern,
    graph: &Graph,
    at: usize,
    molecule: &Molecule,
    atom: usize,
) -> bool {
    graph.atoms[at].expr.eval(&mut |p| match p {
        AtomPrim::Recursive(id) => pattern.subs.get(*id as usize).is_some_and(|env| {
            let mut found = false;
            search(pattern, env, molecule, atom, &[], &mut |_| {
                found = true;
                true
            });
            found
        }),
        _ => p.holds(molecule, atom),
    })
}

fn bond_holds(graph: &Graph, bond: usize, molecule: &Molecule, molecule_bond: usize) -> bool {
    let b = &molecule.bonds()[molecule_bond];
    graph.bonds[bond]
        .expr
        .eval(&mut |p| p.holds_parts(b.aromatic, b.order, b.in_ring))
}

/// Every match of `graph` anchored on `anchor`, given to `sink` in search order.
pub(crate) fn search(
    pattern: &Pattern,
    graph: &Graph,
    molecule: &Molecule,
    anchor: usize,
    avoid: &[usize],
    sink: &mut dyn FnMut(&[usize]) -> bool,
) -> bool {
    if anchor >= molecule.atoms().len()
        || avoid.contains(&anchor)
        || !atom_holds(pattern, graph, graph.root, molecule, anchor)
    {
        return false;
    }
    let mut assign = vec![usize::MAX; graph.atoms.len()];
    assign[graph.root] = anchor;
    extend(pattern, graph, molecule, 0, &mut assign, avoid, sink)
}

fn extend(
    pattern: &Pattern,
    graph: &Graph,
    molecule: &Molecule,
    step: usize,
    assign: &mut [usize],
    avoid: &[usize],
    sink: &mut dyn FnMut(&[usize]) -> bool,
) -> bool {
    let Some(s) = graph.steps.get(step) else {
        return sink(assign);
    };
    for nb in molecule.neighbors(assign[s.parent]) {
        let candidate = nb.atom;
        if assign.contains(&candidate)
            || avoid.contains(&candidate)
            || !bond_holds(graph, s.bond, molecule, nb.bond)
            || !atom_holds(pattern, graph, s.atom, molecule, candidate)
        {
            continue;
        }
        let closed = s.closures.iter().all(|&(other, bond)| {
            molecule
                .bond_between(candidate, assign[other])
                .is_some_and(|mb| bond_holds(graph, bond, molecule, mb))
        });
        if !closed {
            continue;
        }
        assign[s.atom] = candidate;
        let stop = extend(pattern, graph, molecule, step + 1, assign, avoid, sink);
        assign[s.atom] = usize::MAX;
        if stop {
            return true;
        }
    }
    false
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every `pattern = '...'` string of the TOML files in a `fragments/` directory.
    fn fragment_patterns(dir: &str) -> Vec<String> {
        let dir = format!("{}/../../fragments/{dir}", env!("CARGO_MANIFEST_DIR"));
        let mut files: Vec<_> = std::fs::read_dir(&dir)
            .map(|d| d.filter_map(|e| e.ok()).map(|e| e.path()).collect())
            .unwrap_or_default();
        files.sort();
        let mut out = Vec::new();
        for path in files
            .iter()
            .filter(|p| p.extension().is_some_and(|e| e == "toml"))
        {
            let Ok(text) = std::fs::read_to_string(path) else {
                continue;
            };
            for line in text.lines() {
                let line = line.trim();
                if let Some(rest) = line.strip_prefix("pattern") {
                    let rest = rest.trim_start().trim_start_matches('=').trim();
                    if let Some(p) = rest.strip_prefix('\'').and_then(|r| r.strip_suffix('\'')) {
                        out.push(p.to_string());
                    }
                }
            }
        }
        out
    }

    fn molecules() -> Vec<Molecule> {
        let mut smiles: Vec<String> = [
            "CC(=O)Oc1ccccc1C(=O)O",
            "OC(=O)c1cn(C2CC2)c2cc(N3CCNCC3)c(F)cc2c1=O",
            "Cn1c(=O)c2[nH]cnc2n(C)c1=O",
            "CC1(C)S[C@@H]2[C@H](NC(=O)[C@H](N)c3ccc(O)cc3)C(=O)N2[C@H]1C(=O)O",
            "NC(=N)NCCCC(N)C(=O)O",
            "O=C1CC(=O)CC(=O)C1",
            "N#CCC(C#N)S(=O)(=O)C",
            "[O-][N+](=O)CC[N+](=O)[O-]",
            "c1ccc2c(c1)[nH]c1ccncc12",
            "C1CC2CCC1CC2",
            "[H]OC([H])([H])c1ccncc1",
            "Oc1nc(O)c2nc[nH]c2n1",
            "CN(C)c1ccncc1",
            "C1=CC=CN1",
            "O=c1cc[nH]cc1",
        ]
        .iter()
        .map(|s| s.to_string())
        .collect();
        // Reference data beside the repository, when present: a slice of the sample.
        let path = concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/../../../shared/data/moses-sample.smi"
        );
        if let Ok(text) = std::fs::read_to_string(path) {
            smiles.extend(
                text.lines()
                    .step_by(10)
                    .filter_map(|l| l.split_whitespace().next())
                    .map(str::to_string),
            );
        }
        smiles.iter().filter_map(|s| mol::parse(s).ok()).collect()
    }

    #[test]
    fn matcher_finds_what_the_plain_search_finds_in_the_same_order() {
        let mut texts = fragment_patterns("sites");
        texts.extend(fragment_patterns("substituents"));
        // Ring closures, wildcards and nested environments beyond the library's.
        texts.extend(
            [
                "C1CCCCC1",
                "*~*~*",
                "[R2]",
                "[!R;C]~[R]",
                "[$(C~[$(N=O)])]",
                "c(:n):c",
                "[#6;X3](=O)~*~*~[#7]",
                "[N;!$(N-C=O);!$(N-S)]",
                "C(~*)(~*)(~*)~*",
                // Conjunctions the filter decides in part (`Graph::residual`).
                "[C;H2;!$(C=O)]",
                "[N;H1,H2;+0;$(N-c)]",
                "[c;R1;!$(c:n)]:c",
                "[O;X2;!$(O-C=O);H0]",
                "[#6;!$(*=*);X4;H3]",
                "[$(C=O),$(C#N);X3,X2;!R]",
                "[!#1;!$(*~[#7,#8]);D2]~[D1]",
            ]
            .iter()
            .map(|s| s.to_string()),
        );
        let patterns: Vec<Pattern> = texts
            .iter()
            .filter_map(|t| Pattern::parse(t).ok())
            .collect();
        assert!(
            patterns.len() > 100,
            "fragment patterns found: {}",
            patterns.len()
        );
        let molecules = molecules();
        let mut compared = 0usize;
        let mut found = 0usize;
        for m in &molecules {
            let mut matcher = crate::Matcher::with_all_atoms(m);
            let mut lazy = crate::Matcher::new(m);
            for p in &patterns {
                for atom in 0..m.atoms().len() {
                    // A fence on the anchor's first neighbour, as substituent recognition
                    // uses one.
                    let avoid: Vec<usize> =
                        m.neighbors(atom).iter().take(1).map(|nb| nb.atom).collect();
                    for avoid in [&[][..], &avoid[..]] {
                        let mut plain = Vec::new();
                        search(p, &p.main, m, atom, avoid, &mut |a| {
                            plain.push(a.to_vec());
                            false
                        });
                        let mut fast = Vec::new();
                        let mut memo = crate::matcher::EnvMemo::for_molecule(m);
                        crate::matcher::Search::new(m, &p.subs, &p.env_ids, &mut memo).search(
                            &p.main,
                            atom,
                            avoid,
                            &mut |a| {
                                fast.push(a.to_vec());
                                false
                            },
                        );
                        assert_eq!(fast, plain, "{p} on {} at {atom}", m.input());
                        let could = matcher.could_anchor(p, atom);
                        assert!(could || plain.is_empty(), "{p} on {} at {atom}", m.input());
                        let first = plain.first().cloned();
                        assert_eq!(
                            matcher.first_match_at(p, atom, avoid).map(|m| m.atoms),
                            first
                        );
                        assert_eq!(lazy.first_match_at(p, atom, avoid).map(|m| m.atoms), first);
                        compared += 1;
                        found += !plain.is_empty() as usize;
                    }
                }
            }
        }
        assert!(found > 0 && compared > found);
    }
}
