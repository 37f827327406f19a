//! The one place the screen asks for an assessment: it builds the tank's
//! [`Timeline`] from the screen's history and judges the reading with it, so
//! the walk, `record`, `log` and the report judge a reading the same way.

use chrono::{DateTime, FixedOffset};

use crate::model::record::{Reading, RecordBody};
use crate::rules::{Assessment, RulesConfig};
use crate::timeline::Timeline;

use super::{App, utc};

/// Assesses `reading` for the tank at `tank_index`, taken at `at`, against
/// the readings taken before `before` (so a reading being typed or corrected
/// is not its own history) and the tank's events.
pub fn assess_reading(
    app: &App,
    tank_index: usize,
    reading: &Reading,
    at: DateTime<FixedOffset>,
    before: DateTime<FixedOffset>,
) -> Assessment {
    let tank = app.tank(tank_index);
    let mut timeline = Timeline::default();
    for entry in app.history.of_tank(tank) {
        let when = utc(entry.taken_at);
        match &entry.body {
            RecordBody::Reading(r) if entry.taken_at < before => timeline.readings.push((when, entry.id, r.clone())),
            RecordBody::Event(e) => timeline.events.push((when, e.kind.clone())),
            RecordBody::Skip(s) => timeline.skips.push((when, s.reason.clone())),
            _ => {}
        }
    }
    timeline.assess(&app.facility, tank, reading, utc(at), &RulesConfig::default())
}
