//! Clipboard text to and from spreadsheets: pure functions between text and cells; the window
//! does the actual clipboard access.
//!
//! Copy writes tab-separated rows the way spreadsheets expect them: cells with a tab, a line
//! break or a double quote are quoted (`"..."`, inner quotes doubled), lines end in CRLF, and
//! every text cell passes the formula-injection guard, because a spreadsheet evaluates pasted
//! `=...` as readily as a file.
//!
//! Paste reads such text back into a grid, then [`plan_paste`] fills a response column from it,
//! starting at a run and going down the rows as the window shows them. Cells that are not
//! numbers are reported with the reason, and still pasted as typed text (like a typed cell,
//! visible and left out of the analysis), never silently dropped.

use super::guard::{guard, unguard};
use crate::project::{Cell, CellValue, Edit, Project};

/// Tab-separated text of a grid selection, ready for the clipboard.
pub fn copy_grid(rows: &[Vec<String>]) -> String {
    let mut out = String::new();
    for row in rows {
        let cells: Vec<String> = row.iter().map(|c| quote(&guard(c))).collect();
        out.push_str(&cells.join("\t"));
        out.push_str("\r\n");
    }
    out
}

fn quote(cell: &str) -> String {
    if cell.contains(['\t', '\n', '\r', '"']) {
        format!("\"{}\"", cell.replace('"', "\"\""))
    } else {
        cell.to_string()
    }
}

/// Reads tab-separated clipboard text into rows of cells (quoted cells may hold tabs and line
/// breaks; the line break after the last row does not make an empty row). Guard quotes added by
/// [`copy_grid`] are removed, so copy then paste gives back the same cells.
pub fn parse_grid(text: &str) -> Vec<Vec<String>> {
    let mut rows = Vec::new();
    let mut row = Vec::new();
    let mut cell = String::new();
    let mut chars = text.chars().peekable();
    let mut in_quotes = false;
    let mut at_cell_start = true;
    let mut any = false;
    while let Some(c) = chars.next() {
        any = true;
        if in_quotes {
            if c == '"' {
                if chars.peek() == Some(&'"') {
                    chars.next();
                    cell.push('"');
                } else {
                    in_quotes = false;
                }
            } else {
                cell.push(c);
            }
            continue;
        }
        match c {
            '"' if at_cell_start => {
                in_quotes = true;
                at_cell_start = false;
            }
            '\t' => {
                row.push(unguard(&std::mem::take(&mut cell)).into_owned());
                at_cell_start = true;
            }
            '\r' | '\n' => {
                if c == '\r' && chars.peek() == Some(&'\n') {
                    chars.next();
                }
                row.push(unguard(&std::mem::take(&mut cell)).into_owned());
                rows.push(std::mem::take(&mut row));
                at_cell_start = true;
                any = false;
            }
            c => {
                cell.push(c);
                at_cell_start = false;
            }
        }
    }
    if any {
        row.push(unguard(&cell).into_owned());
        rows.push(row);
    }
    rows
}

/// One pasted cell.
#[derive(Debug, Clone, PartialEq)]
pub struct PastedCell {
    /// Position of the run in [`Project::runs`].
    pub run: usize,
    /// Its run-order number.
    pub run_order: u32,
    /// The text pasted (trimmed).
    pub text: String,
    /// The text now in the cell.
    pub old: String,
    /// Why the text is not a number, if it is not.
    pub not_a_number: Option<String>,
}

/// What a paste would do; nothing changes until the edits are applied.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct PastePlan {
    /// The response column pasted into.
    pub response: usize,
    /// Cells that would be set, in the order pasted (empty pasted cells clear the cell).
    pub cells: Vec<PastedCell>,
    /// Pasted lines beyond the last run (not pasted).
    pub beyond_last_run: usize,
    /// Whether the clipboard held more than one column (only the first is used).
    pub extra_columns: bool,
}

impl PastePlan {
    /// The cells whose text is not a number: run-order number, text and reason.
    pub fn bad_cells(&self) -> Vec<(u32, &str, &str)> {
        self.cells
            .iter()
            .filter_map(|c| {
                c.not_a_number
                    .as_deref()
                    .map(|r| (c.run_order, c.text.as_str(), r))
            })
            .collect()
    }

    /// The edits that carry out the paste (`at`: entry time to record).
    pub fn edits(&self, at: Option<String>) -> Vec<Edit> {
        self.cells
            .iter()
            .filter(|c| c.text != c.old)
            .map(|c| Edit::SetCell {
                run: c.run,
                response: self.response,
                text: c.text.clone(),
                at: at.clone(),
            })
            .collect()
    }

