//! From the facility, the records and a request to the report's data. Pure:
//! no clock, no store, no I/O.

use std::collections::{BTreeMap, HashMap};

use chrono::{DateTime, Duration, FixedOffset, Utc};
use ulid::Ulid;

use super::{
    Concern, Counts, EventView, Measure, Range, ReadingView, Reason, ReportError, Request, RoundReport, RoundSummary,
    RoundTank, Selection, Series, SeriesPoint, Sighting, TankBands, TankStatus, Units, Walker, Water, words,
};
use crate::core::band::{Band, BandEdges};
use crate::core::sample::derive;
use crate::model::facility::{Facility, Tank, TemperatureUnit};
use crate::model::record::{Event, Reading, Record, RecordBody, Target};
use crate::model::species::EffectiveProfile;
use crate::rules::Assessment;
use crate::rules::trend::{TrendWindow, trend};
use crate::store::Entry;
use crate::timeline::{Timeline, targets_of};

/// Gathers the report's data from history entries (each record with its
/// corrections: the current values are reported, withdrawn records are not).
///
/// Records taken after the end of the round and of the period are ignored,
/// so a report on a past day shows that day as it was recorded.
pub fn gather(facility: &Facility, entries: &[Entry], request: &Request) -> Result<RoundReport, ReportError> {
    for window in [&request.round, &request.period] {
        if window.since > window.until {
            return Err(ReportError::EmptyPeriod { since: window.since, until: window.until });
        }
    }
    let selected = select(facility, &request.selection)?;
    let selection = canonical(&request.selection, &selected, facility);
    let end = request.end();
    let offset = *request.round.until.offset();
    let entries: Vec<&Entry> = entries.iter().filter(|e| e.original.taken_at <= end).collect();
    let records = current_records(&entries, offset);
    let by_id: HashMap<Ulid, &Record> = records.iter().map(|r| (r.id, r)).collect();
    // Indexes by target, so each tank and water reads only its own records.
    let mut by_target: HashMap<Target, Vec<usize>> = HashMap::new();
    for (i, record) in records.iter().enumerate() {
        if let Some(target) = record.body.target() {
            by_target.entry(target.clone()).or_default().push(i);
        }
    }
    let mut entries_by_target: HashMap<Target, Vec<&Entry>> = HashMap::new();
    for entry in &entries {
        if let Some(target) = entry.target() {
            entries_by_target.entry(target.clone()).or_default().push(entry);
        }
    }
    let units = Units {
        temperature: facility.room.temperature_unit.symbol(),
        volume: facility.room.volume_unit.symbol(),
        temperature_unit: facility.room.temperature_unit,
    };
    let interval = Duration::hours(i64::from(facility.room.round_interval_hours));
    let gatherer =
        Gatherer { facility, request, records: &records, by_id, by_target, entries_by_target, units, interval, offset };

    let tanks: Vec<TankFacts> = selected.iter().map(|tank| gatherer.tank_facts(tank)).collect();
    let round = gatherer.round(&tanks);
    let attention = gatherer.attention(&tanks);
    let sightings = gatherer.sightings(&selected);
    let concerning: Vec<&str> = attention.iter().flat_map(|c| c.tanks.iter().map(String::as_str)).collect();
    let (waters, not_charted) = gatherer.waters(&selection, &selected, &concerning, &sightings);

    let targets = targets_of_tanks(facility, &selected);
    let in_period: Vec<&Record> = gatherer.about(&targets).filter(|r| request.period.contains(&r.taken_at)).collect();
    let readings = in_period.iter().filter(|r| r.body.as_reading().is_some()).count();
    let events = in_period.iter().filter(|r| r.body.as_event().is_some()).count();
    let mut counts = Counts {
        tanks: round.tanks.len(),
        attention: attention.iter().map(|c| c.tanks.len()).sum(),
        latent_risks: attention.iter().filter(|c| c.reasons.contains(&Reason::Latent)).map(|c| c.tanks.len()).sum(),
        deaths: sightings.iter().map(|s| s.deaths).sum(),
        readings,
        events,
        ..Counts::default()
    };
    for tank in &round.tanks {
        match tank.status {
            TankStatus::Done => counts.done += 1,
            TankStatus::Skipped => counts.skipped += 1,
            TankStatus::NotReached => counts.not_reached += 1,
        }
    }
    // Bands as the tanks stand: each tank's latest reading within the period.
    let since = request.period.since.to_utc();
    for facts in tanks.iter().filter(|f| f.state.as_ref().is_some_and(|s| s.last_seen >= since)) {
        match facts.assessment.as_ref().and_then(|a| a.band) {
            Some(Band::Critical) => counts.critical += 1,
            Some(Band::Act) => counts.act += 1,
            Some(Band::Watch) => counts.watch += 1,
            Some(Band::Clear) => counts.clear += 1,
            None => counts.no_band += 1,
        }
    }
    let title = match &selection {
        Selection::Room => format!("Round report: {}", facility.room.name),
        Selection::System(id) => {
            let name = facility.system(id).map(|s| s.name.as_str()).unwrap_or_default();
            format!("System {id}, {name}: report")
        }
        Selection::Tank(id) => format!("Tank {id}: report"),
    };
    Ok(RoundReport {
        room: facility.room.name.clone(),
        title,
        selection,
        generated_at: request.generated_at,
        period: request.period,
        units,
        counts,
        round,
        attention,
        waters,
        not_charted,
        sightings,
        caution: crate::CAUTION,
        ph_convention: crate::PH_CONVENTION,
    })
}

