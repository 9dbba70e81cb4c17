//! `pkarta predict`: estimates for every record of a file or stream.

use std::io::{self, IsTerminal, Write};
use std::panic::{catch_unwind, AssertUnwindSafe};

use pkarta::{ErrorReport, Options, Record, SiteReport};

use crate::batch::{self, Job, Outcome, Sink};
use crate::flags::{InputFormat, PredictArgs, PredictFormat};
use crate::fmt::{align, heading, num, opt_num, percent, CAUTION};
use crate::input::{self, Item};
use crate::progress::{self, Progress};

/// The columns `predict` adds to CSV/TSV output, in order (see docs/usage.md).
pub const COLUMNS: &[&str] = &[
    "pkarta_parent",
    "pkarta_acid_pka",
    "pkarta_base_pka",
    "pkarta_macro_pka",
    "pkarta_charge",
    "pkarta_species",
    "pkarta_species_fraction",
    "pkarta_isoelectric_point",
    "pkarta_warnings",
    "pkarta_error",
];

/// Index of `pkarta_warnings` in [`COLUMNS`].
const WARNINGS: usize = 8;

/// Runs `predict`; returns whether any record failed.
pub fn run(args: &PredictArgs) -> anyhow::Result<bool> {
    // The library first: a broken fragment file is a usage error before any input is read.
    let library = crate::library::load(args.library.library.as_deref())?;
    let opened = input::open(&args.input)?;
    let format = args.format.unwrap_or_else(|| {
        if io::stdout().is_terminal() {
            PredictFormat::Table
        } else {
            PredictFormat::Jsonl
        }
    });
    let progress = Progress::new(args.batch.quiet, opened.len);
    let out = batch::stdout();
    let mut sink: Box<dyn Sink<Estimated> + Send> = match format {
        // Standard output as it is: the texts come a chunk at a time (see `Jsonl`).
        PredictFormat::Jsonl => Box::new(Jsonl {
            out: io::stdout(),
            pending: Vec::new(),
            pending_bytes: 0,
        }),
        PredictFormat::Table => Box::new(Table { out, first: true }),
        PredictFormat::Csv | PredictFormat::Tsv => {
            let tsv = format == PredictFormat::Tsv;
            let delimiter = if tsv { b'\t' } else { b',' };
            // TSV is written without quoting, as it is read: cells never hold a tab or a
            // line break (ours are cleaned, TSV input cells cannot have them).
            let quoting = if tsv {
                csv::QuoteStyle::Never
            } else {
                csv::QuoteStyle::Necessary
            };
            let writer = csv::WriterBuilder::new()
                .delimiter(delimiter)
                .quote_style(quoting)
                .flexible(true)
                .from_writer(out);
            Box::new(Delimited {
                writer,
                header: opened.header.clone(),
                header_written: false,
                csv_input: opened.format != InputFormat::Smi,
                tsv,
            })
        }
    };
    let job = PredictJob {
        options: Options { ph: args.ph.ph },
        library,
        json: format == PredictFormat::Jsonl,
    };
    let threads = args.batch.threads.map(usize::from);
    let summary = batch::run(opened.source, threads, &job, sink.as_mut(), &progress)?;
    progress::summary(args.batch.quiet, "estimated", &summary);
    Ok(summary.failed > 0)
}

/// Estimates one record.
pub struct PredictJob {
    /// Options of every estimate.
    pub options: Options,
    /// The user's fragment library, if not the built-in one.
    pub library: Option<pkarta::model::Library>,
    /// Serialize each record to JSON Lines in the worker that estimated it.
    pub json: bool,
}

/// A finished record. For JSON Lines the worker that estimated it also serializes it and
/// drops the record there, so the single writer thread only copies bytes: it neither holds
/// back the others nor frees, one allocation at a time, memory that other threads took.
pub enum Estimated {
    /// The record, for the table and CSV/TSV writers.
    Record(Record),
    /// The record as JSON Lines, and whether it failed.
    Json {
        /// The JSON text with its line end; the records of a piece (see
        /// [`PredictJob::run_piece`]) share one text, held by the last of them, and the
        /// others' is empty.
        text: Vec<u8>,
        /// Whether the record carries an error.
        failed: bool,
    },
}

