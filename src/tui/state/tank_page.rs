//! One tank's page: its history, charts over 7, 30 or 90 days, its events,
//! and recording a new event.

use chrono::Duration;

use crate::core::band::Band;
use crate::core::sample::derive;
use crate::model::record::{Record, RecordBody};

use super::super::action::Action;
use super::history::Entry;
use super::modal::start_event;
use super::whatif::WhatIfState;
use super::{App, Effect, Screen, StatusKind, round, walk};

/// The chart periods, in days.
pub const RANGES: [u32; 3] = [7, 30, 90];

/// What a chart shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ChartKind {
    /// Total ammonia, mg/L TAN-N.
    TotalAmmonia,
    /// Un-ionized ammonia, mg/L NH3-N, with the band edges.
    Nh3,
    /// pH.
    Ph,
    /// Temperature, in the room's unit.
    Temperature,
}

impl ChartKind {
    /// Every chart, in order.
    pub const ALL: [ChartKind; 4] = [ChartKind::TotalAmmonia, ChartKind::Nh3, ChartKind::Ph, ChartKind::Temperature];

    /// The chart's title.
    pub fn title(self) -> &'static str {
        match self {
            ChartKind::TotalAmmonia => "Total ammonia (mg/L TAN-N)",
            ChartKind::Nh3 => "NH3 (mg/L NH3-N)",
            ChartKind::Ph => "pH",
            ChartKind::Temperature => "Temperature",
        }
    }

    fn next(self) -> ChartKind {
        let i = ChartKind::ALL.iter().position(|c| *c == self).unwrap_or(0);
        ChartKind::ALL[(i + 1) % ChartKind::ALL.len()]
    }
}

/// The page's state.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TankPage {
    /// Index into `facility.tanks`.
    pub tank: usize,
    /// Chart period, days (one of [`RANGES`]).
    pub range_days: u32,
    /// The chart shown when there is room for one only.
    pub chart: ChartKind,
    /// The selected line of the history, 0 = newest.
    pub selected: usize,
}

/// Opens a tank's page over the current screen.
pub fn open(app: &mut App, tank: usize) {
    app.screens.push(Screen::Tank(TankPage { tank, range_days: 30, chart: ChartKind::TotalAmmonia, selected: 0 }));
}

fn page_mut(app: &mut App) -> Option<&mut TankPage> {
    match app.screens.last_mut() {
        Some(Screen::Tank(page)) => Some(page),
        _ => None,
    }
}

/// Opens the what-if panel on a tank's latest water.
pub fn open_whatif_for(app: &mut App, tank: usize) {
    match round::latest_water(&app.facility, &app.history, app.tank(tank)) {
        Some((_, sample)) => {
            let base = walk::whatif_base(app, tank, sample);
            app.whatif = Some(WhatIfState::new(base));
        }
        None => app.say(StatusKind::Info, "No complete reading (temperature, pH, total ammonia) to start from"),
    }
}

/// Keys of the tank page.
pub fn act(app: &mut App, action: Action) -> Vec<Effect> {
    let rows = match app.screen() {
        Screen::Tank(page) => history_rows(app, page.tank).len(),
        _ => 0,
    };
    let Some(page) = page_mut(app) else { return Vec::new() };
    let last = rows.saturating_sub(1);
    match action {
        Action::SelectNext => page.selected = (page.selected + 1).min(last),
        Action::SelectPrevious => page.selected = page.selected.saturating_sub(1),
        Action::SelectFirst => page.selected = 0,
        Action::SelectLast => page.selected = last,
        Action::PageDown => page.selected = (page.selected + 10).min(last),
        Action::PageUp => page.selected = page.selected.saturating_sub(10),
        Action::NextRange => {
            let i = RANGES.iter().position(|r| *r == page.range_days).unwrap_or(0);
            page.range_days = RANGES[(i + 1).min(RANGES.len() - 1)];
        }
        Action::PreviousRange => {
            let i = RANGES.iter().position(|r| *r == page.range_days).unwrap_or(0);
            page.range_days = RANGES[i.saturating_sub(1)];
        }
        Action::NextChart => page.chart = page.chart.next(),
        Action::AddEvent => {
            let tank = page.tank;
            start_event(app, tank);
        }
        Action::OpenWhatIf => {
            let tank = page.tank;
            open_whatif_for(app, tank);
        }
        Action::StartWalk => {
            let tank = page.tank;
            walk::start(app, Some(tank));
        }
        Action::Back => app.pop_screen(),
        _ => {}
    }
    Vec::new()
}

/// The store answered the save of an event.
pub fn event_saved(app: &mut App, tank: usize, result: Result<Vec<Record>, String>) {
    let label = app.tank(tank).id.as_str().to_string();
    app.event = None;
    match result {
        Ok(records) => {
            let what = records
                .iter()
                .find_map(|r| r.body.as_event().map(|e| format!("{} at {}", event_label(&e.kind), e.target)))
                .unwrap_or_default();
            for record in records {
                app.history.add(record);
            }
            app.refresh_statuses();
            app.say(StatusKind::Success, format!("Saved to disk: {what}"));
        }
        Err(why) => app.say(StatusKind::Error, format!("Event for {label} NOT saved: {why}")),
    }
}

