//! Number formatting for people: significant figures without noise.

/// Formats `x` with `sig` significant figures, in plain (not scientific)
/// notation, trimming nothing: `sig(0.065247, 3)` is `"0.0652"`.
pub fn sig(x: f64, sig: usize) -> String {
    if !x.is_finite() {
        return "—".to_string();
    }
    if x == 0.0 {
        return format!("{:.*}", sig.saturating_sub(1), 0.0);
    }
    let magnitude = x.abs().log10().floor() as i32;
    let decimals = (sig as i32 - 1 - magnitude).max(0) as usize;
    format!("{x:.decimals$}")
}

/// Formats with a fixed number of decimals.
pub fn fixed(x: f64, decimals: usize) -> String {
    if !x.is_finite() {
        return "—".to_string();
    }
    format!("{x:.decimals$}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_figures() {
        assert_eq!(sig(0.065247, 3), "0.0652");
        assert_eq!(sig(5.3662, 3), "5.37");
        assert_eq!(sig(1234.6, 3), "1235");
        assert_eq!(sig(0.0, 3), "0.00");
        assert_eq!(sig(f64::NAN, 3), "—");
    }
}
