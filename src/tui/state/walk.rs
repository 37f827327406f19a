//! The walk: one tank at a time in round order, the last reading beside the
//! entry fields, the verdict as the person types, one key to save and move on.
//!
//! On a shared system the water is tested once: the first tank of the system
//! walked this round saves a system reading, and the next tanks show it as
//! carried over, so only the fish need looking at. A tank already done shows
//! what was saved; changing it saves a correction, never an overwrite.

use std::collections::BTreeSet;

use chrono::{DateTime, FixedOffset};
use ulid::Ulid;

use crate::core::band::Band;
use crate::core::sample::WaterSample;
use crate::core::units::{self, AmmoniaBasis, NitrogenIonBasis};
use crate::model::facility::{Facility, ReadingField, Tank, TemperatureUnit};
use crate::model::record::{
    Alkalinity, AlkalinityUnit, Correction, Measurements, NitrogenReading, Observations, Reading, Record, RecordBody,
    Sign, Skip, Target, Temperature, TotalAmmonia,
};
use crate::rules::assess::Assessment;
use crate::rules::trend::{Trend, TrendWindow, trend};

use super::super::action::Action;
use super::field::{FieldKind, NumberField, Provenance, format_value};
use super::modal::{Confirm, ConfirmFor, Modal, PickFor, PromptFor, prefilled};
use super::round::{self, Due};
use super::verdict;
use super::whatif::{WhatIfBase, WhatIfState};
use super::{App, Effect, SaveFor, Screen, StatusKind, summary, tank_page, utc};
use crate::core::salinity::SalinityReading;

/// The reasons offered when a tank is skipped; the last one asks for text.
pub const SKIP_REASONS: [&str; 5] = [
    "tank empty or being set up",
    "fish being moved or treated",
    "cannot reach it",
    "out of test reagent",
    "other (type the reason)",
];

/// Where to go when the person leaves a tank.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Leave {
    /// The next tank of the round.
    NextTank,
    /// The previous tank of the round.
    PreviousTank,
    /// Skip this tank (asks for the reason).
    Skip,
}

/// The entry fields of a tank, in the order they are walked: the room's
/// routine fields, then its optional ones (see [`Room::field_order`]).
///
/// [`Room::field_order`]: crate::model::facility::Room::field_order
pub fn walk_fields(facility: &Facility, tank: &Tank) -> Vec<FieldKind> {
    let order = facility.field_order(tank);
    order.routine.iter().chain(&order.optional).map(|&f| field_kind(facility, f)).collect()
}

/// How many of a tank's entry fields (the first ones) are read every round;
/// the rest are optional.
pub fn routine_fields(facility: &Facility, tank: &Tank) -> usize {
    facility.field_order(tank).routine.len()
}

/// The entry field for a reading field, in the room's units.
fn field_kind(facility: &Facility, field: ReadingField) -> FieldKind {
    match field {
        ReadingField::Temperature => match facility.room.temperature_unit {
            TemperatureUnit::Celsius => FieldKind::TemperatureC,
            TemperatureUnit::Fahrenheit => FieldKind::TemperatureF,
        },
        ReadingField::Ph => FieldKind::Ph,
        ReadingField::TotalAmmonia => FieldKind::TotalAmmonia(facility.room.kit_basis),
        ReadingField::Nitrite => FieldKind::Nitrite,
        ReadingField::Nitrate => FieldKind::Nitrate,
        ReadingField::Salinity => FieldKind::Salinity,
        ReadingField::DissolvedOxygen => FieldKind::DissolvedOxygen,
        ReadingField::Chloride => FieldKind::Chloride,
        ReadingField::Alkalinity => FieldKind::Alkalinity,
    }
}

/// A change in NH3-N slower than this, mg/L a day, reads as steady (common practice, no source).
const STEADY_NH3_N_PER_DAY: f64 = 0.002;

/// The value a reading holds for a field, in the field's unit.
pub fn value_for(kind: FieldKind, m: &Measurements) -> Option<f64> {
    match kind {
        FieldKind::TemperatureC => m.temp_c(),
        FieldKind::TemperatureF => m.temp_c().map(units::celsius_to_fahrenheit),
        FieldKind::Ph => m.ph,
        FieldKind::TotalAmmonia(basis) => m.tan_n_mg_l().map(|n| basis.from_tan_n(n)),
        FieldKind::Nitrite => m.nitrite_n_mg_l(),
        FieldKind::Nitrate => m.nitrate_n_mg_l(),
        FieldKind::Salinity => m.salinity_ppt(),
        FieldKind::DissolvedOxygen => m.dissolved_oxygen_mg_l,
        FieldKind::Chloride => m.chloride_mg_l,
        FieldKind::Alkalinity => m.alkalinity_mg_l_caco3(),
        FieldKind::WaterChangePercent | FieldKind::Count | FieldKind::Grams => None,
    }
}

