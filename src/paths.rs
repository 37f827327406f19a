//! Where tankwalk keeps its files by default.

use std::path::PathBuf;

/// The platform's per-user data folder for tankwalk (for example
/// `~/.local/share/tankwalk` on Linux), when the platform has one.
pub fn default_data_dir() -> Option<PathBuf> {
    directories::ProjectDirs::from("", "", "tankwalk").map(|dirs| dirs.data_dir().to_path_buf())
}
