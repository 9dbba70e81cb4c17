//! A compiled pattern graph and its search plan.

use crate::expr::Expr;
use crate::filter::AtomFilter;
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
    /// Every atom but the root, in placement order (depth first from the root).
    pub(crate) steps: Vec<Step>,
    /// Cheap test per pattern atom.
    pub(crate) filters: Vec<AtomFilter>,
}

impl Graph {
    /// Builds the search plan rooted at `root`. The graph must be connected (the parser
    /// refuses `.`).
    pub(crate) fn new(atoms: Vec<PatternAtom>, bonds: Vec<PatternBond>, root: usize) -> Graph {
        let n = atoms.len();
        let mut adjacency: Vec<Vec<(usize, usize)>> = vec![Vec::new(); n];
        for (i, b) in bonds.iter().enumerate() {
            adjacency[b.a].push((b.b, i));
            adjacency[b.b].push((b.a, i));
        }
        let mut placed = vec![false; n];
        let mut tree_bond = vec![false; bonds.len()];
        let mut order: Vec<(usize, usize, usize)> = Vec::with_capacity(n);
        // Depth first, visiting neighbours in pattern order, so the search follows the text.
        let mut stack: Vec<(usize, usize, usize)> = Vec::new();
        if n > 0 {
            placed[root] = true;
            for &(next, bond) in adjacency[root].iter().rev() {
                stack.push((next, root, bond));
            }
        }
        while let Some((atom, parent, bond)) = stack.pop() {
            if placed[atom] {
                continue;
            }
            placed[atom] = true;
            tree_bond[bond] = true;
            order.push((atom, parent, bond));
            for &(next, b) in adjacency[atom].iter().rev() {
                if !placed[next] {
                    stack.push((next, atom, b));
                }
            }
        }
        let mut position = vec![usize::MAX; n];
        if n > 0 {
            position[root] = 0;
        }
        for (i, &(atom, _, _)) in order.iter().enumerate() {
            position[atom] = i + 1;
        }
        let mut steps: Vec<Step> = order
            .iter()
            .map(|&(atom, parent, bond)| Step {
                atom,
                parent,
                bond,
                closures: Vec::new(),
            })
            .collect();
        // A ring closure is checked at the step that places the later of its two atoms.
        for (i, b) in bonds.iter().enumerate() {
            if tree_bond[i] {
                continue;
            }
            let (early, late) = if position[b.a] < position[b.b] {
                (b.a, b.b)
            } else {
                (b.b, b.a)
            };
            if position[late] >= 1 && position[late] != usize::MAX {
                steps[position[late] - 1].closures.push((early, i));
            }
        }
        let filters = atoms.iter().map(|a| AtomFilter::new(&a.expr)).collect();
        Graph {
            atoms,
            bonds,
            root,
            steps,
            filters,
        }
    }
}