/// Puts one field's value into a set of measurements, as entered.
fn put(m: &mut Measurements, kind: FieldKind, value: f64) {
    match kind {
        FieldKind::TemperatureC => m.temperature = Some(Temperature::celsius(value)),
        FieldKind::TemperatureF => m.temperature = Some(Temperature::fahrenheit(value)),
        FieldKind::Ph => m.ph = Some(value),
        FieldKind::TotalAmmonia(basis) => m.total_ammonia = Some(TotalAmmonia { value, basis }),
        FieldKind::Nitrite => m.nitrite = Some(NitrogenReading { value, basis: NitrogenIonBasis::N }),
        FieldKind::Nitrate => m.nitrate = Some(NitrogenReading { value, basis: NitrogenIonBasis::N }),
        FieldKind::Salinity => m.salinity = Some(SalinityReading::Ppt { value }),
        FieldKind::DissolvedOxygen => m.dissolved_oxygen_mg_l = Some(value),
        FieldKind::Chloride => m.chloride_mg_l = Some(value),
        FieldKind::Alkalinity => m.alkalinity = Some(Alkalinity { value, unit: AlkalinityUnit::MgLCaco3 }),
        FieldKind::WaterChangePercent | FieldKind::Count | FieldKind::Grams => {}
    }
}

/// Copies from `stored` the measurements no field of the entry shows, so a
/// correction made on the walk keeps what was recorded without it (on the
/// command line, or before the room changed its fields).
fn keep_unshown(m: &mut Measurements, stored: &Measurements, fields: &[NumberField]) {
    let shown = |is: fn(FieldKind) -> bool| fields.iter().any(|f| is(f.kind));
    if !shown(|k| matches!(k, FieldKind::TemperatureC | FieldKind::TemperatureF)) {
        m.temperature = stored.temperature;
    }
    if !shown(|k| k == FieldKind::Ph) {
        m.ph = stored.ph;
    }
    if !shown(|k| matches!(k, FieldKind::TotalAmmonia(_))) {
        m.total_ammonia = stored.total_ammonia;
    }
    if !shown(|k| k == FieldKind::Nitrite) {
        m.nitrite = stored.nitrite;
    }
    if !shown(|k| k == FieldKind::Nitrate) {
        m.nitrate = stored.nitrate;
    }
    if !shown(|k| k == FieldKind::Salinity) {
        m.salinity = stored.salinity;
    }
    if !shown(|k| k == FieldKind::DissolvedOxygen) {
        m.dissolved_oxygen_mg_l = stored.dissolved_oxygen_mg_l;
    }
    if !shown(|k| k == FieldKind::Chloride) {
        m.chloride_mg_l = stored.chloride_mg_l;
    }
    if !shown(|k| k == FieldKind::Alkalinity) {
        m.alkalinity = stored.alkalinity;
    }
}

/// The last values read before this round, field by field.
#[derive(Debug, Clone, PartialEq)]
pub struct Previous {
    /// When the newest of them was read.
    pub at: DateTime<FixedOffset>,
    /// Per field (same order as the entry's fields), the newest value read.
    pub values: Vec<Option<f64>>,
    /// NH3-N of the newest complete water, mg/L, and its band.
    pub nh3: Option<(f64, Band)>,
}

/// The system's reading this round, shown in a tank's fields.
#[derive(Debug, Clone, PartialEq)]
pub struct Carried {
    /// The newest record of that reading's chain.
    pub head: Ulid,
    /// When it was taken.
    pub at: DateTime<FixedOffset>,
    /// The system's id.
    pub system: String,
    /// The reading.
    pub reading: Reading,
}

/// What the fields and observations held when the tank was opened.
#[derive(Debug, Clone, PartialEq)]
pub struct Snapshot {
    texts: Vec<(String, Provenance)>,
    observations: Observations,
    note: Option<String>,
}

/// The entry for one tank.
#[derive(Debug, Clone, PartialEq)]
pub struct TankEntry {
    /// Index into `facility.tanks`.
    pub tank: usize,
    /// The fields, in walking order.
    pub fields: Vec<NumberField>,
    /// How many of the fields, the first ones, are read every round (the rest are optional).
    pub routine: usize,
    /// The field with the cursor.
    pub focus: usize,
    /// What is seen of the fish.
    pub observations: Observations,
    /// A note.
    pub note: Option<String>,
    /// The last reading before this round.
    pub previous: Option<Previous>,
    /// The system's reading this round, when the tank is on a tested system.
    pub carried: Option<Carried>,
    /// The tank's own reading this round (newest record of its chain), when done.
    pub own: Option<(Ulid, DateTime<FixedOffset>)>,
    /// NH3 over earlier readings, before anything is typed.
    pub history_trend: Option<Trend>,
    /// The assessment of what the fields hold now.
    pub verdict: Assessment,
    initial: Snapshot,
}

