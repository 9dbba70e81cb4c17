//! Protonation microstates over a molecule's sites: macroscopic constants, species
//! fractions, net charge and isoelectric point.
//!
//! INTERFACE NOTE (remove when implemented): the speciation helper writes the bodies and may
//! add items; names and signatures below stay.
#![deny(missing_docs)]

use serde::Serialize;

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
    /// `w[i][j]`: interaction in pK units when sites i and j are both charged (positive for
    /// like charges). Symmetric, zero diagonal. log10 weight of a microstate is
    /// sum over charged acids (pH - pKa) + sum over charged bases (pKa - pH) - sum over charged
    /// pairs w[i][j] * sign(i) * sign(j) ... see the crate docs the helper writes.
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

/// Speciates the system at `ph`.
pub fn speciate(system: &System, ph: f64) -> Speciation {
    let _ = (system, ph);
    todo!("speciation helper")
}
