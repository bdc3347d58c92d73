//! `twofold plan` states the runs of the whole sheet block by block, with the engine's count
//! the design step shows, called in-process.

use serde_json::Value;

fn run(args: &[&str]) -> String {
    let args: Vec<String> = args.iter().map(|s| s.to_string()).collect();
    let mut out = Vec::new();
    let mut err = Vec::new();
    let code = twofold_app::cli::run(&args, &mut out, &mut err);
    assert_eq!(code, 0, "{}", String::from_utf8_lossy(&err));
    String::from_utf8_lossy(&out).into_owned()
}

#[test]
fn the_plan_text_counts_every_block_and_agrees_with_the_sheet() {
    // Each expected line counted by hand: the fraction's base runs, the follow-up block's
    // runs (a fold-over repeats every run, a semifold half of them), the centre points of both
    // blocks, the 2k axial runs and the axial block's centre runs.
    let cases: [(&[&str], &str); 4] = [
        (
            &[
                "--factors",
                "6",
                "--runs",
                "16",
                "--generators",
                "E=ABC,F=BCD",
                "--fold",
                "semifold:A:B+",
            ],
            "24 runs: 16 in the fraction, 8 in the half fold-over block",
        ),
        (
            &[
                "--factors",
                "7",
                "--runs",
                "8",
                "--generators",
                "D=AB,E=AC,F=BC,G=ABC",
                "--fold",
                "full",
                "--centre-points",
                "2",
            ],
            "20 runs: 8 in the fraction, 8 in the fold-over block, 4 centre points",
        ),
        (
            &[
                "--factors",
                "3",
                "--centre-points",
                "3",
                "--augment",
                "axial",
            ],
            "20 runs: 8 in the full factorial, 3 centre points, 6 axial runs and 3 centre runs in the axial block",
        ),
        (
            &["--factors", "4", "--replicates", "2"],
            "32 runs in the full factorial (16 × 2 replicates)",
        ),
    ];
    for (args, expected) in cases {
        let mut all = vec!["plan"];
        all.extend_from_slice(args);
        all.extend_from_slice(&["--seed", "3"]);
        let text = run(&all);
        let first = text.lines().next().unwrap_or_default();
        assert!(first.ends_with(&format!("; {expected}")), "{first}");
        all.push("--json");
        let j: Value = serde_json::from_str(&run(&all)).unwrap();
        let total = expected.split(' ').next().unwrap();
        assert_eq!(j["total_runs"].to_string(), total, "{expected}");
        assert_eq!(
            j["runs"].as_array().map(Vec::len),
            total.parse::<usize>().ok()
        );
    }
}

#[test]
fn a_fold_over_plan_says_its_design_is_the_fraction_and_its_fold_over() {
    // The design of a full fold-over is the combined 2^(7-3) of 16 runs; the first line names
    // it by its parts instead of calling its 16 runs the base runs of the first block.
    let text = run(&[
        "plan",
        "--factors",
        "7",
        "--runs",
        "8",
        "--generators",
        "D=AB,E=AC,F=BC,G=ABC",
        "--fold",
        "full",
        "--seed",
        "1",
    ]);
    let first = text.lines().next().unwrap_or_default();
    assert!(
        first.starts_with("Design: 2^(7-3) fraction, resolution IV, the 8-run fraction and its fold-over; 16 runs: 8 in the fraction, 8 in the fold-over block"),
        "{first}"
    );
}
