//! Recovery copies: the project as it stood at the last committed value (or a second after the
//! last keystroke), kept until it is saved.
//!
//! # Where
//! For a project that has a file, the copy sits beside it as `.<file name>.recovery` (e.g.
//! `.cure-trial.ron.recovery`), so it travels with the project folder and is easy to find. When
//! that folder cannot be written (a read-only share), the copy goes to the per-user data folder
//! (see [`super::places`]) under `recovery/<file stem>-<16 hex digits of the path's SHA-256>.ron.recovery`.
//! A project never saved has one copy there: `recovery/unsaved.ron.recovery`.
//!
//! # When it is offered
//! On start (or when a project is opened) [`RecoveryStore::find`] returns a copy when it is at
//! least as recent as the project file (modification times), or the file is gone, and its content
//! differs from the file's. Saving the project or choosing "discard" removes the copy.
//!
//! # When it is written
//! At once, in the frame of the change, when a value is committed: Enter or Tab in a field, a
//! field left, or any applied change that is not a keystroke in the middle of typing (the window
//! asks [`RecoveryDebouncer::needs_copy`] and writes). A value committed just before a crash is
//! therefore in the copy.
//!
//! Keystrokes still inside a field are coalesced: [`RecoveryDebouncer`] decides. The first unsaved
//! change starts a delay (one second by default); when it runs out, one copy of the then-current
//! revision is written, however many edits came in between. It takes the time from the caller,
//! so it is tested without sleeping.
//!
//! Every copy goes through the one atomic writer (`files::write_atomic`): a crash during the
//! write leaves the previous copy whole.

use std::fs;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant, SystemTime};

use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

use super::io::{FileError, write_atomic};
use super::model::{FORMAT_VERSION, Project};

/// What a recovery file holds.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename = "Recovery")]
struct RecoveryFile {
    format_version: u32,
    /// Revision of the project when written (for the log; revisions restart with the program).
    revision: u64,
    /// ISO-8601 time given by the caller.
    written_at: String,
    /// The project's file when the copy was made, if it had one (for the engineer's information).
    project_path: Option<String>,
    project: Project,
}

/// A recovery copy found on start, for the window to offer.
#[derive(Debug, Clone, PartialEq)]
pub struct RecoveryOffer {
    /// Where the copy is (to show, and to discard it).
    pub path: PathBuf,
    /// The recovered project.
    pub project: Project,
    /// When it was written, as the writer's ISO-8601 text.
    pub written_at: String,
    /// The copy's modification time, when the file system reports one.
    pub modified: Option<SystemTime>,
}

/// Where recovery copies are written and looked for.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RecoveryStore {
    /// Per-user folder for copies of unsaved projects and of projects whose folder is read-only.
    user_dir: PathBuf,
}

impl RecoveryStore {
    /// The store in the engineer's data folder, or `None` when the environment names none.
    pub fn for_user() -> Option<RecoveryStore> {
        super::places::user_data_dir().map(|d| RecoveryStore::in_dir(d.join("recovery")))
    }

    /// A store whose per-user folder is `dir` (tests, or a portable install).
    pub fn in_dir(dir: impl Into<PathBuf>) -> RecoveryStore {
        RecoveryStore {
            user_dir: dir.into(),
        }
    }

    /// The copy beside a project file: `.<file name>.recovery` in the same folder.
    pub fn beside(project_path: &Path) -> PathBuf {
        let name = project_path
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_else(|| "project".to_string());
        project_path.with_file_name(format!(".{name}.recovery"))
    }

    /// The copy in the per-user folder for `project_path` (or for the unsaved project).
    pub fn in_user_dir(&self, project_path: Option<&Path>) -> PathBuf {
        match project_path {
            None => self.user_dir.join("unsaved.ron.recovery"),
            Some(p) => {
                let stem = p
                    .file_stem()
                    .map(|s| s.to_string_lossy().into_owned())
                    .unwrap_or_else(|| "project".to_string());
                let digest = Sha256::digest(p.to_string_lossy().as_bytes());
                let hex: String = digest.iter().take(8).map(|b| format!("{b:02x}")).collect();
                self.user_dir.join(format!("{stem}-{hex}.ron.recovery"))
            }
        }
    }

