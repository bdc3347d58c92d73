//! The run sheet as CSV, and importing response values from CSV.
//!
//! # The file we write
//! One header row, then one row per run in run order. Columns, in order:
//!
//! | column            | content                                                      |
//! |-------------------|--------------------------------------------------------------|
//! | `run`             | run order (1-based): the key the import matches on           |
//! | `std order`       | standard order                                               |
//! | `block`           | block label                                                  |
//! | `replicate`       | replicate number                                             |
//! | `centre point`    | `yes` or `no`                                                |
//! | `A: name (unit)`… | each factor's setting in natural units (number or label)     |
//! | `A coded`…        | each factor's coded setting: -1, 0 or 1                      |
//! | `name (unit)`…    | each response cell exactly as typed                          |
//! | `status`          | `to do`, `done` or `excluded`                                |
//! | `excluded because`| the reason of an excluded run                                |
//! | `note`            | the run's note                                               |
//! | `entered at`      | when a value was last entered, as recorded                   |
//!
//! Every text cell (headers included) passes the formula-injection guard ([`super::guard`]);
//! numbers are written as plain numbers. [`read_run_sheet`] reads such a file back into the
//! exact run records it came from.
//!
//! # Importing responses
//! [`plan_import`] reads any CSV with a `run` column and one or more columns named like a
//! response (`Yield (%)` or just `Yield`, case and surrounding spaces ignored) and returns an
//! [`ImportPlan`]: what would change, what would be overwritten, and every row that could not be
//! matched, with the reason. Nothing changes until the caller applies [`ImportPlan::edits`]
//! (after the engineer confirmed the preview).

use std::collections::{BTreeMap, HashMap};
use std::path::Path;

use super::guard::{guard, unguard};
use crate::numbers;
use crate::project::{
    Cell, CellValue, Edit, Factor, FactorKind, Project, ResponseDef, RunRecord, RunStatus,
};

/// Why a CSV file could not be read at all (row-level problems are reported in the plan).
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CsvError {
    /// The file has no header row.
    #[error("the file is empty: it needs a header row naming the columns")]
    Empty,
    /// The CSV itself is malformed (e.g. an unclosed quote).
    #[error("line {line}: {message}")]
    Syntax {
        /// 1-based line number.
        line: u64,
        /// What the reader reported.
        message: String,
    },
    /// No column holds the run number.
    #[error("no `run` column: the import matches rows to runs by run number")]
    NoRunColumn,
    /// No column is named like a response of the project.
    #[error(
        "no column is named like a response of this project (expected one of: {expected}); the file has: {found}"
    )]
    NoResponseColumn {
        /// The project's response headers.
        expected: String,
        /// The file's headers.
        found: String,
    },
    /// A column the run sheet format needs is missing (reading a whole run sheet back).
    #[error("column `{0}` is missing")]
    MissingColumn(String),
    /// A cell of a run sheet file cannot be read (reading a whole run sheet back).
    #[error("line {line}, column `{column}`: {message}")]
    BadCell {
        /// 1-based line number.
        line: u64,
        /// Column header.
        column: String,
        /// What is wrong.
        message: String,
    },
    /// Writing the file failed.
    #[error("could not write `{path}`: {message}")]
    Write {
        /// The file.
        path: String,
        /// What the system reported.
        message: String,
    },
}

/// The header of a factor's natural-unit column.
pub fn factor_header(letter: char, f: &Factor) -> String {
    if f.unit.trim().is_empty() {
        format!("{letter}: {}", f.name)
    } else {
        format!("{letter}: {} ({})", f.name, f.unit)
    }
}

/// The header of a response column.
pub fn response_header(r: &ResponseDef) -> String {
    if r.unit.trim().is_empty() {
        r.name.clone()
    } else {
        format!("{} ({})", r.name, r.unit)
    }
}

fn status_text(s: &RunStatus) -> &'static str {
    match s {
        RunStatus::ToDo => "to do",
        RunStatus::Done => "done",
        RunStatus::Excluded { .. } => "excluded",
    }
}

/// A cell to write: numbers as numbers, text guarded.
enum Out {
    Number(String),
    Text(String),
}

