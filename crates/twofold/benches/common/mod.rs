//! What the bench binaries share: timing a whole process.

use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

/// The fastest of three runs of `cmd`, or why it could not run.
pub fn best_of_three(mut make: impl FnMut() -> Command) -> Result<Duration, String> {
    let mut best = Duration::MAX;
    for _ in 0..3 {
        let start = Instant::now();
        let status = make()
            .stdout(Stdio::null())
            .stderr(Stdio::piped())
            .output()
            .map_err(|e| e.to_string())?;
        let took = start.elapsed();
        if !status.status.success() {
            return Err(String::from_utf8_lossy(&status.stderr).trim().to_string());
        }
        best = best.min(took);
    }
    Ok(best)
}
