//! The headless `analyze` command, run in-process on coded CSV tables written to the temporary
//! directory: JSON keys and numbers against published examples, and bad input refused with a
//! one-line message and exit code 2.
//!
//! Tolerances: published values printed to `d` decimals are matched to half a unit in the `d`-th
//! place; values computed with numpy are matched to 1e-9.

use crate::util::assert_close;
use serde_json::Value;
use std::path::PathBuf;
use std::sync::atomic::{AtomicUsize, Ordering};

static COUNTER: AtomicUsize = AtomicUsize::new(0);

/// A CSV file under the temporary directory, removed when dropped.
struct TempCsv(PathBuf);

impl TempCsv {
    fn new(contents: &str) -> TempCsv {
        let n = COUNTER.fetch_add(1, Ordering::SeqCst);
        let path = std::env::temp_dir().join(format!(
            "twofold-cli-analyze-{}-{n}.csv",
            std::process::id()
        ));
        std::fs::write(&path, contents).expect("write temporary CSV");
        TempCsv(path)
    }

    fn path(&self) -> String {
        self.0.display().to_string()
    }
}

impl Drop for TempCsv {
    fn drop(&mut self) {
        let _ = std::fs::remove_file(&self.0);
    }
}

/// Runs `twofold analyze ARGS...`, returning (exit code, stdout, stderr).
fn analyze(args: &[&str]) -> (i32, String, String) {
    let mut full = vec!["analyze".to_string()];
    full.extend(args.iter().map(|s| s.to_string()));
    let mut out = Vec::new();
    let mut err = Vec::new();
    let code = twofold_app::cli::run(&full, &mut out, &mut err);
    (
        code,
        String::from_utf8(out).expect("utf-8 stdout"),
        String::from_utf8(err).expect("utf-8 stderr"),
    )
}

fn analyze_json(csv: &TempCsv, extra: &[&str]) -> Value {
    let path = csv.path();
    let mut args = vec!["--csv", path.as_str(), "--json"];
    args.extend_from_slice(extra);
    let (code, out, err) = analyze(&args);
    assert_eq!(code, 0, "stderr: {err}");
    assert!(err.is_empty(), "stderr: {err}");
    serde_json::from_str(&out).expect("valid JSON")
}

/// A coded table in standard order for `k` factors (first factor fastest) with one or more
/// response columns.
fn coded_csv(k: usize, names: &[&str], columns: &[&[&str]]) -> String {
    let letters = ["A", "B", "C", "D", "E"];
    let mut s = letters[..k].join(",");
    for n in names {
        s.push(',');
        s.push_str(n);
    }
    s.push('\n');
    let runs = columns[0].len();
    for i in 0..runs {
        let settings: Vec<&str> = (0..k)
            .map(|f| {
                if (i % (1 << k)) >> f & 1 == 1 {
                    "1"
                } else {
                    "-1"
                }
            })
            .collect();
        s.push_str(&settings.join(","));
        for c in columns {
            s.push(',');
            s.push_str(c[i]);
        }
        s.push('\n');
    }
    s
}

/// Montgomery, *Design and Analysis of Experiments*, Example 6-2 (filtration rate).
const FILTRATION: [&str; 16] = [
    "45", "71", "48", "65", "68", "60", "80", "65", "43", "100", "45", "104", "75", "86", "70",
    "96",
];

/// Montgomery, Example 8-2 (integrated-circuit yield), responses in standard order of A–D.
const IC_YIELD: [&str; 16] = [
    "8", "9", "34", "52", "16", "22", "45", "60", "6", "10", "30", "50", "15", "21", "44", "63",
];

/// The E = ABCD column of Example 8-2 in standard order of A–D: +1 where an even number of A–D
/// are at +1 (the product of four ±1 settings).
fn ic_yield_e_column() -> Vec<&'static str> {
    (0..16u32)
        .map(|i| {
            if i.count_ones().is_multiple_of(2) {
                "1"
            } else {
                "-1"
            }
        })
        .collect()
}

fn number(v: &Value, what: &str) -> f64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("{what} is not a number: {v}"))
}

fn find<'a>(array: &'a Value, key: &str, name: &str) -> &'a Value {
    array
        .as_array()
        .expect("array")
        .iter()
        .find(|e| e[key] == name)
        .unwrap_or_else(|| panic!("no entry {key} = {name}"))
}

