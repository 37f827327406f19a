//! Which facility file a command works on: `--room` (or `TANKWALK_ROOM`),
//! otherwise the one used last, remembered in the data folder.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result};

use tankwalk::model::{Facility, LoadError};

use super::{GlobalArgs, bad_input};

/// Name of the file in the data folder that holds the absolute path of the room used last.
pub const LAST_ROOM_FILE: &str = "last-room";

/// The facility every command works on, loaded and checked.
///
/// With `--room FILE` (or `TANKWALK_ROOM`) that file is loaded and, once it
/// loads, remembered for next time; without, the remembered one is loaded. A
/// missing or broken file is an input error naming the file and every problem
/// in it.
pub fn resolve_room(global: &GlobalArgs) -> Result<(PathBuf, Facility)> {
    match &global.room {
        Some(given) => {
            let path = std::path::absolute(given).map_err(|e| bad_input!("room file {}: {e}", given.display()))?;
            let facility = load(&path, None)?;
            if let Err(err) = remember(global, LAST_ROOM_FILE, &path) {
                // The command can still run; only the memory of the room is lost.
                eprintln!("tankwalk: warning: could not remember the room for next time: {err:#}");
            }
            Ok((path, facility))
        }
        None => {
            let memo = global.data_dir()?.join(LAST_ROOM_FILE);
            let Some(path) = recall(global, LAST_ROOM_FILE)? else {
                return Err(bad_input!(
                    "no room given: pass --room FILE (or set TANKWALK_ROOM) once, and tankwalk remembers it; \
                     sample rooms are in sample-rooms/"
                ));
            };
            let facility = load(&path, Some(&memo))?;
            Ok((path, facility))
        }
    }
}

/// The facility, when one is given or remembered; `None` when neither (the
/// record commands then take tank and system ids as given).
pub fn resolve_room_optional(global: &GlobalArgs) -> Result<Option<(PathBuf, Facility)>> {
    if global.room.is_none() {
        let memo = global.data_dir()?.join(LAST_ROOM_FILE);
        if !memo.exists() {
            return Ok(None);
        }
    }
    resolve_room(global).map(Some)
}

/// Loads a facility file, turning failures into an input error that names it.
fn load(path: &Path, remembered_in: Option<&Path>) -> Result<Facility> {
    let whose = match remembered_in {
        Some(memo) => {
            format!(" (the room used last, remembered in {}; pass --room FILE to use another)", memo.display())
        }
        None => String::new(),
    };
    match Facility::load(path) {
        Ok(facility) => Ok(facility),
        Err(LoadError::Read { path, source }) => {
            Err(bad_input!("cannot read facility file {}{whose}: {source}", path.display()))
        }
        Err(LoadError::Invalid(errors)) => {
            let n = errors.errors.len();
            Err(bad_input!(
                "facility file {}{whose} has {n} error{}; `tankwalk check-room {}` lists them:\n{errors}",
                path.display(),
                if n == 1 { "" } else { "s" },
                path.display()
            ))
        }
    }
}

/// The path remembered in the data folder's file `name`, if any.
pub fn recall(global: &GlobalArgs, name: &str) -> Result<Option<PathBuf>> {
    recall_in(&global.data_dir()?, name)
}

/// The path remembered in the file `name` of the data folder `dir`, if any.
pub fn recall_in(dir: &Path, name: &str) -> Result<Option<PathBuf>> {
    let memo = dir.join(name);
    let bytes = match std::fs::read(&memo) {
        Ok(bytes) => bytes,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return Ok(None),
        Err(e) => return Err(bad_input!("cannot read {}: {e}", memo.display())),
    };
    let end = bytes.iter().rposition(|b| !matches!(b, b'\n' | b'\r')).map_or(0, |i| i + 1);
    let path = path_from_bytes(&bytes[..end]);
    if path.as_os_str().is_empty() {
        return Err(bad_input!("{} is empty: give the path again", memo.display()));
    }
    Ok(Some(path))
}

/// Writes an absolute path to the data folder's file `name` (replacing the file whole).
pub fn remember(global: &GlobalArgs, name: &str, path: &Path) -> Result<()> {
    let dir = global.data_dir()?;
    std::fs::create_dir_all(&dir).with_context(|| format!("cannot create data folder {}", dir.display()))?;
    let memo = dir.join(name);
    let partial = dir.join(format!("{name}.partial"));
    let mut bytes = path_to_bytes(path);
    bytes.push(b'\n');
    std::fs::write(&partial, bytes).with_context(|| format!("cannot write {}", partial.display()))?;
    std::fs::rename(&partial, &memo).with_context(|| format!("cannot write {}", memo.display()))?;
    Ok(())
}

/// A path as the bytes stored in the memo file (exact on Unix).
fn path_to_bytes(path: &Path) -> Vec<u8> {
    #[cfg(unix)]
    {
        use std::os::unix::ffi::OsStrExt;
        path.as_os_str().as_bytes().to_vec()
    }
    #[cfg(not(unix))]
    {
        path.to_string_lossy().into_owned().into_bytes()
    }
}

/// The path stored in the memo file.
fn path_from_bytes(bytes: &[u8]) -> PathBuf {
    #[cfg(unix)]
    {
        use std::os::unix::ffi::OsStrExt;
        PathBuf::from(std::ffi::OsStr::from_bytes(bytes))
    }
    #[cfg(not(unix))]
    {
        PathBuf::from(String::from_utf8_lossy(bytes).into_owned())
    }
}
