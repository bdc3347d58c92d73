//! Files written so that a crash never leaves half of one: the one atomic writer used by
//! projects, recovery copies, recent files, exported pages and CSV tables.

use std::fs::{self, File, OpenOptions};
use std::io::{self, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

/// Points in an atomic write where a test can make it fail.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum SaveStep {
    /// The temporary file is written and flushed; the target is untouched.
    BeforeRename,
}

/// Writes `bytes` to `path` so that `path` holds either its old content or the new, whole: a
/// temporary file beside the target is written and flushed to the disk, renamed over the target,
/// and the folder is flushed so the rename itself survives a power cut (on Unix; elsewhere the
/// rename is the last step). An existing file keeps its permissions. On failure the temporary file
/// is removed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> io::Result<()> {
    write_atomic_with(path, bytes, &mut |_| Ok(()))
}

static TEMP_COUNTER: AtomicU64 = AtomicU64::new(0);

pub(crate) fn write_atomic_with(
    path: &Path,
    bytes: &[u8],
    hook: &mut dyn FnMut(SaveStep) -> io::Result<()>,
) -> io::Result<()> {
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    let name = path
        .file_name()
        .ok_or_else(|| io::Error::new(io::ErrorKind::InvalidInput, "the path names no file"))?;
    // Same folder, so the rename never crosses file systems; pid and counter keep two writers
    // (two windows, or a recovery copy beside its project) from sharing a temporary file.
    let temp = dir.join(format!(
        ".{}.{}-{}.tmp",
        name.to_string_lossy(),
        std::process::id(),
        TEMP_COUNTER.fetch_add(1, Ordering::Relaxed)
    ));
    let result = (|| {
        let mut file = OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&temp)?;
        file.write_all(bytes)?;
        file.sync_all()?;
        if let Ok(meta) = fs::metadata(path) {
            // Keep the permissions the engineer gave the file (e.g. read-only for others).
            let _ = fs::set_permissions(&temp, meta.permissions());
        }
        drop(file);
        hook(SaveStep::BeforeRename)?;
        fs::rename(&temp, path)?;
        sync_dir(&dir);
        Ok(())
    })();
    if result.is_err() {
        // The temporary file holds nothing the target does not; removing it loses no data.
        let _ = fs::remove_file(&temp);
    }
    result
}

#[cfg(unix)]
fn sync_dir(dir: &Path) {
    // Best effort: the data is already safe in the renamed file; this only makes the new name
    // durable. Some file systems (network shares) refuse to sync a folder.
    if let Ok(d) = File::open(dir) {
        let _ = d.sync_all();
    }
}

#[cfg(not(unix))]
fn sync_dir(_dir: &Path) {
    // Folders cannot be opened for syncing on Windows; the rename is durable there once done.
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_and_leaves_no_temporary() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.svg");
        write_atomic(&path, b"first").unwrap();
        write_atomic(&path, b"second").unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"second");
        let names: Vec<_> = fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names.len(), 1, "{names:?}");
    }

    #[test]
    fn atomic_write_into_a_missing_folder_fails_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("missing").join("out.svg");
        assert!(write_atomic(&path, b"x").is_err());
        assert_eq!(
            fs::read_dir(dir.path()).unwrap().count(),
            0,
            "no temporary file left"
        );
    }

    #[cfg(unix)]
    #[test]
    fn atomic_write_keeps_the_permissions_of_the_file_it_replaces() {
        use std::os::unix::fs::PermissionsExt;
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("shared.csv");
        write_atomic(&path, b"old").unwrap();
        // Owner read/write, group read, others nothing: not the default of a new file (0644).
        fs::set_permissions(&path, fs::Permissions::from_mode(0o640)).unwrap();
        write_atomic(&path, b"new").unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"new");
        let mode = fs::metadata(&path).unwrap().permissions().mode() & 0o777;
        assert_eq!(mode, 0o640);
    }
}
