//! Sync through a shared folder (a network share, a synced folder, a USB stick).
//!
//! ```text
//! <shared folder>/
//!   <device id>/                 one folder per laptop, written only by that laptop
//!     segment-000001.jsonl       slices of its journal, never rewritten
//!     segment-000002.jsonl
//!   <other device id>/
//!     ...
//! ```
//!
//! A segment is a header line (the journal's, with the segment number, the
//! journal byte range it copies, its record count, length and SHA-256) and
//! then the bytes of the writer's journal in that range, unchanged.
//!
//! One sync first **receives**: every segment in the folder not yet applied
//! here (its own folder's too, in case another data folder shares this
//! device id) is checked whole and applied like an import. A segment that is
//! shorter than its header announces is still being copied by whatever moves
//! the files, and one that fails its checks is damaged: either way it is
//! left alone, reported, and tried again on the next run. Then it **sends**:
//! the part of this laptop's journal that is neither sent yet nor came from
//! this folder becomes a new segment (temporary name, synced, linked to its
//! real name without ever replacing a file). So records made here, imported
//! from a USB stick, or received from another shared folder all travel.
//!
//! What was applied and how far the journal was sent are kept, per shared
//! folder, in `sync-state.json` in the data folder. That file is only a
//! memo: when it is lost, or the journal was rebuilt, or the shared folder
//! was emptied, everything is sent again and every segment read again;
//! records already present are skipped, so nothing is doubled.
//!
//! Every laptop writes only into its own folder and only reads the others,
//! so all of them may sync at once, as often as they like.

use std::collections::{BTreeMap, BTreeSet};
use std::fs::{self, File};
use std::io::{BufRead, BufReader, Read, Seek, SeekFrom};
use std::path::{Path, PathBuf};

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};

use super::atomic::{PartialFile, remove_stale_partials};
use super::check::check_file;
use super::conflicts::{ConflictFound, ConflictLog};
use super::import::apply;
use super::{ExchangeError, Progress, Stage, hex};
use crate::model::record::DeviceId;
use crate::store::journal::{self, Header, HeaderState, LineReader};
use crate::store::{SledStore, Store, StoreError};

/// The sync memo's file name in the data folder.
pub const STATE_FILE: &str = "sync-state.json";
const STATE_FORMAT: &str = "tankwalk-sync-state";
const STATE_VERSION: u32 = 1;

/// The file name of segment `number`.
pub fn segment_name(number: u64) -> String {
    format!("segment-{number:06}.jsonl")
}

/// The number of a segment's file name, when it is one.
pub fn segment_number(name: &str) -> Option<u64> {
    let digits = name.strip_prefix("segment-")?.strip_suffix(".jsonl")?;
    if digits.len() < 6 || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return None;
    }
    digits.parse().ok()
}

/// The segment this laptop wrote.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct SentSegment {
    /// Its file.
    pub path: PathBuf,
    /// Records in it.
    pub records: u64,
    /// Its length.
    pub bytes: u64,
}

/// A segment received and applied.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReceivedSegment {
    /// Its file.
    pub path: PathBuf,
    /// The device folder it is in.
    pub device: String,
    /// Records in it.
    pub records: usize,
    /// Records newly saved here.
    pub added: usize,
    /// Records that were here already.
    pub already: usize,
    /// Records whose id is stored here with other content.
    pub conflicts: Vec<ConflictFound>,
}

/// A segment left for the next run.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct LeftSegment {
    /// Its file.
    pub path: PathBuf,
    /// True when it is still arriving (shorter than announced); false when damaged.
    pub incomplete: bool,
    /// Why, one line each (`file:line: what is wrong` for a damaged one).
    pub reasons: Vec<String>,
}

/// What one sync did.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SyncSummary {
    /// The shared folder (as resolved).
    pub folder: PathBuf,
    /// This laptop's device id (its folder's name).
    pub device: DeviceId,
    /// The segment written, when there was anything new to send.
    pub sent: Option<SentSegment>,
    /// The segments received, in the order applied.
    pub received: Vec<ReceivedSegment>,
    /// Segments not applied this time.
    pub left: Vec<LeftSegment>,
    /// Things worth saying (everything sent again, and why; temporary files cleaned up).
    pub notes: Vec<String>,
}

impl SyncSummary {
    /// Records newly saved from other laptops.
    pub fn added(&self) -> usize {
        self.received.iter().map(|r| r.added).sum()
    }

