//! The round report: what a lead, an owner or an aquatic vet needs from the
//! records, for people who have never seen tankwalk.
//!
//! [`gather`] is a pure function from the facility, the history entries
//! (records with their corrections) and a [`Request`]
//! (the round, the period, which tanks) to a [`RoundReport`]: who walked the
//! round and when, tanks done, skipped and not reached, every tank in `act` or
//! `critical` and every latent risk with the actions suggested and the events
//! since, the trend of each water over the period, and the deaths and signs
//! seen. Its serde form is the JSON report; the renderers write it as
//! [`text`], [`markdown`] and [`html`] (one self-contained file with inline
//! SVG charts drawn by [`svg`]). [`from_store`] reads what `gather` needs from a
//! store and [`write_atomically`] saves a rendered report.

mod file;
mod gather;
pub mod html;
pub mod markdown;
pub mod svg;
pub mod text;
pub mod words;

use std::fmt;
use std::str::FromStr;

use chrono::{DateTime, Duration, FixedOffset};
use serde::Serialize;

use crate::core::band::{Band, BandEdges};
use crate::model::facility::{Facility, TemperatureUnit};
use crate::model::record::Target;
use crate::rules::latent::Latent;
use crate::rules::trend::Trend;
use crate::rules::{Action, Biofilter, RulesConfig, Warning};
use crate::store::TimeRange;

pub use file::{from_store, write_atomically};
pub use gather::{check_selection, gather};
pub use words::headline;

/// Days of history the charts cover when no period is given.
pub const DEFAULT_PERIOD_DAYS: i64 = 14;

/// A span of time, both ends included, in the report's offset.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Window {
    /// First instant.
    pub since: DateTime<FixedOffset>,
    /// Last instant.
    pub until: DateTime<FixedOffset>,
}

impl Window {
    /// The `hours` up to `until`.
    pub fn ending(until: DateTime<FixedOffset>, hours: i64) -> Window {
        Window { since: until - Duration::hours(hours), until }
    }

    /// Whether `at` lies in the window.
    pub fn contains(&self, at: &DateTime<FixedOffset>) -> bool {
        self.since <= *at && *at <= self.until
    }
}

/// Which tanks the report covers.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "kind", content = "id", rename_all = "lowercase")]
pub enum Selection {
    /// Every tank of the room.
    Room,
    /// The tanks of one system (shared water).
    System(String),
    /// One tank.
    Tank(String),
}

/// What to report on.
#[derive(Debug, Clone, PartialEq)]
pub struct Request {
    /// The round: readings and skips in this window make it; its end is the
    /// time the report describes (nothing later is looked at).
    pub round: Window,
    /// The period of the charts, the deaths and signs and the events.
    pub period: Window,
    /// Which tanks.
    pub selection: Selection,
    /// When the report was made (shown on it).
    pub generated_at: DateTime<FixedOffset>,
    /// Thresholds of the assessment.
    pub config: RulesConfig,
}

impl Request {
    /// The round that `at` falls in (from [`Room::round_start`](crate::model::Room::round_start):
    /// local midnight, or the block of the day for rooms read more than once a
    /// day) up to `at`, with the [`DEFAULT_PERIOD_DAYS`] before `at` as the period.
    pub fn round_ending(facility: &Facility, at: DateTime<FixedOffset>, selection: Selection) -> Request {
        Request {
            round: Window { since: facility.room.round_start(at), until: at },
            period: Window::ending(at, DEFAULT_PERIOD_DAYS * 24),
            selection,
            generated_at: at,
            config: RulesConfig::default(),
        }
    }

    /// The round that starts at the local midnight of `day` (any instant of
    /// that day, in the offset it is given in): the whole day for a room read
    /// once a day, else the day's first block of the room's interval; with the
    /// [`DEFAULT_PERIOD_DAYS`] up to its end as the period.
    pub fn day(facility: &Facility, day: DateTime<FixedOffset>, selection: Selection) -> Request {
        let start = crate::model::facility::round_start(day, 24);
        let hours = i64::from(facility.room.round_interval_hours.clamp(1, 24));
        let end = start + Duration::hours(hours) - Duration::milliseconds(1);
        Request {
            round: Window { since: start, until: end },
            period: Window::ending(end, DEFAULT_PERIOD_DAYS * 24),
            selection,
            generated_at: end,
            config: RulesConfig::default(),
        }
    }

