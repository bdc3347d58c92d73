//! Coded tables: a CSV file of factor columns `A`, `B`, ... with −1/0/+1 settings, an optional
//! `block` column and response columns, read and checked with every error naming its row and column.

use twofold_core::data::{DataError, Observations};
use twofold_core::term::{factor_index, factor_letter};

/// Why a coded table cannot be read. Every message is one line naming the row and column.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum TableError {
    /// Nothing in the file.
    #[error("the file is empty")]
    Empty,
    /// A header but no data.
    #[error("the file has a header row but no data rows")]
    NoRows,
    /// The CSV layer could not read a line.
    #[error("line {line}: {message}")]
    Csv {
        /// 1-based line in the file.
        line: u64,
        /// What went wrong.
        message: String,
    },
    /// The first column is not factor `A`.
    #[error("header, column 1: the first column must be factor `A` (found `{found}`)")]
    NoFactors {
        /// The header found.
        found: String,
    },
    /// No response column.
    #[error("header: no response column after the factor columns (A to {last})")]
    NoResponse {
        /// The last factor letter.
        last: char,
    },
    /// An empty column name.
    #[error("header, column {column}: the column name is empty")]
    EmptyName {
        /// 1-based column.
        column: usize,
    },
    /// A repeated column name.
    #[error("header, column {column}: `{name}` is already the name of column {first}")]
    DuplicateName {
        /// 1-based column.
        column: usize,
        /// The name.
        name: String,
        /// 1-based column where it first appears.
        first: usize,
    },
    /// A data row with the wrong number of cells.
    #[error("row {row} (line {line}): {found} cells, but the header has {expected} columns")]
    RowLength {
        /// 1-based data row.
        row: usize,
        /// 1-based line in the file.
        line: u64,
        /// Cells found.
        found: usize,
        /// Columns in the header.
        expected: usize,
    },
    /// A cell that cannot be used.
    #[error("row {row} (line {line}), column `{column}`: {problem}")]
    Cell {
        /// 1-based data row.
        row: usize,
        /// 1-based line in the file.
        line: u64,
        /// The column name.
        column: String,
        /// What is wrong with it.
        problem: String,
    },
}

/// One response column of a coded table.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseColumn {
    /// The header.
    pub name: String,
    /// One value per run; `None` = empty cell.
    pub values: Vec<Option<f64>>,
}

/// A validated coded table: factor settings −1/0/+1, optional blocks, responses.
#[derive(Debug, Clone, PartialEq)]
pub struct CodedTable {
    /// Number of factors (A.. in order).
    pub factor_count: usize,
    /// Coded settings, one row per run.
    pub levels: Vec<Vec<f64>>,
    /// Block number of each run (1 = first label met); empty without a block column.
    pub blocks: Vec<u32>,
    /// Block labels as written, by block number − 1.
    pub block_labels: Vec<String>,
    /// Whole plot of each run (1 = first label met) of a split-plot study; empty without a
    /// `whole_plot` column.
    pub whole_plots: Vec<u32>,
    /// Response columns, in file order.
    pub responses: Vec<ResponseColumn>,
    /// 1-based file line of each run.
    pub lines: Vec<u64>,
}

impl CodedTable {
    /// The observations of response `index`.
    pub fn observations(&self, index: usize) -> Result<Observations, DataError> {
        let values = self
            .responses
            .get(index)
            .map(|r| r.values.clone())
            .unwrap_or_default();
        Observations::new(
            self.factor_count,
            self.levels.clone(),
            self.blocks.clone(),
            values,
            Vec::new(),
        )
    }

    /// "row R (line L)" for 1-based run `run`.
    pub fn locate(&self, run: usize) -> String {
        match self.lines.get(run.wrapping_sub(1)) {
            Some(line) => format!("row {run} (line {line})"),
            None => format!("row {run}"),
        }
    }
}

