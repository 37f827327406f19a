//! The append-only journal: every record ever saved, one JSON object a line.
//!
//! ```text
//! {"format":"tankwalk-records","version":1,"device":"01J…","created_at":"2026-12-01T06:30:00Z"}
//! {"id":"01J…","device":"01J…","operator":"…","taken_at":"…","body":{"kind":"reading",…}}
//! …
//! ```
//!
//! The first line is a [`Header`]; every later line is one
//! [`Record`] exactly as stored. Lines end with `\n`. A save writes its lines
//! with one `write` and fsyncs before it is acknowledged, so a crash can
//! leave at most one unfinished last line, which is never an acknowledged
//! record. The format is documented in `docs/journal-format.md`; sync segments
//! and exports use it too.

use std::fs::{self, File, OpenOptions};
use std::io::{self, BufRead, BufReader, Read, Seek, SeekFrom, Write};
use std::path::{Path, PathBuf};

use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

use super::StoreError;
use crate::model::record::{DeviceId, Record};

/// The journal's file name in the data folder.
pub const FILE_NAME: &str = "journal.jsonl";
/// The format name in the header line.
pub const FORMAT: &str = "tankwalk-records";
/// The format version this build writes and reads.
pub const VERSION: u32 = 1;

/// The first line of a journal (or of any file in the same format).
///
/// Readers ignore header fields they do not know, so later versions may add
/// some without breaking older readers; record lines, in contrast, refuse
/// unknown fields. The optional fields are absent from the journal's own
/// header; exports and sync segments (see [`crate::exchange`]) fill some.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Header {
    /// Always [`FORMAT`].
    pub format: String,
    /// The format version, [`VERSION`].
    pub version: u32,
    /// The device that wrote the file (the journal's own device).
    pub device: DeviceId,
    /// When the file was started.
    pub created_at: DateTime<Utc>,
    /// An export: it holds the records taken at or after this instant (all when absent).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub since: Option<DateTime<Utc>>,
    /// An export: the instant the store was read; the records it held then are in the file.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub until: Option<DateTime<Utc>>,
    /// A sync segment: its number among the writing device's segments, from 1.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub segment: Option<u64>,
    /// A sync segment: where in the writer's journal its lines start (byte offset).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub journal_from: Option<u64>,
    /// A sync segment: where in the writer's journal its lines end (byte offset).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub journal_to: Option<u64>,
    /// How many record lines follow the header.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub records: Option<u64>,
    /// How many bytes follow the header line.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub body_bytes: Option<u64>,
    /// SHA-256 of the bytes that follow the header line, lowercase hex.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub body_sha256: Option<String>,
}

impl Header {
    /// A header for `device`, started now.
    pub fn new(device: DeviceId) -> Header {
        Header {
            format: FORMAT.into(),
            version: VERSION,
            device,
            created_at: Utc::now(),
            since: None,
            until: None,
            segment: None,
            journal_from: None,
            journal_to: None,
            records: None,
            body_bytes: None,
            body_sha256: None,
        }
    }

    /// The header as a line, with its newline.
    pub fn to_line(&self) -> Vec<u8> {
        // Strings, a number and a timestamp: serialising cannot fail.
        let mut line = serde_json::to_vec(self).unwrap_or_default();
        line.push(b'\n');
        line
    }

    /// Reads a header line (without its newline).
    pub fn parse(line: &[u8]) -> Result<Header, String> {
        let header: Header =
            serde_json::from_slice(line).map_err(|e| format!("not a header line: {}", json_message(&e, line)))?;
        if header.format != FORMAT {
            return Err(format!("format '{}' is not '{FORMAT}'", header.format));
        }
        if header.version != VERSION {
            return Err(format!("format version {} is not one this tankwalk reads ({VERSION})", header.version));
        }
        Ok(header)
    }
}