#[test]
fn filtration_rate_json_has_effects_lenth_half_normal_model_and_anova() {
    let csv = TempCsv::new(&coded_csv(4, &["filtration"], &[&FILTRATION]));
    let v = analyze_json(&csv, &[]);
    for key in [
        "response",
        "effects",
        "lenth",
        "half_normal",
        "model",
        "anova",
        "curvature",
        "not_estimable",
    ] {
        assert!(v.get(key).is_some(), "missing key {key}");
    }
    assert_eq!(v["response"], "filtration");
    assert_eq!(v["effects"].as_array().expect("effects").len(), 15);
    // Montgomery, Example 6-2: effects (three decimals) and Lenth's margins.
    let a = find(&v["effects"], "term", "A");
    assert_close(number(&a["effect"], "A effect"), 21.625, 0.0005, "A");
    assert_close(
        number(&a["coefficient"], "A coef"),
        10.8125,
        0.00005,
        "A coefficient",
    );
    assert_eq!(a["aliases"], serde_json::json!([]));
    let ac = find(&v["effects"], "term", "AC");
    assert_close(number(&ac["effect"], "AC"), -18.125, 0.0005, "AC");
    assert_close(number(&v["lenth"]["pse"], "pse"), 2.625, 0.0005, "PSE");
    assert_close(number(&v["lenth"]["me"], "me"), 6.74778, 0.000005, "ME");
    assert_close(number(&v["lenth"]["sme"], "sme"), 13.69896, 0.000005, "SME");
    assert_close(number(&v["lenth"]["df"], "df"), 5.0, 1e-12, "d");
    // Half-normal: largest |effect| A last, at Φ⁻¹(0.5 + 0.5·14.5/15) = 2.128045 (scipy).
    let hn = v["half_normal"].as_array().expect("half_normal");
    assert_eq!(hn.len(), 15);
    assert_eq!(hn[14]["term"], "A");
    assert_close(number(&hn[14]["abs_effect"], "abs"), 21.625, 1e-12, "|A|");
    assert_close(
        number(&hn[14]["quantile"], "q"),
        2.128045,
        0.0000005,
        "A quantile",
    );
    // Default model: the effects beyond ME (A, C, D, AC, AD; same source), already hierarchical.
    assert_eq!(
        v["model"]["terms"],
        serde_json::json!(["A", "C", "D", "AC", "AD"])
    );
    let coefs = v["model"]["coefficients"].as_array().expect("coefficients");
    assert_close(number(&coefs[0], "A coef"), 10.8125, 1e-9, "A coefficient");
    // ANOVA of that model from the published effects: SS = 16·effect²/4, e.g. A 1870.5625;
    // residual = total 5730.9375 − model 5535.8125 = 195.125 on 10 df.
    let anova = &v["anova"];
    assert_close(
        number(&find(anova, "source", "A")["ss"], "SS A"),
        1870.5625,
        1e-9,
        "SS A",
    );
    let residual = find(anova, "source", "Residual");
    assert_eq!(residual["df"], 10);
    assert_close(
        number(&residual["ss"], "SS res"),
        195.125,
        1e-9,
        "SS residual",
    );
    assert_close(
        number(&v["model"]["r2"], "r2"),
        5535.8125 / 5730.9375,
        1e-9,
        "R²",
    );
    assert!(v["model"].get("adj_r2").is_some() && v["model"].get("pred_r2").is_some());
    assert!(v["model"]["sigma"].is_number());
    assert!(v["curvature"].is_null());
    assert_eq!(v["not_estimable"], serde_json::json!([]));
}

#[test]
fn ic_yield_fraction_typed_in_gives_published_anova() {
    // Montgomery, Example 8-2: E = ABCD typed in as a column; model A + B + C + AB. Published:
    // SS A 495.0625, B 4590.0625, C 473.0625, AB 189.0625, error 28.1875 on 11 df; F 193.20,
    // 1791.24, 184.61, 73.78.
    let e = ic_yield_e_column();
    let text = coded_csv(4, &["E", "yield"], &[&e, &IC_YIELD]);
    let csv = TempCsv::new(&text);
    // The header `A,B,C,D,E,yield` makes E the fifth factor.
    let v = analyze_json(&csv, &["--terms", "A,B,C,AB"]);
    assert_eq!(v["factors"], 5);
    assert_eq!(v["defining_relation"], serde_json::json!(["ABCDE"]));
    assert_eq!(v["generators"], serde_json::json!(["E = ABCD"]));
    let a = find(&v["effects"], "term", "A");
    assert_eq!(a["aliases"], serde_json::json!(["BCDE"]));
    assert_close(number(&a["effect"], "A"), 11.125, 0.0005, "A effect");
    let ab = find(&v["effects"], "term", "AB");
    assert_eq!(ab["aliases"], serde_json::json!(["CDE"]));
    for (source, ss, f) in [
        ("A", 495.0625, 193.20),
        ("B", 4590.0625, 1791.24),
        ("C", 473.0625, 184.61),
        ("AB", 189.0625, 73.78),
    ] {
        let row = find(&v["anova"], "source", source);
        assert_close(number(&row["ss"], source), ss, 0.00005, source);
        assert_close(number(&row["f"], source), f, 0.005, source);
    }
    let residual = find(&v["anova"], "source", "Residual");
    assert_eq!(residual["df"], 11);
    assert_close(number(&residual["ss"], "res"), 28.1875, 0.00005, "error SS");
}

