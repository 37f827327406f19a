//! Water-change planner: how much water to change, in how many steps, to bring
//! toxic ammonia back below the watch edge, and what NH3 the change leaves.
//!
//! Mass balance with the source water (see [`crate::core::dilution`]).
//! Total ammonia and temperature mix by volume; pH does not (it depends on
//! alkalinity and CO2), so the plan is computed at the higher of the tank's and
//! the source water's pH: when the source is more alkaline, that is what makes
//! a careless change dangerous. Changes above 50 % are split into repeated
//! changes of at most 50 % (common practice, no source: large partial changes
//! of about 25–50 %, repeated as needed).

use crate::core::ammonia::{pka, unionized_fraction};
use crate::core::dilution;

/// The largest single change planned, as a fraction of the water volume
/// (common practice, no source).
pub const MAX_SINGLE_FRACTION: f64 = 0.5;

/// Plans step in 5 % of the volume: what a person can measure with a bucket
/// count or a marked container.
const STEP: f64 = 0.05;

/// The water the change uses.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SourceWater {
    /// Total ammonia of the source water, mg TAN-N/L (tap water with
    /// chloramine carries some).
    pub tan_n_mg_l: f64,
    /// Its pH, when known.
    pub ph: Option<f64>,
    /// Its temperature, when known; unknown means "matched to the tank".
    pub temp_c: Option<f64>,
}

/// The tank's water before the change.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TankWater {
    /// Total ammonia, mg TAN-N/L.
    pub tan_n_mg_l: f64,
    /// pH.
    pub ph: f64,
    /// Temperature, °C.
    pub temp_c: f64,
    /// Salinity, g/L (the source is assumed mixed to the same salinity).
    pub salinity_ppt: f64,
    /// The volume the change is made against, litres: the whole shared volume
    /// of a system, or the tank's own.
    pub volume_l: f64,
}

/// A planned sequence of identical water changes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ChangePlan {
    /// How many changes.
    pub changes: u32,
    /// Fraction of the volume replaced at each change (0–0.5, in 5 % steps).
    pub fraction_each: f64,
    /// Litres replaced at each change.
    pub litres_each: f64,
    /// The single change the sequence is equivalent to: 1 − (1 − x)^n.
    pub equivalent_fraction: f64,
    /// Total ammonia after the last change, mg TAN-N/L.
    pub tan_after_n_mg_l: f64,
    /// Temperature after the last change, °C.
    pub temp_after_c: f64,
    /// The pH the plan assumes after the change.
    pub ph_after: f64,
    /// Un-ionized ammonia after the last change, mg NH3-N/L.
    pub nh3_after_n_mg_l: f64,
}

/// The outcome of planning.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Planned {
    /// NH3 is already below the target, even at the pH after a change.
    NotNeeded,
    /// A plan that reaches the target.
    Plan(ChangePlan),
    /// Dilution with this source water cannot reach the target: even pure
    /// source water would be above it (its own ammonia, or its pH).
    Unreachable {
        /// NH3-N (mg/L) of the source water itself at the planning pH.
        source_nh3_n_mg_l: f64,
    },
}

/// NH3-N after replacing (equivalently) fraction `x` of `tank` with `source`.
fn after(tank: &TankWater, source: &SourceWater, ph: f64, x: f64) -> (f64, f64, f64) {
    let tan = dilution::after_change(tank.tan_n_mg_l, source.tan_n_mg_l, x);
    let temp = dilution::mixed_temperature(tank.temp_c, source.temp_c.unwrap_or(tank.temp_c), x);
    (tan, temp, tan * unionized_fraction(pka(temp, tank.salinity_ppt), ph))
}

/// The pH a plan assumes after the change: the higher of the two, because
/// mixing cannot be predicted and a rise is the dangerous direction.
pub fn planning_ph(tank_ph: f64, source: &SourceWater) -> f64 {
    source.ph.map_or(tank_ph, |s| s.max(tank_ph))
}

