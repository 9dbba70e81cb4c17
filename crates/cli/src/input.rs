//! Reading input records: SMILES files (one record per line) and CSV/TSV with a header.
//!
//! Input is read as bytes, never as `String` lines, so that one line that is not UTF-8
//! becomes one error record instead of ending the batch.

use std::fs::File;
use std::io::{self, BufRead, BufReader, Read};
use std::path::{Path, PathBuf};

use anyhow::{bail, Context};

use crate::flags::{InputArgs, InputFormat};

/// Longest line (or CSV field holding SMILES) read as a record. A longer line becomes an
/// error record; this keeps memory bounded on a file that has no line breaks at all.
pub const MAX_LINE: usize = 1 << 20;

/// Column names tried, case-insensitively, when `--smiles-column` is not given.
const SMILES_COLUMNS: &[&str] = &[
    "smiles",
    "canonical_smiles",
    "isomeric_smiles",
    "smi",
    "structure",
];

/// Column names tried, case-insensitively, for the record's name when `--id-column` is not
/// given.
const ID_COLUMNS: &[&str] = &[
    "id",
    "name",
    "compound",
    "compound_id",
    "title",
    "identifier",
];

/// One input record.
#[derive(Clone, Debug)]
pub struct Item {
    /// 1-based line number (SMILES files) or row number after the header (CSV/TSV).
    pub number: u64,
    /// The SMILES text as given (lossily decoded if it was not UTF-8).
    pub text: String,
    /// The name or id given with it.
    pub id: Option<String>,
    /// A problem found while reading; the record fails with this message.
    pub problem: Option<String>,
    /// The whole CSV/TSV row, passed through untouched.
    pub row: Option<csv::ByteRecord>,
    /// Bytes of input consumed up to the end of this record (for progress).
    pub end: u64,
}

/// A stream of input records.
pub trait Source: Send {
    /// Reads up to `n` records; an empty vector means the end of the input.
    fn next_chunk(&mut self, n: usize) -> io::Result<Vec<Item>>;
}

/// Where the input comes from and what it looks like.
pub struct Opened {
    /// The records.
    pub source: Box<dyn Source>,
    /// The CSV/TSV header, for CSV/TSV input.
    pub header: Option<csv::ByteRecord>,
    /// Input size in bytes when known (regular files), for progress.
    pub len: Option<u64>,
    /// How the input was read.
    pub format: InputFormat,
}

/// Opens the input named by the arguments (`-` or nothing for standard input).
pub fn open(args: &InputArgs) -> anyhow::Result<Opened> {
    let path = args.file.as_deref().filter(|p| *p != Path::new("-"));
    let format = match args.input_format {
        InputFormat::Auto => path.map(format_from_extension).unwrap_or(InputFormat::Smi),
        f => f,
    };
    let (reader, len): (Box<dyn Read + Send>, Option<u64>) = match path {
        None => (Box::new(io::stdin()), None),
        Some(p) => {
            let file = File::open(p).with_context(|| format!("cannot open {}", p.display()))?;
            let meta = file
                .metadata()
                .with_context(|| format!("cannot read {}", p.display()))?;
            if meta.is_dir() {
                bail!("{} is a directory, not a file of SMILES", p.display());
            }
            (Box::new(file), meta.is_file().then_some(meta.len()))
        }
    };
    let reader = BufReader::with_capacity(1 << 16, reader);
    let name = path
        .map(Path::to_path_buf)
        .unwrap_or_else(|| PathBuf::from("<stdin>"));
    match format {
        InputFormat::Csv | InputFormat::Tsv => {
            let delimiter = if format == InputFormat::Tsv {
                b'\t'
            } else {
                b','
            };
            let csv = CsvSource::new(reader, delimiter, args, &name)?;
            let header = Some(csv.header.clone());
            Ok(Opened {
                source: Box::new(csv),
                header,
                len,
                format,
            })
        }
        _ => Ok(Opened {
            source: Box::new(LineSource {
                reader,
                number: 0,
                offset: 0,
            }),
            header: None,
            len,
            format: InputFormat::Smi,
        }),
    }
}