/// A record as a journal line, with its newline.
pub fn record_line(stored: &[u8]) -> Vec<u8> {
    let mut line = Vec::with_capacity(stored.len() + 1);
    line.extend_from_slice(stored);
    line.push(b'\n');
    line
}

/// Reads one record line (without its newline) and checks the record.
pub fn parse_record(line: &[u8]) -> Result<Record, String> {
    let record: Record = serde_json::from_slice(line).map_err(|e| json_message(&e, line))?;
    record.check().map_err(|e| format!("record {}: {e}", record.id))?;
    Ok(record)
}

/// What a JSON error on a one-line document says, without serde's "at line 1
/// column N", naming the field it is about when that can be told: the one
/// field holding the value the error quotes (`integer \`-1\``), or a
/// record's own field (`taken_at`) just before the column. Values inside a
/// record's body are read as a whole first, so there the column is the end
/// of the body, and only the quoted value can name the field.
pub fn json_message(e: &serde_json::Error, line: &[u8]) -> String {
    let text = e.to_string();
    let what = match text.rfind(" at line ") {
        Some(at) => &text[..at],
        None => text.as_str(),
    };
    match e.classify() {
        serde_json::error::Category::Data => {
            if let Ok(value) = serde_json::from_slice::<serde_json::Value>(line)
                && !value.is_object()
            {
                return format!("expected a record (a JSON object), found {}", kind_of(&value));
            }
            // "missing field `x`" and "unknown field `x`" say which already; their column is the object's end.
            let names_itself = what.starts_with("missing field") || what.contains("field `");
            let field = field_holding(what, line).filter(|_| !names_itself).or_else(|| {
                field_before(line, e.column())
                    .filter(|f| !names_itself && ["id", "device", "operator", "taken_at"].contains(&f.as_str()))
            });
            match field {
                Some(field) => format!("field \"{field}\": {what}"),
                // No field can be told (the line is not valid JSON further on): the column at least.
                None if !names_itself && e.column() > 0 => format!("{what} (column {})", e.column()),
                None => what.to_string(),
            }
        }
        _ if e.column() > 0 => format!("{what} (column {})", e.column()),
        _ => what.to_string(),
    }
}

fn kind_of(value: &serde_json::Value) -> &'static str {
    match value {
        serde_json::Value::Null => "null",
        serde_json::Value::Bool(_) => "a boolean",
        serde_json::Value::Number(_) => "a number",
        serde_json::Value::String(_) => "a string",
        serde_json::Value::Array(_) => "an array",
        serde_json::Value::Object(_) => "an object",
    }
}

/// The dotted path of the only field of `line` whose value is the one an
/// error message quotes (`integer \`-1\``, `string "x"`, `unknown variant \`x\``).
fn field_holding(message: &str, line: &[u8]) -> Option<String> {
    use serde_json::Value;
    let quoted = |prefix: &str, open: char, close: char| -> Option<String> {
        let rest = &message[message.find(prefix)? + prefix.len()..];
        let rest = rest.strip_prefix(open)?;
        Some(rest[..rest.find(close)?].to_string())
    };
    let wanted: Box<dyn Fn(&Value) -> bool> = if let Some(v) = quoted("integer ", '`', '`') {
        let n: i128 = v.parse().ok()?;
        Box::new(move |x| x.as_i64().map(i128::from).or(x.as_u64().map(i128::from)) == Some(n))
    } else if let Some(v) = quoted("floating point ", '`', '`') {
        let f: f64 = v.parse().ok()?;
        Box::new(move |x| x.is_f64() && x.as_f64() == Some(f))
    } else if let Some(v) = quoted("string ", '"', '"').or_else(|| quoted("unknown variant ", '`', '`')) {
        Box::new(move |x| x.as_str() == Some(v.as_str()))
    } else if let Some(v) = quoted("boolean ", '`', '`') {
        let b: bool = v.parse().ok()?;
        Box::new(move |x| x.as_bool() == Some(b))
    } else {
        return None;
    };
    let value: Value = serde_json::from_slice(line).ok()?;
    let mut found = Vec::new();
    let mut stack = vec![(String::new(), &value)];
    while let Some((path, v)) = stack.pop() {
        match v {
            Value::Object(map) => {
                for (key, child) in map {
                    stack.push((if path.is_empty() { key.clone() } else { format!("{path}.{key}") }, child));
                }
            }
            Value::Array(items) => {
                for (i, child) in items.iter().enumerate() {
                    stack.push((format!("{path}[{i}]"), child));
                }
            }
            leaf if wanted(leaf) => found.push(path),
            _ => {}
        }
    }
    (found.len() == 1).then(|| found.remove(0))
}

