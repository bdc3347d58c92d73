//! The analysis of a complete 2^16 table, side by side with a general-purpose least-squares
//! script, in one run: `twofold analyze --csv TABLE --terms <16 main effects, 120 two-factor
//! interactions> --json` (whole process, output written) against `python3 lstsq_reference.py
//! TABLE` (numpy's lstsq on the same 137-column model, reading the same CSV), each run three
//! times, the fastest kept. The default analysis (no `--terms`) is timed too.
//!
//! The table is invented (a test input): 65 536 runs, four active effects and uniform noise from
//! a fixed-seed generator. Needs python3 with numpy for the reference; without it the reference
//! line says so and only Twofold is timed.
//!
//! Run with `cargo bench -p twofold --bench analysis_vs_lstsq`.

mod common;

use common::best_of_three;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Duration;

const LETTERS: &str = "ABCDEFGHJKLMNOPQ";

fn write_table(path: &Path) -> std::io::Result<()> {
    let k = 16;
    let mut out = std::io::BufWriter::new(std::fs::File::create(path)?);
    let header: Vec<String> = LETTERS.chars().map(String::from).collect();
    writeln!(out, "{},Y", header.join(","))?;
    let mut state: u64 = 20_261_205;
    for r in 0..1usize << k {
        let x: Vec<i32> = (0..k)
            .map(|f| if r >> f & 1 == 1 { 1 } else { -1 })
            .collect();
        state = state
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        let noise = (state >> 11) as f64 / (1u64 << 53) as f64 - 0.5;
        let y = 50.0 + 3.0 * f64::from(x[0]) + 2.0 * f64::from(x[1]) - 1.5 * f64::from(x[2])
            + f64::from(x[0] * x[1])
            + noise;
        let cells: Vec<String> = x.iter().map(ToString::to_string).collect();
        writeln!(out, "{},{y:.4}", cells.join(","))?;
    }
    out.flush()
}

fn main() {
    let dir = std::env::temp_dir().join(format!("twofold-bench-{}", std::process::id()));
    if let Err(e) = std::fs::create_dir_all(&dir) {
        eprintln!("cannot make {}: {e}", dir.display());
        return;
    }
    let table = dir.join("full16.csv");
    if let Err(e) = write_table(&table) {
        eprintln!("cannot write the table: {e}");
        return;
    }
    let terms: Vec<String> = {
        let l: Vec<char> = LETTERS.chars().collect();
        let mut t: Vec<String> = l.iter().map(|c| c.to_string()).collect();
        for i in 0..l.len() {
            for j in i + 1..l.len() {
                t.push(format!("{}{}", l[i], l[j]));
            }
        }
        t
    };
    let exe = PathBuf::from(env!("CARGO_BIN_EXE_twofold"));
    let script = Path::new(env!("CARGO_MANIFEST_DIR")).join("benches/lstsq_reference.py");
    let ours = best_of_three(|| {
        let mut c = Command::new(&exe);
        c.args(["analyze", "--csv"])
            .arg(&table)
            .args(["--terms", &terms.join(","), "--json"]);
        c
    });
    let default = best_of_three(|| {
        let mut c = Command::new(&exe);
        c.args(["analyze", "--csv"]).arg(&table).arg("--json");
        c
    });
    let reference = best_of_three(|| {
        let mut c = Command::new("python3");
        c.arg(&script).arg(&table);
        c
    });
    println!(
        "2^16 table, 137-column model (intercept, 16 main effects, 120 two-factor interactions)"
    );
    let show = |what: &str, r: &Result<Duration, String>| match r {
        Ok(d) => println!("  {what:<44} {:>8.3} s", d.as_secs_f64()),
        Err(e) => println!("  {what:<44} not run: {e}"),
    };
    show("twofold analyze --csv --terms (137) --json", &ours);
    show("python3 numpy lstsq (same CSV, same model)", &reference);
    show("twofold analyze --csv --json (default)", &default);
    if let (Ok(a), Ok(b)) = (&ours, &reference) {
        println!(
            "  twofold is {:.1}x the speed of the reference",
            b.as_secs_f64() / a.as_secs_f64()
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
}