impl TankEntry {
    /// True when something was typed, kept, toggled or written since the tank was opened.
    pub fn is_dirty(&self) -> bool {
        self.observations != self.initial.observations
            || self.note != self.initial.note
            || self.fields.iter().zip(&self.initial.texts).any(|(f, (t, p))| f.text != *t || f.provenance != *p)
    }

    fn field_changed(&self, i: usize) -> bool {
        let (text, provenance) = &self.initial.texts[i];
        self.fields[i].text != *text || self.fields[i].provenance != *provenance
    }

    fn was_carried(&self, i: usize) -> bool {
        matches!(self.initial.texts[i].1, Provenance::Carried(_))
    }

    /// Everything the entry holds, as one reading of the tank.
    pub fn reading(&self, app: &App) -> Reading {
        let mut reading = Reading::new(round::tank_target(app.tank(self.tank)));
        for field in &self.fields {
            if let Some(v) = field.value() {
                put(&mut reading.measurements, field.kind, v);
            }
        }
        reading.observations = self.observations;
        reading.note = self.note.clone();
        reading
    }

    /// The water the fields describe, when temperature, pH and total ammonia are there.
    pub fn sample(&self, default_salinity: f64) -> Option<WaterSample> {
        let mut m = Measurements::default();
        for field in &self.fields {
            if let Some(v) = field.value() {
                put(&mut m, field.kind, v);
            }
        }
        m.water_sample(default_salinity)
    }
}

/// The walk: where it is in the round, the entry, and a save waiting for an answer.
#[derive(Debug, Clone, PartialEq)]
pub struct WalkState {
    /// Position in `App::round_order`.
    pub pos: usize,
    /// The entry of the tank there.
    pub entry: TankEntry,
    /// Answers collected for a save that needs them (system or own, correction reason).
    pub save_draft: Option<SaveDraft>,
    /// Tanks shown in this walk: a tank done only by its system's reading is
    /// still visited once (its fish need looking at), then passed over.
    pub visited: BTreeSet<usize>,
}

/// Answers a save needed from the person.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct SaveDraft {
    /// For changed values carried from the system: true corrects the system's reading.
    pub correct_system: Option<bool>,
    /// Why a saved reading is corrected.
    pub reason: Option<String>,
}

/// Opens the entry of a tank.
pub fn load_entry(app: &App, tank_index: usize) -> TankEntry {
    let tank = app.tank(tank_index);
    let kinds = walk_fields(&app.facility, tank);
    let routine = routine_fields(&app.facility, tank);
    let own = round::own_this_round(&app.history, tank, app.round_start);
    let system = round::system_this_round(&app.history, tank, app.round_start);
    let own_reading = own.and_then(|e| e.reading());
    let carried = system.and_then(|e| {
        Some(Carried {
            head: e.head,
            at: e.taken_at,
            system: tank.system.as_ref()?.as_str().to_string(),
            reading: e.reading()?.clone(),
        })
    });
    let fields: Vec<NumberField> = kinds
        .iter()
        .map(|&kind| {
            if let Some(v) = own_reading.and_then(|r| value_for(kind, &r.measurements)) {
                NumberField::with_value(kind, v, Provenance::Saved)
            } else if let Some(c) = carried.as_ref()
                && let Some(v) = value_for(kind, &c.reading.measurements)
            {
                let from = format!("system {} {}", c.system, c.at.format("%H:%M"));
                NumberField::with_value(kind, v, Provenance::Carried(from))
            } else {
                NumberField::new(kind)
            }
        })
        .collect();
    let observations = own_reading.map(|r| r.observations).unwrap_or_default();
    let note = own_reading.and_then(|r| r.note.clone());
    // Earlier readings, newest last, without this round's.
    let earlier: Vec<_> =
        app.history.readings_of_tank(tank).into_iter().filter(|e| e.taken_at < app.round_start).collect();
    let salinity = app.facility.salinity_g_l(tank);
    let edges = app.facility.effective_profile(tank).band_edges;
    let previous = earlier.last().map(|last| {
        let values = kinds
            .iter()
            .map(|&k| earlier.iter().rev().find_map(|e| e.reading().and_then(|r| value_for(k, &r.measurements))))
            .collect();
        let nh3 = earlier.iter().rev().find_map(|e| e.reading().and_then(|r| r.measurements.water_sample(salinity)));
        let nh3 = nh3.map(|s| {
            let d = crate::core::sample::derive(&s, &edges, app.facility.room.elevation_m);
            (d.toxic.nh3_n_mg_l, d.band)
        });
        Previous { at: last.taken_at, values, nh3 }
    });
    let nh3_history: Vec<_> = earlier
        .iter()
        .filter_map(|e| {
            let s = e.reading().and_then(|r| r.measurements.water_sample(salinity))?;
            let nh3 = crate::core::toxic_ammonia(&crate::core::AmmoniaInputs {
                tan_n_mg_l: s.tan_n_mg_l,
                ph: s.ph,
                temp_c: s.temp_c,
                salinity_ppt: s.salinity_ppt,
            });
            Some((utc(e.taken_at), nh3.nh3_n_mg_l))
        })
        .collect();
    let history_trend = trend(&nh3_history, TrendWindow::default(), STEADY_NH3_N_PER_DAY);
    let initial = Snapshot {
        texts: fields.iter().map(|f| (f.text.clone(), f.provenance.clone())).collect(),
        observations,
        note: note.clone(),
    };
    // Start on the first field still empty, so a carried system goes straight to the fish.
    let focus = fields.iter().position(NumberField::is_empty).unwrap_or(0);
    let mut entry = TankEntry {
        tank: tank_index,
        fields,
        routine,
        focus,
        observations,
        note,
        previous,
        carried,
        own: own.map(|e| (e.head, e.taken_at)),
        history_trend,
        verdict: verdict::assess_reading(
            app,
            tank_index,
            &Reading::new(round::tank_target(tank)),
            app.now,
            app.round_start,
        ),
        initial,
    };
    entry.verdict = compute_verdict(app, &entry);
    entry
}