/// The name of the last `"name":` that starts before byte column `column` (1-based).
fn field_before(line: &[u8], column: usize) -> Option<String> {
    let upto = &line[..column.min(line.len())];
    let mut end = upto.len();
    while let Some(colon) = upto[..end].iter().rposition(|&b| b == b':') {
        let before = upto[..colon].trim_ascii_end();
        if let Some(inner) = before.strip_suffix(b"\"")
            && let Some(open) = inner.iter().rposition(|&b| b == b'"')
        {
            let name = &inner[open + 1..];
            if !name.is_empty() && name.iter().all(|b| b.is_ascii_alphanumeric() || *b == b'_') {
                return String::from_utf8(name.to_vec()).ok();
            }
        }
        end = colon;
    }
    None
}

/// A record line found by [`scan`].
#[derive(Debug, Clone)]
pub struct Line {
    /// 1-based line number.
    pub number: u64,
    /// Byte offset where the line starts.
    pub start: u64,
    /// Byte offset just after its newline.
    pub end: u64,
    /// The line without its newline.
    pub bytes: Vec<u8>,
    /// The record it holds.
    pub record: Record,
}

/// A line [`scan`] could not read.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct BadLine {
    /// 1-based line number.
    pub number: u64,
    /// Byte offset where the line starts.
    pub start: u64,
    /// What is wrong.
    pub message: String,
}

/// Everything [`scan`] found in a journal.
#[derive(Debug, Default)]
pub struct Scan {
    /// The header, or why line 1 is not one; `None` for an empty file.
    pub header: Option<Result<Header, String>>,
    /// Byte offset just after the header line.
    pub header_end: u64,
    /// The readable record lines, in file order.
    pub records: Vec<Line>,
    /// Complete lines that could not be read.
    pub bad_lines: Vec<BadLine>,
    /// Byte offset of a last line with no newline: an unfinished write.
    pub unfinished_from: Option<u64>,
    /// File length.
    pub len: u64,
}

impl Scan {
    /// Where the damage-free part of the file ends: after the last readable
    /// record line, or after the header when there is none. Everything from
    /// here on is bad lines or an unfinished write.
    pub fn good_end(&self) -> u64 {
        self.records.last().map_or(self.header_end, |l| l.end)
    }

    /// Bad lines that come before a readable record: damage, not an unfinished write.
    pub fn bad_lines_inside(&self) -> impl Iterator<Item = &BadLine> {
        let good_end = self.good_end();
        self.bad_lines.iter().filter(move |b| b.start < good_end)
    }
}

/// Longest line a reader takes in: far more than any record needs (a record
/// with every text at its longest is under 100 KiB), so that a file of
/// garbage cannot make a reader hold gigabytes.
pub const MAX_LINE_BYTES: usize = 1 << 20;

/// One line as read from a file in this format, by [`LineReader`].
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RawLine {
    /// 1-based line number.
    pub number: u64,
    /// Byte offset where the line starts.
    pub start: u64,
    /// Byte offset just after it (after its newline, when it has one).
    pub end: u64,
    /// The line's bytes with its `\n` or `\r\n` (empty when [`RawLine::too_long`]).
    pub raw: Vec<u8>,
    /// True when the line ends with a newline; false for an unfinished last line.
    pub terminated: bool,
    /// True when the line is longer than [`MAX_LINE_BYTES`]; its bytes were skipped.
    pub too_long: bool,
}

