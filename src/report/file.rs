//! The report's edges: reading its records from a store, and saving a
//! rendered report so that a reader never sees half a file.

use std::io::Write;
use std::path::Path;

use super::{ReportError, Request, RoundReport, Selection, gather};
use crate::model::facility::Facility;
use crate::model::record::Target;
use crate::store::{Store, history};
use crate::timeline::targets_of;

/// Reads the records the request needs from `store` and gathers the report.
pub fn from_store<S: Store + ?Sized>(
    store: &S,
    facility: &Facility,
    request: &Request,
) -> Result<RoundReport, ReportError> {
    // Only the selection's tanks and systems are read; an unknown id reads
    // nothing and `gather` names it.
    let targets: Vec<Target> = match &request.selection {
        Selection::Room => Vec::new(),
        Selection::Tank(id) => facility.tank(id).map(|t| targets_of(facility, t)).unwrap_or_default(),
        Selection::System(id) => facility
            .system(id)
            .map(|system| {
                let mut targets = vec![Target::System(system.id.as_str().to_string())];
                targets.extend(facility.tanks_on(system).iter().map(|t| Target::Tank(t.id.to_string())));
                targets
            })
            .unwrap_or_default(),
    };
    let known = !targets.is_empty() || request.selection == Selection::Room;
    let entries = if known { history::entries(store, &targets, &request.load_range())? } else { Vec::new() };
    gather(facility, &entries, request)
}

/// Writes `contents` to `path` through a temporary file in the same folder,
/// synced, then renamed over `path`: the file is either the old one or the
/// whole new one, never a part.
pub fn write_atomically(path: &Path, contents: &[u8]) -> std::io::Result<()> {
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => std::path::PathBuf::from("."),
    };
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_else(|| "report".to_string());
    let partial = dir.join(format!(".{name}.partial-{}", std::process::id()));
    let result = (|| {
        let mut file = std::fs::File::create(&partial)?;
        file.write_all(contents)?;
        file.sync_all()?;
        drop(file);
        std::fs::rename(&partial, path)?;
        // The rename itself is durable once the folder is synced (POSIX).
        #[cfg(unix)]
        if let Ok(folder) = std::fs::File::open(&dir) {
            let _ = folder.sync_all();
        }
        Ok(())
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&partial);
    }
    result
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_report_file_is_replaced_whole_and_no_partial_file_is_left() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("round.html");
        std::fs::write(&path, "old").unwrap();
        write_atomically(&path, b"<!DOCTYPE html>new").unwrap();
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "<!DOCTYPE html>new");
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().map(|e| e.unwrap().file_name()).collect();
        assert_eq!(names.len(), 1, "{names:?}");
        let missing = dir.path().join("no-such-folder").join("r.html");
        assert!(write_atomically(&missing, b"x").is_err());
    }
}
