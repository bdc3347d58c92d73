//! From the project (or a coded table read into a project) to the core's table of one response.
//!
//! [`response_data`] turns the run sheet into [`Observations`]: one row per run in the sheet's
//! order, coded settings as numbers, the run's block, the cell read as a number ([`CellValue`]:
//! empty or bad text become missing values, and bad text is listed with its reason so the window
//! can say why a run is left out), and excluded runs marked excluded. The response transform is
//! applied before anything is estimated, so effects, model and diagnostics are all on the
//! analysis scale; Box–Cox works on the raw values.
//!
//! [`project_from_coded`] reads a coded table (see [`crate::interchange::coded`]) into the same
//! project model, so a table and a project file go through the one report builder.

use twofold_core::data::Observations;
use twofold_core::term::factor_letter;
use twofold_core::transform::Transform;

use super::ReportError;
use crate::interchange::coded::CodedTable;
use crate::project::{
    Cell, CellValue, Factor, FactorKind, Project, ResponseDef, ResponseTransform, RunRecord,
    RunStatus,
};

/// The response of one project turned into the core's table.
#[derive(Debug, Clone, PartialEq)]
pub struct ResponseData {
    /// The table as measured (row `i` is `project.runs[i]`).
    pub raw: Observations,
    /// The table after the response transform (what effects and model use).
    pub analysed: Observations,
    /// The core's transform.
    pub transform: Transform,
    /// Runs (0-based positions in the sheet) whose cell is empty.
    pub missing: Vec<usize>,
    /// Runs whose cell holds text that is not a number, with the reason.
    pub bad: Vec<(usize, String)>,
    /// Runs excluded by the engineer.
    pub excluded: Vec<usize>,
    /// Runs that enter the analysis (a number, not excluded).
    pub used: Vec<usize>,
}

/// The core transform for the project's choice. A power of 0 is the logarithm (the limit of the
/// Box–Cox family).
pub fn core_transform(t: ResponseTransform) -> Transform {
    match t {
        ResponseTransform::None => Transform::None,
        ResponseTransform::Ln => Transform::Ln,
        ResponseTransform::Log10 => Transform::Log10,
        ResponseTransform::Sqrt => Transform::Sqrt,
        ResponseTransform::Reciprocal => Transform::Inverse,
        ResponseTransform::Power { lambda: 0.0 } => Transform::Ln,
        ResponseTransform::Power { lambda } => Transform::Power(lambda),
    }
}

/// The project's transform for a core transform (the inverse of [`core_transform`]); `None` for
/// a transform the project cannot store.
pub fn project_transform(t: Transform) -> Option<ResponseTransform> {
    match t {
        Transform::None => Some(ResponseTransform::None),
        Transform::Ln => Some(ResponseTransform::Ln),
        Transform::Log10 => Some(ResponseTransform::Log10),
        Transform::Sqrt => Some(ResponseTransform::Sqrt),
        Transform::Inverse => Some(ResponseTransform::Reciprocal),
        Transform::Power(lambda) => Some(ResponseTransform::Power { lambda }),
        _ => None,
    }
}

/// Builds the core's table for response `response` (see the module documentation).
pub fn response_data(
    project: &Project,
    response: usize,
    transform: ResponseTransform,
) -> Result<ResponseData, ReportError> {
    if response >= project.responses.len() {
        return Err(ReportError::NoSuchResponse(response));
    }
    if project.runs.is_empty() {
        return Err(ReportError::NoRuns);
    }
    let n = project.runs.len();
    let mut levels = Vec::with_capacity(n);
    let mut blocks = Vec::with_capacity(n);
    let mut values = Vec::with_capacity(n);
    let mut excluded_flags = Vec::with_capacity(n);
    let (mut missing, mut bad, mut excluded, mut used) = (vec![], vec![], vec![], vec![]);
    for (i, run) in project.runs.iter().enumerate() {
        levels.push(run.levels.iter().map(|&v| f64::from(v)).collect());
        blocks.push(run.block);
        let is_excluded = run.status.is_excluded();
        excluded_flags.push(is_excluded);
        if is_excluded {
            excluded.push(i);
        }
        let value = match run.values.get(response).map(|c| c.value()) {
            Some(CellValue::Number(x)) => Some(x),
            Some(CellValue::Bad { reason }) => {
                bad.push((i, reason));
                None
            }
            Some(CellValue::Empty) | None => {
                missing.push(i);
                None
            }
        };
        if value.is_some() && !is_excluded {
            used.push(i);
        }
        values.push(value);
    }
    let raw = Observations::new(
        project.factors.len(),
        levels,
        blocks,
        values,
        excluded_flags,
    )?;
    let transform = core_transform(transform);
    let analysed = raw.with_response(transform.apply_column(raw.response())?)?;
    Ok(ResponseData {
        raw,
        analysed,
        transform,
        missing,
        bad,
        excluded,
        used,
    })
}

/// Each factor's (low, high) in its unit; an error names the first categorical factor.
pub fn natural_ranges(project: &Project) -> Result<Vec<(f64, f64)>, ReportError> {
    project
        .factors
        .iter()
        .map(|f| match f.kind {
            FactorKind::Numeric { low, high } => Ok((low, high)),
            FactorKind::Categorical { .. } => Err(ReportError::Categorical(f.name.clone())),
        })
        .collect()
}