    /// Conflicts found.
    pub fn conflicts(&self) -> usize {
        self.received.iter().map(|r| r.conflicts.len()).sum()
    }

    /// The device folders records came from.
    pub fn devices_received_from(&self) -> BTreeSet<&str> {
        self.received.iter().filter(|r| r.records > 0).map(|r| r.device.as_str()).collect()
    }
}

/// The memo of every shared folder this data folder syncs with.
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
struct SyncState {
    format: String,
    version: u32,
    /// By the shared folder's resolved path.
    folders: BTreeMap<String, FolderState>,
}

/// The memo of one shared folder.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
struct FolderState {
    /// The journal the positions below are in (its header's time): a
    /// rebuilt journal has another, and then everything is sent again.
    journal: Option<DateTime<Utc>>,
    /// Journal bytes before this were sent, or came from this folder.
    sent_to: u64,
    /// The newest segment this laptop wrote.
    last_segment: u64,
    /// Segments applied here, by device folder.
    applied: BTreeMap<String, BTreeSet<u64>>,
}

/// Syncs `store` with the shared folder `shared` (see the module documentation).
pub fn sync(
    store: &mut SledStore,
    shared: &Path,
    progress: &mut dyn FnMut(Progress),
) -> Result<SyncSummary, ExchangeError> {
    if !shared.exists() {
        return Err(ExchangeError::NoSharedFolder(shared.to_path_buf()));
    }
    if !shared.is_dir() {
        return Err(ExchangeError::NotAFolder(shared.to_path_buf()));
    }
    let folder = fs::canonicalize(shared).map_err(|e| ExchangeError::io("cannot open", shared, e))?;
    let device = store.device();
    let mine = device.to_string();
    let my_dir = folder.join(&mine);
    if !my_dir.is_dir() {
        fs::create_dir_all(&my_dir).map_err(|e| ExchangeError::io("cannot create", &my_dir, e))?;
        journal::sync_parent(&my_dir)?;
    }
    let mut summary = SyncSummary {
        folder: folder.clone(),
        device,
        sent: None,
        received: Vec::new(),
        left: Vec::new(),
        notes: Vec::new(),
    };
    // What a killed sync left: a segment in this laptop's folder, the memo in the data folder.
    let stale = remove_stale_partials(&my_dir) + remove_stale_partials(store.dir());
    if stale > 0 {
        summary.notes.push(format!("removed {stale} temporary files of an interrupted sync"));
    }

    let state_path = store.dir().join(STATE_FILE);
    let mut state = load_state(&state_path, &mut summary.notes);
    let key = folder.display().to_string();
    let mut memo = state.folders.remove(&key).unwrap_or_default();

    let journal_path = store.journal_path();
    let (journal_time, header_end) = match journal::scan_header(&journal_path)? {
        HeaderState::Good(header, end) => (header.created_at, end),
        _ => {
            return Err(StoreError::Journal {
                path: journal_path,
                line: 1,
                message: "the journal has no readable header".into(),
            }
            .into());
        }
    };
    let journal_len = file_len(&journal_path)?;
    let memo_holds = memo.journal == Some(journal_time)
        && (header_end..=journal_len).contains(&memo.sent_to)
        && (memo.last_segment == 0 || my_dir.join(segment_name(memo.last_segment)).is_file());
    if !memo_holds {
        if memo != FolderState::default() {
            summary.notes.push(
                "the journal was rebuilt or the shared folder emptied since the last sync: every record is sent \
                 again and every segment read again (records already present are skipped)"
                    .into(),
            );
        }
        memo = FolderState { journal: Some(journal_time), sent_to: header_end, ..FolderState::default() };
    }

    // Receive.
    let conflicts = ConflictLog::in_data_dir(store.dir(), device);
    for (dev, number, path) in pending_segments(&folder, &memo.applied)? {
        if let Some(reason) = still_arriving(&path)? {
            summary.left.push(LeftSegment { path, incomplete: true, reasons: vec![reason] });
            continue;
        }
        let checked = match check_file(&path, progress) {
            Ok(checked) => checked,
            Err(problems) => {
                let reasons = problems.iter().map(|p| p.to_string()).collect();
                summary.left.push(LeftSegment { path, incomplete: false, reasons });
                continue;
            }
        };
        if checked.header.body_sha256.is_none() || checked.header.segment.is_none() {
            let reason =
                format!("{}:1: not a sync segment (its header has no segment number or checksum)", path.display());
            summary.left.push(LeftSegment { path, incomplete: false, reasons: vec![reason] });
            continue;
        }
        let applied = apply(store, &conflicts, checked, progress)?;
        memo.applied.entry(dev.clone()).or_default().insert(number);
        summary.received.push(ReceivedSegment {
            path,
            device: dev,
            records: applied.records,
            added: applied.added,
            already: applied.already + applied.repeated,
            conflicts: applied.conflicts,
        });
    }
    if !summary.received.is_empty() {
        // Remember what was applied even if sending fails below.
        state.folders.insert(key.clone(), memo.clone());
        save_state(&state_path, &state)?;
        state.folders.remove(&key);
    }

    // Send what is new since the last sync, up to where this run's received records begin.
    let after_receiving = file_len(&journal_path)?;
    if memo.sent_to < journal_len {
        let first_free = next_segment_number(&my_dir)?.max(memo.last_segment + 1);
        let sent = write_segment(&journal_path, memo.sent_to, journal_len, device, &my_dir, first_free, progress)?;
        if let Some((number, sent)) = sent {
            memo.last_segment = number;
            memo.applied.entry(mine.clone()).or_default().insert(number);
            summary.sent = Some(sent);
        }
    }
    memo.sent_to = after_receiving;
    state.folders.insert(key, memo);
    save_state(&state_path, &state)?;
    Ok(summary)
}

