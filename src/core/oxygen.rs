//! Dissolved-oxygen saturation (Benson & Krause 1984), with salinity and
//! barometric pressure or elevation.
//!
//! Source: Benson & Krause 1984, *Limnol. Oceanogr.* 29:620–632, as adopted by
//! USGS (OWQ Tech. Memo 2011.03) and APHA Standard Methods 4500-O:
//!
//! ```text
//! ln C* = −139.34411 + 1.575701e5/T − 6.642308e7/T² + 1.243800e10/T³
//!         − 8.621949e11/T⁴ − S (0.017674 − 10.754/T + 2140.7/T²)
//! ```
//!
//! C* in mg/L for water in equilibrium with water-saturated air at 1 atm.
//! At pressure P (atm):
//!
//! ```text
//! C_p = C* P (1 − Pwv/P)(1 − θP) / ((1 − Pwv)(1 − θ))
//! θ   = 0.000975 − 1.426e−5 t + 6.436e−8 t²
//! ```
//!
//! with the water-vapour pressure Pwv (atm) of Green & Carritt (1967) scaled by
//! (1 − 0.000537 S). Valid 0–40 °C, S 0–40, 0.5–1.1 atm (USGS).

use super::ammonia::KELVIN;

/// Oxygen solubility (mg/L) at 1 atm, `temp_c` and practical salinity.
pub fn saturation_1atm(temp_c: f64, salinity: f64) -> f64 {
    let t = temp_c + KELVIN;
    let ln_c = -139.34411 + 1.575701e5 / t - 6.642308e7 / t.powi(2) + 1.243800e10 / t.powi(3)
        - 8.621949e11 / t.powi(4)
        - salinity * (0.017674 - 10.754 / t + 2140.7 / t.powi(2));
    ln_c.exp()
}

/// Water-vapour pressure (atm) over seawater of salinity `salinity` at
/// `temp_c` (Green & Carritt 1967, with the (1 − 0.000537 S) factor).
pub fn vapour_pressure_atm(temp_c: f64, salinity: f64) -> f64 {
    let t = temp_c + KELVIN;
    let steam = 373.16;
    let ln_p = 18.1973 * (1.0 - steam / t) + 3.1813e-7 * (1.0 - (26.1205 * (1.0 - t / steam)).exp())
        - 0.018726 * (1.0 - (8.03945 * (1.0 - steam / t)).exp())
        + 5.02802 * (steam / t).ln();
    (1.0 - 0.000537 * salinity) * ln_p.exp()
}

/// Oxygen solubility (mg/L) at barometric pressure `pressure_atm`.
pub fn saturation(temp_c: f64, salinity: f64, pressure_atm: f64) -> f64 {
    let pwv = vapour_pressure_atm(temp_c, salinity);
    let theta = 0.000975 - 1.426e-5 * temp_c + 6.436e-8 * temp_c * temp_c;
    saturation_1atm(temp_c, salinity) * pressure_atm * (1.0 - pwv / pressure_atm) * (1.0 - theta * pressure_atm)
        / ((1.0 - pwv) * (1.0 - theta))
}

/// Standard-atmosphere pressure (atm) at `elevation_m` metres: the
/// troposphere formula of the US Standard Atmosphere 1976 / ISO 2533 (from
/// memory). Weather moves real pressure by a few percent, so a barometer
/// reading is better when one is available (common practice, no source).
pub fn pressure_at_elevation_atm(elevation_m: f64) -> f64 {
    (1.0 - 2.25577e-5 * elevation_m).powf(5.25588)
}

/// Measured dissolved oxygen as a percent of saturation.
pub fn percent_saturation(measured_mg_l: f64, saturation_mg_l: f64) -> f64 {
    100.0 * measured_mg_l / saturation_mg_l
}
