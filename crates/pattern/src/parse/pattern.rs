//! The whole pattern, and one connected graph (also used inside `$()`).

use crate::error::PatternError;
use crate::graph::Graph;

use super::parser::{Builder, Parser};

/// Reads pattern text: the main graph and the recursive environments it refers to, each
/// with filters that know nothing of the environments (any may hold anywhere). For tests
/// of the parts; `Pattern::parse` refilters with the environments' filters.
#[cfg(test)]
pub(crate) fn parse(text: &str) -> Result<(Graph, Vec<Graph>), PatternError> {
    let (mut main, mut subs) = parse_unfiltered(text)?;
    for graph in std::iter::once(&mut main).chain(subs.iter_mut()) {
        graph.refilter(&[]);
    }
    Ok((main, subs))
}

/// Like [`parse`], the filters left for the caller to work out (`Graph::refilter`).
// <pattern> ::= <graph> end-of-text
pub(crate) fn parse_unfiltered(text: &str) -> Result<(Graph, Vec<Graph>), PatternError> {
    let mut parser = Parser::new(text);
    if text.is_empty() {
        return Err(parser.error_at("empty pattern", 0, 0));
    }
    let main = parser.graph(true)?;
    if !parser.at_end() {
        // graph() stops only at the end, at ')' or at ']'.
        return Err(parser.error_here(format!("unmatched {}", parser.found())));
    }
    let subs = parser.subs.into_iter().collect::<Option<Vec<Graph>>>();
    match subs {
        Some(subs) => Ok((main, subs)),
        None => Err(PatternError::new(
            "internal error: unfinished environment",
            text,
            0,
            0,
        )),
    }
}

impl Parser<'_> {
    // <graph> ::= <atom> <chain>
    /// Reads one connected graph up to the end of the text or an unmatched `)` or `]`. The anchor
    /// is the atom mapped `:1` when `use_map` (the main pattern), else the first atom (as
    /// Daylight defines `$()` environments).
    pub(crate) fn graph(&mut self, use_map: bool) -> Result<Graph, PatternError> {
        let mut builder = Builder::default();
        let first = self.atom(&mut builder)?;
        self.chain(&mut builder, first)?;
        if let Some((label, open)) = builder.open.iter().next() {
            return Err(self.error_at(
                format!("ring bond {label} is never closed"),
                open.span.0,
                open.span.1,
            ));
        }
        let root = if use_map {
            builder
                .atoms
                .iter()
                .position(|a| a.map == Some(1))
                .unwrap_or(0)
        } else {
            0
        };
        Ok(Graph::new(builder.atoms, builder.bonds, root))
    }
}

#[cfg(test)]
mod tests {
    use super::parse;

    fn bonds(text: &str) -> Vec<(usize, usize)> {
        let (graph, _) = parse(text).expect("parses");
        let mut b: Vec<(usize, usize)> = graph
            .bonds
            .iter()
            .map(|b| (b.a.min(b.b), b.a.max(b.b)))
            .collect();
        b.sort_unstable();
        b
    }

    #[test]
    fn branches_attach_to_the_atom_before_them() {
        assert_eq!(bonds("CC(=O)O"), vec![(0, 1), (1, 2), (1, 3)]);
        assert_eq!(bonds("C(C)(C)C"), vec![(0, 1), (0, 2), (0, 3)]);
        assert_eq!(bonds("C(C(C)C)C"), vec![(0, 1), (0, 4), (1, 2), (1, 3)]);
    }

    #[test]
    fn ring_closures_make_bonds() {
        assert_eq!(bonds("C1CC1"), vec![(0, 1), (0, 2), (1, 2)]);
        assert_eq!(bonds("C%12CC%12"), vec![(0, 1), (0, 2), (1, 2)]);
        assert_eq!(bonds("c1ccc2ccccc2c1").len(), 11);
        // A digit can be reused once its ring is closed.
        assert_eq!(bonds("C1CC1C1CC1").len(), 7);
    }

    #[test]
    fn anchor_is_the_atom_mapped_one() {
        let (graph, _) = parse("[CX3](=O)[OX2H1:1]").expect("parses");
        assert_eq!(graph.root, 2);
        assert_eq!(graph.atoms[2].map, Some(1));
        // Placement covers every other atom once, parents placed first.
        let mut placed = vec![graph.root];
        for s in &graph.steps {
            assert!(placed.contains(&s.parent));
            assert!(!placed.contains(&s.atom));
            placed.push(s.atom);
        }
        assert_eq!(placed.len(), 3);
    }

    #[test]
    fn anchor_defaults_to_the_first_atom() {
        let (graph, _) = parse("[OH]c").expect("parses");
        assert_eq!(graph.root, 0);
        let (graph, _) = parse("C[N:2]").expect("parses");
        assert_eq!(graph.root, 0);
    }

    #[test]
    fn ring_closure_is_checked_at_the_later_atom() {
        let (graph, _) = parse("C1CCC1").expect("parses");
        let closures: usize = graph.steps.iter().map(|s| s.closures.len()).sum();
        assert_eq!(closures, 1);
        assert_eq!(graph.steps.len(), 3);
    }

    #[test]
    fn deep_nesting_is_refused_not_overflowed() {
        let text = format!("C{}", "(C".repeat(10_000));
        let err = parse(&text).expect_err("too deep");
        assert_eq!(err.message, "nesting deeper than 64 levels");
        let text = format!("{}C{}", "[$(".repeat(5_000), ")]".repeat(5_000));
        let err = parse(&text).expect_err("too deep");
        assert_eq!(err.message, "nesting deeper than 64 levels");
    }

    #[test]
    fn huge_patterns_are_refused() {
        let err = parse(&"C".repeat(600)).expect_err("too many atoms");
        assert_eq!(err.message, "pattern has more than 512 atoms");
        assert_eq!(err.start, 512);
    }
}