    /// One or two sentences for the window: what is pasted and what is not.
    pub fn summary(&self) -> String {
        let mut s = format!("{} cells pasted.", self.cells.len());
        let bad = self.bad_cells();
        if !bad.is_empty() {
            let list: Vec<String> = bad
                .iter()
                .take(6)
                .map(|(run, text, reason)| format!("run {run} (“{text}”: {reason})"))
                .collect();
            s.push_str(&format!(
                " {} are not numbers and are kept as text, left out of the analysis: {}{}.",
                bad.len(),
                list.join("; "),
                if bad.len() > 6 { "; ..." } else { "" }
            ));
        }
        if self.beyond_last_run > 0 {
            s.push_str(&format!(
                " {} lines go past the last run and were not pasted.",
                self.beyond_last_run
            ));
        }
        if self.extra_columns {
            s.push_str(" Only the first copied column was used.");
        }
        s
    }
}

/// Plans pasting clipboard `text` into response `response`, the first value going to run
/// `targets[0]` (positions in [`Project::runs`], in the order the window shows them from the
/// selected row down).
pub fn plan_paste(project: &Project, response: usize, targets: &[usize], text: &str) -> PastePlan {
    let grid = parse_grid(text);
    let mut plan = PastePlan {
        response,
        extra_columns: grid.iter().any(|r| r.len() > 1),
        ..PastePlan::default()
    };
    for (i, row) in grid.iter().enumerate() {
        let Some(&run) = targets.get(i) else {
            plan.beyond_last_run = grid.len() - i;
            break;
        };
        let Some(record) = project.runs.get(run) else {
            continue;
        };
        let text = row
            .first()
            .map(|s| s.trim().to_string())
            .unwrap_or_default();
        let not_a_number = match Cell::new(text.clone()).value() {
            CellValue::Bad { reason } => Some(reason),
            _ => None,
        };
        plan.cells.push(PastedCell {
            run,
            run_order: record.run_order,
            old: record
                .values
                .get(response)
                .map(|c| c.text.clone())
                .unwrap_or_default(),
            text,
            not_a_number,
        });
    }
    plan
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::demo_project;

    #[test]
    fn copy_is_tab_separated_guarded_and_quoted() {
        let rows = vec![
            vec!["run".to_string(), "Yield".to_string(), "note".to_string()],
            vec!["1".to_string(), "-2.5".to_string(), "=cmd".to_string()],
            vec![
                "2".to_string(),
                "".to_string(),
                "two\tparts \"x\"\nline".to_string(),
            ],
        ];
        let text = copy_grid(&rows);
        assert_eq!(
            text,
            "run\tYield\tnote\r\n1\t-2.5\t'=cmd\r\n2\t\t\"two\tparts \"\"x\"\"\nline\"\r\n"
        );
        assert_eq!(
            parse_grid(&text),
            rows,
            "copy then paste gives the cells back"
        );
    }

    #[test]
    fn parse_handles_line_endings_and_blank_cells() {
        assert_eq!(
            parse_grid("1\n2\r\n\n4"),
            vec![vec!["1"], vec!["2"], vec![""], vec!["4"]]
        );
        assert_eq!(parse_grid("1\n"), vec![vec!["1"]]);
        assert!(parse_grid("").is_empty());
    }

    #[test]
    fn paste_reports_bad_cells_and_keeps_them() {
        let p = demo_project();
        let targets: Vec<usize> = vec![0, 1, 2, 3];
        let plan = plan_paste(&p, 0, &targets, "61\n12.5 mm\n1,234.5\n\n99\n100\n");
        assert_eq!(plan.cells.len(), 4);
        assert_eq!(plan.beyond_last_run, 2);
        let bad = plan.bad_cells();
        assert_eq!(bad.len(), 2, "{bad:?}");
        assert_eq!(bad[0].1, "12.5 mm");
        assert!(bad[1].2.contains("thousands"));
        assert_eq!(
            plan.cells[3].text, "",
            "a blank copied cell clears the value"
        );
        let edits = plan.edits(None);
        assert!(edits.len() >= 3);
        assert!(plan.summary().contains("2 are not numbers"));
        assert!(plan.summary().contains("2 lines go past the last run"));
    }

    #[test]
    fn paste_from_several_columns_uses_the_first() {
        let p = demo_project();
        let plan = plan_paste(&p, 1, &[5, 6], "80.5\tx\n81\ty\n");
        assert!(plan.extra_columns);
        assert_eq!(
            plan.cells
                .iter()
                .map(|c| c.text.as_str())
                .collect::<Vec<_>>(),
            ["80.5", "81"]
        );
        assert!(plan.bad_cells().is_empty());
    }
}
