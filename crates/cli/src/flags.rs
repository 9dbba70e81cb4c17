//! Command-line flags. Each flag is defined once, here, with its help; the help text is the
//! documentation of the program.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

const EXIT_STATUS: &str = "\
Exit status:
  0  every record was read and estimated
  1  some records failed; each carries its error in the output
  2  usage error, or input/output error (printed on stderr as `pkarta: ...`)
A closed downstream pipe (e.g. `| head -1`) ends the run quietly.

Estimates are not measurements: check them against measured values and local safety
rules before choosing strong acids or bases for lab work.";

/// Estimate the aqueous pKa of every ionizable site of a molecule from SMILES.
#[derive(Debug, Parser)]
#[command(name = "pkarta", version, after_help = EXIT_STATUS, propagate_version = true)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Estimate pKa, charge and species for every record of a file or stream.
    ///
    /// Input is a SMILES file (one `SMILES [name]` per line; blank lines are records
    /// that fail with "empty input"; lines starting with `#` are comments) or CSV/TSV with
    /// a header row (chosen by the extension .csv/.tsv or --input-format). Every input
    /// record gets exactly one output record, in input order.
    Predict(PredictArgs),
    /// Show each molecule as read and perceived: atoms, bonds, components.
    Inspect(InspectArgs),
    /// Explain how each site's estimate was built, term by term.
    Explain(ExplainArgs),
    /// Views of the intermediate stages, for debugging.
    Debug {
        /// The stage to show.
        #[command(subcommand)]
        view: DebugView,
    },
    /// Species fractions and net charge over a pH range.
    Curve(CurveArgs),
}

/// Where records come from (`predict`, `inspect`).
#[derive(Debug, Args)]
pub struct InputArgs {
    /// Input file; `-` or nothing reads standard input.
    #[arg(value_name = "FILE")]
    pub file: Option<PathBuf>,
    /// How to read the input; `auto` goes by the file extension (.csv, .tsv; otherwise a
    /// SMILES file; standard input is read as a SMILES file).
    #[arg(long, value_enum, default_value_t = InputFormat::Auto)]
    pub input_format: InputFormat,
    /// CSV/TSV: the column holding SMILES [default: the first of smiles, canonical_smiles,
    /// isomeric_smiles, smi, structure, in any letter case].
    #[arg(long, value_name = "NAME")]
    pub smiles_column: Option<String>,
    /// CSV/TSV: the column holding the record's name [default: the first of id, name,
    /// compound, compound_id, title, identifier, in any letter case, if present].
    #[arg(long, value_name = "NAME")]
    pub id_column: Option<String>,
}

/// How to run a batch.
#[derive(Debug, Args)]
pub struct BatchArgs {
    /// Worker threads [default: all cores].
    #[arg(long, short = 'j', value_name = "N", value_parser = clap::value_parser!(u16).range(1..))]
    pub threads: Option<u16>,
    /// No progress bar and no summary line on stderr.
    #[arg(long, short = 'q')]
    pub quiet: bool,
}

/// Input formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum InputFormat {
    /// By file extension.
    Auto,
    /// One `SMILES [name]` per line.
    Smi,
    /// Comma-separated with a header row.
    Csv,
    /// Tab-separated with a header row.
    Tsv,
}

/// `pkarta predict`.
#[derive(Debug, Args)]
pub struct PredictArgs {
    #[command(flatten)]
    pub input: InputArgs,
    /// Output format [default: table when standard output is a terminal, jsonl otherwise].
    #[arg(long, short = 'f', value_enum)]
    pub format: Option<PredictFormat>,
    #[command(flatten)]
    pub ph: PhArg,
    #[command(flatten)]
    pub library: LibraryArg,
    #[command(flatten)]
    pub batch: BatchArgs,
}

/// The fragment library flag.
#[derive(Debug, Args)]
pub struct LibraryArg {
    /// Use your own fragment library: a directory laid out like `fragments/` (sites/*.toml,
    /// substituents/*.toml, calibration.toml) replaces the built-in library; a single TOML
    /// file of `[[class]]` and `[[substituent]]` tables adds to it.
    #[arg(long, value_name = "PATH")]
    pub library: Option<PathBuf>,
}

