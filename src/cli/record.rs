//! `tankwalk record`: save one reading of a tank or a system.

use std::io::Write;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use serde::Serialize;
use ulid::Ulid;

use tankwalk::model::record::{DeviceId, Observations, Reading, Record, RecordBody};
use tankwalk::numfmt::sig;
use tankwalk::store::{Entry, Store};

use super::entry_view::{self, EntryJson};
use super::input::{self, ReadingArgs, TargetArgs, WhoWhenArgs};
use super::{GlobalArgs, bad_input};

#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct RecordArgs {
    #[command(flatten)]
    place: TargetArgs,
    #[command(flatten)]
    reading: ReadingArgs,
    /// A free note.
    #[arg(long, value_name = "TEXT")]
    note: Option<String>,
    #[command(flatten)]
    who: WhoWhenArgs,
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

/// What `record`, `event` and `correct` print with `--json`.
#[derive(Debug, Serialize)]
pub struct Saved {
    #[serde(flatten)]
    pub entry: EntryJson,
    pub warnings: Vec<String>,
    pub caution: &'static str,
}

pub fn run(global: &GlobalArgs, args: &RecordArgs) -> Result<ExitCode> {
    // Everything is parsed and checked before the store is opened.
    let place = input::locate(global.room.as_deref(), args.place.tank.as_deref(), args.place.system.as_deref())?;
    let operator = args.who.operator()?;
    let taken_at = args.who.taken_at(input::now_local())?;
    let mut reading = Reading::new(place.target.clone());
    reading.measurements = args.reading.measurements();
    reading.observations = args.reading.observations(Observations::default())?;
    reading.note = args.note.clone().filter(|n| !n.trim().is_empty());
    if reading.measurements.is_empty() && reading.observations.is_empty() {
        return Err(bad_input!(
            "nothing to record: give at least one value (--temp-c, --ph, --tan, ...), --observe or --deaths"
        ));
    }
    let mut record = Record::new(DeviceId(Ulid::nil()), operator, taken_at, RecordBody::Reading(reading));
    let warnings = record.check().map_err(|e| input::refuse(args.reading.option_for(&e), &e))?;
    let warnings = input::warning_lines(&warnings, |f| args.reading.option_for_field(f).to_string());

    let mut store = super::open_store(global)?;
    record.device = store.device();
    store.append(std::slice::from_ref(&record))?;
    drop(store);

    let entry = Entry { original: record, corrections: Vec::new() };
    print_saved(&entry, place.system.clone(), warnings, args.json)?;
    Ok(ExitCode::SUCCESS)
}

/// Prints a newly saved record (or correction) and what it means.
pub fn print_saved(entry: &Entry, system: Option<String>, warnings: Vec<String>, json: bool) -> Result<()> {
    let mut out = std::io::stdout().lock();
    let mut view = entry_view::entry_json(entry, None);
    if view.system.is_none() {
        view.system = system;
    }
    if json {
        let saved = Saved { entry: view, warnings, caution: tankwalk::CAUTION };
        serde_json::to_writer_pretty(&mut out, &saved)?;
        writeln!(out)?;
        return Ok(());
    }
    let newest = entry.latest_correction().unwrap_or(&entry.original);
    let what = newest.body.kind_name();
    let place = entry.target().map(|t| t.to_string()).unwrap_or_default();
    let of = if entry.is_corrected() { format!(" of {}", entry.original.id) } else { String::new() };
    writeln!(
        out,
        "saved {} ({what}{of}, {place}, taken {}, by {})",
        newest.id,
        entry_view::when(&entry.original.taken_at),
        newest.operator
    )?;
    match entry.current() {
        None => writeln!(out, "  withdrawn: no longer part of the history (kept in the audit trail)")?,
        Some(body) => {
            writeln!(out, "  {}", entry_view::describe(body))?;
            if let Some(reading) = body.as_reading() {
                match entry_view::derived(reading) {
                    Some(d) => writeln!(
                        out,
                        "  NH3 {} mg/L = {} mg/L NH3-N ({} % un-ionized): {} {} ({} band edges)",
                        sig(d.toxic.nh3_mg_l, 3),
                        sig(d.toxic.nh3_n_mg_l, 3),
                        sig(d.toxic.fraction * 100.0, 3),
                        d.band.glyph(),
                        d.band,
                        entry_view::BAND_EDGES_SOURCE
                    )?,
                    None => writeln!(out, "  NH3 not computed: it needs temperature, pH and total ammonia")?,
                }
            }
        }
    }
    for warning in &warnings {
        writeln!(out, "warning: {warning}")?;
    }
    writeln!(out, "{}", tankwalk::CAUTION)?;
    Ok(())
}
