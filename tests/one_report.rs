//! One report behind every front end: the demo project analysed through the window's report
//! cache, through the summary page's input and through `twofold analyze PROJECT.ron --json`
//! gives the same effects, coefficients and ANOVA to the last bit (f64 bit patterns compared;
//! the JSON is read with serde_json's exact float parsing). Also the one default model choice on
//! Montgomery's Example 6-6.
//!
//! Sources: D. C. Montgomery, *Design and Analysis of Experiments*, 8th ed., Wiley, Example 6-6
//! (a 2^2 with five centre points; data and ANOVA verified, see `anova_examples`).

use crate::util::assert_close;
use serde_json::Value;
use std::path::PathBuf;
use twofold_study::export::{BuildOptions, summary_input};
use twofold_study::project::{demo_project, save_project};
use twofold_study::report::{Report, ReportCache};

/// A file under the temporary directory, removed when dropped.
struct TempFile(PathBuf);

impl TempFile {
    fn new(name: &str) -> TempFile {
        TempFile(
            std::env::temp_dir().join(format!("twofold-one-report-{}-{name}", std::process::id())),
        )
    }
}

impl Drop for TempFile {
    fn drop(&mut self) {
        let _ = std::fs::remove_file(&self.0);
    }
}

fn analyze(args: &[&str]) -> Value {
    let mut full = vec!["analyze".to_string()];
    full.extend(args.iter().map(|s| s.to_string()));
    let (mut out, mut err) = (Vec::new(), Vec::new());
    let code = twofold_app::cli::run(&full, &mut out, &mut err);
    assert_eq!(code, 0, "{}", String::from_utf8_lossy(&err));
    serde_json::from_str(&String::from_utf8(out).unwrap()).unwrap()
}

fn bits(v: &Value) -> u64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("not a number: {v}"))
        .to_bits()
}

fn opt_bits(v: &Value) -> Option<u64> {
    v.as_f64().map(f64::to_bits)
}

