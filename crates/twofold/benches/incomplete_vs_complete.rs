//! Incomplete and blocked tables side by side with the complete table of the same size, in one
//! run: `twofold analyze --csv TABLE --terms A,B,AB --json` (whole process, output written) and
//! the default analysis (no `--terms`) on a 2^12 (4 096 runs) complete, with half its values
//! missing, in four blocks made by confounding with 2 % missing, and in the same four blocks
//! complete. Each run three times, the fastest kept; the ratio to the complete table is printed.
//!
//! The tables are invented (test inputs): four active effects and uniform noise from a fixed-seed
//! generator; the missing runs are drawn from the same generator.
//!
//! Run with `cargo bench -p twofold --bench incomplete_vs_complete`.

mod common;

use common::best_of_three;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Duration;

const LETTERS: &str = "ABCDEFGHJKLM";

/// A fixed-seed generator of uniform numbers in [0, 1).
struct Uniform(u64);

impl Uniform {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Writes the 2^12 table: `missing` is the chance a run has no value; with `blocks` a block
/// column by the signs of ABCDEF and AGHJKLM (four blocks, ABCDEF·AGHJKLM confounded too).
fn write_table(path: &Path, missing: f64, blocks: bool) -> std::io::Result<()> {
    let k = LETTERS.len();
    let mut out = std::io::BufWriter::new(std::fs::File::create(path)?);
    let header: Vec<String> = LETTERS.chars().map(String::from).collect();
    writeln!(
        out,
        "{}{},Y",
        header.join(","),
        if blocks { ",block" } else { "" }
    )?;
    let mut noise = Uniform(20_261_206);
    let mut gaps = Uniform(77);
    for r in 0..1usize << k {
        let x: Vec<i32> = (0..k)
            .map(|f| if r >> f & 1 == 1 { 1 } else { -1 })
            .collect();
        let block_shift;
        let mut cells: Vec<String> = x.iter().map(ToString::to_string).collect();
        if blocks {
            let first = x[..6].iter().product::<i32>() < 0;
            let second = x[0] * x[6..].iter().product::<i32>() < 0;
            let b = 1 + usize::from(first) + 2 * usize::from(second);
            block_shift = b as f64;
            cells.push(b.to_string());
        } else {
            block_shift = 0.0;
        }
        let y = 50.0 + 3.0 * f64::from(x[0]) + 2.0 * f64::from(x[1]) - 1.5 * f64::from(x[2])
            + f64::from(x[0] * x[1])
            + block_shift
            + noise.next()
            - 0.5;
        if gaps.next() < missing {
            writeln!(out, "{},", cells.join(","))?;
        } else {
            writeln!(out, "{},{y:.4}", cells.join(","))?;
        }
    }
    out.flush()
}

fn main() {
    let dir = std::env::temp_dir().join(format!("twofold-bench-gaps-{}", std::process::id()));
    if let Err(e) = std::fs::create_dir_all(&dir) {
        eprintln!("cannot make {}: {e}", dir.display());
        return;
    }
    let cases: [(&str, &str, f64, bool); 4] = [
        ("complete", "complete.csv", 0.0, false),
        ("half the values missing", "half.csv", 0.5, false),
        ("four blocks, 2 % missing", "blocks_gaps.csv", 0.02, true),
        ("four blocks, complete", "blocks.csv", 0.0, true),
    ];
    for (_, file, missing, blocks) in &cases {
        if let Err(e) = write_table(&dir.join(file), *missing, *blocks) {
            eprintln!("cannot write {file}: {e}");
            return;
        }
    }
    let exe = PathBuf::from(env!("CARGO_BIN_EXE_twofold"));
    let time = |file: &str, terms: Option<&str>| {
        best_of_three(|| {
            let mut c = Command::new(&exe);
            c.args(["analyze", "--csv"])
                .arg(dir.join(file))
                .arg("--json");
            if let Some(t) = terms {
                c.args(["--terms", t]);
            }
            c
        })
    };
    for (label, terms) in [("--terms A,B,AB", Some("A,B,AB")), ("default model", None)] {
        println!("2^12 table (4 096 runs), twofold analyze --csv --json {label}");
        let base = time(cases[0].1, terms);
        for (name, file, _, _) in &cases {
            let took = if *file == cases[0].1 {
                base.clone()
            } else {
                time(file, terms)
            };
            match (&took, &base) {
                (Ok(t), Ok(b)) => println!(
                    "  {name:<28} {:>8.3} s  {:>6.1}x the complete table",
                    t.as_secs_f64(),
                    ratio(*t, *b)
                ),
                (Ok(t), Err(_)) => println!("  {name:<28} {:>8.3} s", t.as_secs_f64()),
                (Err(e), _) => println!("  {name:<28} not run: {e}"),
            }
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
}

fn ratio(a: Duration, b: Duration) -> f64 {
    a.as_secs_f64() / b.as_secs_f64()
}