fn compute_verdict(app: &App, entry: &TankEntry) -> Assessment {
    let reading = entry.reading(app);
    // A tank already done this round is judged as of its reading, against what came before this round.
    let at = entry.own.map_or(app.now, |(_, at)| at);
    verdict::assess_reading(app, entry.tank, &reading, at, app.round_start)
}

fn refresh_verdict(app: &mut App) {
    let Some(verdict) = app.walk.as_ref().map(|w| compute_verdict(app, &w.entry)) else { return };
    if let Some(walk) = &mut app.walk {
        walk.entry.verdict = verdict;
    }
}

/// Starts (or resumes) the walk; `at` opens that tank, else the first the round still wants.
pub fn start(app: &mut App, at: Option<usize>) {
    let pos = match at.and_then(|t| app.round_position(t)) {
        Some(pos) => Some(pos),
        None if app.walk.is_some() => app.walk.as_ref().map(|w| w.pos),
        None => app.next_wanted(0),
    };
    let pos = match pos {
        Some(pos) => pos,
        None => {
            app.say(
                StatusKind::Info,
                "Every tank is done, skipped or not due this round: the walk starts at the first",
            );
            0
        }
    };
    if app.round_order.is_empty() {
        app.say(StatusKind::Error, "The room has no tanks to walk");
        return;
    }
    let resume = app.walk.as_ref().is_some_and(|w| w.pos == pos);
    if !resume {
        go_to(app, pos);
    }
    app.screens.retain(|s| matches!(s, Screen::Board));
    app.screens.push(Screen::Walk);
}

fn go_to(app: &mut App, pos: usize) {
    let tank = app.round_order[pos];
    let entry = load_entry(app, tank);
    let mut visited = app.walk.take().map(|w| w.visited).unwrap_or_default();
    visited.insert(tank);
    app.walk = Some(WalkState { pos, entry, save_draft: None, visited });
}

/// The next tank the walk stops at after position `from`: one the round
/// still wants, or one done only by its system's reading and not yet shown;
/// then, from the start, any the round still wants.
pub fn next_stop(app: &App, from: usize) -> Option<usize> {
    let visited = app.walk.as_ref().map(|w| &w.visited);
    let carried_unseen = |t: usize| {
        app.statuses[t].due == Due::Done
            && round::own_this_round(&app.history, app.tank(t), app.round_start).is_none()
            && !visited.is_some_and(|v| v.contains(&t))
    };
    (from..app.round_order.len())
        .find(|&pos| {
            let t = app.round_order[pos];
            app.statuses[t].due.wanted() || carried_unseen(t)
        })
        .or_else(|| app.next_wanted(0))
}

/// Moves on after a tank is saved or skipped: the next tank the round wants,
/// or the summary when none is left.
fn advance(app: &mut App) {
    let Some(pos) = app.walk.as_ref().map(|w| w.pos) else { return };
    match next_stop(app, pos + 1) {
        Some(next) => go_to(app, next),
        None => {
            // Stay on the last tank, and show the round's end.
            go_to(app, pos);
            summary::open(app);
            let counts = app.round_counts();
            app.say(
                StatusKind::Success,
                format!("{ROUND_COMPLETE}: {} done, {} skipped. Your readings are saved.", counts.done, counts.skipped),
            );
        }
    }
}

