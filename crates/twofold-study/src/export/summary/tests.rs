use super::*;
use crate::export::input::*;

#[test]
fn fraction_symbols_and_resolutions() {
    assert_eq!(fraction_symbol(5, 1), "2⁵⁻¹");
    assert_eq!(fraction_symbol(11, 0), "2¹¹");
    assert_eq!(roman(4), "IV");
    assert_eq!(roman(20), "20");
}

const LONG: &str = "Concentration of the secondary accelerator in the premix";

/// One response at the edge of what a page holds: every effect of a 32-run design, a long
/// ANOVA, six interactions, many warnings, thirteen best settings.
fn crowded_section(name: &str) -> ResponseSummary {
    ResponseSummary {
        response: ResponseFacts {
            name: name.into(),
            unit: "N/25 mm".into(),
            transform: "natural log".into(),
            runs_used: 35,
            runs_total: 36,
        },
        effects: (0..31)
            .map(|i| EffectRow {
                term: format!("AB{i}"),
                aliases: vec!["CD".into(), "-EF".into(), "GH".into()],
                effect: 40.0 / (i as f64 + 1.0) * if i % 2 == 0 { 1.0 } else { -1.0 },
                in_model: i < 6,
            })
            .collect(),
        lenth: Some(LenthFacts {
            pse: 1.5,
            me: 3.2,
            sme: 6.1,
            alpha: 0.05,
            df: 10.3,
        }),
        half_normal: (0..31)
            .map(|i| HalfNormalPoint {
                term: format!("T{i}"),
                abs_effect: 40.0 / (i as f64 + 1.0),
                positive: i % 3 != 0,
                quantile: 2.5 - i as f64 * 0.08,
                in_model: i < 6,
            })
            .collect(),
        strata_half_normal: Vec::new(),
        interactions: (0..6)
            .map(|i| InteractionPanel {
                term: format!("A{i}"),
                x_factor: LONG.into(),
                x_levels: ["low setting with words".into(), "high".into()],
                trace_factor: LONG.into(),
                trace_levels: ["a".into(), "b".into()],
                means: [[Some(1.0 + i as f64), Some(3.0)], [None, Some(-2.0)]],
            })
            .collect(),
        interaction_note: String::new(),
        anova: Some(AnovaTable {
            rows: (0..40)
                .map(|i| AnovaRow {
                    source: format!("Source {i}"),
                    df: 1,
                    ss: 12345.678,
                    ms: Some(0.00012),
                    f: Some(1e9),
                    p: Some(0.5),
                    emphasis: i == 0,
                })
                .collect(),
            r_squared: Some(0.9),
            adj_r_squared: Some(0.8),
            pred_r_squared: None,
            std_dev: Some(2.0),
            tests_note: String::new(),
        }),
        equation: Some(Equation {
            text: format!(
                "y = {}",
                "+ 1.234567*Concentration of the secondary accelerator ".repeat(30)
            ),
            note: "note".into(),
            coded: false,
        }),
        best: Some(BestSettings {
            goal: format!("maximise {name}"),
            settings: (0..13)
                .map(|i| (format!("{LONG} {i}"), "supplier with a long name".into()))
                .collect(),
            predicted: Some(12.5),
            interval: Some((10.0, 15.0, "95 % prediction interval".into())),
        }),
        warnings: (0..12)
            .map(|i| {
                format!(
                    "Warning {i} of {name}: {}",
                    "something needs a look ".repeat(12)
                )
            })
            .collect(),
    }
}