impl RawLine {
    /// The line without its newline (and a `\r` before it).
    pub fn content(&self) -> &[u8] {
        let mut bytes = self.raw.as_slice();
        if self.terminated {
            bytes = bytes.strip_suffix(b"\n").unwrap_or(bytes);
            bytes = bytes.strip_suffix(b"\r").unwrap_or(bytes);
        }
        bytes
    }

    /// The length of the line in bytes, newline included.
    pub fn len(&self) -> u64 {
        self.end - self.start
    }

    /// True for a line of no bytes at all (never returned by [`LineReader`]).
    pub fn is_empty(&self) -> bool {
        self.end == self.start
    }
}

/// Reads a file in this format line by line, keeping at most
/// [`MAX_LINE_BYTES`] of any line in memory.
#[derive(Debug)]
pub struct LineReader<R> {
    reader: R,
    offset: u64,
    number: u64,
}

impl<R: BufRead> LineReader<R> {
    /// Reads from `reader`, whose first line starts at byte `offset` and has number `number`.
    pub fn new(reader: R, offset: u64, number: u64) -> LineReader<R> {
        LineReader { reader, offset, number }
    }

    /// The byte offset of the next line.
    pub fn offset(&self) -> u64 {
        self.offset
    }

    /// The next line, or `None` at the end of the file.
    pub fn next_line(&mut self) -> io::Result<Option<RawLine>> {
        let start = self.offset;
        let mut raw = Vec::new();
        let mut too_long = false;
        let mut terminated = false;
        loop {
            let available = match self.reader.fill_buf() {
                Ok(buf) => buf,
                Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
                Err(e) => return Err(e),
            };
            if available.is_empty() {
                break;
            }
            let (take, found) = match available.iter().position(|&b| b == b'\n') {
                Some(i) => (i + 1, true),
                None => (available.len(), false),
            };
            if !too_long {
                if raw.len() + take > MAX_LINE_BYTES + 2 {
                    too_long = true;
                    raw = Vec::new();
                } else {
                    raw.extend_from_slice(&available[..take]);
                }
            }
            self.reader.consume(take);
            self.offset += take as u64;
            if found {
                terminated = true;
                break;
            }
        }
        if self.offset == start {
            return Ok(None);
        }
        let line = RawLine { number: self.number, start, end: self.offset, raw, terminated, too_long };
        self.number += 1;
        Ok(Some(line))
    }
}

/// Reads the journal at `path` from byte `from` (0 for the whole file, which
/// then reads the header too), line by line. `first_line` is the number of
/// the line starting at `from`. A missing file scans as empty.
pub fn scan(path: &Path, from: u64, first_line: u64) -> Result<Scan, StoreError> {
    let mut scan = Scan { header_end: from, ..Scan::default() };
    let file = match File::open(path) {
        Ok(f) => f,
        Err(e) if e.kind() == io::ErrorKind::NotFound => return Ok(scan),
        Err(e) => return Err(StoreError::io("cannot read", path, e)),
    };
    let read_err = |e| StoreError::io("cannot read", path, e);
    scan.len = file.metadata().map_err(read_err)?.len();
    let mut reader = BufReader::with_capacity(1 << 16, file);
    reader.seek(SeekFrom::Start(from)).map_err(read_err)?;
    let mut lines = LineReader::new(reader, from, first_line);
    while let Some(line) = lines.next_line().map_err(read_err)? {
        if !line.terminated {
            scan.unfinished_from = Some(line.start);
            break;
        }
        let (number, start) = (line.number, line.start);
        if line.too_long {
            scan.bad_lines.push(BadLine { number, start, message: too_long_message(line.len()) });
        } else if from == 0 && number == 1 {
            scan.header = Some(Header::parse(line.content()));
            scan.header_end = line.end;
        } else {
            match parse_record(line.content()) {
                Ok(record) => {
                    scan.records.push(Line { number, start, end: line.end, bytes: line.content().to_vec(), record })
                }
                Err(message) => scan.bad_lines.push(BadLine { number, start, message }),
            }
        }
    }
    if from == 0 && scan.header.is_none() && scan.unfinished_from.is_some() {
        scan.header = Some(Err("the header line is unfinished".into()));
    }
    Ok(scan)
}

