//! JSON Lines records written directly, byte for byte what `serde_json::to_writer` writes
//! for the derived `Serialize` of [`Record`] (field order, `null`s, the skipped term fields,
//! number formatting), without going through serde.
//!
//! Why: a record runs to a few kilobytes, most of it the source texts of its terms, and
//! serde_json looks up every byte of every string in its escape table. Callgrind over 2,000
//! MOSES molecules put that at about 44,000 instructions a molecule, a sixth of the whole
//! `predict`. Here strings are checked eight bytes at a time and copied whole when nothing
//! in them needs escaping (nearly always); a string that does is handed to serde_json, as
//! are all floating-point numbers, so the text cannot drift from what serde_json writes.
//! The tests compare the two on real records.

use std::borrow::Cow;
use std::cell::RefCell;

use pkarta::model::{Kind, Term};
use pkarta::{Record, SiteReport, SpeciesReport};
use serde::Serializer as _;
use serde_json::ser::Formatter as _;

/// Appends `record` as one line of JSON (without the line end).
pub fn write_record(out: &mut Vec<u8>, record: &Record) {
    // One look at the thread's tables per record, not one per number and text.
    KEPT.with(|kept| write_record_with(out, record, &mut kept.borrow_mut()));
}

fn write_record_with(out: &mut Vec<u8>, record: &Record, kept: &mut Kept) {
    out.extend_from_slice(b"{\"input\":");
    string(out, &record.input);
    out.extend_from_slice(b",\"id\":");
    opt_string(out, record.id.as_deref());
    out.extend_from_slice(b",\"smiles\":");
    opt_string(out, record.smiles.as_deref());
    out.extend_from_slice(b",\"sites\":");
    array(out, &record.sites, |out, s| site(out, s, kept));
    out.extend_from_slice(b",\"sites_outside_window\":");
    array(out, &record.sites_outside_window, |out, s| {
        site(out, s, kept)
    });
    out.extend_from_slice(b",\"macro_pka\":");
    array(out, &record.macro_pka, |out, &p| kept.float(out, p));
    out.extend_from_slice(b",\"ph\":");
    kept.float(out, record.ph);
    out.extend_from_slice(b",\"charge_at_ph\":");
    opt_float(out, record.charge_at_ph, kept);
    out.extend_from_slice(b",\"species\":");
    array(out, &record.species, |out, sp| species(out, sp, kept));
    out.extend_from_slice(b",\"isoelectric_point\":");
    opt_float(out, record.isoelectric_point, kept);
    out.extend_from_slice(b",\"warnings\":");
    array(out, &record.warnings, |out, w| string(out, w));
    out.extend_from_slice(b",\"error\":");
    match &record.error {
        Some(e) => {
            out.extend_from_slice(b"{\"message\":");
            string(out, &e.message);
            out.push(b'}');
        }
        None => out.extend_from_slice(b"null"),
    }
    out.push(b'}');
}

/// A JSON array of `items`, each written by `each`.
fn array<T>(out: &mut Vec<u8>, items: &[T], mut each: impl FnMut(&mut Vec<u8>, &T)) {
    out.push(b'[');
    for (i, item) in items.iter().enumerate() {
        if i > 0 {
            out.push(b',');
        }
        each(out, item);
    }
    out.push(b']');
}

fn site(out: &mut Vec<u8>, s: &SiteReport, kept: &mut Kept) {
    out.extend_from_slice(b"{\"atom\":");
    unsigned(out, s.atom as u64);
    out.extend_from_slice(match s.kind {
        Kind::Acid => b",\"kind\":\"acid\",\"pka\":",
        Kind::Base => b",\"kind\":\"base\",\"pka\":",
    });
    kept.float(out, s.pka);
    out.extend_from_slice(b",\"uncertainty\":");
    kept.float(out, s.uncertainty);
    out.extend_from_slice(b",\"group\":");
    unsigned(out, s.group as u64);
    out.extend_from_slice(b",\"class\":");
    string(out, &s.class);
    out.extend_from_slice(b",\"class_name\":");
    string(out, &s.class_name);
    out.extend_from_slice(b",\"terms\":");
    array(out, &s.terms, |out, t| kept.term(out, t));
    out.push(b'}');
}

