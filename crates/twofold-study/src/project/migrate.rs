//! Reading project files written in older formats.
//!
//! # Format 0
//! The first shape of the file, before `format_version` existed (a file without the field is
//! format 0). Everything sat at the top level:
//!
//! ```text
//! (
//!     name: "Oven trial",
//!     factors: [
//!         (name: "Temperature", unit: "°C", low: 160.0, high: 200.0),
//!         (name: "Supplier", unit: "", low: -1.0, high: 1.0, labels: Some(("North", "South"))),
//!     ],
//!     generators: ["E=ABCD"],
//!     centre_points: 2,
//!     seed: 7,
//!     responses: ["Gloss"],
//!     runs: [
//!         (std_order: 1, run_order: 3, levels: [-1, 1], values: ["12.5"], excluded: false, note: ""),
//!     ],
//! )
//! ```
//!
//! A factor with `labels` was categorical. There were no units on responses, no safe ranges, no
//! blocks or replicates (one block, one replicate), no analysis choices, and an exclusion had no
//! reason. Migration to format 1 keeps every value and note as typed; an excluded run gets the
//! reason "excluded (no reason recorded)", and a run with any typed value counts as done.

use serde::Deserialize;

use super::cell::Cell;
use super::io::FileError;
use super::model::{
    BlockChoice, DesignSettings, FORMAT_VERSION, Factor, FactorKind, Project, ResponseDef,
    RunRecord, RunStatus,
};

#[derive(Deserialize)]
#[serde(rename = "Project")]
struct ProjectV0 {
    name: String,
    factors: Vec<FactorV0>,
    #[serde(default)]
    generators: Vec<String>,
    #[serde(default)]
    centre_points: u32,
    #[serde(default)]
    seed: u64,
    #[serde(default)]
    responses: Vec<String>,
    #[serde(default)]
    runs: Vec<RunV0>,
}

#[derive(Deserialize)]
#[serde(rename = "Factor")]
struct FactorV0 {
    name: String,
    #[serde(default)]
    unit: String,
    low: f64,
    high: f64,
    #[serde(default)]
    labels: Option<(String, String)>,
}

#[derive(Deserialize)]
#[serde(rename = "Run")]
struct RunV0 {
    std_order: u32,
    run_order: u32,
    levels: Vec<i8>,
    #[serde(default)]
    values: Vec<String>,
    #[serde(default)]
    excluded: bool,
    #[serde(default)]
    note: String,
}

/// The reason given to runs excluded in a format-0 file, which recorded none.
pub const V0_EXCLUSION_REASON: &str = "excluded (no reason recorded)";

/// Reads a format-0 file and brings it to the current format.
pub(crate) fn from_v0(text: &str) -> Result<Project, FileError> {
    let old: ProjectV0 = ron::from_str(text).map_err(|e| FileError::from_ron(&e))?;
    let factors = old
        .factors
        .into_iter()
        .map(|f| Factor {
            name: f.name,
            unit: f.unit,
            kind: match f.labels {
                Some((low_label, high_label)) => FactorKind::Categorical {
                    low_label,
                    high_label,
                },
                None => FactorKind::Numeric {
                    low: f.low,
                    high: f.high,
                },
            },
            safe_range: None,
            noise_sd: None,
            hard_to_change: false,
        })
        .collect();
    let runs = old
        .runs
        .into_iter()
        .map(|r| {
            let values: Vec<Cell> = r.values.into_iter().map(Cell::new).collect();
            let status = if r.excluded {
                RunStatus::Excluded {
                    reason: V0_EXCLUSION_REASON.to_string(),
                }
            } else if values.iter().any(Cell::is_typed) {
                RunStatus::Done
            } else {
                RunStatus::ToDo
            };
            RunRecord {
                std_order: r.std_order,
                run_order: r.run_order,
                block: 1,
                centre: !r.levels.is_empty() && r.levels.iter().all(|&v| v == 0),
                replicate: 1,
                levels: r.levels,
                values,
                status,
                note: r.note,
                entered_at: None,
                whole_plot: None,
            }
        })
        .collect();
    Ok(Project {
        format_version: FORMAT_VERSION,
        name: old.name,
        description: String::new(),
        factors,
        power: Default::default(),
        design: DesignSettings {
            generators: old.generators,
            centre_points_per_block: old.centre_points,
            blocks: BlockChoice::Count(1),
            seed: old.seed,
            ..DesignSettings::default()
        },
        responses: old
            .responses
            .iter()
            .map(|n| ResponseDef::new(n, ""))
            .collect(),
        runs,
        runs_outdated: false,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::io::project_from_str;

    /// A hand-written format-0 file, as the first builds wrote them.
    const V0_FILE: &str = r#"// written by hand in the format-0 shape
(
    name: "Oven trial",
    factors: [
        (name: "Temperature", unit: "°C", low: 160.0, high: 200.0),
        (name: "Supplier", unit: "", low: -1.0, high: 1.0, labels: Some(("North", "South"))),
    ],
    generators: [],
    centre_points: 0,
    seed: 7,
    responses: ["Gloss"],
    runs: [
        (std_order: 1, run_order: 3, levels: [-1, -1], values: ["12.5"], excluded: false, note: ""),
        (std_order: 2, run_order: 1, levels: [1, -1], values: ["13,1"], excluded: true, note: "door open"),
        (std_order: 3, run_order: 4, levels: [-1, 1], values: [""], excluded: false, note: ""),
        (std_order: 4, run_order: 2, levels: [1, 1], values: ["n/a"], excluded: false, note: "sensor"),
    ],
)
"#;

    #[test]
    fn v0_file_migrates_to_current_format() {
        let p = project_from_str(V0_FILE).unwrap();
        assert_eq!(p.format_version, FORMAT_VERSION);
        assert_eq!(p.name, "Oven trial");
        assert_eq!(
            p.factors[0].kind,
            FactorKind::Numeric {
                low: 160.0,
                high: 200.0
            }
        );
        assert_eq!(p.factors[0].unit, "°C");
        assert_eq!(
            p.factors[1].kind,
            FactorKind::Categorical {
                low_label: "North".into(),
                high_label: "South".into()
            }
        );
        assert_eq!(p.design.seed, 7);
        assert_eq!(p.design.replicates, 1);
        assert_eq!(p.responses.len(), 1);
        assert_eq!(p.responses[0].name, "Gloss");
        assert_eq!(p.runs.len(), 4);
        assert_eq!(p.runs[0].status, RunStatus::Done);
        assert_eq!(
            p.runs[1].status,
            RunStatus::Excluded {
                reason: V0_EXCLUSION_REASON.into()
            }
        );
        assert_eq!(p.runs[1].note, "door open");
        assert_eq!(p.runs[2].status, RunStatus::ToDo);
        // Bad text survives migration untouched.
        assert_eq!(p.runs[3].values[0].text, "n/a");
        assert_eq!(p.runs[1].values[0].text, "13,1");
        assert!(
            p.runs
                .iter()
                .all(|r| r.block == 1 && r.replicate == 1 && !r.centre)
        );
        // Saved again, it is a current-format file that reads back the same.
        let again = project_from_str(&crate::project::io::project_to_string(&p).unwrap()).unwrap();
        assert_eq!(again, p);
    }

    #[test]
    fn broken_v0_file_names_position() {
        let text = V0_FILE.replace("seed: 7,", "seed: seven,");
        let err = project_from_str(&text).unwrap_err();
        assert!(matches!(err, FileError::Syntax { line: 10, .. }), "{err}");
    }
}
