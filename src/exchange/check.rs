//! Checking a whole records file before anything of it is applied.
//!
//! [`check_file`] reads a JSON Lines file in the journal's format (an export,
//! a sync segment, a journal) and either gives back every record in it or
//! every problem found, each as `file:line: what is wrong`. It checks the
//! header (format and version), every line (JSON, known fields and kinds,
//! values in range), ids repeated with other content, the length and SHA-256
//! in the header when it has them (sync segments), and the manifest's
//! checksum when a `manifest.json` lists the file.

use std::collections::HashMap;
use std::fmt;
use std::fs::File;
use std::io::BufReader;
use std::path::{Path, PathBuf};

use chrono::{DateTime, Duration, Utc};
use sha2::{Digest, Sha256};
use ulid::Ulid;

use super::manifest::{self, Manifest};
use super::{Progress, Stage, hex};
use crate::model::record::Record;
use crate::store::journal::{self, Header, LineReader, RawLine};

/// At most this many problems are listed for one file; the rest are counted.
pub const MAX_LISTED: usize = 50;

/// A record taken this far after the import is flagged (a wrong clock).
pub const FUTURE_SLACK: Duration = Duration::hours(24);

/// Something wrong (or worth a warning) in a file, at a line when known.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// The file.
    pub path: PathBuf,
    /// 1-based line number, when the problem is on a line.
    pub line: Option<u64>,
    /// What is wrong.
    pub message: String,
}

impl Problem {
    /// A problem on line `line` of `path`.
    pub fn at(path: &Path, line: u64, message: impl Into<String>) -> Problem {
        Problem { path: path.to_path_buf(), line: Some(line), message: message.into() }
    }

    /// A problem with the file as a whole.
    pub fn whole(path: &Path, message: impl Into<String>) -> Problem {
        Problem { path: path.to_path_buf(), line: None, message: message.into() }
    }
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.line {
            Some(line) => write!(f, "{}:{line}: {}", self.path.display(), self.message),
            None => write!(f, "{}: {}", self.path.display(), self.message),
        }
    }
}

/// A record and the line it is on.
#[derive(Debug, Clone, PartialEq)]
pub struct LineRecord {
    /// 1-based line number.
    pub line: u64,
    /// The record.
    pub record: Record,
}

/// A file that passed every check.
#[derive(Debug, Clone)]
pub struct CheckedFile {
    /// The file.
    pub path: PathBuf,
    /// Its header.
    pub header: Header,
    /// Its records, each once, in file order.
    pub records: Vec<LineRecord>,
    /// Lines that repeat an earlier line's record exactly (harmless, skipped).
    pub repeated: usize,
    /// Length in bytes.
    pub bytes: u64,
    /// SHA-256 of the whole file, lowercase hex.
    pub sha256: String,
    /// The manifest it was checked against, if any.
    pub manifest: Option<PathBuf>,
    /// Things worth knowing that do not stop the import (a clock far ahead, no checksum...).
    pub warnings: Vec<Problem>,
}

/// The problems of a file collected so far.
struct Problems {
    path: PathBuf,
    listed: Vec<Problem>,
    more: usize,
}

impl Problems {
    fn add(&mut self, line: u64, message: impl Into<String>) {
        if self.listed.len() < MAX_LISTED {
            self.listed.push(Problem::at(&self.path, line, message));
        } else {
            self.more += 1;
        }
    }

    fn finish(mut self) -> Vec<Problem> {
        if self.more > 0 {
            let more = self.more;
            self.listed.push(Problem::whole(&self.path, format!("… and {more} more problems")));
        }
        self.listed
    }
}

/// Checks the file at `path` whole. `progress` hears the bytes read.
pub fn check_file(path: &Path, progress: &mut dyn FnMut(Progress)) -> Result<CheckedFile, Vec<Problem>> {
    check_file_at(path, Utc::now(), progress)
}