/// Plans the changes that bring NH3-N below `target_nh3_n_mg_l`.
pub fn plan(tank: &TankWater, source: &SourceWater, target_nh3_n_mg_l: f64) -> Planned {
    let ph = planning_ph(tank.ph, source);
    if after(tank, source, ph, 0.0).2 < target_nh3_n_mg_l {
        return Planned::NotNeeded;
    }
    let full = after(tank, source, ph, 1.0).2;
    if full >= target_nh3_n_mg_l {
        return Planned::Unreachable { source_nh3_n_mg_l: full };
    }
    // Smallest equivalent fraction that reaches the target: NH3 falls as the
    // fraction grows (more dilution), so bisect.
    let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if after(tank, source, ph, mid).2 < target_nh3_n_mg_l {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    let needed = hi;
    // Fewest changes of at most 50 % whose sequence replaces `needed`.
    let mut changes = 1u32;
    while dilution::equivalent_fraction(MAX_SINGLE_FRACTION, changes) < needed {
        changes += 1;
    }
    let exact_each = 1.0 - (1.0 - needed).powf(1.0 / f64::from(changes));
    let fraction_each = ((exact_each / STEP - 1e-9).ceil() * STEP).clamp(STEP, MAX_SINGLE_FRACTION);
    let equivalent_fraction = dilution::equivalent_fraction(fraction_each, changes);
    let (tan_after, temp_after, nh3_after) = after(tank, source, ph, equivalent_fraction);
    Planned::Plan(ChangePlan {
        changes,
        fraction_each,
        litres_each: fraction_each * tank.volume_l,
        equivalent_fraction,
        tan_after_n_mg_l: tan_after,
        temp_after_c: temp_after,
        ph_after: ph,
        nh3_after_n_mg_l: nh3_after,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn tank(tan: f64, ph: f64) -> TankWater {
        TankWater { tan_n_mg_l: tan, ph, temp_c: 25.0, salinity_ppt: 0.0, volume_l: 200.0 }
    }

    const CLEAN: SourceWater = SourceWater { tan_n_mg_l: 0.0, ph: None, temp_c: None };

    #[test]
    fn hand_computed_single_change() {
        // 25 °C, pH 7.5: f = 0.01761589773287226 (Emerson 1975; reference row
        // NH3_FW-040). TAN 2.0 → NH3-N 0.03523. To get below 0.018 mg NH3-N/L,
        // TAN must fall below 0.018 / 0.0176159 = 1.02181 mg/L, i.e. replace
        // (2.0 − 1.02181)/2.0 = 48.9 % → rounded up to one 50 % change, which
        // leaves TAN 1.0 and NH3-N 0.017616.
        let Planned::Plan(p) = plan(&tank(2.0, 7.5), &CLEAN, 0.018) else { panic!("expected a plan") };
        assert_eq!(p.changes, 1);
        assert!((p.fraction_each - 0.5).abs() < 1e-12);
        assert!((p.litres_each - 100.0).abs() < 1e-9);
        assert!((p.tan_after_n_mg_l - 1.0).abs() < 1e-12);
        assert!((p.nh3_after_n_mg_l - 0.01761589773287226).abs() < 1e-12);
    }

    #[test]
    fn more_than_half_becomes_a_sequence() {
        // TAN 4.0 at pH 7.5 needs 1 − 1.02181/4 = 74.5 % replaced: two changes of
        // 1 − (1 − 0.745)^(1/2) = 49.5 % → 50 % each (equivalent 75 %), TAN 1.0.
        let Planned::Plan(p) = plan(&tank(4.0, 7.5), &CLEAN, 0.018) else { panic!() };
        assert_eq!(p.changes, 2);
        assert!((p.fraction_each - 0.5).abs() < 1e-12);
        assert!((p.equivalent_fraction - 0.75).abs() < 1e-12);
        assert!((p.tan_after_n_mg_l - 1.0).abs() < 1e-12);
    }

    #[test]
    fn alkaline_source_needs_more_and_can_be_unreachable() {
        let acid = tank(12.0, 6.6);
        let matched = plan(&acid, &SourceWater { ph: Some(6.6), ..CLEAN }, 0.018);
        let alkaline = plan(&acid, &SourceWater { ph: Some(8.2), ..CLEAN }, 0.018);
        let (Planned::Plan(m), Planned::Plan(a)) = (matched, alkaline) else { panic!("{matched:?} {alkaline:?}") };
        assert!(a.equivalent_fraction > m.equivalent_fraction);
        assert_eq!(a.ph_after, 8.2);
        // Source water carrying 0.5 mg TAN-N/L at pH 8.2 is itself above target.
        let dirty = SourceWater { tan_n_mg_l: 0.5, ph: Some(8.2), temp_c: None };
        assert!(matches!(plan(&acid, &dirty, 0.018), Planned::Unreachable { .. }));
    }

    #[test]
    fn clear_water_needs_nothing() {
        assert_eq!(plan(&tank(0.1, 7.0), &CLEAN, 0.018), Planned::NotNeeded);
    }
}