    /// A period, from `since` to `until`; the round is the one `until` falls
    /// in (not before `since`).
    pub fn period(
        facility: &Facility,
        since: DateTime<FixedOffset>,
        until: DateTime<FixedOffset>,
        selection: Selection,
    ) -> Request {
        Request {
            round: Window { since: facility.room.round_start(until).max(since), until },
            period: Window { since, until },
            selection,
            generated_at: until,
            config: RulesConfig::default(),
        }
    }

    /// The time the report describes: the end of the round or of the period.
    pub fn end(&self) -> DateTime<FixedOffset> {
        self.round.until.max(self.period.until)
    }

    /// The records `gather` needs: from [`crate::timeline::LOOK_BACK`] before
    /// the period or the round (what the assessment looks back at) up to the end.
    pub fn load_range(&self) -> TimeRange {
        let start = self.period.since.min(self.round.since) - crate::timeline::LOOK_BACK;
        TimeRange::new(Some(start.to_utc()), Some(self.end().to_utc()))
    }
}

/// Why a report cannot be made.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    /// The tank is not in the room.
    #[error("no tank '{id}' in this room{}", closest_hint(.closest))]
    UnknownTank {
        /// The id given.
        id: String,
        /// The nearest id in the room, when any.
        closest: Option<String>,
    },
    /// The system is not in the room.
    #[error("no system '{id}' in this room{}", closest_hint(.closest))]
    UnknownSystem {
        /// The id given.
        id: String,
        /// The nearest id in the room, when any.
        closest: Option<String>,
    },
    /// The period ends before it starts.
    #[error("the period ends ({until}) before it starts ({since})")]
    EmptyPeriod {
        /// Its start.
        since: DateTime<FixedOffset>,
        /// Its end.
        until: DateTime<FixedOffset>,
    },
    /// The records could not be read.
    #[error(transparent)]
    Store(#[from] crate::store::StoreError),
}

fn closest_hint(closest: &Option<String>) -> String {
    closest.as_ref().map(|c| format!(" (closest: {c})")).unwrap_or_default()
}

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Format {
    /// Plain text for a terminal or an e-mail.
    Text,
    /// Markdown for a wiki or a chat.
    Markdown,
    /// One self-contained HTML file with charts.
    Html,
    /// The report's data as JSON.
    Json,
}

impl Format {
    /// Every format.
    pub const ALL: [Format; 4] = [Format::Text, Format::Markdown, Format::Html, Format::Json];

    /// Its name on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Format::Text => "text",
            Format::Markdown => "markdown",
            Format::Html => "html",
            Format::Json => "json",
        }
    }

    /// The format a file name's extension asks for.
    pub fn from_extension(path: &std::path::Path) -> Option<Format> {
        match path.extension()?.to_str()?.to_ascii_lowercase().as_str() {
            "txt" | "text" => Some(Format::Text),
            "md" | "markdown" => Some(Format::Markdown),
            "html" | "htm" => Some(Format::Html),
            "json" => Some(Format::Json),
            _ => None,
        }
    }

    /// Renders `report` in this format.
    pub fn render(self, report: &RoundReport) -> String {
        match self {
            Format::Text => text::render(report),
            Format::Markdown => markdown::render(report),
            Format::Html => html::render(report),
            Format::Json => {
                let mut json = serde_json::to_string_pretty(report).unwrap_or_else(|e| {
                    // Every field is plain data; a failure here is a bug, reported in the output.
                    format!("{{\"error\": \"{e}\"}}")
                });
                json.push('\n');
                json
            }
        }
    }
}

