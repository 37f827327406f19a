//! The ammonia–ammonium equilibrium: pKa, un-ionized fraction and toxic NH3.
//!
//! # Method
//!
//! Fresh water, Emerson, Russo, Lund & Thurston (1975), *J. Fish. Res. Board
//! Can.* 32:2379–2383:
//!
//! ```text
//! pKa = 0.09018 + 2729.92 / T        T in kelvin = t °C + 273.15
//! f   = 1 / (1 + 10^(pKa − pH))      un-ionized fraction, molar basis
//! ```
//!
//! Salt water, the ionic-strength term of Khoo, Culberson & Bates (1977),
//! *J. Solution Chem.* 6:281, in the form Bower & Bidwell (1978), *J. Fish.
//! Res. Board Can.* 35:1012, combined with Emerson's freshwater pKa:
//!
//! ```text
//! I      = 19.9273 S / (1000 − 1.005109 S)        ionic strength, mol/kg
//! pKa_s  = pKa + (0.1552 − 0.000314 t) I          t in °C
//! ```
//!
//! Bell, Johnson, Jickells & Liss (2007), *Environ. Chem.* 4:183, report an
//! error in one printed form of the Khoo expression that can overstate NH3 by
//! up to about 500 %. The form used here takes `t` in °C, as the Khoo abstract
//! states, and gives a salt effect of +0.10 pKa at S = 34 and 25 °C, the same
//! size as the Pitzer-model constants of Clegg & Whitfield (1995), which are
//! coded in [`pka_cw95_total`] for cross-checking. Tests pin the Bower–Bidwell
//! fraction between the Clegg–Whitfield fractions for an NBS-scale and a
//! total-scale reading of the same electrode value.
//!
//! # pH convention
//!
//! pH is taken as a glass-electrode (or kit) reading calibrated with
//! low-ionic-strength NBS buffers, which is how fish-room pH is measured and
//! what both Emerson and Bower & Bidwell assume.
//!
//! # Valid range
//!
//! Emerson's table spans 0–30 °C and pH 6–10; the fit rests on pKa data for
//! 0–50 °C (from memory). The Khoo data cover S ≈ 20–45 and 5–40 °C; below
//! S = 20 (brackish or salted freshwater tanks) the term is an extrapolation
//! that goes smoothly to zero at S = 0.

use super::units::NH3_PER_N;

/// Kelvin offset used by the equations (t °C + 273.15).
pub const KELVIN: f64 = 273.15;

/// pKa of NH4+ in fresh water at `temp_c` (Emerson et al. 1975).
#[inline]
pub fn pka_freshwater(temp_c: f64) -> f64 {
    0.09018 + 2729.92 / (temp_c + KELVIN)
}

/// Ionic strength (mol/kg) of seawater of practical salinity `salinity`
/// (Bower & Bidwell 1978 form of the seawater relation).
#[inline]
pub fn ionic_strength(salinity: f64) -> f64 {
    19.9273 * salinity / (1000.0 - 1.005109 * salinity)
}

/// pKa of NH4+ at `temp_c` and practical salinity `salinity`: Emerson's pKa
/// plus the Khoo et al. (1977) ionic-strength term as used by Bower & Bidwell
/// (1978). Reduces to [`pka_freshwater`] at S = 0.
#[inline]
pub fn pka(temp_c: f64, salinity: f64) -> f64 {
    pka_freshwater(temp_c) + (0.1552 - 0.000314 * temp_c) * ionic_strength(salinity)
}

/// Un-ionized fraction NH3/(NH3 + NH4+) for a given pKa and pH
/// (Henderson–Hasselbalch). Always in [0, 1].
#[inline]
pub fn unionized_fraction(pka: f64, ph: f64) -> f64 {
    1.0 / (1.0 + 10f64.powf(pka - ph))
}

