//! `manifest.json`: what an export folder holds, with a SHA-256 of each file.
//!
//! Import checks a file against the manifest beside it, when there is one, so
//! a file damaged or cut short on a USB stick is refused before anything of
//! it is applied.

use std::path::Path;

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

use crate::model::record::DeviceId;

/// The manifest's file name in an export folder.
pub const FILE_NAME: &str = "manifest.json";
/// The format name in the manifest.
pub const FORMAT: &str = "tankwalk-export";
/// The manifest version this build writes and reads.
pub const VERSION: u32 = 1;

/// The manifest of one export. Readers ignore fields they do not know.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Manifest {
    /// Always [`FORMAT`].
    pub format: String,
    /// [`VERSION`].
    pub version: u32,
    /// The device that exported.
    pub device: DeviceId,
    /// When the export was made.
    pub created_at: DateTime<Utc>,
    /// Records taken at or after this instant were exported (all when absent).
    #[serde(default)]
    pub since: Option<DateTime<Utc>>,
    /// The facility file whose species edges the CSV's bands use; none: the defaults.
    #[serde(default)]
    pub room: Option<String>,
    /// The files of the export.
    pub files: Vec<FileEntry>,
    /// The caution that goes with every band and figure.
    #[serde(default)]
    pub caution: String,
}

/// One file of an export.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FileEntry {
    /// File name, in the export folder.
    pub name: String,
    /// `"records"` (JSON Lines, lossless) or `"readings-csv"` (for spreadsheets).
    pub content: String,
    /// Length in bytes.
    pub bytes: u64,
    /// SHA-256 of the whole file, lowercase hex.
    pub sha256: String,
    /// Records (JSON Lines) or rows below the header (CSV).
    pub count: u64,
    /// Of the records: readings, events, corrections and skips.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kinds: Option<KindCounts>,
    /// Earliest time a record or row was taken.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub taken_first: Option<DateTime<Utc>>,
    /// Latest time a record or row was taken.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub taken_last: Option<DateTime<Utc>>,
}

/// Records by kind.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct KindCounts {
    /// Readings.
    pub readings: u64,
    /// Events.
    pub events: u64,
    /// Corrections.
    pub corrections: u64,
    /// Skips.
    pub skips: u64,
}

/// Content names of [`FileEntry::content`].
pub const RECORDS: &str = "records";
/// Content name of the readings CSV.
pub const READINGS_CSV: &str = "readings-csv";

impl Manifest {
    /// The manifest as written: pretty JSON ending with a newline.
    pub fn to_text(&self) -> String {
        // Strings, numbers and timestamps: serialising cannot fail.
        let mut text = serde_json::to_string_pretty(self).unwrap_or_default();
        text.push('\n');
        text
    }

    /// Reads a manifest; the error names the line.
    pub fn parse(text: &str) -> Result<Manifest, (u64, String)> {
        let manifest: Manifest =
            serde_json::from_str(text).map_err(|e| (e.line().max(1) as u64, strip_position(&e)))?;
        if manifest.format != FORMAT {
            return Err((1, format!("format '{}' is not '{FORMAT}'", manifest.format)));
        }
        if manifest.version > VERSION {
            return Err((
                1,
                format!(
                    "manifest version {} is newer than this tankwalk reads ({VERSION}): update tankwalk",
                    manifest.version
                ),
            ));
        }
        Ok(manifest)
    }

    /// The entry of the file named `name`.
    pub fn entry(&self, name: &str) -> Option<&FileEntry> {
        self.files.iter().find(|f| f.name == name)
    }
}

/// The line of `text` where the entry of file `name` is written (1 when not found).
pub fn line_of_entry(text: &str, name: &str) -> u64 {
    let quoted = serde_json::to_string(name).unwrap_or_default();
    text.lines().position(|l| l.contains("\"name\"") && l.contains(&quoted)).map_or(1, |i| i as u64 + 1)
}

/// The manifest beside `file`, when the folder has one.
pub fn beside(file: &Path) -> Option<std::path::PathBuf> {
    let path = file.parent().map_or_else(|| Path::new(FILE_NAME).to_path_buf(), |dir| dir.join(FILE_NAME));
    path.is_file().then_some(path)
}

fn strip_position(e: &serde_json::Error) -> String {
    let text = e.to_string();
    match text.rfind(" at line ") {
        Some(at) => text[..at].to_string(),
        None => text,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn written_manifests_read_back_and_name_their_lines() {
        let manifest = Manifest {
            format: FORMAT.into(),
            version: VERSION,
            device: DeviceId::generate(),
            created_at: Utc::now(),
            since: None,
            room: None,
            files: vec![FileEntry {
                name: "records.jsonl".into(),
                content: RECORDS.into(),
                bytes: 10,
                sha256: "00".repeat(32),
                count: 1,
                kinds: Some(KindCounts { readings: 1, ..KindCounts::default() }),
                taken_first: None,
                taken_last: None,
            }],
            caution: crate::CAUTION.into(),
        };
        let text = manifest.to_text();
        assert_eq!(Manifest::parse(&text).unwrap(), manifest);
        let line = line_of_entry(&text, "records.jsonl");
        assert!(text.lines().nth(line as usize - 1).unwrap().contains("records.jsonl"));
        let (bad_line, message) =
            Manifest::parse("{\n  \"format\": \"tankwalk-export\",\n  \"version\": oops\n}").unwrap_err();
        assert_eq!(bad_line, 3, "{message}");
    }
}