fn format_from_extension(path: &Path) -> InputFormat {
    match path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        Some("csv") => InputFormat::Csv,
        Some("tsv") | Some("tab") => InputFormat::Tsv,
        _ => InputFormat::Smi,
    }
}

/// A SMILES file: `SMILES [name]` per line. Blank lines are records (they fail with
/// "empty input"); lines whose first non-blank character is `#` are comments, not records.
pub struct LineSource<R> {
    reader: R,
    number: u64,
    offset: u64,
}

impl<R: BufRead + Send> LineSource<R> {
    /// Reads one line into `buf` (without its line break). Returns `None` at the end of
    /// input, `Some(false)` for a line longer than [`MAX_LINE`] (whose rest is skipped).
    fn read_line(&mut self, buf: &mut Vec<u8>) -> io::Result<Option<bool>> {
        buf.clear();
        let n = (&mut self.reader)
            .take(MAX_LINE as u64 + 1)
            .read_until(b'\n', buf)?;
        if n == 0 {
            return Ok(None);
        }
        self.offset += n as u64;
        let mut complete = true;
        if buf.last() != Some(&b'\n') && buf.len() > MAX_LINE {
            complete = false;
            // Skip to the end of the overlong line without keeping it.
            loop {
                let available = self.reader.fill_buf()?;
                if available.is_empty() {
                    break;
                }
                match memchr(b'\n', available) {
                    Some(i) => {
                        self.reader.consume(i + 1);
                        self.offset += i as u64 + 1;
                        break;
                    }
                    None => {
                        let len = available.len();
                        self.reader.consume(len);
                        self.offset += len as u64;
                    }
                }
            }
            buf.truncate(64);
        }
        if buf.last() == Some(&b'\n') {
            buf.pop();
            if buf.last() == Some(&b'\r') {
                buf.pop();
            }
        }
        Ok(Some(complete))
    }
}

fn trim_bytes(bytes: &[u8]) -> &[u8] {
    let start = bytes
        .iter()
        .position(|b| !b.is_ascii_whitespace())
        .unwrap_or(bytes.len());
    let end = bytes
        .iter()
        .rposition(|b| !b.is_ascii_whitespace())
        .map_or(start, |i| i + 1);
    &bytes[start..end]
}

fn memchr(needle: u8, haystack: &[u8]) -> Option<usize> {
    haystack.iter().position(|&b| b == needle)
}

impl<R: BufRead + Send> Source for LineSource<R> {
    fn next_chunk(&mut self, n: usize) -> io::Result<Vec<Item>> {
        let mut items = Vec::with_capacity(n);
        let mut buf = Vec::new();
        while items.len() < n {
            let Some(complete) = self.read_line(&mut buf)? else {
                break;
            };
            self.number += 1;
            // Editors on some systems start a text file with a byte-order mark.
            if self.number == 1 && buf.starts_with(b"\xEF\xBB\xBF") {
                buf.drain(..3);
            }
            let mut item = Item {
                number: self.number,
                text: String::new(),
                id: None,
                problem: None,
                row: None,
                end: self.offset,
            };
            if !complete {
                item.text = String::from_utf8_lossy(&buf).into_owned();
                item.problem = Some(format!("input line is longer than {MAX_LINE} bytes"));
                items.push(item);
                continue;
            }
            // Comments are recognized on bytes: a comment that is not UTF-8 is still a comment.
            if trim_bytes(&buf).first() == Some(&b'#') {
                continue;
            }
            match std::str::from_utf8(&buf) {
                Err(e) => {
                    // Still split SMILES from name, so the record keeps its name.
                    let line = trim_bytes(&buf);
                    let (smiles, name) = match line.iter().position(u8::is_ascii_whitespace) {
                        Some(i) => (&line[..i], trim_bytes(&line[i..])),
                        None => (line, &b""[..]),
                    };
                    item.text = String::from_utf8_lossy(smiles).into_owned();
                    item.id =
                        (!name.is_empty()).then(|| String::from_utf8_lossy(name).into_owned());
                    item.problem = Some(format!(
                        "input is not valid UTF-8 at byte {}",
                        e.valid_up_to()
                    ));
                }
                Ok(line) => {
                    let line = line.trim();
                    let (smiles, name) = match line.find(char::is_whitespace) {
                        Some(i) => (&line[..i], line[i..].trim()),
                        None => (line, ""),
                    };
                    item.text = smiles.to_string();
                    item.id = (!name.is_empty()).then(|| name.to_string());
                    if smiles.is_empty() {
                        item.problem = Some("empty input".to_string());
                    }
                }
            }
            items.push(item);
        }
        Ok(items)
    }
}

