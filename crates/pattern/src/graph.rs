//! A compiled pattern graph and its search plan.

use crate::expr::Expr;
use crate::filter::{self, AtomFilter};
use crate::primitive::{AtomPrim, BondPrim};

/// One pattern atom.
#[derive(Clone, Debug)]
pub(crate) struct PatternAtom {
    /// What the molecule atom must satisfy.
    pub(crate) expr: Expr<AtomPrim>,
    /// Atom-map number (`:n`), if written.
    pub(crate) map: Option<u16>,
    /// Byte span of the atom in the pattern text.
    #[allow(dead_code)]
    pub(crate) span: (usize, usize),
}

/// One pattern bond.
#[derive(Clone, Debug)]
pub(crate) struct PatternBond {
    /// First atom.
    pub(crate) a: usize,
    /// Second atom.
    pub(crate) b: usize,
    /// What the molecule bond must satisfy.
    pub(crate) expr: Expr<BondPrim>,
}

/// One step of the search: place `atom` on a neighbour of wherever `parent` sits, through a
/// bond satisfying `bond`, then check the ring closures to atoms already placed.
#[derive(Clone, Debug)]
pub(crate) struct Step {
    pub(crate) atom: usize,
    pub(crate) parent: usize,
    pub(crate) bond: usize,
    /// `(placed atom, bond index)` pairs closed by this step.
    pub(crate) closures: Vec<(usize, usize)>,
}

/// A connected pattern: atoms, bonds and the order to place them from the anchor.
#[derive(Clone, Debug)]
pub(crate) struct Graph {
    pub(crate) atoms: Vec<PatternAtom>,
    pub(crate) bonds: Vec<PatternBond>,
    /// The anchored atom: mapped `:1`, else atom 0.
    pub(crate) root: usize,
    /// Every atom but the root, in placement order.
    pub(crate) steps: Vec<Step>,
    /// Cheap test per pattern atom, the pattern bonds at the atom included (a molecule atom
    /// with fewer neighbours cannot sit there); empty until [`Graph::refilter`].
    pub(crate) filters: Vec<AtomFilter>,
    /// Bond kinds (`filter::bond_kind`) each pattern bond admits.
    pub(crate) bond_masks: Vec<u16>,
    /// Atoms the molecule must hold: per element/aromatic bit that some pattern atoms
    /// admit alone, how many of them (each needs an atom of its own).
    pub(crate) census: Vec<(u8, u16)>,
    /// Per pattern atom, its neighbours placed after it, with the bond kinds between:
    /// where the search looks ahead (at the root).
    pub(crate) ahead: Vec<Vec<(usize, u16)>>,
    /// Per pattern atom, what is left of its expression to walk once its filter has
    /// passed: a conjunction without the operands the filter decides exactly (an atom
    /// passing the filter lies in each one's box, which is exactly where it holds), so
    /// `[nX2;+0;$(...)]` walks only `$(...)`. Where the filter is the whole answer nothing is
    /// walked anyway.
    pub(crate) residual: Vec<Expr<AtomPrim>>,
    /// Per pattern atom, whether its answers are worth keeping per molecule atom: not when
    /// what is left is one environment (or its negation), whose own answers are kept.
    pub(crate) keep_answers: Vec<bool>,
    /// Pattern bonds per atom: a molecule atom with fewer neighbours cannot sit there.
    pub(crate) min_degree: Vec<usize>,
    /// Process-wide id per atom expression (the same expression in any pattern has the same
    /// id), so a `Matcher` can keep the answers for one molecule; empty until
    /// `Pattern::parse` numbers them.
    pub(crate) expr_ids: Vec<u32>,
}

impl Graph {
    /// Works the filters out, given the filter of each environment's first atom (see
    /// [`AtomFilter::with_environments`]; an environment not listed may hold anywhere).
    /// [`Graph::new`] leaves them empty until this is called.
    pub(crate) fn refilter(&mut self, envs: &[AtomFilter]) {
        self.filters = filters(
            &self.atoms,
            &self.bonds,
            &self.bond_masks,
            &self.min_degree,
            envs,
        );
        self.census = census(&self.filters);
    }