impl fmt::Display for Format {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Format {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "text" | "txt" => Ok(Format::Text),
            "markdown" | "md" => Ok(Format::Markdown),
            "html" | "htm" => Ok(Format::Html),
            "json" => Ok(Format::Json),
            other => Err(format!("'{other}' is not a report format (use text, markdown, html or json)")),
        }
    }
}

/// The round report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoundReport {
    /// The room's name.
    pub room: String,
    /// A heading for the report.
    pub title: String,
    /// Which tanks it covers.
    pub selection: Selection,
    /// When it was made.
    pub generated_at: DateTime<FixedOffset>,
    /// The period of the charts, events, deaths and signs.
    pub period: Window,
    /// How temperatures and volumes are shown.
    pub units: Units,
    /// The figures at a glance.
    pub counts: Counts,
    /// The round.
    pub round: RoundSummary,
    /// Waters in `act` or `critical`, or with a latent risk, most urgent first.
    pub attention: Vec<Concern>,
    /// Each water (a system, or a standalone tank) with its latest reading and
    /// its series over the period.
    pub waters: Vec<Water>,
    /// Standalone tanks of the selection with no chart (nothing of concern):
    /// each can be charted with a report on that tank.
    pub not_charted: Vec<String>,
    /// Deaths and signs seen over the period, oldest first.
    pub sightings: Vec<Sighting>,
    /// Guidance, not veterinary advice.
    pub caution: &'static str,
    /// How pH readings are taken.
    pub ph_convention: &'static str,
}

/// Display units of the room.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Units {
    /// `°C` or `°F`.
    pub temperature: &'static str,
    /// `L` or `US gal`.
    pub volume: &'static str,
    /// The temperature unit itself.
    #[serde(skip)]
    pub temperature_unit: TemperatureUnit,
}

/// Numbers at a glance.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize)]
pub struct Counts {
    /// Tanks covered.
    pub tanks: usize,
    /// Tanks checked in the round.
    pub done: usize,
    /// Tanks skipped, with a reason.
    pub skipped: usize,
    /// Tanks not reached.
    pub not_reached: usize,
    /// Tanks whose latest reading (within the period) is critical.
    pub critical: usize,
    /// ... act.
    pub act: usize,
    /// ... watch.
    pub watch: usize,
    /// ... clear.
    pub clear: usize,
    /// Tanks whose latest reading has no NH3 figure (temperature, pH or ammonia missing).
    pub no_band: usize,
    /// Tanks on waters whose ammonia would move to a worse band if pH rose.
    pub latent_risks: usize,
    /// Tanks on waters that need attention.
    pub attention: usize,
    /// Deaths recorded over the period.
    pub deaths: u32,
    /// Readings over the period.
    pub readings: usize,
    /// Events over the period.
    pub events: usize,
}

/// The round: who, when, and what became of each tank.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoundSummary {
    /// The window whose records make the round.
    pub window: Window,
    /// Hours between rounds in this room.
    pub interval_hours: u32,
    /// The people whose readings and skips make the round.
    pub walked_by: Vec<Walker>,
    /// The first record of the round.
    pub started: Option<DateTime<FixedOffset>>,
    /// The last record of the round.
    pub finished: Option<DateTime<FixedOffset>>,
    /// Every tank of the selection, in round order.
    pub tanks: Vec<RoundTank>,
}

/// One person who walked (part of) the round.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Walker {
    /// Their name, as recorded.
    pub operator: String,
    /// Readings they took.
    pub readings: usize,
    /// Tanks or systems they skipped.
    pub skips: usize,
    /// Their first record.
    pub first: DateTime<FixedOffset>,
    /// Their last record.
    pub last: DateTime<FixedOffset>,
}

/// What became of a tank on the round.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum TankStatus {
    /// Read (itself, or its system).
    Done,
    /// Passed over, with a reason.
    Skipped,
    /// Neither.
    NotReached,
}

impl TankStatus {
    /// Its name in text.
    pub fn name(self) -> &'static str {
        match self {
            TankStatus::Done => "done",
            TankStatus::Skipped => "skipped",
            TankStatus::NotReached => "not reached",
        }
    }
}