/// Stoichiometric pK* of NH4+ on the total pH scale, mol/kg-seawater basis,
/// from Clegg & Whitfield (1995), *Geochim. Cosmochim. Acta* 59:2403, eq. 18,
/// converted from mol/kg-H2O with the factor (1 − 0.001005 S).
///
/// Valid for S 0–40 and −2 to 40 °C. Used only as an independent cross-check
/// of [`pka`]: its pH is a total-scale concentration pH, not an electrode
/// reading.
pub fn pka_cw95_total(temp_c: f64, salinity: f64) -> f64 {
    let t = temp_c + KELVIN;
    let s = salinity;
    let sqrt_t = t.sqrt();
    let pk_water_basis = 9.244605 - 2729.33 * (1.0 / 298.15 - 1.0 / t)
        + (0.04203362 - 11.24742 / t) * s.powf(0.25)
        + (-13.6416 + 1.176949 * sqrt_t - 0.02860785 * t + 545.4834 / t) * s.sqrt()
        + (-0.1462507 + 0.0090226468 * sqrt_t - 0.0001471361 * t + 10.5425 / t) * s.powf(1.5)
        + (0.004669309 - 0.0001691742 * sqrt_t - 0.5677934 / t) * s * s
        + (-2.354039e-05 + 0.009698623 / t) * s.powf(2.5);
    // K(kg-SW) = K(kg-H2O) · (1 − 0.001005 S), so pK rises by −log10 of that factor.
    pk_water_basis - (1.0 - 0.001005 * s).log10()
}

/// The inputs of one toxic-ammonia computation, in canonical units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AmmoniaInputs {
    /// Total ammonia nitrogen, mg N/L.
    pub tan_n_mg_l: f64,
    /// pH, NBS-buffer glass-electrode reading.
    pub ph: f64,
    /// Water temperature, °C.
    pub temp_c: f64,
    /// Practical salinity (≈ g/kg, "ppt"); 0 for fresh water.
    pub salinity_ppt: f64,
}

/// The toxic (un-ionized) ammonia derived from one set of inputs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ToxicAmmonia {
    /// pKa of NH4+ at the reading's temperature and salinity.
    pub pka: f64,
    /// Un-ionized fraction, 0–1.
    pub fraction: f64,
    /// Un-ionized ammonia as mg NH3-N/L.
    pub nh3_n_mg_l: f64,
    /// Un-ionized ammonia as mg NH3/L.
    pub nh3_mg_l: f64,
}

/// Toxic ammonia from total ammonia, pH, temperature and salinity
/// (Emerson et al. 1975 with the Bower & Bidwell 1978 salinity term).
#[inline]
pub fn toxic_ammonia(inputs: &AmmoniaInputs) -> ToxicAmmonia {
    let pka = pka(inputs.temp_c, inputs.salinity_ppt);
    let fraction = unionized_fraction(pka, inputs.ph);
    let nh3_n_mg_l = inputs.tan_n_mg_l * fraction;
    ToxicAmmonia { pka, fraction, nh3_n_mg_l, nh3_mg_l: nh3_n_mg_l * NH3_PER_N }
}

/// The total ammonia (mg N/L) at which the un-ionized part reaches
/// `nh3_n_mg_l` under the given pH, temperature and salinity: the inverse of
/// [`toxic_ammonia`], used to turn a band edge into a total-ammonia target.
#[inline]
pub fn tan_for_nh3_n(nh3_n_mg_l: f64, ph: f64, temp_c: f64, salinity_ppt: f64) -> f64 {
    nh3_n_mg_l / unionized_fraction(pka(temp_c, salinity_ppt), ph)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn salinity_term_vanishes_in_fresh_water() {
        for t in [0.0, 12.5, 25.0, 40.0] {
            assert_eq!(pka(t, 0.0), pka_freshwater(t));
        }
    }

    #[test]
    fn inverse_recovers_total_ammonia() {
        let inputs = AmmoniaInputs { tan_n_mg_l: 1.7, ph: 7.3, temp_c: 26.0, salinity_ppt: 3.0 };
        let out = toxic_ammonia(&inputs);
        let back = tan_for_nh3_n(out.nh3_n_mg_l, 7.3, 26.0, 3.0);
        assert!((back - 1.7).abs() < 1e-12);
    }
}