/// What is wrong with a line longer than [`MAX_LINE_BYTES`].
pub fn too_long_message(len: u64) -> String {
    format!(
        "the line is {len} bytes long, more than any record can be (at most {} bytes): not a record",
        MAX_LINE_BYTES
    )
}

/// What the first line of a journal is.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum HeaderState {
    /// No file, or an empty one.
    Missing,
    /// A first line with no newline: the file's creation was cut short.
    Unfinished,
    /// A complete first line that is not a header this build reads.
    Bad(String),
    /// A header, and the byte offset just after its line.
    Good(Header, u64),
}

/// Reads only the first line of the journal at `path`.
pub fn scan_header(path: &Path) -> Result<HeaderState, StoreError> {
    let file = match File::open(path) {
        Ok(f) => f,
        Err(e) if e.kind() == io::ErrorKind::NotFound => return Ok(HeaderState::Missing),
        Err(e) => return Err(StoreError::io("cannot read", path, e)),
    };
    let mut reader = BufReader::new(file);
    let mut line = Vec::new();
    let n = reader.read_until(b'\n', &mut line).map_err(|e| StoreError::io("cannot read", path, e))?;
    if n == 0 {
        return Ok(HeaderState::Missing);
    }
    if line.pop() != Some(b'\n') {
        return Ok(HeaderState::Unfinished);
    }
    if line.last() == Some(&b'\r') {
        line.pop();
    }
    Ok(match Header::parse(&line) {
        Ok(header) => HeaderState::Good(header, n as u64),
        Err(message) => HeaderState::Bad(message),
    })
}

/// Counts the lines before byte `offset` (to name line numbers when a scan
/// starts in the middle of a file).
pub fn lines_before(path: &Path, offset: u64) -> Result<u64, StoreError> {
    let file = File::open(path).map_err(|e| StoreError::io("cannot read", path, e))?;
    let mut reader = BufReader::with_capacity(1 << 16, file.take(offset));
    let mut count = 0;
    let mut buf = Vec::new();
    loop {
        buf.clear();
        let n = reader.read_until(b'\n', &mut buf).map_err(|e| StoreError::io("cannot read", path, e))?;
        if n == 0 {
            return Ok(count);
        }
        if buf.last() == Some(&b'\n') {
            count += 1;
        }
    }
}

/// The open journal, for appending.
#[derive(Debug)]
pub struct Writer {
    file: File,
    path: PathBuf,
    len: u64,
}

impl Writer {
    /// Creates a journal holding only `header`, durably (file and folder synced).
    pub fn create(path: &Path, header: &Header) -> Result<Writer, StoreError> {
        let write_err = |e| StoreError::io("cannot write", path, e);
        let mut file = OpenOptions::new().write(true).create_new(true).open(path).map_err(write_err)?;
        let line = header.to_line();
        file.write_all(&line).map_err(write_err)?;
        file.sync_all().map_err(write_err)?;
        sync_parent(path)?;
        Ok(Writer { file, path: path.to_path_buf(), len: line.len() as u64 })
    }

    /// Opens an existing journal to append after its last byte.
    pub fn open(path: &Path) -> Result<Writer, StoreError> {
        let write_err = |e| StoreError::io("cannot open for writing", path, e);
        let mut file = OpenOptions::new().write(true).open(path).map_err(write_err)?;
        let len = file.seek(SeekFrom::End(0)).map_err(write_err)?;
        Ok(Writer { file, path: path.to_path_buf(), len })
    }

    /// The journal's length in bytes.
    pub fn len(&self) -> u64 {
        self.len
    }