/// Checks that the selection's tank or system is in the room; returns it with
/// the ids as the facility writes them.
pub fn check_selection(facility: &Facility, selection: &Selection) -> Result<Selection, ReportError> {
    let selected = select(facility, selection)?;
    Ok(canonical(selection, &selected, facility))
}

/// The tanks of the selection, in round order.
fn select<'a>(facility: &'a Facility, selection: &Selection) -> Result<Vec<&'a Tank>, ReportError> {
    let closest = |id: &str, ids: Vec<&str>| {
        ids.into_iter()
            .min_by_key(|c| strsim::damerau_levenshtein(&c.to_lowercase(), &id.to_lowercase()))
            .map(str::to_string)
    };
    match selection {
        Selection::Room => Ok(facility.round()),
        Selection::System(id) => {
            let system = facility.system(id).ok_or_else(|| ReportError::UnknownSystem {
                id: id.clone(),
                closest: closest(id, facility.systems.iter().map(|s| s.id.as_str()).collect()),
            })?;
            Ok(facility.round().into_iter().filter(|t| t.system.as_ref() == Some(&system.id)).collect())
        }
        Selection::Tank(id) => {
            let tank = facility.tank(id).ok_or_else(|| ReportError::UnknownTank {
                id: id.clone(),
                closest: closest(id, facility.tanks.iter().map(|t| t.id.as_str()).collect()),
            })?;
            Ok(vec![tank])
        }
    }
}

/// The selection with the ids as the facility writes them.
fn canonical(selection: &Selection, selected: &[&Tank], facility: &Facility) -> Selection {
    match selection {
        Selection::Room => Selection::Room,
        Selection::System(id) => {
            Selection::System(facility.system(id).map_or_else(|| id.clone(), |s| s.id.as_str().to_string()))
        }
        Selection::Tank(id) => Selection::Tank(selected.first().map_or_else(|| id.clone(), |t| t.id.to_string())),
    }
}

/// Every tank of `tanks` and every system they are on.
fn targets_of_tanks(facility: &Facility, tanks: &[&Tank]) -> Vec<Target> {
    let mut targets: Vec<Target> = Vec::new();
    for tank in tanks {
        for target in targets_of(facility, tank) {
            if !targets.contains(&target) {
                targets.push(target);
            }
        }
    }
    targets
}

/// The current value of each entry that is not withdrawn, oldest first, as a
/// record with the original's id, device, operator and time (shown in `offset`).
fn current_records(entries: &[&Entry], offset: FixedOffset) -> Vec<Record> {
    let mut records: Vec<Record> = entries
        .iter()
        .filter_map(|entry| {
            let body = entry.current()?;
            if matches!(body, RecordBody::Correction(_)) {
                return None;
            }
            let taken_at = entry.original.taken_at.with_timezone(&offset);
            Some(Record { body: body.clone(), taken_at, ..entry.original.clone() })
        })
        .collect();
    records.sort_by_key(Record::time_key);
    records
}

