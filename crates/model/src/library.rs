//! The fragment library: site classes and substituent constants, read from TOML.
//!
//! # Overview
//!
//! The serde structs below are the schema of `fragments/`: `[[class]]` tables in
//! `fragments/sites/*.toml` ([`SiteClass`]), `[[substituent]]` tables in
//! `fragments/substituents/*.toml` ([`SubstituentEntry`]) and `[[calibration]]` tables in
//! `fragments/calibration.toml` ([`Calibration`]). [`Library::builtin`] is the library
//! compiled into the crate; [`Library::from_dir`], [`Library::from_toml_files`] and
//! [`Library::from_sources`] load a user library with the same checks.
//!
//! # Checks at load
//!
//! Every file parses against the schema (unknown fields refused), class ids are unique,
//! every class pattern compiles and marks its site with atom map `:1` (and its `anchor`
//! map, where given), every value is finite and cited, every class has examples and
//! near-misses, and every calibration entry names a class of the library. An error names
//! the file and the entry.
//!
//! # Compiled patterns
//!
//! Patterns are compiled once per distinct text and kept for the life of the process
//! ([`Library::pattern`]); the precedence index that site finding uses (classes in
//! priority order, per anchor element) is built once for the built-in library and cached
//! per thread for others.

use std::cell::RefCell;
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::rc::Rc;
use std::sync::Arc;
use std::sync::RwLock;

use once_cell::sync::Lazy;
use pattern::Pattern;
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
    /// The reaction constant is fixed by definition (benzoic acids: rho = 1): calibration
    /// fits the parent value only.
    #[serde(default)]
    pub fixed_rho: bool,
    /// Whether the calibration program may refit this class. `false` where the measured
    /// constants that the calibration data attribute to the class mostly belong to another
    /// site (the note says which), so a fit would learn the wrong thing.
    #[serde(default = "yes")]
    pub calibrate: bool,
    /// Ortho correction added for each ortho substituent on aromatic scales (pKa units).
    #[serde(default)]
    pub ortho_term: f64,
    /// Correction per pyridine-type N in a ring fused to the site's ring (aromatic scales;
    /// a class correction, set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub fused_aza_term: f64,
    /// A pyrrole-type ring N (N-H, N-R) meta to the site on the site's ring is part of the
    /// parent value, whose compounds have one there (the ring NH of a 4(3H)-pyrimidinone),
    /// and is not scored (aromatic scales; the group on it still is).
    #[serde(default)]
    pub ring_nh_meta_in_parent: bool,
    /// Correction per exocyclic C=O or C=S on the site's ring (aromatic scales; a class
    /// correction, set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub ring_oxo_term: f64,
    /// Coefficient on the summed sigma_I of the ortho substituents (aromatic scales; the
    /// field effect of a group beside the site, which sigma-para does not carry; set by
    /// calibration, 0 when not calibrated).
    #[serde(default)]
    pub ortho_field_term: f64,
    /// Correction per ortho substituent that can take an intramolecular hydrogen bond
    /// with the site (C=O, NO2, alkoxy O; aromatic scales; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub ortho_hbond_term: f64,
    /// Coefficient on the summed resonance constant sigma_R = sigma_p - sigma_I of the
    /// ortho substituents (aromatic scales; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub ortho_resonance_term: f64,
    /// Correction per pair of pyridine-type N in the site's ring besides the site (aromatic
    /// scales: aza terms do not add fully in triazines; set by calibration, 0 when not
    /// calibrated).
    #[serde(default)]
    pub aza_pair_term: f64,
    /// Coefficient on the summed Taft sigma* of plain alkyl branches along the chain (Taft
    /// scale; corrects the inductive count of alkyl groups, which solvation largely
    /// cancels in water; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub alkyl_term: f64,
    /// Correction per plain alkyl group ortho to the site (aromatic scales: hindered
    /// solvation of the charged form; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub ortho_alkyl_term: f64,
    /// Coefficient on the summed sigma_m of the substituents on aromatic rings fused to the
    /// site's ring (aromatic scales; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub fused_substituent_term: f64,
    /// Coefficient on the summed sigma_p of the substituents on fused aromatic rings in
    /// conjugation with the site (aromatic scales; set by calibration, 0 when not
    /// calibrated).
    #[serde(default)]
    pub fused_conjugated_term: f64,
    /// Correction per carbon on the alpha carbons of the site's own N-alkyl groups
    /// (aromatic scales with an exocyclic site: anilines; set by calibration, 0 when not
    /// calibrated).
    #[serde(default)]
    pub n_alkyl_term: f64,
    /// Coefficient on the summed sigma* of the site's own N-substituents, walked as the
    /// amine classes walk theirs (aromatic scales with an exocyclic N site: an N-allyl or
    /// N-(2-hydroxyethyl) aniline; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub n_substituent_term: f64,
    /// Correction per group flanking a dialkylamino donor on the ring of a ring-member base
    /// site (steric inhibition of resonance; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub twisted_donor_term: f64,
    /// Correction per alkyl group on the site's own N, for the classes that set
    /// `n_alkyl_counted` (set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub n_alkyl_group_term: f64,
    /// Correction per tertiary alkyl on the site's own exocyclic N (N-tert-butylaniline:
    /// steric inhibition of resonance; set by calibration, 0 when not calibrated).
    #[serde(default)]
    pub n_tert_alkyl_term: f64,
    /// Correction per ortho Cl, Br or I, atoms far bigger than F or H (set by calibration,
    /// 0 when not calibrated).
    #[serde(default)]
    pub ortho_halogen_term: f64,
    /// The class matches its N both bare and alkylated (a 2-iminopyrimidine's =NH and =NMe),
    /// so the alkyls on the site's N are counted for `n_alkyl_group_term`; the amine and
    /// aniline classes, split by N-substitution, leave it unset.
    #[serde(default)]
    pub n_alkyl_counted: bool,
    /// For an exocyclic site scored from a ring atom that is not the one it hangs on (a
    /// 2-iminoazine scored from its ring N): the ring positions para to the site's own ring
    /// atom, meta to the anchor, take sigma_p. The cation is an amidinium, whose charge the
    /// central carbon shares, and a group para to that carbon conjugates with it.
    #[serde(default)]
    pub para_to_site_carbon: bool,
    /// For an O-H site whose anchor carbon sits beside a ring carbon bearing the C=O that
    /// trades places with it in the other tautomer (a 2-hydroxytropone): the site is scored
    /// in both drawings and the two are joined as one pair of tautomers sharing one anion,
    /// so that the estimate does not depend on which tautomer the SMILES is written as.
    #[serde(default)]
    pub tautomer_pair: bool,
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
    /// For classes with several equivalent acidic OH on one central atom (phosphoric,
    /// phosphonic, arsonic acids): the interaction, in pK units, between two deprotonated
    /// sites of the class on the same central atom. The class parent is the first
    /// (microscopic) constant; the later constants come from this interaction in the site
    /// coupling. Absent: the coupling's general rule applies.
    #[serde(default)]
    pub geminal_interaction: Option<f64>,
    /// Where `geminal_interaction` comes from.
    #[serde(default)]
    pub geminal_source: String,
    /// For carboxylic acid classes whose parent is a measured first constant that already
    /// holds the monoanion's intramolecular hydrogen bond (maleic-type, dialkylmalonic
    /// acids): the site's estimate takes no hydrogen-bond term of its own, while the pair's
    /// both-charged energy still takes it back (`fragments/interactions.toml`).
    #[serde(default)]
    pub monoanion_hbond_in_parent: bool,
    /// For such a class: the bond's strength in pK units where the class's own pair of
    /// constants gives it (the dianion takes back twice this); absent, the general value of
    /// `fragments/interactions.toml`.
    #[serde(default)]
    pub monoanion_hbond: Option<f64>,
    /// Where `monoanion_hbond` comes from.
    #[serde(default)]
    pub monoanion_hbond_source: String,
}

