//! The state of a tank's biofilter: cycling, at risk after an event, or
//! established (and whether its ammonia is rising all the same).
//!
//! Rules of the trade (common practice, no source): a new tank's nitrifying
//! bacteria take weeks to establish; the filter is established once total
//! ammonia and nitrite stay near zero over several readings while nitrate
//! rises. Antibiotics and some other medications, cleaning filter media
//! (worst: rinsing it in chlorinated tap water) and replacing substrate kill or
//! strip nitrifiers; many new fish, deaths and decaying food add load faster
//! than the filter can follow.

use chrono::{DateTime, Duration, NaiveDate, Utc};
use serde::Serialize;

use crate::model::record::{EventKind, MedicationClass};

/// Thresholds of the biofilter rules.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BiofilterRules {
    /// A tank younger than this is cycling until its readings show otherwise.
    pub cycling_age: Duration,
    /// How many readings in a row must be low for a young tank to count as established.
    pub established_readings: usize,
    /// Total ammonia below this (mg TAN-N/L) is "low": one step above zero on
    /// common kits (common practice, no source).
    pub low_tan_n_mg_l: f64,
    /// Nitrite below this (mg NO2-N/L) is "low" (common practice, no source).
    pub low_nitrite_n_mg_l: f64,
    /// How long an event keeps the filter "at risk".
    pub at_risk_for: Duration,
    /// Fish added at once, as a share of the stock, that count as "many"
    /// (common practice, no source).
    pub many_fish_share: f64,
}

impl Default for BiofilterRules {
    fn default() -> Self {
        BiofilterRules {
            cycling_age: Duration::weeks(6),
            established_readings: 3,
            low_tan_n_mg_l: 0.25,
            low_nitrite_n_mg_l: 0.1,
            at_risk_for: Duration::days(14),
            many_fish_share: 0.25,
        }
    }
}

/// One earlier or current reading, as the biofilter rules see it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FilterReading {
    /// When it was taken.
    pub at: DateTime<Utc>,
    /// Total ammonia, mg TAN-N/L.
    pub tan_n_mg_l: Option<f64>,
    /// Nitrite, mg NO2-N/L.
    pub nitrite_n_mg_l: Option<f64>,
    /// Nitrate, mg NO3-N/L.
    pub nitrate_n_mg_l: Option<f64>,
    /// Deaths seen at that reading.
    pub deaths: u32,
}

/// An event on the tank or its system, with its time.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DatedEvent<'a> {
    /// When it happened.
    pub at: DateTime<Utc>,
    /// What happened.
    pub kind: &'a EventKind,
}

/// The biofilter's state.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "state", rename_all = "kebab-case")]
pub enum Biofilter {
    /// A new tank whose bacteria are not established yet.
    Cycling {
        /// Days since set-up.
        age_days: i64,
        /// Why it still counts as cycling.
        reason: String,
    },
    /// Something recently killed nitrifiers or added load.
    AtRisk {
        /// The day the watch ends.
        until: NaiveDate,
        /// What happened, newest first.
        causes: Vec<String>,
    },
    /// Established, and ammonia is not rising.
    Established,
    /// Established, but total ammonia is rising.
    RisingInEstablished {
        /// Recent events that may explain it, newest first (may be empty).
        possible_causes: Vec<String>,
    },
}

impl Biofilter {
    /// The state in words, with its reason or causes.
    pub fn describe(&self) -> String {
        match self {
            Biofilter::Cycling { reason, .. } => format!("cycling: {reason}"),
            Biofilter::AtRisk { until, causes } => format!("at risk until {until}: {}", causes.join("; ")),
            Biofilter::Established => "established".to_string(),
            Biofilter::RisingInEstablished { possible_causes } if possible_causes.is_empty() => {
                "established, but ammonia is rising".to_string()
            }
            Biofilter::RisingInEstablished { possible_causes } => {
                format!("established, ammonia rising; recent: {}", possible_causes.join("; "))
            }
        }
    }

    /// Short name for tables.
    pub fn name(&self) -> &'static str {
        match self {
            Biofilter::Cycling { .. } => "cycling",
            Biofilter::AtRisk { .. } => "at risk",
            Biofilter::Established => "established",
            Biofilter::RisingInEstablished { .. } => "rising",
        }
    }
}