#[test]
fn typing_an_alias_as_a_model_term_fits_its_chain() {
    let e = ic_yield_e_column();
    let csv = TempCsv::new(&coded_csv(4, &["E", "yield"], &[&e, &IC_YIELD]));
    let v = analyze_json(&csv, &["--terms", "A,B,CDE"]);
    assert_eq!(v["model"]["terms"], serde_json::json!(["A", "B", "AB"]));
    assert!(
        v["model"]["notes"][0]
            .as_str()
            .expect("note")
            .contains("CDE")
    );
}

#[test]
fn replicated_design_reports_lack_of_fit() {
    // Montgomery, Example 6-1 (two replicates, listed one after the other). Reduced model A, B,
    // C, AB: lack of fit 2.25 on 3 df, F 1.20, p 0.370; pure error 5.00 on 8 df.
    let y = [
        "-3", "0", "-1", "2", "-1", "2", "1", "6", "-1", "1", "0", "3", "0", "1", "1", "5",
    ];
    let csv = TempCsv::new(&coded_csv(3, &["fill"], &[&y]));
    let v = analyze_json(&csv, &["--terms", "A,B,C,AB"]);
    assert_eq!(v["method"], "fast_transform");
    let lof = find(&v["anova"], "source", "Lack of fit");
    assert_eq!(lof["df"], 3);
    assert_close(number(&lof["ss"], "lof"), 2.25, 0.005, "lack of fit SS");
    assert_close(number(&lof["f"], "lof F"), 1.20, 0.005, "lack of fit F");
    assert_close(number(&lof["p"], "lof p"), 0.370, 0.0005, "lack of fit p");
    let pe = find(&v["anova"], "source", "Pure error");
    assert_eq!(pe["df"], 8);
    assert_close(number(&pe["ss"], "pe"), 5.00, 0.005, "pure error SS");
}

#[test]
fn centre_points_give_the_curvature_test() {
    // Montgomery, Example 6-6: corners 39.3, 40.9, 40.0, 41.5 and five centres. Curvature SS
    // 0.0027 (four decimals), F 0.063; exact p 0.8137 (REFERENCES, computed).
    let text = "A,B,y\n-1,-1,39.3\n1,-1,40.9\n-1,1,40.0\n1,1,41.5\n0,0,40.3\n0,0,40.5\n0,0,40.7\n0,0,40.2\n0,0,40.6\n";
    let csv = TempCsv::new(text);
    let v = analyze_json(&csv, &["--terms", "A,B,AB"]);
    assert_eq!(v["runs"]["centre_used"], 5);
    let c = &v["curvature"];
    assert_close(number(&c["ss"], "curv ss"), 0.0027, 0.00005, "curvature SS");
    assert_close(number(&c["f"], "curv F"), 0.063, 0.0005, "curvature F");
    assert_close(number(&c["p"], "curv p"), 0.8137, 0.00005, "curvature p");
    let a = find(&v["effects"], "term", "A");
    assert_close(
        number(&a["effect"], "A"),
        1.55,
        1e-12,
        "A effect from corners",
    );
}

#[test]
fn missing_value_is_reported_as_not_estimable() {
    let mut y = FILTRATION;
    y[5] = "";
    let csv = TempCsv::new(&coded_csv(4, &["filtration"], &[&y]));
    let v = analyze_json(&csv, &[]);
    assert_eq!(v["method"], "least_squares");
    assert_eq!(v["not_estimable"], serde_json::json!(["ABCD"]));
    assert_eq!(v["runs"]["missing"], 1);
    assert_eq!(v["effects"].as_array().expect("effects").len(), 14);
}