fn term(out: &mut Vec<u8>, t: &Term, kept: &mut Kept) {
    out.extend_from_slice(b"{\"label\":");
    kept.text(out, &t.label);
    term_after_label(out, t, kept);
}

/// A term from the comma after its label to its closing brace.
fn term_after_label(out: &mut Vec<u8>, t: &Term, kept: &mut Kept) {
    out.extend_from_slice(b",\"contribution\":");
    kept.float(out, t.contribution);
    out.extend_from_slice(b",\"source\":");
    kept.text(out, &t.source);
    // As `skip_serializing_if = "Option::is_none"` on the type.
    if let Some(sigma) = t.sigma {
        out.extend_from_slice(b",\"sigma\":");
        kept.float(out, sigma);
    }
    if let Some(rho) = t.rho {
        out.extend_from_slice(b",\"rho\":");
        kept.float(out, rho);
    }
    if let Some(position) = &t.position {
        out.extend_from_slice(b",\"position\":");
        kept.text(out, position);
    }
    out.push(b'}');
}

fn species(out: &mut Vec<u8>, sp: &SpeciesReport, kept: &mut Kept) {
    out.extend_from_slice(b"{\"smiles\":");
    string(out, &sp.smiles);
    out.extend_from_slice(b",\"charge\":");
    if sp.charge < 0 {
        out.push(b'-');
    }
    unsigned(out, u64::from(sp.charge.unsigned_abs()));
    out.extend_from_slice(b",\"fraction\":");
    kept.float(out, sp.fraction);
    out.push(b'}');
}

fn opt_string(out: &mut Vec<u8>, s: Option<&str>) {
    match s {
        Some(s) => string(out, s),
        None => out.extend_from_slice(b"null"),
    }
}

fn opt_float(out: &mut Vec<u8>, x: Option<f64>, kept: &mut Kept) {
    match x {
        Some(x) => kept.float(out, x),
        None => out.extend_from_slice(b"null"),
    }
}

/// Slots of [`Kept::numbers`]. 4,096 slots (160 KiB) keep most contributions too: over
/// 2,000 MOSES molecules the formatting cost 11.4 million instructions with 512 slots and
/// 9.3 million with 4,096.
const NUMBER_SLOTS: usize = 4096;

/// Slots of [`Kept::clean`].
const TEXT_SLOTS: usize = 1024;

/// Slots of [`Kept::terms`]. The MOSES sample's 2,000 molecules carry about 18,000 terms;
/// whole terms come back nearly as often as their texts do.
const TERM_SLOTS: usize = 2048;

thread_local! {
    static KEPT: RefCell<Kept> = RefCell::new(Kept::default());
}

/// What a thread keeps from record to record to write the next ones faster. Everything in
/// it is a pure function of its key, so what is written never depends on what came before.
#[derive(Default)]
struct Kept {
    /// Numbers as serde_json's formatter wrote them, by bit pattern. The same values (rho
    /// and sigma of the library's classes and entries, parent values, uncertainties, the pH,
    /// and the contributions rho x sigma of each class with each substituent) come back in
    /// record after record.
    numbers: Vec<(u64, u8, [u8; 24])>,
    /// Lent texts (see [`Kept::text`]) found to need no escaping, by where they lie.
    clean: Vec<(usize, usize)>,
    /// Whole terms as written, for terms whose texts are all lent (see [`TermKey`]).
    terms: Vec<(TermKey, Vec<u8>)>,
}

/// What a term's JSON text depends on, when its texts are lent for the life of the
/// program: where each text lies (such a text never changes) and the bits of each number.
#[derive(Clone, Copy, PartialEq, Eq)]
struct TermKey {
    label: Option<(usize, usize)>,
    source: (usize, usize),
    position: Option<(usize, usize)>,
    contribution: u64,
    sigma: Option<u64>,
    rho: Option<u64>,
}