    fn candidates(&self, project_path: Option<&Path>) -> Vec<PathBuf> {
        match project_path {
            Some(p) => vec![RecoveryStore::beside(p), self.in_user_dir(Some(p))],
            None => vec![self.in_user_dir(None)],
        }
    }

    /// Writes a recovery copy of `project` (atomically) and returns where. `written_at` is the
    /// caller's ISO-8601 time. A project with a file gets its copy beside it, or in the per-user
    /// folder when that fails.
    pub fn write(
        &self,
        project_path: Option<&Path>,
        project: &Project,
        revision: u64,
        written_at: &str,
    ) -> Result<PathBuf, FileError> {
        let file = RecoveryFile {
            format_version: FORMAT_VERSION,
            revision,
            written_at: written_at.to_string(),
            project_path: project_path.map(|p| p.to_string_lossy().into_owned()),
            project: project.clone(),
        };
        let text = ron::ser::to_string_pretty(&file, super::io::pretty())
            .map_err(|e| FileError::Serialize(e.to_string()))?;
        let io_err = |path: &Path, source| FileError::Io {
            action: "write the recovery copy",
            path: path.to_path_buf(),
            source,
        };
        if let Some(p) = project_path {
            let beside = RecoveryStore::beside(p);
            if write_atomic(&beside, text.as_bytes()).is_ok() {
                // A copy left in the per-user folder by an earlier fallback is now older.
                let _ = fs::remove_file(self.in_user_dir(Some(p)));
                return Ok(beside);
            }
        }
        let target = self.in_user_dir(project_path);
        fs::create_dir_all(&self.user_dir).map_err(|e| io_err(&self.user_dir, e))?;
        write_atomic(&target, text.as_bytes()).map_err(|e| io_err(&target, e))?;
        Ok(target)
    }

    /// The recovery copy to offer for `project_path` (or for the unsaved project), if any: the
    /// newest readable copy that is at least as recent as the project file and differs from it.
    /// A copy that exists but cannot be read is an error (it is left in place, never deleted).
    pub fn find(&self, project_path: Option<&Path>) -> Result<Option<RecoveryOffer>, FileError> {
        let mut best: Option<RecoveryOffer> = None;
        for path in self.candidates(project_path) {
            let text = match fs::read_to_string(&path) {
                Ok(t) => t,
                Err(e) if e.kind() == std::io::ErrorKind::NotFound => continue,
                Err(source) => {
                    return Err(FileError::Io {
                        action: "read the recovery copy",
                        path,
                        source,
                    });
                }
            };
            let file: RecoveryFile = ron::from_str(&text).map_err(|e| FileError::from_ron(&e))?;
            if file.format_version > FORMAT_VERSION {
                return Err(FileError::TooNew {
                    found: file.format_version,
                    supported: FORMAT_VERSION,
                });
            }
            file.project
                .check_structure()
                .map_err(FileError::Structure)?;
            let modified = fs::metadata(&path).and_then(|m| m.modified()).ok();
            let newer = match (&best, modified) {
                (None, _) => true,
                (Some(b), Some(m)) => b.modified.is_none_or(|bm| m > bm),
                (Some(_), None) => false,
            };
            if newer {
                best = Some(RecoveryOffer {
                    path,
                    project: file.project,
                    written_at: file.written_at,
                    modified,
                });
            }
        }
        let Some(offer) = best else {
            return Ok(None);
        };
        if let Some(p) = project_path
            && let Ok(meta) = fs::metadata(p)
        {
            let project_time = meta.modified().ok();
            let older = matches!((offer.modified, project_time), (Some(r), Some(f)) if r < f);
            if older {
                return Ok(None);
            }
            if super::io::load_project(p).is_ok_and(|saved| saved == offer.project) {
                return Ok(None);
            }
        }
        Ok(Some(offer))
    }

    /// Removes the recovery copies of `project_path` (or of the unsaved project): after a save,
    /// or when the engineer declines the offer. Missing copies are not an error.
    pub fn discard(&self, project_path: Option<&Path>) -> Result<(), FileError> {
        for path in self.candidates(project_path) {
            match fs::remove_file(&path) {
                Ok(()) => {}
                Err(e) if e.kind() == std::io::ErrorKind::NotFound => {}
                Err(source) => {
                    return Err(FileError::Io {
                        action: "remove the recovery copy",
                        path,
                        source,
                    });
                }
            }
        }
        Ok(())
    }
}