fn one() -> f64 {
    1.0
}

fn yes() -> bool {
    true
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
    /// sigma_n (para) of a donor: its constant where it cannot conjugate with the reaction
    /// centre (van Bekkum, Verkade and Wepster); used for acid sites scored on sigma-minus,
    /// whose anion is itself a donor.
    #[serde(default)]
    pub sigma_p_n: Option<f64>,
    /// Taft sigma* of the group bonded directly to the reaction centre, where tabulated.
    pub sigma_star: Option<f64>,
    /// Taft sigma* of X-CH2 (the group one methylene away), where tabulated.
    pub sigma_star_ch2: Option<f64>,
    /// Charton's inductive constant sigma_I, where tabulated (otherwise derived from
    /// sigma_m and sigma_p by the scorer).
    #[serde(default)]
    pub sigma_i: Option<f64>,
    /// The group's inductive constant on the ring carbon beside a pyridine-type ring N base
    /// site, where it differs from sigma_I (derived from the pKa of the 2-substituted
    /// pyridine); the scorer uses sigma_I where it is absent.
    #[serde(default)]
    pub sigma_i_ring_n: Option<f64>,
    /// The group's para constant at a pyridine-type ring N base site, where it differs from
    /// sigma_p (derived from the pKa of the 4-substituted pyridine); the scorer uses sigma_p
    /// where it is absent.
    #[serde(default)]
    pub sigma_p_ring_n: Option<f64>,
    /// The group's first atom carries a C=O or N-O that takes an intramolecular hydrogen
    /// bond with a site ortho to it (salicylaldehyde, 2-nitrophenol type).
    #[serde(default)]
    pub hbond_acceptor: bool,
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
    /// Fitted ortho term, for classes scored on aromatic scales.
    #[serde(default)]
    pub ortho_term: Option<f64>,
    /// Fitted correction per pyridine-type N in a fused ring.
    #[serde(default)]
    pub fused_aza_term: Option<f64>,
    /// Fitted correction per exocyclic C=O / C=S on the site's ring.
    #[serde(default)]
    pub ring_oxo_term: Option<f64>,
    /// Fitted coefficient on the summed sigma_I of the ortho substituents.
    #[serde(default)]
    pub ortho_field_term: Option<f64>,
    /// Fitted correction per ortho hydrogen-bond acceptor.
    #[serde(default)]
    pub ortho_hbond_term: Option<f64>,
    /// Fitted coefficient on the summed sigma_R of the ortho substituents.
    #[serde(default)]
    pub ortho_resonance_term: Option<f64>,
    /// Fitted correction per pair of ring aza N.
    #[serde(default)]
    pub aza_pair_term: Option<f64>,
    /// Fitted coefficient on the summed sigma* of alkyl branches.
    #[serde(default)]
    pub alkyl_term: Option<f64>,
    /// Fitted correction per ortho alkyl group.
    #[serde(default)]
    pub ortho_alkyl_term: Option<f64>,
    /// Fitted coefficient on the fused-ring substituents' summed sigma_m.
    #[serde(default)]
    pub fused_substituent_term: Option<f64>,
    /// Fitted coefficient on the conjugated fused-ring substituents' summed sigma_p.
    #[serde(default)]
    pub fused_conjugated_term: Option<f64>,
    /// Fitted correction per carbon on the site's N-alkyl alpha carbons.
    #[serde(default)]
    pub n_alkyl_term: Option<f64>,
    /// Fitted coefficient on the summed sigma* of the site's N-substituents.
    #[serde(default)]
    pub n_substituent_term: Option<f64>,
    /// Fitted correction per group flanking a ring dialkylamino donor.
    #[serde(default)]
    pub twisted_donor_term: Option<f64>,
    /// Fitted correction per alkyl group on the site's N.
    #[serde(default)]
    pub n_alkyl_group_term: Option<f64>,
    /// Fitted correction per tertiary alkyl on the site's N.
    #[serde(default)]
    pub n_tert_alkyl_term: Option<f64>,
    /// Fitted correction per ortho Cl, Br or I.
    #[serde(default)]
    pub ortho_halogen_term: Option<f64>,
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

impl LibraryError {
    fn new(message: impl Into<String>) -> LibraryError {
        LibraryError {
            message: message.into(),
        }
    }
}

/// The site-class files compiled into the crate, as `(path, text)`, in load order (file
/// name order). Classes of equal priority resolve to the one loaded first.
const BUILTIN_SITE_FILES: &[(&str, &str)] = &[
    (
        "fragments/sites/amines.toml",
        include_str!("../../../fragments/sites/amines.toml"),
    ),
    (
        "fragments/sites/aromatic_bases.toml",
        include_str!("../../../fragments/sites/aromatic_bases.toml"),
    ),
    (
        "fragments/sites/carbon_acids.toml",
        include_str!("../../../fragments/sites/carbon_acids.toml"),
    ),
    (
        "fragments/sites/carboxylic.toml",
        include_str!("../../../fragments/sites/carboxylic.toml"),
    ),
    (
        "fragments/sites/nh_acids.toml",
        include_str!("../../../fragments/sites/nh_acids.toml"),
    ),
    (
        "fragments/sites/other_bases.toml",
        include_str!("../../../fragments/sites/other_bases.toml"),
    ),
    (
        "fragments/sites/oxygen_acids.toml",
        include_str!("../../../fragments/sites/oxygen_acids.toml"),
    ),
    (
        "fragments/sites/sulfur_phosphorus.toml",
        include_str!("../../../fragments/sites/sulfur_phosphorus.toml"),
    ),
    (
        "fragments/sites/weak_sites.toml",
        include_str!("../../../fragments/sites/weak_sites.toml"),
    ),
];

/// The substituent files compiled into the crate, as `(path, text)`.
const BUILTIN_SUBSTITUENT_FILES: &[(&str, &str)] = &[(
    "fragments/substituents/groups.toml",
    include_str!("../../../fragments/substituents/groups.toml"),
)];

/// The calibration file compiled into the crate, as `(path, text)`.
const BUILTIN_CALIBRATION_FILE: (&str, &str) = (
    "fragments/calibration.toml",
    include_str!("../../../fragments/calibration.toml"),
);

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct SiteFile {
    #[serde(default)]
    class: Vec<SiteClass>,
}

#[derive(Deserialize)]
struct SubstituentFile {
    #[serde(default)]
    substituent: Vec<SubstituentEntry>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct CalibrationFile {
    #[serde(default)]
    calibration: Vec<Calibration>,
}

static BUILTIN: Lazy<Library> = Lazy::new(|| {
    // The built-in files are part of the crate and tested; failing here is a packaging
    // bug, not bad input.
    match Library::from_sources(
        BUILTIN_SITE_FILES,
        BUILTIN_SUBSTITUENT_FILES,
        &[BUILTIN_CALIBRATION_FILE],
    ) {
        Ok(library) => library,
        Err(e) => panic!("the built-in fragment library is invalid: {e}"),
    }
});

static BUILTIN_INDEX: Lazy<Arc<SiteIndex>> = Lazy::new(|| Arc::new(SiteIndex::build(&BUILTIN)));

impl Library {
    /// The library compiled into the crate (`fragments/` at build time), loaded and checked
    /// on first use.
    pub fn builtin() -> &'static Library {
        &BUILTIN
    }

    /// The site-class files compiled into the crate, as `(path, text)`, in load order (file
    /// name order). Classes of equal priority resolve to the one loaded first.
    pub fn builtin_site_files() -> &'static [(&'static str, &'static str)] {
        BUILTIN_SITE_FILES
    }

    /// A library from classes, substituents and calibrations already in memory, with the
    /// same checks as the file loaders.
    pub fn new(
        classes: Vec<SiteClass>,
        substituents: Vec<SubstituentEntry>,
        calibration: Vec<Calibration>,
    ) -> Result<Library, LibraryError> {
        let library = Library {
            classes,
            substituents,
            calibration,
        };
        let origin = vec!["(in memory)".to_string(); library.classes.len()];
        let sub_origin = vec!["(in memory)".to_string(); library.substituents.len()];
        validate(&library, &origin, &sub_origin)?;
        Ok(library)
    }

    /// A library from TOML texts given as `(name, text)`: site-class files, substituent
    /// files and calibration files (any of them may be empty). `name` is used in errors.
    pub fn from_sources(
        sites: &[(&str, &str)],
        substituents: &[(&str, &str)],
        calibration: &[(&str, &str)],
    ) -> Result<Library, LibraryError> {
        let mut classes = Vec::new();
        let mut origin = Vec::new();
        for (name, text) in sites {
            let file: SiteFile = toml::from_str(text)
                .map_err(|e| LibraryError::new(format!("{name}: {}", e.to_string().trim_end())))?;
            origin.extend(std::iter::repeat_n(name.to_string(), file.class.len()));
            classes.extend(file.class);
        }
        let mut entries = Vec::new();
        let mut sub_origin = Vec::new();
        for (name, text) in substituents {
            let file: SubstituentFile = toml::from_str(text)
                .map_err(|e| LibraryError::new(format!("{name}: {}", e.to_string().trim_end())))?;
            sub_origin.extend(std::iter::repeat_n(
                name.to_string(),
                file.substituent.len(),
            ));
            entries.extend(file.substituent);
        }
        let mut fits = Vec::new();
        for (name, text) in calibration {
            let file: CalibrationFile = toml::from_str(text)
                .map_err(|e| LibraryError::new(format!("{name}: {}", e.to_string().trim_end())))?;
            fits.extend(file.calibration);
        }
        let library = Library {
            classes,
            substituents: entries,
            calibration: fits,
        };
        validate(&library, &origin, &sub_origin)?;
        Ok(library)
    }

    /// A library from files on disk: site-class files (loaded in the order given),
    /// substituent files and an optional calibration file.
    pub fn from_toml_files(
        sites: &[PathBuf],
        substituents: &[PathBuf],
        calibration: Option<&Path>,
    ) -> Result<Library, LibraryError> {
        let read = |path: &Path| -> Result<(String, String), LibraryError> {
            let text = std::fs::read_to_string(path)
                .map_err(|e| LibraryError::new(format!("{}: cannot read: {e}", path.display())))?;
            Ok((path.display().to_string(), text))
        };
        let sites: Vec<(String, String)> =
            sites.iter().map(|p| read(p)).collect::<Result<_, _>>()?;
        let substituents: Vec<(String, String)> = substituents
            .iter()
            .map(|p| read(p))
            .collect::<Result<_, _>>()?;
        let calibration: Vec<(String, String)> =
            calibration.map(read).transpose()?.into_iter().collect();
        Library::from_sources(&view(&sites), &view(&substituents), &view(&calibration))
    }

    /// A library laid out like `fragments/`: `root/sites/*.toml` (in file name order),
    /// `root/substituents/*.toml` and `root/calibration.toml` (optional). A missing
    /// `substituents` directory means no substituent constants.
    pub fn from_dir(root: &Path) -> Result<Library, LibraryError> {
        let sites = toml_files(&root.join("sites"), true)?;
        let substituents = toml_files(&root.join("substituents"), false)?;
        let calibration = root.join("calibration.toml");
        let calibration = calibration.is_file().then_some(calibration.as_path());
        Library::from_toml_files(&sites, &substituents, calibration)
    }

    /// The index of the class with this id.
    pub fn class_index(&self, id: &str) -> Option<usize> {
        self.classes.iter().position(|c| c.id == id)
    }

    /// The calibrated values for a class id, where fitted.
    pub fn calibration_for(&self, id: &str) -> Option<&Calibration> {
        self.calibration.iter().find(|c| c.class == id)
    }

    /// The compiled pattern of class `class`; `None` if there is no such class or (for a
    /// library built without the checks) its pattern does not compile. Each distinct
    /// pattern text is compiled once per process.
    pub fn pattern(&self, class: usize) -> Option<&Pattern> {
        let text = &self.classes.get(class)?.pattern;
        if std::ptr::eq(self, Library::builtin()) {
            return BUILTIN_INDEX.patterns.get(class).copied().flatten();
        }
        intern(text)
    }

    /// The elements (atomic numbers) the site atom of class `class` can be, read from its
    /// pattern; `None` where the pattern does not restrict it (or there is no such class).
    pub fn anchor_elements(&self, class: usize) -> Option<Vec<u8>> {
        anchor_elements(&self.classes.get(class)?.pattern)
    }
}