impl TermKey {
    /// The key of a term whose source and position are lent, else `None`. A label of its
    /// own (an ortho term's, a counted correction's) is left out of the key and out of the
    /// text kept: it is written each time, and the rest of the term after it is kept.
    fn of(t: &Term) -> Option<TermKey> {
        let lent = |text: &Cow<'static, str>| match text {
            Cow::Borrowed(s) => Some((s.as_ptr() as usize, s.len())),
            Cow::Owned(_) => None,
        };
        Some(TermKey {
            label: lent(&t.label),
            source: lent(&t.source)?,
            position: match &t.position {
                Some(p) => Some(lent(p)?),
                None => None,
            },
            contribution: t.contribution.to_bits(),
            sigma: t.sigma.map(f64::to_bits),
            rho: t.rho.map(f64::to_bits),
        })
    }

    /// Matches no term: no lent text lies at address 0.
    const NONE: TermKey = TermKey {
        label: None,
        source: (0, 0),
        position: None,
        contribution: 0,
        sigma: None,
        rho: None,
    };

    fn slot(&self) -> usize {
        let mut h = self.label.map_or(0, |l| l.0 as u64) ^ (self.source.0 as u64).rotate_left(21);
        h ^= self.contribution.rotate_left(7);
        h ^= self.sigma.unwrap_or(1).rotate_left(29) ^ self.rho.unwrap_or(3).rotate_left(43);
        h ^= self.position.map_or(5, |p| p.0 as u64).rotate_left(13);
        (h.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> 40) as usize % TERM_SLOTS
    }
}

impl Kept {
    /// A term: copied whole from the last time the same term was written, when its texts
    /// are lent (all but a label of its own, which is written each time); else written
    /// field by field.
    fn term(&mut self, out: &mut Vec<u8>, t: &Term) {
        let Some(key) = TermKey::of(t) else {
            return term(out, t, self);
        };
        if self.terms.is_empty() {
            self.terms
                .resize_with(TERM_SLOTS, || (TermKey::NONE, Vec::new()));
        }
        let slot = key.slot();
        let start = if key.label.is_some() {
            out.len()
        } else {
            out.extend_from_slice(b"{\"label\":");
            string(out, &t.label);
            out.len()
        };
        if self.terms[slot].0 == key {
            out.extend_from_slice(&self.terms[slot].1);
            return;
        }
        if key.label.is_some() {
            out.extend_from_slice(b"{\"label\":");
            self.text(out, &t.label);
        }
        term_after_label(out, t, self);
        let (kept_key, text) = &mut self.terms[slot];
        *kept_key = key;
        text.clear();
        text.extend_from_slice(&out[start..]);
    }

    /// A number as serde_json writes an `f64`: `null` when not finite, else its shortest
    /// round-trip form, by serde_json's own formatter.
    #[inline]
    fn float(&mut self, out: &mut Vec<u8>, x: f64) {
        let bits = x.to_bits();
        let slot = (bits.wrapping_mul(0x9e37_79b9_7f4a_7c15) >> 40) as usize % NUMBER_SLOTS;
        if let Some((key, len, text)) = self.numbers.get(slot) {
            // Only that NaN has the bits of the empty slots, whose text is `null`.
            if *key == bits {
                out.extend_from_slice(&text[..usize::from(*len)]);
                return;
            }
        }
        self.float_cold(out, x, slot);
    }

    #[cold]
    #[inline(never)]
    fn float_cold(&mut self, out: &mut Vec<u8>, x: f64, slot: usize) {
        if !x.is_finite() {
            out.extend_from_slice(b"null");
            return;
        }
        if self.numbers.is_empty() {
            let mut null = [0; 24];
            null[..4].copy_from_slice(b"null");
            self.numbers
                .resize(NUMBER_SLOTS, (f64::NAN.to_bits(), 4, null));
        }
        let start = out.len();
        // Writing to a Vec cannot fail.
        let _ = serde_json::ser::CompactFormatter.write_f64(out, x);
        let new = &out[start..];
        let (key, len, text) = &mut self.numbers[slot];
        if new.len() <= text.len() {
            text[..new.len()].copy_from_slice(new);
            *len = new.len() as u8;
            *key = x.to_bits();
        }
    }

