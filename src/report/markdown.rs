//! The report as Markdown (CommonMark with pipe tables): for a wiki, a ticket
//! or a chat. Charts become one-line sparklines; text people wrote is escaped
//! so it cannot turn into markup or links.

use std::fmt::Write;

use super::text::{action_line, subtitle};
use super::words::{self, band, conc, count, figures, fish, when};
use super::{Concern, RoundReport, TankStatus, Water};

/// Escapes text for Markdown: characters that start markup, and pipes (tables).
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in words::one_line(text).chars() {
        match c {
            '\\' | '`' | '*' | '_' | '[' | ']' | '<' | '>' | '#' | '|' | '!' | '~' => {
                out.push('\\');
                out.push(c);
            }
            c => out.push(c),
        }
    }
    out
}

/// Renders the report as Markdown.
pub fn render(report: &RoundReport) -> String {
    let mut out = String::new();
    let o = &mut out;
    let _ = writeln!(o, "# {}\n", escape(&report.title));
    let _ = writeln!(o, "{}\n", escape(&subtitle(report)));
    let _ = writeln!(o, "> **{}**\n", escape(report.caution));

    let _ = writeln!(o, "## Summary\n");
    let _ = writeln!(o, "{}\n", escape(&words::headline(report)));
    let c = &report.counts;
    let _ = writeln!(o, "Bands are those of each tank's latest reading over the period.\n");
    let _ = writeln!(o, "| Tanks | Done | Skipped | Not reached | ▲ critical | ◆ act | ○ watch | · clear | Deaths |");
    let _ = writeln!(o, "|---:|---:|---:|---:|---:|---:|---:|---:|---:|");
    let _ = writeln!(
        o,
        "| {} | {} | {} | {} | {} | {} | {} | {} | {} |\n",
        c.tanks, c.done, c.skipped, c.not_reached, c.critical, c.act, c.watch, c.clear, c.deaths
    );

    round(o, report);
    attention(o, report);
    waters(o, report);
    sightings(o, report);

    let _ = writeln!(
        o,
        "---\n\nBands compare toxic ammonia (un-ionized NH3, as N) with the edges of each tank's species: \
         · clear, ○ watch, ◆ act, ▲ critical. pH: {}.\n",
        escape(report.ph_convention)
    );
    let _ = writeln!(o, "**{}**", escape(report.caution));
    out
}

fn round(o: &mut String, report: &RoundReport) {
    let r = &report.round;
    let _ = writeln!(o, "## The round\n");
    let _ = writeln!(
        o,
        "Window: {} (rounds every {} h).\n",
        words::span(&r.window.since, &r.window.until),
        r.interval_hours
    );
    if r.walked_by.is_empty() {
        let _ = writeln!(o, "Nobody recorded a reading or a skip in this window.\n");
    } else {
        for w in &r.walked_by {
            let _ = writeln!(
                o,
                "- Walked by **{}**: {}{}, {}–{}",
                escape(&w.operator),
                count(w.readings, "reading", "readings"),
                if w.skips > 0 { format!(", {}", count(w.skips, "skip", "skips")) } else { String::new() },
                words::clock(&w.first),
                words::clock(&w.last)
            );
        }
        let _ = writeln!(o);
    }
    let _ = writeln!(o, "| Tanks | System | Status | Band | By |");
    let _ = writeln!(o, "|---|---|---|---|---|");
    for (tanks, t) in words::runs(&r.tanks) {
        let status = match t.status {
            TankStatus::Done => words::status(t),
            TankStatus::Skipped => format!("**skipped**: {}", escape(t.reason.as_deref().unwrap_or(""))),
            TankStatus::NotReached => "**not reached**".to_string(),
        };
        let mut shown_band = if t.status == TankStatus::Done { band(t.band) } else { String::new() };
        if t.fish_signs {
            shown_band.push_str(" (fish)");
        }
        let _ = writeln!(
            o,
            "| {} | {} | {} | {} | {} |",
            escape(&words::tanks(&tanks)),
            escape(t.system.as_deref().unwrap_or("")),
            status,
            shown_band,
            escape(t.by.as_deref().unwrap_or(""))
        );
    }
    let _ = writeln!(o);
}

fn attention(o: &mut String, report: &RoundReport) {
    let _ = writeln!(o, "## Needs attention\n");
    if report.attention.is_empty() {
        let _ = writeln!(o, "No tank in act or critical, and no hidden risk if pH rose.\n");
        return;
    }
    for (i, c) in report.attention.iter().enumerate() {
        concern(o, report, i + 1, c);
    }
}