#[test]
fn response_and_transform_options_select_and_transform() {
    let csv = TempCsv::new(&coded_csv(
        4,
        &["filtration", "yield"],
        &[&FILTRATION, &IC_YIELD],
    ));
    let v = analyze_json(&csv, &["--response", "yield", "--transform", "ln"]);
    assert_eq!(v["response"], "yield");
    assert_eq!(v["transform"], "ln");
    // Effects of ln(yield) on the 2^4 layout, computed with numpy:
    //   ly = np.log(y); c = np.prod(X[:, cols], axis=1); ly[c > 0].mean() - ly[c < 0].mean()
    for (term, value) in [
        ("A", 0.3582338262273037),
        ("B", 1.3289926933660268),
        ("AB", 0.03735016943677305),
    ] {
        let e = find(&v["effects"], "term", term);
        assert_close(number(&e["effect"], term), value, 1e-9, term);
    }
}

#[test]
fn text_report_is_readable() {
    let csv = TempCsv::new(&coded_csv(4, &["filtration"], &[&FILTRATION]));
    let path = csv.path();
    let (code, out, err) = analyze(&["--csv", &path]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("Lenth: PSE 2.625"), "{out}");
    assert!(out.contains("Model: A + C + D + AC + AD"), "{out}");
    assert!(out.contains("Analysis of variance"), "{out}");
}

#[test]
fn text_report_names_the_generator_found_in_the_columns() {
    // Montgomery, Example 8-2: E = ABCD typed in; the report names it and I = ABCDE.
    let e = ic_yield_e_column();
    let csv = TempCsv::new(&coded_csv(4, &["E", "yield"], &[&e, &IC_YIELD]));
    let path = csv.path();
    let (code, out, err) = analyze(&["--csv", &path, "--terms", "A,B,C,AB"]);
    assert_eq!(code, 0, "{err}");
    assert!(
        out.contains("Read from the columns: E = ABCD; defining relation I = ABCDE"),
        "{out}"
    );
}

#[test]
fn help_prints_usage() {
    let (code, out, _) = analyze(&["--help"]);
    assert_eq!(code, 0);
    assert!(out.contains("--csv <FILE>"), "{out}");
}

