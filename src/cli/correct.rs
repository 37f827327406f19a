//! `tankwalk correct`: supersede a saved reading or event with corrected
//! values, or withdraw it. The original is kept; history shows the current
//! value and the trail.

use std::process::ExitCode;

use anyhow::Result;
use clap::{Args, ValueEnum};
use tankwalk::core::units::AmmoniaBasis;
use ulid::Ulid;

use tankwalk::model::record::{
    Correction, DeviceId, Field, Measurements, Observations, Record, RecordBody, check_note,
};
use tankwalk::store::{Store, history};

use super::input::{self, EventKindCommand, ReadingArgs, TargetArgs};
use super::{GlobalArgs, bad_input};

/// Values `--clear` can remove from a reading.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ClearField {
    Temperature,
    Ph,
    Tan,
    Nitrite,
    Nitrate,
    Salinity,
    Do,
    Chloride,
    Alkalinity,
    Note,
}

#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct CorrectArgs {
    /// Id of the record to correct (as printed by record, event or log).
    #[arg(value_name = "ID")]
    id: Ulid,
    /// Why (required): kept in the audit trail.
    #[arg(long, value_name = "TEXT", global = true)]
    reason: Option<String>,
    /// Withdraw the record (saved by mistake): it leaves the history, the trail keeps it.
    #[arg(long)]
    withdraw: bool,
    #[command(flatten)]
    place: TargetArgs,
    #[command(flatten)]
    reading: ReadingArgs,
    /// Remove values from a reading: temperature, ph, tan, nitrite, nitrate, salinity, do, chloride, alkalinity, note.
    #[arg(long, value_name = "FIELDS", value_delimiter = ',')]
    clear: Vec<ClearField>,
    /// A new note.
    #[arg(long, value_name = "TEXT", global = true)]
    note: Option<String>,
    /// For an event: its corrected kind and values, given in full.
    #[command(subcommand)]
    kind: Option<EventKindCommand>,
    /// Who corrects it; default: TANKWALK_OPERATOR, else the login name.
    #[arg(long, value_name = "NAME", env = "TANKWALK_OPERATOR", global = true)]
    operator: Option<String>,
    /// Print one JSON object instead of text.
    #[arg(long, global = true)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &CorrectArgs) -> Result<ExitCode> {
    // Everything is parsed and checked before the store is opened.
    let reason = args
        .reason
        .as_deref()
        .map(str::trim)
        .filter(|r| !r.is_empty())
        .ok_or_else(|| bad_input!("--reason: say why the record is corrected (kept in the audit trail)"))?
        .to_string();
    let who = input::WhoWhenArgs { operator: args.operator.clone(), taken_at: None };
    let operator = who.operator()?;
    let made_at = input::now_local();
    let changes_something = !args.reading.is_empty()
        || !args.clear.is_empty()
        || args.note.is_some()
        || args.kind.is_some()
        || args.place.tank.is_some()
        || args.place.system.is_some();
    if args.withdraw && changes_something {
        return Err(bad_input!("--withdraw: give only --reason with it (a withdrawal has no new values)"));
    }
    if !args.withdraw && !changes_something {
        return Err(bad_input!("nothing to correct: give the new values, --clear FIELDS, or --withdraw"));
    }
    if args.kind.is_some() && (!args.reading.is_empty() || !args.clear.is_empty()) {
        return Err(bad_input!("an event kind and reading values cannot be corrected together"));
    }
    let room = super::room::resolve_room_optional(global)?;
    let facility = room.as_ref().map(|(_, f)| f);
    let kit_basis = facility.map_or(AmmoniaBasis::N, |f| f.room.kit_basis);
    let given = args.reading.measurements(kit_basis);
    given.check().map_err(|e| input::refuse(args.reading.option_for(&e), &e))?;
    let given_observations = args.reading.observations(Observations::default())?;
    given_observations.check().map_err(|e| input::refuse("--deaths", &e))?;
    if let Some(note) = &args.note {
        check_note(note).map_err(|e| input::refuse("--note", &e))?;
    }
    let new_kind = args.kind.as_ref().map(EventKindCommand::to_kind).transpose()?;
    let new_place = match (&args.place.tank, &args.place.system) {
        (None, None) => None,
        (tank, system) => Some(input::locate(facility, tank.as_deref(), system.as_deref())?),
    };
    let withdrawal = Correction { supersedes: args.id, replacement: None, reason: reason.clone() };
    let provisional = Record::new(DeviceId(Ulid::nil()), operator.clone(), made_at, RecordBody::Correction(withdrawal));
    provisional.check().map_err(|e| {
        let option = if e.field() == Field::Operator { "--operator" } else { "--reason" };
        input::refuse(option, &e)
    })?;

    let mut store = super::open_store(global)?;
    let Some(entry) = history::entry(&store, args.id)? else {
        return Err(bad_input!("no saved reading or event has the id {}", args.id));
    };
    let replacement = if args.withdraw {
        if entry.is_withdrawn() {
            return Err(bad_input!("{} is already withdrawn", entry.original.id));
        }
        None
    } else {
        let mut body = entry.last_value().clone();
        match &mut body {
            RecordBody::Reading(reading) => {
                if new_kind.is_some() {
                    return Err(bad_input!("{} is a reading: an event kind does not apply", args.id));
                }
                apply_reading_changes(args, kit_basis, &mut reading.measurements);
                reading.observations = args.reading.observations(reading.observations)?;
                if let Some(note) = &args.note {
                    reading.note = Some(note.clone()).filter(|n| !n.trim().is_empty());
                }
                if args.clear.contains(&ClearField::Note) {
                    reading.note = None;
                }
                if let Some(place) = &new_place {
                    reading.target = place.target.clone();
                }
            }
            RecordBody::Event(event) => {
                if !args.reading.is_empty() || !args.clear.is_empty() {
                    return Err(bad_input!(
                        "{} is an event: give its corrected kind and values instead (for example: water-change --percent 25)",
                        args.id
                    ));
                }
                if let Some(kind) = new_kind {
                    event.kind = kind;
                }
                if let Some(note) = &args.note {
                    event.note = Some(note.clone()).filter(|n| !n.trim().is_empty());
                }
                if let Some(place) = &new_place {
                    event.target = place.target.clone();
                }
            }
            RecordBody::Skip(skip) => {
                if !args.reading.is_empty() || !args.clear.is_empty() || new_kind.is_some() {
                    return Err(bad_input!(
                        "{} is a skipped tank: correct its reason with --note, or withdraw it",
                        args.id
                    ));
                }
                if let Some(note) = &args.note {
                    skip.reason.clone_from(note);
                }
                if let Some(place) = &new_place {
                    skip.target = place.target.clone();
                }
            }
            RecordBody::Correction(_) => {
                return Err(bad_input!("{} has no value to correct", args.id));
            }
        }
        if !entry.is_withdrawn() && Some(&body) == entry.current() {
            return Err(bad_input!("the correction changes nothing: {} already says that", entry.original.id));
        }
        Some(Box::new(body))
    };
    let correction = Correction { supersedes: args.id, replacement, reason };
    let record = Record::new(store.device(), operator, made_at, RecordBody::Correction(correction));
    let warnings = record.check().map_err(|e| input::refuse(args.reading.option_for(&e), &e))?;
    let warnings = input::warning_lines(&warnings, |f| args.reading.option_for_field(f).to_string());
    store.append(std::slice::from_ref(&record))?;
    let entry = history::entry(&store, record.id)?.ok_or_else(|| anyhow::anyhow!("the saved correction is missing"))?;
    let assessment = super::record::assess_entry(&store, facility, &entry)?;
    drop(store);
    let _ = new_place;
    super::record::print_saved(&entry, facility, assessment.as_ref(), warnings, args.json)?;
    Ok(ExitCode::SUCCESS)
}

