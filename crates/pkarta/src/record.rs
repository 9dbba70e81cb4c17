use serde::Serialize;

/// Options of one estimate.
#[derive(Clone, Debug)]
pub struct Options {
    /// pH for species and charge.
    pub ph: f64,
}

impl Default for Options {
    fn default() -> Self {
        Options { ph: 7.4 }
    }
}

/// An error record.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ErrorReport {
    /// What is wrong and where (with a caret line under the bad part of the input).
    pub message: String,
}

/// A site in the output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct SiteReport {
    /// Atom index in the input SMILES (0-based, in the order atoms are written).
    pub atom: usize,
    /// `acid` or `base`.
    pub kind: model::Kind,
    /// pKa of the protonated form at this site.
    pub pka: f64,
    /// One standard deviation.
    pub uncertainty: f64,
    /// Equivalent sites share a group.
    pub group: usize,
    /// Class id.
    pub class: String,
    /// Class name.
    pub class_name: String,
    /// How the estimate was built.
    pub terms: Vec<model::Term>,
}

/// A species in the output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct SpeciesReport {
    /// The microspecies as SMILES.
    pub smiles: String,
    /// Its net charge.
    pub charge: i32,
    /// Its fraction at the pH.
    pub fraction: f64,
}

/// One output record of `predict`.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Record {
    /// The input line's SMILES text.
    pub input: String,
    /// The name or id given with it.
    pub id: Option<String>,
    /// The parent used, as SMILES.
    pub smiles: Option<String>,
    /// Sites inside the aqueous window.
    pub sites: Vec<SiteReport>,
    /// Sites found whose estimate falls outside the aqueous window (-2 to 16).
    pub sites_outside_window: Vec<SiteReport>,
    /// Macroscopic constants, ascending.
    pub macro_pka: Vec<f64>,
    /// The pH of `charge_at_ph` and `species`.
    pub ph: f64,
    /// Mean net charge at the pH.
    pub charge_at_ph: Option<f64>,
    /// Species at the pH, most abundant first.
    pub species: Vec<SpeciesReport>,
    /// Isoelectric point, where there is one.
    pub isoelectric_point: Option<f64>,
    /// Warnings.
    pub warnings: Vec<String>,
    /// The error, for a record that failed.
    pub error: Option<ErrorReport>,
}

/// Estimates one input. Never panics on input; a failure is a record with `error` set.
pub fn estimate(input: &str, id: Option<&str>, options: &Options) -> Record {
    let _ = (input, id, options);
    todo!("lead")
}

/// An atom in `inspect` output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct InspectAtom {
    /// Element symbol.
    pub element: String,
    /// Formal charge.
    pub charge: i8,
    /// Attached implicit and bracket hydrogens.
    pub hydrogens: u8,
    /// Aromatic as perceived.
    pub aromatic: bool,
    /// In a ring.
    pub in_ring: bool,
}

/// A bond in `inspect` output.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct InspectBond {
    /// First atom.
    pub a: usize,
    /// Second atom.
    pub b: usize,
    /// Kekulé order.
    pub order: u8,
    /// Aromatic as perceived.
    pub aromatic: bool,
}

/// One output record of `inspect`.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct InspectRecord {
    /// The input text.
    pub input: String,
    /// The name given with it.
    pub id: Option<String>,
    /// Atoms, in input order.
    pub atoms: Vec<InspectAtom>,
    /// Bonds.
    pub bonds: Vec<InspectBond>,
    /// Components as atom lists.
    pub components: Vec<Vec<usize>>,
    /// The error, for a record that failed.
    pub error: Option<ErrorReport>,
}

/// Reads and perceives one input for `inspect`.
pub fn inspect(input: &str, id: Option<&str>) -> InspectRecord {
    match mol::parse(input) {
        Ok(m) => InspectRecord {
            input: input.to_string(),
            id: id.map(str::to_string),
            atoms: m
                .atoms()
                .iter()
                .map(|a| InspectAtom {
                    element: mol::element_symbol(a.element).to_string(),
                    charge: a.charge,
                    hydrogens: a.hydrogens,
                    aromatic: a.aromatic,
                    in_ring: a.ring_count > 0,
                })
                .collect(),
            bonds: m
                .bonds()
                .iter()
                .map(|b| InspectBond { a: b.a, b: b.b, order: b.order, aromatic: b.aromatic })
                .collect(),
            components: m.components().to_vec(),
            error: None,
        },
        Err(e) => InspectRecord {
            input: input.to_string(),
            id: id.map(str::to_string),
            atoms: Vec::new(),
            bonds: Vec::new(),
            components: Vec::new(),
            error: Some(ErrorReport { message: e.to_string() }),
        },
    }
}

/// A site as the pattern found it, before scoring (`pkarta debug sites`).
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct DebugSite {
    /// Atom index in the input.
    pub atom: usize,
    /// Class id.
    pub class: String,
    /// Class name.
    pub class_name: String,
    /// Acid or base.
    pub kind: model::Kind,
    /// The pattern text.
    pub pattern: String,
    /// Input atom indices matched, per pattern atom.
    pub matched: Vec<usize>,
    /// Symmetry group.
    pub group: usize,
}

/// Finds sites without scoring them.
pub fn debug_sites(input: &str) -> Result<Vec<DebugSite>, ErrorReport> {
    let _ = input;
    todo!("lead")
}

/// One point of a speciation curve.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct CurvePoint {
    /// pH.
    pub ph: f64,
    /// Mean net charge.
    pub charge: f64,
    /// Fraction of each species of `Curve::species`, same order.
    pub fractions: Vec<f64>,
}

/// Species fractions and charge over a pH range.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Curve {
    /// The parent used, as SMILES.
    pub smiles: String,
    /// The species that reach a noticeable fraction anywhere on the range.
    pub species: Vec<SpeciesReport>,
    /// The points, ascending pH.
    pub points: Vec<CurvePoint>,
    /// The pH of interest, marked on plots.
    pub ph: f64,
}

/// Computes a speciation curve from `from` to `to` in steps of `step`.
pub fn curve(input: &str, options: &Options, from: f64, to: f64, step: f64) -> Result<Curve, ErrorReport> {
    let _ = (input, options, from, to, step);
    todo!("lead")
}

/// Renders a curve as an SVG plot of species fractions against pH.
pub fn plot_svg(curve: &Curve) -> String {
    let _ = curve;
    todo!("lead")
}
