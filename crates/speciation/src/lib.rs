//! Protonation microstates over a molecule's sites: macroscopic constants, species
//! fractions, net charge and isoelectric point.
//!
//! This crate takes numbers, not molecules: a list of sites (acid or base, each with its
//! microscopic pKa), a matrix of pairwise interactions between charged forms, and the formal
//! charge of the all-neutral reference form.
//!
//! # Model
//!
//! Each site `i` is either neutral (`x_i = 0`) or charged (`x_i = 1`). The charged form of an
//! acid is its deprotonated form (charge -1 relative to neutral); the charged form of a base
//! is its protonated form (+1). A microstate `x` has the log10 relative weight
//!
//! ```text
//! log10 W(x, pH) =  sum over charged acids  (pH - pKa_i)
//!                 + sum over charged bases  (pKa_i - pH)
//!                 - sum over pairs i < j both charged  w[i][j]
//! ```
//!
//! where `pKa_i` is the microscopic constant of site `i` with every other site neutral and
//! `w[i][j]` (pK units, symmetric, zero diagonal) is the free energy of putting both charged
//! forms side by side, positive when it destabilizes (two like charges) and negative when it
//! stabilizes (an ammonium beside a carboxylate). So a diacid's second deprotonation is pushed
//! up by `w`, and an amino acid with `w < 0` favours its zwitterion. The net charge of a
//! microstate is `base_charge + (charged bases) - (charged acids)`.
//!
//! Symmetry-equivalent sites are given as separate sites with the same constants; the
//! statistical factors of the macroscopic constants then come out of the enumeration (two
//! identical, non-interacting acid sites with micro pKa `p` give macro constants
//! `p - log10 2` and `p + log10 2`).
//!
//! # Reference
//!
//! This is the site-binding (microstate, Ising-like) treatment of coupled protonation
//! equilibria with pairwise interactions truncated at second order of the cluster expansion,
//! as used for polyelectrolytes and polyprotic molecules by M. Borkovec and G. J. M. Koper
//! (e.g. "A cluster expansion method for the complete resolution of microscopic ionization
//! equilibria from NMR titrations", Anal. Chem. 2000, 72, 3272; from memory) and by
//! G. M. Ullmann, "Relations between protonation constants and titration curves in polyprotic
//! acids: a critical view", J. Phys. Chem. B 2003, 107, 1263 (from memory). Macroscopic
//! (stepwise) constants come from the binding polynomial: with `G_p` the sum of the pH-free
//! weights of all microstates that have lost `p` protons relative to the fully protonated
//! form, `pKa_p = log10(G_{p-1} / G_p)`.
//!
//! # Exact and approximate evaluation
//!
//! Sites are first grouped into connected groups of non-zero couplings; groups are
//! independent, so splitting there is exact. Each group of up to [`MAX_CLUSTER_SITES`] sites
//! is enumerated exactly (Gray-code order, one site flips per step, log-sum-exp per proton
//! count). A group larger than that is split by a greedy capped single linkage: couplings are
//! taken strongest first and join two pieces only while the union stays within the limit, so
//! the couplings left between pieces are the weakest ones. Those couplings are then ignored
//! (pieces treated as independent), the proton-count polynomials of the pieces are
//! convolved, and [`Speciation::method`] says so, naming the number and the largest size of
//! the ignored couplings. Each ignored coupling `w` can move a site's effective constant by
//! at most `|w|` pK units, and a cut through strong couplings costs accordingly: on an
//! invented 20-site chain of alternating acids and bases (`examples/approx_error.rs`), a
//! 16 + 4 split that cuts one 0.8 pK nearest-neighbour coupling moved the charge curve by up
//! to 0.50 (couplings halving per step) or 0.82 (couplings falling as 1/distance) and the
//! macroscopic constants by up to 0.21 or 0.37, against the exact answer. The approximation
//! is good where the molecule has weakly coupled parts, not for one long strongly coupled
//! chain.
//!
//! # Species reported
//!
//! [`Speciation::species`] lists the microspecies with fraction at least [`MIN_FRACTION`],
//! most abundant first, at most [`MAX_SPECIES`] of them, and always at least the most
//! abundant one. Each fraction is its share of the whole population (all microstates), so the
//! listed fractions sum to at most 1 and [`Speciation::omitted_fraction`] is the remainder,
//! carried by the microstates not listed. [`Speciation::charge_at_ph`] is the mean over all
//! microstates, not only the listed ones.
//!
//! # Curves and plots
//!
//! [`curve`] (or [`Microstates::curve`] on a prepared system) follows a fixed list of
//! microspecies over a pH grid: the mean charge and each one's fraction per point, plus the
//! fraction left to all others. [`Microstates::curve_for`] takes the list from the caller.
//! [`svg_plot`] draws it: species fractions against pH with a legend (charge and a label the
//! caller gives, e.g. the species' SMILES), the pH of interest as a dashed line, and the net
//! charge in a panel below. The SVG is written by string building, with no dependency.
//!
//! # Untrusted input
//!
//! [`Microstates::new`] and [`try_speciate`] check the system (finite numbers, a square,
//! symmetric matrix with a zero diagonal, at most [`MAX_SITES`] sites) and return a
//! [`SpeciationError`] naming the bad entry. [`speciate`] never panics: on an invalid system
//! it returns an empty result whose `method` carries the error text.
//!
//! # Example
//!
//! ```
//! use speciation::{speciate, Kind, SiteInput, System};
//!
//! // Two identical, non-interacting carboxylic acid sites.
//! let system = System {
//!     sites: vec![
//!         SiteInput { kind: Kind::Acid, pka: 4.5 },
//!         SiteInput { kind: Kind::Acid, pka: 4.5 },
//!     ],
//!     interaction: vec![],
//!     base_charge: 0,
//! };
//! let s = speciation::try_speciate(&system, 4.5)?;
//! assert!((s.macro_pka[0] - (4.5 - 2f64.log10())).abs() < 1e-9);
//! assert!((s.charge_at_ph + 1.0).abs() < 1e-9);
//! assert_eq!(s.method, "exact");
//! # let _ = speciate(&system, 7.0);
//! Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Performance
//!
//! Exact groups cost `2^n * n` operations once per system; every pH after that (curves, the
//! isoelectric point search) costs only a pass over the proton-count polynomial and a few
//! hundred stored candidate microstates. See `benches/speciate.rs`.
#![deny(missing_docs)]

