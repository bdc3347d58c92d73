//! The list of recently opened projects: paths only, newest first, in a small settings file.

use std::fs;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use super::io::{FileError, write_atomic};

/// Most paths the list keeps.
pub const RECENT_LIMIT: usize = 10;

/// Recently opened or saved project files, newest first, without duplicates.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct RecentFiles {
    paths: Vec<PathBuf>,
}

/// The settings file's shape.
#[derive(Serialize, Deserialize)]
#[serde(rename = "Recent")]
struct RecentFile {
    recent: Vec<String>,
}

impl RecentFiles {
    /// The paths, newest first.
    pub fn paths(&self) -> &[PathBuf] {
        &self.paths
    }

    /// Puts `path` first (moving it up if already listed) and forgets the oldest beyond
    /// [`RECENT_LIMIT`].
    pub fn push(&mut self, path: &Path) {
        self.paths.retain(|p| p != path);
        self.paths.insert(0, path.to_path_buf());
        self.paths.truncate(RECENT_LIMIT);
    }

    /// Forgets `path` (e.g. it could not be opened any more).
    pub fn remove(&mut self, path: &Path) {
        self.paths.retain(|p| p != path);
    }

    /// Where the list lives by default: `recent.ron` in the per-user settings folder.
    pub fn default_file() -> Option<PathBuf> {
        super::places::user_config_dir().map(|d| d.join("recent.ron"))
    }

    /// Reads the list; a missing file is an empty list.
    pub fn load(file: &Path) -> Result<RecentFiles, FileError> {
        let text = match fs::read_to_string(file) {
            Ok(t) => t,
            Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                return Ok(RecentFiles::default());
            }
            Err(source) => {
                return Err(FileError::Io {
                    action: "read",
                    path: file.to_path_buf(),
                    source,
                });
            }
        };
        let parsed: RecentFile = ron::from_str(&text).map_err(|e| FileError::from_ron(&e))?;
        let mut out = RecentFiles::default();
        for p in parsed.recent.iter().rev() {
            out.push(Path::new(p));
        }
        Ok(out)
    }

    /// Writes the list (atomically, creating the folder). Paths that are not valid Unicode
    /// cannot be written as text and are left out.
    pub fn save(&self, file: &Path) -> Result<(), FileError> {
        let io_err = |path: &Path, source| FileError::Io {
            action: "write",
            path: path.to_path_buf(),
            source,
        };
        if let Some(dir) = file.parent() {
            fs::create_dir_all(dir).map_err(|e| io_err(dir, e))?;
        }
        let data = RecentFile {
            recent: self
                .paths
                .iter()
                .filter_map(|p| p.to_str().map(str::to_string))
                .collect(),
        };
        let text = ron::ser::to_string_pretty(&data, ron::ser::PrettyConfig::default())
            .map_err(|e| FileError::Serialize(e.to_string()))?;
        write_atomic(file, text.as_bytes()).map_err(|e| io_err(file, e))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn newest_first_without_duplicates_and_bounded() {
        let mut r = RecentFiles::default();
        for i in 0..12 {
            r.push(Path::new(&format!("/p/{i}.ron")));
        }
        r.push(Path::new("/p/5.ron"));
        assert_eq!(r.paths().len(), RECENT_LIMIT);
        assert_eq!(r.paths()[0], Path::new("/p/5.ron"));
        assert_eq!(r.paths()[1], Path::new("/p/11.ron"));
        assert_eq!(r.paths().iter().filter(|p| p.ends_with("5.ron")).count(), 1);
        r.remove(Path::new("/p/5.ron"));
        assert_eq!(r.paths()[0], Path::new("/p/11.ron"));
    }

    #[test]
    fn save_and_load() {
        let dir = tempfile::tempdir().unwrap();
        let file = dir.path().join("cfg").join("recent.ron");
        assert_eq!(RecentFiles::load(&file).unwrap(), RecentFiles::default());
        let mut r = RecentFiles::default();
        r.push(Path::new("/a/one.ron"));
        r.push(Path::new("/b/two words.ron"));
        r.save(&file).unwrap();
        assert_eq!(RecentFiles::load(&file).unwrap(), r);
        fs::write(&file, "(recent: [\"x\" \"y\"])").unwrap();
        assert!(
            RecentFiles::load(&file)
                .unwrap_err()
                .to_string()
                .starts_with("line 1, column")
        );
    }
}
