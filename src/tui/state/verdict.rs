//! What the screen says about a tank's water: NH3, band, latent risk, trend
//! and the actions to take.
//!
//! SEAM: this is the one place the screen asks for an assessment. Until the
//! assessment module (`rules::assess`) is on main it is built here from the
//! pieces already there: [`derive`] (NH3 and band), [`latent`], [`trend`] and
//! the water-change planner. When `rules::assess` lands, [`assess`] becomes a
//! call to it and [`Verdict`] carries its result; nothing else in the screen
//! changes.

use chrono::{DateTime, Utc};

use crate::core::band::{Band, BandEdges};
use crate::core::sample::{Derived, WaterSample, derive};
use crate::model::record::Observations;
use crate::numfmt::sig;
use crate::rules::latent::{Latent, LatentBasis, latent};
use crate::rules::trend::{Trend, TrendWindow, trend};
use crate::rules::water_change::{Planned, SourceWater, TankWater, plan};

/// A change in NH3-N slower than this, mg/L a day, is steady (common practice, no source).
pub const STEADY_NH3_N_PER_DAY: f64 = 0.002;

/// What the assessment needs about one tank (or system) and its water.
#[derive(Debug, Clone, PartialEq)]
pub struct VerdictInput {
    /// The water.
    pub sample: WaterSample,
    /// What was seen of the fish.
    pub observations: Observations,
    /// The species' band edges.
    pub edges: BandEdges,
    /// The water used for changes.
    pub source: SourceWater,
    /// Where the pH after a careless water change comes from, when known.
    pub latent_ph: Option<(f64, LatentBasis)>,
    /// The volume a water change acts on, L, and what it is ("system RACK-A", "tank").
    pub volume: (f64, String),
    /// Elevation of the room, m.
    pub elevation_m: f64,
    /// Earlier NH3-N figures of the same water, with their times.
    pub nh3_history: Vec<(DateTime<Utc>, f64)>,
}

/// One suggested action, with its reason.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Suggestion {
    /// What to do, with the quantity.
    pub what: String,
    /// Why.
    pub why: String,
}

/// The screen's verdict on one water.
#[derive(Debug, Clone, PartialEq)]
pub struct Verdict {
    /// NH3, band and the rest of the chemistry.
    pub derived: Derived,
    /// The band shown: the chemistry's, one worse when fish show signs or died.
    pub band: Band,
    /// True when signs or deaths raised the band.
    pub raised_by_signs: bool,
    /// The band after a careless water change.
    pub latent: Latent,
    /// NH3 over the last readings, with this one.
    pub trend: Option<Trend>,
    /// What to do, most urgent first.
    pub actions: Vec<Suggestion>,
}

/// Assesses one water. SEAM: see the module documentation.
pub fn assess(input: &VerdictInput, now: DateTime<Utc>) -> Verdict {
    let derived = derive(&input.sample, &input.edges, input.elevation_m);
    let signs = input.observations.any_sign() || input.observations.deaths > 0;
    let band = if signs { derived.band.raised() } else { derived.band };
    let latent = latent(&input.sample, &input.edges, input.latent_ph);
    let mut points = input.nh3_history.clone();
    points.push((now, derived.toxic.nh3_n_mg_l));
    let trend = trend(&points, TrendWindow::default(), STEADY_NH3_N_PER_DAY);
    let mut actions = Vec::new();
    if signs {
        actions.push(Suggestion {
            what: "Take out dead fish; look again within the hour; call an aquatic vet if signs go on".into(),
            why: "fish show signs or died".into(),
        });
    }
    if derived.band >= Band::Watch {
        let (volume_l, what) = &input.volume;
        let tank = TankWater {
            tan_n_mg_l: input.sample.tan_n_mg_l,
            ph: input.sample.ph,
            temp_c: input.sample.temp_c,
            salinity_ppt: input.sample.salinity_ppt,
            volume_l: *volume_l,
        };
        // Aim just under the watch edge.
        match plan(&tank, &input.source, input.edges.watch * 0.9) {
            Planned::NotNeeded => {}
            Planned::Plan(p) => {
                let times = if p.changes > 1 { format!(", {} times", p.changes) } else { String::new() };
                actions.push(Suggestion {
                    what: format!(
                        "Change {} % ({} L of {} L, {what}){times}",
                        sig(p.fraction_each * 100.0, 2),
                        sig(p.litres_each, 3),
                        sig(*volume_l, 3)
                    ),
                    why: format!(
                        "NH3-N {} → {} mg/L at pH {}",
                        sig(derived.toxic.nh3_n_mg_l, 2),
                        sig(p.nh3_after_n_mg_l, 2),
                        crate::numfmt::fixed(p.ph_after, 1)
                    ),
                });
            }
            Planned::Unreachable { source_nh3_n_mg_l } => actions.push(Suggestion {
                what: "A water change cannot clear this: the source water itself is too high".into(),
                why: format!("source water alone gives NH3-N {} mg/L", sig(source_nh3_n_mg_l, 2)),
            }),
        }
    }
    if latent.band > derived.band {
        actions.push(Suggestion {
            what: format!("Match the new water's pH before changing water (pH {})", crate::numfmt::fixed(latent.ph, 1)),
            why: format!("at that pH this ammonia is NH3-N {} mg/L: {}", sig(latent.nh3_n_mg_l, 2), latent.band),
        });
    }
    Verdict { derived, band, raised_by_signs: signs && band != derived.band, latent, trend, actions }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn input(tan: f64, ph: f64) -> VerdictInput {
        VerdictInput {
            sample: WaterSample { temp_c: 26.0, ph, tan_n_mg_l: tan, salinity_ppt: 0.0, do_mg_l: None },
            observations: Observations::default(),
            edges: BandEdges::DEFAULT,
            source: SourceWater { tan_n_mg_l: 0.0, ph: Some(7.6), temp_c: None },
            latent_ph: Some((7.6, LatentBasis::SourceWater)),
            volume: (400.0, "system RACK-A".into()),
            elevation_m: 0.0,
            nh3_history: Vec::new(),
        }
    }

    fn now() -> DateTime<Utc> {
        Utc.with_ymd_and_hms(2026, 12, 1, 7, 0, 0).unwrap()
    }

    #[test]
    fn clear_water_needs_nothing() {
        let v = assess(&input(0.1, 7.0), now());
        assert_eq!(v.band, Band::Clear);
        assert!(v.actions.is_empty(), "{:?}", v.actions);
    }

    #[test]
    fn high_ammonia_gets_a_water_change_in_litres_of_the_system() {
        let v = assess(&input(2.0, 7.6), now());
        assert!(v.band >= Band::Watch);
        let change = &v.actions[0];
        assert!(change.what.starts_with("Change ") && change.what.contains("L of 400 L, system RACK-A"), "{change:?}");
    }

    #[test]
    fn signs_raise_the_band_and_come_first() {
        let mut i = input(0.1, 7.0);
        i.observations.gasping = true;
        let v = assess(&i, now());
        assert_eq!(v.band, Band::Watch);
        assert!(v.raised_by_signs);
        assert!(v.actions[0].why.contains("signs"));
    }

    #[test]
    fn acid_tank_warns_about_the_source_ph() {
        let v = assess(&input(6.0, 6.6), now());
        assert!(v.latent.band > v.derived.band);
        assert!(v.actions.iter().any(|a| a.what.starts_with("Match the new water's pH")), "{:?}", v.actions);
    }
}
