//! A small aligned text table with units in the headers.

/// Column alignment.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Flush left (names, words).
    Left,
    /// Flush right (numbers).
    Right,
}

/// An aligned table built row by row.
#[derive(Debug, Clone, Default)]
pub struct TextTable {
    headers: Vec<(String, Align)>,
    rows: Vec<Vec<String>>,
}

impl TextTable {
    /// A table with these headers.
    pub fn new(headers: &[(&str, Align)]) -> TextTable {
        TextTable {
            headers: headers.iter().map(|(h, a)| (h.to_string(), *a)).collect(),
            rows: Vec::new(),
        }
    }

    /// Appends a row (missing cells are left blank).
    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(cells);
    }

    /// Renders the table with two spaces between columns and a rule under the header.
    pub fn render(&self) -> String {
        let width = |s: &str| s.chars().count();
        let mut widths: Vec<usize> = self.headers.iter().map(|(h, _)| width(h)).collect();
        for row in &self.rows {
            for (i, cell) in row.iter().enumerate() {
                if i < widths.len() {
                    widths[i] = widths[i].max(width(cell));
                }
            }
        }
        let line = |cells: Vec<&str>| {
            let mut out = String::new();
            for (i, (cell, w)) in cells.iter().zip(&widths).enumerate() {
                let pad = w - width(cell);
                if i > 0 {
                    out.push_str("  ");
                }
                match self.headers[i].1 {
                    Align::Left => {
                        out.push_str(cell);
                        out.push_str(&" ".repeat(pad));
                    }
                    Align::Right => {
                        out.push_str(&" ".repeat(pad));
                        out.push_str(cell);
                    }
                }
            }
            out.trim_end().to_string()
        };
        let mut out = String::new();
        out.push_str(&line(
            self.headers.iter().map(|(h, _)| h.as_str()).collect(),
        ));
        out.push('\n');
        let total: usize = widths.iter().sum::<usize>() + 2 * widths.len().saturating_sub(1);
        out.push_str(&"─".repeat(total));
        out.push('\n');
        for row in &self.rows {
            let cells: Vec<&str> = (0..widths.len())
                .map(|i| row.get(i).map_or("", String::as_str))
                .collect();
            out.push_str(&line(cells));
            out.push('\n');
        }
        out
    }
}

/// `value` with `decimals` decimals; a value that prints as zero prints without a
/// sign (rounding leaves tiny negatives, such as −1e-12, that would show as −0.000).
pub fn fixed(value: f64, decimals: usize) -> String {
    let text = format!("{value:.decimals$}");
    match text.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_string(),
        _ => text,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn columns_line_up() {
        let mut t = TextTable::new(&[("name", Align::Left), ("T [K]", Align::Right)]);
        t.row(vec!["a".into(), "1.0".into()]);
        t.row(vec!["longer".into(), "300.25".into()]);
        let text = t.render();
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(lines[0], "name     T [K]");
        assert_eq!(lines[2], "a          1.0");
        assert_eq!(lines[3], "longer  300.25");
    }

    #[test]
    fn zero_prints_without_a_sign_and_negatives_keep_theirs() {
        assert_eq!(fixed(-1e-12, 3), "0.000");
        assert_eq!(fixed(-0.0, 1), "0.0");
        assert_eq!(fixed(-0.0006, 3), "-0.001");
        assert_eq!(fixed(2.5, 1), "2.5");
    }
}