/// One tank on the round.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RoundTank {
    /// Its label.
    pub tank: String,
    /// Its system, when it shares water.
    pub system: Option<String>,
    /// Done, skipped or not reached.
    pub status: TankStatus,
    /// When it was read or skipped.
    pub at: Option<DateTime<FixedOffset>>,
    /// Who read or skipped it.
    pub by: Option<String>,
    /// True when the reading (or skip) was of its system.
    pub via_system: bool,
    /// Why it was skipped.
    pub reason: Option<String>,
    /// Its band this round (with signs in the fish counted).
    pub band: Option<Band>,
    /// Its band if pH rose.
    pub latent_band: Option<Band>,
    /// Signs or deaths seen this round.
    pub fish_signs: bool,
}

/// Why a tank needs attention.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Reason {
    /// Its band is critical.
    Critical,
    /// Its band is act.
    Act,
    /// A pH rise would move it to a worse band.
    Latent,
}

/// A water (a system, or a tank) that needs attention.
///
/// A system's reading is judged for each of its tanks; the most severe
/// judgement stands for the system (as everywhere in tankwalk), and its tanks
/// are listed by their own band.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Concern {
    /// The system, or the tank.
    pub target: Target,
    /// The tanks of the selection on it.
    pub tanks: Vec<String>,
    /// The tank whose judgement stands for the water: on a system, the first
    /// of the most severe (its species' band edges; heater and salt steps suit every species on the water).
    pub judged_for: String,
    /// Those tanks by their own band (against their own species), worst first.
    pub tank_bands: Vec<TankBands>,
    /// The species in it (names).
    pub species: Vec<String>,
    /// Why they are listed.
    pub reasons: Vec<Reason>,
    /// The reading assessed.
    pub reading: ReadingView,
    /// The band, with signs in the fish counted.
    pub band: Option<Band>,
    /// The band of the NH3 alone.
    pub measured_band: Option<Band>,
    /// What raised the band (signs, deaths).
    pub raised_by: Vec<String>,
    /// NH3 and band if pH rose.
    pub latent: Option<Latent>,
    /// Trend of NH3-N over the last readings.
    pub trend: Option<Trend>,
    /// The biofilter's state.
    pub biofilter: Biofilter,
    /// Suggested actions, most urgent first.
    pub actions: Vec<Action>,
    /// What not to do.
    pub warnings: Vec<Warning>,
    /// Events on the tanks or their system since the reading.
    pub events_since: Vec<EventView>,
}

/// Tanks that share a band.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TankBands {
    /// The band (none without an NH3 figure).
    pub band: Option<Band>,
    /// The tanks.
    pub tanks: Vec<String>,
}

/// A reading as the report shows it (canonical units; temperature in °C).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReadingView {
    /// When it was taken.
    pub at: DateTime<FixedOffset>,
    /// Who took it.
    pub by: String,
    /// Where the water was sampled.
    pub target: Target,
    /// Temperature, °C.
    pub temp_c: Option<f64>,
    /// pH.
    pub ph: Option<f64>,
    /// Total ammonia, mg TAN-N/L.
    pub tan_n_mg_l: Option<f64>,
    /// Un-ionized ammonia, mg NH3-N/L.
    pub nh3_n_mg_l: Option<f64>,
    /// Un-ionized ammonia, mg NH3/L.
    pub nh3_mg_l: Option<f64>,
    /// Nitrite, mg NO2-N/L.
    pub nitrite_n_mg_l: Option<f64>,
    /// Nitrate, mg NO3-N/L.
    pub nitrate_n_mg_l: Option<f64>,
    /// Salinity, g/L (measured).
    pub salinity_ppt: Option<f64>,
    /// Dissolved oxygen, mg/L.
    pub do_mg_l: Option<f64>,
    /// Signs seen in the fish.
    pub signs: Vec<&'static str>,
    /// Deaths.
    pub deaths: u32,
    /// The note.
    pub note: Option<String>,
}