    /// Builds the search plan rooted at `root`. The graph must be connected (the parser
    /// refuses `.`).
    pub(crate) fn new(mut atoms: Vec<PatternAtom>, bonds: Vec<PatternBond>, root: usize) -> Graph {
        for atom in &mut atoms {
            atom.expr
                .cheap_first(&|p| matches!(p, AtomPrim::Recursive(_)));
        }
        let n = atoms.len();
        let mut adjacency: Vec<Vec<(usize, usize)>> = vec![Vec::new(); n];
        for (i, b) in bonds.iter().enumerate() {
            adjacency[b.a].push((b.b, i));
            adjacency[b.b].push((b.a, i));
        }
        // Placement order: next comes the unplaced atom with the most bonds to placed atoms
        // (ties to the lower index, so the text order decides). Fused rings then close as
        // soon as they can, cutting partial matches that a plain depth-first order would
        // carry around a whole ring system before its closures are checked.
        const UNPLACED: usize = usize::MAX;
        let mut position = vec![UNPLACED; n];
        let mut steps: Vec<Step> = Vec::with_capacity(n.saturating_sub(1));
        if n > 0 {
            position[root] = 0;
        }
        for k in 1..n {
            let mut best: Option<(usize, usize)> = None;
            for (atom, links) in adjacency.iter().enumerate() {
                if position[atom] != UNPLACED {
                    continue;
                }
                let placed = links
                    .iter()
                    .filter(|(nb, _)| position[*nb] != UNPLACED)
                    .count();
                if placed > 0 && !matches!(best, Some((count, _)) if count >= placed) {
                    best = Some((placed, atom));
                }
            }
            // The parser refuses disconnected patterns, so some atom is always reachable.
            let Some((_, atom)) = best else { break };
            let mut links: Vec<(usize, usize)> = adjacency[atom]
                .iter()
                .copied()
                .filter(|(nb, _)| position[*nb] != UNPLACED)
                .collect();
            links.sort_by_key(|(nb, _)| position[*nb]);
            let (parent, bond) = links[0];
            steps.push(Step {
                atom,
                parent,
                bond,
                closures: links[1..].to_vec(),
            });
            position[atom] = k;
        }
        // Each pattern bond must lead to a distinct molecule neighbour.
        let min_degree: Vec<usize> = adjacency.iter().map(Vec::len).collect();
        // A pattern bond on a cycle of the pattern can only sit on a bond on a cycle of
        // the molecule, a ring bond: saying so in its mask cuts the search and sharpens
        // the neighbour requirements, without changing any match.
        let mut walk = Walk::default();
        let bond_masks: Vec<u16> = bonds
            .iter()
            .enumerate()
            .map(|(i, b)| {
                let mask = filter::bond_mask(&b.expr);
                if on_cycle(&adjacency, &bonds, i, &mut walk) {
                    mask & filter::RING_KINDS
                } else {
                    mask
                }
            })
            .collect();
        // The filters wait for `refilter`, once the environments' filters are known: working
        // them out here too, only to be replaced, cost a good part of compiling a pattern.
        let filters = Vec::new();
        let census = Vec::new();
        let residual: Vec<Expr<AtomPrim>> = atoms.iter().map(|a| residual(&a.expr)).collect();
        let keep_answers = residual
            .iter()
            .map(|r| {
                !matches!(r, Expr::Prim(AtomPrim::Recursive(_)))
                    && !matches!(r, Expr::Not(e) if matches!(**e, Expr::Prim(AtomPrim::Recursive(_))))
            })
            .collect();
        let ahead = adjacency
            .iter()
            .enumerate()
            .map(|(atom, links)| {
                links
                    .iter()
                    .filter(|&&(nb, _)| position[nb] > position[atom])
                    .map(|&(nb, bond)| (nb, bond_masks[bond]))
                    .collect()
            })
            .collect();
        Graph {
            atoms,
            bonds,
            root,
            steps,
            filters,
            bond_masks,
            census,
            ahead,
            min_degree,
            expr_ids: Vec::new(),
            residual,
            keep_answers,
        }
    }
}

/// `expr` without the conjunction operands its own filter decides exactly (see
/// `Graph::residual`). The filter of a pattern atom only ever narrows its expression's
/// box (pattern bonds, neighbours), so passing it still puts the atom in each such
/// operand's box. Operands keep their order.
fn residual(expr: &Expr<AtomPrim>) -> Expr<AtomPrim> {
    match expr {
        Expr::And(es) if es.len() > 1 => {
            let rest: Vec<Expr<AtomPrim>> = es
                .iter()
                .filter(|e| !AtomFilter::new(e).exact)
                .cloned()
                .collect();
            if rest.is_empty() {
                // The whole is then exact as well; an empty conjunction holds.
                Expr::And(Vec::new())
            } else {
                Expr::and(rest)
            }
        }
        _ => expr.clone(),
    }
}