/// Puts the given values over `m` and removes the cleared ones.
fn apply_reading_changes(args: &CorrectArgs, kit_basis: AmmoniaBasis, m: &mut Measurements) {
    let given = args.reading.measurements(kit_basis);
    fn over<T>(slot: &mut Option<T>, value: Option<T>) {
        if value.is_some() {
            *slot = value;
        }
    }
    over(&mut m.temperature, given.temperature);
    over(&mut m.ph, given.ph);
    over(&mut m.total_ammonia, given.total_ammonia);
    over(&mut m.nitrite, given.nitrite);
    over(&mut m.nitrate, given.nitrate);
    over(&mut m.salinity, given.salinity);
    over(&mut m.dissolved_oxygen_mg_l, given.dissolved_oxygen_mg_l);
    over(&mut m.chloride_mg_l, given.chloride_mg_l);
    over(&mut m.alkalinity, given.alkalinity);
    for field in &args.clear {
        match field {
            ClearField::Temperature => m.temperature = None,
            ClearField::Ph => m.ph = None,
            ClearField::Tan => m.total_ammonia = None,
            ClearField::Nitrite => m.nitrite = None,
            ClearField::Nitrate => m.nitrate = None,
            ClearField::Salinity => m.salinity = None,
            ClearField::Do => m.dissolved_oxygen_mg_l = None,
            ClearField::Chloride => m.chloride_mg_l = None,
            ClearField::Alkalinity => m.alkalinity = None,
            ClearField::Note => {}
        }
    }
}