impl Outcome for Estimated {
    fn failed(&self) -> bool {
        match self {
            Estimated::Record(record) => record.failed(),
            Estimated::Json { failed, .. } => *failed,
        }
    }
}

impl Estimated {
    /// The record, for the writers that format it themselves.
    fn record(&self) -> io::Result<&Record> {
        match self {
            Estimated::Record(record) => Ok(record),
            // Only when the job and the writer disagree on the format: a bug, reported as
            // an output error rather than a panic.
            Estimated::Json { .. } => Err(io::Error::other(
                "internal error (please report it): a record reached this output as JSON",
            )),
        }
    }
}

impl Outcome for Record {
    fn failed(&self) -> bool {
        self.error.is_some()
    }
}

impl Job for PredictJob {
    type Out = Estimated;

    fn run(&self, item: &Item) -> Estimated {
        let record = self.record(item);
        self.finish(record)
    }

    fn internal_error(&self, item: &Item, message: String) -> Estimated {
        self.finish(failed(item, self.options.ph, message))
    }

    /// For JSON Lines the records of a piece are written one after the other into texts of
    /// [`SEGMENT`] bytes, a new one begun when the room left is less than most records
    /// take: no copy of each record's text, and a text never grows (a grown text is copied
    /// whole), unless one record is larger than that room; one allocation and one
    /// cross-thread free for several records.
    fn run_piece(&self, items: &[Item], outs: &mut Vec<Estimated>) {
        if !self.json {
            return outs.extend(items.iter().map(|item| batch::run_one(self, item)));
        }
        let mut text = Vec::with_capacity(SEGMENT);
        for item in items {
            // As `batch::run_one`: a panic is a bug, and becomes that record's error.
            let record =
                catch_unwind(AssertUnwindSafe(|| self.record(item))).unwrap_or_else(|payload| {
                    failed(item, self.options.ph, batch::internal_error(&*payload))
                });
            if text.capacity() - text.len() < ROOM {
                // The text so far goes with the record before (none is written before the
                // first record's, so there is one).
                let full = std::mem::replace(&mut text, Vec::with_capacity(SEGMENT));
                if let Some(Estimated::Json { text: last, .. }) = outs.last_mut() {
                    *last = full;
                }
            }
            let start = text.len();
            let written = catch_unwind(AssertUnwindSafe(|| {
                crate::json::write_record(&mut text, &record)
            }));
            let failed_record = match written {
                Ok(()) => record.failed(),
                Err(payload) => {
                    text.truncate(start);
                    let message = batch::internal_error(&*payload);
                    crate::json::write_record(&mut text, &failed(item, self.options.ph, message));
                    true
                }
            };
            text.push(b'\n');
            outs.push(Estimated::Json {
                text: Vec::new(),
                failed: failed_record,
            });
        }
        if let Some(Estimated::Json { text: last, .. }) = outs.last_mut() {
            *last = text;
        }
    }
}

/// Bytes of each JSON text [`PredictJob::run_piece`] fills.
const SEGMENT: usize = 1 << 16;

/// Room below which a text is left as it is and another begun: more than nearly every
/// record takes (over 2,000 MOSES molecules: median 2.5 KB, 90th percentile 7.2 KB,
/// largest 16.5 KB).
const ROOM: usize = 1 << 14;

impl PredictJob {
    /// Estimates one record.
    fn record(&self, item: &Item) -> Record {
        match &item.problem {
            Some(problem) => failed(item, self.options.ph, problem.clone()),
            None => match &self.library {
                Some(library) => {
                    pkarta::estimate_with(library, &item.text, item.id.as_deref(), &self.options)
                }
                None => pkarta::estimate(&item.text, item.id.as_deref(), &self.options),
            },
        }
    }

    fn finish(&self, record: Record) -> Estimated {
        if !self.json {
            return Estimated::Record(record);
        }
        let mut text = Vec::with_capacity(1 << 12);
        crate::json::write_record(&mut text, &record);
        text.push(b'\n');
        Estimated::Json {
            text,
            failed: record.failed(),
        }
    }
}