/// Why an event puts the filter at risk, or `None` when it does not.
fn risk_of(kind: &EventKind, stock_count: u32, rules: &BiofilterRules) -> Option<String> {
    match kind {
        EventKind::Medication { class: MedicationClass::Antibiotic, name } => {
            Some(format!("antibiotic given ({name}) kills nitrifying bacteria"))
        }
        EventKind::Medication { class: MedicationClass::Other, name } => {
            Some(format!("medication given ({name}): some harm nitrifying bacteria"))
        }
        EventKind::FilterCleaned { rinsed_in_tap_water: true } => {
            Some("filter media rinsed in chlorinated tap water".to_string())
        }
        EventKind::FilterCleaned { rinsed_in_tap_water: false } => Some("filter media cleaned".to_string()),
        EventKind::SubstrateReplaced => Some("substrate replaced".to_string()),
        EventKind::FishAdded { count } => {
            let many = f64::from(*count) >= rules.many_fish_share * f64::from(stock_count.max(1));
            many.then(|| format!("{count} fish added at once"))
        }
        EventKind::DeadFishRemoved { count } => Some(format!("{count} dead fish removed: decay adds ammonia")),
        _ => None,
    }
}

/// Recent events (within `window` before `at`), described, newest first.
fn recent_causes(
    events: &[DatedEvent<'_>],
    at: DateTime<Utc>,
    window: Duration,
    stock_count: u32,
    rules: &BiofilterRules,
) -> Vec<(DateTime<Utc>, String)> {
    let mut causes: Vec<_> = events
        .iter()
        .filter(|e| e.at <= at && at - e.at <= window)
        .filter_map(|e| risk_of(e.kind, stock_count, rules).map(|why| (e.at, why)))
        .collect();
    causes.sort_by_key(|c| std::cmp::Reverse(c.0));
    causes
}

fn dated(at: DateTime<Utc>, now: DateTime<Utc>, text: &str) -> String {
    let days = (now - at).num_days();
    match days {
        0 => format!("{text} (today)"),
        1 => format!("{text} (yesterday)"),
        d => format!("{text} ({d} days ago)"),
    }
}

/// The biofilter state at `at`. `readings` are the tank's readings up to and
/// including the current one, in any order; `tan_rising` says whether the total
/// ammonia trend is rising.
pub fn state(
    set_up: NaiveDate,
    stock_count: u32,
    at: DateTime<Utc>,
    readings: &[FilterReading],
    events: &[DatedEvent<'_>],
    tan_rising: bool,
    rules: &BiofilterRules,
) -> Biofilter {
    let age_days = (at.date_naive() - set_up).num_days();
    if age_days < rules.cycling_age.num_days() {
        let mut recent: Vec<&FilterReading> = readings.iter().filter(|r| r.at <= at).collect();
        recent.sort_by_key(|r| std::cmp::Reverse(r.at));
        recent.truncate(rules.established_readings);
        let low = |r: &&FilterReading| {
            r.tan_n_mg_l.is_some_and(|t| t < rules.low_tan_n_mg_l)
                && r.nitrite_n_mg_l.is_some_and(|n| n < rules.low_nitrite_n_mg_l)
        };
        let nitrates: Vec<f64> = recent.iter().rev().filter_map(|r| r.nitrate_n_mg_l).collect();
        let nitrate_rising = nitrates.len() >= 2 && nitrates.last() > nitrates.first();
        let established = recent.len() == rules.established_readings && recent.iter().all(low) && nitrate_rising;
        if !established {
            let reason = if recent.len() < rules.established_readings {
                format!(
                    "set up {age_days} days ago; needs {} readings with ammonia and nitrite low and nitrate rising",
                    rules.established_readings
                )
            } else if !recent.iter().all(low) {
                format!("set up {age_days} days ago; ammonia or nitrite not yet low on the last readings")
            } else {
                format!("set up {age_days} days ago; nitrate not yet rising")
            };
            return Biofilter::Cycling { age_days, reason };
        }
    }
    let causes = recent_causes(events, at, rules.at_risk_for, stock_count, rules);
    let recent_deaths = readings.iter().any(|r| r.at <= at && at - r.at <= rules.at_risk_for && r.deaths > 0);
    if let Some((newest, _)) = causes.first() {
        let until = (*newest + rules.at_risk_for).date_naive();
        let mut described: Vec<String> = causes.iter().map(|(t, why)| dated(*t, at, why)).collect();
        if recent_deaths {
            described.push("deaths recorded in the last readings".to_string());
        }
        return Biofilter::AtRisk { until, causes: described };
    }
    if tan_rising {
        let mut possible: Vec<String> = recent_causes(events, at, Duration::days(30), stock_count, rules)
            .iter()
            .map(|(t, why)| dated(*t, at, why))
            .collect();
        if recent_deaths {
            possible.push("deaths recorded in the last readings".to_string());
        }
        return Biofilter::RisingInEstablished { possible_causes: possible };
    }
    Biofilter::Established
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn at(day: u32) -> DateTime<Utc> {
        Utc.with_ymd_and_hms(2026, 11, day, 8, 0, 0).unwrap()
    }

    fn reading(day: u32, tan: f64, nitrite: f64, nitrate: f64) -> FilterReading {
        FilterReading {
            at: at(day),
            tan_n_mg_l: Some(tan),
            nitrite_n_mg_l: Some(nitrite),
            nitrate_n_mg_l: Some(nitrate),
            deaths: 0,
        }
    }

    #[test]
    fn young_tank_cycles_until_low_readings_and_rising_nitrate() {
        let rules = BiofilterRules::default();
        let set_up = NaiveDate::from_ymd_opt(2026, 10, 20).unwrap();
        let spiking = [reading(10, 1.5, 0.8, 2.0), reading(11, 0.5, 1.2, 4.0), reading(12, 0.1, 0.4, 6.0)];
        assert!(matches!(state(set_up, 10, at(12), &spiking, &[], false, &rules), Biofilter::Cycling { .. }));
        let settled = [reading(12, 0.1, 0.05, 6.0), reading(13, 0.0, 0.02, 8.0), reading(14, 0.0, 0.0, 10.0)];
        assert_eq!(state(set_up, 10, at(14), &settled, &[], false, &rules), Biofilter::Established);
    }

    #[test]
    fn antibiotic_puts_a_mature_filter_at_risk_for_two_weeks() {
        let rules = BiofilterRules::default();
        let set_up = NaiveDate::from_ymd_opt(2025, 1, 1).unwrap();
        let kind = EventKind::Medication { class: MedicationClass::Antibiotic, name: "oxytetracycline".into() };
        let events = [DatedEvent { at: at(3), kind: &kind }];
        let Biofilter::AtRisk { until, causes } = state(set_up, 40, at(5), &[], &events, false, &rules) else {
            panic!("expected at risk")
        };
        assert_eq!(until, NaiveDate::from_ymd_opt(2026, 11, 17).unwrap());
        assert!(causes[0].starts_with("antibiotic given (oxytetracycline)"), "{causes:?}");
        assert!(causes[0].ends_with("(2 days ago)"));
        assert_eq!(state(set_up, 40, at(20), &[], &events, false, &rules), Biofilter::Established);
    }

    #[test]
    fn a_few_fish_are_no_risk_but_many_are() {
        let rules = BiofilterRules::default();
        let set_up = NaiveDate::from_ymd_opt(2025, 1, 1).unwrap();
        let few = EventKind::FishAdded { count: 3 };
        let many = EventKind::FishAdded { count: 30 };
        let few_events = [DatedEvent { at: at(4), kind: &few }];
        let many_events = [DatedEvent { at: at(4), kind: &many }];
        assert_eq!(state(set_up, 40, at(5), &[], &few_events, false, &rules), Biofilter::Established);
        assert!(matches!(state(set_up, 40, at(5), &[], &many_events, false, &rules), Biofilter::AtRisk { .. }));
    }

    #[test]
    fn rising_ammonia_in_a_mature_tank_is_flagged() {
        let rules = BiofilterRules::default();
        let set_up = NaiveDate::from_ymd_opt(2025, 1, 1).unwrap();
        assert_eq!(
            state(set_up, 40, at(5), &[], &[], true, &rules),
            Biofilter::RisingInEstablished { possible_causes: vec![] }
        );
    }
}