    /// True when the journal holds nothing at all.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Appends `lines` (each with its newline) with one write and syncs the
    /// data to disk. On failure the journal is cut back to where it was, so a
    /// half-written line never stays behind. Returns the new length.
    pub fn append(&mut self, lines: &[Vec<u8>]) -> Result<u64, StoreError> {
        let bytes: Vec<u8> = lines.concat();
        let written = self
            .file
            .seek(SeekFrom::Start(self.len))
            .and_then(|_| self.file.write_all(&bytes))
            .and_then(|()| self.file.sync_data());
        if let Err(e) = written {
            // Best effort: cut back the partial write; the error below is what matters.
            let _ = self.file.set_len(self.len).and_then(|()| self.file.sync_data());
            return Err(StoreError::io("cannot write", &self.path, e));
        }
        self.len += bytes.len() as u64;
        Ok(self.len)
    }
}

/// Syncs the folder holding `path`, so that a new or renamed file's name is durable.
pub(crate) fn sync_parent(path: &Path) -> Result<(), StoreError> {
    #[cfg(unix)]
    {
        let dir = path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new("."));
        File::open(dir).and_then(|d| d.sync_all()).map_err(|e| StoreError::io("cannot sync folder", dir, e))?;
    }
    #[cfg(not(unix))]
    let _ = path;
    Ok(())
}

/// A name beside `path` that does not exist yet: `path` with `.{tag}-{UTC time}`
/// appended (and a counter when needed).
pub(crate) fn aside_name(path: &Path, tag: &str) -> PathBuf {
    let stamp = Utc::now().format("%Y%m%dT%H%M%S%.3fZ");
    let base = format!("{}.{tag}-{stamp}", path.file_name().map(|n| n.to_string_lossy()).unwrap_or_default());
    let mut candidate = path.with_file_name(&base);
    let mut n = 1;
    while candidate.exists() {
        n += 1;
        candidate = path.with_file_name(format!("{base}-{n}"));
    }
    candidate
}

/// Moves the bytes of the journal from `start` to its end into a file beside
/// it (`journal.jsonl.unfinished-…`) and cuts the journal at `start`. Data is
/// never deleted: the piece is kept for inspection. Returns the new file.
pub(crate) fn set_aside_tail(path: &Path, start: u64) -> Result<PathBuf, StoreError> {
    let read_err = |e| StoreError::io("cannot read", path, e);
    let mut file = OpenOptions::new().read(true).write(true).open(path).map_err(read_err)?;
    file.seek(SeekFrom::Start(start)).map_err(read_err)?;
    let mut tail = Vec::new();
    file.read_to_end(&mut tail).map_err(read_err)?;
    let aside = aside_name(path, "unfinished");
    let mut out = OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(&aside)
        .map_err(|e| StoreError::io("cannot write", &aside, e))?;
    out.write_all(&tail).and_then(|()| out.sync_all()).map_err(|e| StoreError::io("cannot write", &aside, e))?;
    sync_parent(&aside)?;
    file.set_len(start).and_then(|()| file.sync_all()).map_err(|e| StoreError::io("cannot cut", path, e))?;
    Ok(aside)
}