fn view(v: &[(String, String)]) -> Vec<(&str, &str)> {
    v.iter().map(|(a, b)| (a.as_str(), b.as_str())).collect()
}

fn toml_files(dir: &Path, required: bool) -> Result<Vec<PathBuf>, LibraryError> {
    let entries = match std::fs::read_dir(dir) {
        Ok(entries) => entries,
        Err(_) if !required && !dir.exists() => return Ok(Vec::new()),
        Err(e) => {
            return Err(LibraryError::new(format!(
                "{}: cannot read: {e}",
                dir.display()
            )))
        }
    };
    let mut files = Vec::new();
    for entry in entries {
        let entry =
            entry.map_err(|e| LibraryError::new(format!("{}: cannot read: {e}", dir.display())))?;
        let path = entry.path();
        if path.extension().is_some_and(|x| x == "toml") && path.is_file() {
            files.push(path);
        }
    }
    files.sort();
    Ok(files)
}

fn validate(
    library: &Library,
    origin: &[String],
    sub_origin: &[String],
) -> Result<(), LibraryError> {
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, class) in library.classes.iter().enumerate() {
        let at = format!("{}: class `{}`", origin[i], class.id);
        if class.id.trim().is_empty() {
            return Err(LibraryError::new(format!(
                "{}: a class has an empty id",
                origin[i]
            )));
        }
        if let Some(&j) = seen.get(class.id.as_str()) {
            return Err(LibraryError::new(format!(
                "{at}: id used twice (first in {})",
                origin[j]
            )));
        }
        seen.insert(&class.id, i);
        // Compiled through the process-wide store, where the site index finds it again
        // (compiling each class pattern twice was a good part of loading the library);
        // only a pattern that does not compile is parsed again, for its error.
        let pattern = match intern(&class.pattern) {
            Some(p) => p,
            None => {
                return Err(match Pattern::parse(&class.pattern) {
                    Err(e) => {
                        LibraryError::new(format!("{at}: pattern does not compile: {}", render(&e)))
                    }
                    Ok(_) => LibraryError::new(format!("{at}: pattern does not compile")),
                })
            }
        };
        let Some(site) = pattern.mapped(1) else {
            return Err(LibraryError::new(format!(
                "{at}: pattern `{}` marks no site atom (atom map :1)",
                class.pattern
            )));
        };
        if site != pattern.anchor() {
            return Err(LibraryError::new(format!(
                "{at}: pattern `{}`: the atom mapped :1 is not the anchored atom",
                class.pattern
            )));
        }
        if let Some(anchor) = class.anchor {
            if pattern.mapped(anchor).is_none() {
                return Err(LibraryError::new(format!(
                    "{at}: anchor {anchor} names no atom map of pattern `{}`",
                    class.pattern
                )));
            }
        }
        let numbers = [
            ("parent_pka", class.parent_pka),
            ("rho", class.rho),
            ("ortho_term", class.ortho_term),
            ("statistical_factor", class.statistical_factor),
            ("uncertainty", class.uncertainty),
        ];
        for (field, value) in numbers {
            if !value.is_finite() {
                return Err(LibraryError::new(format!(
                    "{at}: {field} is not a finite number"
                )));
            }
        }
        if class.uncertainty <= 0.0 {
            return Err(LibraryError::new(format!(
                "{at}: uncertainty must be positive"
            )));
        }
        if class.statistical_factor <= 0.0 {
            return Err(LibraryError::new(format!(
                "{at}: statistical_factor must be positive"
            )));
        }
        if class.parent_source.trim().is_empty() {
            return Err(LibraryError::new(format!("{at}: parent_pka has no source")));
        }
        if class.scale != Scale::None && class.rho_source.trim().is_empty() {
            return Err(LibraryError::new(format!("{at}: rho has no source")));
        }
        // These flags are read by the Hammett scorer alone: on another scale they would
        // silently do nothing.
        let on_ring_scale = matches!(
            class.scale,
            Scale::Hammett | Scale::HammettMinus | Scale::HammettPlus
        );
        for (flag, set) in [
            ("n_alkyl_counted", class.n_alkyl_counted),
            ("para_to_site_carbon", class.para_to_site_carbon),
            ("tautomer_pair", class.tautomer_pair),
        ] {
            if set && !on_ring_scale {
                return Err(LibraryError::new(format!(
                    "{at}: {flag} is read on a Hammett scale only"
                )));
            }
        }
        if let Some(h) = class.monoanion_hbond {
            if !h.is_finite() || h < 0.0 {
                return Err(LibraryError::new(format!(
                    "{at}: monoanion_hbond must be a finite, non-negative number"
                )));
            }
            if class.monoanion_hbond_source.trim().is_empty() {
                return Err(LibraryError::new(format!(
                    "{at}: monoanion_hbond has no source"
                )));
            }
        }
        if let Some(w) = class.geminal_interaction {
            if !w.is_finite() {
                return Err(LibraryError::new(format!(
                    "{at}: geminal_interaction is not a finite number"
                )));
            }
            if class.geminal_source.trim().is_empty() {
                return Err(LibraryError::new(format!(
                    "{at}: geminal_interaction has no source"
                )));
            }
        }
        if class.examples.is_empty() {
            return Err(LibraryError::new(format!("{at}: no examples")));
        }
        if class.near_misses.is_empty() {
            return Err(LibraryError::new(format!("{at}: no near-misses")));
        }
    }
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, entry) in library.substituents.iter().enumerate() {
        let at = format!("{}: substituent `{}`", sub_origin[i], entry.id);
        if let Some(&j) = seen.get(entry.id.as_str()) {
            return Err(LibraryError::new(format!(
                "{at}: id used twice (first in {})",
                sub_origin[j]
            )));
        }
        seen.insert(&entry.id, i);
        // Through the store the substituent index reads, as for classes above.
        if !entry.pattern.is_empty() && intern(&entry.pattern).is_none() {
            if let Err(e) = Pattern::parse(&entry.pattern) {
                return Err(LibraryError::new(format!(
                    "{at}: pattern does not compile: {}",
                    render(&e)
                )));
            }
        }
    }
    for fit in &library.calibration {
        if library.class_index(&fit.class).is_none() {
            return Err(LibraryError::new(format!(
                "calibration for `{}`: no class of that id",
                fit.class
            )));
        }
        if !fit.parent_pka.is_finite()
            || !fit.rho.is_finite()
            || fit.ortho_term.is_some_and(|t| !t.is_finite())
        {
            return Err(LibraryError::new(format!(
                "calibration for `{}`: values are not finite numbers",
                fit.class
            )));
        }
    }
    Ok(())
}

