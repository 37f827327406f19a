//! The report's words and numbers, shared by every renderer.

use chrono::{DateTime, FixedOffset};

use super::{Counts, EventView, ReadingView, Reason, RoundReport, Selection, TankStatus, Units};
use crate::core::band::Band;
use crate::model::facility::TemperatureUnit;
use crate::model::record::{EventKind, Target};
use crate::numfmt::sig;
use crate::rules::latent::LatentBasis;
use crate::rules::trend::Trend;

/// A number with at most `decimals` decimals and no trailing zeros: `30`, `12.5`.
pub fn plain(x: f64, decimals: usize) -> String {
    let s = format!("{x:.decimals$}");
    if s.contains('.') { s.trim_end_matches('0').trim_end_matches('.').to_string() } else { s }
}

/// A concentration: three significant figures, a plain zero.
pub fn conc(x: f64) -> String {
    if x == 0.0 { "0".to_string() } else { sig(x, 3) }
}

/// A temperature in the room's unit, with its symbol.
pub fn temperature(units: &Units, celsius: f64) -> String {
    format!("{} {}", plain(units.temperature_unit.from_celsius(celsius), 1), units.temperature)
}

/// A time in the report's offset: `Tue 1 Dec 07:21`.
pub fn when(at: &DateTime<FixedOffset>) -> String {
    at.format("%a %-d %b %H:%M").to_string()
}

/// A time of day: `07:21`.
pub fn clock(at: &DateTime<FixedOffset>) -> String {
    at.format("%H:%M").to_string()
}

/// A day: `1 Dec 2026`.
pub fn day(at: &DateTime<FixedOffset>) -> String {
    at.format("%-d %b %Y").to_string()
}

/// The span of a window as people say it.
pub fn span(since: &DateTime<FixedOffset>, until: &DateTime<FixedOffset>) -> String {
    if since.date_naive() == until.date_naive() {
        format!("{} {}–{}", day(since), clock(since), clock(until))
    } else {
        format!("{} {} – {} {}", day(since), clock(since), day(until), clock(until))
    }
}

/// `tank Q-1` or `system RACK-B`.
pub fn target(target: &Target) -> String {
    target.to_string()
}

/// The band as words with its glyph: `◆ act`.
pub fn band(band: Option<Band>) -> String {
    band.map_or_else(|| "no NH3 figure".to_string(), |b| format!("{} {}", b.glyph(), b.name()))
}

/// What the report covers, in words.
pub fn selection(selection: &Selection) -> String {
    match selection {
        Selection::Room => "every tank".to_string(),
        Selection::System(id) => format!("system {id}"),
        Selection::Tank(id) => format!("tank {id}"),
    }
}