/// A project at the edge of what a page holds: many factors with long names, forty alias
/// chains, two crowded responses.
fn crowded() -> SummaryInput {
    let letters = "ABCDEFGHJKLMN";
    SummaryInput {
        title:
            "A very long project title that goes on and on about the trial it describes in detail"
                .into(),
        date: "2025-03-04".into(),
        description: "Word ".repeat(400),
        factors: letters
            .chars()
            .map(|l| FactorRow {
                letter: l,
                name: format!("{LONG} {l}"),
                unit: "g/kg".into(),
                low: LevelValue::Number(-1.25e-5),
                high: LevelValue::Label("supplier with a long name".into()),
            })
            .collect(),
        design: DesignFacts {
            factors: 13,
            generators_count: 8,
            base_runs: 32,
            centre_points: 4,
            replicates: 1,
            blocks: 2,
            total_runs: 36,
            generators: (0..8)
                .map(|i| format!("{} = ABCDE", &letters[5 + i..6 + i]))
                .collect(),
            block_generators: vec!["ABC".into()],
            resolution: Some(4),
            main_effect_chains: (0..13).map(|i| format!("T{i} = ABC = BCD = CDE")).collect(),
            interaction_chains: (0..27).map(|i| format!("AB{i} = CD = EF = GH")).collect(),
            tangled_chains: 27,
            seed: Some(42),
            screening_runs: None,
            follow_up: None,
            irregular: false,
            runs_in_words: None,
            detectable: Some(
                "an effect of 3.79 is found with probability 0.8 (σ = 2.5, two-sided test at α = 0.05, 13 error df, main-effects model); an effect of 2 needs 4 replicates".into(),
            ),
        },
        ofat: Some(OfatFacts {
            ofat_runs: 224,
            design_runs: 32,
            explanation: "x ".repeat(200),
        }),
        responses: vec![
            crowded_section("Peel strength after humid ageing"),
            crowded_section("Haze"),
        ],
        warnings: vec!["The run sheet no longer matches the design.".into()],
        decision: Some(crate::export::input::DecisionFacts {
            goals: vec![
                ("Peel strength after humid ageing".into(), "as large as possible: worthless at 10, fully met at 20 N".into()),
                ("spread of Haze".into(), "as small as possible: fully met at 0, worthless at 2 %".into()),
            ],
            noise: vec!["Humidity (σ 1 coded)".into()],
            settings: letters
                .chars()
                .map(|l| (format!("{LONG} {l}"), "supplier with a long name".to_string()))
                .collect(),
            overall: 0.61,
            responses: vec![crate::export::input::DecisionResponse {
                name: "Haze".into(),
                unit: "%".into(),
                predicted: Some(1.25),
                interval: Some((0.5, 2.0)),
                desirability: Some(0.4),
                transmitted_sd: Some(0.3),
            }],
            binding: vec!["the goal that binds: “Haze” (d = 0.4)".into()],
        }),
        footer: Footer {
            tool: "Twofold test".into(),
            seed: Some(42),
            data_hash: "f".repeat(64),
        },
    }
}

/// Every `x`/`y` attribute of every text element.
fn text_positions(svg: &str) -> Vec<(f64, f64)> {
    svg.lines()
        .filter(|l| l.starts_with("<text x="))
        .map(|l| {
            let attr = |name: &str| -> f64 {
                let start = l.find(&format!(" {name}=\"")).unwrap() + name.len() + 3;
                let end = start + l[start..].find('"').unwrap();
                l[start..end].parse().unwrap()
            };
            (attr("x"), attr("y"))
        })
        .collect()
}

/// The text of every text element of a page, in drawing order.
fn texts(svg: &str) -> Vec<String> {
    svg.lines()
        .filter(|l| l.starts_with("<text "))
        .filter_map(|l| {
            let start = l.find('>')? + 1;
            let end = l.rfind("</text>")?;
            Some(l[start..end].replace("&amp;", "&").replace("&apos;", "'"))
        })
        .collect()
}