#[test]
fn demo_is_the_same_report_in_window_page_and_command() {
    for clear_terms in [false, true] {
        let mut project = demo_project();
        if clear_terms {
            // No terms chosen: the page and the command both show the default choice.
            project.responses[0].model.terms.clear();
        }
        let file = TempFile::new(&format!("demo-{clear_terms}.ron"));
        save_project(&file.0, &project).unwrap();

        // 1. The window: the report cache, as the analysis slot reads it.
        let mut cache = ReportCache::new();
        let window = cache.get(&project, 7, 0);
        // 2. The summary page: its input, built from the report the export builds.
        let page_report = Report::for_response(&project, 0, 0);
        let page_input = summary_input(&project, &[&page_report], &BuildOptions::default());
        assert_eq!(page_input.responses.len(), 1);
        let page = &page_input.responses[0];
        // 3. The command.
        let json = analyze(&[file.0.to_str().unwrap(), "--json"]);

        let effects = &window.effects.as_ref().unwrap().effects;
        let cli_effects = json["effects"].as_array().unwrap();
        assert_eq!(cli_effects.len(), effects.len());
        assert_eq!(page.effects.len(), effects.len());
        for (c, e) in cli_effects.iter().zip(effects) {
            assert_eq!(c["term"], e.term.label());
            assert_eq!(bits(&c["effect"]), e.effect.to_bits(), "{}", e.term);
            assert_eq!(bits(&c["coefficient"]), e.coefficient.to_bits());
            let row = page
                .effects
                .iter()
                .find(|r| r.term == e.term.label())
                .unwrap();
            assert_eq!(row.effect.to_bits(), e.effect.to_bits(), "{}", e.term);
        }
        let lenth = window.lenth.as_ref().unwrap();
        assert_eq!(bits(&json["lenth"]["pse"]), lenth.pse.to_bits());
        assert_eq!(bits(&json["lenth"]["me"]), lenth.me.to_bits());
        let page_lenth = page.lenth.as_ref().unwrap();
        assert_eq!(page_lenth.pse.to_bits(), lenth.pse.to_bits());

        // The fit: the demo's chosen terms, or the default choice.
        let fit = window.fit.as_ref().unwrap();
        let terms: Vec<String> = fit.terms.iter().map(|t| t.label()).collect();
        assert_eq!(json["model"]["terms"], serde_json::json!(terms));
        assert_eq!(
            json["model"]["selection"],
            if clear_terms {
                "pure_error_tests_hierarchical"
            } else {
                "given"
            }
        );
        assert_eq!(json["error_basis"], window.error_basis.key());
        assert_eq!(
            bits(&json["model"]["intercept"]),
            fit.intercept.estimate.to_bits()
        );
        let cli_coefs = json["model"]["coefficients"].as_array().unwrap();
        assert_eq!(cli_coefs.len(), fit.coefficients.len());
        for (c, m) in cli_coefs.iter().zip(&fit.coefficients) {
            assert_eq!(bits(c), m.estimate.to_bits());
        }
        for (c, m) in json["model"]["coefficient_details"]
            .as_array()
            .unwrap()
            .iter()
            .skip(1)
            .zip(&fit.coefficients)
        {
            assert_eq!(opt_bits(&c["std_error"]), m.std_error.map(f64::to_bits));
            assert_eq!(opt_bits(&c["p"]), m.p.map(f64::to_bits));
        }
        assert_eq!(bits(&json["model"]["r2"]), fit.r2.unwrap().to_bits());

        let rows = json["anova"].as_array().unwrap();
        let page_rows = &page.anova.as_ref().unwrap().rows;
        let shown = window.anova_rows();
        assert_eq!(shown.len(), fit.anova.len());
        assert_eq!(rows.len(), shown.len());
        assert_eq!(page_rows.len(), shown.len());
        for ((c, p), r) in rows.iter().zip(page_rows).zip(&shown) {
            assert_eq!(c["source"], r.source.to_string());
            assert_eq!(p.source, r.source.to_string());
            assert_eq!(c["df"], r.df);
            assert_eq!(bits(&c["ss"]), r.ss.to_bits(), "{}", r.source);
            assert_eq!(p.ss.to_bits(), r.ss.to_bits(), "{}", r.source);
            assert_eq!(opt_bits(&c["f"]), r.f.map(f64::to_bits));
            assert_eq!(p.f.map(f64::to_bits), r.f.map(f64::to_bits));
            assert_eq!(opt_bits(&c["p"]), r.p.map(f64::to_bits));
            assert_eq!(p.p.map(f64::to_bits), r.p.map(f64::to_bits));
        }
        // The curvature test, against the demo's pure error (two centre points).
        let c = window.curvature.unwrap();
        assert_eq!(json["curvature"]["error"], "pure_error");
        assert_eq!(opt_bits(&json["curvature"]["f"]), c.f.map(f64::to_bits));
        // Its row in the table shown everywhere carries that same test.
        let row = rows.iter().find(|r| r["source"] == "Curvature").unwrap();
        assert_eq!(opt_bits(&row["f"]), c.f.map(f64::to_bits));
        assert_eq!(opt_bits(&row["p"]), c.p.map(f64::to_bits));
    }
}

/// Montgomery, Example 6-6, as a coded table: corners 39.3, 40.9, 40.0, 41.5 (standard order),
/// centres 40.3, 40.5, 40.7, 40.2, 40.6.
fn example_6_6() -> String {
    let mut s = String::from("A,B,y\n");
    for (a, b, y) in [
        (-1, -1, "39.3"),
        (1, -1, "40.9"),
        (-1, 1, "40.0"),
        (1, 1, "41.5"),
        (0, 0, "40.3"),
        (0, 0, "40.5"),
        (0, 0, "40.7"),
        (0, 0, "40.2"),
        (0, 0, "40.6"),
    ] {
        s.push_str(&format!("{a},{b},{y}\n"));
    }
    s
}