#[test]
fn bad_input_is_refused_with_one_line_naming_row_and_column() {
    let square = "A,B,y\n-1,-1,1\n1,-1,2\n-1,1,3\n1,1,4\n";
    // (file contents, extra arguments, expected part of the message)
    let cases: &[(&str, &[&str], &str)] = &[
        (
            "A,B,y\n-1,-1,1\n1,-1,abc\n",
            &[],
            "row 2 (line 3), column `y`: `abc` is not a number",
        ),
        (
            "A,B,y\n-1,-1,1\n1,-1,inf\n",
            &[],
            "row 2 (line 3), column `y`: `inf` is not a finite number",
        ),
        (
            "A,B,y\n-1,-1,1\n1,2,5\n",
            &[],
            "row 2 (line 3), column `B`: `2` is not a coded level",
        ),
        (
            "A,B,y\n-1,-1,1\n1,0.5,5\n",
            &[],
            "row 2 (line 3), column `B`: `0.5` is not a coded level",
        ),
        (square, &["--response", "z"], "unknown response `z`"),
        (
            "A,B,y\n-1,-1,1\n1,-1,2\n-1,1,\n1,1,4\n",
            &["--terms", "A,B,AB"],
            "the model needs 4 parameters but only 3 runs",
        ),
        ("", &[], "the file is empty"),
        ("A,B,y\n", &[], "no data rows"),
        (square, &["--frobnicate"], "unknown option `--frobnicate`"),
        (square, &["--terms", "A,E"], "--terms: `E` in `E`"),
        (
            "A,B,y\n-1,-1,1\n1,-1,2\n-1,0,3\n1,1,4\n",
            &[],
            "row 3 (line 4): some factors are at 0",
        ),
        (
            "A,B,y\n-1,-1,1\n1,-1,-2\n-1,1,3\n1,1,4\n",
            &["--transform", "ln"],
            "row 2 (line 3), column `y`: ln needs positive responses",
        ),
        (
            "A,B,y\n-1,-1,1\n1,-1,2\n",
            &["--transform", "power:x"],
            "--transform `power:x`",
        ),
        ("A,B,y\n-1,-1,1\n1,-1\n", &[], "row 2 (line 3): 2 cells"),
        ("x,y\n1,2\n", &[], "first column must be factor `A`"),
        (
            "A,B,C,y\n-1,-1,-1,1\n1,1,1,2\n",
            &["--terms", "AB"],
            "aliased with the mean",
        ),
    ];
    for (contents, extra, expected) in cases {
        let csv = TempCsv::new(contents);
        let path = csv.path();
        let mut args = vec!["--csv", path.as_str(), "--json"];
        args.extend_from_slice(extra);
        let (code, out, err) = analyze(&args);
        assert_eq!(code, 2, "{contents:?} {extra:?}: exit code, stderr {err}");
        assert!(out.is_empty(), "{contents:?}: nothing on stdout, got {out}");
        assert!(err.contains(expected), "{contents:?} {extra:?}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
        assert!(err.starts_with("error: "), "{err}");
    }
}

#[test]
fn missing_file_is_bad_input() {
    let path = std::env::temp_dir().join(format!(
        "twofold-cli-analyze-{}-does-not-exist.csv",
        std::process::id()
    ));
    let p = path.display().to_string();
    let (code, _, err) = analyze(&["--csv", &p]);
    assert_eq!(code, 2);
    assert!(err.contains("cannot read"), "{err}");
}

/// The demo project analysed headless gives the same numbers as the window's analysis cache
/// (one computation, two front ends): effects, Lenth's margins, coefficients, ANOVA and R².
#[test]
fn project_file_gives_the_same_numbers_as_the_window() {
    // The same computation on both sides; the tolerance (1e-12 relative) only absorbs the last
    // bit that JSON number reading may round differently.
    fn same(a: f64, b: f64) {
        assert!(
            (a - b).abs() <= 1e-12 * a.abs().max(b.abs()).max(1.0),
            "{a} vs {b}"
        );
    }
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/../demo-projects/powder-coating-cure.ron"
    );
    let (code, out, err) = analyze(&[path, "--json"]);
    assert_eq!(code, 0, "{err}");
    let j: Value = serde_json::from_str(&out).unwrap();
    let project = twofold_study::project::load_project(std::path::Path::new(path)).unwrap();
    let terms: Vec<String> = j["model"]["terms"]
        .as_array()
        .unwrap()
        .iter()
        .map(|t| t.as_str().unwrap().to_string())
        .collect();
    assert!(!terms.is_empty());
    let settings = twofold_study::project::ModelSettings {
        terms,
        ..Default::default()
    };
    let mut cache = twofold_study::report::ReportCache::new();
    let pane = cache.get_with(&project, 1, 0, &settings);
    let effects = &pane.effects.as_ref().unwrap().effects;
    let cli_effects = j["effects"].as_array().unwrap();
    assert_eq!(cli_effects.len(), effects.len());
    for (c, e) in cli_effects.iter().zip(effects) {
        assert_eq!(c["term"], e.term.label());
        same(c["effect"].as_f64().unwrap(), e.effect);
    }
    let lenth = pane.lenth.as_ref().unwrap();
    same(j["lenth"]["pse"].as_f64().unwrap(), lenth.pse);
    same(j["lenth"]["me"].as_f64().unwrap(), lenth.me);
    let model = pane.fit.as_ref().unwrap();
    let coefs: Vec<f64> = model.coefficients.iter().map(|c| c.estimate).collect();
    let cli_coefs: Vec<f64> = j["model"]["coefficients"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_f64().unwrap())
        .collect();
    assert_eq!(cli_coefs.len(), coefs.len());
    for (c, m) in cli_coefs.iter().zip(&coefs) {
        same(*c, *m);
    }
    same(j["model"]["r2"].as_f64().unwrap(), model.r2.unwrap());
    let rows = j["anova"].as_array().unwrap();
    assert_eq!(rows.len(), model.anova.len());
    for (c, r) in rows.iter().zip(&model.anova) {
        assert_eq!(c["source"], r.source.to_string());
        same(c["ss"].as_f64().unwrap(), r.ss);
    }
}

