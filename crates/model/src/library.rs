//! The fragment library: site classes and substituent constants, read from TOML.
//!
//! INTERFACE NOTE: the serde structs below are the schema of `fragments/`. The sites helper
//! owns loading (`Library::builtin`, `Library::from_toml`), validation and the site-class
//! data; the substituents helper owns `SubstituentEntry` data. Fields may be added, not
//! renamed.

use serde::{Deserialize, Serialize};

/// Which way a site's proton goes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, Hash)]
#[serde(rename_all = "lowercase")]
pub enum Kind {
    /// The site loses a proton; pKa of the site as written.
    Acid,
    /// The site gains a proton; pKa of its conjugate acid.
    Base,
}

/// The substituent-constant scale a class is scored on.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Scale {
    /// Hammett sigma-meta / sigma-para.
    Hammett,
    /// sigma-minus at para (through-resonance with an electron-rich site: phenols, anilines).
    HammettMinus,
    /// sigma-plus at para (through-resonance with an electron-poor site).
    HammettPlus,
    /// Taft sigma* along an aliphatic chain, attenuated per intervening atom.
    Taft,
    /// Not scored: the parent value alone.
    None,
}

/// One ionizable-site class (`[[class]]` in `fragments/sites/*.toml`).
#[derive(Clone, Debug, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SiteClass {
    /// Our own id, e.g. `acid.carboxylic.aliphatic`.
    pub id: String,
    /// Plain name.
    pub name: String,
    /// Acid or base.
    pub kind: Kind,
    /// Pattern (SMARTS subset); atom map `:1` marks the atom that gains or loses the proton.
    pub pattern: String,
    /// Precedence: where classes claim the same atom, the highest priority wins.
    pub priority: i32,
    /// pKa of the parent compound of the class.
    pub parent_pka: f64,
    /// Where `parent_pka` comes from.
    pub parent_source: String,
    /// Scale used for substituents.
    pub scale: Scale,
    /// Reaction constant: pKa = parent - rho * sum(sigma).
    #[serde(default)]
    pub rho: f64,
    /// Where `rho` comes from.
    #[serde(default)]
    pub rho_source: String,
    /// Atom-map number of the atom whose substituents are scored: for aromatic scales the
    /// ring atom positions are counted from, for Taft the atom carrying the variable groups.
    /// Absent: the site atom (map 1).
    #[serde(default)]
    pub anchor: Option<u16>,
    /// Ortho correction added for each ortho substituent on aromatic scales (pKa units).
    #[serde(default)]
    pub ortho_term: f64,
    /// Statistical factor (number of equivalent protons or positions the class counts);
    /// contributes -log10(factor) for acids and +log10(factor) for bases when not 1.
    #[serde(default = "one")]
    pub statistical_factor: f64,
    /// Residual error (one standard deviation, pKa units) of the class before calibration.
    pub uncertainty: f64,
    /// Molecules the class must match (at least one).
    pub examples: Vec<String>,
    /// Molecules the class must not match (at least one).
    pub near_misses: Vec<String>,
    /// Notes for chemists.
    #[serde(default)]
    pub notes: String,
}

fn one() -> f64 {
    1.0
}

/// One substituent (`[[substituent]]` in `fragments/substituents/*.toml`).
#[derive(Clone, Debug, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SubstituentEntry {
    /// Our own id, e.g. `nitro`.
    pub id: String,
    /// Plain name or formula, e.g. `NO2`.
    pub name: String,
    /// Pattern matched with its `:1` atom on the atom bonded to the ring or chain.
    pub pattern: String,
    /// Precedence among entries matching the same atom (highest wins).
    #[serde(default)]
    pub priority: i32,
    /// Hammett sigma-meta.
    pub sigma_m: Option<f64>,
    /// Hammett sigma-para.
    pub sigma_p: Option<f64>,
    /// sigma-minus (para).
    pub sigma_p_minus: Option<f64>,
    /// sigma-plus (para).
    pub sigma_p_plus: Option<f64>,
    /// Taft sigma* of the group bonded directly to the reaction centre, where tabulated.
    pub sigma_star: Option<f64>,
    /// Taft sigma* of X-CH2 (the group one methylene away), where tabulated.
    pub sigma_star_ch2: Option<f64>,
    /// For Taft scoring: a plain alkyl carbon (methyl, ethyl, ...) that the chain walk
    /// passes through, scoring the groups beyond it, instead of using this entry whole.
    #[serde(default)]
    pub walk: bool,
    /// Where the values come from.
    pub source: String,
    /// The values were written from memory of the cited source.
    #[serde(default)]
    pub from_memory: bool,
    /// Notes.
    #[serde(default)]
    pub notes: String,
}

/// Fitted values for one class (`fragments/calibration.toml`, written by the calibration
/// program).
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct Calibration {
    /// Class id.
    pub class: String,
    /// Fitted parent pKa.
    pub parent_pka: f64,
    /// Fitted rho.
    pub rho: f64,
    /// Number of measurements fitted.
    pub points: usize,
    /// Residual error of the fit (RMS, pKa units).
    pub rmse: f64,
    /// Cross-validated mean absolute error.
    pub cv_mae: f64,
    /// Data set and date.
    pub source: String,
}

/// The loaded library.
#[derive(Clone, Debug)]
pub struct Library {
    /// Site classes, in file order.
    pub classes: Vec<SiteClass>,
    /// Substituent entries.
    pub substituents: Vec<SubstituentEntry>,
    /// Calibrated values by class, where fitted.
    pub calibration: Vec<Calibration>,
}

/// A problem in a library file.
#[derive(Debug)]
#[non_exhaustive]
pub struct LibraryError {
    /// What is wrong, naming the file and entry.
    pub message: String,
}

impl std::fmt::Display for LibraryError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}
impl std::error::Error for LibraryError {}
