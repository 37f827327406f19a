//! `tankwalk check-room FILE`: validate a facility file and summarise the room.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use serde::Serialize;

use tankwalk::model::{Checked, Facility, LoadError, Problem, ReadingField, RoundOrder, VolumeUnit};
use tankwalk::numfmt::sig;

use super::bad_input;

#[derive(Debug, Args)]
pub struct CheckRoomArgs {
    /// The facility file (TOML) to check.
    #[arg(value_name = "FILE")]
    file: PathBuf,
    /// Print one JSON object (errors, warnings and the summary) instead of text.
    #[arg(long)]
    json: bool,
}

/// Most systems listed in the text summary before "and N more".
const SYSTEMS_SHOWN: usize = 8;
/// Most round stops listed in the text summary.
const ROUND_SHOWN: usize = 12;

pub fn run(args: &CheckRoomArgs) -> Result<ExitCode> {
    let today = chrono::Local::now().date_naive();
    let outcome = match Facility::load_checked(&args.file, Some(today)) {
        Ok(checked) => Ok(checked),
        Err(LoadError::Invalid(errors)) => Err(errors.errors),
        Err(LoadError::Read { path, source }) => {
            return Err(bad_input!("cannot read facility file {}: {source}", path.display()));
        }
    };
    let mut out = std::io::stdout().lock();
    match (&outcome, args.json) {
        (Ok(checked), false) => write_summary(&mut out, &args.file, checked)?,
        (Err(errors), false) => write_errors(&mut out, &args.file, errors)?,
        (Ok(checked), true) => {
            serde_json::to_writer_pretty(&mut out, &json_summary(&args.file, checked))?;
            writeln!(out)?;
        }
        (Err(errors), true) => {
            let report = JsonReport { file: &args.file, valid: false, errors, warnings: &[], room: None };
            serde_json::to_writer_pretty(&mut out, &report)?;
            writeln!(out)?;
        }
    }
    Ok(if outcome.is_ok() { ExitCode::SUCCESS } else { ExitCode::FAILURE })
}

fn write_errors(w: &mut impl Write, file: &Path, errors: &[Problem]) -> std::io::Result<()> {
    for e in errors {
        writeln!(w, "{e}")?;
    }
    let n = errors.len();
    writeln!(w, "{n} error{}: {} is not a usable facility file", plural(n), file.display())
}

/// A number for reading: at most two decimals, trailing zeros dropped.
fn number(x: f64) -> String {
    let s = format!("{x:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".to_string() } else { s.to_string() }
}

fn plural(n: usize) -> &'static str {
    if n == 1 { "" } else { "s" }
}

/// A volume in the room's unit, rounded for reading.
fn volume(litres: f64, unit: VolumeUnit) -> String {
    let v = unit.from_litres(litres);
    let shown = if v >= 100.0 { format!("{v:.0}") } else { sig(v, 3) };
    format!("{shown} {}", unit.symbol())
}

/// The walk's fields: routine ones in order, then the optional ones.
fn fields_summary(f: &Facility) -> String {
    let room = &f.room;
    let salt = f.tanks.iter().filter(|t| f.salinity_g_l(t) > 0.0).count();
    let all_salt = salt > 0 && salt == f.tanks.len();
    let order = room.field_order(all_salt);
    let names = |fields: &[ReadingField]| fields.iter().map(|f| f.name()).collect::<Vec<_>>().join(", ");
    let optional = if order.optional.is_empty() { "none".to_string() } else { names(&order.optional) };
    let mut text = format!("{}; optional: {optional}", names(&order.routine));
    let mut notes = Vec::new();
    if room.reading_fields.is_none() && room.optional_fields.is_none() {
        notes.push("the default");
    }
    if room.optional_fields.is_none() && salt > 0 && !all_salt && order.optional.contains(&ReadingField::Salinity) {
        notes.push("salinity first in salted water");
    }
    if !notes.is_empty() {
        text.push_str(&format!(" ({})", notes.join("; ")));
    }
    text
}

