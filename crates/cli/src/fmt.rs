//! Number and text formatting shared by the output formats.

/// A number with two decimals, never `-0.00`.
pub fn num(x: f64) -> String {
    match fixed(x, 2) {
        Some(s) => s,
        None => {
            let s = format!("{x:.2}");
            if s == "-0.00" {
                "0.00".to_string()
            } else {
                s
            }
        }
    }
}

/// An optional number with two decimals, empty when absent.
pub fn opt_num(x: Option<f64>) -> String {
    x.map(num).unwrap_or_default()
}

/// A fraction as a percentage with one decimal.
pub fn percent(fraction: f64) -> String {
    let x = fraction * 100.0;
    match fixed(x, 1) {
        Some(mut s) => {
            s.push('%');
            s
        }
        None => {
            let s = format!("{x:.1}%");
            if s == "-0.0%" {
                "0.0%".to_string()
            } else {
                s
            }
        }
    }
}

/// `x` with `decimals` (1 or 2) decimals, the text `format!("{x:.2}")` (or `.1`) writes,
/// except that a value rounding to zero is written without a sign; `None` for what this
/// does not handle (not finite, or too large), which `format!` then writes.
///
/// Why: tables and CSV cells write several of these per record, and the formatter's
/// exact mode took about 500 instructions a number (callgrind, `predict -f table`). Here
/// the binary value `m * 2^e` is scaled by `10^decimals` in integers and rounded exactly,
/// ties to even, which is how `format!` rounds with a precision (0.125 gives 0.12).
fn fixed(x: f64, decimals: u32) -> Option<String> {
    if !x.is_finite() {
        return None;
    }
    let scale: u128 = 10u128.pow(decimals);
    let bits = x.to_bits();
    let negative = bits >> 63 == 1;
    let biased = ((bits >> 52) & 0x7ff) as i32;
    let fraction = bits & ((1u64 << 52) - 1);
    let (m, e) = if biased == 0 {
        (fraction, -1074)
    } else {
        (fraction | 1u64 << 52, biased - 1075)
    };
    // m < 2^53 and scale <= 100: the product is below 2^60.
    let scaled = u128::from(m) * scale;
    let q: u128 = if e >= 0 {
        if e > 60 {
            return None;
        }
        scaled << e
    } else {
        let shift = (-e) as u32;
        if shift >= 127 {
            // Below 2^-67 of a unit: rounds to 0.
            0
        } else {
            let q = scaled >> shift;
            let rest = scaled - (q << shift);
            let half = 1u128 << (shift - 1);
            if rest > half || (rest == half && q & 1 == 1) {
                q + 1
            } else {
                q
            }
        }
    };
    let q = u64::try_from(q).ok()?;
    let scale = scale as u64;
    let (whole, part) = (q / scale, q % scale);
    let mut s = String::with_capacity(24);
    if negative && q != 0 {
        s.push('-');
    }
    s.push_str(&whole.to_string());
    s.push('.');
    if decimals == 2 {
        s.push(char::from(b'0' + (part / 10) as u8));
        s.push(char::from(b'0' + (part % 10) as u8));
    } else {
        s.push(char::from(b'0' + part as u8));
    }
    Some(s)
}

/// Columns of text aligned for people: each column as wide as its widest cell; columns
/// listed in `right` are right-aligned (numbers), the others left-aligned.
pub fn align(rows: &[Vec<String>], right: &[usize], indent: &str) -> String {
    let columns = rows.iter().map(Vec::len).max().unwrap_or(0);
    let mut widths = vec![0; columns];
    for row in rows {
        for (i, cell) in row.iter().enumerate() {
            widths[i] = widths[i].max(cell.chars().count());
        }
    }
    let line_width = indent.len() + widths.iter().sum::<usize>() + 2 * columns + 1;
    let mut out = String::with_capacity(rows.len() * line_width);
    // Each line is written straight into `out` and its trailing blanks cut off there.
    for row in rows {
        let start = out.len();
        out.push_str(indent);
        for (i, cell) in row.iter().enumerate() {
            if i > 0 {
                out.push_str("  ");
            }
            let pad = widths[i] - cell.chars().count();
            if right.contains(&i) {
                out.extend(std::iter::repeat(' ').take(pad));
                out.push_str(cell);
            } else {
                out.push_str(cell);
                out.extend(std::iter::repeat(' ').take(pad));
            }
        }
        let kept = out[start..].trim_end().len();
        out.truncate(start + kept);
        out.push('\n');
    }
    out
}

