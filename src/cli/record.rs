//! `tankwalk record`: save one reading of a tank or a system.

use std::io::Write;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use serde::Serialize;
use ulid::Ulid;

use tankwalk::core::units::AmmoniaBasis;
use tankwalk::model::Facility;
use tankwalk::model::record::{DeviceId, Observations, Reading, Record, RecordBody};
use tankwalk::numfmt::sig;
use tankwalk::rules::Assessment;
use tankwalk::store::{Entry, Store, StoreError, TimeRange};
use tankwalk::timeline::Assessor;

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
    let room = super::room::resolve_room_optional(global)?;
    let facility = room.as_ref().map(|(_, f)| f);
    let place = input::locate(facility, args.place.tank.as_deref(), args.place.system.as_deref())?;
    let kit_basis = facility.map_or(AmmoniaBasis::N, |f| f.room.kit_basis);
    let operator = args.who.operator()?;
    let taken_at = args.who.taken_at(input::now_local())?;
    let mut reading = Reading::new(place.target.clone());
    reading.measurements = args.reading.measurements(kit_basis);
    reading.observations = args.reading.observations(Observations::default())?;
    reading.note = args.note.clone().filter(|n| !n.trim().is_empty());
    if reading.measurements.is_empty() && reading.observations.is_empty() {
        return Err(bad_input!(
            "nothing to record: give at least one value (--temp-c, --ph, --tan, ...), --observe or --deaths"
        ));
    }
    let record = Record::new(DeviceId(Ulid::nil()), operator, taken_at, RecordBody::Reading(reading));
    let warnings = record.check().map_err(|e| input::refuse(args.reading.option_for(&e), &e))?;
    let warnings = input::warning_lines(&warnings, |f| args.reading.option_for_field(f).to_string());

    save_and_print(global, facility, record, warnings, args.json)
}

/// Saves one new record durably (with this data folder's device), then prints
/// it with its assessment: `record`, `event` and `skip` end here.
pub fn save_and_print(
    global: &GlobalArgs,
    facility: Option<&Facility>,
    mut record: Record,
    warnings: Vec<String>,
    json: bool,
) -> Result<ExitCode> {
    let mut store = super::open_store(global)?;
    record.device = store.device();
    store.append(std::slice::from_ref(&record))?;
    let entry = Entry { original: record, corrections: Vec::new() };
    let assessment = assess_entry(&store, facility, &entry)?;
    drop(store);
    print_saved(&entry, facility, assessment.as_ref(), warnings, json)?;
    Ok(ExitCode::SUCCESS)
}

/// The assessment of an entry's current reading against its stored history,
/// when the room is known and the entry is a reading.
pub fn assess_entry<S: Store>(
    store: &S,
    facility: Option<&Facility>,
    entry: &Entry,
) -> Result<Option<Assessment>, StoreError> {
    let (Some(facility), Some(RecordBody::Reading(reading))) = (facility, entry.current()) else {
        return Ok(None);
    };
    let at = entry.original.taken_at.with_timezone(&chrono::Utc);
    let mut assessor = Assessor::new(store, facility, TimeRange::new(Some(at), Some(at)));
    assessor.assess(&reading.target, reading, at)
}

/// Prints a newly saved record (or correction) and what it means.
pub fn print_saved(
    entry: &Entry,
    facility: Option<&Facility>,
    assessment: Option<&Assessment>,
    warnings: Vec<String>,
    json: bool,
) -> Result<()> {
    let mut out = std::io::stdout().lock();
    let view = entry_view::entry_json(entry, facility, assessment);
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
            writeln!(out, "  {}", entry_view::describe(body, assessment))?;
            if let Some(reading) = body.as_reading() {
                match entry_view::nh3_of(reading, assessment) {
                    Some((fraction, nh3, nh3_n, band)) => writeln!(
                        out,
                        "  NH3 {} mg/L = {} mg/L NH3-N ({} % un-ionized): {} (band edges: {})",
                        sig(nh3, 3),
                        sig(nh3_n, 3),
                        sig(fraction * 100.0, 3),
                        entry_view::band_text(band),
                        if assessment.is_some() {
                            entry_view::SPECIES_EDGES_SOURCE
                        } else {
                            entry_view::BAND_EDGES_SOURCE
                        }
                    )?,
                    None => writeln!(out, "  NH3 not computed: it needs temperature, pH and total ammonia")?,
                }
                if let Some(a) = assessment {
                    super::advice::write_text(&mut out, a)?;
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
