//! `tankwalk log`: history, newest first, with NH3 and band computed on the fly.

use std::io::Write;
use std::process::ExitCode;

use anyhow::Result;
use clap::{Args, ValueEnum};

use tankwalk::model::record::RecordBody;
use tankwalk::rules::Assessment;
use tankwalk::store::{Entry, TimeRange, history};
use tankwalk::timeline::Assessor;

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
    let room = super::room::resolve_room_optional(global)?;
    let facility = room.as_ref().map(|(_, f)| f);
    let place = match (&args.place.tank, &args.place.system) {
        (None, None) => None,
        (tank, system) => Some(input::locate(facility, tank.as_deref(), system.as_deref())?),
    };
    let targets = place.as_ref().map(input::Located::history_targets).unwrap_or_default();
    let range = TimeRange::new(since.map(input::utc), until.map(input::utc));

    let store = super::open_store(global)?;
    // Versions from other laptops that disagree with a stored record, by id.
    let mut conflicts: std::collections::HashMap<ulid::Ulid, Vec<tankwalk::model::record::Record>> =
        std::collections::HashMap::new();
    for record in tankwalk::exchange::conflicts::list(&global.data_dir()?)? {
        conflicts.entry(record.id).or_default().push(record);
    }
    let mut entries: Vec<Entry> = history::entries(&store, &targets, &range)?;

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
    // Judge each reading for the tank asked about (a system reading then counts
    // for that tank), or for its own tank or system.
    let assessments: Vec<Option<Assessment>> = match facility {
        None => vec![None; entries.len()],
        Some(facility) => {
            let mut assessor = Assessor::new(&store, facility, range);
            let mut out = Vec::with_capacity(entries.len());
            for entry in &entries {
                let assessment = match entry.current() {
                    Some(RecordBody::Reading(reading)) => {
                        let target = place.as_ref().map_or(&reading.target, |p| &p.target);
                        assessor.assess(target, reading, entry.original.taken_at.with_timezone(&chrono::Utc))?
                    }
                    _ => None,
                };
                out.push(assessment);
            }
            out
        }
    };
    drop(store);

    let mut out = std::io::stdout().lock();
    if args.json {
        let views: Vec<EntryJson> = entries
            .iter()
            .zip(&assessments)
            .map(|(e, a)| {
                let mut view = entry_view::entry_json(e, facility, a.as_ref());
                view.conflicts = e.trail().filter_map(|r| conflicts.get(&r.id)).flatten().cloned().collect();
                view
            })
            .collect();
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
    for ((entry, place), assessment) in entries.iter().zip(&places).zip(&assessments) {
        let assessment = assessment.as_ref();
        let (what, band) = match entry.current() {
            None => ("withdrawn".to_string(), String::new()),
            Some(body) => {
                let band = body.as_reading().and_then(|r| entry_view::nh3_of(r, assessment)).and_then(|d| d.3);
                (entry_view::describe(body, assessment), entry_view::band_text(band))
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
        let note = entry.current().and_then(|b| b.note().map(str::to_string));
        if let Some(note) = note {
            writeln!(out, "    note: {}", note.replace('\n', " / "))?;
        }
        for line in entry_view::trail_lines(entry) {
            writeln!(out, "{line}")?;
        }
        for other in entry.trail().filter_map(|r| conflicts.get(&r.id)).flatten() {
            writeln!(
                out,
                "    conflict: another laptop's version of {} by {} says: {} (kept aside; see tankwalk doctor)",
                other.id,
                other.operator,
                entry_view::describe(&other.body, None)
            )?;
        }
    }
    if entries.iter().any(Entry::is_corrected) {
        writeln!(out, "* corrected: the current value is shown, with its trail")?;
    }
    Ok(ExitCode::SUCCESS)
}
