//! Water-change mass balance for total ammonia (derived; no external source).
//!
//! Replacing fraction `x` of the water with source water of concentration
//! `c_s`, with complete mixing and no nitrification during the change:
//!
//! ```text
//! c1 = (1 − x) c0 + x c_s
//! cn = c_s + (c0 − c_s)(1 − x)^n           after n identical changes
//! n  = ln[(c_t − c_s)/(c0 − c_s)] / ln(1 − x)
//! ```
//!
//! pH does not mix linearly (it depends on alkalinity and CO2), so callers
//! recompute NH3 at a stated pH; temperature mixes roughly by volume.

/// Concentration after replacing fraction `x` (0–1) with source water.
#[inline]
pub fn after_change(c0: f64, source: f64, x: f64) -> f64 {
    (1.0 - x) * c0 + x * source
}

/// Concentration after `n` identical changes of fraction `x`.
#[inline]
pub fn after_changes(c0: f64, source: f64, x: f64, n: u32) -> f64 {
    source + (c0 - source) * (1.0 - x).powi(n as i32)
}

/// The single-change fraction that brings `c0` down to `target` with source
/// water at `source`. `None` when the target cannot be reached by dilution
/// (target at or below the source water's own level); `Some(0.0)` when no
/// change is needed.
pub fn fraction_to_reach(c0: f64, source: f64, target: f64) -> Option<f64> {
    if c0 <= target {
        return Some(0.0);
    }
    if target <= source {
        return None;
    }
    Some((c0 - target) / (c0 - source))
}

/// How many changes of fraction `x` bring `c0` down to `target`, rounded up.
/// `None` when the target cannot be reached (see [`fraction_to_reach`]) or
/// `x` is not in (0, 1).
pub fn changes_to_reach(c0: f64, source: f64, target: f64, x: f64) -> Option<u32> {
    if c0 <= target {
        return Some(0);
    }
    if target <= source || !(x > 0.0 && x < 1.0) {
        return None;
    }
    let n = ((target - source) / (c0 - source)).ln() / (1.0 - x).ln();
    // A hair of tolerance so that an exact answer like 3.0000000001 stays 3.
    Some((n - 1e-9).ceil().max(1.0) as u32)
}

/// Mixed temperature after replacing fraction `x` with water at `source_c`.
#[inline]
pub fn mixed_temperature(tank_c: f64, source_c: f64, x: f64) -> f64 {
    (1.0 - x) * tank_c + x * source_c
}

/// The single fraction equal to `n` changes of fraction `x`: 1 − (1 − x)^n.
#[inline]
pub fn equivalent_fraction(x: f64, n: u32) -> f64 {
    1.0 - (1.0 - x).powi(n as i32)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn repeated_changes_equal_one_larger_change() {
        // Reference §8: 3 × 50 % = 87.5 %; 2 × 25 % = 43.75 %.
        assert!((equivalent_fraction(0.5, 3) - 0.875).abs() < 1e-15);
        assert!((equivalent_fraction(0.25, 2) - 0.4375).abs() < 1e-15);
    }

    #[test]
    fn fraction_and_count_agree_with_the_balance() {
        let x = fraction_to_reach(2.0, 0.5, 1.25).unwrap();
        assert!((after_change(2.0, 0.5, x) - 1.25).abs() < 1e-12);
        assert_eq!(changes_to_reach(2.0, 0.0, 0.25, 0.5), Some(3));
        assert_eq!(changes_to_reach(2.0, 0.5, 0.4, 0.5), None);
        assert_eq!(fraction_to_reach(1.0, 0.0, 2.0), Some(0.0));
    }
}
