//! Salinity from conductivity (PSS-78) and from specific gravity (EOS-80).
//!
//! # Practical salinity from conductivity
//!
//! PSS-78 (UNESCO 1981/1983; Fofonoff & Millard 1983, *UNESCO Tech. Pap. Mar.
//! Sci.* 44). With R = C / C(35, 15, 0) and C(35, 15, 0) = 42.914 mS/cm:
//!
//! ```text
//! r_t = c0 + c1 t + c2 t² + c3 t³ + c4 t⁴
//! R_p = 1 + p (e1 + e2 p + e3 p²) / (1 + d1 t + d2 t² + (d3 + d4 t) R)
//! R_t = R / (R_p r_t)
//! S   = Σ a_i R_t^(i/2) + (t − 15)/(1 + k (t − 15)) Σ b_i R_t^(i/2)
//! ```
//!
//! with t on IPTS-68 (t68 = 1.00024 t90). Valid 2 ≤ S ≤ 42, −2 to 35 °C (from
//! memory). Below S = 2 the Hill, Dauphinee & Woods (1986) extension is
//! applied, scaled so that it meets PSS-78 exactly at S = 2, as TEOS-10 does.
//!
//! # Salinity from specific gravity
//!
//! Seawater density at one atmosphere from EOS-80 (Millero & Poisson 1981,
//! *Deep-Sea Res.* 28A:625; UNESCO 1981), valid S 0–42 and −2 to 40 °C. A
//! specific gravity `t/t` is ρ(S, t)/ρ(0, t); the inverse is solved by
//! bisection. Glass hydrometers read true only at their calibration
//! temperature, and refractometer SG scales differ by maker: the reference
//! temperature must be stated (common practice, no source).

/// Conductivity of standard seawater, S = 35 at 15 °C and 0 dbar (mS/cm).
pub const C_35_15_0_MS_CM: f64 = 42.914;

const A: [f64; 6] = [0.0080, -0.1692, 25.3851, 14.0941, -7.0261, 2.7081];
const B: [f64; 6] = [0.0005, -0.0056, -0.0066, -0.0375, 0.0636, -0.0144];
const K: f64 = 0.0162;
const C: [f64; 5] = [0.6766097, 2.00564e-2, 1.104259e-4, -6.9698e-7, 1.0031e-9];
const D: [f64; 4] = [3.426e-2, 4.464e-4, 4.215e-1, -3.107e-3];
const E: [f64; 3] = [2.070e-5, -6.370e-10, 3.989e-15];

/// ITS-90 temperature to IPTS-68, as PSS-78 and EOS-80 expect.
#[inline]
pub fn t68_from_t90(t90: f64) -> f64 {
    1.00024 * t90
}

#[inline]
fn temperature_factor(t68: f64) -> f64 {
    (t68 - 15.0) / (1.0 + K * (t68 - 15.0))
}

/// PSS-78 salinity from the ratio R_t at `t68`, without the Hill extension.
fn pss78_from_rt(rt: f64, t68: f64) -> f64 {
    let root = rt.max(0.0).sqrt();
    let (mut sa, mut sb, mut power) = (0.0, 0.0, 1.0);
    for i in 0..6 {
        sa += A[i] * power;
        sb += B[i] * power;
        power *= root;
    }
    sa + temperature_factor(t68) * sb
}

/// Hill et al. (1986) low-salinity form, before the continuity scaling.
fn hill_raw(rt: f64, t68: f64, pss78: f64) -> f64 {
    let x = 400.0 * rt;
    let sqrt_y = (100.0 * rt).sqrt();
    let part1 = 1.0 + x * (1.5 + x);
    let part2 = 1.0 + sqrt_y * (1.0 + sqrt_y * (1.0 + sqrt_y));
    pss78 - A[0] / part1 - B[0] * temperature_factor(t68) / part2
}

/// The ratio 2 / S_Hill at the R_t where PSS-78 gives exactly S = 2, so that
/// the extension joins PSS-78 without a step (the TEOS-10 definition).
fn hill_ratio_at_2(t68: f64) -> f64 {
    // PSS-78 salinity increases monotonically with R_t: bisect for S = 2.
    let (mut lo, mut hi) = (0.0_f64, 0.2_f64);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if pss78_from_rt(mid, t68) < 2.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo <= f64::EPSILON * hi {
            break;
        }
    }
    let rt = 0.5 * (lo + hi);
    2.0 / hill_raw(rt, t68, pss78_from_rt(rt, t68))
}

/// Practical salinity from conductivity `cond_ms_cm` (mS/cm) measured at
/// `temp_c` (ITS-90) and sea pressure `pressure_dbar` (0 for a tank).
pub fn practical_salinity(cond_ms_cm: f64, temp_c: f64, pressure_dbar: f64) -> f64 {
    let t68 = t68_from_t90(temp_c);
    let r = cond_ms_cm / C_35_15_0_MS_CM;
    let p = pressure_dbar;
    let rt_lc = C[0] + t68 * (C[1] + t68 * (C[2] + t68 * (C[3] + t68 * C[4])));
    let rp = 1.0 + p * (E[0] + p * (E[1] + p * E[2])) / (1.0 + t68 * (D[0] + t68 * D[1]) + (D[2] + D[3] * t68) * r);
    let rt = r / (rp * rt_lc);
    let s = pss78_from_rt(rt, t68);
    if s >= 2.0 { s } else { (hill_ratio_at_2(t68) * hill_raw(rt, t68, s)).max(0.0) }
}

