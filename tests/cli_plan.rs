//! The headless `plan` command, called in-process: JSON keys an outside check reads, published
//! designs chosen by the search, and one-line errors with exit code 2.
//!
//! Sources: Montgomery, D. C. (2017), *Design and Analysis of Experiments*, 9th ed., Example 8-2
//! (the 2^(5-1) with I = ABCDE, verified) and the table of selected 2^(k−p) designs (verified
//! rows in the acceptance module `design_tables`).

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

fn plan_json(args: &[&str]) -> Value {
    let mut full = vec!["plan"];
    full.extend_from_slice(args);
    full.push("--json");
    let (code, out, err) = run(&full);
    assert_eq!(code, 0, "{err}");
    serde_json::from_str(&out).unwrap()
}

#[test]
fn half_fraction_of_five_factors_has_the_published_relation() {
    let j = plan_json(&["--factors", "5", "--runs", "16", "--seed", "1"]);
    assert_eq!(j["factors"], serde_json::json!(["A", "B", "C", "D", "E"]));
    assert_eq!(j["base_runs"], 16);
    assert_eq!(j["total_runs"], 16);
    assert_eq!(j["generators"], serde_json::json!(["E=ABCD"]));
    assert_eq!(j["defining_relation"], serde_json::json!(["I=ABCDE"]));
    assert_eq!(j["resolution"], 5);
    assert_eq!(j["word_length_pattern"], serde_json::json!([0, 0, 1]));
    assert_eq!(j["proven_minimum_aberration"], true);
    assert_eq!(j["aliases"]["AB"], serde_json::json!(["CDE"]));
    assert_eq!(
        j["clear_two_factor_interactions"].as_array().unwrap().len(),
        10
    );
    assert_eq!(j["runs"].as_array().unwrap().len(), 16);
    let run0 = &j["runs"][0];
    for key in ["std_order", "run_order", "block", "centre", "levels"] {
        assert!(run0.get(key).is_some(), "run key {key}");
    }
}

#[test]
fn given_generators_are_used_and_not_searched() {
    let j = plan_json(&[
        "--factors",
        "7",
        "--runs",
        "16",
        "--generators",
        "E=ABC,F=BCD,G=ACD",
    ]);
    assert_eq!(j["proven_minimum_aberration"], Value::Null);
    assert_eq!(j["word_length_pattern"], serde_json::json!([0, 7, 0, 0, 0]));
    assert_eq!(j["resolution"], 4);
}

/// The 28 two-factor interactions of the 16-run 2^(8-4)_IV (E=BCD, F=ACD, G=ABC, H=ABD, the
/// table of selected designs) share 7 contrasts, four to a chain: 15 contrasts less 8 for the
/// main effects (counted by hand).
const EIGHT_FACTORS: [&str; 8] = [
    "--factors",
    "8",
    "--runs",
    "16",
    "--generators",
    "E=BCD, F=ACD, G=ABC, H=ABD",
    "--seed",
    "1",
];

#[test]
fn json_lists_each_two_factor_chain_once_and_keeps_the_per_term_aliases() {
    let j = plan_json(&EIGHT_FACTORS);
    let chains = j["alias_chains"].as_array().unwrap();
    let two_factor: Vec<Vec<String>> = chains
        .iter()
        .map(|c| {
            c.as_array()
                .unwrap()
                .iter()
                .map(|m| m.as_str().unwrap().to_string())
                .collect::<Vec<String>>()
        })
        .filter(|c| c[0].len() == 2)
        .collect();
    assert_eq!(two_factor.len(), 7, "{two_factor:?}");
    let mut all: Vec<String> = Vec::new();
    for c in &two_factor {
        assert_eq!(c.len(), 4, "{c:?}");
        all.extend(c.iter().cloned());
    }
    all.sort();
    all.dedup();
    assert_eq!(all.len(), 28, "each interaction in one chain only");
    // AB x ABCG = CG, AB x ABDH = DH, AB x ABEF = EF.
    assert_eq!(two_factor[0], ["AB", "CG", "DH", "EF"]);
    // The per-term map stays for readers that look a term up.
    assert_eq!(j["aliases"]["CG"], serde_json::json!(["AB", "DH", "EF"]));
    assert_eq!(j["aliases"].as_object().unwrap().len(), 8 + 28);
}

