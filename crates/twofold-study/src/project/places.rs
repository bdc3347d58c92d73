//! Per-user folders for files that belong to the engineer rather than to a project: recovery
//! copies of unsaved projects and the list of recent files.
//!
//! Read from the usual environment variables so no extra dependency is needed: on Linux and
//! other Unix `XDG_DATA_HOME` / `XDG_CONFIG_HOME` (falling back to `~/.local/share` and
//! `~/.config`), on macOS `~/Library/Application Support`, on Windows `%LOCALAPPDATA%` for data
//! and `%APPDATA%` for settings. Each gets a `twofold` subfolder.

use std::path::PathBuf;

fn env_dir(name: &str) -> Option<PathBuf> {
    std::env::var_os(name)
        .map(PathBuf::from)
        .filter(|p| p.is_absolute())
}

fn home() -> Option<PathBuf> {
    env_dir("HOME")
}

/// Folder for data the program keeps for the engineer (recovery copies), or `None` when the
/// environment names no home folder.
pub fn user_data_dir() -> Option<PathBuf> {
    let base = if cfg!(windows) {
        env_dir("LOCALAPPDATA").or_else(|| env_dir("APPDATA"))
    } else if cfg!(target_os = "macos") {
        home().map(|h| h.join("Library").join("Application Support"))
    } else {
        env_dir("XDG_DATA_HOME").or_else(|| home().map(|h| h.join(".local").join("share")))
    }?;
    Some(base.join("twofold"))
}

/// Folder for the engineer's settings (recent files), or `None` when the environment names no
/// home folder.
pub fn user_config_dir() -> Option<PathBuf> {
    let base = if cfg!(windows) {
        env_dir("APPDATA")
    } else if cfg!(target_os = "macos") {
        home().map(|h| h.join("Library").join("Application Support"))
    } else {
        env_dir("XDG_CONFIG_HOME").or_else(|| home().map(|h| h.join(".config")))
    }?;
    Some(base.join("twofold"))
}