/// Decides when to write a recovery copy: about a second after the first unsaved change, then
/// again a second after the next change, and so on, without ever writing the same revision twice.
#[derive(Debug, Clone)]
pub struct RecoveryDebouncer {
    delay: Duration,
    written: Option<u64>,
    pending_since: Option<Instant>,
}

impl Default for RecoveryDebouncer {
    /// One second.
    fn default() -> Self {
        RecoveryDebouncer::new(RecoveryDebouncer::DEFAULT_DELAY)
    }
}

impl RecoveryDebouncer {
    /// The delay between the first unsaved change and the copy.
    pub const DEFAULT_DELAY: Duration = Duration::from_secs(1);

    /// A debouncer with its own delay.
    pub fn new(delay: Duration) -> RecoveryDebouncer {
        RecoveryDebouncer {
            delay,
            written: None,
            pending_since: None,
        }
    }

    /// Records that `revision` needs no copy (just loaded, saved, or recovered from a copy).
    pub fn settled(&mut self, revision: u64) {
        self.written = Some(revision);
        self.pending_since = None;
    }

    /// Whether `revision` has no copy yet (it is neither written, saved nor just loaded). A
    /// committed value is copied at once when this is `true`, without waiting for the delay;
    /// then call [`Self::written`] (or [`Self::failed`]).
    pub fn needs_copy(&self, revision: u64) -> bool {
        self.written != Some(revision)
    }

    /// Call once per frame with the current revision. Returns `true` when a copy of this revision
    /// should be written now; then call [`Self::written`] (or [`Self::failed`]).
    pub fn poll(&mut self, revision: u64, now: Instant) -> bool {
        if self.written == Some(revision) {
            // Back at the state already copied (or saved), e.g. after undo: nothing to do.
            self.pending_since = None;
            return false;
        }
        let since = *self.pending_since.get_or_insert(now);
        now.saturating_duration_since(since) >= self.delay
    }

    /// When the next copy falls due, for scheduling a repaint; `None` when nothing is pending.
    pub fn deadline(&self) -> Option<Instant> {
        self.pending_since.map(|t| t + self.delay)
    }

    /// Records that a copy of `revision` was written.
    pub fn written(&mut self, revision: u64) {
        self.settled(revision);
    }