/// A short name for an event, with its figures.
pub fn event_label(kind: &crate::model::record::EventKind) -> String {
    use crate::model::record::EventKind as K;
    match kind {
        K::WaterChange { percent, source_ph, dechlorinated, .. } => {
            let ph = source_ph.map(|p| format!(", new water pH {p}")).unwrap_or_default();
            let dechlorinated = if *dechlorinated { ", dechlorinated" } else { "" };
            format!("water change {}%{ph}{dechlorinated}", crate::numfmt::sig(*percent, 2))
        }
        K::FeedingHeld => "feeding held".into(),
        K::FeedingResumed => "feeding resumed".into(),
        K::Medication { class, name } => format!("medication {name} ({class:?})").to_lowercase(),
        K::FilterCleaned { rinsed_in_tap_water } => {
            if *rinsed_in_tap_water {
                "filter cleaned (in tap water)".into()
            } else {
                "filter cleaned".into()
            }
        }
        K::SubstrateReplaced => "substrate replaced".into(),
        K::FishAdded { count } => format!("{count} fish added"),
        K::DeadFishRemoved { count } => format!("{count} dead fish removed"),
        K::SaltAdded { grams } => format!("{} g salt added", crate::numfmt::sig(*grams, 3)),
        K::HeaterSetPoint { temp_c } => format!("heater set to {} °C", crate::numfmt::fixed(*temp_c, 1)),
        K::NitrifyingCultureAdded => "nitrifying culture added".into(),
        K::AmmoniaBinderAdded => "ammonia binder added".into(),
        K::ZeoliteAdded => "zeolite added".into(),
    }
}

/// One line of a tank's history, newest first.
#[derive(Debug, Clone, PartialEq)]
pub struct HistoryRow<'a> {
    /// The entry.
    pub entry: &'a Entry,
    /// True when the entry is the system's (shared water).
    pub system: bool,
    /// NH3-N and band, when the reading has what they need.
    pub nh3: Option<(f64, Band)>,
}

/// The tank's readings and events, newest first.
pub fn history_rows(app: &App, tank_index: usize) -> Vec<HistoryRow<'_>> {
    let tank = app.tank(tank_index);
    let salinity = app.facility.salinity_g_l(tank);
    let edges = app.facility.effective_profile(tank).band_edges;
    app.history
        .of_tank(tank)
        .into_iter()
        .rev()
        .map(|entry| {
            let nh3 = entry.reading().and_then(|r| r.measurements.water_sample(salinity)).map(|s| {
                let d = derive(&s, &edges, app.facility.room.elevation_m);
                (d.toxic.nh3_n_mg_l, d.band)
            });
            let system = matches!(entry.body.target(), Some(crate::model::record::Target::System(_)));
            HistoryRow { entry, system, nh3 }
        })
        .collect()
}

/// A chart's points for a tank over the last `days`: (days before now, value), oldest first.
pub fn series(app: &App, tank_index: usize, chart: ChartKind, days: u32) -> Vec<(f64, f64)> {
    let tank = app.tank(tank_index);
    let salinity = app.facility.salinity_g_l(tank);
    let fahrenheit = app.facility.room.temperature_unit == crate::model::facility::TemperatureUnit::Fahrenheit;
    let since = app.now - Duration::days(i64::from(days));
    app.history
        .readings_of_tank(tank)
        .into_iter()
        .filter(|e| e.taken_at >= since && e.taken_at <= app.now)
        .filter_map(|e| {
            let m = &e.reading()?.measurements;
            let x = (e.taken_at - app.now).num_seconds() as f64 / 86_400.0;
            let y = match chart {
                ChartKind::TotalAmmonia => m.tan_n_mg_l()?,
                ChartKind::Ph => m.ph?,
                ChartKind::Temperature => {
                    let c = m.temp_c()?;
                    if fahrenheit { crate::core::units::celsius_to_fahrenheit(c) } else { c }
                }
                ChartKind::Nh3 => m.water_sample(salinity)?.toxic().nh3_n_mg_l,
            };
            Some((x, y))
        })
        .collect()
}

/// Events of the tank (its own and its system's) over the last `days`, newest first.
pub fn events(app: &App, tank_index: usize, days: u32) -> Vec<&Entry> {
    let since = app.now - Duration::days(i64::from(days));
    app.history
        .of_tank(app.tank(tank_index))
        .into_iter()
        .rev()
        .filter(|e| e.event().is_some() && e.taken_at >= since)
        .collect()
}

/// True when the record is an event.
pub fn is_event(body: &RecordBody) -> bool {
    matches!(body, RecordBody::Event(_))
}