fn natural(f: &Factor, coded: i8) -> Out {
    match (&f.kind, coded) {
        (FactorKind::Numeric { low, .. }, -1) => Out::Number(numbers::level_plain(*low)),
        (FactorKind::Numeric { high, .. }, 1) => Out::Number(numbers::level_plain(*high)),
        (FactorKind::Numeric { low, high }, _) => {
            Out::Number(numbers::level_plain(0.5 * (low + high)))
        }
        (FactorKind::Categorical { low_label, .. }, -1) => Out::Text(low_label.clone()),
        (FactorKind::Categorical { high_label, .. }, _) => Out::Text(high_label.clone()),
    }
}

fn letters() -> &'static [char] {
    &twofold_core::term::LETTERS
}

/// The run sheet as CSV text (see the module documentation for the columns).
pub fn run_sheet_csv(project: &Project) -> String {
    let mut header: Vec<String> = ["run", "std order", "block", "replicate", "centre point"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    for (i, f) in project.factors.iter().enumerate() {
        header.push(factor_header(letters().get(i).copied().unwrap_or('?'), f));
    }
    for i in 0..project.factors.len() {
        header.push(format!(
            "{} coded",
            letters().get(i).copied().unwrap_or('?')
        ));
    }
    for r in &project.responses {
        header.push(response_header(r));
    }
    for h in ["status", "excluded because", "note", "entered at"] {
        header.push(h.to_string());
    }
    let mut order: Vec<&RunRecord> = project.runs.iter().collect();
    order.sort_by_key(|r| (r.run_order, r.std_order));
    let mut rows: Vec<Vec<Out>> = Vec::with_capacity(order.len() + 1);
    rows.push(header.into_iter().map(Out::Text).collect());
    for run in order {
        let mut row = vec![
            Out::Number(run.run_order.to_string()),
            Out::Number(run.std_order.to_string()),
            Out::Number(run.block.to_string()),
            Out::Number(run.replicate.to_string()),
            Out::Text(if run.centre { "yes" } else { "no" }.to_string()),
        ];
        for (i, f) in project.factors.iter().enumerate() {
            row.push(natural(f, run.levels.get(i).copied().unwrap_or(0)));
        }
        for i in 0..project.factors.len() {
            row.push(Out::Number(
                run.levels.get(i).copied().unwrap_or(0).to_string(),
            ));
        }
        for i in 0..project.responses.len() {
            // Typed text is kept exactly; the guard leaves plain numbers as numbers.
            row.push(Out::Text(
                run.values
                    .get(i)
                    .map(|c| c.text.clone())
                    .unwrap_or_default(),
            ));
        }
        row.push(Out::Text(status_text(&run.status).to_string()));
        row.push(Out::Text(match &run.status {
            RunStatus::Excluded { reason } => reason.clone(),
            _ => String::new(),
        }));
        row.push(Out::Text(run.note.clone()));
        row.push(Out::Text(run.entered_at.clone().unwrap_or_default()));
        rows.push(row);
    }
    let mut writer = ::csv::WriterBuilder::new()
        .terminator(::csv::Terminator::CRLF)
        .from_writer(Vec::new());
    for row in rows {
        let cells: Vec<String> = row
            .into_iter()
            .map(|c| match c {
                Out::Number(n) => n,
                Out::Text(t) => guard(&t).into_owned(),
            })
            .collect();
        // Writing into memory cannot fail.
        let _ = writer.write_record(&cells);
    }
    let bytes = writer.into_inner().unwrap_or_default();
    String::from_utf8(bytes).unwrap_or_default()
}

/// Writes the run sheet CSV to `path` atomically (UTF-8, with a byte-order mark so spreadsheets
/// read accented names and units correctly).
pub fn write_run_sheet_csv(project: &Project, path: &Path) -> Result<usize, CsvError> {
    let mut bytes = "\u{feff}".as_bytes().to_vec();
    bytes.extend_from_slice(run_sheet_csv(project).as_bytes());
    crate::files::write_atomic(path, &bytes).map_err(|e| CsvError::Write {
        path: path.display().to_string(),
        message: e.to_string(),
    })?;
    Ok(bytes.len())
}

/// A parsed CSV: the header and the records with their line numbers, cells unguarded.
struct Table {
    header: Vec<String>,
    rows: Vec<(u64, Vec<String>)>,
}

fn read_table(text: &str) -> Result<Table, CsvError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut reader = ::csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .from_reader(text.as_bytes());
    let mut header: Option<Vec<String>> = None;
    let mut rows = Vec::new();
    for record in reader.records() {
        let record = record.map_err(|e| CsvError::Syntax {
            line: e.position().map_or(0, |p| p.line()),
            message: e.to_string(),
        })?;
        let line = record.position().map_or(0, |p| p.line());
        let cells: Vec<String> = record.iter().map(|c| unguard(c).into_owned()).collect();
        if header.is_none() {
            header = Some(cells.iter().map(|c| c.trim().to_string()).collect());
        } else {
            rows.push((line, cells));
        }
    }
    let header = header.ok_or(CsvError::Empty)?;
    if header.iter().all(|h| h.is_empty()) {
        return Err(CsvError::Empty);
    }
    Ok(Table { header, rows })
}