/// Each factor's (low, high) for predictions: categorical factors as (−1, +1), their coding.
pub fn plot_ranges(project: &Project) -> Vec<(f64, f64)> {
    project
        .factors
        .iter()
        .map(|f| match f.kind {
            FactorKind::Numeric { low, high } => (low, high),
            // Two labels have no scale: their "natural" unit is the coding itself.
            FactorKind::Categorical { .. } => (-1.0, 1.0),
        })
        .collect()
}

/// A coded table read into the project model: factors named `A`, `B`, ... from −1 to +1 (so the
/// natural units are the coding), one run per data row in file order (standard and run order
/// both the row number), the table's blocks (block 1 without a block column), every run done,
/// and one response per response column whose cells hold the numbers (written so that reading
/// them back gives the same bits; a missing value is an empty cell). `name` names the project.
pub fn project_from_coded(table: &CodedTable, name: &str) -> Project {
    let mut p = Project::new(name);
    p.factors = (0..table.factor_count)
        .map(|i| {
            let letter = factor_letter(i).map_or_else(|| format!("X{}", i + 1), String::from);
            Factor::numeric(&letter, "", -1.0, 1.0)
        })
        .collect();
    p.responses = table
        .responses
        .iter()
        .map(|r| ResponseDef::new(&r.name, ""))
        .collect();
    p.runs = table
        .levels
        .iter()
        .enumerate()
        .map(|(i, row)| {
            let order = u32::try_from(i + 1).unwrap_or(u32::MAX);
            RunRecord {
                std_order: order,
                run_order: order,
                block: table.blocks.get(i).copied().unwrap_or(1),
                centre: row.iter().all(|&v| v == 0.0),
                replicate: 1,
                // The reader admits only −1, 0 and +1.
                levels: row.iter().map(|&v| v as i8).collect(),
                values: table
                    .responses
                    .iter()
                    .map(|r| match r.values.get(i).copied().flatten() {
                        // Rust writes the shortest text that reads back as the same number.
                        Some(v) => Cell::new(format!("{v}")),
                        None => Cell::new(""),
                    })
                    .collect(),
                status: RunStatus::Done,
                note: String::new(),
                entered_at: None,
                whole_plot: table.whole_plots.get(i).copied(),
            }
        })
        .collect();
    p
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::interchange::coded::read_coded_csv;
    use crate::project::demo_project;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-9
    }

    #[test]
    fn conversion_reads_cells_status_and_blocks() {
        let mut p = demo_project();
        p.runs[0].values[0].text = "12,5x".into();
        p.runs[1].values[0].text = "12,5".into();
        p.runs[2].status = RunStatus::Excluded {
            reason: "oven door open".into(),
        };
        let d = response_data(&p, 0, ResponseTransform::None).unwrap();
        assert_eq!(d.raw.run_count(), 18);
        assert_eq!(d.raw.response()[0], None);
        assert_eq!(d.raw.response()[1], Some(12.5));
        assert_eq!(d.bad, vec![(0, "`x` is not part of a number".to_string())]);
        let missing_run = p.runs.iter().position(|r| r.std_order == 11).unwrap();
        assert_eq!(d.missing, vec![missing_run]);
        assert_eq!(d.excluded, vec![2]);
        assert!(d.raw.excluded()[2]);
        assert_eq!(d.used.len(), 18 - 3);
        assert_eq!(d.raw.used_runs(), d.used);
        assert!(d.raw.is_centre(16) && d.raw.is_centre(17));
        assert_eq!(
            response_data(&p, 5, ResponseTransform::None),
            Err(ReportError::NoSuchResponse(5))
        );
    }

    #[test]
    fn transform_applies_before_analysis() {
        let p = demo_project();
        let d = response_data(&p, 1, ResponseTransform::Ln).unwrap();
        let r0 = d.raw.response()[0].unwrap();
        assert!(close(d.analysed.response()[0].unwrap(), r0.ln()));
        assert_eq!(
            core_transform(ResponseTransform::Power { lambda: 0.0 }),
            Transform::Ln
        );
        for t in [
            Transform::None,
            Transform::Ln,
            Transform::Sqrt,
            Transform::Power(0.5),
        ] {
            assert_eq!(project_transform(t).map(core_transform), Some(t));
        }
        let mut q = p.clone();
        q.runs[0].values[1].text = "-1".into();
        let err = response_data(&q, 1, ResponseTransform::Sqrt).unwrap_err();
        assert!(err.to_string().contains("non-negative"), "{err}");
    }

    #[test]
    fn coded_table_becomes_the_same_observations() {
        // Awkward numbers on purpose: the cell text must read back to the same bits.
        let text = "A,B,block,y,z\n-1,-1,d1,0.1,\n1,-1,d1,1e-7,2\n-1,1,d2,,3\n1,1,d2,123456789.123,4\n0,0,d1,-2.5e5,5\n";
        let table = read_coded_csv(text.as_bytes()).unwrap();
        let p = project_from_coded(&table, "t");
        assert_eq!(p.factors[1].name, "B");
        assert_eq!(p.responses[1].name, "z");
        assert!(p.runs[4].centre && !p.runs[0].centre);
        for index in 0..2 {
            let from_table = table.observations(index).unwrap();
            let d = response_data(&p, index, ResponseTransform::None).unwrap();
            assert_eq!(d.raw.levels(), from_table.levels());
            assert_eq!(d.raw.blocks(), from_table.blocks());
            let bits =
                |v: &[Option<f64>]| v.iter().map(|x| x.map(f64::to_bits)).collect::<Vec<_>>();
            assert_eq!(bits(d.raw.response()), bits(from_table.response()));
        }
    }
}