fn concern(o: &mut String, report: &RoundReport, number: usize, c: &Concern) {
    let _ = writeln!(
        o,
        "### {number}. {} · {} · {}\n",
        band(c.band.or(c.measured_band)),
        escape(&words::concern_title(c)),
        words::reasons(&c.reasons)
    );
    if matches!(c.target, crate::model::record::Target::System(_)) {
        let _ = writeln!(o, "- Tanks by their own species' band: {}", escape(&words::tank_bands(c)));
    }
    if let Some(judged) = words::judged_for(c) {
        let _ = writeln!(o, "- {}", escape(&words::capitalise(&judged)));
    }
    if !c.species.is_empty() {
        let _ = writeln!(o, "- Species: {}", escape(&c.species.join(", ")));
    }
    let r = &c.reading;
    let _ = writeln!(
        o,
        "- Reading {} by {} ({}): {}",
        when(&r.at),
        escape(&r.by),
        escape(&words::target(&r.target)),
        figures(&report.units, r)
    );
    if let Some(seen) = fish(&r.signs, r.deaths) {
        let _ = writeln!(o, "- Fish: {seen}");
    }
    if !c.raised_by.is_empty() {
        let _ =
            writeln!(o, "- Band raised one step for what was seen in the fish ({}).", escape(&c.raised_by.join(", ")));
    }
    if let Some(l) = c.latent.as_ref().filter(|_| words::latent_matters(c)) {
        let _ = writeln!(
            o,
            "- If pH rose to {:.1} ({}): NH3-N {} mg/L, {}",
            l.ph,
            words::latent_basis(l.basis),
            conc(l.nh3_n_mg_l),
            band(Some(l.band))
        );
    }
    if let Some(t) = &c.trend {
        let _ = writeln!(o, "- Trend: {}", words::trend(t));
    }
    let _ = writeln!(o, "- Biofilter: {}", escape(&c.biofilter.describe()));
    let _ = writeln!(o);
    if !c.actions.is_empty() {
        let _ = writeln!(o, "**Suggested**\n");
        for (i, a) in c.actions.iter().enumerate() {
            let _ = writeln!(o, "{}. {}", i + 1, escape(&action_line(a)));
        }
        let _ = writeln!(o);
    }
    if !c.warnings.is_empty() {
        let _ = writeln!(o, "**Do not**\n");
        for w in &c.warnings {
            let _ = writeln!(o, "- {}", escape(&w.message));
        }
        let _ = writeln!(o);
    }
    if c.events_since.is_empty() {
        let _ = writeln!(o, "Nothing recorded since the reading.\n");
    } else {
        let _ = writeln!(o, "**Recorded since the reading**\n");
        for e in &c.events_since {
            let _ = writeln!(o, "- {}", escape(&words::event_line(e)));
        }
        let _ = writeln!(o);
    }
}

fn waters(o: &mut String, report: &RoundReport) {
    let _ = writeln!(o, "## Waters over the period\n");
    let _ = writeln!(o, "Period: {}.\n", words::span(&report.period.since, &report.period.until));
    for w in &report.waters {
        water(o, report, w);
    }
    if !report.not_charted.is_empty() {
        let _ = writeln!(
            o,
            "Standalone tanks with nothing of concern, not charted: {} (report on one with `--tank ID`).\n",
            escape(&report.not_charted.join(", "))
        );
    }
}

fn water(o: &mut String, report: &RoundReport, w: &Water) {
    let _ = writeln!(o, "### {}: {}\n", escape(&words::target(&w.target)), escape(&w.name));
    if !matches!(w.tanks.as_slice(), [one] if w.target.id() == one) {
        let _ = writeln!(o, "- Tanks: {}", escape(&words::tanks(&w.tanks)));
    }
    match &w.latest {
        Some(r) => {
            let _ = writeln!(o, "- Latest {}: {}, {}", when(&r.at), figures(&report.units, r), band(w.band));
        }
        None => {
            let _ = writeln!(o, "- No reading yet.");
        }
    }
    if let Some(t) = &w.trend {
        let _ = writeln!(o, "- Trend: {}", words::trend(t));
    }
    let e = &w.band_edges;
    let _ = writeln!(
        o,
        "- NH3-N band edges: watch {}, act {}, critical {} mg/L\n",
        words::plain(e.watch, 4),
        words::plain(e.act, 4),
        words::plain(e.critical, 4)
    );
    let _ = writeln!(o, "| Measure | Over the period |");
    let _ = writeln!(o, "|---|---|");
    for s in &w.series {
        let _ = writeln!(o, "| {} | {} |", s.measure.title(), escape(&words::series_line(s, 24)));
    }
    let _ = writeln!(o);
    if !w.events.is_empty() {
        let _ = writeln!(o, "Events:\n");
        for e in &w.events {
            let _ = writeln!(o, "{}. {}", e.number.unwrap_or(0), escape(&words::event_line(e)));
        }
        let _ = writeln!(o);
    }
}

fn sightings(o: &mut String, report: &RoundReport) {
    let _ = writeln!(o, "## Deaths and signs in the fish\n");
    if report.sightings.is_empty() {
        let _ = writeln!(o, "None recorded over the period.\n");
        return;
    }
    let _ = writeln!(o, "| When | Where | Seen | By | Note |");
    let _ = writeln!(o, "|---|---|---|---|---|");
    for s in &report.sightings {
        let _ = writeln!(
            o,
            "| {} | {} | {} | {} | {} |",
            when(&s.at),
            escape(&words::target(&s.target)),
            fish(&s.signs, s.deaths).unwrap_or_default(),
            escape(&s.by),
            escape(s.note.as_deref().unwrap_or(""))
        );
    }
    let _ = writeln!(o);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn text_people_wrote_cannot_become_markup() {
        assert_eq!(escape("a|b *c* [d](e) <f>"), "a\\|b \\*c\\* \\[d\\](e) \\<f\\>");
        assert_eq!(escape("two\nlines"), "two lines");
    }
}