fn write_summary(w: &mut impl Write, file: &Path, checked: &Checked) -> std::io::Result<()> {
    let f = &checked.facility;
    let room = &f.room;
    let unit = room.volume_unit;
    let on_systems = f.tanks.iter().filter(|t| t.is_on_system()).count();
    let row = |w: &mut dyn Write, label: &str, value: String| writeln!(w, "  {label:<9} {value}");
    writeln!(w, "{}", room.name)?;
    row(w, "file", file.display().to_string())?;
    row(
        w,
        "kit",
        format!(
            "reports total ammonia {}; shows {} and {}; elevation {:.0} m",
            room.kit_basis.unit_label(),
            room.temperature_unit.symbol(),
            unit.symbol(),
            room.elevation_m
        ),
    )?;
    row(w, "due", format!("every {} h after a tank's last reading", room.round_interval_hours))?;
    row(w, "fields", fields_summary(f))?;
    if let Some(s) = &room.source_water {
        let mut parts = Vec::new();
        if let Some(ph) = s.ph {
            parts.push(format!("pH {ph:.2}"));
        }
        if let Some(tan) = s.tan_n_mg_l {
            parts.push(format!("{} {}", number(room.kit_basis.from_tan_n(tan)), room.kit_basis.unit_label()));
        }
        if let Some(t) = s.temp_c {
            parts.push(format!("{} {}", number(room.temperature_unit.from_celsius(t)), room.temperature_unit.symbol()));
        }
        if s.chloramine {
            parts.push("chloramine".into());
        }
        if !s.note.is_empty() {
            parts.push(s.note.clone());
        }
        row(w, "source", parts.join(" · "))?;
    }
    let standalone = f.tanks.len() - on_systems;
    let placement = match (on_systems, standalone) {
        (0, _) => "all standalone".to_string(),
        (_, 0) => format!("all on {} system{}", f.systems.len(), plural(f.systems.len())),
        _ => format!("{on_systems} on {} system{}, {standalone} standalone", f.systems.len(), plural(f.systems.len())),
    };
    row(
        w,
        "stock",
        format!(
            "{} tank{} ({placement}), {} animals, {} species",
            f.tanks.len(),
            plural(f.tanks.len()),
            f.total_stock(),
            f.species.len()
        ),
    )?;
    row(w, "water", format!("{} in all", volume(f.total_water_l(), unit)))?;
    for (i, s) in f.systems.iter().take(SYSTEMS_SHOWN).enumerate() {
        let label = if i == 0 { "systems" } else { "" };
        let salt = if s.salinity_g_l > 0.0 { format!(" {} g/L", number(s.salinity_g_l)) } else { String::new() };
        row(
            w,
            label,
            format!(
                "{:<10} {:>10}  {:<8} {:>3} tanks  {}",
                s.id.as_str(),
                volume(s.volume_l, unit),
                format!("{}{salt}", s.water_type),
                s.tanks.len(),
                s.name
            ),
        )?;
    }
    if f.systems.len() > SYSTEMS_SHOWN {
        row(w, "", format!("and {} more", f.systems.len() - SYSTEMS_SHOWN))?;
    }
    let round = f.round();
    let mut stops: Vec<&str> = round.iter().take(ROUND_SHOWN).map(|t| t.id.as_str()).collect();
    if round.len() > ROUND_SHOWN {
        stops.push("…");
    }
    let how = match &room.round_order {
        RoundOrder::AsListed => "as listed".to_string(),
        RoundOrder::Ids(_) => format!("by {}", room.round_order),
    };
    row(w, "round", format!("{}  ({} tanks, {how})", stops.join(" "), round.len()))?;
    for warning in &checked.warnings {
        writeln!(w, "{warning}")?;
    }
    let n = checked.warnings.len();
    let note = if n == 0 { String::new() } else { format!(" ({n} warning{})", plural(n)) };
    writeln!(w, "ok: {} is a valid facility file{note}", file.display())
}

#[derive(Serialize)]
struct JsonReport<'a> {
    file: &'a Path,
    valid: bool,
    errors: &'a [Problem],
    warnings: &'a [Problem],
    #[serde(skip_serializing_if = "Option::is_none")]
    room: Option<JsonRoom<'a>>,
}

#[derive(Serialize)]
struct JsonRoom<'a> {
    name: &'a str,
    elevation_m: f64,
    kit_basis: &'static str,
    temperature_unit: &'static str,
    volume_unit: &'static str,
    round_interval_hours: u32,
    systems: usize,
    tanks: usize,
    tanks_on_systems: usize,
    standalone_tanks: usize,
    species: usize,
    animals: u64,
    total_water_l: f64,
    round: Vec<&'a str>,
    system_list: Vec<JsonSystem<'a>>,
}

#[derive(Serialize)]
struct JsonSystem<'a> {
    id: &'a str,
    name: &'a str,
    volume_l: f64,
    water_type: &'static str,
    salinity_g_l: f64,
    tanks: Vec<&'a str>,
}

fn json_summary<'a>(file: &'a Path, checked: &'a Checked) -> JsonReport<'a> {
    let f = &checked.facility;
    let on = f.tanks.iter().filter(|t| t.is_on_system()).count();
    JsonReport {
        file,
        valid: true,
        errors: &[],
        warnings: &checked.warnings,
        room: Some(JsonRoom {
            name: &f.room.name,
            elevation_m: f.room.elevation_m,
            kit_basis: f.room.kit_basis.name(),
            temperature_unit: f.room.temperature_unit.symbol(),
            volume_unit: f.room.volume_unit.symbol(),
            round_interval_hours: f.room.round_interval_hours,
            systems: f.systems.len(),
            tanks: f.tanks.len(),
            tanks_on_systems: on,
            standalone_tanks: f.tanks.len() - on,
            species: f.species.len(),
            animals: f.total_stock(),
            total_water_l: f.total_water_l(),
            round: f.round().iter().map(|t| t.id.as_str()).collect(),
            system_list: f
                .systems
                .iter()
                .map(|s| JsonSystem {
                    id: s.id.as_str(),
                    name: &s.name,
                    volume_l: s.volume_l,
                    water_type: s.water_type.name(),
                    salinity_g_l: s.salinity_g_l,
                    tanks: s.tanks.iter().map(|t| t.as_str()).collect(),
                })
                .collect(),
        }),
    }
}