/// An event as the report shows it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EventView {
    /// Its number on the charts of its water, when charted.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub number: Option<usize>,
    /// When.
    pub at: DateTime<FixedOffset>,
    /// Who.
    pub by: String,
    /// Where.
    pub target: Target,
    /// Its kind (`water-change`, `feeding-held`...).
    pub kind: &'static str,
    /// What was done, in words.
    pub text: String,
    /// The note.
    pub note: Option<String>,
}

/// Deaths or signs seen at one reading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Sighting {
    /// When.
    pub at: DateTime<FixedOffset>,
    /// Who saw them.
    pub by: String,
    /// Where.
    pub target: Target,
    /// Signs seen.
    pub signs: Vec<&'static str>,
    /// Deaths.
    pub deaths: u32,
    /// The note.
    pub note: Option<String>,
}

/// A range of values (a species' kept range), in display units.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Range {
    /// Lowest.
    pub min: f64,
    /// Highest.
    pub max: f64,
}

/// What a chart shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Measure {
    /// Total ammonia, mg TAN-N/L.
    TotalAmmonia,
    /// Un-ionized (toxic) ammonia, mg NH3-N/L.
    Nh3,
    /// pH.
    Ph,
    /// Temperature, in the room's unit.
    Temperature,
    /// Nitrite, mg NO2-N/L.
    Nitrite,
}

impl Measure {
    /// Every measure, in the order charts are drawn.
    pub const ALL: [Measure; 5] =
        [Measure::Nh3, Measure::TotalAmmonia, Measure::Ph, Measure::Temperature, Measure::Nitrite];

    /// Its name in headings.
    pub fn title(self) -> &'static str {
        match self {
            Measure::TotalAmmonia => "Total ammonia",
            Measure::Nh3 => "Toxic ammonia (NH3)",
            Measure::Ph => "pH",
            Measure::Temperature => "Temperature",
            Measure::Nitrite => "Nitrite",
        }
    }

    /// A short name for tables.
    pub fn short(self) -> &'static str {
        match self {
            Measure::TotalAmmonia => "TAN-N",
            Measure::Nh3 => "NH3-N",
            Measure::Ph => "pH",
            Measure::Temperature => "Temp",
            Measure::Nitrite => "NO2-N",
        }
    }
}

/// One water (a system, or a tank) over the period.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Water {
    /// The system or tank.
    pub target: Target,
    /// Its name (a system's name, a tank's species).
    pub name: String,
    /// The tanks that share it.
    pub tanks: Vec<String>,
    /// The species in it (names).
    pub species: Vec<String>,
    /// The band edges drawn on its NH3 chart (those of its most demanding species), mg NH3-N/L.
    pub band_edges: BandEdges,
    /// The pH every species in it is kept at.
    pub ph_range: Option<Range>,
    /// The temperature every species in it is kept at, in the room's unit.
    pub temperature_range: Option<Range>,
    /// Its newest reading with the chemistry, up to the end of the report.
    pub latest: Option<ReadingView>,
    /// The band of that reading against [`Water::band_edges`].
    pub band: Option<Band>,
    /// Trend of NH3-N over its last readings.
    pub trend: Option<Trend>,
    /// Readings over the period.
    pub readings: usize,
    /// One series a measure, over the period.
    pub series: Vec<Series>,
    /// Events on it over the period, numbered as on its charts.
    pub events: Vec<EventView>,
}

impl Water {
    /// The series of a measure.
    pub fn series_of(&self, measure: Measure) -> Option<&Series> {
        self.series.iter().find(|s| s.measure == measure)
    }
}

/// Readings of one measure over the period.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Series {
    /// What.
    pub measure: Measure,
    /// Its unit.
    pub unit: &'static str,
    /// The readings, oldest first.
    pub points: Vec<SeriesPoint>,
}

/// One reading of a series.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SeriesPoint {
    /// When.
    pub at: DateTime<FixedOffset>,
    /// The value, in the series' unit.
    pub value: f64,
    /// For NH3: the band of the value.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub band: Option<Band>,
}