#[test]
fn a_crowded_summary_stays_inside_its_margins_and_says_where_the_rest_is() {
    let input = crowded();
    for paper in [Paper::A4, Paper::Letter] {
        let pages = render_pages(&input, paper);
        assert!(pages.len() > 2, "two responses and pages of more detail");
        let (w, h) = paper.size();
        let m = paper.margin();
        for (i, svg) in pages.iter().enumerate() {
            for (x, y) in text_positions(svg) {
                assert!(
                    x >= m - 1.0 && x <= w - m + 1.0,
                    "{paper:?} page {}: text at x = {x}",
                    i + 1
                );
                assert!(
                    y >= m && y <= h - m + 1.0,
                    "{paper:?} page {}: text at y = {y}",
                    i + 1
                );
            }
            assert!(
                svg.contains("confirmation runs"),
                "{paper:?} page {}: the cautions",
                i + 1
            );
            assert!(
                svg.contains(&format!("page {} of {}", i + 1, pages.len())),
                "{paper:?}: page number"
            );
            assert!(
                !svg.contains("in the app"),
                "{paper:?} page {}: the page stands alone",
                i + 1
            );
        }
        let first = &pages[0];
        assert!(
            first.contains("smaller effects are not in this table"),
            "{paper:?}"
        );
        assert!(
            first.contains("more warnings: every warning is under"),
            "{paper:?}"
        );
        assert!(first.contains("All 6 are drawn under"), "{paper:?}");
        assert!(first.contains("under “Alias chains”"), "{paper:?}");
        assert!(pages[1].contains("Response 2 of 2: Haze"), "{paper:?}");
        // Everything left out of the response pages is on the pages of more detail, whole.
        let all: Vec<String> = pages.iter().flat_map(|p| texts(p)).collect();
        let detail: Vec<String> = pages[2..].iter().flat_map(|p| texts(p)).collect();
        for chain in input
            .design
            .main_effect_chains
            .iter()
            .chain(&input.design.interaction_chains)
        {
            assert!(
                detail.iter().any(|t| t == chain),
                "{paper:?}: chain {chain}"
            );
        }
        for section in &input.responses {
            for e in &section.effects {
                let label = e.label_with_sign();
                assert!(all.contains(&label), "{paper:?}: effect {label}");
            }
            for (f, v) in &section.best.as_ref().unwrap().settings {
                let line = format!("{f} = {v}");
                assert!(detail.contains(&line), "{paper:?}: {line}");
            }
        }
    }
}

#[test]
fn every_response_gets_its_page_with_its_own_numbers() {
    let mut input = crowded();
    input.responses[1].effects[0].effect = 98.765; // printed to four digits: 98.77
    let pages = render_pages(&input, Paper::A4);
    assert!(pages[0].contains("Response 1 of 2: Peel strength after humid ageing"));
    assert!(pages[1].contains("Response 2 of 2: Haze"));
    assert!(
        pages[1].contains(">98.77</text>"),
        "the second response's largest effect"
    );
    assert!(!pages[0].contains(">98.77</text>"));
    // The project's facts are on the first page only; the factor table is on every page, so
    // a label shortened in a chart has its full text on the same page.
    assert!(pages[0].contains(">Design</text>"));
    assert!(!pages[1].contains(">Design</text>"));
    assert!(pages[1].contains(">Factors</text>"));
}

#[test]
fn effect_charts_show_the_sign_by_shape_and_words_and_colour_only_for_the_model() {
    let mut section = crowded_section("Haze");
    section.effects.truncate(4);
    let input = SummaryInput {
        responses: vec![section],
        ..SummaryInput::default()
    };
    let page = render_pages(&input, Paper::A4).remove(0);
    let all = texts(&page);
    // Largest first: AB0 (+40, in the model), AB1 (−20), AB2 (+13.3), AB3 (−10).
    for label in ["AB0=CD=-EF=GH +", "AB1=CD=-EF=GH \u{2212}"] {
        assert!(all.iter().any(|t| t == label), "{label}: {all:?}");
    }
    assert!(page.contains(SIGN_LEGEND), "the legend in words");
    let triangles: Vec<&str> = page.lines().filter(|l| l.starts_with("<polygon")).collect();
    assert!(
        triangles.len() >= 8,
        "a marker per bar and per half-normal point"
    );
    for t in &triangles {
        let filled = t.contains(&format!("fill=\"{ACCENT}\""));
        let hollow = t.contains("fill=\"#ffffff\"");
        assert!(filled || hollow, "only two looks: {t}");
    }
}

#[test]
fn empty_input_still_draws_a_page_with_the_cautions() {
    let pages = render_pages(&SummaryInput::default(), Paper::A4);
    assert_eq!(pages.len(), 1);
    let svg = &pages[0];
    assert!(svg.contains("Untitled experiment"));
    assert!(svg.contains("confirmation runs"));
    assert!(svg.contains("No effects yet"));
    assert!(svg.contains("page 1 of 1"));
}
