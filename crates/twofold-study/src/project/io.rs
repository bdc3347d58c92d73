//! Project files: RON text with a `format_version`, read with migration, written atomically.
//!
//! Reading: the version is looked at first, so a file made by a newer build is refused with that
//! reason rather than with a confusing syntax error about fields this build does not know. Older
//! versions are migrated (see [`super::migrate`]). Syntax and shape errors name the line and the
//! column. After parsing, the structure is checked (one coded setting per factor and one cell per
//! response in every run) so no later step can trip over a hand-edited file.
//!
//! Writing: [`write_atomic`] writes a temporary file in the same folder, flushes it to the disk,
//! renames it over the target and flushes the folder, so a crash or a full disk at any moment
//! leaves either the old file or the new one, never a half-written mix.

use std::fs;
use std::io;
use std::path::{Path, PathBuf};

use serde::Deserialize;

use super::migrate;
use super::model::{FORMAT_VERSION, Project};
pub use crate::files::write_atomic;

/// Why a project file could not be read or written.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum FileError {
    /// The operating system refused to read or write the file.
    #[error("cannot {action} {path}: {source}")]
    Io {
        /// `"read"` or `"write"` (and similar verbs).
        action: &'static str,
        /// The file concerned.
        path: PathBuf,
        /// The operating system's reason.
        #[source]
        source: io::Error,
    },
    /// The text is not a well-formed project file.
    #[error("line {line}, column {column}: {message}")]
    Syntax {
        /// 1-based line of the problem.
        line: usize,
        /// 1-based column of the problem.
        column: usize,
        /// What the reader expected, in its words.
        message: String,
    },
    /// The file was written by a newer build of the program.
    #[error(
        "this file was made by a newer version of Twofold (file format {found}; this version reads formats up to {supported}); update Twofold to open it"
    )]
    TooNew {
        /// Format version in the file.
        found: u32,
        /// Newest format this build reads.
        supported: u32,
    },
    /// The file parses but its parts do not fit together.
    #[error("the file is inconsistent: {0}")]
    Structure(String),
    /// The project could not be turned into text (not expected in practice).
    #[error("cannot write the project as text: {0}")]
    Serialize(String),
}

impl FileError {
    /// A syntax error from the RON reader, with its position.
    pub(crate) fn from_ron(e: &ron::error::SpannedError) -> FileError {
        let mut message = e.code.to_string();
        // The reader's messages start with a capital; ours are lowercase after the position.
        if let Some(first) = message.chars().next() {
            let lower: String = first.to_lowercase().collect();
            message.replace_range(..first.len_utf8(), &lower);
        }
        FileError::Syntax {
            line: e.span.start.line,
            column: e.span.start.col,
            message,
        }
    }
}

/// Only the version field, read before anything else. Named like the real struct, since RON
/// checks a struct name when the file spells one out.
#[derive(Deserialize)]
#[serde(rename = "Project")]
struct VersionProbe {
    /// Absent in the earliest files, which are version 0.
    #[serde(default)]
    format_version: u32,
}

/// Reads a project from RON text: version check, migration, structure check.
pub fn project_from_str(text: &str) -> Result<Project, FileError> {
    let probe: VersionProbe = ron::from_str(text).map_err(|e| FileError::from_ron(&e))?;
    let project = match probe.format_version {
        v if v > FORMAT_VERSION => {
            return Err(FileError::TooNew {
                found: v,
                supported: FORMAT_VERSION,
            });
        }
        0 => migrate::from_v0(text)?,
        _ => ron::from_str::<Project>(text).map_err(|e| FileError::from_ron(&e))?,
    };
    project.check_structure().map_err(FileError::Structure)?;
    Ok(project)
}

/// The project as RON text in the current format, with a one-line header comment.
pub fn project_to_string(project: &Project) -> Result<String, FileError> {
    let mut p = project.clone();
    p.format_version = FORMAT_VERSION;
    let body = ron::ser::to_string_pretty(&p, pretty())
        .map_err(|e| FileError::Serialize(e.to_string()))?;
    Ok(format!(
        "// Twofold project file, format {FORMAT_VERSION}. Plain text: keep a copy before editing by hand.\n{body}\n"
    ))
}

/// Layout of written files: one field per line down to a run's fields; deeper values (coded
/// settings, levels, model choices) on one line, so a run sheet stays readable by eye.
pub(crate) fn pretty() -> ron::ser::PrettyConfig {
    ron::ser::PrettyConfig::default().depth_limit(3)
}

/// Reads a project file.
pub fn load_project(path: &Path) -> Result<Project, FileError> {
    let text = fs::read_to_string(path).map_err(|source| FileError::Io {
        action: "read",
        path: path.to_path_buf(),
        source,
    })?;
    project_from_str(&text)
}

/// Writes a project file atomically (see [`write_atomic`]).
pub fn save_project(path: &Path, project: &Project) -> Result<(), FileError> {
    let text = project_to_string(project)?;
    write_atomic(path, text.as_bytes()).map_err(|source| FileError::Io {
        action: "write",
        path: path.to_path_buf(),
        source,
    })
}