/// The pH flag.
#[derive(Debug, Args)]
pub struct PhArg {
    /// pH for net charge and species (-2 to 16).
    #[arg(long, value_name = "P", default_value_t = 7.4, value_parser = parse_ph)]
    pub ph: f64,
}

fn parse_ph(text: &str) -> Result<f64, String> {
    let ph: f64 = text
        .trim()
        .parse()
        .map_err(|_| format!("{text:?} is not a number"))?;
    if !(-2.0..=16.0).contains(&ph) {
        return Err(format!("pH {ph} is outside the aqueous range -2 to 16"));
    }
    Ok(ph)
}

/// `predict` output formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum PredictFormat {
    /// Aligned text for people, one block per record.
    Table,
    /// Comma-separated: the input columns, then pkarta_* columns.
    Csv,
    /// Tab-separated: the input columns, then pkarta_* columns.
    Tsv,
    /// One JSON object per record, every field.
    Jsonl,
}

/// `pkarta inspect`.
#[derive(Debug, Args)]
pub struct InspectArgs {
    #[command(flatten)]
    pub input: InputArgs,
    /// Output format [default: table when standard output is a terminal, jsonl otherwise].
    #[arg(long, short = 'f', value_enum)]
    pub format: Option<InspectFormat>,
    #[command(flatten)]
    pub batch: BatchArgs,
}

/// `inspect` output formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum InspectFormat {
    /// Aligned text for people.
    Table,
    /// One JSON object per record.
    Jsonl,
}

/// `pkarta explain`.
#[derive(Debug, Args)]
pub struct ExplainArgs {
    /// The molecule.
    pub smiles: String,
    #[command(flatten)]
    pub ph: PhArg,
    #[command(flatten)]
    pub library: LibraryArg,
}

/// `pkarta debug ...`.
#[derive(Debug, Subcommand)]
pub enum DebugView {
    /// Atoms and bonds as read and perceived (the `inspect` table of one molecule).
    Graph {
        /// The molecule.
        smiles: String,
    },
    /// Sites the class patterns find, before scoring.
    Sites {
        /// The molecule.
        smiles: String,
    },
    /// The scored sites and their terms, as pretty-printed JSON.
    Terms {
        /// The molecule.
        smiles: String,
        #[command(flatten)]
        ph: PhArg,
    },
}

/// `pkarta curve`.
#[derive(Debug, Args)]
pub struct CurveArgs {
    /// The molecule.
    pub smiles: String,
    /// First pH of the range.
    #[arg(long, default_value_t = 0.0, value_parser = parse_ph)]
    pub from: f64,
    /// Last pH of the range.
    #[arg(long, default_value_t = 14.0, value_parser = parse_ph)]
    pub to: f64,
    /// pH step (at most 10,000 points).
    #[arg(long, default_value_t = 0.5)]
    pub step: f64,
    /// pH marked on the plot.
    #[command(flatten)]
    pub ph: PhArg,
    /// Also write the plot as SVG to this file.
    #[arg(long, value_name = "FILE")]
    pub svg: Option<PathBuf>,
    /// Output format.
    #[arg(long, short = 'f', value_enum, default_value_t = CurveFormat::Table)]
    pub format: CurveFormat,
}

/// `curve` output formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum CurveFormat {
    /// Aligned text for people.
    Table,
    /// Comma-separated: ph, charge, then one column per species.
    Csv,
    /// One JSON object per pH point: ph, charge, fractions by species SMILES.
    Jsonl,
}

#[cfg(test)]
mod tests {
    use super::*;
    use clap::CommandFactory;

    #[test]
    fn flags_are_consistent() {
        Cli::command().debug_assert();
    }

    #[test]
    fn ph_outside_range_is_a_usage_error() {
        assert!(parse_ph("7.4").is_ok());
        assert_eq!(
            parse_ph("17").unwrap_err(),
            "pH 17 is outside the aqueous range -2 to 16"
        );
        assert!(parse_ph("seven").is_err());
        assert!(parse_ph("NaN").is_err());
    }
}