/// The filter of each pattern atom: its expression (environments narrowed by `envs`, the
/// filters of their first atoms), the pattern bonds at it, and what its pattern neighbours
/// need of its molecule neighbours.
fn filters(
    atoms: &[PatternAtom],
    bonds: &[PatternBond],
    bond_masks: &[u16],
    min_degree: &[usize],
    envs: &[AtomFilter],
) -> Vec<AtomFilter> {
    let own: Vec<AtomFilter> = atoms
        .iter()
        .zip(min_degree)
        .map(|(a, &min)| AtomFilter::with_environments(&a.expr, envs).with_min_degree(min))
        .collect();
    let neighbors = |i: usize| {
        bonds
            .iter()
            .zip(bond_masks)
            .filter_map(move |(b, &mask)| match (b.a == i, b.b == i) {
                (true, false) => Some((b.b, mask)),
                (false, true) => Some((b.a, mask)),
                _ => None,
            })
    };
    let near: Vec<AtomFilter> = (0..atoms.len())
        .map(|i| {
            let around: Vec<(AtomFilter, u16)> =
                neighbors(i).map(|(j, mask)| (own[j], mask)).collect();
            own[i].with_neighbors(&around)
        })
        .collect();
    (0..atoms.len())
        .map(|i| {
            let around: Vec<AtomFilter> = neighbors(i).map(|(j, _)| near[j]).collect();
            near[i].with_far_neighbors(&around)
        })
        .collect()
}

/// Whether pattern bond `bond` lies on a cycle: its ends stay connected without it. Other
/// bonds between the same two atoms do not count, since they sit on the same molecule bond.
/// `adjacency` lists `(neighbour, bond)` per atom, so the walk reads each atom's own bonds
/// rather than every bond at every step; `walk` is scratch kept from one bond to the next.
fn on_cycle(
    adjacency: &[Vec<(usize, usize)>],
    bonds: &[PatternBond],
    bond: usize,
    walk: &mut Walk,
) -> bool {
    let (from, to) = (bonds[bond].a, bonds[bond].b);
    if from == to {
        return false;
    }
    let parallel = |b: &PatternBond| (b.a == from && b.b == to) || (b.a == to && b.b == from);
    let Walk { seen, stack } = walk;
    seen.clear();
    seen.resize(adjacency.len(), false);
    stack.clear();
    stack.push(from);
    seen[from] = true;
    while let Some(a) = stack.pop() {
        for &(next, b) in &adjacency[a] {
            if parallel(&bonds[b]) {
                continue;
            }
            if next == to {
                return true;
            }
            if !seen[next] {
                seen[next] = true;
                stack.push(next);
            }
        }
    }
    false
}

/// Scratch for [`on_cycle`]: atoms reached, atoms still to visit.
#[derive(Default)]
struct Walk {
    seen: Vec<bool>,
    stack: Vec<usize>,
}

/// What the pattern asks of the molecule's atom counts: see `Graph::census`.
fn census(filters: &[AtomFilter]) -> Vec<(u8, u16)> {
    let mut out: Vec<(u8, u16)> = Vec::new();
    for bit in filters.iter().filter_map(AtomFilter::single_element) {
        match out.iter_mut().find(|(b, _)| *b == bit) {
            Some((_, count)) => *count = count.saturating_add(1),
            None => out.push((bit, 1)),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn residual_of(text: &str) -> Expr<AtomPrim> {
        let (graph, _) = crate::parse::parse(text).expect("parses");
        graph.residual[graph.root].clone()
    }

    #[test]
    fn residual_keeps_only_what_the_filter_cannot_decide() {
        assert_eq!(
            residual_of("[nX2;+0;$(n1ccccc1)]"),
            Expr::Prim(AtomPrim::Recursive(0))
        );
        // Two environments stay, in order, the counts and charge go.
        let r = residual_of("[OX2;+0;!$(O-C=O);!$(O-a)]");
        let Expr::And(rest) = r else {
            panic!("a conjunction: {r:?}")
        };
        assert_eq!(rest.len(), 2);
        assert!(rest.iter().all(|e| matches!(e, Expr::Not(_))));
        // A disjunction mixing an environment with a count is not one box: kept whole.
        let r = residual_of("[C;$(C=O),X4]");
        assert!(matches!(r, Expr::Or(_)), "{r:?}");
        // A mass number has no projection: its operand (`13C`, one conjunction) is kept
        // whole, the hydrogen count goes.
        let r = residual_of("[13C;H3]");
        let carbon = AtomPrim::Element {
            number: 6,
            aromatic: Some(false),
        };
        assert_eq!(
            r,
            Expr::And(vec![Expr::Prim(AtomPrim::Isotope(13)), Expr::Prim(carbon)])
        );
    }
}