#[test]
fn default_terms_and_curvature_are_judged_against_pure_error() {
    let file = TempFile::new("example-6-6.csv");
    std::fs::write(&file.0, example_6_6()).unwrap();
    let v = analyze(&["--csv", file.0.to_str().unwrap(), "--json"]);
    // Montgomery, Example 6-6: MS_PE = 0.1720 / 4 = 0.0430; A (SS 2.4025, F 55.87) and B (SS
    // 0.4225, F 9.83) are significant at 5 %, AB (SS 0.0025, F 0.058) is not.
    assert_eq!(v["error_basis"], "pure_error");
    assert_eq!(v["pure_error"]["df"], 4);
    assert_close(
        v["pure_error"]["ss"].as_f64().unwrap(),
        0.1720,
        0.00005,
        "SS_PE",
    );
    assert_eq!(v["model"]["selection"], "pure_error_tests_hierarchical");
    assert_eq!(v["model"]["terms"], serde_json::json!(["A", "B"]));
    let tests = v["model"]["term_tests"].as_array().unwrap();
    let f_of = |t: &str| {
        tests.iter().find(|x| x["term"] == t).unwrap()["f"]
            .as_f64()
            .unwrap()
    };
    assert_close(
        f_of("A"),
        2.4025 / 0.043,
        1e-9,
        "F A (computed from the published SS)",
    );
    assert_close(f_of("B"), 0.4225 / 0.043, 1e-9, "F B");
    assert_close(f_of("AB"), 0.0025 / 0.043, 1e-9, "F AB");
    assert_close(f_of("A"), 55.87, 0.005, "F A (published)");
    assert_close(f_of("B"), 9.83, 0.005, "F B (published)");
    // Curvature against pure error: SS 0.0027, F 0.063 (published), exact p 0.8137 (computed).
    // With AB out of the model the residual has 5 df (lack of fit + pure error), so a test
    // against the residual would give F = 0.0027/((0.0025 + 0.172)/5) = 0.077 instead.
    let c = &v["curvature"];
    assert_eq!(c["error"], "pure_error");
    assert_eq!(c["df_error"], 4);
    assert_close(c["f"].as_f64().unwrap(), 0.063, 0.0005, "curvature F");
    assert_close(c["p"].as_f64().unwrap(), 0.8137, 0.00005, "curvature p");
    let residual = v["anova"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["source"] == "Residual")
        .unwrap();
    assert_eq!(residual["df"], 5);

    // The text report says which error the tests use.
    let mut out = Vec::new();
    let args: Vec<String> = ["analyze", "--csv", file.0.to_str().unwrap()]
        .iter()
        .map(|s| s.to_string())
        .collect();
    assert_eq!(twofold_app::cli::run(&args, &mut out, &mut Vec::new()), 0);
    let text = String::from_utf8(out).unwrap();
    assert!(text.contains("The data carry pure error"), "{text}");
    assert!(text.contains("against pure error on 4 df"), "{text}");
}

#[test]
fn unreplicated_design_keeps_lenth_margins() {
    // Montgomery, Example 6-2 (filtration rate, unreplicated 2^4): no pure error, so Lenth's
    // margins choose A, C, D, AC, AD (see `cli_analyze`), and the JSON says so.
    let y = [
        45, 71, 48, 65, 68, 60, 80, 65, 43, 100, 45, 104, 75, 86, 70, 96,
    ];
    let mut s = String::from("A,B,C,D,rate\n");
    for (r, v) in y.iter().enumerate() {
        let l: Vec<String> = (0..4)
            .map(|f| if r >> f & 1 == 1 { "1" } else { "-1" }.to_string())
            .collect();
        s.push_str(&format!("{},{v}\n", l.join(",")));
    }
    let file = TempFile::new("example-6-2.csv");
    std::fs::write(&file.0, s).unwrap();
    let v = analyze(&["--csv", file.0.to_str().unwrap(), "--json"]);
    assert_eq!(v["error_basis"], "lenth_pse");
    assert!(v["pure_error"].is_null());
    assert_eq!(v["model"]["selection"], "beyond_lenth_me_hierarchical");
    assert_eq!(
        v["model"]["terms"],
        serde_json::json!(["A", "C", "D", "AC", "AD"])
    );
}