/// The record of an input that failed before it reached the library.
pub fn failed(item: &Item, ph: f64, message: String) -> Record {
    Record {
        input: item.text.clone(),
        id: item.id.clone(),
        smiles: None,
        sites: Vec::new(),
        sites_outside_window: Vec::new(),
        macro_pka: Vec::new(),
        ph,
        charge_at_ph: None,
        species: Vec::new(),
        isoelectric_point: None,
        warnings: Vec::new(),
        error: Some(ErrorReport { message }),
    }
}

/// The strongest acid site: the lowest pKa among acid sites in the aqueous window.
pub fn strongest_acid(record: &Record) -> Option<&SiteReport> {
    record
        .sites
        .iter()
        .filter(|s| s.kind == pkarta::model::Kind::Acid)
        .min_by(|a, b| a.pka.total_cmp(&b.pka))
}

/// The strongest base site: the highest conjugate-acid pKa among base sites in the window.
pub fn strongest_base(record: &Record) -> Option<&SiteReport> {
    record
        .sites
        .iter()
        .filter(|s| s.kind == pkarta::model::Kind::Base)
        .max_by(|a, b| a.pka.total_cmp(&b.pka))
}

fn kind_name(kind: pkarta::model::Kind) -> &'static str {
    match kind {
        pkarta::model::Kind::Acid => "acid",
        pkarta::model::Kind::Base => "base",
    }
}

/// JSON Lines: the texts of a chunk are kept until its end and handed to the output in one
/// vectored write (a pipe's reader is woken as rarely as with one large buffer, and no
/// byte is copied into one).
struct Jsonl<W> {
    out: W,
    /// Texts not yet written, in order.
    pending: Vec<Vec<u8>>,
    /// Their bytes.
    pending_bytes: usize,
}

/// Bytes kept before they are written even within a chunk.
const PENDING_BYTES: usize = 1 << 21;

impl<W: Write> Jsonl<W> {
    fn write_pending(&mut self) -> io::Result<()> {
        let mut slices: Vec<io::IoSlice> = self
            .pending
            .iter()
            .map(|text| io::IoSlice::new(text))
            .collect();
        let mut rest = &mut slices[..];
        while !rest.is_empty() {
            match self.out.write_vectored(rest) {
                Ok(0) => return Err(io::ErrorKind::WriteZero.into()),
                Ok(n) => io::IoSlice::advance_slices(&mut rest, n),
                Err(e) if e.kind() == io::ErrorKind::Interrupted => {}
                Err(e) => return Err(e),
            }
        }
        self.pending.clear();
        self.pending_bytes = 0;
        Ok(())
    }
}

impl<W: Write + Send> Sink<Estimated> for Jsonl<W> {
    fn write(&mut self, _item: &Item, done: Estimated) -> io::Result<()> {
        let text = match done {
            Estimated::Json { text, .. } => text,
            Estimated::Record(record) => {
                let mut text = Vec::with_capacity(8192);
                crate::json::write_record(&mut text, &record);
                text.push(b'\n');
                text
            }
        };
        if !text.is_empty() {
            self.pending_bytes += text.len();
            self.pending.push(text);
        }
        if self.pending_bytes >= PENDING_BYTES {
            self.write_pending()?;
        }
        Ok(())
    }
    fn flush(&mut self) -> io::Result<()> {
        self.write_pending()?;
        self.out.flush()
    }
    fn finish(&mut self) -> io::Result<()> {
        self.write_pending()?;
        self.out.flush()
    }
}

/// CSV/TSV: the input columns untouched, then [`COLUMNS`].
struct Delimited<W: Write> {
    writer: csv::Writer<W>,
    header: Option<csv::ByteRecord>,
    header_written: bool,
    csv_input: bool,
    tsv: bool,
}

impl<W: Write> Delimited<W> {
    fn write_header(&mut self) -> io::Result<()> {
        let mut header = match (&self.header, self.csv_input) {
            (Some(h), true) => h.clone(),
            _ => csv::ByteRecord::from(vec!["input", "id"]),
        };
        for c in COLUMNS {
            header.push_field(c.as_bytes());
        }
        self.writer.write_byte_record(&header).map_err(csv_io)?;
        self.header_written = true;
        Ok(())
    }
}