mod cluster;
mod curve;
mod enumerate;
mod error;
mod logsum;
mod microstates;
mod svg;

use serde::Serialize;

pub use curve::{curve, grid, Curve, CurvePoint, CurveSpecies, MAX_POINTS};
pub use error::SpeciationError;
pub use microstates::Microstates;
pub use svg::{svg_plot, PlotOptions};

/// Largest group of coupled sites enumerated exactly; larger groups are split.
pub const MAX_CLUSTER_SITES: usize = 16;
/// Largest number of sites accepted.
pub const MAX_SITES: usize = 1024;
/// Smallest fraction for a microspecies to be listed (the most abundant is always listed).
pub const MIN_FRACTION: f64 = 1e-4;
/// Most microspecies listed.
pub const MAX_SPECIES: usize = 16;
/// Largest absolute pKa, pH or interaction accepted, in pK units. Anything beyond is a unit
/// or transcription mistake, and keeping values bounded keeps the log arithmetic exact
/// enough.
pub const MAX_MAGNITUDE: f64 = 1000.0;
/// The pH range searched for the isoelectric point.
pub const PI_RANGE: (f64, f64) = (-2.0, 16.0);

/// Which way a site's proton goes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Kind {
    /// Charged form is the deprotonated one (charge -1 relative to the neutral form).
    Acid,
    /// Charged form is the protonated one (charge +1 relative to the neutral form).
    Base,
}

/// One site: its kind and its microscopic pKa with every other site in its neutral form.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct SiteInput {
    /// Acid or base.
    pub kind: Kind,
    /// Microscopic pKa (of the protonated form).
    pub pka: f64,
}

/// The system to speciate.
#[derive(Clone, Debug, PartialEq)]
pub struct System {
    /// The sites.
    pub sites: Vec<SiteInput>,
    /// `w[i][j]`: interaction in pK units when sites i and j are both charged, positive when
    /// destabilizing (like charges), negative when stabilizing. Symmetric, zero diagonal.
    /// The log10 weight of a microstate loses `w[i][j]` for each pair of charged sites (see
    /// the crate docs). An empty matrix means no interactions.
    pub interaction: Vec<Vec<f64>>,
    /// Formal charge of the reference (all sites neutral) form, e.g. +1 for a quaternary
    /// ammonium.
    pub base_charge: i32,
}

/// One microspecies.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Microspecies {
    /// Per site: whether it is in its charged form.
    pub charged: Vec<bool>,
    /// Net charge.
    pub charge: i32,
    /// Fraction at the pH asked.
    pub fraction: f64,
}

/// The result at one pH.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Speciation {
    /// Macroscopic constants, ascending.
    pub macro_pka: Vec<f64>,
    /// The pH.
    pub ph: f64,
    /// Mean net charge at the pH.
    pub charge_at_ph: f64,
    /// Microspecies, most abundant first.
    pub species: Vec<Microspecies>,
    /// Isoelectric point, where the molecule has one.
    pub isoelectric_point: Option<f64>,
    /// How it was computed (`exact`, or the approximation used).
    pub method: String,
}

impl Speciation {
    /// Fraction of the population in microspecies not listed in `species`.
    pub fn omitted_fraction(&self) -> f64 {
        let listed: f64 = self.species.iter().map(|s| s.fraction).sum();
        (1.0 - listed).max(0.0)
    }
}

/// Speciates the system at `ph`.
///
/// Never panics. On an invalid system (see [`try_speciate`]) it returns a result with no
/// constants and no species, a NaN charge, and `method` = `invalid input: <reason>`.
pub fn speciate(system: &System, ph: f64) -> Speciation {
    try_speciate(system, ph).unwrap_or_else(|e| Speciation {
        macro_pka: Vec::new(),
        ph,
        charge_at_ph: f64::NAN,
        species: Vec::new(),
        isoelectric_point: None,
        method: format!("invalid input: {e}"),
    })
}

/// Speciates the system at `ph`, or says what is wrong with the input.
pub fn try_speciate(system: &System, ph: f64) -> Result<Speciation, SpeciationError> {
    Microstates::new(system)?.into_speciation(ph)
}