/// How the status line announces the end of the round.
const ROUND_COMPLETE: &str = "Round complete";

/// Types into the focused field.
pub fn type_char(app: &mut App, c: char) {
    if let Some(walk) = &mut app.walk {
        let focus = walk.entry.focus;
        walk.entry.fields[focus].type_char(c);
    }
    refresh_verdict(app);
}

fn toggle(app: &mut App, sign: Sign) {
    if let Some(walk) = &mut app.walk {
        let seen = !walk.entry.observations.has(sign);
        walk.entry.observations.set(sign, seen);
    }
    refresh_verdict(app);
}

/// Keys of the walk.
pub fn act(app: &mut App, action: Action) -> Vec<Effect> {
    let Some(walk) = &mut app.walk else {
        app.screens.truncate(1);
        return Vec::new();
    };
    let entry = &mut walk.entry;
    let last = entry.fields.len() - 1;
    match action {
        Action::NextField => {
            if entry.focus == last {
                app.say(StatusKind::Info, "That was the last field: save to go on");
            } else {
                entry.focus += 1;
            }
        }
        Action::PreviousField => entry.focus = entry.focus.saturating_sub(1),
        Action::KeepPrevious => {
            let focus = entry.focus;
            let value = entry.previous.as_ref().and_then(|p| p.values[focus]);
            match value {
                Some(v) => {
                    let kind = entry.fields[focus].kind;
                    entry.fields[focus].set_text(format_value(v), Provenance::Previous);
                    entry.focus = (focus + 1).min(last);
                    let _ = kind;
                    refresh_verdict(app);
                }
                None => {
                    let label = entry.fields[focus].kind.label();
                    app.say(StatusKind::Info, format!("No earlier {label} to keep for this tank"));
                }
            }
        }
        Action::Erase => {
            let focus = entry.focus;
            entry.fields[focus].erase();
            refresh_verdict(app);
        }
        Action::ClearField => {
            let focus = entry.focus;
            entry.fields[focus].clear();
            refresh_verdict(app);
        }
        Action::SaveAndNext => {
            walk.save_draft = Some(SaveDraft::default());
            return save(app);
        }
        Action::SkipTank => {
            if app.statuses[entry.tank].due == Due::Done {
                app.say(StatusKind::Info, "This tank is done this round; there is nothing to skip");
            } else {
                return leave_asking(app, Leave::Skip);
            }
        }
        Action::NextTank => return leave_asking(app, Leave::NextTank),
        Action::PreviousTank => return leave_asking(app, Leave::PreviousTank),
        Action::ToggleGasping => toggle(app, Sign::Gasping),
        Action::ToggleHyperactive => toggle(app, Sign::Hyperactive),
        Action::ToggleNervous => toggle(app, Sign::NervousSigns),
        Action::ToggleCloudyEyes => toggle(app, Sign::CloudyEyes),
        Action::ToggleMucus => toggle(app, Sign::ExcessMucus),
        Action::SetDeaths => {
            let deaths = f64::from(entry.observations.deaths);
            app.modal = Some(Modal::number(
                "Dead fish found in this tank",
                prefilled(FieldKind::Count, deaths),
                PromptFor::Deaths,
                true,
            ));
        }
        Action::EditNote => {
            let note = entry.note.clone().unwrap_or_default();
            app.modal = Some(Modal::text("Note with this reading", note, PromptFor::Note, true));
        }
        Action::OpenWhatIf => open_whatif(app),
        Action::OpenTank => {
            let tank = entry.tank;
            tank_page::open(app, tank);
        }
        Action::ShowSummary => summary::open(app),
        Action::Back => app.back_to_board(),
        _ => {}
    }
    Vec::new()
}

fn leave_asking(app: &mut App, leave: Leave) -> Vec<Effect> {
    let Some(walk) = &app.walk else { return Vec::new() };
    if walk.entry.is_dirty() {
        let label = app.tank(walk.entry.tank).id.as_str().to_string();
        let what = match leave {
            Leave::Skip => "Skip",
            Leave::NextTank | Leave::PreviousTank => "Leave",
        };
        app.modal = Some(Modal::Confirm(Confirm {
            question: format!("{what} {label} and lose what you typed? It is not saved."),
            then: ConfirmFor::Leave(leave),
        }));
        return Vec::new();
    }
    self::leave(app, leave)
}

