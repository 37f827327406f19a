//! The report as plain text: for a terminal, an e-mail or a printout, with a
//! one-line sparkline in place of each chart.

use std::fmt::Write;

use super::words::{self, band, conc, count, figures, fish, when};
use super::{Concern, RoundReport, TankStatus, Water};
use crate::rules::Action;

/// Width of a sparkline, in characters.
const SPARK: usize = 28;

/// Renders the report as plain text.
pub fn render(report: &RoundReport) -> String {
    let mut out = String::new();
    let o = &mut out;
    let _ = writeln!(o, "{}", report.title.to_uppercase());
    let _ = writeln!(o, "{}", subtitle(report));
    let _ = writeln!(o);
    let _ = writeln!(o, "{}", report.caution);
    let _ = writeln!(o);

    heading(o, "Summary");
    wrap(o, &words::headline(report), "  ");
    let c = &report.counts;
    let _ =
        writeln!(o, "  Tanks {} · done {} · skipped {} · not reached {}", c.tanks, c.done, c.skipped, c.not_reached);
    let _ = writeln!(
        o,
        "  Tanks by the band of their latest reading: ▲ critical {} · ◆ act {} · ○ watch {} · · clear {}{}",
        c.critical,
        c.act,
        c.watch,
        c.clear,
        if c.no_band > 0 { format!(" · no NH3 figure {}", c.no_band) } else { String::new() }
    );
    let _ = writeln!(
        o,
        "  Over the period: {} · {} · {}",
        count(c.deaths as usize, "death", "deaths"),
        count(c.readings, "reading", "readings"),
        count(c.events, "event", "events")
    );
    let _ = writeln!(o);

    round(o, report);
    attention(o, report);
    waters(o, report);
    sightings(o, report);

    let _ = writeln!(o, "Bands compare toxic ammonia (un-ionized NH3, as N) with the edges of each tank's species.");
    let _ = writeln!(o, "pH: {}.", report.ph_convention);
    let _ = writeln!(o, "{}", report.caution);
    out
}

/// The line under the title: what, when, which tanks.
pub(super) fn subtitle(report: &RoundReport) -> String {
    format!(
        "{} · round {} · period {} · made {}",
        words::capitalise(&words::selection(&report.selection)),
        words::span(&report.round.window.since, &report.round.window.until),
        words::span(&report.period.since, &report.period.until),
        when(&report.generated_at)
    )
}

fn heading(o: &mut String, title: &str) {
    let _ = writeln!(o, "{}", title.to_uppercase());
}

/// Writes `text` wrapped at 100 columns, each line indented.
fn wrap(o: &mut String, text: &str, indent: &str) {
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && line.chars().count() + word.chars().count() + indent.len() >= 100 {
            let _ = writeln!(o, "{indent}{line}");
            line.clear();
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        let _ = writeln!(o, "{indent}{line}");
    }
}

fn round(o: &mut String, report: &RoundReport) {
    let r = &report.round;
    heading(o, &format!("The round ({})", words::span(&r.window.since, &r.window.until)));
    if r.walked_by.is_empty() {
        let _ = writeln!(o, "  Nobody recorded a reading or a skip in this window.");
    }
    for w in &r.walked_by {
        let _ = writeln!(
            o,
            "  Walked by {}: {}{}, {}–{}",
            w.operator,
            count(w.readings, "reading", "readings"),
            if w.skips > 0 { format!(", {}", count(w.skips, "skip", "skips")) } else { String::new() },
            words::clock(&w.first),
            words::clock(&w.last)
        );
    }
    let runs = words::runs(&r.tanks);
    let labels: Vec<String> = runs.iter().map(|(tanks, _)| words::tanks(tanks)).collect();
    let width = labels.iter().map(|l| l.chars().count()).max().unwrap_or(4).max(4);
    for ((_, t), label) in runs.iter().zip(&labels) {
        let mark = match t.status {
            TankStatus::Done => "✓",
            TankStatus::Skipped => "–",
            TankStatus::NotReached => "✗",
        };
        let mut line = format!(
            "  {mark} {label:<width$}  {:<12}  {}",
            if t.status == TankStatus::Done { band(t.band) } else { String::new() },
            words::status(t)
        );
        if let Some(by) = &t.by {
            line.push_str(&format!(", {by}"));
        }
        if t.fish_signs {
            line.push_str(" · fish signs or deaths");
        }
        let _ = writeln!(o, "{}", line.trim_end());
    }
    let _ = writeln!(o);
}

fn attention(o: &mut String, report: &RoundReport) {
    heading(o, "Needs attention");
    if report.attention.is_empty() {
        let _ = writeln!(o, "  No tank in act or critical, and no hidden risk if pH rose.");
        let _ = writeln!(o);
        return;
    }
    for (i, c) in report.attention.iter().enumerate() {
        concern(o, report, i + 1, c);
    }
}

