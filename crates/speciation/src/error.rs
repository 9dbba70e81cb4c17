//! What can be wrong with a system or a request.

use std::fmt;

/// An invalid system, pH or pH range.
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub enum SpeciationError {
    /// More sites than [`crate::MAX_SITES`].
    TooManySites {
        /// Sites given.
        count: usize,
        /// The limit.
        max: usize,
    },
    /// A site's pKa is not a finite number or is out of range.
    BadPka {
        /// Site index.
        site: usize,
        /// The value given.
        value: f64,
    },
    /// The interaction matrix has the wrong number of rows.
    InteractionRows {
        /// Rows given.
        rows: usize,
        /// Sites in the system.
        sites: usize,
    },
    /// A row of the interaction matrix has the wrong length.
    InteractionRowLength {
        /// Row index.
        row: usize,
        /// Entries in that row.
        len: usize,
        /// Sites in the system.
        sites: usize,
    },
    /// An interaction is not a finite number or is out of range.
    BadInteraction {
        /// Row.
        i: usize,
        /// Column.
        j: usize,
        /// The value given.
        value: f64,
    },
    /// `w[i][j]` and `w[j][i]` differ.
    Asymmetric {
        /// Row.
        i: usize,
        /// Column.
        j: usize,
        /// `w[i][j]`.
        wij: f64,
        /// `w[j][i]`.
        wji: f64,
    },
    /// A diagonal entry is not zero.
    Diagonal {
        /// The site.
        i: usize,
        /// The value given.
        value: f64,
    },
    /// A pH that is not a finite number or is out of range.
    BadPh {
        /// The value given.
        value: f64,
    },
    /// A pH range that is empty, reversed, has a bad step or too many points.
    BadRange {
        /// Start.
        from: f64,
        /// End.
        to: f64,
        /// Step.
        step: f64,
        /// Why it is refused.
        reason: &'static str,
    },
}

impl fmt::Display for SpeciationError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let max = crate::MAX_MAGNITUDE;
        match self {
            Self::TooManySites { count, max } => {
                write!(f, "{count} sites given; at most {max} are accepted")
            }
            Self::BadPka { site, value } => write!(
                f,
                "site {site}: pKa {value} is not usable; a pKa must be a finite number between -{max} and {max}"
            ),
            Self::InteractionRows { rows, sites } => write!(
                f,
                "interaction matrix has {rows} rows but the system has {sites} sites (give {sites} rows, or none for no interactions)"
            ),
            Self::InteractionRowLength { row, len, sites } => write!(
                f,
                "interaction row {row} has {len} entries but the system has {sites} sites"
            ),
            Self::BadInteraction { i, j, value } => write!(
                f,
                "interaction[{i}][{j}] = {value} is not usable; an interaction must be a finite number between -{max} and {max} pK units"
            ),
            Self::Asymmetric { i, j, wij, wji } => write!(
                f,
                "interaction[{i}][{j}] = {wij} but interaction[{j}][{i}] = {wji}; the matrix must be symmetric"
            ),
            Self::Diagonal { i, value } => write!(
                f,
                "interaction[{i}][{i}] = {value}; the diagonal must be zero (a site does not interact with itself)"
            ),
            Self::BadPh { value } => write!(
                f,
                "pH {value} is not usable; a pH must be a finite number between -{max} and {max}"
            ),
            Self::BadRange { from, to, step, reason } => {
                write!(f, "pH range from {from} to {to} step {step}: {reason}")
            }
        }
    }
}

impl std::error::Error for SpeciationError {}