/// A pattern error with the pattern text and a caret line under the bad bytes.
fn render(e: &pattern::PatternError) -> String {
    let start = e.start.min(e.text.len());
    let end = e.end.clamp(start + 1, e.text.len().max(start + 1));
    let pad: String = e.text[..start]
        .chars()
        .map(|c| if c == '\t' { '\t' } else { ' ' })
        .collect();
    let width = e
        .text
        .get(start..end)
        .map_or(1, |s| s.chars().count().max(1));
    format!(
        "{} at byte {}\n    {}\n    {}{}",
        e.message,
        e.start,
        e.text,
        pad,
        "^".repeat(width)
    )
}

/// Each distinct pattern text, compiled once for the life of the process. Leaked on
/// purpose: the set of texts is the set of library patterns loaded, which is small and
/// fixed, and a `'static` pattern lets the index be shared across threads without copies.
static INTERNED: Lazy<RwLock<HashMap<String, Option<&'static Pattern>>>> =
    Lazy::new(|| RwLock::new(HashMap::new()));

pub(crate) fn intern(text: &str) -> Option<&'static Pattern> {
    {
        let map = INTERNED.read().unwrap_or_else(|e| e.into_inner());
        if let Some(p) = map.get(text) {
            return *p;
        }
    }
    let compiled: Option<&'static Pattern> =
        Pattern::parse(text).ok().map(|p| &*Box::leak(Box::new(p)));
    let mut map = INTERNED.write().unwrap_or_else(|e| e.into_inner());
    *map.entry(text.to_string()).or_insert(compiled)
}