fn concern(o: &mut String, report: &RoundReport, number: usize, c: &Concern) {
    let shown = c.band.or(c.measured_band);
    let _ = writeln!(o, "  {number}. {} · {} · {}", band(shown), words::concern_title(c), words::reasons(&c.reasons));
    let indent = "     ";
    if matches!(c.target, crate::model::record::Target::System(_)) {
        let _ = writeln!(o, "{indent}Tanks by their own species' band: {}", words::tank_bands(c));
    }
    if let Some(judged) = words::judged_for(c) {
        let _ = writeln!(o, "{indent}{}", words::capitalise(&judged));
    }
    if !c.species.is_empty() {
        let _ = writeln!(o, "{indent}Species: {}", c.species.join(", "));
    }
    let r = &c.reading;
    let _ = writeln!(
        o,
        "{indent}Reading {} by {} ({}): {}",
        when(&r.at),
        r.by,
        words::target(&r.target),
        figures(&report.units, r)
    );
    if let Some(seen) = fish(&r.signs, r.deaths) {
        let _ = writeln!(o, "{indent}Fish: {seen}");
    }
    if !c.raised_by.is_empty() {
        let _ = writeln!(o, "{indent}Band raised one step for what was seen in the fish ({}).", c.raised_by.join(", "));
    }
    if let Some(l) = c.latent.as_ref().filter(|_| words::latent_matters(c)) {
        let _ = writeln!(
            o,
            "{indent}If pH rose to {:.1} ({}): NH3-N {} mg/L, {}",
            l.ph,
            words::latent_basis(l.basis),
            conc(l.nh3_n_mg_l),
            band(Some(l.band))
        );
    }
    if let Some(t) = &c.trend {
        let _ = writeln!(o, "{indent}Trend: {}", words::trend(t));
    }
    let _ = writeln!(o, "{indent}Biofilter: {}", c.biofilter.describe());
    if !c.actions.is_empty() {
        let _ = writeln!(o, "{indent}Suggested:");
        for (i, a) in c.actions.iter().enumerate() {
            wrap(o, &format!("{}. {}", i + 1, action_line(a)), &format!("{indent}  "));
        }
    }
    if !c.warnings.is_empty() {
        let _ = writeln!(o, "{indent}Do not:");
        for w in &c.warnings {
            wrap(o, &format!("- {}", w.message), &format!("{indent}  "));
        }
    }
    if c.events_since.is_empty() {
        let _ = writeln!(o, "{indent}Nothing recorded since the reading.");
    } else {
        let _ = writeln!(o, "{indent}Recorded since:");
        for e in &c.events_since {
            let _ = writeln!(o, "{indent}  - {}", words::event_line(e));
        }
    }
    let _ = writeln!(o);
}

/// An action as one line: title, quantities, reason.
pub(super) fn action_line(a: &Action) -> String {
    let mut amount = String::new();
    if let (Some(q), Some(unit)) = (a.quantity, a.unit) {
        amount = format!(" {} {unit}", quantity(q));
        if let Some(also) = a.also {
            amount.push_str(&format!(" ({} {})", quantity(also.quantity), also.unit));
        }
        if let Some(times) = a.repeat {
            amount.push_str(&format!(", {times} times"));
        }
    }
    format!("{}{amount}: {}", a.kind.title(), a.reason)
}

/// A quantity without noise: `608`, `0.5`, `76`.
pub(super) fn quantity(x: f64) -> String {
    if (x - x.round()).abs() < 1e-9 { format!("{x:.0}") } else { crate::numfmt::sig(x, 3) }
}

fn waters(o: &mut String, report: &RoundReport) {
    heading(o, &format!("Waters over the period ({})", words::span(&report.period.since, &report.period.until)));
    for w in &report.waters {
        water(o, report, w);
    }
    if !report.not_charted.is_empty() {
        wrap(
            o,
            &format!(
                "Standalone tanks with nothing of concern, not charted: {} (report on one with --tank ID).",
                report.not_charted.join(", ")
            ),
            "  ",
        );
    }
    let _ = writeln!(o);
}

fn water(o: &mut String, report: &RoundReport, w: &Water) {
    let tanks = match w.tanks.as_slice() {
        [one] if w.target.id() == one => String::new(),
        many => format!(" · {}", words::tanks(many)),
    };
    let _ = writeln!(o, "  {} · {}{tanks}", words::target(&w.target), w.name);
    match &w.latest {
        Some(r) => {
            let _ = writeln!(o, "    Latest {}: {} · {}", when(&r.at), figures(&report.units, r), band(w.band));
        }
        None => {
            let _ = writeln!(o, "    No reading yet.");
        }
    }
    if let Some(t) = &w.trend {
        let _ = writeln!(o, "    Trend: {}", words::trend(t));
    }
    let e = &w.band_edges;
    let _ = writeln!(
        o,
        "    NH3-N edges: watch {} · act {} · critical {} mg/L",
        words::plain(e.watch, 4),
        words::plain(e.act, 4),
        words::plain(e.critical, 4)
    );
    for s in &w.series {
        let _ = writeln!(o, "    {:<6} {}", s.measure.short(), words::series_line(s, SPARK));
    }
    for e in &w.events {
        let _ = writeln!(o, "    {:>2}. {}", e.number.unwrap_or(0), words::event_line(e));
    }
    let _ = writeln!(o);
}

fn sightings(o: &mut String, report: &RoundReport) {
    heading(o, "Deaths and signs in the fish over the period");
    if report.sightings.is_empty() {
        let _ = writeln!(o, "  None recorded.");
    }
    for s in &report.sightings {
        let mut line = format!(
            "  {} · {} · {} · {}",
            when(&s.at),
            words::target(&s.target),
            fish(&s.signs, s.deaths).unwrap_or_default(),
            s.by
        );
        if let Some(note) = &s.note {
            line.push_str(&format!(" · “{}”", words::one_line(note)));
        }
        let _ = writeln!(o, "{line}");
    }
    let _ = writeln!(o);
}