/// A list of things in words: `a`, `a and b`, `a, b and c`.
pub fn list(items: &[String]) -> String {
    match items {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

/// `1 tank`, `3 tanks`.
pub fn count(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// Tank labels, shortened when many: `B-01 … B-12 (12 tanks)`.
pub fn tanks(labels: &[String]) -> String {
    match labels {
        [] => String::new(),
        [one] => one.clone(),
        [a, b] => format!("{a} and {b}"),
        [first, .., last] => format!("{first} … {last} ({} tanks)", labels.len()),
    }
}

/// An event in words, temperatures in the room's unit.
pub fn event(kind: &EventKind, unit: TemperatureUnit) -> String {
    let temp = |c: f64| format!("{} {}", plain(unit.from_celsius(c), 1), unit.symbol());
    match kind {
        EventKind::WaterChange { percent, source_ph, source_tan_n_mg_l, source_temp_c, dechlorinated } => {
            let mut source = Vec::new();
            if let Some(ph) = source_ph {
                source.push(format!("pH {ph:.1}"));
            }
            if let Some(tan) = source_tan_n_mg_l {
                source.push(format!("TAN-N {}", conc(*tan)));
            }
            if let Some(t) = source_temp_c {
                source.push(temp(*t));
            }
            source.push(if *dechlorinated { "dechlorinated".into() } else { "not dechlorinated".into() });
            format!("water change {} % (new water {})", plain(*percent, 1), source.join(", "))
        }
        EventKind::FeedingHeld => "feeding held".into(),
        EventKind::FeedingResumed => "feeding resumed".into(),
        EventKind::Medication { class, name } => format!("medication: {name} ({})", class.name()),
        EventKind::FilterCleaned { rinsed_in_tap_water } => format!(
            "filter cleaned ({})",
            if *rinsed_in_tap_water { "rinsed in tap water" } else { "not in tap water" }
        ),
        EventKind::SubstrateReplaced => "substrate replaced".into(),
        EventKind::FishAdded { count } => format!("{count} fish added"),
        EventKind::DeadFishRemoved { count } => format!("{count} dead fish removed"),
        EventKind::SaltAdded { grams } => {
            if *grams >= 1000.0 {
                format!("{} kg salt added", plain(grams / 1000.0, 2))
            } else {
                format!("{} g salt added", plain(*grams, 1))
            }
        }
        EventKind::HeaterSetPoint { temp_c } => format!("heater set to {}", temp(*temp_c)),
        EventKind::NitrifyingCultureAdded => "nitrifying culture added".into(),
        EventKind::AmmoniaBinderAdded => "ammonia binder added".into(),
        EventKind::ZeoliteAdded => "zeolite added".into(),
    }
}

/// An event as a line: `Tue 1 Dec 08:50 · system RACK-B · water change 30 % (...) · Ines Okafor`.
pub fn event_line(e: &EventView) -> String {
    let mut line = format!("{} · {} · {} · {}", when(&e.at), target(&e.target), e.text, e.by);
    if let Some(note) = &e.note {
        line.push_str(&format!(" · “{}”", one_line(note)));
    }
    line
}

/// A note on one line.
pub fn one_line(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// The figures of a reading: `25.1 °C · pH 7.8 · TAN-N 1.2 · NH3-N 0.041 · NO2-N 0.30`.
pub fn figures(units: &Units, r: &ReadingView) -> String {
    let mut parts = Vec::new();
    if let Some(t) = r.temp_c {
        parts.push(temperature(units, t));
    }
    if let Some(ph) = r.ph {
        parts.push(format!("pH {ph:.2}"));
    }
    if let Some(v) = r.tan_n_mg_l {
        parts.push(format!("TAN-N {} mg/L", conc(v)));
    }
    if let Some(v) = r.nh3_n_mg_l {
        parts.push(format!("NH3-N {} mg/L", conc(v)));
    }
    if let Some(v) = r.nitrite_n_mg_l {
        parts.push(format!("NO2-N {} mg/L", conc(v)));
    }
    if let Some(v) = r.nitrate_n_mg_l {
        parts.push(format!("NO3-N {} mg/L", conc(v)));
    }
    if let Some(v) = r.salinity_ppt {
        parts.push(format!("salinity {} g/L", plain(v, 1)));
    }
    if let Some(v) = r.do_mg_l {
        parts.push(format!("O2 {} mg/L", plain(v, 1)));
    }
    if parts.is_empty() {
        parts.push("no water values".into());
    }
    parts.join(" · ")
}

/// What was seen of the fish: `gasping, excess mucus; 1 dead`.
pub fn fish(signs: &[&str], deaths: u32) -> Option<String> {
    let mut parts: Vec<String> = signs.iter().map(|s| s.replace('-', " ")).collect();
    if deaths > 0 {
        parts.push(format!("{deaths} dead"));
    }
    (!parts.is_empty()).then(|| parts.join(", "))
}

/// What a concern is about: `system RACK-A (A-01 … A-12)` or `tank Q-1`.
pub fn concern_title(c: &super::Concern) -> String {
    match &c.target {
        Target::System(_) => format!("{}, tanks {}", target(&c.target), tanks(&c.tanks)),
        Target::Tank(_) => target(&c.target),
    }
}

/// The tanks of a concern by their own band: `◆ act: A-01 … A-04; ○ watch: A-05`.
pub fn tank_bands(c: &super::Concern) -> String {
    c.tank_bands.iter().map(|g| format!("{}: {}", band(g.band), tanks(&g.tanks))).collect::<Vec<_>>().join("; ")
}

/// On a system: which tank's judgement stands for it, and why.
pub fn judged_for(c: &super::Concern) -> Option<String> {
    (matches!(c.target, Target::System(_)) && c.tanks.len() > 1).then(|| {
        format!(
            "judged for tank {}, the first of the most severe on the system (its species' band edges); heater and salt steps suit every species on the shared water",
            c.judged_for
        )
    })
}

/// Whether a latent figure says anything: the pH it assumes is above the reading's.
pub fn latent_matters(c: &super::Concern) -> bool {
    match (&c.latent, c.reading.ph) {
        (Some(l), Some(ph)) => l.ph > ph + 0.005,
        (Some(_), None) => true,
        _ => false,
    }
}

/// Why a concern is listed.
pub fn reasons(reasons: &[Reason]) -> String {
    let words: Vec<String> = reasons
        .iter()
        .map(|r| match r {
            Reason::Critical => "critical now".to_string(),
            Reason::Act => "act now".to_string(),
            Reason::Latent => "hidden risk if pH rises".to_string(),
        })
        .collect();
    list(&words)
}

/// Where a latent pH comes from.
pub fn latent_basis(basis: LatentBasis) -> &'static str {
    match basis {
        LatentBasis::SourceWater => "the room's source water",
        LatentBasis::LastWaterChange => "the water of the last change",
        LatentBasis::DefaultStep => "source pH unknown: pH + 0.5",
    }
}

/// A trend in words: `↑ rising +0.004 mg/L NH3-N a day (5 readings)`.
pub fn trend(t: &Trend) -> String {
    format!(
        "{} {} {}{} mg/L NH3-N a day ({} readings)",
        t.direction.arrow(),
        t.direction.name(),
        if t.rate_per_day >= 0.0 { "+" } else { "" },
        sig(t.rate_per_day, 2),
        t.readings
    )
}

/// The one-paragraph summary a reader sees first.
pub fn headline(report: &RoundReport) -> String {
    let c: &Counts = &report.counts;
    let round = &report.round;
    let mut parts = Vec::new();
    if c.done == 0 && c.skipped == 0 {
        parts.push(format!("No tank was checked in this round ({}).", span(&round.window.since, &round.window.until)));
    } else {
        let who: Vec<String> = round.walked_by.iter().map(|w| w.operator.clone()).collect();
        let when = match (&round.started, &round.finished) {
            (Some(a), Some(b)) => format!(" on {}", span(a, b)),
            _ => String::new(),
        };
        parts.push(format!("{} checked {} of {}{when}.", list(&who), c.done, count(c.tanks, "tank", "tanks"),));
        let mut left = Vec::new();
        if c.skipped > 0 {
            left.push(format!("{} skipped", c.skipped));
        }
        if c.not_reached > 0 {
            left.push(format!("{} not reached", c.not_reached));
        }
        if !left.is_empty() {
            parts.push(format!("{}.", capitalise(&list(&left))));
        }
    }
    if report.attention.is_empty() {
        parts.push("No tank is in act or critical, and no hidden ammonia risk was found.".to_string());
    } else {
        let waters: Vec<String> = report
            .attention
            .iter()
            .map(|concern| {
                let what = match concern.band.filter(|b| *b >= Band::Act) {
                    Some(b) => b.name().to_string(),
                    None => "hidden risk if pH rises".to_string(),
                };
                let tanks = if matches!(concern.target, Target::System(_)) {
                    format!(", {}", count(concern.tanks.len(), "tank", "tanks"))
                } else {
                    String::new()
                };
                format!("{} ({what}{tanks})", target(&concern.target))
            })
            .collect();
        parts.push(format!("Needs attention: {}.", list(&waters)));
    }
    if c.deaths > 0 {
        parts.push(format!("{} over the period.", count(c.deaths as usize, "death", "deaths")));
    }
    parts.join(" ")
}

/// First letter in upper case.
pub fn capitalise(text: &str) -> String {
    let mut chars = text.chars();
    match chars.next() {
        Some(c) => c.to_uppercase().chain(chars).collect(),
        None => String::new(),
    }
}

/// Consecutive tanks of the round that say the same (same system, status,
/// band, time, person, reason), each run with its tank labels.
pub fn runs(tanks: &[super::RoundTank]) -> Vec<(Vec<String>, &super::RoundTank)> {
    let mut runs: Vec<(Vec<String>, &super::RoundTank)> = Vec::new();
    for t in tanks {
        // Only what the table shows counts.
        let same = |r: &super::RoundTank| super::RoundTank { tank: String::new(), latent_band: None, ..r.clone() };
        match runs.last_mut() {
            Some((labels, first)) if same(first) == same(t) => labels.push(t.tank.clone()),
            _ => runs.push((vec![t.tank.clone()], t)),
        }
    }
    runs
}

/// A round tank's status in words: `done 07:21 (system RACK-B, Ines Okafor)`.
pub fn status(tank: &super::RoundTank) -> String {
    match tank.status {
        TankStatus::Done => {
            let mut s = format!("done {}", tank.at.as_ref().map(clock).unwrap_or_default());
            if tank.via_system {
                s.push_str(&format!(" (system {})", tank.system.as_deref().unwrap_or("")));
            }
            s
        }
        TankStatus::Skipped => format!("skipped: {}", tank.reason.as_deref().map(one_line).unwrap_or_default()),
        TankStatus::NotReached => "not reached".to_string(),
    }
}

/// A line of block characters tracing `values` (oldest first), at most
/// `width` wide (readings are averaged in buckets when there are more). The
/// scale starts at zero when `from_zero`, and spans at least `min_span`, so
/// that noise is not drawn as a cliff.
pub fn sparkline(values: &[f64], width: usize, from_zero: bool, min_span: f64) -> String {
    const LEVELS: [char; 8] = ['▁', '▂', '▃', '▄', '▅', '▆', '▇', '█'];
    let values: Vec<f64> = values.iter().copied().filter(|v| v.is_finite()).collect();
    if values.is_empty() || width == 0 {
        return String::new();
    }
    let buckets: Vec<f64> = if values.len() <= width {
        values.clone()
    } else {
        (0..width)
            .map(|i| {
                let a = i * values.len() / width;
                let b = ((i + 1) * values.len() / width).max(a + 1);
                values[a..b].iter().sum::<f64>() / (b - a) as f64
            })
            .collect()
    };
    let mut lo = buckets.iter().copied().fold(f64::INFINITY, f64::min);
    let mut hi = buckets.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if from_zero {
        lo = lo.min(0.0);
    }
    if hi - lo < min_span {
        let middle = (hi + lo) / 2.0;
        (lo, hi) = if from_zero { (lo, lo + min_span) } else { (middle - min_span / 2.0, middle + min_span / 2.0) };
    }
    buckets
        .iter()
        .map(|v| {
            if hi - lo < 1e-12 {
                LEVELS[3]
            } else {
                LEVELS[(((v - lo) / (hi - lo)) * 7.0).round().clamp(0.0, 7.0) as usize]
            }
        })
        .collect()
}

/// A series in one line: `▁▂▃▅▇ 0.012 → 0.081 (low 0.010, high 0.081, 14 readings)`.
pub fn series_line(series: &super::Series, width: usize) -> String {
    let values: Vec<f64> = series.points.iter().map(|p| p.value).collect();
    let (Some(first), Some(last)) = (values.first(), values.last()) else {
        return "no readings in the period".to_string();
    };
    let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let num = |v: f64| match series.measure {
        super::Measure::Ph => format!("{v:.2}"),
        super::Measure::Temperature => plain(v, 1),
        _ => conc(v),
    };
    let (from_zero, min_span) = match series.measure {
        super::Measure::Ph => (false, 0.6),
        super::Measure::Temperature => (false, 2.0),
        _ => (true, 0.0),
    };
    format!(
        "{} {} → {} {} (low {}, high {}, {})",
        sparkline(&values, width, from_zero, min_span),
        num(*first),
        num(*last),
        series.unit,
        num(lo),
        num(hi),
        count(values.len(), "reading", "readings")
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn words_for_lists_and_numbers() {
        assert_eq!(plain(30.0, 1), "30");
        assert_eq!(plain(12.54, 1), "12.5");
        assert_eq!(list(&["a".into(), "b".into(), "c".into()]), "a, b and c");
        assert_eq!(list(&["a".into()]), "a");
        assert_eq!(tanks(&["B-01".into(), "B-02".into(), "B-12".into()]), "B-01 … B-12 (3 tanks)");
        assert_eq!(fish(&["gasping", "excess-mucus"], 1).as_deref(), Some("gasping, excess mucus, 1 dead"));
        assert_eq!(fish(&[], 0), None);
        assert_eq!(conc(0.0), "0");
        assert_eq!(conc(0.04127), "0.0413");
        assert_eq!(
            event(&EventKind::HeaterSetPoint { temp_c: 25.0 }, TemperatureUnit::Fahrenheit),
            "heater set to 77 °F"
        );
        assert_eq!(event(&EventKind::SaltAdded { grams: 2500.0 }, TemperatureUnit::Celsius), "2.5 kg salt added");
    }

    #[test]
    fn sparklines_span_the_levels_and_fit_their_width() {
        assert_eq!(sparkline(&[0.0, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0], 8, true, 0.0), "▁▂▃▄▅▆▇█");
        assert_eq!(sparkline(&[2.0, 2.0], 8, false, 0.0), "▄▄");
        // A pH that moves by 0.1 stays near the middle of a 0.6 span.
        assert_eq!(sparkline(&[7.7, 7.8, 7.7], 8, false, 0.6), "▄▅▄");
        assert_eq!(sparkline(&[0.5, 1.0], 8, true, 0.0), "▅█");
        let long: Vec<f64> = (0..100).map(f64::from).collect();
        let line = sparkline(&long, 20, true, 0.0);
        assert_eq!(line.chars().count(), 20);
        assert!(line.starts_with('▁') && line.ends_with('█'));
        assert_eq!(sparkline(&[], 8, true, 0.0), "");
    }
}
