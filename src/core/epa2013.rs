//! US EPA 2013 freshwater aquatic-life criteria for ammonia, mg TAN-N/L.
//!
//! Source: US EPA 2013, *Aquatic Life Ambient Water Quality Criteria for
//! Ammonia – Freshwater 2013*, EPA-822-R-13-001 (notice: Fed. Reg. 78:52192).
//! EPA tabulates pH 6.5–9.0 and 0–30 °C (from memory); outside that range the
//! equations are extrapolations. These criteria protect wild communities
//! (mussels and snails included): they are a second reference line, not a
//! culture target.

/// Which acute criterion applies: with or without salmonids (genus
/// *Oncorhynchus*) present.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Salmonids {
    /// *Oncorhynchus* present (trout, salmon).
    Present,
    /// *Oncorhynchus* absent: the default for tropical fish rooms.
    Absent,
}

#[inline]
fn acute_ph_term(ph: f64) -> f64 {
    0.0114 / (1.0 + 10f64.powf(7.204 - ph)) + 1.6181 / (1.0 + 10f64.powf(ph - 7.204))
}

/// Criterion maximum concentration (acute, 1-hour average), mg TAN-N/L.
pub fn acute(ph: f64, temp_c: f64, salmonids: Salmonids) -> f64 {
    let temp_term = 23.12 * 10f64.powf(0.036 * (20.0 - temp_c));
    match salmonids {
        Salmonids::Present => {
            let salmonid = 0.275 / (1.0 + 10f64.powf(7.204 - ph)) + 39.0 / (1.0 + 10f64.powf(ph - 7.204));
            salmonid.min(0.7249 * acute_ph_term(ph) * temp_term)
        }
        Salmonids::Absent => 0.7249 * acute_ph_term(ph) * temp_term.min(51.93),
    }
}

/// Criterion continuous concentration (chronic, 30-day rolling average),
/// mg TAN-N/L.
pub fn chronic(ph: f64, temp_c: f64) -> f64 {
    let ph_term = 0.0278 / (1.0 + 10f64.powf(7.688 - ph)) + 1.1994 / (1.0 + 10f64.powf(ph - 7.688));
    0.8876 * ph_term * 2.126 * 10f64.powf(0.028 * (20.0 - temp_c.max(7.0)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn headline_values_at_ph7_20c() {
        // EPA 2013 headline figures, 17 (acute) and 1.9 (chronic) mg TAN/L at
        // pH 7 and 20 °C, as quoted in secondary summaries (reference §4).
        assert!((acute(7.0, 20.0, Salmonids::Absent) - 17.0).abs() < 0.5);
        assert!((chronic(7.0, 20.0) - 1.9).abs() < 0.05);
    }
}