fn norm(h: &str) -> String {
    h.trim().to_lowercase()
}

/// Reads a run sheet CSV written by [`run_sheet_csv`] back into run records (in the file's
/// order), checking every cell. Natural-unit columns are derived data and are not read.
pub fn read_run_sheet(project: &Project, text: &str) -> Result<Vec<RunRecord>, CsvError> {
    let table = read_table(text)?;
    let find = |name: &str| -> Result<usize, CsvError> {
        table
            .header
            .iter()
            .position(|h| norm(h) == norm(name))
            .ok_or_else(|| CsvError::MissingColumn(name.to_string()))
    };
    let k = project.factors.len();
    let run_col = find("run")?;
    let std_col = find("std order")?;
    let block_col = find("block")?;
    let rep_col = find("replicate")?;
    let centre_col = find("centre point")?;
    let coded_cols: Vec<usize> = (0..k)
        .map(|i| {
            find(&format!(
                "{} coded",
                letters().get(i).copied().unwrap_or('?')
            ))
        })
        .collect::<Result<_, _>>()?;
    let resp_cols: Vec<usize> = project
        .responses
        .iter()
        .map(|r| find(&response_header(r)))
        .collect::<Result<_, _>>()?;
    let status_col = find("status")?;
    let reason_col = find("excluded because")?;
    let note_col = find("note")?;
    let entered_col = find("entered at")?;
    let mut out = Vec::with_capacity(table.rows.len());
    for (line, row) in &table.rows {
        let cell = |c: usize| row.get(c).map(String::as_str).unwrap_or("");
        let bad = |c: usize, message: &str| CsvError::BadCell {
            line: *line,
            column: table.header.get(c).cloned().unwrap_or_default(),
            message: message.to_string(),
        };
        let number = |c: usize| -> Result<u32, CsvError> {
            cell(c)
                .trim()
                .parse::<u32>()
                .map_err(|_| bad(c, "not a whole number"))
        };
        let levels = coded_cols
            .iter()
            .map(|&c| match cell(c).trim() {
                "-1" => Ok(-1i8),
                "0" => Ok(0),
                "1" | "+1" => Ok(1),
                _ => Err(bad(c, "a coded setting must be -1, 0 or 1")),
            })
            .collect::<Result<Vec<i8>, _>>()?;
        let status = match cell(status_col).trim() {
            "to do" => RunStatus::ToDo,
            "done" => RunStatus::Done,
            "excluded" => RunStatus::Excluded {
                reason: cell(reason_col).to_string(),
            },
            _ => {
                return Err(bad(
                    status_col,
                    "status must be `to do`, `done` or `excluded`",
                ));
            }
        };
        out.push(RunRecord {
            std_order: number(std_col)?,
            run_order: number(run_col)?,
            block: number(block_col)?,
            centre: match cell(centre_col).trim() {
                "yes" => true,
                "no" => false,
                _ => return Err(bad(centre_col, "must be `yes` or `no`")),
            },
            replicate: number(rep_col)?,
            levels,
            values: resp_cols.iter().map(|&c| Cell::new(cell(c))).collect(),
            status,
            note: cell(note_col).to_string(),
            entered_at: Some(cell(entered_col).to_string()).filter(|s| !s.is_empty()),
            whole_plot: None,
        });
    }
    Ok(out)
}

