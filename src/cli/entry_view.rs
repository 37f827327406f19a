//! How records and their history are shown: one JSON object per entry (the
//! same for `record`, `event`, `correct` and `log`) and one text line per entry.

use std::path::Path;

use chrono::{DateTime, FixedOffset};
use serde::Serialize;
use ulid::Ulid;

use tankwalk::core::band::{Band, BandEdges};
use tankwalk::core::sample::{self, Derived};
use tankwalk::model::record::{DeviceId, EventKind, Measurements, Reading, Record, RecordBody};
use tankwalk::numfmt::sig;
use tankwalk::store::Entry;

use super::input;

/// Where the band edges come from, as printed.
pub const BAND_EDGES_SOURCE: &str = "tankwalk defaults";

/// NH3 and band of a reading, when it has temperature, pH and total ammonia.
///
/// Uses the default band edges and sea-level oxygen figures until the room
/// gives each tank's species edges and the room's elevation.
pub fn derived(reading: &Reading) -> Option<Derived> {
    reading.water_sample().map(|s| sample::derive(&s, &BandEdges::DEFAULT, 0.0))
}

/// One entry of the history as printed by `--json`.
#[derive(Debug, Serialize)]
pub struct EntryJson {
    /// The original record's id: what `record` printed, what `correct` takes.
    pub id: Ulid,
    /// The id of the record holding the current value (a correction's when corrected).
    pub current_id: Ulid,
    /// The id the newest correction supersedes; null when not corrected.
    pub supersedes: Option<Ulid>,
    pub corrected: bool,
    pub withdrawn: bool,
    /// `reading` or `event`.
    pub kind: &'static str,
    pub tank: Option<String>,
    pub system: Option<String>,
    pub taken_at: DateTime<FixedOffset>,
    pub operator: String,
    pub device: DeviceId,
    pub temp_c: Option<f64>,
    pub ph: Option<f64>,
    pub tan_n_mg_l: Option<f64>,
    pub nitrite_n_mg_l: Option<f64>,
    pub nitrate_n_mg_l: Option<f64>,
    pub salinity_ppt: Option<f64>,
    pub do_mg_l: Option<f64>,
    pub chloride_mg_l: Option<f64>,
    pub alkalinity_mg_l_caco3: Option<f64>,
    pub nh3_fraction: Option<f64>,
    pub nh3_mg_l: Option<f64>,
    pub nh3_n_mg_l: Option<f64>,
    pub band: Option<Band>,
    pub band_edges_source: Option<&'static str>,
    pub signs: Vec<&'static str>,
    pub deaths: Option<u32>,
    pub event: Option<EventKind>,
    pub note: Option<String>,
    /// The measurements exactly as entered (value and unit or kit basis).
    pub measurements: Option<Measurements>,
    /// When corrected: every record of the chain, the original first, exactly as stored.
    pub trail: Vec<Record>,
}

/// The JSON view of `entry`; `room` gives a tank's system.
pub fn entry_json(entry: &Entry, room: Option<&Path>) -> EntryJson {
    let body = entry.current().unwrap_or_else(|| entry.last_value());
    let target = body.target().or(entry.original.body.target());
    let tank = target.and_then(|t| t.tank()).map(str::to_string);
    let system = target
        .and_then(|t| t.system())
        .map(str::to_string)
        .or_else(|| tank.as_deref().and_then(|t| input::system_of(room, t)));
    let reading = body.as_reading();
    let m = reading.map(|r| &r.measurements);
    let d = reading.and_then(derived);
    EntryJson {
        id: entry.original.id,
        current_id: entry.current_id(),
        supersedes: entry.supersedes(),
        corrected: entry.is_corrected(),
        withdrawn: entry.is_withdrawn(),
        kind: entry.original.body.kind_name(),
        tank,
        system,
        taken_at: entry.original.taken_at,
        operator: entry.original.operator.clone(),
        device: entry.original.device,
        temp_c: m.and_then(Measurements::temp_c),
        ph: m.and_then(|m| m.ph),
        tan_n_mg_l: m.and_then(Measurements::tan_n_mg_l),
        nitrite_n_mg_l: m.and_then(Measurements::nitrite_n_mg_l),
        nitrate_n_mg_l: m.and_then(Measurements::nitrate_n_mg_l),
        salinity_ppt: m.and_then(Measurements::salinity_ppt),
        do_mg_l: m.and_then(|m| m.dissolved_oxygen_mg_l),
        chloride_mg_l: m.and_then(|m| m.chloride_mg_l),
        alkalinity_mg_l_caco3: m.and_then(Measurements::alkalinity_mg_l_caco3),
        nh3_fraction: d.map(|d| d.toxic.fraction),
        nh3_mg_l: d.map(|d| d.toxic.nh3_mg_l),
        nh3_n_mg_l: d.map(|d| d.toxic.nh3_n_mg_l),
        band: d.map(|d| d.band),
        band_edges_source: d.map(|_| BAND_EDGES_SOURCE),
        signs: reading.map(|r| r.observations.signs().into_iter().map(|s| s.name()).collect()).unwrap_or_default(),
        deaths: reading.map(|r| r.observations.deaths),
        event: body.as_event().map(|e| e.kind.clone()),
        note: match body {
            RecordBody::Reading(r) => r.note.clone(),
            RecordBody::Event(e) => e.note.clone(),
            RecordBody::Correction(_) => None,
        },
        measurements: m.cloned(),
        trail: if entry.is_corrected() { entry.trail().cloned().collect() } else { Vec::new() },
    }
}

/// A time as printed: the local wall time it was taken at.
pub fn when(at: &DateTime<FixedOffset>) -> String {
    at.format("%Y-%m-%d %H:%M").to_string()
}