fn csv_io(e: csv::Error) -> io::Error {
    match e.into_kind() {
        csv::ErrorKind::Io(e) => e,
        other => io::Error::other(format!("{other:?}")),
    }
}

/// The pkarta_* cells of one record.
pub fn cells(record: &Record) -> Vec<String> {
    let dominant = record.species.first();
    vec![
        record.smiles.clone().unwrap_or_default(),
        opt_num(strongest_acid(record).map(|s| s.pka)),
        opt_num(strongest_base(record).map(|s| s.pka)),
        record
            .macro_pka
            .iter()
            .map(|&p| num(p))
            .collect::<Vec<_>>()
            .join(";"),
        opt_num(record.charge_at_ph),
        dominant.map(|s| s.smiles.clone()).unwrap_or_default(),
        opt_num(dominant.map(|s| s.fraction)),
        opt_num(record.isoelectric_point),
        record.warnings.join("; "),
        // A spreadsheet cell shows one line: the message, without its caret rendering.
        record
            .error
            .as_ref()
            .map(|e| e.message.lines().next().unwrap_or("").to_string())
            .unwrap_or_default(),
    ]
}

impl<W: Write + Send> Sink<Estimated> for Delimited<W> {
    fn write(&mut self, item: &Item, done: Estimated) -> io::Result<()> {
        let record = done.record()?;
        if !self.header_written {
            self.write_header()?;
        }
        let tsv = self.tsv;
        let clean = |cell: &str| {
            if tsv {
                cell.replace(['\t', '\n', '\r'], " ")
            } else {
                cell.to_string()
            }
        };
        let mut row = match (&item.row, self.csv_input) {
            (Some(row), true) => row.clone(),
            _ => csv::ByteRecord::from(vec![
                clean(&record.input),
                clean(record.id.as_deref().unwrap_or("")),
            ]),
        };
        let mut cells = cells(record);
        if self.csv_input {
            if let Some(header) = &self.header {
                // Short rows are padded so the pkarta_* cells land in their columns.
                while row.len() < header.len() {
                    row.push_field(b"");
                }
                // Long rows keep every field, which pushes the pkarta_* cells to the
                // right: say so rather than let a spreadsheet misread them silently.
                if row.len() > header.len() {
                    let note = format!(
                        "row has {} fields, the header {}: pkarta columns are shifted",
                        row.len(),
                        header.len()
                    );
                    let warnings = &mut cells[WARNINGS];
                    *warnings = if warnings.is_empty() {
                        note
                    } else {
                        format!("{note}; {warnings}")
                    };
                }
            }
        }
        for cell in cells {
            row.push_field(clean(&cell).as_bytes());
        }
        self.writer.write_byte_record(&row).map_err(csv_io)
    }
    fn flush(&mut self) -> io::Result<()> {
        self.writer.flush()
    }
    fn finish(&mut self) -> io::Result<()> {
        if !self.header_written {
            self.write_header()?;
        }
        self.writer.flush()
    }
}

struct Table<W> {
    out: W,
    first: bool,
}

impl<W: Write + Send> Sink<Estimated> for Table<W> {
    fn write(&mut self, item: &Item, done: Estimated) -> io::Result<()> {
        let record = done.record()?;
        if !self.first {
            self.out.write_all(b"\n")?;
        }
        self.first = false;
        self.out.write_all(render(item.number, record).as_bytes())
    }
    fn flush(&mut self) -> io::Result<()> {
        self.out.flush()
    }
    fn finish(&mut self) -> io::Result<()> {
        if !self.first {
            self.out.write_all(b"\n")?;
        }
        writeln!(self.out, "{CAUTION}")?;
        self.out.flush()
    }
}