/// What is known of a tank at the end of the report: the reading assessed
/// (the newest with the chemistry, carrying what was seen of the fish in
/// every reading around it) and when the tank was last looked at.
#[derive(Debug, Clone)]
struct TankState {
    /// When the reading assessed was taken.
    at: DateTime<Utc>,
    /// Its id (the original's).
    id: Ulid,
    /// The reading assessed.
    reading: Reading,
    /// When the newest reading was taken.
    last_seen: DateTime<Utc>,
}

/// The tank's state as of `at`: the readings of its timeline within `window`
/// before the newest one up to `at`. Measurements come from the newest
/// complete sample (temperature, pH and total ammonia) among them, else the
/// newest reading; signs and deaths from all of them; the note from the newest
/// that has one. `None` when nothing was read by then.
fn state_at(timeline: &Timeline, at: DateTime<Utc>, window: Duration) -> Option<TankState> {
    let upto: Vec<&(DateTime<Utc>, Ulid, Reading)> = timeline.readings.iter().filter(|r| r.0 <= at).collect();
    let newest = *upto.last()?;
    let recent: Vec<&(DateTime<Utc>, Ulid, Reading)> =
        upto.iter().rev().take_while(|r| newest.0 - r.0 <= window).copied().collect();
    let chemistry = recent.iter().find(|r| r.2.water_sample().is_some()).copied().unwrap_or(newest);
    let mut reading = Reading::new(chemistry.2.target.clone());
    reading.measurements = chemistry.2.measurements.clone();
    for r in &recent {
        for sign in r.2.observations.signs() {
            reading.observations.set(sign, true);
        }
        reading.observations.deaths = reading.observations.deaths.saturating_add(r.2.observations.deaths);
    }
    reading.note = recent.iter().find_map(|r| r.2.note.clone());
    Some(TankState { at: chemistry.0, id: chemistry.1, reading, last_seen: newest.0 })
}

/// What is known of one tank.
struct TankFacts<'a> {
    tank: &'a Tank,
    state: Option<TankState>,
    assessment: Option<Assessment>,
}

struct Gatherer<'a> {
    facility: &'a Facility,
    request: &'a Request,
    records: &'a [Record],
    by_id: HashMap<Ulid, &'a Record>,
    by_target: HashMap<Target, Vec<usize>>,
    entries_by_target: HashMap<Target, Vec<&'a Entry>>,
    units: Units,
    interval: Duration,
    offset: FixedOffset,
}

