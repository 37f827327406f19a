//! Everything derived from one water sample: toxic ammonia, its band, the
//! EPA 2013 reference line and oxygen saturation.

use super::ammonia::{AmmoniaInputs, ToxicAmmonia, toxic_ammonia};
use super::band::{Band, BandEdges};
use super::{epa2013, oxygen};

/// Above this salinity (g/L) the freshwater EPA 2013 criteria are not shown:
/// salted freshwater tanks stay below it, brackish and marine water do not.
pub const EPA_FRESHWATER_MAX_SALINITY: f64 = 5.0;

/// One water sample in canonical units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct WaterSample {
    /// Temperature, °C.
    pub temp_c: f64,
    /// pH (NBS electrode reading).
    pub ph: f64,
    /// Total ammonia nitrogen, mg N/L.
    pub tan_n_mg_l: f64,
    /// Practical salinity, g/L.
    pub salinity_ppt: f64,
    /// Dissolved oxygen, mg/L, when measured.
    pub do_mg_l: Option<f64>,
}

impl WaterSample {
    /// The inputs of the ammonia equilibrium.
    pub fn ammonia_inputs(&self) -> AmmoniaInputs {
        AmmoniaInputs { tan_n_mg_l: self.tan_n_mg_l, ph: self.ph, temp_c: self.temp_c, salinity_ppt: self.salinity_ppt }
    }

    /// The un-ionized ammonia of this sample.
    pub fn toxic(&self) -> ToxicAmmonia {
        toxic_ammonia(&self.ammonia_inputs())
    }
}

/// Figures derived from a [`WaterSample`]; computed, never stored.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Derived {
    /// The un-ionized ammonia.
    pub toxic: ToxicAmmonia,
    /// Band of the NH3-N against the edges used.
    pub band: Band,
    /// EPA 2013 acute criterion (Oncorhynchus absent), mg TAN-N/L; `None` in
    /// brackish or marine water.
    pub epa_acute_tan_n_mg_l: Option<f64>,
    /// EPA 2013 chronic criterion, mg TAN-N/L; `None` in brackish or marine water.
    pub epa_chronic_tan_n_mg_l: Option<f64>,
    /// Oxygen saturation at the sample's temperature, salinity and elevation, mg/L.
    pub do_saturation_mg_l: f64,
    /// Measured oxygen as percent of saturation, when oxygen was measured.
    pub do_percent: Option<f64>,
}

/// Derives every figure for `sample` against `edges`, at `elevation_m`.
pub fn derive(sample: &WaterSample, edges: &BandEdges, elevation_m: f64) -> Derived {
    let toxic = sample.toxic();
    let fresh = sample.salinity_ppt <= EPA_FRESHWATER_MAX_SALINITY;
    let pressure = oxygen::pressure_at_elevation_atm(elevation_m);
    let do_saturation_mg_l = oxygen::saturation(sample.temp_c, sample.salinity_ppt, pressure);
    Derived {
        toxic,
        band: edges.classify(toxic.nh3_n_mg_l),
        epa_acute_tan_n_mg_l: fresh.then(|| epa2013::acute(sample.ph, sample.temp_c, epa2013::Salmonids::Absent)),
        epa_chronic_tan_n_mg_l: fresh.then(|| epa2013::chronic(sample.ph, sample.temp_c)),
        do_saturation_mg_l,
        do_percent: sample.do_mg_l.map(|d| oxygen::percent_saturation(d, do_saturation_mg_l)),
    }
}