    /// A term's text. Texts lent for the life of the program (the built-in library's, see
    /// `model::Text`) never change, so each is checked for escapes once per thread: a
    /// small table keyed by where the text lies remembers those found clean. Term sources
    /// are hundreds of bytes, and the same few hundred of them come back in every batch.
    fn text(&mut self, out: &mut Vec<u8>, t: &Cow<'static, str>) {
        let Cow::Borrowed(s) = t else {
            return string(out, t);
        };
        let key = (s.as_ptr() as usize, s.len());
        let slot = (key.0 >> 3 ^ key.0 >> 13 ^ key.1) % TEXT_SLOTS;
        if self.clean.is_empty() {
            self.clean.resize(TEXT_SLOTS, (0, 0));
        }
        if self.clean[slot] != key {
            if needs_escape(s.as_bytes()) {
                return string(out, s);
            }
            self.clean[slot] = key;
        }
        out.reserve(s.len() + 2);
        out.push(b'"');
        out.extend_from_slice(s.as_bytes());
        out.push(b'"');
    }
}

/// A number as [`write_record`] writes it (for the tests).
#[cfg(test)]
fn float(out: &mut Vec<u8>, x: f64) {
    KEPT.with(|kept| kept.borrow_mut().float(out, x));
}

/// An integer in decimal, as `itoa` (and so serde_json) writes it.
fn unsigned(out: &mut Vec<u8>, n: u64) {
    // Atom and group numbers are mostly one or two digits.
    if n < 10 {
        out.push(b'0' + n as u8);
        return;
    }
    if n < 100 {
        out.extend_from_slice(&[b'0' + (n / 10) as u8, b'0' + (n % 10) as u8]);
        return;
    }
    out.extend_from_slice(pkarta::mol::decimal(n, &mut [0; 20]).as_bytes());
}

/// A JSON string: copied whole between quotes when no byte of it needs escaping, else
/// written by serde_json.
fn string(out: &mut Vec<u8>, s: &str) {
    if needs_escape(s.as_bytes()) {
        // Writing to a Vec cannot fail.
        let _ = (&mut serde_json::Serializer::new(&mut *out)).serialize_str(s);
        return;
    }
    out.reserve(s.len() + 2);
    out.push(b'"');
    out.extend_from_slice(s.as_bytes());
    out.push(b'"');
}

/// Whether any byte is one JSON escapes: a control character (below 0x20), `"` or `\`.
///
/// # Reference
///
/// The word-at-a-time byte tests ("determine if a word has a zero byte", "has a byte less
/// than n") of S. E. Anderson, *Bit Twiddling Hacks*, Stanford (from memory): exact for the
/// question whether any byte matches, which is all that is asked here.
fn needs_escape(bytes: &[u8]) -> bool {
    const ONES: u64 = 0x0101_0101_0101_0101;
    const HIGH: u64 = 0x8080_8080_8080_8080;
    // The top bit of each byte that is below 0x20, `"` or `\` (and perhaps of bytes after
    // such a byte, through the borrow: never without one).
    let marks = |w: u64| {
        let quote = w ^ (ONES * u64::from(b'"'));
        let backslash = w ^ (ONES * u64::from(b'\\'));
        (w.wrapping_sub(ONES * 0x20) & !w)
            | (quote.wrapping_sub(ONES) & !quote)
            | (backslash.wrapping_sub(ONES) & !backslash)
    };
    let word = |b: &[u8]| {
        let mut w = [0u8; 8];
        w.copy_from_slice(b);
        u64::from_le_bytes(w)
    };
    // Two words a step and one test of both: strings here are mostly long and clean.
    let mut chunks = bytes.chunks_exact(16);
    for chunk in &mut chunks {
        if (marks(word(&chunk[..8])) | marks(word(&chunk[8..]))) & HIGH != 0 {
            return true;
        }
    }
    chunks
        .remainder()
        .iter()
        .any(|&b| b < 0x20 || b == b'"' || b == b'\\')
}

