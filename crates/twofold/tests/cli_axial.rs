//! `twofold plan --augment axial`: the design with its axial block (a face-centred central
//! composite design) and the α choices, called in-process.

use serde_json::Value;

fn run(args: &[&str]) -> (i32, String, String) {
    let args: Vec<String> = args.iter().map(|s| s.to_string()).collect();
    let mut out = Vec::new();
    let mut err = Vec::new();
    let code = twofold_app::cli::run(&args, &mut out, &mut err);
    (
        code,
        String::from_utf8_lossy(&out).into_owned(),
        String::from_utf8_lossy(&err).into_owned(),
    )
}

#[test]
fn the_axial_block_follows_the_factorial_as_block_two() {
    let (code, out, err) = run(&[
        "plan",
        "--factors",
        "Temp,Time,Feed",
        "--centre-points",
        "3",
        "--augment",
        "axial",
        "--seed",
        "4",
        "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let j: Value = serde_json::from_str(&out).unwrap();
    // 8 corners + 3 centres, then 6 axial runs + 3 centres.
    assert_eq!(j["total_runs"], 20);
    assert_eq!(j["blocks"], 2);
    let runs = j["runs"].as_array().unwrap();
    assert_eq!(runs.len(), 20);
    let block2: Vec<&Value> = runs.iter().filter(|r| r["block"] == 2).collect();
    assert_eq!(block2.len(), 9);
    let axial = block2
        .iter()
        .filter(|r| {
            let l = r["levels"].as_array().unwrap();
            l.iter().filter(|v| v.as_i64() != Some(0)).count() == 1
        })
        .count();
    assert_eq!(axial, 6);
    assert_eq!(block2.iter().filter(|r| r["centre"] == true).count(), 3);
    // The added runs come after the factorial block in run order.
    assert!(block2.iter().all(|r| r["run_order"].as_u64().unwrap() > 11));
    let a = &j["axial"];
    assert_eq!(
        (a["block"].as_u64(), a["axial_runs"].as_u64()),
        (Some(2), Some(6))
    );
    assert_eq!(a["alpha"], 1.0);
    // Rotatable α = 8^(1/4) = 1.6818 (Box & Hunter 1957; Montgomery's table of rotatable
    // central composite designs, from memory).
    let rot = a["alpha_rotatable"].as_f64().unwrap();
    assert!((rot - 1.6818).abs() < 5e-5, "{rot}");
    // Orthogonal blocking: √(8·(6+3)/(2·(8+3))) = √(72/22) = 1.8091 (by hand).
    let orth = a["alpha_orthogonal_blocking"].as_f64().unwrap();
    assert!((orth - (72.0f64 / 22.0).sqrt()).abs() < 1e-12, "{orth}");
    // The same plan without --augment is the first block exactly.
    let (_, plain, _) = run(&[
        "plan",
        "--factors",
        "Temp,Time,Feed",
        "--centre-points",
        "3",
        "--seed",
        "4",
        "--json",
    ]);
    let p: Value = serde_json::from_str(&plain).unwrap();
    let first: Vec<&Value> = runs.iter().filter(|r| r["block"] == 1).collect();
    assert_eq!(
        first,
        p["runs"].as_array().unwrap().iter().collect::<Vec<_>>()
    );
    assert!(p.get("axial").is_none());
}

#[test]
fn the_text_plan_names_the_alphas_and_help_documents_the_option() {
    let (code, out, err) = run(&[
        "plan",
        "--factors",
        "2",
        "--augment",
        "axial",
        "--seed",
        "1",
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(
        out.contains("Axial runs: block 2 holds 4 axial runs and 2 centre runs"),
        "{out}"
    );
    assert!(out.contains("rotatable 1.414"), "{out}");
    let (code, help, _) = run(&["plan", "--help"]);
    assert_eq!(code, 0);
    assert!(help.contains("--augment"), "{help}");
    assert!(help.contains("--augment axial"), "{help}");
}

#[test]
fn axial_runs_are_refused_where_they_cannot_serve() {
    for (args, needle) in [
        (
            vec![
                "plan",
                "--factors",
                "4",
                "--runs",
                "8",
                "--augment",
                "axial",
            ],
            "aliases two-factor interactions",
        ),
        (
            vec!["plan", "--factors", "3", "--augment", "star"],
            "expected `axial`",
        ),
        (
            vec![
                "plan",
                "--factors",
                "5",
                "--runs",
                "12",
                "--augment",
                "axial",
            ],
            "screening design",
        ),
    ] {
        let (code, _, err) = run(&args);
        assert_eq!(code, 2, "{args:?}");
        assert!(err.contains(needle), "{args:?}: {err}");
    }
}

/// y = 50 + 2A − B + 0.5AB − 4A² − 3B² (invented), centre runs wobbling ±0.1 around it.
fn fill(p: &mut twofold_study::project::Project) {
    let mut centre = 0;
    for r in &mut p.runs {
        if r.values[0].is_typed() {
            continue;
        }
        let (a, b) = (f64::from(r.levels[0]), f64::from(r.levels[1]));
        let mut y = 50.0 + 2.0 * a - b + 0.5 * a * b - 4.0 * a * a - 3.0 * b * b;
        if r.centre {
            y += [0.1, -0.1, 0.0][centre % 3];
            centre += 1;
        }
        r.values[0] = twofold_study::project::Cell::new(format!("{y}"));
    }
}

#[test]
fn analyze_suggests_axial_runs_then_reports_the_quadratic_model() {
    use twofold_study::project::{Edit, Factor, FollowUp, Project, ResponseDef, save_project};
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("curved.twofold");
    let mut p = Project::new("Curved");
    p.factors.push(Factor::numeric("Temp", "°C", 150.0, 170.0));
    p.factors.push(Factor::numeric("Time", "min", 10.0, 20.0));
    p.responses.push(ResponseDef::new("Yield", "%"));
    p.design.centre_points_per_block = 3;
    p.apply(Edit::RegenerateRuns).unwrap();
    fill(&mut p);
    save_project(&path, &p).unwrap();
    let file = path.to_str().unwrap();
    let (code, out, err) = run(&["analyze", file, "--json"]);
    assert_eq!(code, 0, "{err}");
    let j: Value = serde_json::from_str(&out).unwrap();
    assert_eq!(j["follow_up"][0]["kind"], "axial");
    assert_eq!(j["follow_up"][0]["suggested"], true);
    assert!(j.get("quadratic").is_none());
    // Run the axial block and analyse again.
    p.apply(Edit::AddFollowUp(FollowUp::Axial)).unwrap();
    fill(&mut p);
    save_project(&path, &p).unwrap();
    let (code, out, err) = run(&["analyze", file, "--json"]);
    assert_eq!(code, 0, "{err}");
    let j: Value = serde_json::from_str(&out).unwrap();
    let q = &j["quadratic"];
    assert_eq!(q["runs_used"], 14);
    assert_eq!(q["canonical"]["kind"], "maximum");
    assert_eq!(q["stationary"]["inside_box"], true);
    // x_s of the invented surface, by hand: (2.875, −1.75)/11.9375 coded.
    let xs = q["stationary"]["coded"].as_array().unwrap();
    assert!((xs[0].as_f64().unwrap() - 2.875 / 11.9375).abs() < 1e-9);
    assert!((xs[1].as_f64().unwrap() + 1.75 / 11.9375).abs() < 1e-9);
    // Nothing more is offered after the axial block, and the text report has the section.
    assert!(
        j["follow_up"]
            .as_array()
            .unwrap()
            .iter()
            .all(|o| o["kind"] != "axial")
    );
    let (code, text, err) = run(&["analyze", file]);
    assert_eq!(code, 0, "{err}");
    assert!(
        text.contains("Quadratic model (every run: 14 used, axial block 2)"),
        "{text}"
    );
    assert!(text.contains("The stationary point is a maximum"), "{text}");
}