/// `analyze PROJECT.ron --json` carries the window's follow-up options, the suggested first,
/// and the text report ends with them. The rule (fold on the factor in doubt, or fully) is
/// Montgomery's, Design and Analysis of Experiments, fold-over sections; the numbers of runs
/// follow from the eight-run design.
#[test]
fn a_project_analysis_lists_the_follow_up_runs_with_the_suggested_first() {
    use twofold_study::project::{Cell, Edit, Factor, Project, ResponseDef, project_to_string};
    let mut p = Project::new("Screening");
    for name in ["Temp", "Time", "Speed", "Load", "Feed"] {
        p.factors.push(Factor::numeric(name, "", 0.0, 1.0));
    }
    p.responses.push(ResponseDef::new("Yield", ""));
    p.design.base_runs = Some(8);
    p.design.generators = vec!["D=AB".into(), "E=AC".into()];
    p.apply(Edit::RegenerateRuns).unwrap();
    let wobble = [0.3, -0.2, 0.1, -0.4, 0.2, 0.0, -0.1, 0.25];
    for r in &mut p.runs {
        let y = 60.0 + 7.0 * f64::from(r.levels[0]) + wobble[r.std_order as usize - 1];
        r.values[0] = Cell::new(format!("{y}"));
    }
    let file = TempCsv::new(&project_to_string(&p).unwrap());
    let ron = file.0.with_extension("ron");
    std::fs::rename(&file.0, &ron).unwrap();
    let path = ron.display().to_string();
    let (code, out, err) = analyze(&[&path, "--json"]);
    let (tcode, text, _) = analyze(&[&path]);
    let _ = std::fs::remove_file(&ron);
    assert_eq!(code, 0, "{err}");
    let j: Value = serde_json::from_str(&out).unwrap();
    let list = j["follow_up"].as_array().unwrap();
    let kinds: Vec<&str> = list.iter().map(|o| o["kind"].as_str().unwrap()).collect();
    assert_eq!(
        kinds,
        [
            "fold_full",
            "fold_A",
            "fold_B",
            "fold_C",
            "fold_D",
            "fold_E",
            "semifold_full_A+",
            "semifold_A_B+",
            "semifold_B_A+",
            "semifold_C_A+",
            "semifold_D_A+",
            "semifold_E_A+",
            "centre_points",
            "replicate"
        ]
    );
    assert_eq!(list[0]["suggested"], true);
    assert_eq!(list[0]["runs_added"], 8);
    assert!(
        list[0]["reason"]
            .as_str()
            .unwrap()
            .contains("A cannot be told from BD, CE")
    );
    assert_eq!(list[2]["suggested"], false);
    assert!(list[2]["reason"].is_null());
    assert_eq!(list[6]["runs_added"], 4);
    assert_eq!(tcode, 0);
    assert!(
        text.contains("What to run next:\n* Full fold-over"),
        "{text}"
    );
}

#[test]
fn a_whole_plot_column_judges_each_stratum_against_its_own_effects() {
    // An invented 2^5 split-plot study: A and B set an oven that is reset only between whole
    // plots (four of them, with their own whole-plot error), C, D, E change run to run.
    // y = 50 + 6A + 2B + 3C + 1.5CD + whole-plot error + a small wobble.
    let oven = |a: i32, b: i32| match (a, b) {
        (-1, -1) => (2.0, "oven-1"),
        (1, -1) => (-1.5, "oven-2"),
        (-1, 1) => (1.0, "oven-3"),
        _ => (-1.5, "oven-4"),
    };
    let mut text = String::from("A,B,C,D,E,whole_plot,Y\n");
    for i in 0..32i32 {
        let l = |f: i32| if i >> f & 1 == 1 { 1 } else { -1 };
        let (a, b, c, d, e) = (l(0), l(1), l(2), l(3), l(4));
        let (w, label) = oven(a, b);
        let wobble = f64::from((i * 37) % 11 - 5) / 20.0;
        let y = 50.0
            + 6.0 * f64::from(a)
            + 2.0 * f64::from(b)
            + 3.0 * f64::from(c)
            + 1.5 * f64::from(c * d)
            + w
            + wobble;
        text.push_str(&format!("{a},{b},{c},{d},{e},{label},{y}\n"));
    }
    let csv = TempCsv::new(&text);
    let j = analyze_json(&csv, &[]);
    assert_eq!(j["whole_plots"], 4);
    let effects = j["effects"].as_array().unwrap();
    let stratum = |term: &str| {
        effects
            .iter()
            .find(|e| e["term"] == term)
            .map(|e| e["stratum"].as_str().unwrap_or("").to_string())
            .unwrap_or_default()
    };
    // A, B and AB are constant inside each whole plot (by hand); everything else varies.
    for t in ["A", "B", "AB"] {
        assert_eq!(stratum(t), "whole_plot", "{t}");
    }
    for t in ["C", "D", "AC", "CD", "ABC", "ABCDE"] {
        assert_eq!(stratum(t), "subplot", "{t}");
    }
    // Each stratum's margins are Lenth's method on that stratum's contrasts alone (two routes:
    // the report's and the core's function on the effects read back from the JSON).
    for (key, m) in [("whole_plot", 3usize), ("subplot", 28)] {
        let contrasts: Vec<f64> = effects
            .iter()
            .filter(|e| e["stratum"] == key)
            .map(|e| e["effect"].as_f64().unwrap())
            .collect();
        assert_eq!(contrasts.len(), m, "{key}");
        let ours = twofold_core::lenth::lenth(&contrasts).unwrap();
        let l = &j["lenth_by_stratum"][key];
        assert_eq!(l["m"], m);
        assert_close(l["pse"].as_f64().unwrap(), ours.pse, 1e-12, key);
        assert_close(l["me"].as_f64().unwrap(), ours.me, 1e-12, key);
    }
    // The subplot margin is far smaller than one pooled over both strata would be: the large
    // whole-plot error does not hide the subplot effects.
    let sub_me = j["lenth_by_stratum"]["subplot"]["me"].as_f64().unwrap();
    let whole_me = j["lenth_by_stratum"]["whole_plot"]["me"].as_f64().unwrap();
    assert!(sub_me < whole_me);
}

