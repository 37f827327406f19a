//! What-if: the same water after a change of pH, temperature, salinity or a
//! water change, so the screen and `calc --what-if` can show NH3 and band move.

use serde::Serialize;

use super::water_change::{SourceWater, planning_ph};
use crate::core::dilution;
use crate::core::sample::WaterSample;

/// The changes to try; `None` leaves a figure as measured.
#[derive(Debug, Clone, Copy, PartialEq, Default, Serialize)]
pub struct WhatIf {
    /// A different pH.
    pub ph: Option<f64>,
    /// A different temperature, °C.
    pub temp_c: Option<f64>,
    /// A different salinity, g/L.
    pub salinity_ppt: Option<f64>,
    /// A water change of this percent (0–100) with the source water.
    pub water_change_percent: Option<f64>,
}

impl WhatIf {
    /// True when nothing is changed.
    pub fn is_empty(&self) -> bool {
        *self == WhatIf::default()
    }
}

/// The sample after the changes. A water change mixes total ammonia and
/// temperature by volume, and takes the pH to the higher of the tank's and the
/// source's (pH does not mix predictably; see [`planning_ph`]); explicit pH,
/// temperature and salinity changes apply after it.
pub fn apply(sample: &WaterSample, source: &SourceWater, what_if: &WhatIf) -> WaterSample {
    let mut out = *sample;
    if let Some(percent) = what_if.water_change_percent {
        let x = (percent / 100.0).clamp(0.0, 1.0);
        out.tan_n_mg_l = dilution::after_change(sample.tan_n_mg_l, source.tan_n_mg_l, x);
        out.temp_c = dilution::mixed_temperature(sample.temp_c, source.temp_c.unwrap_or(sample.temp_c), x);
        if x > 0.0 {
            out.ph = planning_ph(sample.ph, source);
        }
    }
    if let Some(ph) = what_if.ph {
        out.ph = ph;
    }
    if let Some(t) = what_if.temp_c {
        out.temp_c = t;
    }
    if let Some(s) = what_if.salinity_ppt {
        out.salinity_ppt = s;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn water_change_dilutes_and_takes_the_source_ph() {
        // Reference §8 example: TAN 2.0 at pH 7.0, 50 % change with water of pH 7.6
        // → TAN 1.0 at pH 7.6; NH3-N goes from 0.0113 to 0.0221 at 25 °C.
        let sample = WaterSample { temp_c: 25.0, ph: 7.0, tan_n_mg_l: 2.0, salinity_ppt: 0.0, do_mg_l: None };
        let source = SourceWater { tan_n_mg_l: 0.0, ph: Some(7.6), temp_c: Some(25.0) };
        let after = apply(&sample, &source, &WhatIf { water_change_percent: Some(50.0), ..WhatIf::default() });
        assert_eq!(after.tan_n_mg_l, 1.0);
        assert_eq!(after.ph, 7.6);
        assert!((nh3_n(&sample) - 0.0113).abs() < 5e-5);
        assert!((nh3_n(&after) - 0.0221).abs() < 5e-5);
    }

    fn nh3_n(s: &WaterSample) -> f64 {
        s.toxic().nh3_n_mg_l
    }

    #[test]
    fn empty_what_if_changes_nothing() {
        let sample = WaterSample { temp_c: 24.0, ph: 7.2, tan_n_mg_l: 0.4, salinity_ppt: 1.0, do_mg_l: Some(7.0) };
        let source = SourceWater { tan_n_mg_l: 0.1, ph: Some(8.0), temp_c: None };
        assert_eq!(apply(&sample, &source, &WhatIf::default()), sample);
    }
}