/// CSV or TSV with a header row; every column is passed through.
pub struct CsvSource<R> {
    reader: csv::Reader<R>,
    header: csv::ByteRecord,
    smiles: usize,
    id: Option<usize>,
    number: u64,
}

impl<R: Read + Send> CsvSource<R> {
    fn new(reader: R, delimiter: u8, args: &InputArgs, name: &Path) -> anyhow::Result<Self> {
        let mut reader = csv::ReaderBuilder::new()
            .delimiter(delimiter)
            .has_headers(true)
            .flexible(true)
            // TSV has no quoting: a quote character inside a field is just a character.
            .quoting(delimiter != b'\t')
            .from_reader(reader);
        let header = reader
            .byte_headers()
            .with_context(|| format!("cannot read the header of {}", name.display()))?
            .clone();
        let names: Vec<String> = header
            .iter()
            .map(|h| String::from_utf8_lossy(h).trim().to_string())
            .collect();
        let find = |wanted: &str| names.iter().position(|n| n == wanted);
        let find_any = |candidates: &[&str]| {
            candidates
                .iter()
                .find_map(|c| names.iter().position(|n| n.eq_ignore_ascii_case(c)))
        };
        let smiles = match &args.smiles_column {
            Some(wanted) => find(wanted).with_context(|| {
                format!(
                    "{} has no column {wanted:?} (columns: {})",
                    name.display(),
                    names.join(", ")
                )
            })?,
            None => find_any(SMILES_COLUMNS).with_context(|| {
                format!(
                    "{} has no SMILES column (columns: {}); name it with --smiles-column",
                    name.display(),
                    names.join(", ")
                )
            })?,
        };
        let id = match &args.id_column {
            Some(wanted) => Some(find(wanted).with_context(|| {
                format!(
                    "{} has no column {wanted:?} (columns: {})",
                    name.display(),
                    names.join(", ")
                )
            })?),
            None => find_any(ID_COLUMNS).filter(|&i| i != smiles),
        };
        Ok(CsvSource {
            reader,
            header,
            smiles,
            id,
            number: 0,
        })
    }
}

