//! pkarta: estimate the aqueous pKa of every ionizable site of a molecule from SMILES.
//!
//! INTERFACE NOTE: `estimate`, `inspect`, `Options`, `Record` and `InspectRecord` are the
//! contract the CLI codes against (see DESIGN.md, "Contracts that checks rely on").
#![deny(missing_docs)]

mod record;

pub use model;
pub use mol;
pub use pattern;
pub use speciation;

pub use record::{
    curve, debug_sites, estimate, estimate_with, inspect, plot_svg, Curve, CurvePoint, DebugSite,
    ErrorReport, InspectAtom, InspectBond, InspectRecord, Options, Record, SiteReport,
    SpeciesReport,
};