    /// Records that writing failed at `now`: try again one delay later.
    pub fn failed(&mut self, now: Instant) {
        self.pending_since = Some(now);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::project::{Factor, save_project};

    fn project(name: &str) -> Project {
        let mut p = Project::new(name);
        p.factors.push(Factor::numeric("Time", "min", 10.0, 20.0));
        p.factors
            .push(Factor::numeric("Temperature", "°C", 160.0, 200.0));
        p
    }

    #[test]
    fn debouncer_writes_a_second_after_the_first_change() {
        let t0 = Instant::now();
        let s = Duration::from_millis;
        let mut d = RecoveryDebouncer::default();
        d.settled(1);
        assert!(!d.poll(1, t0), "nothing changed");
        assert_eq!(d.deadline(), None);
        assert!(!d.poll(2, t0), "first change starts the delay");
        assert_eq!(d.deadline(), Some(t0 + s(1000)));
        assert!(
            !d.poll(3, t0 + s(400)),
            "more edits do not push the copy back"
        );
        assert!(!d.poll(4, t0 + s(999)));
        assert!(
            d.poll(4, t0 + s(1000)),
            "due one second after the first change"
        );
        d.written(4);
        assert!(
            !d.poll(4, t0 + s(1500)),
            "the same revision is not written twice"
        );
        assert!(!d.poll(5, t0 + s(2000)));
        assert!(d.poll(5, t0 + s(3000)));
        d.failed(t0 + s(3000));
        assert!(!d.poll(5, t0 + s(3500)), "a failed write waits one delay");
        assert!(d.poll(5, t0 + s(4000)));
        assert!(
            !d.poll(4, t0 + s(4000)),
            "undo back to the written state needs no copy"
        );
        assert_eq!(d.deadline(), None);
    }

    #[test]
    fn a_commit_needs_a_copy_only_of_a_revision_not_yet_written() {
        let t0 = Instant::now();
        let mut d = RecoveryDebouncer::default();
        d.settled(1);
        assert!(!d.needs_copy(1), "just loaded or saved");
        assert!(
            d.needs_copy(2),
            "a committed change is copied without waiting"
        );
        assert!(!d.poll(2, t0), "the delay alone would not write it yet");
        d.written(2);
        assert!(!d.needs_copy(2), "the same revision is not written twice");
        assert!(!d.poll(2, t0 + Duration::from_secs(5)));
    }

    #[test]
    fn copy_newer_than_its_project_is_offered() {
        let dir = tempfile::tempdir().unwrap();
        let store = RecoveryStore::in_dir(dir.path().join("user"));
        let file = dir.path().join("trial.ron");
        save_project(&file, &project("Saved")).unwrap();
        assert_eq!(store.find(Some(&file)).unwrap(), None, "no copy yet");

        let at = store
            .write(Some(&file), &project("Edited"), 7, "2025-03-04T10:22:05Z")
            .unwrap();
        assert_eq!(at, dir.path().join(".trial.ron.recovery"));
        let offer = store.find(Some(&file)).unwrap().unwrap();
        assert_eq!(offer.project.name, "Edited");
        assert_eq!(offer.written_at, "2025-03-04T10:22:05Z");
        assert_eq!(offer.path, at);

        // Saving the project afterwards makes the copy stale: not offered.
        std::thread::sleep(Duration::from_millis(20));
        save_project(&file, &project("Saved again")).unwrap();
        let copy_time = fs::metadata(&at).unwrap().modified().unwrap();
        let file_time = fs::metadata(&file).unwrap().modified().unwrap();
        if file_time > copy_time {
            assert_eq!(store.find(Some(&file)).unwrap(), None);
        }

        // A copy equal to the saved file offers nothing.
        store
            .write(Some(&file), &project("Saved again"), 8, "t")
            .unwrap();
        assert_eq!(store.find(Some(&file)).unwrap(), None);

        store.discard(Some(&file)).unwrap();
        assert!(!at.exists());
        store.discard(Some(&file)).unwrap();
    }

    #[test]
    fn unsaved_project_copy_lives_in_user_folder() {
        let dir = tempfile::tempdir().unwrap();
        let store = RecoveryStore::in_dir(dir.path().join("user"));
        let at = store.write(None, &project("Untitled"), 3, "t").unwrap();
        assert_eq!(at, dir.path().join("user").join("unsaved.ron.recovery"));
        assert_eq!(
            store.find(None).unwrap().unwrap().project,
            project("Untitled")
        );
        store.discard(None).unwrap();
        assert_eq!(store.find(None).unwrap(), None);
    }

    #[test]
    fn copy_of_a_deleted_project_is_offered() {
        let dir = tempfile::tempdir().unwrap();
        let store = RecoveryStore::in_dir(dir.path().join("user"));
        let file = dir.path().join("gone.ron");
        store
            .write(Some(&file), &project("Only copy"), 1, "t")
            .unwrap();
        assert_eq!(
            store.find(Some(&file)).unwrap().unwrap().project.name,
            "Only copy"
        );
    }

    #[test]
    fn unreadable_copy_is_an_error_and_kept() {
        let dir = tempfile::tempdir().unwrap();
        let store = RecoveryStore::in_dir(dir.path().join("user"));
        let file = dir.path().join("trial.ron");
        let beside = RecoveryStore::beside(&file);
        fs::write(&beside, "(format_version: 1, revision: ").unwrap();
        let err = store.find(Some(&file)).unwrap_err();
        assert!(err.to_string().starts_with("line 1, column"), "{err}");
        assert!(beside.exists());
    }

    #[test]
    fn fallback_name_depends_on_the_path() {
        let store = RecoveryStore::in_dir("/u");
        let a = store.in_user_dir(Some(Path::new("/x/trial.ron")));
        let b = store.in_user_dir(Some(Path::new("/y/trial.ron")));
        assert_ne!(a, b);
        let name = a.file_name().unwrap().to_string_lossy().into_owned();
        assert!(
            name.starts_with("trial-") && name.ends_with(".ron.recovery"),
            "{name}"
        );
        assert_eq!(name.len(), "trial-".len() + 16 + ".ron.recovery".len());
    }
}
