//! `twofold plan --fold semifold:...` and `--augment separate:...`: the JSON lists the added
//! runs as block 2 and what the combined runs estimate, and the window's follow-up adds exactly
//! the runs the command prints for the same design and seed.

use serde_json::Value;
use twofold_core::foldover::FoldKind;
use twofold_core::semifold::SemiFold;
use twofold_study::project::{
    Cell, Edit, Factor, FollowUp, Project, ResponseDef, parse_interactions,
};

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

const BASE: [&str; 9] = [
    "plan",
    "--factors",
    "6",
    "--runs",
    "16",
    "--generators",
    "E=ABC,F=BCD",
    "--seed",
    "42",
];

fn plan_json(extra: &[&str]) -> Value {
    let mut full: Vec<&str> = BASE.to_vec();
    full.extend_from_slice(extra);
    full.push("--json");
    let (code, out, err) = run(&full);
    assert_eq!(code, 0, "{err}");
    match serde_json::from_str(&out) {
        Ok(v) => v,
        Err(e) => panic!("JSON: {e}"),
    }
}

fn project() -> Project {
    let mut p = Project::new("follow");
    for name in ["A", "B", "C", "D", "E", "F"] {
        p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
    }
    p.responses.push(ResponseDef::new("y", ""));
    p.design.base_runs = Some(16);
    p.design.generators = vec!["E=ABC".into(), "F=BCD".into()];
    p.design.seed = 42;
    if let Err(e) = p.apply(Edit::RegenerateRuns) {
        panic!("plans: {e}");
    }
    for (i, r) in p.runs.iter_mut().enumerate() {
        r.values[0] = Cell::new(format!("{}", 30 + i));
    }
    p
}

type Row = (u64, u64, u64, Vec<i64>);

fn printed(j: &Value) -> Vec<Row> {
    j["runs"]
        .as_array()
        .into_iter()
        .flatten()
        .map(|r| {
            (
                r["run_order"].as_u64().unwrap_or(0),
                r["std_order"].as_u64().unwrap_or(0),
                r["block"].as_u64().unwrap_or(0),
                r["levels"]
                    .as_array()
                    .into_iter()
                    .flatten()
                    .filter_map(Value::as_i64)
                    .collect(),
            )
        })
        .collect()
}

fn sheet(p: &Project) -> Vec<Row> {
    let mut out: Vec<Row> = p
        .runs
        .iter()
        .map(|r| {
            (
                u64::from(r.run_order),
                u64::from(r.std_order),
                u64::from(r.block),
                r.levels.iter().map(|&v| i64::from(v)).collect(),
            )
        })
        .collect();
    out.sort_by_key(|r| r.0);
    out
}

#[test]
fn a_semifold_plan_lists_its_runs_and_what_it_makes_estimable() {
    // Mee & Peralta 2000 (from memory): half the fold-over on A frees A's interactions.
    let j = plan_json(&["--fold", "semifold:A:B+"]);
    assert_eq!(j["total_runs"], 24);
    let f = &j["follow_up"];
    assert_eq!(f["kind"], "semifold");
    assert_eq!(f["label"], "semifold:A:B+");
    assert_eq!(f["runs_added"], 8);
    assert_eq!(f["model_estimable"], true);
    let block2: Vec<Row> = printed(&j).into_iter().filter(|r| r.2 == 2).collect();
    assert_eq!(block2.len(), 8);
    assert!(
        block2.iter().all(|r| r.3[1] == 1),
        "B at + in the kept half"
    );
    let estimable: Vec<&Value> = f["estimable"].as_array().into_iter().flatten().collect();
    for t in ["AB", "AC", "AD", "AE", "AF"] {
        assert!(
            estimable
                .iter()
                .any(|e| e["term"] == t && e["estimable"] == true),
            "{t}"
        );
    }
    // The window adds the same runs for the same design and seed.
    let mut p = project();
    let spec = SemiFold {
        fold: FoldKind::Factor(0),
        keep: 1,
        level: 1,
    };
    if let Err(e) = p.apply(Edit::AddFollowUp(FollowUp::SemiFold(spec))) {
        panic!("{e}");
    }
    assert_eq!(sheet(&p), printed(&j));
}

#[test]
fn runs_to_separate_interactions_match_the_window_and_say_what_they_resolve() {
    let j = plan_json(&["--augment", "separate:AE,BC"]);
    let f = &j["follow_up"];
    assert_eq!(f["kind"], "separate");
    assert_eq!(f["runs_added"], 3);
    assert_eq!(f["added_runs"].as_array().map(Vec::len), Some(3));
    assert!(
        f["d_efficiency"]
            .as_f64()
            .is_some_and(|d| d > 0.0 && d <= 1.0)
    );
    let mut p = project();
    let terms = match parse_interactions("AE,BC", 6) {
        Ok(t) => t,
        Err(e) => panic!("{e}"),
    };
    if let Err(e) = p.apply(Edit::AddFollowUp(FollowUp::Separate(terms))) {
        panic!("{e}");
    }
    assert_eq!(sheet(&p), printed(&j));
}

#[test]
fn bad_follow_up_requests_fail_with_one_line() {
    let cases: [(&[&str], &str); 5] = [
        (&["--fold", "semifold:Z"], "expected semifold:A"),
        (&["--fold", "semifold:A:A+"], "other than the folded one"),
        (&["--augment", "AB"], "expected `axial`, or `separate:`"),
        (
            &["--augment", "separate:ABC"],
            "not a two-factor interaction",
        ),
        (&["--fold", "A", "--augment", "separate:AB"], "not both"),
    ];
    for (extra, needle) in cases {
        let mut full: Vec<&str> = BASE.to_vec();
        full.extend_from_slice(extra);
        let (code, out, err) = run(&full);
        assert_eq!(code, 2, "{extra:?}: {err}");
        assert!(out.is_empty());
        assert_eq!(err.trim_end().lines().count(), 1, "{err}");
        assert!(err.contains(needle), "{extra:?}: {err}");
    }
    // More than 16 factors: the candidate set is refused with a clear message.
    let (code, _, err) = run(&[
        "plan",
        "--factors",
        "17",
        "--runs",
        "32",
        "--augment",
        "separate:AB",
        "--search-seconds",
        "1",
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("up to 16 factors"), "{err}");
}