/// [`check_file`] with the time to judge records "in the future" against.
pub fn check_file_at(
    path: &Path,
    now: DateTime<Utc>,
    progress: &mut dyn FnMut(Progress),
) -> Result<CheckedFile, Vec<Problem>> {
    let one = |message: String| vec![Problem::whole(path, message)];
    let file = File::open(path).map_err(|e| one(format!("cannot read: {e}")))?;
    let meta = file.metadata().map_err(|e| one(format!("cannot read: {e}")))?;
    if meta.is_dir() {
        return Err(one("is a folder; give the records file in it (records.jsonl)".into()));
    }
    let total = meta.len();
    if has_extension(path, "csv") {
        return Err(vec![Problem::at(path, 1, csv_refusal(path))]);
    }
    let mut problems = Problems { path: path.to_path_buf(), listed: Vec::new(), more: 0 };
    let mut warnings = Vec::new();
    let read_problem = |e: std::io::Error| one(format!("cannot read: {e}"));
    let mut lines = LineReader::new(BufReader::with_capacity(1 << 16, file), 0, 1);
    let stage = Stage::Checking(path.to_path_buf());
    progress(Progress { stage: stage.clone(), done: 0, total });

    // Line 1: the header. Nothing else is worth reading without one.
    let first = lines.next_line().map_err(read_problem)?;
    let header = match header_of(path, first.as_ref()) {
        Ok(header) => header,
        Err(message) => return Err(vec![Problem::at(path, 1, message)]),
    };
    let mut file_hash = Sha256::new();
    let mut body_hash = Sha256::new();
    if let Some(first) = &first {
        file_hash.update(&first.raw);
    }
    let header_end = first.as_ref().map_or(0, |l| l.end);

    let mut records: Vec<LineRecord> = Vec::new();
    let mut seen: HashMap<Ulid, usize> = HashMap::new();
    let mut repeated = 0;
    let mut last_report = 0;
    let mut end = header_end;
    while let Some(line) = lines.next_line().map_err(read_problem)? {
        file_hash.update(&line.raw);
        body_hash.update(&line.raw);
        end = line.end;
        if line.end - last_report >= 1 << 20 {
            last_report = line.end;
            progress(Progress { stage: stage.clone(), done: line.end, total });
        }
        let record = match record_of(&line) {
            Ok(record) => record,
            Err(message) => {
                problems.add(line.number, message);
                continue;
            }
        };
        match seen.get(&record.id) {
            Some(&at) if records[at].record == record => repeated += 1,
            Some(&at) => problems.add(
                line.number,
                format!(
                    "record {} is also on line {}, with different content: one id, two versions",
                    record.id, records[at].line
                ),
            ),
            None => {
                if record.taken_at.with_timezone(&Utc) > now + FUTURE_SLACK {
                    warnings.push(Problem::at(
                        path,
                        line.number,
                        format!(
                            "record {} was taken at {}, more than a day after now: check the clock of device {}",
                            record.id, record.taken_at, record.device
                        ),
                    ));
                }
                seen.insert(record.id, records.len());
                records.push(LineRecord { line: line.number, record });
            }
        }
    }
    progress(Progress { stage, done: end, total });
    let sha256 = hex(&file_hash.finalize());
    let body = end - header_end;
    let line_count = records.len() + repeated;
    check_header_totals(&header, body, line_count as u64, &hex(&body_hash.finalize()), &mut problems);

    let mut manifest_path = None;
    if let Some(found) = manifest::beside(path) {
        match check_manifest(path, &found, end, &sha256, line_count as u64) {
            Ok(true) => manifest_path = Some(found),
            Ok(false) => warnings.push(Problem::whole(
                path,
                format!("{} beside it does not list this file: no checksum was checked", found.display()),
            )),
            Err(problem) => problems.listed.insert(0, problem),
        }
    }
    let listed = problems.finish();
    if !listed.is_empty() {
        return Err(listed);
    }
    Ok(CheckedFile {
        path: path.to_path_buf(),
        header,
        records,
        repeated,
        bytes: end,
        sha256,
        manifest: manifest_path,
        warnings,
    })
}

fn has_extension(path: &Path, ext: &str) -> bool {
    path.extension().is_some_and(|e| e.eq_ignore_ascii_case(ext))
}

fn csv_refusal(path: &Path) -> String {
    let lossless = path.with_file_name(super::export::RECORDS_FILE);
    format!(
        "this is the spreadsheet (CSV) export, which keeps only what a spreadsheet needs and cannot be imported \
         without loss; import the lossless records file of the same export instead ({})",
        lossless.display()
    )
}

