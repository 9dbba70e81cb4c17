//! `pkarta inspect`: each molecule as read and perceived.

use std::io::{self, Write};

use pkarta::{ErrorReport, InspectRecord};

use crate::batch::{self, Job, Outcome, Sink};
use crate::flags::{InspectArgs, InspectFormat};
use crate::fmt::{align, heading};
use crate::input::{self, Item};
use crate::progress::{self, Progress};

/// Runs `inspect`; returns whether any record failed.
pub fn run(args: &InspectArgs) -> anyhow::Result<bool> {
    let opened = input::open(&args.input)?;
    let format = args.format.unwrap_or_else(|| {
        if std::io::IsTerminal::is_terminal(&io::stdout()) {
            InspectFormat::Table
        } else {
            InspectFormat::Jsonl
        }
    });
    let progress = Progress::new(args.batch.quiet, opened.len);
    let out = batch::stdout();
    let mut sink: Box<dyn Sink<InspectRecord> + Send> = match format {
        InspectFormat::Jsonl => Box::new(Jsonl { out }),
        InspectFormat::Table => Box::new(Table { out, first: true }),
    };
    let threads = args.batch.threads.map(usize::from);
    let summary = batch::run(
        opened.source,
        threads,
        &InspectJob,
        sink.as_mut(),
        &progress,
    )?;
    progress::summary(args.batch.quiet, "read", &summary);
    Ok(summary.failed > 0)
}

/// Reads and perceives one record.
pub struct InspectJob;

impl Outcome for InspectRecord {
    fn failed(&self) -> bool {
        self.error.is_some()
    }
}

impl Job for InspectJob {
    type Out = InspectRecord;

    fn run(&self, item: &Item) -> InspectRecord {
        match &item.problem {
            Some(problem) => failed(item, problem.clone()),
            None => pkarta::inspect(&item.text, item.id.as_deref()),
        }
    }

    fn internal_error(&self, item: &Item, message: String) -> InspectRecord {
        failed(item, message)
    }
}

/// The record of an input that could not be read.
pub fn failed(item: &Item, message: String) -> InspectRecord {
    InspectRecord {
        input: item.text.clone(),
        id: item.id.clone(),
        atoms: Vec::new(),
        bonds: Vec::new(),
        components: Vec::new(),
        error: Some(ErrorReport { message }),
    }
}

struct Jsonl<W> {
    out: W,
}

impl<W: Write + Send> Sink<InspectRecord> for Jsonl<W> {
    fn write(&mut self, _item: &Item, record: InspectRecord) -> io::Result<()> {
        serde_json::to_writer(&mut self.out, &record)?;
        self.out.write_all(b"\n")
    }
    fn flush(&mut self) -> io::Result<()> {
        self.out.flush()
    }
    fn finish(&mut self) -> io::Result<()> {
        self.out.flush()
    }
}

struct Table<W> {
    out: W,
    first: bool,
}

impl<W: Write + Send> Sink<InspectRecord> for Table<W> {
    fn write(&mut self, item: &Item, record: InspectRecord) -> io::Result<()> {
        let record = &record;
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
        self.out.flush()
    }
}

/// One record as text for people: a heading, the atoms, the bonds, the components.
pub fn render(number: u64, record: &InspectRecord) -> String {
    let (mut s, failed) = heading(
        number,
        record.id.as_deref(),
        &record.input,
        record.error.as_ref().map(|e| e.message.as_str()),
    );
    if failed {
        return s;
    }
    let yes_no = |b: bool| if b { "yes" } else { "no" }.to_string();
    let mut rows = vec![["atom", "element", "charge", "H", "aromatic", "ring"]
        .map(String::from)
        .to_vec()];
    for (i, a) in record.atoms.iter().enumerate() {
        rows.push(vec![
            i.to_string(),
            a.element.clone(),
            format!("{:+}", a.charge).replace("+0", "0"),
            a.hydrogens.to_string(),
            yes_no(a.aromatic),
            yes_no(a.in_ring),
        ]);
    }
    s.push_str(&align(&rows, &[0, 2, 3], "  "));
    if !record.bonds.is_empty() {
        let mut rows = vec![["bond", "atoms", "order", "aromatic"]
            .map(String::from)
            .to_vec()];
        for (i, b) in record.bonds.iter().enumerate() {
            rows.push(vec![
                i.to_string(),
                format!("{}-{}", b.a, b.b),
                b.order.to_string(),
                yes_no(b.aromatic),
            ]);
        }
        s.push_str(&align(&rows, &[0, 2], "  "));
    }
    let components: Vec<String> = record
        .components
        .iter()
        .map(|c| {
            format!(
                "[{}]",
                c.iter().map(usize::to_string).collect::<Vec<_>>().join(" ")
            )
        })
        .collect();
    s.push_str(&format!("  components: {}\n", components.join(" ")));
    s
}