/// What site finding needs from a library, worked out once: compiled patterns, their atom
/// maps, and per element the classes that can anchor on it, in precedence order
/// (priority high to low, then library order).
#[derive(Debug)]
pub(crate) struct SiteIndex {
    /// Compiled pattern per class (`None`: does not compile).
    pub(crate) patterns: Vec<Option<&'static Pattern>>,
    /// `(map, pattern atom)` per class.
    pub(crate) maps: Vec<Vec<(u16, usize)>>,
    /// Candidate classes per element and aromaticity (index = atomic number * 2 +
    /// aromatic, atomic numbers 0..=118).
    by_element: Vec<Vec<usize>>,
    /// Key the index was built for: pattern text and priority per class.
    key: Vec<(String, i32)>,
}

const ELEMENTS: usize = 119;

impl SiteIndex {
    fn build(library: &Library) -> SiteIndex {
        let patterns: Vec<Option<&'static Pattern>> =
            library.classes.iter().map(|c| intern(&c.pattern)).collect();
        let maps = patterns
            .iter()
            .map(|p| p.map(|p| p.maps()).unwrap_or_default())
            .collect();
        let mut order: Vec<usize> = (0..library.classes.len()).collect();
        // Highest priority first; a stable sort keeps library order among equals.
        order.sort_by_key(|&i| std::cmp::Reverse(library.classes[i].priority));
        let filters: Vec<Option<Vec<u8>>> = library
            .classes
            .iter()
            .map(|c| anchor_elements(&c.pattern))
            .collect();
        let by_element = (0..ELEMENTS * 2)
            .map(|key| {
                let (e, aromatic) = ((key / 2) as u8, key % 2 == 1);
                order
                    .iter()
                    .copied()
                    .filter(|&i| patterns[i].is_some_and(|p| p.could_anchor_element(e, aromatic)))
                    .filter(|&i| filters[i].as_ref().is_none_or(|f| f.contains(&e)))
                    .collect()
            })
            .collect();
        let key = library
            .classes
            .iter()
            .map(|c| (c.pattern.clone(), c.priority))
            .collect();
        SiteIndex {
            patterns,
            maps,
            by_element,
            key,
        }
    }