fn file_len(path: &Path) -> Result<u64, ExchangeError> {
    fs::metadata(path).map(|m| m.len()).map_err(|e| ExchangeError::io("cannot read", path, e))
}

/// Segments in the folder not applied yet: (device folder, number, path), by folder then number.
fn pending_segments(
    folder: &Path,
    applied: &BTreeMap<String, BTreeSet<u64>>,
) -> Result<Vec<(String, u64, PathBuf)>, ExchangeError> {
    let mut found = Vec::new();
    let entries = fs::read_dir(folder).map_err(|e| ExchangeError::io("cannot read", folder, e))?;
    for entry in entries.flatten() {
        let name = entry.file_name().to_string_lossy().into_owned();
        let is_device = name.parse::<DeviceId>().is_ok_and(|d| d.to_string() == name);
        if !is_device || !entry.path().is_dir() {
            continue;
        }
        let done = applied.get(&name);
        let Ok(files) = fs::read_dir(entry.path()) else { continue };
        for file in files.flatten() {
            let file_name = file.file_name();
            let Some(number) = segment_number(&file_name.to_string_lossy()) else { continue };
            if !done.is_some_and(|d| d.contains(&number)) {
                found.push((name.clone(), number, file.path()));
            }
        }
    }
    found.sort();
    Ok(found)
}

/// Why a segment looks still on its way (empty, header unfinished, shorter
/// than its header announces), or `None` when it is all there.
fn still_arriving(path: &Path) -> Result<Option<String>, ExchangeError> {
    let file = File::open(path).map_err(|e| ExchangeError::io("cannot read", path, e))?;
    let len = file.metadata().map_err(|e| ExchangeError::io("cannot read", path, e))?.len();
    let mut reader = BufReader::new(file.take(journal::MAX_LINE_BYTES as u64));
    let mut first = Vec::new();
    reader.read_until(b'\n', &mut first).map_err(|e| ExchangeError::io("cannot read", path, e))?;
    if first.last() != Some(&b'\n') {
        return Ok(Some(format!(
            "{}: incomplete (its header line is not all there yet); left for the next run",
            path.display()
        )));
    }
    let header_len = first.len() as u64;
    first.pop();
    let Ok(header) = Header::parse(first.strip_suffix(b"\r").unwrap_or(&first)) else { return Ok(None) };
    match header.body_bytes {
        Some(body) if len < header_len + body => Ok(Some(format!(
            "{}: incomplete ({} of {} bytes; still being copied?); left for the next run",
            path.display(),
            len,
            header_len + body
        ))),
        _ => Ok(None),
    }
}

/// The number after the highest segment in `dir`.
fn next_segment_number(dir: &Path) -> Result<u64, ExchangeError> {
    let entries = fs::read_dir(dir).map_err(|e| ExchangeError::io("cannot read", dir, e))?;
    let highest = entries.flatten().filter_map(|e| segment_number(&e.file_name().to_string_lossy())).max().unwrap_or(0);
    Ok(highest + 1)
}