#[test]
fn replicated_whole_plots_test_each_term_against_its_own_stratum_error() {
    // Invented: A and B set once per whole plot, two replicates of their four settings (eight
    // whole plots of two runs), C changes inside. The whole-plot and subplot errors are checked
    // against a second route written here: whole-plot means fitted by their own A and B columns,
    // and the within-plot residual after C and AC (Bisgaard 2000's two error strata).
    let wpn = [1.0, -0.5, 0.8, -1.2, 0.3, -0.4, 0.6, -0.6];
    let mut text = String::from("A,B,C,whole_plot,Y\n");
    let mut rows = Vec::new();
    let mut i = 0;
    for rep in 0..2 {
        for (a, b) in [(-1, -1), (-1, 1), (1, -1), (1, 1)] {
            let w = rep * 4 + ((a + 1) + (b + 1) / 2) as usize;
            for c in [-1, 1] {
                let y = 30.0
                    + 4.0 * f64::from(a)
                    + f64::from(b)
                    + 2.0 * f64::from(c)
                    + 0.5 * f64::from(a * c)
                    + wpn[w]
                    + f64::from((i * 7) % 5 - 2) / 10.0;
                text.push_str(&format!("{a},{b},{c},wp{w},{y}\n"));
                rows.push((a, b, c, w, y));
                i += 1;
            }
        }
    }
    let csv = TempCsv::new(&text);
    let j = analyze_json(&csv, &["--terms", "A,B,C,AC"]);
    let anova = &j["split_plot_anova"];
    assert_eq!(
        anova["whole_plot_error"]["df"], 5,
        "8 whole plots - 1 - A, B"
    );
    assert_eq!(anova["subplot_error"]["df"], 6, "16 runs - 8 plots - C, AC");
    // The second route.
    let n = rows.len() as f64;
    type Run = (i32, i32, i32, usize, f64);
    let coef =
        |f: &dyn Fn(&Run) -> i32| rows.iter().map(|r| f64::from(f(r)) * r.4).sum::<f64>() / n;
    let (ba, bb, bc, bac) = (
        coef(&|r| r.0),
        coef(&|r| r.1),
        coef(&|r| r.2),
        coef(&|r| r.0 * r.2),
    );
    let grand = rows.iter().map(|r| r.4).sum::<f64>() / n;
    let mut ss_wp = 0.0;
    let mut within = 0.0;
    for w in 0..8 {
        let plot: Vec<_> = rows.iter().filter(|r| r.3 == w).collect();
        let mean = plot.iter().map(|r| r.4).sum::<f64>() / 2.0;
        let fitted = grand + ba * f64::from(plot[0].0) + bb * f64::from(plot[0].1);
        ss_wp += 2.0 * (mean - fitted).powi(2);
        within += plot.iter().map(|r| (r.4 - mean).powi(2)).sum::<f64>();
    }
    let ss_sp = within - n * (bc * bc + bac * bac);
    assert_close(
        anova["whole_plot_error"]["ss"].as_f64().unwrap(),
        ss_wp,
        1e-10,
        "SS wp",
    );
    assert_close(
        anova["subplot_error"]["ss"].as_f64().unwrap(),
        ss_sp,
        1e-10,
        "SS sp",
    );
    let term = |t: &str| {
        anova["terms"]
            .as_array()
            .unwrap()
            .iter()
            .find(|x| x["term"] == t)
            .cloned()
            .unwrap_or(Value::Null)
    };
    assert_eq!(term("A")["stratum"], "whole_plot");
    assert_eq!(term("C")["stratum"], "subplot");
    assert_close(
        term("A")["f"].as_f64().unwrap(),
        n * ba * ba / (ss_wp / 5.0),
        1e-9,
        "F A",
    );
    assert_close(
        term("C")["f"].as_f64().unwrap(),
        n * bc * bc / (ss_sp / 6.0),
        1e-9,
        "F C",
    );
}