/// Renames `from` to `to` durably.
pub(crate) fn rename_durably(from: &Path, to: &Path) -> Result<(), StoreError> {
    fs::rename(from, to).map_err(|e| StoreError::io("cannot rename", from, e))?;
    sync_parent(to)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{Reading, RecordBody, Target};

    fn reading(ph: f64) -> Record {
        let mut r = Reading::new(Target::Tank("Q1".into()));
        r.measurements.ph = Some(ph);
        Record::new(DeviceId::generate(), "Ana", Utc::now().fixed_offset(), RecordBody::Reading(r))
    }

    fn line_of(r: &Record) -> Vec<u8> {
        record_line(&serde_json::to_vec(r).unwrap())
    }

    #[test]
    fn write_then_scan_gives_back_every_record() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(FILE_NAME);
        let header = Header::new(DeviceId::generate());
        let mut w = Writer::create(&path, &header).unwrap();
        let records: Vec<Record> = (0..5).map(|i| reading(6.0 + f64::from(i) / 10.0)).collect();
        let lines: Vec<Vec<u8>> = records.iter().map(line_of).collect();
        w.append(&lines[..2]).unwrap();
        let len = w.append(&lines[2..]).unwrap();
        let scan = scan(&path, 0, 1).unwrap();
        assert_eq!(scan.header, Some(Ok(header)));
        assert_eq!(scan.len, len);
        assert_eq!(scan.records.iter().map(|l| l.record.clone()).collect::<Vec<_>>(), records);
        assert_eq!(scan.records[0].number, 2);
        assert!(scan.bad_lines.is_empty() && scan.unfinished_from.is_none());
        assert_eq!(scan.good_end(), len);
        // Scanning from the middle gives the rest, with the right line numbers.
        let mid = scan.records[2].start;
        let rest = super::scan(&path, mid, lines_before(&path, mid).unwrap() + 1).unwrap();
        assert_eq!(rest.records.len(), 3);
        assert_eq!(rest.records[0].number, 4);
    }

    #[test]
    fn an_unfinished_last_line_is_found_and_set_aside() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(FILE_NAME);
        let mut w = Writer::create(&path, &Header::new(DeviceId::generate())).unwrap();
        w.append(&[line_of(&reading(7.0))]).unwrap();
        let good_len = w.len();
        let mut torn = line_of(&reading(7.1));
        torn.truncate(torn.len() / 2);
        OpenOptions::new().append(true).open(&path).unwrap().write_all(&torn).unwrap();
        let s = scan(&path, 0, 1).unwrap();
        assert_eq!(s.unfinished_from, Some(good_len));
        assert_eq!(s.records.len(), 1);
        let aside = set_aside_tail(&path, good_len).unwrap();
        assert_eq!(fs::read(&aside).unwrap(), torn);
        assert_eq!(fs::metadata(&path).unwrap().len(), good_len);
    }

    #[test]
    fn damaged_lines_are_named_by_number() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(FILE_NAME);
        let mut w = Writer::create(&path, &Header::new(DeviceId::generate())).unwrap();
        let mut bad_value = serde_json::to_value(reading(7.0)).unwrap();
        bad_value["body"]["measurements"]["ph"] = serde_json::json!(15.0);
        w.append(&[
            line_of(&reading(7.0)),
            b"{not json\n".to_vec(),
            record_line(&serde_json::to_vec(&bad_value).unwrap()),
            line_of(&reading(7.2)),
            b"garbage at the end\n".to_vec(),
        ])
        .unwrap();
        let s = scan(&path, 0, 1).unwrap();
        assert_eq!(s.records.len(), 2);
        let numbers: Vec<u64> = s.bad_lines.iter().map(|b| b.number).collect();
        assert_eq!(numbers, [3, 4, 6]);
        assert!(s.bad_lines[1].message.contains("measurements.ph"), "{}", s.bad_lines[1].message);
        let inside: Vec<u64> = s.bad_lines_inside().map(|b| b.number).collect();
        assert_eq!(inside, [3, 4]);
    }

    #[test]
    fn headers_of_other_formats_are_refused() {
        assert!(Header::parse(br#"{"format":"something-else","version":1,"device":"01JEX5TZZZ0000000000000000","created_at":"2026-12-01T06:30:00Z"}"#).is_err());
        assert!(Header::parse(br#"{"format":"tankwalk-records","version":2,"device":"01JEX5TZZZ0000000000000000","created_at":"2026-12-01T06:30:00Z"}"#).is_err());
        let later = br#"{"format":"tankwalk-records","version":1,"device":"01JEX5TZZZ0000000000000000","created_at":"2026-12-01T06:30:00Z","segment":4}"#;
        assert!(Header::parse(later).is_ok(), "unknown header fields are ignored");
    }
}