/// Writes journal bytes `from..to` (whole lines) as a segment numbered
/// `number` or the next free number. `None` when the range holds no line.
fn write_segment(
    journal_path: &Path,
    from: u64,
    to: u64,
    device: DeviceId,
    dir: &Path,
    number: u64,
    progress: &mut dyn FnMut(Progress),
) -> Result<Option<(u64, SentSegment)>, ExchangeError> {
    let read_err = |e| ExchangeError::io("cannot read", journal_path, e);
    // First pass: count the whole lines of the range and hash them.
    let mut reader = open_range(journal_path, from, to)?;
    let mut lines = LineReader::new(&mut reader, from, 0);
    let (mut records, mut end, mut hasher) = (0u64, from, Sha256::new());
    while let Some(line) = lines.next_line().map_err(read_err)? {
        if !line.terminated || line.too_long {
            break;
        }
        hasher.update(&line.raw);
        records += 1;
        end = line.end;
    }
    if records == 0 {
        return Ok(None);
    }
    let body_sha256 = hex(&hasher.finalize());
    let total = end - from;
    let mut number = number;
    loop {
        let mut header = Header::new(device);
        header.segment = Some(number);
        header.journal_from = Some(from);
        header.journal_to = Some(end);
        header.records = Some(records);
        header.body_bytes = Some(total);
        header.body_sha256 = Some(body_sha256.clone());
        let target = dir.join(segment_name(number));
        let mut out = PartialFile::create(&target)?;
        out.put(&header.to_line())?;
        // Second pass: copy the bytes, checking they are still the ones hashed.
        let mut reader = open_range(journal_path, from, end)?;
        let mut copied = Sha256::new();
        let mut buf = vec![0; 1 << 16];
        let mut done = 0;
        loop {
            let n = reader.read(&mut buf).map_err(read_err)?;
            if n == 0 {
                break;
            }
            copied.update(&buf[..n]);
            out.put(&buf[..n])?;
            done += n as u64;
            progress(Progress { stage: Stage::Sending, done, total });
        }
        if hex(&copied.finalize()) != body_sha256 {
            return Err(ExchangeError::State {
                path: journal_path.to_path_buf(),
                message: "the journal changed while a segment was being written from it; sync again".into(),
            });
        }
        let mut written = out.finish()?;
        let bytes = written.bytes;
        if written.commit_new(&target)? {
            return Ok(Some((number, SentSegment { path: target, records, bytes })));
        }
        // Another writer with this device id took the number: use the next one.
        number = next_segment_number(dir)?.max(number + 1);
    }
}

fn open_range(path: &Path, from: u64, to: u64) -> Result<BufReader<std::io::Take<File>>, ExchangeError> {
    let mut file = File::open(path).map_err(|e| ExchangeError::io("cannot read", path, e))?;
    file.seek(SeekFrom::Start(from)).map_err(|e| ExchangeError::io("cannot read", path, e))?;
    Ok(BufReader::with_capacity(1 << 16, file.take(to - from)))
}

fn load_state(path: &Path, notes: &mut Vec<String>) -> SyncState {
    let fresh = SyncState { format: STATE_FORMAT.into(), version: STATE_VERSION, folders: BTreeMap::new() };
    let text = match fs::read_to_string(path) {
        Ok(text) => text,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => return fresh,
        Err(e) => {
            notes.push(format!("cannot read {} ({e}): starting the sync memo afresh", path.display()));
            return fresh;
        }
    };
    match serde_json::from_str::<SyncState>(&text) {
        Ok(state) if state.format == STATE_FORMAT && state.version == STATE_VERSION => state,
        _ => {
            notes.push(format!("{} is not readable: starting the sync memo afresh", path.display()));
            fresh
        }
    }
}

fn save_state(path: &Path, state: &SyncState) -> Result<(), ExchangeError> {
    // Numbers, strings and timestamps: serialising cannot fail.
    let mut text = serde_json::to_string_pretty(state).unwrap_or_default();
    text.push('\n');
    let mut out = PartialFile::create(path)?;
    out.put(text.as_bytes())?;
    out.finish()?.commit()?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn segment_names_round_trip_and_others_are_ignored() {
        assert_eq!(segment_name(7), "segment-000007.jsonl");
        assert_eq!(segment_number("segment-000007.jsonl"), Some(7));
        assert_eq!(segment_number("segment-1234567.jsonl"), Some(1_234_567));
        for other in ["segment-7.jsonl", ".segment-000007.jsonl.12.partial", "segment-00000x.jsonl", "notes.txt"] {
            assert_eq!(segment_number(other), None, "{other}");
        }
    }
}