impl Project {
    /// Checks the invariants every other part relies on; the message names the first run or part
    /// that breaks them, in words for the engineer.
    pub fn check_structure(&self) -> Result<(), String> {
        let k = self.factors.len();
        if k > super::model::MAX_FACTORS {
            return Err(format!(
                "{k} factors; a project has at most {}",
                super::model::MAX_FACTORS
            ));
        }
        let m = self.responses.len();
        for (i, run) in self.runs.iter().enumerate() {
            let n = i + 1;
            if run.levels.len() != k {
                return Err(format!(
                    "run {n} has {} factor settings but the project has {k} factors",
                    run.levels.len()
                ));
            }
            if let Some(v) = run.levels.iter().find(|v| !(-1..=1).contains(*v)) {
                return Err(format!(
                    "run {n} has the coded setting {v}; only -1, 0 and 1 are allowed"
                ));
            }
            if run.values.len() != m {
                return Err(format!(
                    "run {n} has {} values but the project has {m} responses",
                    run.values.len()
                ));
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::files::{SaveStep, write_atomic_with};
    use crate::project::{Cell, Factor, ResponseDef, RunRecord, RunStatus};

    fn sample() -> Project {
        let mut p = Project::new("Bench trial");
        p.description =
            "Two factors, one response.\nSecond line with “quotes” and \\ backslash".into();
        p.factors
            .push(Factor::numeric("Temperature", "°C", 160.0, 200.0));
        p.factors[0].safe_range = Some((150.0, 210.0));
        p.factors
            .push(Factor::categorical("Supplier", "North", "South"));
        p.responses.push(ResponseDef::new("Gloss", "GU"));
        p.responses[0].model.terms = vec!["A".into(), "AB".into()];
        p.runs.push(RunRecord {
            std_order: 1,
            run_order: 2,
            block: 1,
            centre: false,
            replicate: 1,
            levels: vec![-1, 1],
            values: vec![Cell::new("12,5x")],
            status: RunStatus::Excluded {
                reason: "oven door open".into(),
            },
            note: "note".into(),
            entered_at: Some("2025-03-04T10:22:05Z".into()),
            whole_plot: None,
        });
        p.runs.push(RunRecord {
            std_order: 2,
            run_order: 1,
            block: 1,
            centre: false,
            replicate: 1,
            levels: vec![1, 1],
            values: vec![Cell::new("0.1")],
            status: RunStatus::Done,
            note: String::new(),
            entered_at: None,
            whole_plot: None,
        });
        p
    }

    #[test]
    fn round_trip_keeps_everything() {
        let p = sample();
        let text = project_to_string(&p).unwrap();
        let back = project_from_str(&text).unwrap();
        assert_eq!(back, p);
    }

    #[test]
    fn too_new_version_is_refused_with_reason() {
        let text = project_to_string(&sample()).unwrap().replace(
            "format_version: 1,",
            "format_version: 7, flux_capacitor: true,",
        );
        let err = project_from_str(&text).unwrap_err();
        assert!(
            matches!(
                err,
                FileError::TooNew {
                    found: 7,
                    supported: 1
                }
            ),
            "{err:?}"
        );
        assert!(err.to_string().contains("made by a newer version"), "{err}");
    }

    #[test]
    fn bad_ron_names_line_and_column() {
        let text = "(\n    format_version: 1,\n    name: \"x\"\n    description: \"\",\n)";
        let err = project_from_str(text).unwrap_err();
        match &err {
            FileError::Syntax { line, column, .. } => {
                assert_eq!((*line, *column), (4, 5), "{err}");
            }
            other => panic!("{other:?}"),
        }
        assert!(
            err.to_string()
                .starts_with("line 4, column 5: expected comma"),
            "{err}"
        );
    }

    #[test]
    fn missing_field_names_position() {
        let text = "(\n    format_version: 1,\n    name: \"x\",\n)";
        let err = project_from_str(text).unwrap_err();
        let msg = err.to_string();
        assert!(msg.starts_with("line "), "{msg}");
        assert!(msg.contains("factors"), "{msg}");
    }

    #[test]
    fn inconsistent_runs_are_refused() {
        let mut p = sample();
        p.runs[1].levels.push(1);
        let text = project_to_string(&p).unwrap();
        let err = project_from_str(&text).unwrap_err();
        assert_eq!(
            err.to_string(),
            "the file is inconsistent: run 2 has 3 factor settings but the project has 2 factors"
        );
        let mut p = sample();
        p.runs[0].levels[0] = 2;
        let err = project_from_str(&project_to_string(&p).unwrap()).unwrap_err();
        assert!(err.to_string().contains("coded setting 2"), "{err}");
    }

    #[test]
    fn save_and_load_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("trial.ron");
        save_project(&path, &sample()).unwrap();
        assert_eq!(load_project(&path).unwrap(), sample());
        let leftovers: Vec<_> = fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(leftovers.len(), 1, "no temporary file is left behind");
    }

    #[test]
    fn save_interrupted_before_rename_keeps_previous_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("trial.ron");
        save_project(&path, &sample()).unwrap();
        let before = fs::read(&path).unwrap();
        let mut changed = sample();
        changed.name = "Changed".into();
        let text = project_to_string(&changed).unwrap();
        let mut seen = Vec::new();
        let err = write_atomic_with(&path, text.as_bytes(), &mut |step| {
            seen.push(step);
            Err(io::Error::other("power cut"))
        })
        .unwrap_err();
        assert_eq!(err.to_string(), "power cut");
        assert_eq!(seen, [SaveStep::BeforeRename]);
        assert_eq!(fs::read(&path).unwrap(), before, "the old file is intact");
        let names: Vec<_> = fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(
            names,
            [std::ffi::OsString::from("trial.ron")],
            "temporary file removed"
        );
        // And the same write without the failure replaces the file.
        write_atomic(&path, text.as_bytes()).unwrap();
        assert_eq!(load_project(&path).unwrap().name, "Changed");
    }

    #[test]
    fn unreadable_file_names_the_path() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("missing.ron");
        let err = load_project(&path).unwrap_err();
        let msg = err.to_string();
        assert!(msg.starts_with("cannot read "), "{msg}");
        assert!(msg.contains("missing.ron"), "{msg}");
    }
}