/// Leaves the tank (the person agreed to lose an unsaved entry, or there was none).
pub fn leave(app: &mut App, leave: Leave) -> Vec<Effect> {
    let Some(pos) = app.walk.as_ref().map(|w| w.pos) else { return Vec::new() };
    match leave {
        Leave::NextTank if pos + 1 < app.round_order.len() => go_to(app, pos + 1),
        Leave::NextTank => {
            go_to(app, pos);
            app.say(StatusKind::Info, "This is the last tank of the round");
        }
        Leave::PreviousTank if pos > 0 => go_to(app, pos - 1),
        Leave::PreviousTank => {
            go_to(app, pos);
            app.say(StatusKind::Info, "This is the first tank of the round");
        }
        Leave::Skip => {
            let label = app.tank(app.round_order[pos]).id.as_str().to_string();
            app.modal = Some(Modal::pick(
                format!("Why is {label} skipped?"),
                SKIP_REASONS.iter().map(ToString::to_string).collect(),
                PickFor::SkipReason,
            ));
        }
    }
    Vec::new()
}

/// A reason was picked from the skip list.
pub fn skip_reason_picked(app: &mut App, index: usize) -> Vec<Effect> {
    if index + 1 == SKIP_REASONS.len() {
        app.modal = Some(Modal::text("Why is the tank skipped?", "", PromptFor::SkipReason, false));
        return Vec::new();
    }
    skip(app, SKIP_REASONS.get(index).copied().unwrap_or("skipped").to_string())
}

/// Skips the walk's tank with `reason`: a skip record, saved like a reading,
/// so a restart mid-round and the round report both know it.
pub fn skip(app: &mut App, reason: String) -> Vec<Effect> {
    let Some(tank) = app.walk.as_ref().map(|w| w.entry.tank) else { return Vec::new() };
    let target = round::tank_target(app.tank(tank));
    let body = RecordBody::Skip(Skip { target, reason });
    if let Err(err) = body.check() {
        app.say(StatusKind::Error, format!("Not skipped: {err}"));
        return Vec::new();
    }
    let record = app.new_record(body);
    app.saving = Some(SaveFor::Skip { tank });
    vec![Effect::Save(vec![record])]
}

/// The store answered the save of a skip.
pub fn skip_saved(app: &mut App, tank: usize, result: Result<Vec<Record>, String>) {
    let label = app.tank(tank).id.as_str().to_string();
    match result {
        Ok(records) => {
            let reason = records
                .iter()
                .find_map(|r| match &r.body {
                    RecordBody::Skip(s) => Some(s.reason.clone()),
                    _ => None,
                })
                .unwrap_or_default();
            for record in records {
                app.history.add(record);
            }
            app.refresh_statuses();
            app.status = None;
            advance(app);
            if app.status.is_none() {
                app.say(StatusKind::Info, format!("Skipped {label}: {reason}"));
            }
        }
        Err(why) => app.say(StatusKind::Error, format!("Skip of {label} NOT saved: {why}")),
    }
}

/// The note prompt was answered.
pub fn set_note(app: &mut App, text: String) -> Vec<Effect> {
    if let Some(walk) = &mut app.walk {
        walk.entry.note = (!text.is_empty()).then_some(text);
    }
    Vec::new()
}

/// The deaths prompt was answered.
pub fn set_deaths(app: &mut App, deaths: f64) -> Vec<Effect> {
    if let Some(walk) = &mut app.walk {
        walk.entry.observations.deaths = deaths.max(0.0) as u32;
    }
    refresh_verdict(app);
    Vec::new()
}

/// The system-or-tank question of a save was answered.
pub fn correct_which_picked(app: &mut App, system: bool) -> Vec<Effect> {
    if let Some(draft) = app.walk.as_mut().and_then(|w| w.save_draft.as_mut()) {
        draft.correct_system = Some(system);
    }
    save(app)
}

/// The correction reason was given.
pub fn correction_reason(app: &mut App, reason: String) -> Vec<Effect> {
    if let Some(draft) = app.walk.as_mut().and_then(|w| w.save_draft.as_mut()) {
        draft.reason = Some(reason);
    }
    save(app)
}

/// What a save will write, or what it still needs to know.
#[derive(Debug, Clone, PartialEq)]
pub enum SavePlan {
    /// Nothing changed on a tank that is done: move on.
    Unchanged,
    /// These records, in one batch.
    Records(Vec<RecordBody>),
    /// Ask whether changed carried values correct the system's reading.
    AskWhich,
    /// Ask why a saved reading is corrected.
    AskReason,
}

/// A record to write, before the correction reason is known.
enum Staged {
    /// A new reading.
    New(RecordBody),
    /// A correction of the record with this head (`None` withdraws it).
    Correct(Ulid, Option<RecordBody>),
}

