//! A report as a readable text (the output of `twofold analyze`).

use std::fmt::Write as _;

use twofold_core::anova::SumsOfSquaresKind;
use twofold_core::effects::EffectMethod;
use twofold_core::lenth::Significance;

use super::Report;
use super::json::labels;

/// Numbers of the text report: the shared rule, six significant digits, plain ASCII so the
/// report can be read by scripts as well as people.
fn num(x: f64) -> String {
    crate::numbers::plain(x, 6)
}

fn opt(x: Option<f64>) -> String {
    x.map_or_else(|| "-".to_string(), num)
}

/// The report as a readable text, or why it cannot be written (no effects or no fit).
pub fn report_text(r: &Report) -> Result<String, String> {
    let e = r.effects.as_ref().map_err(Clone::clone)?;
    let m = r.fit.as_ref().map_err(Clone::clone)?;
    let choice = r.choice.as_ref().map_err(Clone::clone)?;
    let mut s = String::new();
    let excluded = r
        .total_runs
        .saturating_sub(r.used_runs)
        .saturating_sub(r.values_missing);
    let _ = writeln!(
        s,
        "Response {} ({}); {} factors, {} runs: {} two-level and {} centre runs used, {} missing, {} excluded",
        r.response_name,
        r.transform,
        r.factor_count,
        r.total_runs,
        e.factorial_runs,
        e.centre_runs,
        r.values_missing,
        excluded
    );
    let words = e.aliasing.defining_words();
    if !words.is_empty() {
        let w: Vec<String> = words.iter().map(ToString::to_string).collect();
        let g: Vec<String> = e.aliasing.generators().iter().map(|g| g.label()).collect();
        let _ = writeln!(
            s,
            "Read from the columns: {}; defining relation I = {}",
            g.join(", "),
            w.join(" = ")
        );
    }
    let method = match e.method {
        EffectMethod::FastTransform => "Yates' algorithm",
        _ => "least squares",
    };
    let _ = writeln!(s, "\nEffects ({method})");
    let _ = writeln!(
        s,
        "  {:<8} {:>12} {:>12}  {:<11} aliases",
        "term", "effect", "coefficient", "Lenth"
    );
    for eff in &e.effects {
        let verdict = match &r.lenth {
            Ok(l) => match l.classify(eff.effect) {
                Significance::BeyondSme => "beyond SME",
                Significance::BeyondMe => "beyond ME",
                _ => "",
            },
            Err(_) => "",
        };
        let aliases: Vec<String> = eff.aliases.iter().map(ToString::to_string).collect();
        let _ = writeln!(
            s,
            "  {:<8} {:>12} {:>12}  {:<11} {}",
            eff.term.label(),
            num(eff.effect),
            num(eff.coefficient),
            verdict,
            aliases.join(" = ")
        );
    }
    if !e.not_estimable.is_empty() {
        let _ = writeln!(
            s,
            "Not estimable from the runs at hand: {}",
            labels(&e.not_estimable).join(", ")
        );
    }
    if e.left_out > 0 {
        let _ = writeln!(
            s,
            "Left out to keep the work bounded (highest chains): {}",
            e.left_out
        );
    }
    if !e.confounded_with_blocks.is_empty() {
        let _ = writeln!(
            s,
            "Confounded with blocks: {}",
            labels(&e.confounded_with_blocks).join(", ")
        );
    }
    if e.layout_dependent > 0 {
        let _ = writeln!(
            s,
            "The plan is not a regular fraction: {} further chains are partially aliased and not shown",
            e.layout_dependent
        );
    }
    match &r.lenth {
        Ok(l) => {
            let _ = writeln!(
                s,
                "\nLenth: PSE {} (s0 {}, m {}, d {}), ME {}, SME {}",
                num(l.pse),
                num(l.s0),
                l.m,
                num(l.df),
                num(l.me),
                num(l.sme)
            );
        }
        Err(err) => {
            let _ = writeln!(s, "\nLenth: {err}");
        }
    }
    if let Some(strata) = &r.strata {
        let _ = writeln!(s);
        for line in strata.sentences(e) {
            let _ = writeln!(s, "{line}");
        }
    }
    let _ = writeln!(s, "\nHalf-normal plot positions (smallest |effect| first)");
    for p in &r.half_normal {
        let _ = writeln!(
            s,
            "  {:<8} |effect| {:>12}  quantile {}",
            p.term.label(),
            num(p.abs_effect),
            num(p.quantile)
        );
    }
    let _ = writeln!(s, "\n{}", r.error_basis.sentence());
    if let Some(pe) = &r.pure_error {
        let _ = writeln!(
            s,
            "Pure error: SS {} on {} df, MS {}",
            num(pe.ss),
            pe.df,
            num(pe.ms)
        );
    }
    if !choice.tests.is_empty() {
        let _ = writeln!(s, "Terms tested against pure error (all effects fitted)");
        for t in &choice.tests {
            let _ = writeln!(
                s,
                "  {:<8} SS {:>12}  F {:>10}  p {:>10}",
                t.term.label(),
                num(t.ss),
                opt(t.f),
                opt(t.p)
            );
        }
    }
    let model_terms = if m.terms.is_empty() {
        "mean only".to_string()
    } else {
        labels(&m.terms).join(" + ")
    };
    let _ = writeln!(s, "\nModel: {model_terms} ({})", choice.selection.words());
    for note in &choice.notes {
        let _ = writeln!(s, "  note: {note}");
    }
    let mut added = choice.added_for_hierarchy.clone();
    added.extend(m.added_for_hierarchy.iter().copied());
    if !added.is_empty() {
        let _ = writeln!(s, "  added for hierarchy: {}", labels(&added).join(", "));
    }
    for u in &m.unestimable {
        let _ = writeln!(s, "  not estimable in the fit: {}", u.column);
    }
    let _ = writeln!(
        s,
        "  {:<10} {:>12} {:>12} {:>10} {:>10}",
        "term", "coefficient", "std error", "t", "p"
    );
    for c in std::iter::once(&m.intercept).chain(&m.coefficients) {
        let _ = writeln!(
            s,
            "  {:<10} {:>12} {:>12} {:>10} {:>10}",
            if c.term.is_identity() {
                "intercept".to_string()
            } else {
                c.term.label()
            },
            num(c.estimate),
            opt(c.std_error),
            opt(c.t),
            opt(c.p)
        );
    }
    let kind = match m.sums_of_squares_kind {
        SumsOfSquaresKind::Orthogonal => "orthogonal",
        _ => "adjusted",
    };
    let curvature_error = match r.curvature.map(|c| c.basis) {
        Some(super::ErrorBasis::PureError) => "; curvature against pure error",
        _ => "",
    };
    let _ = writeln!(
        s,
        "\nAnalysis of variance ({kind} sums of squares; F against the residual{curvature_error})"
    );
    let _ = writeln!(
        s,
        "  {:<12} {:>4} {:>12} {:>12} {:>10} {:>10}",
        "source", "df", "SS", "MS", "F", "p"
    );
    for row in &r.anova_rows() {
        let _ = writeln!(
            s,
            "  {:<12} {:>4} {:>12} {:>12} {:>10} {:>10}",
            row.source.to_string(),
            row.df,
            num(row.ss),
            opt(row.ms),
            opt(row.f),
            opt(row.p)
        );
    }
    let _ = writeln!(
        s,
        "R² {}, adjusted R² {}, predicted R² {}, sigma {}",
        opt(m.r2),
        opt(m.adj_r2),
        opt(m.pred_r2),
        opt(m.sigma)
    );
    if let Some(c) = &r.curvature {
        let _ = writeln!(
            s,
            "Curvature: SS {}, F {}, p {} ({} centre runs; against {} on {} df)",
            num(c.ss),
            opt(c.f),
            opt(c.p),
            c.centre_runs,
            match c.basis {
                super::ErrorBasis::PureError => "pure error",
                _ => "the residual",
            },
            c.df_error
        );
    }
    if let Some(q) = &r.quadratic {
        s.push_str(&super::quadratic::quadratic_text(q));
    }
    for w in &r.warnings {
        let _ = writeln!(s, "Warning: {}", w.text);
    }
    Ok(s)
}

/// The follow-up options as a short section of the text report, suggested first; empty when
/// there are none.
pub fn follow_up_text(options: &[super::NextRun]) -> String {
    let mut s = String::new();
    if options.is_empty() {
        return s;
    }
    let _ = writeln!(s, "What to run next:");
    for n in options {
        let mark = if n.suggested { "* " } else { "  " };
        match &n.preview {
            Ok(_) => {
                let _ = writeln!(s, "{mark}{} (+{} runs)", n.title, n.runs_added());
            }
            Err(why) => {
                let _ = writeln!(s, "{mark}{} (cannot be added: {why})", n.title);
            }
        }
        if let Some(r) = &n.reason {
            let _ = writeln!(s, "    suggested: {r}");
        }
        for line in &n.resolves {
            let _ = writeln!(s, "    {line}");
        }
    }
    s
}
