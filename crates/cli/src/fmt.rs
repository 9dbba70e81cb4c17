//! Number and text formatting shared by the output formats.

/// A number with two decimals, never `-0.00`.
pub fn num(x: f64) -> String {
    let s = format!("{x:.2}");
    if s == "-0.00" {
        "0.00".to_string()
    } else {
        s
    }
}

/// An optional number with two decimals, empty when absent.
pub fn opt_num(x: Option<f64>) -> String {
    x.map(num).unwrap_or_default()
}

/// A fraction as a percentage with one decimal.
pub fn percent(fraction: f64) -> String {
    let s = format!("{:.1}%", fraction * 100.0);
    if s == "-0.0%" {
        "0.0%".to_string()
    } else {
        s
    }
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
    let mut out = String::new();
    for row in rows {
        let mut line = String::from(indent);
        for (i, cell) in row.iter().enumerate() {
            if i > 0 {
                line.push_str("  ");
            }
            let pad = widths[i] - cell.chars().count();
            if right.contains(&i) {
                line.push_str(&" ".repeat(pad));
                line.push_str(cell);
            } else {
                line.push_str(cell);
                line.push_str(&" ".repeat(pad));
            }
        }
        out.push_str(line.trim_end());
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