/// Works out what saving the entry writes. Pure: the walk's answers so far
/// come in `draft`.
pub fn plan_save(app: &App, entry: &TankEntry, draft: &SaveDraft) -> Result<SavePlan, String> {
    let tank = app.tank(entry.tank);
    if let Some((i, reason)) = entry.fields.iter().enumerate().find_map(|(i, f)| f.error().map(|r| (i, r))) {
        return Err(format!(
            "{}: {reason}. Fix it or empty the field; nothing was saved.",
            entry.fields[i].kind.label()
        ));
    }
    if !entry.is_dirty() {
        return if entry.own.is_some() || entry.carried.is_some() {
            Ok(SavePlan::Unchanged)
        } else {
            Err("Nothing to save yet: type the readings, or skip the tank with a reason".to_string())
        };
    }
    let changed_carried: Vec<usize> =
        (0..entry.fields.len()).filter(|&i| entry.was_carried(i) && entry.field_changed(i)).collect();
    if !changed_carried.is_empty() && draft.correct_system.is_none() {
        return Ok(SavePlan::AskWhich);
    }
    let correct_system = draft.correct_system == Some(true);
    let on_system = tank.system.is_some();
    // A first reading of a system's water this round is the system's.
    let new_system_reading = on_system && entry.carried.is_none() && entry.own.is_none();
    let mut system_m = Measurements::default();
    let mut own_m = Measurements::default();
    for (i, field) in entry.fields.iter().enumerate() {
        let Some(value) = field.value() else { continue };
        let to_system =
            if entry.was_carried(i) { !entry.field_changed(i) || correct_system } else { new_system_reading };
        if to_system {
            put(&mut system_m, field.kind, value);
        } else {
            put(&mut own_m, field.kind, value);
        }
    }
    let mut corrections_needed = false;
    let mut bodies = Vec::new();
    // The system's reading: new, or corrected when one of its values changed.
    if let Some(carried) = &entry.carried {
        if correct_system && !changed_carried.is_empty() {
            corrections_needed = true;
            let mut replacement = carried.reading.clone();
            keep_unshown(&mut system_m, &carried.reading.measurements, &entry.fields);
            replacement.measurements = system_m;
            bodies.push(Staged::Correct(carried.head, Some(RecordBody::Reading(replacement))));
        }
    } else if new_system_reading && !system_m.is_empty() {
        let system = tank.system.as_ref().map(|s| s.as_str().to_string()).unwrap_or_default();
        let mut reading = Reading::new(Target::System(system));
        reading.measurements = system_m;
        bodies.push(Staged::New(RecordBody::Reading(reading)));
    }
    // The tank's own reading.
    let mut own = Reading::new(round::tank_target(tank));
    own.measurements = own_m;
    own.observations = entry.observations;
    own.note = entry.note.clone();
    let own_changed = entry.observations != entry.initial.observations
        || entry.note != entry.initial.note
        || (0..entry.fields.len()).any(|i| entry.field_changed(i) && !(entry.was_carried(i) && correct_system));
    match entry.own {
        Some((head, _)) if own_changed => {
            corrections_needed = true;
            let stored = round::own_this_round(&app.history, tank, app.round_start)
                .filter(|e| e.head == head)
                .and_then(|e| e.reading());
            if let Some(stored) = stored {
                keep_unshown(&mut own.measurements, &stored.measurements, &entry.fields);
            }
            // Everything of the tank's own reading taken away withdraws it.
            let replacement = (!own.is_empty()).then_some(RecordBody::Reading(own));
            bodies.push(Staged::Correct(head, replacement));
        }
        Some(_) => {}
        None if !own.is_empty() => bodies.push(Staged::New(RecordBody::Reading(own))),
        None => {}
    }
    if corrections_needed && draft.reason.is_none() {
        return Ok(SavePlan::AskReason);
    }
    let reason = draft.reason.clone().unwrap_or_default();
    let records: Vec<RecordBody> = bodies
        .into_iter()
        .map(|staged| match staged {
            Staged::New(body) => body,
            Staged::Correct(supersedes, replacement) => RecordBody::Correction(Correction {
                supersedes,
                replacement: replacement.map(Box::new),
                reason: reason.clone(),
            }),
        })
        .collect();
    if records.is_empty() {
        return Ok(SavePlan::Unchanged);
    }
    Ok(SavePlan::Records(records))
}

