//! This morning's round: when it started, which tanks are done, due or
//! overdue, and each tank's latest water and band.

use chrono::{DateTime, Duration, FixedOffset};

use crate::core::band::Band;
use crate::core::sample::{WaterSample, derive};
use crate::model::facility::{Facility, Tank};
use crate::model::record::{Observations, Reading, Target};

use super::history::{Entry, History};

/// Where a tank stands in the round.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Due {
    /// Read this round.
    Done,
    /// Skipped this round, with a reason (a skip record).
    Skipped,
    /// Not read this round, but its last reading is recent enough.
    NotDue,
    /// To be read this round.
    Due,
    /// Its last reading is well past the room's interval.
    Overdue,
    /// Never read.
    Never,
}

impl Due {
    /// A short mark for the board; it carries the state without colour.
    pub fn mark(self) -> &'static str {
        match self {
            Due::Done => "✓ done",
            Due::Skipped => "– skipped",
            Due::NotDue => "  ok",
            Due::Due => "• due",
            Due::Overdue => "! overdue",
            Due::Never => "! never",
        }
    }

    /// True when the round still wants this tank.
    pub fn wanted(self) -> bool {
        matches!(self, Due::Due | Due::Overdue | Due::Never)
    }
}

/// What the board and the summary show for one tank.
#[derive(Debug, Clone, PartialEq)]
pub struct TankStatus {
    /// When the tank's water was last read (its own reading or its system's).
    pub last_at: Option<DateTime<FixedOffset>>,
    /// The band of that water, raised by signs seen this round.
    pub band: Option<Band>,
    /// NH3-N of that water, mg/L.
    pub nh3_n_mg_l: Option<f64>,
    /// Where it stands in the round.
    pub due: Due,
    /// Signs or deaths recorded for it this round.
    pub signs: bool,
}

/// The target of a tank's own readings.
pub fn tank_target(tank: &Tank) -> Target {
    Target::Tank(tank.id.as_str().to_string())
}

/// The target of a tank's system, when it is on one.
pub fn system_target(tank: &Tank) -> Option<Target> {
    tank.system.as_ref().map(|s| Target::System(s.as_str().to_string()))
}

/// The newest reading of the tank's water (its own or its system's) that has
/// temperature, pH and total ammonia, with the sample.
pub fn latest_water<'a>(facility: &Facility, history: &'a History, tank: &Tank) -> Option<(&'a Entry, WaterSample)> {
    let salinity = facility.salinity_g_l(tank);
    history
        .readings_of_tank(tank)
        .into_iter()
        .rev()
        .find_map(|e| e.reading().and_then(|r| r.measurements.water_sample(salinity)).map(|s| (e, s)))
}

/// The tank's own reading this round, the newest when there are several.
pub fn own_this_round<'a>(history: &'a History, tank: &Tank, start: DateTime<FixedOffset>) -> Option<&'a Entry> {
    history.of_target(&tank_target(tank)).iter().rev().find(|e| e.taken_at >= start && e.reading().is_some())
}

/// The tank's system's reading this round, the newest when there are several.
pub fn system_this_round<'a>(history: &'a History, tank: &Tank, start: DateTime<FixedOffset>) -> Option<&'a Entry> {
    let target = system_target(tank)?;
    history.of_target(&target).iter().rev().find(|e| e.taken_at >= start && e.reading().is_some())
}

/// Why the tank (or its system) was skipped this round, the newest skip, when it was.
pub fn skip_this_round<'a>(history: &'a History, tank: &Tank, start: DateTime<FixedOffset>) -> Option<&'a str> {
    history.of_tank(tank).into_iter().rev().take_while(|e| e.taken_at >= start).find_map(|e| match &e.body {
        crate::model::record::RecordBody::Skip(skip) => Some(skip.reason.as_str()),
        _ => None,
    })
}

/// Observations recorded for the tank this round.
pub fn observations_this_round(history: &History, tank: &Tank, start: DateTime<FixedOffset>) -> Observations {
    own_this_round(history, tank, start).and_then(Entry::reading).map(|r: &Reading| r.observations).unwrap_or_default()
}

/// The status of one tank.
pub fn tank_status(
    facility: &Facility,
    history: &History,
    tank: &Tank,
    start: DateTime<FixedOffset>,
    now: DateTime<FixedOffset>,
) -> TankStatus {
    let skipped = skip_this_round(history, tank, start).is_some();
    let own = own_this_round(history, tank, start);
    let system = system_this_round(history, tank, start);
    let observations = observations_this_round(history, tank, start);
    let signs = observations.any_sign() || observations.deaths > 0;
    let water = latest_water(facility, history, tank);
    let last_at = history.readings_of_tank(tank).last().map(|e| e.taken_at);
    let (band, nh3) = match &water {
        Some((_, sample)) => {
            let derived = derive(sample, &facility.effective_profile(tank).band_edges, facility.room.elevation_m);
            let band = if signs { derived.band.raised() } else { derived.band };
            (Some(band), Some(derived.toxic.nh3_n_mg_l))
        }
        None => (None, None),
    };
    let interval = Duration::hours(i64::from(facility.room.round_interval_hours.max(1)));
    let due = if own.is_some() || system.is_some() {
        Due::Done
    } else if skipped {
        Due::Skipped
    } else {
        match last_at {
            None => Due::Never,
            // A whole round missed.
            Some(at) if now - at >= interval * 2 => Due::Overdue,
            // A little early is still this round's reading (readings drift by an hour or two).
            Some(at) if now - at >= interval - interval / 4 => Due::Due,
            Some(_) => Due::NotDue,
        }
    };
    TankStatus { last_at, band, nh3_n_mg_l: nh3, due, signs }
}

/// "3 h", "2 d", "40 min": the age of a reading.
pub fn age(now: DateTime<FixedOffset>, then: DateTime<FixedOffset>) -> String {
    let minutes = (now - then).num_minutes();
    if minutes < 0 {
        "future".to_string()
    } else if minutes < 60 {
        format!("{minutes} min")
    } else if minutes < 48 * 60 {
        format!("{} h", minutes / 60)
    } else {
        format!("{} d", minutes / (24 * 60))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn at(day: u32, hour: u32, minute: u32) -> DateTime<FixedOffset> {
        FixedOffset::east_opt(-5 * 3600).unwrap().with_ymd_and_hms(2026, 12, day, hour, minute, 0).unwrap()
    }

    #[test]
    fn ages_read_naturally() {
        assert_eq!(age(at(2, 7, 40), at(2, 7, 0)), "40 min");
        assert_eq!(age(at(2, 7, 40), at(1, 7, 0)), "24 h");
        assert_eq!(age(at(5, 7, 40), at(1, 7, 0)), "4 d");
    }
}