#[test]
fn replicated_split_plot_agrees_with_statsmodels() {
    // Reference: `fixtures/make_splitplot_fixture.py` (statsmodels OLS for each stratum's
    // error, MixedLM REML for each term's F; the script and its JSON are kept side by side).
    // Invented study: A, B hard to change (eight whole plots), C, D changed inside each.
    let fixture: Value = serde_json::from_str(include_str!("fixtures/statsmodels_splitplot.json"))
        .expect("fixture parses");
    let csv = TempCsv::new(fixture["csv"].as_str().expect("csv text"));
    let terms = fixture["terms_arg"].as_str().expect("terms");
    let j = analyze_json(&csv, &["--terms", terms]);
    let anova = &j["split_plot_anova"];
    for key in ["whole_plot_error", "subplot_error"] {
        assert_eq!(anova[key]["df"], fixture[key]["df"], "{key} df");
        assert_close(
            anova[key]["ss"].as_f64().unwrap(),
            fixture[key]["ss"].as_f64().unwrap(),
            1e-8,
            key,
        );
    }
    let expected = fixture["terms"].as_array().expect("terms");
    assert_eq!(expected.len(), 7);
    for e in expected {
        let t = e["term"].as_str().unwrap();
        let got = anova["terms"]
            .as_array()
            .unwrap()
            .iter()
            .find(|x| x["term"] == t)
            .unwrap_or_else(|| panic!("{t} missing"));
        assert_eq!(got["stratum"], e["stratum"], "{t}");
        // REML estimates agree with least squares to the optimiser's tolerance.
        assert_close(
            got["coefficient"].as_f64().unwrap(),
            e["coefficient"].as_f64().unwrap(),
            1e-6,
            t,
        );
        let f = e["f"].as_f64().unwrap();
        assert_close(got["f"].as_f64().unwrap(), f, 1e-6 * f.max(1.0), t);
        assert_close(
            got["p"].as_f64().unwrap(),
            e["p"].as_f64().unwrap(),
            1e-6,
            t,
        );
    }
}

/// A 2^12 with more empty cells than the completion takes (`MAX_COMPLETION_CELLS`): the lowest
/// chains are estimated, the rest counted in `effects_left_out`, and a warning says so. The data
/// are exact (y = 50 + 3A + 2B + AB), so the effects are known whatever the route (common
/// practice, no source).
#[test]
fn a_table_with_thousands_of_missing_runs_estimates_its_lowest_effects_and_says_so() {
    let letters = "ABCDEFGHJKLM";
    let mut text = letters
        .chars()
        .map(String::from)
        .collect::<Vec<_>>()
        .join(",");
    text.push_str(",Y\n");
    let mut missing = 0;
    for r in 0..4096usize {
        let x: Vec<i32> = (0..12)
            .map(|f| if r >> f & 1 == 1 { 1 } else { -1 })
            .collect();
        let row: Vec<String> = x.iter().map(ToString::to_string).collect();
        // Runs whose index has a remainder of 0, 1 or 2 on division by 5 (2 458 of them) have
        // no value yet.
        if r % 5 < 3 {
            missing += 1;
            text.push_str(&format!("{},\n", row.join(",")));
        } else {
            let y = 50.0 + 3.0 * f64::from(x[0]) + 2.0 * f64::from(x[1]) + f64::from(x[0] * x[1]);
            text.push_str(&format!("{},{y}\n", row.join(",")));
        }
    }
    assert_eq!(missing, 2458);
    let csv = TempCsv::new(&text);
    let j = analyze_json(&csv, &["--terms", "A,B,AB"]);
    let left = j["effects_left_out"].as_u64().unwrap_or(0) as usize;
    let shown = j["effects"].as_array().map_or(0, Vec::len);
    let lost = j["not_estimable"].as_array().map_or(0, Vec::len);
    assert_eq!(left + shown + lost, 4095);
    assert_eq!(shown + lost, twofold_core::effects::REDUCED_CHAINS);
    assert_close(
        number(&find(&j["effects"], "term", "A")["effect"], "A"),
        6.0,
        1e-9,
        "A",
    );
    assert_close(
        number(&find(&j["effects"], "term", "AB")["effect"], "AB"),
        2.0,
        1e-9,
        "AB",
    );
    let warnings = j["warnings"].to_string();
    assert!(warnings.contains("2458 runs missing"), "{warnings}");
    assert!(warnings.contains("left in the residual"), "{warnings}");
}