/// Saves the entry: asks what it must, then hands the records to the store.
pub fn save(app: &mut App) -> Vec<Effect> {
    let Some(walk) = &app.walk else { return Vec::new() };
    let draft = walk.save_draft.clone().unwrap_or_default();
    let tank = walk.entry.tank;
    let label = app.tank(tank).id.as_str().to_string();
    match plan_save(app, &walk.entry, &draft) {
        Err(why) => {
            if let Some(walk) = &mut app.walk {
                if let Some(i) = walk.entry.fields.iter().position(|f| f.error().is_some()) {
                    walk.entry.focus = i;
                }
                walk.save_draft = None;
            }
            app.say(StatusKind::Error, why);
            Vec::new()
        }
        Ok(SavePlan::Unchanged) => {
            if let Some(walk) = &mut app.walk {
                walk.save_draft = None;
            }
            app.refresh_statuses();
            app.status = None;
            advance(app);
            if app.status.is_none() {
                app.say(StatusKind::Info, format!("{label}: nothing changed"));
            }
            Vec::new()
        }
        Ok(SavePlan::AskWhich) => {
            let system = walk.entry.carried.as_ref().map(|c| c.system.clone()).unwrap_or_default();
            let n = app.facility.system(&system).map_or(0, |s| s.tanks.len());
            app.modal = Some(Modal::pick(
                "You changed values carried over from the system's reading. Which is right?",
                vec![
                    format!("correct system {system}'s reading (all {n} tanks share its water)"),
                    format!("keep the system's; these are {label}'s own"),
                ],
                PickFor::CorrectWhich,
            ));
            Vec::new()
        }
        Ok(SavePlan::AskReason) => {
            app.modal = Some(Modal::text(
                format!("Why is {label}'s saved reading corrected?"),
                "re-read at the tank",
                PromptFor::CorrectionReason,
                false,
            ));
            Vec::new()
        }
        Ok(SavePlan::Records(bodies)) => {
            if let Err(err) = bodies.iter().try_for_each(|b| b.check().map(|_| ())) {
                app.say(StatusKind::Error, format!("Not saved: {err}"));
                return Vec::new();
            }
            let records: Vec<Record> = bodies.into_iter().map(|b| app.new_record(b)).collect();
            app.saving = Some(SaveFor::Entry { tank });
            vec![Effect::Save(records)]
        }
    }
}

/// The store answered a save of the walk's entry.
pub fn saved(app: &mut App, tank: usize, result: Result<Vec<Record>, String>) {
    let label = app.tank(tank).id.as_str().to_string();
    match result {
        Ok(records) => {
            let corrected = records.iter().any(|r| matches!(r.body, RecordBody::Correction(_)));
            for record in records {
                app.history.add(record);
            }
            if let Some(walk) = &mut app.walk {
                walk.save_draft = None;
            }
            app.refresh_statuses();
            let status = &app.statuses[tank];
            let band = status.band.map(|b| format!(" ({} {})", b.glyph(), b.name())).unwrap_or_default();
            let what = if corrected { "Correction saved" } else { "Saved" };
            let message = format!("{what}: {label} is on disk{band}");
            app.status = None;
            // The end of the round, when this was the last tank, says more.
            advance(app);
            if app.status.is_none() {
                app.say(StatusKind::Success, message);
            }
        }
        Err(why) => {
            if let Some(walk) = &mut app.walk {
                walk.save_draft = None;
            }
            app.say(StatusKind::Error, format!("NOT saved: {why}. The entry is still here: save again."));
        }
    }
}

fn open_whatif(app: &mut App) {
    let Some(walk) = &app.walk else { return };
    let tank = app.tank(walk.entry.tank);
    let sample = walk
        .entry
        .sample(app.facility.salinity_g_l(tank))
        .or_else(|| round::latest_water(&app.facility, &app.history, tank).map(|(_, s)| s));
    match sample {
        Some(sample) => {
            let base = whatif_base(app, walk.entry.tank, sample);
            app.whatif = Some(WhatIfState::new(base));
        }
        None => app.say(StatusKind::Info, "Type temperature, pH and total ammonia first: the what-if starts from them"),
    }
}

/// The what-if panel's starting point for a tank and its water.
pub fn whatif_base(app: &App, tank_index: usize, sample: WaterSample) -> WhatIfBase {
    let tank = app.tank(tank_index);
    let profile = app.facility.effective_profile(tank);
    let (volume_l, what) = app.water_volume(tank);
    WhatIfBase {
        label: format!("{} ({what})", tank.id.as_str()),
        sample,
        edges: profile.band_edges,
        source: app.source_water(),
        volume_l,
        elevation_m: app.facility.room.elevation_m,
        fahrenheit: app.facility.room.temperature_unit == TemperatureUnit::Fahrenheit,
        temp_range_c: profile.temp_c.map(|b| (b.min, b.max)),
        salt_tolerance_g_l: profile.salt_tolerance_g_l,
    }
}

/// The ammonia basis a tank's total ammonia field is typed in.
pub fn kit_basis(app: &App) -> AmmoniaBasis {
    app.facility.room.kit_basis
}