/// One response cell the import would set.
#[derive(Debug, Clone, PartialEq)]
pub struct CellChange {
    /// Position of the run in [`Project::runs`].
    pub run: usize,
    /// Its run-order number (as the engineer knows it).
    pub run_order: u32,
    /// Response position.
    pub response: usize,
    /// 1-based line of the file.
    pub line: u64,
    /// The text now in the cell (empty if none).
    pub old: String,
    /// The text the file brings.
    pub new: String,
    /// Why the new text is not a number, if it is not (it is still imported as typed text, like
    /// a typed cell, and left out of the analysis).
    pub not_a_number: Option<String>,
}

impl CellChange {
    /// Whether a value already in the cell would be replaced.
    pub fn overwrites(&self) -> bool {
        !self.old.trim().is_empty()
    }
}

/// A row of the file that brings nothing in, and why.
#[derive(Debug, Clone, PartialEq)]
pub struct RowProblem {
    /// 1-based line of the file.
    pub line: u64,
    /// The run-number cell as found.
    pub run: String,
    /// What is wrong, in words.
    pub reason: String,
}

/// What an import would do; nothing is changed until [`ImportPlan::edits`] are applied.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ImportPlan {
    /// File columns matched to responses: header and response position.
    pub columns: Vec<(String, usize)>,
    /// File columns not used.
    pub ignored_columns: Vec<String>,
    /// Cells that would change.
    pub changes: Vec<CellChange>,
    /// Rows that were not imported.
    pub problems: Vec<RowProblem>,
    /// Cells equal to what the project holds already.
    pub unchanged: usize,
    /// Empty cells in the file, left alone (an import never clears a value).
    pub empty: usize,
    /// Runs of the project that no row of the file mentions.
    pub runs_not_in_file: Vec<u32>,
}

impl ImportPlan {
    /// The edits that carry out the import (apply them through the history, so one undo takes
    /// them back). `at` is the entry time to record, as the window records typed values.
    pub fn edits(&self, at: Option<String>) -> Vec<Edit> {
        self.changes
            .iter()
            .map(|c| Edit::SetCell {
                run: c.run,
                response: c.response,
                text: c.new.clone(),
                at: at.clone(),
            })
            .collect()
    }

    /// Changes that would replace a value already entered.
    pub fn overwrites(&self) -> usize {
        self.changes.iter().filter(|c| c.overwrites()).count()
    }

    /// A few sentences for the preview: what changes, what is overwritten, what was not matched.
    pub fn summary(&self) -> String {
        let mut s = format!(
            "{} cells would change ({} of them replace a value already entered), {} already hold the same value, {} empty cells are left alone.",
            self.changes.len(),
            self.overwrites(),
            self.unchanged,
            self.empty
        );
        let bad = self
            .changes
            .iter()
            .filter(|c| c.not_a_number.is_some())
            .count();
        if bad > 0 {
            s.push_str(&format!(
                " {bad} of the new values are not numbers and would be left out of the analysis."
            ));
        }
        if !self.problems.is_empty() {
            s.push_str(&format!(" {} rows were not imported:", self.problems.len()));
            for p in self.problems.iter().take(20) {
                s.push_str(&format!(" line {} ({});", p.line, p.reason));
            }
            if self.problems.len() > 20 {
                s.push_str(&format!(" and {} more.", self.problems.len() - 20));
            }
        }
        if !self.ignored_columns.is_empty() {
            s.push_str(&format!(
                " Columns not used: {}.",
                self.ignored_columns.join(", ")
            ));
        }
        s
    }
}

