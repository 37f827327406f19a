//! How records and their history are shown: one JSON object per entry (the
//! same for `record`, `event`, `correct` and `log`) and one text line per entry.

use chrono::{DateTime, FixedOffset};
use serde::Serialize;
use ulid::Ulid;

use tankwalk::core::band::{Band, BandEdges};
use tankwalk::core::sample::{self, Derived};
use tankwalk::model::record::{DeviceId, EventKind, Measurements, Reading, Record, RecordBody};
use tankwalk::model::{Facility, TemperatureUnit};
use tankwalk::numfmt::sig;
use tankwalk::rules::latent::Latent;
use tankwalk::rules::trend::Trend;
use tankwalk::rules::{Action, Assessment, Biofilter, Warning};
use tankwalk::store::Entry;

use super::input;

/// Where the band edges come from when no room is known, as printed.
pub const BAND_EDGES_SOURCE: &str = "tankwalk defaults (no room: give --room FILE for species edges)";

/// Where the band edges come from when the room is known.
pub const SPECIES_EDGES_SOURCE: &str = "species";

/// NH3 and band of a reading without a room: default band edges, fresh water
/// unless salinity was measured, sea-level oxygen figures.
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
    /// Versions of this record that arrived from another laptop with the same id
    /// but other content (kept aside, never applied; see `tankwalk doctor`).
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub conflicts: Vec<Record>,
    /// The assessment, when the room is known: latent band, trend, biofilter, actions.
    #[serde(flatten, skip_serializing_if = "Option::is_none")]
    pub advice: Option<Advice>,
    /// The measurements exactly as entered (value and unit or kit basis).
    pub measurements: Option<Measurements>,
    /// When corrected: every record of the chain, the original first, exactly as stored.
    pub trail: Vec<Record>,
}

/// The assessment's fields in an entry's JSON (band and the NH3 figures are
/// the entry's own fields).
#[derive(Debug, Clone, Serialize)]
pub struct Advice {
    /// Band of the NH3 alone, before raising it for signs in the fish.
    pub measured_band: Option<Band>,
    /// Why the band was raised.
    pub raised_by: Vec<String>,
    /// Band if pH rose to the source water's pH (or by 0.5).
    pub latent_band: Option<Band>,
    /// The NH3 and pH behind `latent_band`.
    pub latent: Option<Latent>,
    /// Trend of NH3-N over the last readings.
    pub trend: Option<Trend>,
    /// Trend of total ammonia over the last readings.
    pub tan_trend: Option<Trend>,
    /// The biofilter's state.
    pub biofilter: Biofilter,
    /// Suggested actions, most urgent first, with quantities and reasons.
    pub actions: Vec<Action>,
    /// What not to do.
    pub do_not: Vec<Warning>,
    /// Guidance, not veterinary advice.
    pub caution: &'static str,
}

impl Advice {
    /// The advice part of an assessment.
    pub fn of(a: &Assessment) -> Advice {
        Advice {
            measured_band: a.measured_band,
            raised_by: a.raised_by.clone(),
            latent_band: a.latent.map(|l| l.band),
            latent: a.latent,
            trend: a.trend,
            tan_trend: a.tan_trend,
            biofilter: a.biofilter.clone(),
            actions: a.actions.clone(),
            do_not: a.warnings.clone(),
            caution: a.caution,
        }
    }
}

/// NH3 figures of a reading: the assessment's (the tank's salinity and the
/// room's elevation) when there is one, else [`derived`].
pub fn nh3_of(reading: &Reading, assessment: Option<&Assessment>) -> Option<(f64, f64, f64, Option<Band>)> {
    match assessment.and_then(|a| a.figures.map(|f| (f, a.band))) {
        Some((f, band)) => Some((f.nh3_fraction, f.nh3_mg_l, f.nh3_n_mg_l, band)),
        None => derived(reading).map(|d| (d.toxic.fraction, d.toxic.nh3_mg_l, d.toxic.nh3_n_mg_l, Some(d.band))),
    }
}

/// The JSON view of `entry`; `room` gives a tank's system, `assessment` the
/// advice (when the room is known).
pub fn entry_json(entry: &Entry, room: Option<&Facility>, assessment: Option<&Assessment>) -> EntryJson {
    let body = entry.current().unwrap_or_else(|| entry.last_value());
    let target = body.target().or(entry.original.body.target());
    let tank = target.and_then(|t| t.tank()).map(str::to_string);
    let system = target
        .and_then(|t| t.system())
        .map(str::to_string)
        .or_else(|| tank.as_deref().and_then(|t| input::system_of(room, t)));
    let reading = body.as_reading();
    let m = reading.map(|r| &r.measurements);
    let d = reading.and_then(|r| nh3_of(r, assessment));
    let edges_source = if assessment.is_some() { SPECIES_EDGES_SOURCE } else { BAND_EDGES_SOURCE };
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
        nh3_fraction: d.map(|d| d.0),
        nh3_mg_l: d.map(|d| d.1),
        nh3_n_mg_l: d.map(|d| d.2),
        band: d.and_then(|d| d.3),
        band_edges_source: d.map(|_| edges_source),
        signs: reading.map(|r| r.observations.signs().into_iter().map(|s| s.name()).collect()).unwrap_or_default(),
        deaths: reading.map(|r| r.observations.deaths),
        event: body.as_event().map(|e| e.kind.clone()),
        note: body.note().map(str::to_string),
        conflicts: Vec::new(),
        advice: assessment.map(Advice::of),
        measurements: m.cloned(),
        trail: if entry.is_corrected() { entry.trail().cloned().collect() } else { Vec::new() },
    }
}

/// A time as printed: the local wall time it was taken at.
pub fn when(at: &DateTime<FixedOffset>) -> String {
    at.format("%Y-%m-%d %H:%M").to_string()
}

/// What a reading says, briefly: `25.0 °C  pH 8.00  TAN-N 1.00  NH3-N 0.0537  gasping, 2 dead`.
pub fn describe_reading(reading: &Reading, assessment: Option<&Assessment>) -> String {
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
    if let Some((_, _, nh3_n, _)) = nh3_of(reading, assessment) {
        parts.push(format!("NH3-N {}", sig(nh3_n, 3)));
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

/// What an event says, in words (temperatures in °C: the log has no room units).
pub fn describe_event(kind: &EventKind) -> String {
    tankwalk::report::words::event(kind, TemperatureUnit::Celsius)
}

/// What a record body says, in words.
pub fn describe(body: &RecordBody, assessment: Option<&Assessment>) -> String {
    match body {
        RecordBody::Reading(r) => describe_reading(r, assessment),
        RecordBody::Event(e) => describe_event(&e.kind),
        RecordBody::Correction(c) => match c.replacement.as_deref() {
            Some(b) => describe(b, assessment),
            None => "withdrawn".into(),
        },
        RecordBody::Skip(s) => format!("skipped: {}", s.reason),
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
        assert_eq!(describe_event(&wc), "water change 30 % (new water pH 7.4, 24 °C, not dechlorinated)");
        assert_eq!(
            describe_event(&EventKind::Medication { class: MedicationClass::Antibiotic, name: "kanamycin".into() }),
            "medication: kanamycin (antibiotic)"
        );
        assert_eq!(describe_event(&EventKind::SaltAdded { grams: 12.5 }), "12.5 g salt added");
        assert_eq!(describe_event(&EventKind::NitrifyingCultureAdded), "nitrifying culture added");
    }
}