impl<R: Read + Send> Source for CsvSource<R> {
    fn next_chunk(&mut self, n: usize) -> io::Result<Vec<Item>> {
        let mut items = Vec::with_capacity(n);
        while items.len() < n {
            let mut row = csv::ByteRecord::new();
            let more = match self.reader.read_byte_record(&mut row) {
                Ok(more) => more,
                Err(e) => match e.into_kind() {
                    csv::ErrorKind::Io(e) => return Err(e),
                    other => {
                        // Not an I/O problem: the row is malformed. It becomes an error
                        // record and reading goes on.
                        self.number += 1;
                        items.push(Item {
                            number: self.number,
                            text: String::new(),
                            id: None,
                            problem: Some(format!("row {} cannot be read: {other:?}", self.number)),
                            row: Some(csv::ByteRecord::new()),
                            end: self.reader.position().byte(),
                        });
                        continue;
                    }
                },
            };
            if !more {
                break;
            }
            self.number += 1;
            let field = |i: usize| {
                row.get(i)
                    .map(|f| String::from_utf8_lossy(f).trim().to_string())
            };
            let mut item = Item {
                number: self.number,
                text: field(self.smiles).unwrap_or_default(),
                id: self.id.and_then(field).filter(|s| !s.is_empty()),
                problem: None,
                row: None,
                end: self.reader.position().byte(),
            };
            item.problem = match row.get(self.smiles) {
                None => Some(format!(
                    "row {} has {} fields and no SMILES field (the header has {})",
                    self.number,
                    row.len(),
                    self.header.len()
                )),
                Some(f) if f.len() > MAX_LINE => {
                    item.text.truncate(64);
                    Some(format!("SMILES field is longer than {MAX_LINE} bytes"))
                }
                Some(f) => match std::str::from_utf8(f) {
                    Err(e) => Some(format!(
                        "input is not valid UTF-8 at byte {}",
                        e.valid_up_to()
                    )),
                    Ok(s) if s.trim().is_empty() => Some("empty input".to_string()),
                    Ok(_) => None,
                },
            };
            item.row = Some(row);
            items.push(item);
        }
        Ok(items)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lines(input: &[u8]) -> Vec<Item> {
        let mut source = LineSource {
            reader: input,
            number: 0,
            offset: 0,
        };
        source.next_chunk(100).unwrap()
    }

    #[test]
    fn smiles_and_name_split_at_first_blank() {
        let items = lines(b"CCO  ethanol, absolute \r\nc1ccccc1\n");
        assert_eq!(items.len(), 2);
        assert_eq!(items[0].text, "CCO");
        assert_eq!(items[0].id.as_deref(), Some("ethanol, absolute"));
        assert_eq!(items[1].text, "c1ccccc1");
        assert_eq!(items[1].id, None);
        assert_eq!(items[1].number, 2);
    }

    #[test]
    fn comments_are_skipped_blank_lines_are_records() {
        let items = lines(b"# header\nCC\n\n  # indented comment\n#\xff not UTF-8\nN\n");
        let texts: Vec<_> = items
            .iter()
            .map(|i| (i.number, i.text.as_str(), i.problem.clone()))
            .collect();
        assert_eq!(
            texts,
            vec![
                (2, "CC", None),
                (3, "", Some("empty input".to_string())),
                (6, "N", None)
            ]
        );
    }

    #[test]
    fn non_utf8_line_names_its_byte() {
        let items = lines(b"CC\nC\xffC x\nO\n");
        assert_eq!(items.len(), 3);
        assert_eq!(
            items[1].problem.as_deref(),
            Some("input is not valid UTF-8 at byte 1")
        );
        assert_eq!(items[1].text, "C\u{fffd}C");
        assert_eq!(items[1].id.as_deref(), Some("x"));
        assert_eq!(items[2].text, "O");
    }

    #[test]
    fn overlong_line_is_one_error_and_reading_goes_on() {
        let mut input = vec![b'C'; MAX_LINE + 10];
        input.extend_from_slice(b"\nO\n");
        let items = lines(&input);
        assert_eq!(items.len(), 2);
        assert!(items[0].problem.as_deref().unwrap().contains("longer than"));
        assert_eq!(items[0].text.len(), 64);
        assert_eq!(items[1].text, "O");
        assert_eq!(items[1].end, input.len() as u64);
    }

    #[test]
    fn byte_order_mark_is_not_part_of_the_first_smiles() {
        let items = lines(b"\xEF\xBB\xBFCCO first\nCC\n");
        assert_eq!(items[0].text, "CCO");
        assert_eq!(items[0].problem, None);
    }

    #[test]
    fn last_line_without_break_is_read() {
        let items = lines(b"CC\nCCC");
        assert_eq!(items.len(), 2);
        assert_eq!(items[1].text, "CCC");
    }
}