/// Reads and checks a coded table from the bytes of a CSV file (see the module documentation).
pub fn read_coded_csv(bytes: &[u8]) -> Result<CodedTable, TableError> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(bytes);
    // Rows are read one at a time, so the table in memory is the numbers, not the text.
    let mut rows = reader.records().filter_map(|record| {
        let record = match record {
            Ok(r) => r,
            Err(e) => {
                let line = e.position().map_or(0, csv::Position::line);
                let message = match e.kind() {
                    csv::ErrorKind::Utf8 { .. } => "the text is not valid UTF-8".to_string(),
                    _ => e.to_string(),
                };
                return Some(Err(TableError::Csv { line, message }));
            }
        };
        let line = record.position().map_or(0, csv::Position::line);
        // Blank rows (also `,,,` from spreadsheets) carry nothing.
        if record.iter().all(str::is_empty) {
            return None;
        }
        let cells: Vec<String> = record.iter().map(str::to_string).collect();
        Some(Ok((line, cells)))
    });
    let Some(first) = rows.next() else {
        return Err(TableError::Empty);
    };
    let (_, header) = first?;
    // Trailing empty header cells (a trailing comma) are not columns.
    let mut header = header;
    while header.last().is_some_and(String::is_empty) {
        header.pop();
    }
    for (c, name) in header.iter().enumerate() {
        if name.is_empty() {
            return Err(TableError::EmptyName { column: c + 1 });
        }
        if let Some(first) = header[..c]
            .iter()
            .position(|h| h.eq_ignore_ascii_case(name))
        {
            return Err(TableError::DuplicateName {
                column: c + 1,
                name: name.clone(),
                first: first + 1,
            });
        }
    }
    let factor_count = header
        .iter()
        .enumerate()
        .take_while(|(i, h)| {
            let mut chars = h.chars();
            match (chars.next(), chars.next()) {
                (Some(ch), None) => factor_index(ch) == Some(*i),
                _ => false,
            }
        })
        .count();
    if factor_count == 0 {
        return Err(TableError::NoFactors {
            found: header.first().cloned().unwrap_or_default(),
        });
    }
    let has_block = header
        .get(factor_count)
        .is_some_and(|h| h.eq_ignore_ascii_case("block"));
    let wp_column = factor_count + usize::from(has_block);
    let has_whole_plot = header
        .get(wp_column)
        .is_some_and(|h| h.eq_ignore_ascii_case("whole_plot"));
    let first_response = wp_column + usize::from(has_whole_plot);
    if header.len() <= first_response {
        return Err(TableError::NoResponse {
            last: factor_letter(factor_count - 1).unwrap_or('A'),
        });
    }
    let mut table = CodedTable {
        factor_count,
        levels: Vec::new(),
        blocks: Vec::new(),
        block_labels: Vec::new(),
        whole_plots: Vec::new(),
        responses: header[first_response..]
            .iter()
            .map(|name| ResponseColumn {
                name: name.clone(),
                values: Vec::new(),
            })
            .collect(),
        lines: Vec::new(),
    };
    let width = header.len();
    let mut wp_labels: Vec<String> = Vec::new();
    for (index, item) in rows.enumerate() {
        let (line, mut cells) = item?;
        let row = index + 1;
        // Trailing empty cells past the header are harmless.
        while cells.len() > width && cells.last().is_some_and(String::is_empty) {
            cells.pop();
        }
        if cells.len() != width {
            return Err(TableError::RowLength {
                row,
                line,
                found: cells.len(),
                expected: width,
            });
        }
        let cell_error = |c: usize, problem: String| TableError::Cell {
            row,
            line,
            column: header[c].clone(),
            problem,
        };
        let mut settings = Vec::with_capacity(factor_count);
        for (c, text) in cells.iter().enumerate().take(factor_count) {
            if text.is_empty() {
                return Err(cell_error(
                    c,
                    "empty factor setting (write -1, 0 or +1)".into(),
                ));
            }
            let v: f64 = text
                .parse()
                .map_err(|_| cell_error(c, format!("`{text}` is not a number")))?;
            if v != -1.0 && v != 0.0 && v != 1.0 {
                return Err(cell_error(
                    c,
                    format!("`{text}` is not a coded level (-1, 0 or +1)"),
                ));
            }
            // Normalise -0 to 0 so centre points compare equal.
            settings.push(if v == 0.0 { 0.0 } else { v });
        }
        if has_block {
            let label = &cells[factor_count];
            if label.is_empty() {
                return Err(cell_error(factor_count, "empty block label".into()));
            }
            let id = match table.block_labels.iter().position(|b| b == label) {
                Some(p) => p,
                None => {
                    table.block_labels.push(label.clone());
                    table.block_labels.len() - 1
                }
            };
            table.blocks.push(id as u32 + 1);
        }
        if has_whole_plot {
            let label = &cells[wp_column];
            if label.is_empty() {
                return Err(cell_error(wp_column, "empty whole-plot label".into()));
            }
            let id = match wp_labels.iter().position(|b| b == label) {
                Some(p) => p,
                None => {
                    wp_labels.push(label.clone());
                    wp_labels.len() - 1
                }
            };
            table.whole_plots.push(id as u32 + 1);
        }
        for (j, resp) in table.responses.iter_mut().enumerate() {
            let c = first_response + j;
            let text = &cells[c];
            let value = if text.is_empty() {
                None
            } else {
                let v: f64 = text.parse().map_err(|_| {
                    cell_error(
                        c,
                        format!(
                            "`{text}` is not a number (leave the cell empty for a missing value)"
                        ),
                    )
                })?;
                if !v.is_finite() {
                    return Err(cell_error(c, format!("`{text}` is not a finite number")));
                }
                Some(v)
            };
            resp.values.push(value);
        }
        table.levels.push(settings);
        table.lines.push(line);
    }
    if table.levels.is_empty() {
        return Err(TableError::NoRows);
    }
    Ok(table)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_reads_factors_block_and_responses() {
        let text = "A,B,block,y,z\n-1,-1,day1,3.5,\n1,-1,day1,4,1\n-1,1,day2,,2\n1,1,day2,7,3\n0,0,day1,5,\n";
        let t = read_coded_csv(text.as_bytes()).unwrap();
        assert_eq!(t.factor_count, 2);
        assert_eq!(t.blocks, vec![1, 1, 2, 2, 1]);
        assert_eq!(t.block_labels, vec!["day1", "day2"]);
        assert_eq!(t.responses[0].values[2], None);
        assert_eq!(t.responses[1].name, "z");
        assert_eq!(t.lines, vec![2, 3, 4, 5, 6]);
    }

    #[test]
    fn bad_tables_name_row_and_column() {
        let cases: &[(&str, &str)] = &[
            ("", "the file is empty"),
            ("A,B,y\n", "no data rows"),
            ("x,y\n1,2\n", "first column must be factor `A`"),
            ("A,B\n1,1\n", "no response column"),
            (
                "A,B,y\n1,2,3\n",
                "row 1 (line 2), column `B`: `2` is not a coded level",
            ),
            (
                "A,B,y\n1,1,3\n1,q,3\n",
                "row 2 (line 3), column `B`: `q` is not a number",
            ),
            (
                "A,B,y\n1,1,inf\n",
                "row 1 (line 2), column `y`: `inf` is not a finite number",
            ),
            ("A,B,y\n1,1,abc\n", "column `y`: `abc` is not a number"),
            (
                "A,B,y\n1,1\n",
                "row 1 (line 2): 2 cells, but the header has 3 columns",
            ),
            ("A,B,y,y\n1,1,2,3\n", "`y` is already the name of column 3"),
            ("A,B,block,y\n1,1,,3\n", "column `block`: empty block label"),
            ("A,B,y\n1,,3\n", "column `B`: empty factor setting"),
        ];
        for (text, needle) in cases {
            let e = read_coded_csv(text.as_bytes()).unwrap_err().to_string();
            assert!(e.contains(needle), "{text:?}: {e}");
            assert!(!e.contains('\n'));
        }
    }
}
