//! `tankwalk log`: history, newest first, with NH3 and band computed on the fly.

use std::io::Write;
use std::process::ExitCode;

use anyhow::Result;
use clap::{Args, ValueEnum};

use tankwalk::store::{Entry, TimeRange, history};

use super::entry_view::{self, EntryJson};
use super::input::{self, Bound, TargetArgs};
use super::{GlobalArgs, bad_input};

/// Which records `--kind` keeps.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum LogKind {
    Reading,
    Event,
}

#[derive(Debug, Args)]
pub struct LogArgs {
    #[command(flatten)]
    place: TargetArgs,
    /// From this time on: 2026-12-01, 2026-12-01T07:00, RFC 3339, today, yesterday, or an age (12h, 7d).
    #[arg(long, value_name = "WHEN")]
    since: Option<String>,
    /// Up to this time (a date means its whole day), in the same forms as --since.
    #[arg(long, value_name = "WHEN")]
    until: Option<String>,
    /// Only readings or only events.
    #[arg(long)]
    kind: Option<LogKind>,
    /// Show withdrawn records too.
    #[arg(long)]
    withdrawn: bool,
    /// At most this many entries, newest first.
    #[arg(long, value_name = "N")]
    limit: Option<usize>,
    /// Print one JSON array of objects instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &LogArgs) -> Result<ExitCode> {
    // Everything is parsed and checked before the store is opened.
    let now = input::now_local();
    let since = args
        .since
        .as_deref()
        .map(|s| input::parse_when(s, now, Bound::Start).map_err(|e| bad_input!("--since: {e}")))
        .transpose()?;
    let until = args
        .until
        .as_deref()
        .map(|s| input::parse_when(s, now, Bound::End).map_err(|e| bad_input!("--until: {e}")))
        .transpose()?;
    if let (Some(s), Some(u)) = (since, until)
        && s > u
    {
        return Err(bad_input!("--since is after --until"));
    }
    let targets = match (&args.place.tank, &args.place.system) {
        (None, None) => Vec::new(),
        (tank, system) => input::locate(global.room.as_deref(), tank.as_deref(), system.as_deref())?.history_targets(),
    };
    let range = TimeRange::new(since.map(input::utc), until.map(input::utc));

    let store = super::open_store(global)?;
    let mut entries: Vec<Entry> = history::entries(&store, &targets, &range)?;
    drop(store);

    entries.retain(|e| args.withdrawn || !e.is_withdrawn());
    if let Some(kind) = args.kind {
        let wanted = match kind {
            LogKind::Reading => "reading",
            LogKind::Event => "event",
        };
        entries.retain(|e| e.original.body.kind_name() == wanted);
    }
    if let Some(limit) = args.limit {
        entries.truncate(limit);
    }

    let room = global.room.as_deref();
    let mut out = std::io::stdout().lock();
    if args.json {
        let views: Vec<EntryJson> = entries.iter().map(|e| entry_view::entry_json(e, room)).collect();
        serde_json::to_writer_pretty(&mut out, &views)?;
        writeln!(out)?;
        return Ok(ExitCode::SUCCESS);
    }
    if entries.is_empty() {
        writeln!(out, "no records")?;
        return Ok(ExitCode::SUCCESS);
    }
    let places: Vec<String> = entries.iter().map(|e| e.target().map(|t| t.to_string()).unwrap_or_default()).collect();
    let width = places.iter().map(|p| p.chars().count()).max().unwrap_or(0);
    for (entry, place) in entries.iter().zip(&places) {
        let (what, band) = match entry.current() {
            None => ("withdrawn".to_string(), String::new()),
            Some(body) => {
                let band = body.as_reading().and_then(entry_view::derived).map(|d| d.band);
                (entry_view::describe(body), entry_view::band_text(band))
            }
        };
        let mark = if entry.is_corrected() { "*" } else { " " };
        writeln!(
            out,
            "{}{mark} {place:<width$}  {band:<10}  {what}  [{}, {}]",
            entry_view::when(&entry.original.taken_at),
            entry.original.id,
            entry.original.operator
        )?;
        let note = entry.current().and_then(|b| match b {
            tankwalk::model::record::RecordBody::Reading(r) => r.note.clone(),
            tankwalk::model::record::RecordBody::Event(e) => e.note.clone(),
            tankwalk::model::record::RecordBody::Correction(_) => None,
        });
        if let Some(note) = note {
            writeln!(out, "    note: {}", note.replace('\n', " / "))?;
        }
        for line in entry_view::trail_lines(entry) {
            writeln!(out, "{line}")?;
        }
    }
    if entries.iter().any(Entry::is_corrected) {
        writeln!(out, "* corrected: the current value is shown, with its trail")?;
    }
    Ok(ExitCode::SUCCESS)
}
