//! `tankwalk export`: the records to a folder, as JSON Lines (lossless) and CSV (for spreadsheets).

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::{Args, ValueEnum};

use tankwalk::exchange::{self, ExportOptions, ExportSummary, Formats};
use tankwalk::model::Facility;

use super::input::{self, Bound};
use super::progress::Bar;
use super::room::{self, resolve_room};
use super::{GlobalArgs, bad_input};

/// `--format`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum FormatArg {
    /// records.jsonl only: lossless, for `import` on another laptop.
    Jsonl,
    /// readings.csv only: one row a reading, for a spreadsheet.
    Csv,
    /// Both.
    Both,
}

#[derive(Debug, Args)]
pub struct ExportArgs {
    /// Folder to write records.jsonl, readings.csv and manifest.json to (created when missing;
    /// files of an earlier export there are replaced).
    #[arg(long, value_name = "DIR")]
    out: PathBuf,
    /// Only records taken from this time on: 2026-12-01, 2026-12-01T07:00, RFC 3339, today, yesterday, or an age (7d).
    #[arg(long, value_name = "WHEN")]
    since: Option<String>,
    /// Which files to write.
    #[arg(long, value_enum, default_value_t = FormatArg::Both)]
    format: FormatArg,
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &ExportArgs) -> Result<ExitCode> {
    let since = args
        .since
        .as_deref()
        .map(|s| input::parse_when(s, input::now_local(), Bound::Start).map_err(|e| bad_input!("--since: {e}")))
        .transpose()?
        .map(input::utc);
    let formats = match args.format {
        FormatArg::Jsonl => Formats::Jsonl,
        FormatArg::Csv => Formats::Csv,
        FormatArg::Both => Formats::Both,
    };
    if args.out.exists() && !args.out.is_dir() {
        return Err(bad_input!("--out: {} is a file, not a folder", args.out.display()));
    }
    let room = if formats.csv() { optional_room(global)? } else { None };
    let options = ExportOptions {
        formats,
        since,
        room: room.as_ref().map(|(_, f)| f),
        room_file: room.as_ref().map(|(p, _)| p.clone()),
    };

    let store = super::open_store(global)?;
    let mut bar = Bar::on_terminal();
    let summary = exchange::export(&store, &args.out, &options, &mut |p| bar.update(p))?;
    bar.clear();
    drop(store);

    let mut out = std::io::stdout().lock();
    if args.json {
        serde_json::to_writer_pretty(&mut out, &summary)?;
        writeln!(out)?;
    } else {
        write_text(&mut out, &summary)?;
    }
    Ok(ExitCode::SUCCESS)
}

/// The room for the CSV's band edges: the one given, or the one used last;
/// none when neither is known (the defaults are used and the CSV says so).
fn optional_room(global: &GlobalArgs) -> Result<Option<(PathBuf, Facility)>> {
    if global.room.is_some() {
        return resolve_room(global).map(Some);
    }
    if !global.data_dir()?.join(room::LAST_ROOM_FILE).exists() {
        return Ok(None);
    }
    match resolve_room(global) {
        Ok(found) => Ok(Some(found)),
        Err(err) => {
            eprintln!("tankwalk: warning: {err:#}\ntankwalk: warning: the CSV's bands use the default edges");
            Ok(None)
        }
    }
}

fn write_text(out: &mut impl Write, s: &ExportSummary) -> Result<()> {
    let k = &s.kinds;
    let range = match (s.taken_first, s.taken_last) {
        (Some(a), Some(b)) => {
            format!(", taken {} to {}", a.format("%Y-%m-%d %H:%M UTC"), b.format("%Y-%m-%d %H:%M UTC"))
        }
        _ => String::new(),
    };
    writeln!(
        out,
        "exported {} ({}, {}, {}, {}){range}",
        count(s.records, "record"),
        count(k.readings, "reading"),
        count(k.events, "event"),
        count(k.corrections, "correction"),
        count(k.skips, "skip")
    )?;
    for f in &s.files {
        let what = match f.content {
            exchange::manifest::READINGS_CSV => format!("{} reading rows, for spreadsheets", f.count),
            _ => "lossless: `tankwalk import` it on another laptop".to_string(),
        };
        writeln!(out, "  {}  {} bytes  ({what})", f.path.display(), f.bytes)?;
    }
    writeln!(out, "  {}  counts and a SHA-256 of each file", s.manifest.display())?;
    if s.default_edges {
        writeln!(
            out,
            "bands in the CSV use tankwalk's default NH3 edges: no room was given (pass --room FILE for each species' edges)"
        )?;
    }
    if s.files.iter().any(|f| f.content == exchange::manifest::READINGS_CSV) {
        writeln!(out, "{}", tankwalk::CAUTION)?;
    }
    Ok(())
}

/// `1 record`, `2 records`.
pub fn count(n: impl Into<u64>, what: &str) -> String {
    let n = n.into();
    if n == 1 { format!("1 {what}") } else { format!("{n} {what}s") }
}