/// The header of a file, or why line 1 is not one.
fn header_of(path: &Path, first: Option<&RawLine>) -> Result<Header, String> {
    let Some(first) = first else {
        return Err(format!(
            "the file is empty; a records file starts with a header line such as {{\"format\":\"{}\",\"version\":{},...}}",
            journal::FORMAT,
            journal::VERSION
        ));
    };
    if first.too_long {
        return Err(format!("not a tankwalk records file: {}", journal::too_long_message(first.len())));
    }
    let content = first.content();
    if content.contains(&0) || std::str::from_utf8(content).is_err() {
        return Err("not a tankwalk records file: it holds binary data, not text".into());
    }
    let text = String::from_utf8_lossy(content);
    let text = text.trim_start_matches('\u{feff}');
    if text.starts_with(super::spreadsheet::FIRST_COLUMN) && text.contains(',') {
        return Err(csv_refusal(path));
    }
    if !first.terminated {
        return Err("the header line is cut short (no end of line): the file is incomplete".into());
    }
    let value: serde_json::Value =
        serde_json::from_str(text).map_err(|e| format!("not a tankwalk records file: line 1 is not a header ({e})"))?;
    if let Some(version) = value.get("version").and_then(serde_json::Value::as_u64)
        && value.get("format").and_then(serde_json::Value::as_str) == Some(journal::FORMAT)
        && version > u64::from(journal::VERSION)
    {
        return Err(format!(
            "format version {version} is newer than this tankwalk reads (version {}): update tankwalk to import it",
            journal::VERSION
        ));
    }
    Header::parse(content).map_err(|e| format!("not a tankwalk records file: {e}"))
}

/// The record on a line after the header, or what is wrong with the line.
fn record_of(line: &RawLine) -> Result<Record, String> {
    if line.too_long {
        return Err(journal::too_long_message(line.len()));
    }
    let content = line.content();
    if content.iter().all(u8::is_ascii_whitespace) {
        return Err("empty line (a records file has one record on every line after the header)".into());
    }
    match journal::parse_record(content) {
        Ok(record) => Ok(record),
        Err(message) if !line.terminated => Err(format!(
            "the last line is cut short (no end of line): the file is incomplete, copy it again ({message})"
        )),
        Err(message) => Err(message),
    }
}

/// Checks the header's own record count, length and SHA-256, when it has them.
fn check_header_totals(header: &Header, body: u64, lines: u64, body_sha256: &str, problems: &mut Problems) {
    if let Some(expected) = header.body_bytes {
        if body < expected {
            problems.listed.insert(
                0,
                Problem::at(
                    &problems.path,
                    1,
                    format!(
                        "the file is incomplete: its header announces {expected} bytes after it, but only {body} \
                         are there (still being copied, or cut short)"
                    ),
                ),
            );
            return;
        }
        if body > expected {
            problems.add(1, format!("the header announces {expected} bytes after it, but {body} are there"));
            return;
        }
    }
    if let Some(expected) = &header.body_sha256
        && !expected.eq_ignore_ascii_case(body_sha256)
    {
        problems.add(1, "the content does not match the SHA-256 in the header: the file is damaged".to_string());
        return;
    }
    if let Some(expected) = header.records
        && expected != lines
    {
        problems.add(1, format!("the header announces {expected} records, but the file has {lines}"));
    }
}