/// What a reading says, briefly: `25.0 °C  pH 8.00  TAN-N 1.00  NH3-N 0.0537  gasping, 2 dead`.
pub fn describe_reading(reading: &Reading) -> String {
    let m = &reading.measurements;
    let mut parts = Vec::new();
    if let Some(t) = m.temp_c() {
        parts.push(format!("{:.1} °C", t));
    }
    if let Some(ph) = m.ph {
        parts.push(format!("pH {ph:.2}"));
    }
    if let Some(tan) = m.tan_n_mg_l() {
        parts.push(format!("TAN-N {}", sig(tan, 3)));
    }
    if let Some(d) = derived(reading) {
        parts.push(format!("NH3-N {}", sig(d.toxic.nh3_n_mg_l, 3)));
    }
    if let Some(v) = m.nitrite_n_mg_l() {
        parts.push(format!("NO2-N {}", sig(v, 3)));
    }
    if let Some(v) = m.nitrate_n_mg_l() {
        parts.push(format!("NO3-N {}", sig(v, 3)));
    }
    if let Some(v) = m.salinity_ppt() {
        parts.push(format!("S {} g/L", sig(v, 3)));
    }
    if let Some(v) = m.dissolved_oxygen_mg_l {
        parts.push(format!("DO {}", sig(v, 3)));
    }
    if let Some(v) = m.chloride_mg_l {
        parts.push(format!("Cl {}", sig(v, 3)));
    }
    if let Some(v) = m.alkalinity_mg_l_caco3() {
        parts.push(format!("alk {} CaCO3", sig(v, 3)));
    }
    let signs: Vec<&str> = reading.observations.signs().into_iter().map(|s| s.name()).collect();
    if !signs.is_empty() {
        parts.push(signs.join(", "));
    }
    if reading.observations.deaths > 0 {
        parts.push(format!("{} dead", reading.observations.deaths));
    }
    parts.join("  ")
}

/// A number with at most `decimals` decimals and no trailing zeros: `30`, `12.5`.
fn plain(x: f64, decimals: usize) -> String {
    let s = format!("{x:.decimals$}");
    if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
}

/// What an event says, in words.
pub fn describe_event(kind: &EventKind) -> String {
    match kind {
        EventKind::WaterChange { percent, source_ph, source_tan_n_mg_l, source_temp_c, dechlorinated } => {
            let mut source = Vec::new();
            if let Some(ph) = source_ph {
                source.push(format!("pH {ph:.2}"));
            }
            if let Some(tan) = source_tan_n_mg_l {
                source.push(format!("TAN-N {}", sig(*tan, 3)));
            }
            if let Some(t) = source_temp_c {
                source.push(format!("{t:.1} °C"));
            }
            source.push(if *dechlorinated { "dechlorinated".into() } else { "NOT dechlorinated".into() });
            format!("water change {} % (source {})", plain(*percent, 1), source.join(", "))
        }
        EventKind::Medication { class, name } => format!("medication: {name} ({})", class.name()),
        EventKind::FilterCleaned { rinsed_in_tap_water } => {
            format!(
                "filter cleaned ({})",
                if *rinsed_in_tap_water { "rinsed in tap water" } else { "not in tap water" }
            )
        }
        EventKind::FishAdded { count } => format!("{count} fish added"),
        EventKind::DeadFishRemoved { count } => format!("{count} dead fish removed"),
        EventKind::SaltAdded { grams } => format!("{} g salt added", plain(*grams, 1)),
        EventKind::HeaterSetPoint { temp_c } => format!("heater set to {temp_c:.1} °C"),
        other => other.name().replace('-', " "),
    }
}

/// What a record body says, in words.
pub fn describe(body: &RecordBody) -> String {
    match body {
        RecordBody::Reading(r) => describe_reading(r),
        RecordBody::Event(e) => describe_event(&e.kind),
        RecordBody::Correction(c) => match c.replacement.as_deref() {
            Some(b) => describe(b),
            None => "withdrawn".into(),
        },
    }
}

/// The band as printed: glyph and name.
pub fn band_text(band: Option<Band>) -> String {
    band.map(|b| format!("{} {}", b.glyph(), b.name())).unwrap_or_default()
}

/// The lines of the audit trail of a corrected entry, indented.
pub fn trail_lines(entry: &Entry) -> Vec<String> {
    entry
        .corrections
        .iter()
        .filter_map(|c| {
            let correction = c.body.as_correction()?;
            let what = match correction.replacement.as_deref() {
                None => "withdrew".to_string(),
                Some(_) if correction.supersedes == entry.original.id => "corrected".to_string(),
                Some(_) => format!("corrected {}", correction.supersedes),
            };
            Some(format!(
                "    {what} {} by {} ({}): {}",
                when(&c.taken_at),
                c.operator,
                c.id,
                correction.reason.replace('\n', " ")
            ))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use tankwalk::model::record::MedicationClass;

    #[test]
    fn events_read_as_words() {
        let wc = EventKind::WaterChange {
            percent: 30.0,
            source_ph: Some(7.4),
            source_tan_n_mg_l: None,
            source_temp_c: Some(24.0),
            dechlorinated: false,
        };
        assert_eq!(describe_event(&wc), "water change 30 % (source pH 7.40, 24.0 °C, NOT dechlorinated)");
        assert_eq!(
            describe_event(&EventKind::Medication { class: MedicationClass::Antibiotic, name: "kanamycin".into() }),
            "medication: kanamycin (antibiotic)"
        );
        assert_eq!(describe_event(&EventKind::SaltAdded { grams: 12.5 }), "12.5 g salt added");
        assert_eq!(describe_event(&EventKind::NitrifyingCultureAdded), "nitrifying culture added");
        assert_eq!(plain(100.0, 1), "100");
        assert_eq!(plain(0.26, 1), "0.3");
    }
}