    /// Classes whose site atom can be `element` with this aromaticity, in precedence order
    /// (the others cannot anchor there, so leaving them out changes no answer).
    pub(crate) fn candidates(&self, element: u8, aromatic: bool) -> &[usize] {
        self.by_element
            .get(element as usize * 2 + aromatic as usize)
            .map_or(&[], |v| v.as_slice())
    }

    fn fits(&self, library: &Library) -> bool {
        self.key.len() == library.classes.len()
            && self
                .key
                .iter()
                .zip(&library.classes)
                .all(|((p, q), c)| *p == c.pattern && *q == c.priority)
    }
}

thread_local! {
    /// Indexes of libraries other than the built-in one, per thread (no lock per call in
    /// batch runs), most recently used first.
    static INDEXES: RefCell<Vec<Rc<SiteIndex>>> = const { RefCell::new(Vec::new()) };
}

/// A handful: a process rarely holds more libraries at once.
const INDEX_SLOTS: usize = 4;

/// The site index of `library`: shared for the built-in library, cached per thread for
/// others and keyed by their pattern texts and priorities, so an edited library is never
/// served a stale index.
pub(crate) fn site_index(library: &Library) -> IndexRef {
    if std::ptr::eq(library, Library::builtin()) {
        return IndexRef::Shared(Arc::clone(&BUILTIN_INDEX));
    }
    INDEXES.with(|cache| {
        let mut cache = cache.borrow_mut();
        if let Some(i) = cache.iter().position(|x| x.fits(library)) {
            let index = cache.remove(i);
            cache.insert(0, Rc::clone(&index));
            return IndexRef::Local(index);
        }
        let index = Rc::new(SiteIndex::build(library));
        cache.insert(0, Rc::clone(&index));
        cache.truncate(INDEX_SLOTS);
        IndexRef::Local(index)
    })
}