/// Indents every line after the first of a multi-line message (a caret rendering) so it
/// stays aligned under the first.
pub fn hang(message: &str, indent: &str) -> String {
    message
        .lines()
        .collect::<Vec<_>>()
        .join(&format!("\n{indent}"))
}

/// The caution printed after tables for people.
pub const CAUTION: &str =
    "Caution: these are estimates, not measurements. Check them against measured values \
and local safety rules before choosing strong acids or bases for lab work.";

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn two_decimals_without_negative_zero() {
        assert_eq!(num(4.756), "4.76");
        assert_eq!(num(-0.001), "0.00");
        assert_eq!(num(-1.0), "-1.00");
        assert_eq!(opt_num(None), "");
    }

    #[test]
    fn fixed_decimals_are_what_format_writes() {
        let reference = |x: f64, d: usize| {
            let s = format!("{x:.d$}");
            let zero = if d == 2 { "-0.00" } else { "-0.0" };
            if s == zero {
                s[1..].to_string()
            } else {
                s
            }
        };
        // Exact ties (k/8, k/16...), values a hair either side of a rounding boundary,
        // pKa-like values, subnormals, huge values and random bit patterns.
        let mut values = vec![
            0.0, -0.0, 5e-324, -5e-324, 1e18, 9.2e16, -1e300, 0.125, 0.375,
        ];
        for k in -4000..4000 {
            let t = k as f64 / 16.0;
            values.extend([t, t / 10.0, t / 100.0, t / 1000.0]);
            let b = (k as f64 + 0.5) / 100.0;
            values.extend([
                b,
                f64::from_bits(b.to_bits() + 1),
                f64::from_bits(b.to_bits() - 1),
            ]);
        }
        let mut x: u64 = 99;
        for _ in 0..20_000 {
            x = x.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1);
            values.push(f64::from_bits(x));
            values.push((x >> 11) as f64 / (1u64 << 53) as f64 * 40.0 - 20.0);
        }
        for &v in &values {
            if let Some(s) = fixed(v, 2) {
                assert_eq!(s, reference(v, 2), "{v:e}");
            }
            if let Some(s) = fixed(v, 1) {
                assert_eq!(s, reference(v, 1), "{v:e}");
            }
            assert_eq!(num(v), reference(v, 2), "{v:e}");
        }
        assert_eq!(percent(0.00125), "0.1%");
        assert_eq!(percent(-1e-9), "0.0%");
        assert_eq!(percent(f64::NAN), "NaN%");
    }

    #[test]
    fn columns_align_and_numbers_go_right() {
        let rows = vec![
            vec!["atom".to_string(), "pKa".to_string()],
            vec!["12".to_string(), "4.76".to_string()],
            vec!["3".to_string(), "10.00".to_string()],
        ];
        assert_eq!(
            align(&rows, &[1], "  "),
            "  atom    pKa\n  12     4.76\n  3     10.00\n"
        );
    }

    #[test]
    fn multi_line_messages_hang_under_the_first_line() {
        assert_eq!(hang("bad\nC1CC\n^", "   "), "bad\n   C1CC\n   ^");
    }
}

/// The heading of one record in a table (`#N  name  input`), followed by its error when it
/// failed. Returns the text and whether the record failed (nothing more to show then).
pub fn heading(number: u64, id: Option<&str>, input: &str, error: Option<&str>) -> (String, bool) {
    let mut s = format!("#{number}");
    if let Some(id) = id {
        s.push_str(&format!("  {id}"));
    }
    s.push_str(&format!("  {input}\n"));
    if let Some(message) = error {
        s.push_str(&format!("  error: {}\n", hang(message, "         ")));
        return (s, true);
    }
    (s, false)
}