/// Checks `path` against the manifest at `manifest_path`: `Ok(false)` when
/// the manifest does not list it.
fn check_manifest(path: &Path, manifest_path: &Path, bytes: u64, sha256: &str, lines: u64) -> Result<bool, Problem> {
    let raw = std::fs::read(manifest_path).map_err(|e| Problem::whole(manifest_path, format!("cannot read: {e}")))?;
    // A manifest that is not UTF-8 is refused at its first bad byte, like any other mistake in it.
    let text = crate::text::decode(&raw)
        .map_err(|bad| Problem::at(manifest_path, bad.line as u64, format!("column {}: {bad}", bad.column)))?;
    let manifest = Manifest::parse(text).map_err(|(line, message)| Problem::at(manifest_path, line, message))?;
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    let Some(entry) = manifest.entry(&name) else { return Ok(false) };
    let line = manifest::line_of_entry(text, &name);
    let mismatch = |what: String| {
        Problem::at(
            manifest_path,
            line,
            format!("{name}: {what}: the file is damaged, cut short, or not the one this manifest describes"),
        )
    };
    if entry.bytes != bytes {
        return Err(mismatch(format!("the manifest says {} bytes, the file has {bytes}", entry.bytes)));
    }
    if !entry.sha256.eq_ignore_ascii_case(sha256) {
        return Err(mismatch(format!(
            "checksum mismatch (the manifest says SHA-256 {}, the file has {sha256})",
            entry.sha256
        )));
    }
    if entry.content == manifest::RECORDS && entry.count != lines {
        return Err(mismatch(format!("the manifest says {} records, the file has {lines}", entry.count)));
    }
    Ok(true)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{DeviceId, Reading, RecordBody, Target};
    use std::io::Write;

    fn reading(ph: f64) -> Record {
        let mut r = Reading::new(Target::Tank("Q1".into()));
        r.measurements.ph = Some(ph);
        Record::new(DeviceId::generate(), "Ana Sousa", Utc::now().fixed_offset(), RecordBody::Reading(r))
    }

    fn write(dir: &Path, name: &str, lines: &[Vec<u8>]) -> PathBuf {
        let path = dir.join(name);
        let mut f = File::create(&path).unwrap();
        for l in lines {
            f.write_all(l).unwrap();
        }
        path
    }

    fn header() -> Vec<u8> {
        Header::new(DeviceId::generate()).to_line()
    }

    fn line(r: &Record) -> Vec<u8> {
        journal::record_line(&serde_json::to_vec(r).unwrap())
    }

    #[test]
    fn a_good_file_gives_every_record_once() {
        let dir = tempfile::tempdir().unwrap();
        let (a, b) = (reading(7.0), reading(7.1));
        let path = write(dir.path(), "r.jsonl", &[header(), line(&a), line(&b), line(&a)]);
        let checked = check_file(&path, &mut super::super::no_progress).unwrap();
        assert_eq!(checked.records.iter().map(|l| l.record.clone()).collect::<Vec<_>>(), [a, b]);
        assert_eq!(checked.records[1].line, 3);
        assert_eq!(checked.repeated, 1);
        assert_eq!(checked.sha256, super::super::sha256_hex(&std::fs::read(&path).unwrap()));
    }

    #[test]
    fn every_bad_line_is_listed_with_its_number() {
        let dir = tempfile::tempdir().unwrap();
        let a = reading(7.0);
        let mut other = a.clone();
        other.operator = "Someone Else".into();
        let path = write(
            dir.path(),
            "r.jsonl",
            &[header(), line(&a), b"{oops\n".to_vec(), line(&reading(7.2)), line(&other), b"\n".to_vec()],
        );
        let problems = check_file(&path, &mut super::super::no_progress).unwrap_err();
        let lines: Vec<Option<u64>> = problems.iter().map(|p| p.line).collect();
        assert_eq!(lines, [Some(3), Some(5), Some(6)], "{problems:?}");
        assert!(problems[1].message.contains("also on line 2"), "{}", problems[1]);
        assert!(problems[0].to_string().starts_with(&format!("{}:3: ", path.display())));
    }

    #[test]
    fn a_json_error_names_its_field_and_column() {
        let mut value = serde_json::to_value(reading(7.0)).unwrap();
        value["taken_at"] = serde_json::json!("20x6-12-01T07:30:00Z");
        let bad = serde_json::to_string(&value).unwrap();
        let message = journal::parse_record(bad.as_bytes()).unwrap_err();
        assert!(message.starts_with("field \"taken_at\": "), "{message}");
        let mut value = serde_json::to_value(reading(7.0)).unwrap();
        value["body"]["observations"]["deaths"] = serde_json::json!(-1);
        let message = journal::parse_record(&serde_json::to_vec(&value).unwrap()).unwrap_err();
        assert!(message.starts_with("field \"body.observations.deaths\": invalid value"), "{message}");
        let message = journal::parse_record(b"{\"id\": oops}").unwrap_err();
        assert!(message.ends_with("(column 8)"), "{message}");
    }

    #[test]
    fn a_header_that_announces_more_than_is_there_is_incomplete() {
        let dir = tempfile::tempdir().unwrap();
        let body: Vec<u8> = [line(&reading(7.0)), line(&reading(7.1))].concat();
        let mut h = Header::new(DeviceId::generate());
        h.records = Some(2);
        h.body_bytes = Some(body.len() as u64);
        h.body_sha256 = Some(super::super::sha256_hex(&body));
        let whole = write(dir.path(), "whole.jsonl", &[h.to_line(), body.clone()]);
        assert_eq!(check_file(&whole, &mut super::super::no_progress).unwrap().records.len(), 2);
        let half = write(dir.path(), "half.jsonl", &[h.to_line(), body[..body.len() / 2].to_vec()]);
        let problems = check_file(&half, &mut super::super::no_progress).unwrap_err();
        assert!(problems[0].message.starts_with("the file is incomplete"), "{problems:?}");
        let mut flipped = body.clone();
        let at = flipped.len() - 5;
        flipped[at] = b'9';
        let damaged = write(dir.path(), "damaged.jsonl", &[h.to_line(), flipped]);
        let problems = check_file(&damaged, &mut super::super::no_progress).unwrap_err();
        assert!(problems.iter().any(|p| p.message.contains("SHA-256")), "{problems:?}");
    }
}