#[cfg(test)]
mod tests {
    use super::*;

    fn check(record: &Record) {
        let theirs = serde_json::to_vec(record).unwrap();
        // Twice: the first time fills the thread's tables, the second writes from them.
        for _ in 0..2 {
            let mut ours = Vec::new();
            write_record(&mut ours, record);
            assert_eq!(
                String::from_utf8_lossy(&ours),
                String::from_utf8_lossy(&theirs)
            );
        }
    }

    #[test]
    fn records_are_written_as_serde_json_writes_them() {
        let options = pkarta::Options::default();
        // Sites in and out of the window, zwitterions, a salt, a permanent charge, terms with
        // and without sigma/rho/position, warnings, SMILES with backslashes, a parse error
        // whose message runs over several lines, an empty input and non-ASCII text.
        for (smiles, id) in [
            ("NCC(=O)O", Some("glycine")),
            ("OC(=O)c1ccc(cc1)[N+](=O)[O-]", None),
            ("CC[NH+](CC)CC.[Cl-]", Some("a \"quoted\" name\twith a tab")),
            ("OS(=O)(=O)c1ccccc1", None),
            ("C[N+](C)(C)CC(=O)O", None),
            ("F/C=C\\C(=O)O", Some("back\\slash")),
            ("NCCCC(N)C(=O)O", Some("é ü 中")),
            ("CC(C)(C)C(=O)O", None),
            ("c1ccncc1", None),
            ("C1CC", Some("unclosed ring")),
            ("", None),
            ("Oc1ccc(Cl)cc1C(F)(F)F", None),
        ] {
            check(&pkarta::estimate(smiles, id, &options));
        }
        let mut record = pkarta::estimate("CC(=O)O", None, &options);
        record.charge_at_ph = Some(f64::NAN);
        record.isoelectric_point = Some(f64::INFINITY);
        record.ph = -0.0;
        record.macro_pka = vec![1e300, -2.5e-7, 0.1 + 0.2, 4.0];
        record.species[0].charge = i32::MIN;
        record.warnings.push("\u{1}\u{1f}\u{7f} control".into());
        check(&record);
    }

    #[test]
    fn kept_numbers_are_written_as_serde_json_writes_them() {
        // Many more values than slots, each written three times, so that slots are filled,
        // hit and overwritten; the extremes of the format among them.
        let mut values = vec![0.0, -0.0, 1e300, -2.2250738585072014e-308, 5e-324, 7.4, 0.1];
        let mut x: u64 = 12345;
        for _ in 0..5000 {
            x = x.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1);
            values.push(f64::from_bits(x));
            values.push((x >> 40) as f64 / 1000.0 - 4.0);
        }
        for round in 0..3 {
            for &v in &values {
                let mut ours = Vec::new();
                float(&mut ours, v);
                let theirs = serde_json::to_vec(&v).unwrap();
                assert_eq!(ours, theirs, "{v:e}, round {round}");
            }
        }
    }

    #[test]
    fn escape_test_finds_each_byte_at_each_offset() {
        for bad in (0u8..0x20).chain([b'"', b'\\']) {
            for len in 1..40 {
                for at in 0..len {
                    let mut v = vec![b'a'; len];
                    v[at] = bad;
                    assert!(needs_escape(&v), "byte {bad:#x} at {at} of {len}");
                }
            }
        }
        let good: Vec<u8> = (0x20u8..=0xff)
            .filter(|&b| b != b'"' && b != b'\\')
            .collect();
        for b in &good {
            assert!(!needs_escape(&[*b; 17]), "byte {b:#x}");
        }
        for start in 0..good.len() {
            assert!(
                !needs_escape(&good[start..]),
                "from byte {:#x}",
                good[start]
            );
        }
    }
}