/// One record as text for people: a heading, a row per site, then the molecule summary.
pub fn render(number: u64, record: &Record) -> String {
    let (mut s, failed) = heading(
        number,
        record.id.as_deref(),
        &record.input,
        record.error.as_ref().map(|e| e.message.as_str()),
    );
    if failed {
        return s;
    }
    if let Some(parent) = &record.smiles {
        if parent != &record.input {
            s.push_str(&format!("  parent: {parent}\n"));
        }
    }
    if record.sites.is_empty() {
        s.push_str("  no ionizable sites in the aqueous window\n");
    } else {
        let mut rows = vec![["atom", "kind", "pKa", "+/-", "class"]
            .map(String::from)
            .to_vec()];
        for site in &record.sites {
            rows.push(vec![
                site.atom.to_string(),
                kind_name(site.kind).to_string(),
                num(site.pka),
                num(site.uncertainty),
                site.class_name.clone(),
            ]);
        }
        s.push_str(&align(&rows, &[0, 2, 3], "  "));
    }
    if !record.sites_outside_window.is_empty() {
        // Kept out of the table: they do not ionize in water, and they would crowd it.
        let atoms: Vec<String> = record
            .sites_outside_window
            .iter()
            .map(|site| format!("{} ({} {})", site.atom, kind_name(site.kind), num(site.pka)))
            .collect();
        s.push_str(&format!(
            "  outside the aqueous window (-2 to 16): atom {}\n",
            atoms.join(", atom ")
        ));
    }
    let macro_pka = if record.macro_pka.is_empty() {
        "none".to_string()
    } else {
        record
            .macro_pka
            .iter()
            .map(|&p| num(p))
            .collect::<Vec<_>>()
            .join(", ")
    };
    s.push_str(&format!("  macro pKa: {macro_pka}\n"));
    s.push_str(&format!(
        "  at pH {}: charge {}",
        num(record.ph),
        record
            .charge_at_ph
            .map(num)
            .unwrap_or_else(|| "-".to_string())
    ));
    if let Some(dominant) = record.species.first() {
        s.push_str(&format!(
            ", dominant species {} ({})",
            dominant.smiles,
            percent(dominant.fraction)
        ));
    }
    s.push('\n');
    if let Some(pi) = record.isoelectric_point {
        s.push_str(&format!("  isoelectric point: {}\n", num(pi)));
    }
    for w in &record.warnings {
        s.push_str(&format!("  warning: {w}\n"));
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;
    use pkarta::model::Kind;
    use pkarta::SpeciesReport;

    fn site(atom: usize, kind: Kind, pka: f64) -> SiteReport {
        SiteReport {
            atom,
            kind,
            pka,
            uncertainty: 0.5,
            group: atom,
            class: "test".into(),
            class_name: "test".into(),
            terms: Vec::new(),
        }
    }

    fn record() -> Record {
        let item = Item {
            number: 1,
            text: "X".into(),
            id: None,
            problem: None,
            row: None,
            end: 0,
        };
        let mut r = failed(&item, 7.4, String::new());
        r.error = None;
        r.smiles = Some("X".into());
        r.sites = vec![
            site(0, Kind::Acid, 9.5),
            site(1, Kind::Acid, 3.25),
            site(2, Kind::Base, 5.0),
            site(3, Kind::Base, 10.456),
        ];
        r.macro_pka = vec![3.25, 5.0, 9.5, 10.456];
        r.charge_at_ph = Some(-0.0001);
        r.species = vec![SpeciesReport {
            smiles: "Y".into(),
            charge: 0,
            fraction: 0.875,
        }];
        r.warnings = vec!["a".into(), "b".into()];
        r
    }

    #[test]
    fn cells_pick_the_strongest_acid_and_base() {
        assert_eq!(COLUMNS[WARNINGS], "pkarta_warnings");
        let cells = cells(&record());
        assert_eq!(cells.len(), COLUMNS.len());
        assert_eq!(
            cells,
            [
                "X",
                "3.25",
                "10.46",
                "3.25;5.00;9.50;10.46",
                "0.00",
                "Y",
                "0.88",
                "",
                "a; b",
                ""
            ]
        );
    }

    #[test]
    fn error_cell_is_the_first_line_of_the_message() {
        let item = Item {
            number: 1,
            text: "C1CC".into(),
            id: None,
            problem: None,
            row: None,
            end: 0,
        };
        let r = failed(&item, 7.4, "unclosed ring\nC1CC\n ^".into());
        assert_eq!(cells(&r)[COLUMNS.len() - 1], "unclosed ring");
        assert!(r.failed());
    }
}