/// A site index, shared across threads or local to one.
#[derive(Clone)]
pub(crate) enum IndexRef {
    Shared(Arc<SiteIndex>),
    Local(Rc<SiteIndex>),
}

impl IndexRef {
    /// Whether both refer to the same index.
    pub(crate) fn same(&self, other: &IndexRef) -> bool {
        std::ptr::eq::<SiteIndex>(&**self, &**other)
    }
}

impl std::ops::Deref for IndexRef {
    type Target = SiteIndex;
    fn deref(&self) -> &SiteIndex {
        match self {
            IndexRef::Shared(a) => a,
            IndexRef::Local(r) => r,
        }
    }
}

/// The elements the site atom (map `:1`) of a pattern can be, read from the text of its
/// bracket atom; `None` where the text does not restrict it or cannot be read with
/// certainty (the caller then tries every element, which is always safe).
fn anchor_elements(text: &str) -> Option<Vec<u8>> {
    let expr = site_bracket(text)?;
    let expr = strip_recursive(expr)?;
    let set = eval_low_and(&expr)?;
    let mut v: Vec<u8> = set.into_iter().collect();
    v.sort_unstable();
    Some(v)
}

/// The expression inside the top-level bracket atom that carries map `:1`, without the map.
fn site_bracket(text: &str) -> Option<&str> {
    let bytes = text.as_bytes();
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] == b'[' {
            // Find the matching `]`, skipping brackets nested in `$(...)`.
            let mut depth = 0usize;
            let mut j = i;
            while j < bytes.len() {
                match bytes[j] {
                    b'[' => depth += 1,
                    b']' => {
                        depth -= 1;
                        if depth == 0 {
                            break;
                        }
                    }
                    _ => {}
                }
                j += 1;
            }
            if j >= bytes.len() {
                return None;
            }
            let inner = &text[i + 1..j];
            if let Some(body) = inner.strip_suffix(":1") {
                return Some(body);
            }
            i = j + 1;
        } else if bytes[i] == b'$' {
            // Skip a recursive environment outside brackets (not valid SMARTS anyway).
            return None;
        } else {
            i += 1;
        }
    }
    None
}