#[test]
fn text_lists_each_two_factor_chain_once() {
    let mut args = vec!["plan"];
    args.extend_from_slice(&EIGHT_FACTORS);
    let (code, out, err) = run(&args);
    assert_eq!(code, 0, "{err}");
    let chains: Vec<&str> = out
        .lines()
        .map(str::trim)
        .filter(|l| {
            let m: Vec<&str> = l.split(" = ").collect();
            m.len() > 1
                && m.iter()
                    .all(|t| t.len() == 2 && t.chars().all(|c| c.is_ascii_uppercase()))
        })
        .collect();
    assert_eq!(chains.len(), 7, "{out}");
    assert!(chains.iter().all(|c| c.split(" = ").count() == 4), "{out}");
    assert!(chains.contains(&"AB = CG = DH = EF"), "{out}");
}

#[test]
fn full_factorial_has_null_resolution() {
    let j = plan_json(&["--factors", "Temp,Time,Speed"]);
    assert_eq!(j["resolution"], Value::Null);
    assert_eq!(j["base_runs"], 8);
    assert_eq!(
        j["factor_names"],
        serde_json::json!(["Temp", "Time", "Speed"])
    );
    assert_eq!(j["defining_relation"], serde_json::json!([]));
}

#[test]
fn centre_points_replicates_and_blocks_count_into_total_runs() {
    let j = plan_json(&[
        "--factors",
        "4",
        "--centre-points",
        "2",
        "--replicates",
        "2",
        "--blocks",
        "2",
        "--seed",
        "9",
    ]);
    // 2 × 16 factorial runs + 2 centre points in each of 2 blocks.
    assert_eq!(j["total_runs"], 36);
    assert_eq!(j["blocks_confounded_with"], serde_json::json!(["ABCD"]));
    let centres = j["runs"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|r| r["centre"] == true)
        .count();
    assert_eq!(centres, 4);
}

#[test]
fn same_seed_gives_the_same_run_order() {
    let a = plan_json(&["--factors", "4", "--seed", "77"]);
    let b = plan_json(&["--factors", "4", "--seed", "77"]);
    assert_eq!(a["runs"], b["runs"]);
}

#[test]
fn fold_over_of_a_resolution_iii_design_reaches_resolution_iv() {
    // Montgomery 2017, §8.6 (full fold-over of a resolution III design gives resolution IV; a
    // property of the method, verified in the text).
    let j = plan_json(&[
        "--factors",
        "7",
        "--runs",
        "8",
        "--generators",
        "D=AB,E=AC,F=BC,G=ABC",
        "--fold",
        "full",
    ]);
    assert_eq!(j["resolution"], 4);
    assert_eq!(j["total_runs"], 16);
    assert_eq!(j["fold_over"]["kind"], "full");
}

#[test]
fn csv_output_has_a_header_and_one_row_per_run() {
    let (code, out, _) = run(&["plan", "--factors", "3", "--csv", "--seed", "2"]);
    assert_eq!(code, 0);
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines[0], "run_order,std_order,block,centre,replicate,A,B,C");
    assert_eq!(lines.len(), 9);
}