/// Plans importing response values from CSV `text` into `project`, matched by run number.
pub fn plan_import(project: &Project, text: &str) -> Result<ImportPlan, CsvError> {
    let table = read_table(text)?;
    let run_col = table
        .header
        .iter()
        .position(|h| matches!(norm(h).as_str(), "run" | "run order"))
        .ok_or(CsvError::NoRunColumn)?;
    let mut plan = ImportPlan::default();
    let mut taken = vec![false; project.responses.len()];
    let mut matched: Vec<(usize, usize)> = Vec::new();
    for (c, h) in table.header.iter().enumerate() {
        if c == run_col {
            continue;
        }
        let hit = project.responses.iter().enumerate().find(|(i, r)| {
            !taken[*i] && (norm(h) == norm(&response_header(r)) || norm(h) == norm(&r.name))
        });
        match hit {
            Some((i, _)) => {
                taken[i] = true;
                matched.push((c, i));
                plan.columns.push((h.clone(), i));
            }
            None => plan.ignored_columns.push(h.clone()),
        }
    }
    if plan.columns.is_empty() {
        return Err(CsvError::NoResponseColumn {
            expected: project
                .responses
                .iter()
                .map(response_header)
                .collect::<Vec<_>>()
                .join(", "),
            found: table.header.join(", "),
        });
    }
    let by_order: HashMap<u32, usize> = project
        .runs
        .iter()
        .enumerate()
        .map(|(i, r)| (r.run_order, i))
        .collect();
    let mut seen: BTreeMap<u32, u64> = BTreeMap::new();
    let width = table.header.len();
    for (line, row) in &table.rows {
        if row.iter().all(|c| c.trim().is_empty()) {
            continue;
        }
        let run_text = row.get(run_col).cloned().unwrap_or_default();
        let problem = |reason: String| RowProblem {
            line: *line,
            run: run_text.clone(),
            reason,
        };
        if row.len() != width {
            plan.problems.push(problem(format!(
                "{} cells where the header has {width}",
                row.len()
            )));
            continue;
        }
        let Ok(order) = run_text.trim().parse::<u32>() else {
            let reason = if run_text.trim().is_empty() {
                "no run number".to_string()
            } else {
                format!("run number “{}” is not a whole number", run_text.trim())
            };
            plan.problems.push(problem(reason));
            continue;
        };
        let Some(&run) = by_order.get(&order) else {
            plan.problems
                .push(problem(format!("there is no run {order} in this project")));
            continue;
        };
        if let Some(first) = seen.get(&order) {
            plan.problems.push(problem(format!(
                "run {order} appears again (first on line {first}); only the first is used"
            )));
            continue;
        }
        seen.insert(order, *line);
        for &(c, response) in &matched {
            let new = row.get(c).map(|s| s.trim().to_string()).unwrap_or_default();
            if new.is_empty() {
                plan.empty += 1;
                continue;
            }
            let old = project.runs[run]
                .values
                .get(response)
                .map(|x| x.text.clone())
                .unwrap_or_default();
            if old.trim() == new {
                plan.unchanged += 1;
                continue;
            }
            let not_a_number = match Cell::new(new.clone()).value() {
                CellValue::Bad { reason } => Some(reason),
                _ => None,
            };
            plan.changes.push(CellChange {
                run,
                run_order: order,
                response,
                line: *line,
                old,
                new,
                not_a_number,
            });
        }
    }
    let mut missing: Vec<u32> = project
        .runs
        .iter()
        .map(|r| r.run_order)
        .filter(|o| !seen.contains_key(o))
        .collect();
    missing.sort_unstable();
    plan.runs_not_in_file = missing;
    Ok(plan)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::demo_project;

    #[test]
    fn round_trip_is_lossless() {
        let mut p = demo_project();
        // Awkward content in every text field.
        p.runs[0].note = "=HYPERLINK(\"x\"), with \"quotes\"\nand a second line".into();
        p.runs[1].values[0].text = "-12.5".into();
        p.runs[2].values[1].text = "12,5 GU".into();
        p.runs[3].values[0].text = "@risk".into();
        p.runs[4].status = RunStatus::Excluded {
            reason: "-oven door open".into(),
        };
        p.runs[5].values[1].text = "'=already quoted".into();
        p.runs[6].entered_at = Some("2025-03-04T09:30:00".into());
        let text = run_sheet_csv(&p);
        let back = read_run_sheet(&p, &text).unwrap();
        let mut expected = p.runs.clone();
        expected.sort_by_key(|r| (r.run_order, r.std_order));
        assert_eq!(back, expected);
    }

    #[test]
    fn written_cells_are_guarded_but_numbers_are_not() {
        let mut p = demo_project();
        p.runs[0].note = "=1+1".into();
        p.runs[0].values[0].text = "-7".into();
        let text = run_sheet_csv(&p);
        assert!(text.contains(",'=1+1,"), "{text}");
        assert!(text.contains(",-7,"));
        assert!(text.contains(",-1,"), "coded settings stay numbers");
        assert!(
            text.lines()
                .next()
                .unwrap()
                .contains("A: Cure temperature (°C)")
        );
    }

    #[test]
    fn import_reports_unmatched_and_malformed_rows_and_changes_nothing() {
        let p = demo_project();
        let before = p.clone();
        let header = "run,Solvent rubs,Gloss 60° (GU),operator";
        let text = format!(
            "{header}\n1,61,80.5,JS\nx7,50,80,JS\n,51,80,JS\n99,52,80,JS\n2,62\n1,70,70,JS\n3,abc,,JS\n"
        );
        let plan = plan_import(&p, &text).unwrap();
        assert_eq!(p, before, "planning changes nothing");
        let reasons: Vec<(u64, &str)> = plan
            .problems
            .iter()
            .map(|r| (r.line, r.reason.as_str()))
            .collect();
        assert_eq!(reasons.len(), 5, "{reasons:?}");
        assert!(reasons[0].1.contains("not a whole number"), "{reasons:?}");
        assert_eq!(reasons[1].1, "no run number");
        assert!(reasons[2].1.contains("no run 99"));
        assert!(reasons[3].1.contains("2 cells where the header has 4"));
        assert!(reasons[4].1.contains("appears again (first on line 2)"));
        assert_eq!(plan.ignored_columns, vec!["operator".to_string()]);
        let bad: Vec<&CellChange> = plan
            .changes
            .iter()
            .filter(|c| c.not_a_number.is_some())
            .collect();
        assert_eq!(bad.len(), 1);
        assert_eq!(bad[0].new, "abc");
        assert_eq!(plan.empty, 1);
        assert!(plan.summary().contains("5 rows were not imported"));
    }

    #[test]
    fn applying_the_plan_sets_exactly_the_planned_cells() {
        let mut p = demo_project();
        let target = p.runs.iter().position(|r| r.run_order == 4).unwrap();
        let text = "Run , solvent RUBS\n4, 123\n";
        let plan = plan_import(&p, text).unwrap();
        assert_eq!(plan.changes.len(), 1);
        assert!(plan.changes[0].overwrites());
        for e in plan.edits(None) {
            p.apply(e).unwrap();
        }
        assert_eq!(p.runs[target].values[0].text, "123");
    }

    #[test]
    fn files_without_the_needed_columns_are_refused_with_the_reason() {
        let p = demo_project();
        assert_eq!(plan_import(&p, ""), Err(CsvError::Empty));
        assert_eq!(
            plan_import(&p, "Solvent rubs\n3\n"),
            Err(CsvError::NoRunColumn)
        );
        let err = plan_import(&p, "run,thickness\n1,3\n").unwrap_err();
        assert!(
            err.to_string().contains("Solvent rubs (double rubs)"),
            "{err}"
        );
        let err = plan_import(&p, "run,\"Solvent rubs\n1,2\n").unwrap_err();
        assert!(
            matches!(
                err,
                CsvError::Syntax { .. } | CsvError::NoResponseColumn { .. }
            ),
            "{err}"
        );
    }

    #[test]
    fn our_own_export_imports_as_no_change() {
        let p = demo_project();
        let plan = plan_import(&p, &run_sheet_csv(&p)).unwrap();
        assert!(plan.changes.is_empty(), "{:?}", plan.changes);
        assert!(plan.problems.is_empty());
        assert!(plan.runs_not_in_file.is_empty());
    }
}
