//! The demo project shipped inside the program: a powder-coating cure study with invented data.
//!
//! The file `demo-projects/powder-coating-cure.ron` is embedded at build time. Its numbers are
//! illustrative, made by a formula (not measured), so a newcomer sees every step work on data
//! with a known answer:
//!
//! - factors A cure temperature 180–200 °C, B cure time 10–20 min, C film thickness 60–90 µm,
//!   D oven air speed 1–2 m/s; a 2^4 full factorial with two centre points (18 runs), run order
//!   randomised from seed 20250304;
//! - *Solvent rubs* (double rubs until the film breaks through, a count):
//!   `y = 60 + 14·A + 10·B − 3·C + 6·A·B + e`, rounded to a whole count, where A..D are the coded
//!   settings and `e = ((37·s + 11) mod 17 − 8) / 4` for the run's standard order `s` — one real
//!   two-factor interaction (temperature × time), D inert; the run in standard order 11 has no
//!   value ("panel dropped before testing");
//! - *Gloss 60°* (gloss units): `y = 85 − 4·A − 2.5·B + 1.5·C + 3·D + e′`, rounded to 0.1, with
//!   `e′ = ((53·s + 5) mod 13 − 6) / 3`.
//!
//! A unit test rebuilds the whole file from these formulas and the core's run plan, so the file
//! and this description cannot drift apart.

use super::io::project_from_str;
use super::model::Project;

/// The demo project's file, as embedded in the program.
pub const DEMO_RON: &str = include_str!("../../../../demo-projects/powder-coating-cure.ron");

/// The demo project (see the module documentation for its scenario and how its data were made).
pub fn demo_project() -> Project {
    // The embedded file is checked by a unit test; should it ever fail to read, an empty project
    // named for the problem is better than a program that will not start.
    project_from_str(DEMO_RON).unwrap_or_else(|e| Project::new(&format!("Demo unavailable: {e}")))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Cell, DesignSettings, Edit, Factor, ResponseDef, RunStatus, Severity};

    /// The demo rebuilt from the documented formulas.
    fn rebuilt() -> Project {
        let mut p = Project::new("Powder-coating cure (demo)");
        p.description = DESCRIPTION.to_string();
        let mut f = |name: &str, unit: &str, low, high, safe| {
            let mut x = Factor::numeric(name, unit, low, high);
            x.safe_range = Some(safe);
            p.factors.push(x);
        };
        f("Cure temperature", "°C", 180.0, 200.0, (160.0, 210.0));
        f("Cure time", "min", 10.0, 20.0, (8.0, 25.0));
        f("Film thickness", "µm", 60.0, 90.0, (50.0, 120.0));
        f("Oven air speed", "m/s", 1.0, 2.0, (0.5, 3.0));
        p.responses
            .push(ResponseDef::new("Solvent rubs", "double rubs"));
        p.responses.push(ResponseDef::new("Gloss 60°", "GU"));
        // The models an engineer would pick from the half-normal plots: the cure's two large
        // main effects and their interaction; the four main effects for gloss.
        p.responses[0].model.terms = ["A", "B", "AB"].map(String::from).to_vec();
        p.responses[1].model.terms = ["A", "B", "C", "D"].map(String::from).to_vec();
        let maximise = |low, high| crate::project::ResponseGoal {
            aim: crate::project::GoalAim::Maximise {
                low,
                high,
                shape: 1.0,
            },
            importance: 1.0,
        };
        p.responses[0].goal = maximise(50.0, 80.0);
        p.responses[1].goal = maximise(80.0, 90.0);
        p.design = DesignSettings {
            centre_points_per_block: 2,
            seed: 20_250_304,
            ..DesignSettings::default()
        };
        p.apply(Edit::RegenerateRuns).unwrap();
        for run in &mut p.runs {
            let s = i64::from(run.std_order);
            let [a, b, c, d] = [0, 1, 2, 3].map(|i| f64::from(run.levels[i]));
            let e = (((37 * s + 11) % 17) - 8) as f64 / 4.0;
            let e2 = (((53 * s + 5) % 13) - 6) as f64 / 3.0;
            let rubs = 60.0 + 14.0 * a + 10.0 * b - 3.0 * c + 6.0 * a * b + e;
            let gloss = 85.0 - 4.0 * a - 2.5 * b + 1.5 * c + 3.0 * d + e2;
            run.values = vec![
                Cell::new(format!("{}", rubs.round())),
                Cell::new(format!("{:.1}", gloss)),
            ];
            run.status = RunStatus::Done;
            if s == 11 {
                run.values[0] = Cell::default();
                run.note = "panel dropped before testing".into();
            }
        }
        p
    }

    const DESCRIPTION: &str = "ILLUSTRATIVE DATA, invented for this demonstration: nothing here was measured.\n\
A coating line wants a cure that passes the solvent-rub test without losing gloss. Four oven settings were \
varied in a 2^4 full factorial with two centre points, one panel per run.\n\
The values were made by formulas, with A..D the coded settings (-1, 0, +1) and s the standard order:\n\
Solvent rubs = 60 + 14 A + 10 B - 3 C + 6 AB + e, rounded to a whole count, e = ((37 s + 11) mod 17 - 8) / 4.\n\
Gloss 60° = 85 - 4 A - 2.5 B + 1.5 C + 3 D + e2, rounded to 0.1, e2 = ((53 s + 5) mod 13 - 6) / 3.\n\
So temperature and time interact for the cure, air speed does not matter for it, and nothing interacts for gloss. \
The panel of standard order 11 was dropped before testing: its solvent-rub value is missing.";

    #[test]
    fn demo_parses_validates_and_matches_its_formula() {
        let demo = demo_project();
        assert!(!demo.name.starts_with("Demo unavailable"), "{}", demo.name);
        let errors: Vec<_> = demo
            .validate()
            .into_iter()
            .filter(|p| p.severity == Severity::Error)
            .collect();
        assert_eq!(errors, vec![]);
        assert_eq!(demo, rebuilt(), "the file follows the documented formula");
        assert!(demo.description.starts_with("ILLUSTRATIVE DATA"));
        assert_eq!(demo.factors.len(), 4);
        assert_eq!(demo.runs.len(), 18);
        assert_eq!(demo.runs.iter().filter(|r| r.centre).count(), 2);
        let missing = demo.runs.iter().filter(|r| !r.values[0].is_typed()).count();
        assert_eq!(missing, 1);
        assert!(demo.factors.iter().all(|f| f.safe_range.is_some()));
    }
}
