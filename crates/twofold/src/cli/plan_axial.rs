//! `twofold plan --augment axial`: the design with its axial block, a face-centred central
//! composite design (see `twofold_core::composite`), and the α choices.

use serde_json::{Value, json};
use twofold_core::composite::{AxialAlphas, add_axial_block, axial_alphas, quadratic_estimable};
use twofold_core::plan::Plan;

/// The axial block added to a plan.
pub(crate) struct Axial {
    /// Its block number (the last).
    pub block: u32,
    /// Axial runs (2k).
    pub axial_runs: usize,
    /// Centre runs in it.
    pub centre_runs: usize,
    /// The α choices; the run sheet holds the face-centred one.
    pub alphas: AxialAlphas,
    /// Whether the factorial part was one block (the orthogonal-blocking α assumes it).
    pub one_factorial_block: bool,
}

/// Adds the axial block named by `--augment` to `plan` (see the module documentation); `None`
/// without the option. Refused with whole plots and where the quadratic model could not be
/// fitted even with the axial runs (a fraction that aliases two-factor interactions).
pub(crate) fn augment(
    text: Option<&str>,
    plan: &mut Plan,
    centre_points: usize,
    seed: u64,
    randomise: bool,
) -> Result<Option<Axial>, String> {
    let Some(text) = text else {
        return Ok(None);
    };
    if !text.trim().eq_ignore_ascii_case("axial") {
        // `separate:...` is `plan_follow`'s (which refuses anything else first).
        return Ok(None);
    }
    let k = plan.design.factor_count();
    let factorial_runs = plan.runs.iter().filter(|r| !r.centre).count();
    let factorial_centres = plan.runs.len() - factorial_runs;
    let one_factorial_block = plan.block_count <= 1;
    let centre_runs =
        twofold_study::project::axial_centre_points(u32::try_from(centre_points).unwrap_or(0))
            as usize;
    let runs = add_axial_block(
        std::mem::take(&mut plan.runs),
        k,
        centre_runs,
        seed,
        randomise,
    )
    .map_err(|e| format!("--augment axial: {e}"))?;
    quadratic_estimable(runs.iter().map(|r| (r.levels.as_slice(), r.block))).map_err(|e| {
        format!(
            "--augment axial: even with axial runs {e}; the fraction aliases two-factor interactions: use a resolution V fraction, the full factorial, or a fold-over first"
        )
    })?;
    plan.runs = runs;
    plan.block_count += 1;
    Ok(Some(Axial {
        block: plan.block_count,
        axial_runs: 2 * k,
        centre_runs,
        alphas: axial_alphas(k, factorial_runs, factorial_centres, centre_runs),
        one_factorial_block,
    }))
}

impl Axial {
    /// Adds the `axial` object to the plan's JSON: `block`, `axial_runs`, `centre_runs`,
    /// `alpha` (what the runs hold: 1), `alpha_face_centred`, `alpha_rotatable`,
    /// `alpha_orthogonal_blocking` (null when the factorial part is in several blocks).
    pub(crate) fn add_json(&self, value: &mut Value) {
        if let Some(map) = value.as_object_mut() {
            map.insert(
                "axial".into(),
                json!({
                    "block": self.block,
                    "axial_runs": self.axial_runs,
                    "centre_runs": self.centre_runs,
                    "alpha": self.alphas.face_centred,
                    "alpha_face_centred": self.alphas.face_centred,
                    "alpha_rotatable": self.alphas.rotatable,
                    "alpha_orthogonal_blocking": self
                        .one_factorial_block
                        .then_some(self.alphas.orthogonal_blocking),
                }),
            );
        }
    }

    /// The plan's lines about the axial block.
    pub(crate) fn text(&self) -> String {
        let n = |x: f64| twofold_study::numbers::plain(x, 4);
        let orthogonal = if self.one_factorial_block {
            format!(
                ", orthogonal blocking {}",
                n(self.alphas.orthogonal_blocking)
            )
        } else {
            String::new()
        };
        format!(
            "Axial runs: block {} holds {} axial runs and {} centre runs, face-centred (alpha = 1: every run inside the tested ranges); a central composite design for the quadratic model.\nOther alphas, outside the ranges: rotatable {}{orthogonal}.",
            self.block,
            self.axial_runs,
            self.centre_runs,
            n(self.alphas.rotatable)
        )
    }
}
