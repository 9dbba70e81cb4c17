//! The fragment library (site classes and substituent constants, as data in `fragments/`),
//! site finding, and linear free-energy scoring with term-by-term explanations.
#![deny(missing_docs)]

mod library;
mod score;
mod sites;
mod substituents;

pub use library::{Calibration, Kind, Library, LibraryError, Scale, SiteClass, SubstituentEntry};
pub use score::{interactions, score_sites, Counted, Site, Term, TermRole, Text};
pub use sites::{find_sites, FoundSite};
pub use substituents::{entry_by_id, is_ring_member, recognize, recognize_with, Recognized};

/// The aqueous window: sites whose estimate falls outside it are reported apart.
/// Common practice: water levels acids stronger than about pKa -2 and bases whose
/// conjugate acid is weaker than about pKa 16.
pub const AQUEOUS_WINDOW: (f64, f64) = (-2.0, 16.0);
