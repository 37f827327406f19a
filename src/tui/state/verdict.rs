//! The one place the screen asks for an assessment: it gathers a tank's
//! earlier readings and events from the history and calls
//! [`crate::rules::assess::assess`].

use chrono::{DateTime, FixedOffset};

use crate::model::record::Reading;
use crate::rules::assess::{Assessment, Inputs, PastReading, RulesConfig, assess};
use crate::rules::biofilter::DatedEvent;

use super::{App, utc};

/// Assesses `reading` for the tank at `tank_index`, taken at `at`, against
/// the readings taken before `before` (so a reading being corrected is not
/// its own history) and every event up to `at`.
pub fn assess_reading(
    app: &App,
    tank_index: usize,
    reading: &Reading,
    at: DateTime<FixedOffset>,
    before: DateTime<FixedOffset>,
) -> Assessment {
    let tank = app.tank(tank_index);
    let entries = app.history.of_tank(tank);
    let history: Vec<PastReading<'_>> = entries
        .iter()
        .filter(|e| e.taken_at < before)
        .filter_map(|e| Some(PastReading { at: utc(e.taken_at), reading: e.reading()? }))
        .collect();
    let events: Vec<DatedEvent<'_>> =
        entries.iter().filter_map(|e| Some(DatedEvent { at: utc(e.taken_at), kind: &e.event()?.kind })).collect();
    let config = RulesConfig::default();
    assess(&Inputs {
        facility: &app.facility,
        tank,
        reading,
        at: utc(at),
        history: &history,
        events: &events,
        config: &config,
    })
}