/// Practical salinity from a conductivity in µS/cm that the meter reports
/// compensated to `reference_c` (25 °C for most meters).
pub fn salinity_from_conductivity_us_cm(cond_us_cm: f64, reference_c: f64) -> f64 {
    practical_salinity(cond_us_cm / 1000.0, reference_c, 0.0)
}

/// Density of pure water at one atmosphere, kg/m³, `t68` in °C (IPTS-68;
/// Bigg 1967 as used by EOS-80).
pub fn pure_water_density(t68: f64) -> f64 {
    999.842594
        + t68 * (6.793952e-2 + t68 * (-9.095290e-3 + t68 * (1.001685e-4 + t68 * (-1.120083e-6 + t68 * 6.536332e-9))))
}

/// Seawater density at one atmosphere, kg/m³ (EOS-80, Millero & Poisson 1981),
/// for practical salinity `salinity` and temperature `temp_c` (ITS-90).
pub fn seawater_density(salinity: f64, temp_c: f64) -> f64 {
    let t = t68_from_t90(temp_c);
    let s = salinity;
    let a = 8.24493e-1 + t * (-4.0899e-3 + t * (7.6438e-5 + t * (-8.2467e-7 + t * 5.3875e-9)));
    let b = -5.72466e-3 + t * (1.0227e-4 - 1.6546e-6 * t);
    let c = 4.8314e-4;
    pure_water_density(t) + a * s + b * s * s.sqrt() + c * s * s
}

/// Specific gravity `t/t`: seawater at `reference_c` over pure water at the
/// same temperature (the "60/60 °F" convention is `reference_c` = 15.556).
pub fn specific_gravity(salinity: f64, reference_c: f64) -> f64 {
    seawater_density(salinity, reference_c) / seawater_density(0.0, reference_c)
}

/// Practical salinity from a specific gravity read at (or compensated to)
/// `reference_c`, by bisection on EOS-80 over S 0–50. Values below 1 give 0.
pub fn salinity_from_specific_gravity(sg: f64, reference_c: f64) -> f64 {
    let (mut lo, mut hi) = (0.0_f64, 50.0_f64);
    if specific_gravity(lo, reference_c) >= sg {
        return 0.0;
    }
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if specific_gravity(mid, reference_c) < sg {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    0.5 * (lo + hi)
}

/// A salinity reading as the instrument gives it.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(tag = "as", rename_all = "snake_case")]
pub enum SalinityReading {
    /// Practical salinity or g/L ("ppt"), read directly.
    Ppt {
        /// The value, g/L.
        value: f64,
    },
    /// Specific gravity `t/t` at (or compensated to) `reference_c`.
    SpecificGravity {
        /// The specific gravity.
        value: f64,
        /// The instrument's reference temperature, °C (15.556 for 60/60 °F).
        reference_c: f64,
    },
    /// Conductivity in µS/cm, compensated to `reference_c` (25 °C on most meters).
    Conductivity {
        /// The conductivity, µS/cm.
        value_us_cm: f64,
        /// The temperature the meter compensates to, °C.
        reference_c: f64,
    },
}

impl SalinityReading {
    /// Practical salinity (≈ g/L) of this reading.
    pub fn practical_salinity(&self) -> f64 {
        match *self {
            SalinityReading::Ppt { value } => value,
            SalinityReading::SpecificGravity { value, reference_c } => {
                salinity_from_specific_gravity(value, reference_c)
            }
            SalinityReading::Conductivity { value_us_cm, reference_c } => {
                salinity_from_conductivity_us_cm(value_us_cm, reference_c)
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn extension_is_continuous_at_two() {
        for t in [5.0, 15.0, 25.0] {
            // Find a conductivity just either side of S = 2 and compare.
            let (mut lo, mut hi) = (0.0, 10.0);
            for _ in 0..200 {
                let mid = 0.5 * (lo + hi);
                if practical_salinity(mid, t, 0.0) < 2.0 { lo = mid } else { hi = mid }
            }
            let below = practical_salinity(lo * (1.0 - 1e-9), t, 0.0);
            let above = practical_salinity(hi * (1.0 + 1e-9), t, 0.0);
            assert!((above - below).abs() < 1e-6, "{t}: {below} vs {above}");
        }
    }

    #[test]
    fn specific_gravity_inverts() {
        for s in [0.5, 10.0, 33.0, 36.0] {
            let sg = specific_gravity(s, 25.0);
            assert!((salinity_from_specific_gravity(sg, 25.0) - s).abs() < 1e-9);
        }
    }
}