/// The expression with each `$(...)` replaced by `$`, which restricts nothing here.
fn strip_recursive(expr: &str) -> Option<String> {
    let mut out = String::new();
    let mut chars = expr.chars().peekable();
    while let Some(c) = chars.next() {
        if c == '$' {
            if chars.next() != Some('(') {
                return None;
            }
            let mut depth = 1;
            for d in chars.by_ref() {
                match d {
                    '(' => depth += 1,
                    ')' => {
                        depth -= 1;
                        if depth == 0 {
                            break;
                        }
                    }
                    _ => {}
                }
            }
            if depth != 0 {
                return None;
            }
            out.push('$');
        } else {
            out.push(c);
        }
    }
    Some(out)
}

/// A set of elements, or `None` for any element.
type Elements = Option<std::collections::BTreeSet<u8>>;

fn intersect(a: Elements, b: Elements) -> Elements {
    match (a, b) {
        (None, x) | (x, None) => x,
        (Some(a), Some(b)) => Some(a.intersection(&b).copied().collect()),
    }
}

// Outer `None`: the text could not be read; inner `None`: any element.
fn eval_low_and(expr: &str) -> Option<std::collections::BTreeSet<u8>> {
    let mut acc: Elements = None;
    for part in expr.split(';') {
        acc = intersect(acc, eval_or(part)?);
    }
    acc
}

fn eval_or(expr: &str) -> Option<Elements> {
    let mut acc = std::collections::BTreeSet::new();
    for alt in expr.split(',') {
        let mut conj: Elements = None;
        for term in alt.split('&') {
            conj = intersect(conj, eval_primitives(term)?);
        }
        match conj {
            None => return Some(None),
            Some(set) => acc.extend(set),
        }
    }
    Some(Some(acc))
}

/// A run of primitives joined by implicit high-precedence and.
fn eval_primitives(term: &str) -> Option<Elements> {
    let b = term.as_bytes();
    let mut i = 0;
    let mut acc: Elements = None;
    let mut negate = false;
    while i < b.len() {
        let c = b[i];
        let mut element: Option<u8> = None;
        match c {
            b'!' => {
                negate = !negate;
                i += 1;
                continue;
            }
            b'#' => {
                let start = i + 1;
                i = start;
                while i < b.len() && b[i].is_ascii_digit() {
                    i += 1;
                }
                element = Some(term[start..i].parse().ok()?);
            }
            b'$' | b'*' | b'a' | b'@' => i += 1,
            b'+' | b'-' => {
                i += 1;
                while i < b.len() && (b[i].is_ascii_digit() || b[i] == c) {
                    i += 1;
                }
            }
            b'0'..=b'9' => {
                while i < b.len() && b[i].is_ascii_digit() {
                    i += 1;
                }
            }
            b'A'..=b'Z' => {
                // Two-letter symbols first, the way bracket atoms are read.
                let two = if i + 1 < b.len() && b[i + 1].is_ascii_lowercase() {
                    term.get(i..i + 2).and_then(symbol_number)
                } else {
                    None
                };
                if let Some(n) = two {
                    element = Some(n);
                    i += 2;
                } else if matches!(c, b'H' | b'D' | b'X' | b'R' | b'A') {
                    // Counts (H, D, X, R) and the aliphatic wildcard restrict no element.
                    i += 1;
                    while i < b.len() && b[i].is_ascii_digit() {
                        i += 1;
                    }
                } else {
                    element = Some(symbol_number(&term[i..i + 1])?);
                    i += 1;
                }
            }
            b'r' | b'h' | b'v' | b'x' => {
                i += 1;
                while i < b.len() && b[i].is_ascii_digit() {
                    i += 1;
                }
            }
            b'c' | b'n' | b'o' | b's' | b'p' | b'b' => {
                if term.get(i..i + 2) == Some("se") {
                    element = Some(34);
                    i += 2;
                } else if term.get(i..i + 2) == Some("as") {
                    element = Some(33);
                    i += 2;
                } else {
                    element = Some(match c {
                        b'c' => 6,
                        b'n' => 7,
                        b'o' => 8,
                        b's' => 16,
                        b'p' => 15,
                        _ => 5,
                    });
                    i += 1;
                }
            }
            _ => return None,
        }
        if let Some(e) = element {
            if !negate {
                acc = intersect(acc, Some(std::iter::once(e).collect()));
            }
        }
        negate = false;
    }
    Some(acc)
}

fn symbol_number(symbol: &str) -> Option<u8> {
    (1..ELEMENTS as u8).find(|&n| mol::element_symbol(n) == symbol)
}
