//! Trend of a tank's ammonia over its last readings.
//!
//! A least-squares slope over the most recent readings inside a window
//! (default: up to six readings within 14 days). The trend is called steady
//! when the slope is under a threshold that scales with the tank's band edges:
//! a change of a tenth of the watch edge per day is the smallest a person
//! should act on (a design decision).

use chrono::{DateTime, Duration, Utc};
use serde::Serialize;

/// Direction of a series.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Direction {
    /// Going up.
    Rising,
    /// No change worth acting on.
    Steady,
    /// Going down.
    Falling,
}

impl Direction {
    /// A one-character arrow.
    pub fn arrow(self) -> &'static str {
        match self {
            Direction::Rising => "↑",
            Direction::Steady => "→",
            Direction::Falling => "↓",
        }
    }

    /// Lower-case name.
    pub fn name(self) -> &'static str {
        match self {
            Direction::Rising => "rising",
            Direction::Steady => "steady",
            Direction::Falling => "falling",
        }
    }
}

/// A trend over a series of readings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Trend {
    /// Rising, steady or falling.
    pub direction: Direction,
    /// Least-squares slope, units per day.
    pub rate_per_day: f64,
    /// How many readings it rests on.
    pub readings: usize,
    /// Days between the first and last reading used.
    pub span_days: f64,
}

/// How many readings and how far back a trend looks.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TrendWindow {
    /// At most this many readings, the newest.
    pub max_readings: usize,
    /// Only readings this recent (counted back from the newest).
    pub max_age: Duration,
}

impl Default for TrendWindow {
    fn default() -> Self {
        TrendWindow { max_readings: 6, max_age: Duration::days(14) }
    }
}

/// The trend of `points` (time, value), in any order; `None` with fewer than
/// two readings in the window or when they share one time. `steady_rate` is
/// the absolute slope per day under which the series is steady.
pub fn trend(points: &[(DateTime<Utc>, f64)], window: TrendWindow, steady_rate: f64) -> Option<Trend> {
    let newest = points.iter().map(|p| p.0).max()?;
    let mut recent: Vec<_> =
        points.iter().filter(|(t, v)| newest - *t <= window.max_age && v.is_finite()).copied().collect();
    recent.sort_by_key(|p| std::cmp::Reverse(p.0));
    recent.truncate(window.max_readings);
    if recent.len() < 2 {
        return None;
    }
    let days: Vec<f64> = recent.iter().map(|(t, _)| (*t - newest).num_seconds() as f64 / 86_400.0).collect();
    let n = recent.len() as f64;
    let mean_x = days.iter().sum::<f64>() / n;
    let mean_y = recent.iter().map(|p| p.1).sum::<f64>() / n;
    let sxx: f64 = days.iter().map(|x| (x - mean_x).powi(2)).sum();
    if sxx <= 0.0 {
        return None;
    }
    let sxy: f64 = days.iter().zip(&recent).map(|(x, (_, y))| (x - mean_x) * (y - mean_y)).sum();
    let rate = sxy / sxx;
    let direction = if rate.abs() < steady_rate {
        Direction::Steady
    } else if rate > 0.0 {
        Direction::Rising
    } else {
        Direction::Falling
    };
    let span_days = days.iter().copied().fold(0.0_f64, f64::min).abs();
    Some(Trend { direction, rate_per_day: rate, readings: recent.len(), span_days })
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;

    fn day(d: i64) -> DateTime<Utc> {
        Utc.with_ymd_and_hms(2026, 11, 1, 8, 0, 0).unwrap() + Duration::days(d)
    }

    #[test]
    fn slope_of_a_straight_line() {
        let points: Vec<_> = (0..5).map(|d| (day(d), 0.01 + 0.004 * d as f64)).collect();
        let t = trend(&points, TrendWindow::default(), 0.002).unwrap();
        assert_eq!(t.direction, Direction::Rising);
        assert!((t.rate_per_day - 0.004).abs() < 1e-12);
        assert_eq!(t.readings, 5);
        assert!((t.span_days - 4.0).abs() < 1e-12);
    }

    #[test]
    fn window_drops_old_readings_and_small_slopes_are_steady() {
        let mut points = vec![(day(-30), 5.0)];
        points.extend((0..4).map(|d| (day(d), 0.02 - 0.0005 * d as f64)));
        let t = trend(&points, TrendWindow::default(), 0.002).unwrap();
        assert_eq!(t.direction, Direction::Steady);
        assert_eq!(t.readings, 4);
        assert!(trend(&points[..1], TrendWindow::default(), 0.002).is_none());
    }
}
