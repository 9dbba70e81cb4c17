//! Linear free-energy scoring (lead engineer).
use mol::Molecule;
use serde::Serialize;

use crate::{FoundSite, Kind, Library};

/// One term of an estimate. The terms of a site add up to its pKa exactly.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Term {
    /// What the term is, e.g. `parent: aliphatic carboxylic acid`, `4-NO2`.
    pub label: String,
    /// Its contribution to the pKa.
    pub contribution: f64,
    /// Where its constants come from.
    pub source: String,
    /// The substituent constant used, where one applies.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub sigma: Option<f64>,
    /// The reaction constant used, where one applies.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub rho: Option<f64>,
    /// `ortho`, `meta`, `para`, or the number of bonds along a chain.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub position: Option<String>,
}

/// A scored site.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Site {
    /// Atom index in the scored molecule.
    pub atom: usize,
    /// Acid or base.
    pub kind: Kind,
    /// pKa of the protonated form at this site.
    pub pka: f64,
    /// One standard deviation, pKa units.
    pub uncertainty: f64,
    /// Symmetry group (equivalent sites share it).
    pub group: usize,
    /// Class id.
    pub class: String,
    /// Class name.
    pub class_name: String,
    /// Inside the aqueous window.
    pub in_window: bool,
    /// How the estimate was built.
    pub terms: Vec<Term>,
    /// Warnings about this site (substituents without a tabulated value...).
    pub warnings: Vec<String>,
}

/// Scores found sites.
pub fn score_sites(library: &Library, molecule: &Molecule, found: &[FoundSite]) -> Vec<Site> {
    let _ = (library, molecule, found);
    todo!("lead")
}

/// Pairwise interaction energies between sites in pK units, `w[i][j]` for both sites
/// charged (positive: like charges repel). Symmetric, zero diagonal.
pub fn interactions(library: &Library, molecule: &Molecule, sites: &[Site]) -> Vec<Vec<f64>> {
    let _ = (library, molecule, sites);
    todo!("lead")
}