#[test]
fn bad_input_gives_one_line_and_exit_code_two() {
    let cases: &[(&[&str], &str)] = &[
        (&["plan"], "--factors is required"),
        (&["plan", "--factors", "1"], "2 to 25 factors"),
        (&["plan", "--factors", "26"], "2 to 25 factors"),
        (
            &["plan", "--factors", "5", "--runs", "10"],
            "not a power of two",
        ),
        (
            &["plan", "--factors", "3", "--runs", "16"],
            "more than the full factorial",
        ),
        (&["plan", "--factors", "7", "--runs", "4"], "too few"),
        (
            &["plan", "--factors", "5", "--generators", "E=ABJ"],
            "beyond the last factor",
        ),
        (
            &["plan", "--factors", "6", "--generators", "E=ABC,F=ABC"],
            "aliases two main effects",
        ),
        (
            &[
                "plan",
                "--factors",
                "5",
                "--runs",
                "8",
                "--generators",
                "E=ABCD",
            ],
            "give 16 runs",
        ),
        (
            &["plan", "--factors", "5", "--bogus"],
            "unknown option `--bogus`",
        ),
        (
            &["plan", "--factors", "5", "--seed", "x"],
            "not a whole number",
        ),
        (&["plan", "--factors", "A,a"], "given twice"),
        (
            &["plan", "--factors", "3", "--fold", "full"],
            "full factorial",
        ),
        (&["plan", "--factors", "3", "--blocks", "3"], "2, 4, 8"),
    ];
    for (args, needle) in cases {
        let (code, out, err) = run(args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(out.is_empty(), "{args:?}");
        assert_eq!(err.trim_end().lines().count(), 1, "{args:?}: {err}");
        assert!(err.contains(needle), "{args:?}: {err}");
    }
}

/// The window's follow-up fold-over adds exactly the runs `twofold plan --fold` prints for the
/// same design and seed: same blocks, standard order, run order, centre points and levels.
#[test]
fn the_windows_fold_over_runs_are_the_runs_plan_prints() {
    use twofold_core::foldover::FoldKind;
    use twofold_study::project::{Cell, Edit, Factor, FollowUp, Project, ResponseDef};
    for (fold, kind) in [("full", FoldKind::Full), ("B", FoldKind::Factor(1))] {
        let mut p = Project::new("fold");
        for name in ["A", "B", "C", "D", "E", "F", "G"] {
            p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
        }
        p.responses.push(ResponseDef::new("y", ""));
        p.design.base_runs = Some(8);
        p.design.generators = ["D=AB", "E=AC", "F=BC", "G=ABC"].map(String::from).to_vec();
        p.design.centre_points_per_block = 1;
        p.design.seed = 42;
        p.apply(Edit::RegenerateRuns).unwrap();
        for (i, r) in p.runs.iter_mut().enumerate() {
            r.values[0] = Cell::new(format!("{}", 30 + i));
        }
        let before = p.clone();
        p.apply(Edit::AddFollowUp(FollowUp::FoldOver(kind)))
            .unwrap();
        let j = plan_json(&[
            "--factors",
            "7",
            "--runs",
            "8",
            "--generators",
            "D=AB,E=AC,F=BC,G=ABC",
            "--centre-points",
            "1",
            "--seed",
            "42",
            "--fold",
            fold,
        ]);
        let printed: Vec<(u64, u64, u64, bool, Vec<i64>)> = j["runs"]
            .as_array()
            .unwrap()
            .iter()
            .map(|r| {
                (
                    r["run_order"].as_u64().unwrap(),
                    r["std_order"].as_u64().unwrap(),
                    r["block"].as_u64().unwrap(),
                    r["centre"].as_bool().unwrap(),
                    r["levels"]
                        .as_array()
                        .unwrap()
                        .iter()
                        .map(|v| v.as_i64().unwrap())
                        .collect(),
                )
            })
            .collect();
        let mut sheet: Vec<(u64, u64, u64, bool, Vec<i64>)> = p
            .runs
            .iter()
            .map(|r| {
                (
                    u64::from(r.run_order),
                    u64::from(r.std_order),
                    u64::from(r.block),
                    r.centre,
                    r.levels.iter().map(|&v| i64::from(v)).collect(),
                )
            })
            .collect();
        sheet.sort();
        assert_eq!(sheet, printed, "--fold {fold}");
        assert_eq!(printed.len(), 18);
        // The runs in the sheet before keep their values and run order.
        for r in &before.runs {
            let now = p
                .runs
                .iter()
                .find(|n| n.block == 1 && n.levels == r.levels)
                .unwrap();
            assert_eq!((now.run_order, &now.values), (r.run_order, &r.values));
        }
    }
}

#[test]
fn power_of_a_plan_agrees_with_scipy_and_needs_sigma() {
    // A 2^(8-4) with the main-effects model leaves 16 - 1 - 8 = 7 error df. With σ = 1 the
    // smallest effect found with power 0.8 at α = 0.05 is 1.634879920193766 by scipy's
    // noncentral t (fixtures/make_power_fixtures.py, first power case); σ = 2 doubles it.
    let j = plan_json(&[
        "--factors",
        "8",
        "--runs",
        "16",
        "--seed",
        "1",
        "--sigma",
        "2",
        "--effect",
        "3",
    ]);
    let p = &j["power"];
    assert_eq!(p["sigma"], 2.0);
    assert_eq!(p["alpha"], 0.05);
    assert_eq!(p["power"], 0.8);
    assert_eq!(p["error_df"], 7);
    let d = p["detectable_effect"].as_f64().unwrap();
    assert!((d - 2.0 * 1.634_879_920_193_766).abs() < 1e-6, "{d}");
    // An effect of 3 (< 3.27) needs more than one replicate; the count given is the first that
    // reaches the power (checked with the core's power at r - 1 and r).
    let r = p["replicates_needed"].as_u64().unwrap() as usize;
    let spec = |r: usize| twofold_core::power::PowerSpec {
        sigma: 2.0,
        alpha: 0.05,
        runs: 16 * r,
        error_df: twofold_core::power::main_effects_error_df(16 * r, 8, 1),
    };
    assert!(r >= 2);
    assert!(spec(r).power(3.0).unwrap() >= 0.8);
    assert!(spec(r - 1).power(3.0).unwrap() < 0.8);
    // Without --effect the count is null; without --sigma there is no power at all.
    let j = plan_json(&[
        "--factors",
        "8",
        "--runs",
        "16",
        "--seed",
        "1",
        "--sigma",
        "2",
    ]);
    assert!(j["power"]["replicates_needed"].is_null());
    let j = plan_json(&["--factors", "8", "--runs", "16", "--seed", "1"]);
    assert!(j["power"].is_null());
    // Naming the model: A..H and the two interactions AB, AC use 10 terms, leaving
    // 16 - 1 - 10 = 5 error df (a repeated term counts once).
    let j = plan_json(&[
        "--factors",
        "8",
        "--runs",
        "16",
        "--seed",
        "1",
        "--sigma",
        "2",
        "--model-terms",
        "A,B,C,D,E,F,G,H,AB,AC,BA",
    ]);
    assert_eq!(j["power"]["error_df"], 5);
    let five = twofold_core::power::PowerSpec {
        sigma: 2.0,
        alpha: 0.05,
        runs: 16,
        error_df: 5,
    };
    let d = j["power"]["detectable_effect"].as_f64().unwrap();
    assert!(
        (d - five.detectable_effect(0.8).unwrap()).abs() < 1e-9,
        "{d}"
    );
    let (code, _, err) = run(&["plan", "--factors", "3", "--model-terms", "A,B"]);
    assert_eq!(code, 2, "--model-terms needs --sigma");
    assert!(err.contains("--sigma"), "{err}");
    let (code, _, err) = run(&[
        "plan",
        "--factors",
        "3",
        "--sigma",
        "1",
        "--model-terms",
        "AZ",
    ]);
    assert_eq!(code, 2);
    assert_eq!(err.lines().count(), 1, "{err}");
    for bad in [
        vec!["plan", "--factors", "8", "--runs", "16", "--alpha", "0.1"],
        vec!["plan", "--factors", "8", "--runs", "16", "--sigma", "-1"],
        vec![
            "plan",
            "--factors",
            "8",
            "--runs",
            "16",
            "--sigma",
            "1",
            "--power",
            "1.5",
        ],
    ] {
        let (code, _, err) = run(&bad);
        assert_eq!(code, 2, "{bad:?}");
        assert_eq!(err.lines().count(), 1, "{err}");
    }
}

#[test]
fn twelve_runs_give_the_screening_design_with_its_partial_aliases() {
    // Plackett & Burman (1946): 11 factors in 12 runs; each main effect is partially aliased
    // with the 45 two-factor interactions not containing it, coefficient ±1/3 (common knowledge
    // of the trade; recomputed by the core from the alias matrix).
    let j = plan_json(&["--factors", "11", "--runs", "12", "--seed", "5"]);
    assert_eq!(j["family"], "plackett_burman");
    assert_eq!(j["total_runs"], 12);
    let runs = j["runs"].as_array().unwrap();
    assert_eq!(runs.len(), 12);
    // Balanced, orthogonal columns read back from the JSON.
    let levels: Vec<Vec<i64>> = runs
        .iter()
        .map(|r| {
            r["levels"]
                .as_array()
                .unwrap()
                .iter()
                .map(|v| v.as_i64().unwrap())
                .collect()
        })
        .collect();
    for a in 0..11 {
        assert_eq!(levels.iter().map(|r| r[a]).sum::<i64>(), 0);
        for b in a + 1..11 {
            assert_eq!(levels.iter().map(|r| r[a] * r[b]).sum::<i64>(), 0);
        }
    }
    let pa = j["partial_aliases"].as_object().unwrap();
    assert_eq!(pa.len(), 11);
    for (main, list) in pa {
        let list = list.as_array().unwrap();
        assert_eq!(list.len(), 45, "{main}");
        for e in list {
            let term = e["term"].as_str().unwrap();
            assert!(!term.contains(main.as_str()), "{main}: {term}");
            let c = e["coefficient"].as_f64().unwrap();
            assert!((c.abs() - 1.0 / 3.0).abs() < 1e-12, "{main} {term} {c}");
        }
    }
    // A regular design says so.
    let r = plan_json(&["--factors", "5", "--runs", "16", "--seed", "1"]);
    assert_eq!(r["family"], "regular");
    // Centre points and replicates are planned; blocks are not offered yet.
    let c = plan_json(&[
        "--factors",
        "7",
        "--runs",
        "20",
        "--centre-points",
        "3",
        "--replicates",
        "2",
        "--seed",
        "1",
    ]);
    assert_eq!(c["total_runs"], 43);
    // The full fold-over doubles the runs into two blocks and clears every main effect of the
    // two-factor interactions (the mirror image cancels each partial alias).
    let f = plan_json(&[
        "--factors",
        "7",
        "--runs",
        "12",
        "--fold",
        "full",
        "--seed",
        "1",
    ]);
    assert_eq!(f["total_runs"], 24);
    assert_eq!(f["blocks"], 2);
    for (main, list) in f["partial_aliases"].as_object().unwrap() {
        assert!(list.as_array().unwrap().is_empty(), "{main}: {list}");
    }
    let (code, _, err) = run(&["plan", "--factors", "7", "--runs", "20", "--blocks", "2"]);
    assert_eq!(code, 2);
    assert_eq!(err.lines().count(), 1, "{err}");
    let (code, _, err) = run(&["plan", "--factors", "12", "--runs", "12"]);
    assert_eq!(code, 2, "12 factors do not fit in 12 runs");
    assert!(err.contains("2 to 11 factors"), "{err}");
}

#[test]
fn hard_to_change_factors_group_the_runs_into_whole_plots() {
    // 2^4 with A hard to change: two whole plots of eight runs; A is the only whole-plot main
    // effect or two-factor interaction (its column alone is constant in each whole plot; by hand).
    let j = plan_json(&[
        "--factors",
        "Temp,Time,Speed,Load",
        "--hard-to-change",
        "Temp",
        "--seed",
        "4",
    ]);
    assert_eq!(j["resets"], 2);
    // 1 + 15 · (1 − 2·8·7 / (16·15)) = 9 in a completely random order (by hand).
    assert!((j["resets_if_randomised"].as_f64().unwrap() - 9.0).abs() < 1e-12);
    assert_eq!(j["strata"]["whole_plot"], serde_json::json!(["A"]));
    assert!(
        j["strata"]["subplot"]
            .as_array()
            .unwrap()
            .contains(&serde_json::json!("AB"))
    );
    let runs = j["runs"].as_array().unwrap();
    // Runs of one whole plot follow each other, with A fixed inside it.
    let wp: Vec<u64> = runs
        .iter()
        .map(|r| r["whole_plot"].as_u64().unwrap())
        .collect();
    assert_eq!(wp.windows(2).filter(|w| w[0] != w[1]).count(), 1);
    for w in 1..=2u64 {
        let a: Vec<i64> = runs
            .iter()
            .filter(|r| r["whole_plot"] == w)
            .map(|r| r["levels"][0].as_i64().unwrap())
            .collect();
        assert_eq!(a.len(), 8);
        assert!(a.iter().all(|&x| x == a[0]));
    }
    // Two hard-to-change factors of a half fraction: four whole plots, AB among the whole-plot
    // terms (the interaction of two whole-plot factors is constant in each whole plot).
    let j = plan_json(&[
        "--factors",
        "5",
        "--runs",
        "16",
        "--hard-to-change",
        "A,B",
        "--seed",
        "2",
    ]);
    assert_eq!(j["resets"], 4);
    let whole = j["strata"]["whole_plot"].as_array().unwrap();
    assert!(whole.contains(&serde_json::json!("AB")), "{whole:?}");
    let (code, _, err) = run(&["plan", "--factors", "3", "--hard-to-change", "A,B,C"]);
    assert_eq!(code, 2);
    assert!(err.contains("easy to change"), "{err}");
}

/// `--hard-to-change` with `--runs`: the fraction is chosen among split-plot fractions. Three
/// hard-to-change factors of four in eight runs: the ordinary minimum-aberration fraction
/// (I = ABCD) would give every run its own setting of A, B, C (eight resets, no split plot); the
/// split-plot fraction keeps four whole plots and pays with I = ABC, resolution III (worked by
/// hand; criterion of Huang, Chen & Voelkel 1998 and Bingham & Sitter 1999).
#[test]
fn hard_to_change_factors_choose_a_split_plot_fraction() {
    let j = plan_json(&[
        "--factors",
        "4",
        "--runs",
        "8",
        "--hard-to-change",
        "A,B,C",
        "--seed",
        "5",
    ]);
    assert_eq!(j["resets"], 4);
    assert_eq!(j["word_length_pattern"], serde_json::json!([1, 0]));
    assert_eq!(j["split_plot_fraction"]["whole_plots_per_replicate"], 4);
    assert_eq!(j["split_plot_fraction"]["proven"], true);
    let runs = j["runs"].as_array().unwrap();
    for w in 1..=4u64 {
        let d: Vec<i64> = runs
            .iter()
            .filter(|r| r["whole_plot"] == w)
            .map(|r| r["levels"][3].as_i64().unwrap())
            .collect();
        // Two runs per whole plot, D at both levels inside it.
        assert_eq!(d.len(), 2, "whole plot {w}");
        assert_ne!(d[0], d[1], "whole plot {w}");
    }
    // One hard-to-change factor of six in 16 runs: two whole plots per replicate are all
    // there can be, and asking for four says so.
    let (code, _, err) = run(&[
        "plan",
        "--factors",
        "6",
        "--runs",
        "16",
        "--hard-to-change",
        "A",
        "--whole-plots",
        "4",
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("possible: 2"), "{err}");
    let (code, _, err) = run(&[
        "plan",
        "--factors",
        "6",
        "--runs",
        "16",
        "--whole-plots",
        "4",
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("--hard-to-change"), "{err}");
}

/// `--require`: the design keeps the named interactions clear, the JSON says so, and requests
/// that cannot be met exit 2 with one line.
///
/// Sources: Montgomery 2017, Example 8-2 (the 2^(5-1) with I = ABCDE, resolution V, so every
/// two-factor interaction is clear); the table of selected designs (the 2^(6-2) with E = ABC,
/// F = BCD leaves no two-factor interaction clear). The run-size bounds are counted by hand: a
/// clear interaction needs a contrast of its own besides the k main effects (k + r ≤ N − 1),
/// and a design with one has at most N/2 factors (for a contrast s outside the design the other
/// columns pair up as {x, x·s}, and only one pair may lie wholly in the design).
#[test]
fn required_interactions_are_kept_clear() {
    let j = plan_json(&["--factors", "5", "--require", "CE", "--seed", "1"]);
    assert_eq!(
        j["base_runs"], 16,
        "a clear interaction needs k ≤ N/2: 5 > 8/2"
    );
    assert_eq!(j["defining_relation"], serde_json::json!(["I=ABCDE"]));
    assert_eq!(j["required"], serde_json::json!(["CE"]));
    assert_eq!(j["required_clear"], true);
    assert_eq!(j["proven_minimum_aberration"], true);

    let j = plan_json(&["--factors", "7", "--require", "ce, AB", "--seed", "1"]);
    assert_eq!(j["base_runs"], 16, "7 + 2 > 8 − 1 rules out 8 runs");
    assert_eq!(j["required"], serde_json::json!(["AB", "CE"]));
    assert_eq!(j["required_clear"], true);
    let clear = j["clear_two_factor_interactions"].as_array().unwrap();
    for t in ["AB", "CE"] {
        assert!(clear.contains(&Value::from(t)), "{t} in {clear:?}");
        // Its aliases up to three letters hold no main effect and no two-factor interaction.
        for alias in j["aliases"][t].as_array().unwrap() {
            let letters = alias.as_str().unwrap().trim_start_matches('-').len();
            assert!(letters >= 3, "{t} = {alias}");
        }
    }

    // Given generators are kept, and the output says whether they keep the requirement.
    let j = plan_json(&[
        "--factors",
        "6",
        "--runs",
        "16",
        "--generators",
        "E=ABC,F=BCD",
        "--require",
        "AB",
    ]);
    assert_eq!(j["required_clear"], false);
    assert_eq!(j["generators"], serde_json::json!(["E=ABC", "F=BCD"]));
    // Without --require the keys are absent.
    let j = plan_json(&["--factors", "5", "--runs", "16"]);
    assert!(j.get("required").is_none() && j.get("required_clear").is_none());

    let (code, out, _) = run(&["plan", "--factors", "7", "--require", "AB,CE"]);
    assert_eq!(code, 0);
    assert!(
        out.contains(
            "Required interactions: AB, CE (each clear of main effects and other two-factor interactions)"
        ),
        "{out}"
    );

    let cases: &[(&[&str], &str)] = &[
        (
            &["plan", "--factors", "9", "--runs", "16", "--require", "AB"],
            "error: no 16-run design keeps AB clear of other two-factor interactions; 32 runs do",
        ),
        (
            &["plan", "--factors", "5", "--require", "AQ"],
            "error: --require: required interaction `AQ`: `Q` in `AQ` is beyond the last factor `E`",
        ),
        (
            &["plan", "--factors", "5", "--require", "AB,ABC"],
            "error: --require: required interaction `ABC` is not a two-factor interaction (it has 3 letters)",
        ),
        (
            &["plan", "--factors", "5", "--require", "A"],
            "error: --require: required interaction `A` is not a two-factor interaction (it has 1 letter)",
        ),
        (
            &["plan", "--factors", "5", "--require", ","],
            "error: --require: no required interaction given (name them as `AB,CE`)",
        ),
    ];
    for (args, line) in cases {
        let (code, out, err) = run(args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(out.is_empty(), "{args:?}");
        assert_eq!(err.trim_end(), *line, "{args:?}");
    }
}
