//! Latent risk: the NH3 the same total ammonia would give if pH rose.
//!
//! A tank at pH 6.6 holds most of its ammonia as harmless NH4+; a water change
//! with pH 8 water, a fresh bag of coral sand or an airstone that strips CO2
//! can turn it into NH3 within hours. The latent figure is the NH3 at the
//! source water's pH (from the room's source water or the last water-change
//! event), or at pH + 0.5 when the source pH is unknown (a design decision).

use serde::Serialize;

use crate::core::band::{Band, BandEdges};
use crate::core::sample::WaterSample;

/// The pH rise assumed when the source water's pH is unknown.
pub const DEFAULT_PH_STEP: f64 = 0.5;

/// Where the latent pH comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum LatentBasis {
    /// The room's source water pH.
    SourceWater,
    /// The pH of the water used in the last water change.
    LastWaterChange,
    /// No source pH known: the tank's pH plus [`DEFAULT_PH_STEP`].
    DefaultStep,
}

/// NH3 and band if the pH rose.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Latent {
    /// The pH assumed.
    pub ph: f64,
    /// Where that pH comes from.
    pub basis: LatentBasis,
    /// NH3-N at that pH, mg/L.
    pub nh3_n_mg_l: f64,
    /// NH3 at that pH, mg/L.
    pub nh3_mg_l: f64,
    /// Band at that pH (the assessment raises it by one, like the band, when
    /// the fish show signs).
    pub band: Band,
}

/// The latent risk of `sample`. `source_ph` is the known source pH and where it
/// came from; a source pH below the tank's pH means no rise.
pub fn latent(sample: &WaterSample, edges: &BandEdges, source_ph: Option<(f64, LatentBasis)>) -> Latent {
    let (ph, basis) = match source_ph {
        Some((ph, basis)) => (ph.max(sample.ph), basis),
        None => (sample.ph + DEFAULT_PH_STEP, LatentBasis::DefaultStep),
    };
    let toxic = WaterSample { ph: ph.min(14.0), ..*sample }.toxic();
    Latent { ph, basis, nh3_n_mg_l: toxic.nh3_n_mg_l, nh3_mg_l: toxic.nh3_mg_l, band: edges.classify(toxic.nh3_n_mg_l) }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn acid_tank_is_clear_now_and_critical_after_a_careless_change() {
        // pH 6.6, 26 °C, TAN 8 mg/L: f = 1/(1 + 10^(9.2138 − 6.6)) = 0.00243 →
        // NH3-N 0.0194 (clear). At source pH 8.2: f = 0.0883 → NH3-N 0.706 (critical).
        let sample = WaterSample { temp_c: 26.0, ph: 6.6, tan_n_mg_l: 8.0, salinity_ppt: 0.0, do_mg_l: None };
        let edges = BandEdges::DEFAULT;
        assert_eq!(edges.classify(sample.tan_n_mg_l * 0.00243), Band::Clear);
        let l = latent(&sample, &edges, Some((8.2, LatentBasis::SourceWater)));
        assert_eq!(l.band, Band::Critical);
        assert!((l.nh3_n_mg_l - 0.706).abs() < 0.01, "{}", l.nh3_n_mg_l);
    }

    #[test]
    fn lower_source_ph_means_no_rise_and_unknown_means_half_a_unit() {
        let sample = WaterSample { temp_c: 25.0, ph: 7.8, tan_n_mg_l: 0.5, salinity_ppt: 0.0, do_mg_l: None };
        let edges = BandEdges::DEFAULT;
        assert_eq!(latent(&sample, &edges, Some((7.0, LatentBasis::SourceWater))).ph, 7.8);
        let step = latent(&sample, &edges, None);
        assert_eq!(step.ph, 8.3);
        assert_eq!(step.basis, LatentBasis::DefaultStep);
    }
}