impl<'a> Gatherer<'a> {
    fn tank_facts(&self, tank: &'a Tank) -> TankFacts<'a> {
        let targets = targets_of(self.facility, tank);
        let entries = targets.iter().filter_map(|t| self.entries_by_target.get(t)).flatten().copied();
        let timeline = Timeline::from_entries(entries);
        let state = state_at(&timeline, self.request.end().to_utc(), self.interval);
        let assessment =
            state.as_ref().map(|s| timeline.assess(self.facility, tank, &s.reading, s.at, &self.request.config));
        TankFacts { tank, state, assessment }
    }

    /// Records about any of `targets`, oldest first.
    fn about(&self, targets: &[Target]) -> impl Iterator<Item = &'a Record> + use<'a> {
        let mut at: Vec<usize> = targets.iter().filter_map(|t| self.by_target.get(t)).flatten().copied().collect();
        at.sort_unstable();
        at.dedup();
        let records = self.records;
        at.into_iter().map(move |i| &records[i])
    }

    fn round(&self, tanks: &[TankFacts<'_>]) -> RoundSummary {
        let window = &self.request.round;
        let mut walkers: Vec<Walker> = Vec::new();
        let targets = targets_of_tanks(self.facility, &tanks.iter().map(|t| t.tank).collect::<Vec<_>>());
        for record in self.about(&targets).filter(|r| window.contains(&r.taken_at)) {
            let (reading, skip) = match &record.body {
                RecordBody::Reading(_) => (1, 0),
                RecordBody::Skip(_) => (0, 1),
                _ => continue,
            };
            match walkers.iter_mut().find(|w| w.operator == record.operator) {
                Some(w) => {
                    w.readings += reading;
                    w.skips += skip;
                    w.first = w.first.min(record.taken_at);
                    w.last = w.last.max(record.taken_at);
                }
                None => walkers.push(Walker {
                    operator: record.operator.clone(),
                    readings: reading,
                    skips: skip,
                    first: record.taken_at,
                    last: record.taken_at,
                }),
            }
        }
        walkers.sort_by_key(|w| w.first);
        let round_tanks = tanks.iter().map(|facts| self.round_tank(facts)).collect();
        RoundSummary {
            window: *window,
            interval_hours: self.facility.room.round_interval_hours,
            started: walkers.iter().map(|w| w.first).min(),
            finished: walkers.iter().map(|w| w.last).max(),
            walked_by: walkers,
            tanks: round_tanks,
        }
    }

    fn round_tank(&self, facts: &TankFacts<'_>) -> RoundTank {
        let window = &self.request.round;
        let tank = facts.tank;
        let targets = targets_of(self.facility, tank);
        let in_window: Vec<&Record> = self.about(&targets).filter(|r| window.contains(&r.taken_at)).collect();
        let read: Vec<(&Record, &Reading)> =
            in_window.iter().filter_map(|r| r.body.as_reading().map(|reading| (*r, reading))).collect();
        let mut row = RoundTank {
            tank: tank.id.to_string(),
            system: tank.system.as_ref().map(|s| s.as_str().to_string()),
            status: TankStatus::NotReached,
            at: None,
            by: None,
            via_system: false,
            reason: None,
            band: None,
            latent_band: None,
            fish_signs: read.iter().any(|(_, r)| !r.observations.is_empty()),
        };
        if let Some((record, reading)) = read.first() {
            row.status = TankStatus::Done;
            row.at = Some(record.taken_at);
            row.by = Some(record.operator.clone());
            row.via_system = matches!(reading.target, Target::System(_));
            row.band = facts.assessment.as_ref().and_then(|a| a.band);
            row.latent_band = facts.assessment.as_ref().and_then(|a| a.latent.map(|l| l.band));
            return row;
        }
        let skip = in_window.iter().rev().find_map(|r| r.body.as_skip().map(|s| (*r, s)));
        if let Some((record, skip)) = skip {
            row.status = TankStatus::Skipped;
            row.at = Some(record.taken_at);
            row.by = Some(record.operator.clone());
            row.via_system = matches!(skip.target, Target::System(_));
            row.reason = Some(skip.reason.clone());
        }
        row
    }

    /// The waters that need attention: each system with selected tanks and
    /// each standalone (or singly selected) tank. A system's reading is judged
    /// for each of its tanks and the most severe judgement stands for the
    /// system, as [`crate::timeline::Assessor`] does everywhere else.
    fn attention(&self, tanks: &[TankFacts<'_>]) -> Vec<Concern> {
        let mut concerns: Vec<Concern> = Vec::new();
        let mut systems_done: Vec<&str> = Vec::new();
        let single = matches!(self.request.selection, Selection::Tank(_));
        for facts in tanks {
            let concern = match facts.tank.system.as_ref() {
                Some(system) if !single => {
                    if systems_done.contains(&system.as_str()) {
                        continue;
                    }
                    systems_done.push(system.as_str());
                    let on: Vec<&TankFacts> = tanks.iter().filter(|t| t.tank.system.as_ref() == Some(system)).collect();
                    self.concern(Target::System(system.as_str().to_string()), &on)
                }
                _ => self.concern(Target::Tank(facts.tank.id.to_string()), &[facts]),
            };
            concerns.extend(concern);
        }
        let rank = |c: &Concern| match c.reasons.first() {
            Some(Reason::Critical) => 0,
            Some(Reason::Act) => 1,
            _ => 2,
        };
        concerns.sort_by_key(rank);
        concerns
    }

    /// The concern of one water (its tanks' facts), when it needs attention.
    fn concern(&self, target: Target, tanks: &[&TankFacts<'_>]) -> Option<Concern> {
        let severity = |f: &&&TankFacts<'_>| {
            let a = f.assessment.as_ref();
            (a.and_then(|a| a.band), a.and_then(|a| a.latent.map(|l| l.band)))
        };
        // The first of the most severe, in round order.
        let worst = tanks.iter().filter(|f| f.assessment.is_some()).rev().max_by_key(severity)?;
        let (state, a) = (worst.state.as_ref()?, worst.assessment.as_ref()?);
        if state.last_seen < self.request.period.since.to_utc() {
            return None;
        }
        let mut reasons = Vec::new();
        match a.band {
            Some(Band::Critical) => reasons.push(Reason::Critical),
            Some(Band::Act) => reasons.push(Reason::Act),
            _ => {}
        }
        if let (Some(latent), Some(measured)) = (a.latent, a.measured_band)
            && latent.band > measured
            && a.band.is_none_or(|b| latent.band > b)
        {
            reasons.push(Reason::Latent);
        }
        if reasons.is_empty() {
            return None;
        }
        let mut tank_bands: Vec<TankBands> = Vec::new();
        for facts in tanks {
            let band = facts.assessment.as_ref().and_then(|a| a.band);
            match tank_bands.iter_mut().find(|g| g.band == band) {
                Some(group) => group.tanks.push(facts.tank.id.to_string()),
                None => tank_bands.push(TankBands { band, tanks: vec![facts.tank.id.to_string()] }),
            }
        }
        tank_bands.sort_by_key(|g| std::cmp::Reverse(g.band));
        let (taken_at, operator) = self
            .by_id
            .get(&state.id)
            .map_or((state.at.with_timezone(&self.offset), String::new()), |r| (r.taken_at, r.operator.clone()));
        let water_targets = match &target {
            Target::System(id) => {
                let mut targets = vec![target.clone()];
                targets.extend(tanks.iter().map(|f| Target::Tank(f.tank.id.to_string())));
                if let Some(system) = self.facility.system(id) {
                    targets.extend(self.facility.tanks_on(system).iter().map(|t| Target::Tank(t.id.to_string())));
                }
                targets
            }
            Target::Tank(_) => targets_of(self.facility, worst.tank),
        };
        let until = self.request.end();
        let events_since: Vec<EventView> = self
            .about(&water_targets)
            .filter(|r| r.taken_at.to_utc() > state.at && r.taken_at <= until)
            .filter_map(|r| r.body.as_event().map(|e| self.event_view(r, e, None)))
            .collect();
        let mut species: Vec<String> = Vec::new();
        for facts in tanks {
            for p in self.facility.species_of(facts.tank) {
                if !species.contains(&p.name) {
                    species.push(p.name.clone());
                }
            }
        }
        Some(Concern {
            target,
            tanks: tanks.iter().map(|t| t.tank.id.to_string()).collect(),
            judged_for: worst.tank.id.to_string(),
            tank_bands,
            species,
            reasons,
            reading: self.reading_view(
                &state.reading,
                taken_at,
                &operator,
                self.facility.salinity_g_l(worst.tank),
                &a.band_edges,
            ),
            band: a.band,
            measured_band: a.measured_band,
            raised_by: a.raised_by.clone(),
            latent: a.latent,
            trend: a.trend,
            biofilter: a.biofilter.clone(),
            actions: a.actions.clone(),
            warnings: a.warnings.clone(),
            events_since,
        })
    }

    fn reading_view(
        &self,
        reading: &Reading,
        at: DateTime<FixedOffset>,
        by: &str,
        default_salinity: f64,
        edges: &BandEdges,
    ) -> ReadingView {
        let m = &reading.measurements;
        let derived = reading
            .measurements
            .water_sample(default_salinity)
            .map(|s| derive(&s, edges, self.facility.room.elevation_m));
        ReadingView {
            at: at.with_timezone(&self.offset),
            by: by.to_string(),
            target: reading.target.clone(),
            temp_c: m.temp_c(),
            ph: m.ph,
            tan_n_mg_l: m.tan_n_mg_l(),
            nh3_n_mg_l: derived.map(|d| d.toxic.nh3_n_mg_l),
            nh3_mg_l: derived.map(|d| d.toxic.nh3_mg_l),
            nitrite_n_mg_l: m.nitrite_n_mg_l(),
            nitrate_n_mg_l: m.nitrate_n_mg_l(),
            salinity_ppt: m.salinity_ppt(),
            do_mg_l: m.dissolved_oxygen_mg_l,
            signs: reading.observations.signs().into_iter().map(|s| s.name()).collect(),
            deaths: reading.observations.deaths,
            note: reading.note.clone(),
        }
    }

    fn event_view(&self, record: &Record, event: &Event, number: Option<usize>) -> EventView {
        EventView {
            number,
            at: record.taken_at.with_timezone(&self.offset),
            by: record.operator.clone(),
            target: event.target.clone(),
            kind: event.kind.name(),
            text: words::event(&event.kind, self.units.temperature_unit),
            note: event.note.clone(),
        }
    }

    fn sightings(&self, selected: &[&Tank]) -> Vec<Sighting> {
        let targets = targets_of_tanks(self.facility, selected);
        self.about(&targets)
            .filter(|r| self.request.period.contains(&r.taken_at))
            .filter_map(|r| {
                let reading = r.body.as_reading()?;
                if reading.observations.is_empty() {
                    return None;
                }
                Some(Sighting {
                    at: r.taken_at,
                    by: r.operator.clone(),
                    target: reading.target.clone(),
                    signs: reading.observations.signs().into_iter().map(|s| s.name()).collect(),
                    deaths: reading.observations.deaths,
                    note: reading.note.clone(),
                })
            })
            .collect()
    }

    /// The waters charted, and the standalone tanks left out: systems first (in
    /// round order), then the standalone tanks of concern or with sick fish.
    fn waters(
        &self,
        selection: &Selection,
        selected: &[&Tank],
        concerning: &[&str],
        sightings: &[Sighting],
    ) -> (Vec<Water>, Vec<String>) {
        if let Selection::Tank(_) = selection {
            let waters = selected
                .first()
                .map(|tank| {
                    let target = Target::Tank(tank.id.to_string());
                    self.water(target, self.species_names(&[tank]), &[tank], targets_of(self.facility, tank))
                })
                .into_iter()
                .collect();
            return (waters, Vec::new());
        }
        let mut systems: Vec<&str> = Vec::new();
        let mut standalone = Vec::new();
        let mut not_charted = Vec::new();
        for tank in selected {
            match &tank.system {
                Some(system) => {
                    if !systems.contains(&system.as_str()) {
                        systems.push(system.as_str());
                    }
                }
                None => {
                    let target = Target::Tank(tank.id.to_string());
                    let seen = sightings.iter().any(|s| s.target == target);
                    if concerning.contains(&tank.id.as_str()) || seen {
                        let targets = vec![target.clone()];
                        standalone.push(self.water(target, self.species_names(&[tank]), &[tank], targets));
                    } else {
                        not_charted.push(tank.id.to_string());
                    }
                }
            }
        }
        let mut waters = Vec::new();
        for id in systems {
            let Some(system) = self.facility.system(id) else { continue };
            let on = self.facility.tanks_on(system);
            let mut targets = vec![Target::System(id.to_string())];
            targets.extend(on.iter().map(|t| Target::Tank(t.id.to_string())));
            waters.push(self.water(Target::System(id.to_string()), system.name.clone(), &on, targets));
        }
        waters.extend(standalone);
        (waters, not_charted)
    }

    fn species_names(&self, tanks: &[&Tank]) -> String {
        let mut names: Vec<String> = Vec::new();
        for tank in tanks {
            for p in self.facility.species_of(tank) {
                if !names.contains(&p.name) {
                    names.push(p.name.clone());
                }
            }
        }
        if names.is_empty() { "no species listed".to_string() } else { names.join(", ") }
    }

    /// One water: the readings and events of `targets` (a system and its tanks, or a tank and its system).
    fn water(&self, target: Target, name: String, tanks: &[&Tank], targets: Vec<Target>) -> Water {
        let profiles: Vec<_> = tanks.iter().flat_map(|t| self.facility.species_of(t)).collect();
        let profile = EffectiveProfile::combine(&profiles);
        let edges = profile.band_edges;
        let salinity = tanks.first().map_or(0.0, |t| self.facility.salinity_g_l(t));
        let period = &self.request.period;
        let readings: Vec<(&Record, &Reading)> =
            self.about(&targets).filter_map(|r| r.body.as_reading().map(|reading| (r, reading))).collect();
        let in_period: Vec<&(&Record, &Reading)> =
            readings.iter().filter(|(r, _)| period.contains(&r.taken_at)).collect();

        let temp_unit = self.units.temperature_unit;
        let mut series: BTreeMap<usize, Vec<SeriesPoint>> = BTreeMap::new();
        for (record, reading) in &in_period {
            let m = &reading.measurements;
            let at = record.taken_at;
            let nh3 =
                reading.measurements.water_sample(salinity).map(|s| derive(&s, &edges, self.facility.room.elevation_m));
            let values = [
                nh3.map(|d| (d.toxic.nh3_n_mg_l, Some(d.band))),
                m.tan_n_mg_l().map(|v| (v, None)),
                m.ph.map(|v| (v, None)),
                m.temp_c().map(|c| (temp_unit.from_celsius(c), None)),
                m.nitrite_n_mg_l().map(|v| (v, None)),
            ];
            for (i, value) in values.into_iter().enumerate() {
                if let Some((value, band)) = value {
                    series.entry(i).or_default().push(SeriesPoint { at, value, band });
                }
            }
        }
        let series = Measure::ALL
            .iter()
            .enumerate()
            .map(|(i, measure)| Series {
                measure: *measure,
                unit: unit_of(*measure, temp_unit),
                points: series.remove(&i).unwrap_or_default(),
            })
            .collect();

        let latest = readings
            .iter()
            .rev()
            .find(|(_, r)| r.measurements.water_sample(salinity).is_some())
            .or_else(|| readings.iter().rev().find(|(_, r)| !r.measurements.is_empty()));
        let latest_view =
            latest.map(|(r, reading)| self.reading_view(reading, r.taken_at, &r.operator, salinity, &edges));
        let nh3_points: Vec<(DateTime<Utc>, f64)> = readings
            .iter()
            .filter_map(|(r, reading)| {
                reading
                    .measurements
                    .water_sample(salinity)
                    .map(|s| (r.taken_at.to_utc(), derive(&s, &edges, self.facility.room.elevation_m).toxic.nh3_n_mg_l))
            })
            .collect();
        let events: Vec<EventView> = self
            .about(&targets)
            .filter(|r| period.contains(&r.taken_at))
            .filter_map(|r| r.body.as_event().map(|e| (r, e)))
            .enumerate()
            .map(|(i, (r, e))| self.event_view(r, e, Some(i + 1)))
            .collect();
        let to_range = |b: crate::model::species::Bounds, unit: Option<TemperatureUnit>| match unit {
            Some(u) => Range { min: u.from_celsius(b.min), max: u.from_celsius(b.max) },
            None => Range { min: b.min, max: b.max },
        };
        Water {
            target,
            name,
            tanks: tanks.iter().map(|t| t.id.to_string()).collect(),
            species: {
                let mut names: Vec<String> = Vec::new();
                for p in &profiles {
                    if !names.contains(&p.name) {
                        names.push(p.name.clone());
                    }
                }
                names
            },
            band_edges: edges,
            ph_range: profile.ph.map(|b| to_range(b, None)),
            temperature_range: profile.temp_c.map(|b| to_range(b, Some(temp_unit))),
            band: latest_view.as_ref().and_then(|v| v.nh3_n_mg_l).map(|x| edges.classify(x)),
            latest: latest_view,
            trend: trend(&nh3_points, TrendWindow::default(), 0.1 * edges.watch),
            readings: in_period.len(),
            series,
            events,
        }
    }
}

/// The unit of a measure's series.
fn unit_of(measure: Measure, unit: TemperatureUnit) -> &'static str {
    match measure {
        Measure::TotalAmmonia => "mg/L TAN-N",
        Measure::Nh3 => "mg/L NH3-N",
        Measure::Ph => "pH",
        Measure::Temperature => unit.symbol(),
        Measure::Nitrite => "mg/L NO2-N",
    }
}
