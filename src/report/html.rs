//! The report as one self-contained HTML file: inline CSS, inline SVG charts,
//! no script and no reference to anything outside the file (a content
//! security policy in the file forbids loading anything at all). It reads on
//! a phone (one column, tables that scroll sideways), and prints on A4 and
//! Letter alike (the page box is left to the printer's paper; the content is
//! at most 182 mm wide, what both leave inside their margins).
//!
//! The markup is also well-formed XML (void elements closed, text escaped),
//! so general-purpose XML tools can read it.

use std::fmt::Write;

use super::svg::{self, LineChart, Marker, Point, Reference, Shade, escape};
use super::text::quantity;
use super::words::{self, conc, count, figures, fish, when};
use super::{Concern, Measure, RoundReport, RoundTank, Series, TankStatus, Water};
use crate::core::band::Band;

/// The colour of a band (text and lines); chosen to read on white and in grey print.
pub fn band_colour(band: Band) -> &'static str {
    match band {
        Band::Clear => "#2f7d4f",
        Band::Watch => "#a86a00",
        Band::Act => "#c2410c",
        Band::Critical => "#b91c1c",
    }
}

const STYLE: &str = r#"
:root { color-scheme: light; --ink: #1f2933; --muted: #5f6b76; --line: #d9dee3; --paper: #ffffff; --soft: #f4f6f8;
  --clear: #2f7d4f; --watch: #a86a00; --act: #c2410c; --critical: #b91c1c; --event: #6b4fa3; }
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; text-size-adjust: 100%; }
body { margin: 0 auto; max-width: 62rem; padding: 1rem 1rem 3rem; background: var(--paper); color: var(--ink);
  font: 16px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; }
h1 { font-size: 1.6rem; line-height: 1.2; margin: 0.2rem 0 0.3rem; }
h2 { font-size: 1.25rem; margin: 2rem 0 0.6rem; padding-bottom: 0.25rem; border-bottom: 2px solid var(--ink); }
h3 { font-size: 1.05rem; margin: 0; }
h4 { font-size: 0.8rem; text-transform: uppercase; letter-spacing: 0.04em; color: var(--muted); margin: 0.8rem 0 0.2rem; }
p { margin: 0.3rem 0; }
small, .muted { color: var(--muted); }
.kicker { text-transform: uppercase; letter-spacing: 0.08em; font-size: 0.75rem; color: var(--muted); margin: 0; }
.sub { color: var(--muted); margin: 0; }
.caution { border-left: 4px solid var(--ink); background: var(--soft); padding: 0.5rem 0.8rem; margin: 1rem 0; font-size: 0.92rem; }
.headline { font-size: 1.08rem; margin: 0.8rem 0; }
.cards { display: grid; grid-template-columns: repeat(auto-fit, minmax(7.2rem, 1fr)); gap: 0.5rem; margin: 0.6rem 0; }
.card { border: 1px solid var(--line); border-radius: 6px; padding: 0.45rem 0.6rem; background: var(--paper); }
.card b { display: block; font-size: 1.45rem; line-height: 1.1; font-variant-numeric: tabular-nums; }
.card span { font-size: 0.82rem; color: var(--muted); }
.card.bad { border-color: var(--act); } .card.bad b { color: var(--act); }
.card.worst { border-color: var(--critical); } .card.worst b { color: var(--critical); }
.badge { display: inline-block; border-radius: 999px; padding: 0.05rem 0.55rem; font-size: 0.85rem; font-weight: 700;
  color: #fff; white-space: nowrap; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
.b-clear { background: var(--clear); } .b-watch { background: var(--watch); } .b-act { background: var(--act); }
.b-critical { background: var(--critical); } .b-none { background: var(--muted); }
.concern { border: 1px solid var(--line); border-left: 6px solid var(--muted); border-radius: 6px; padding: 0.7rem 0.9rem;
  margin: 0.8rem 0; break-inside: avoid; page-break-inside: avoid; }
.concern.c-act { border-left-color: var(--act); } .concern.c-critical { border-left-color: var(--critical); }
.concern.c-watch { border-left-color: var(--watch); }
.concern.c-latent { border-left-color: var(--watch); border-left-style: double; }
.concern header { display: flex; flex-wrap: wrap; gap: 0.3rem 0.6rem; align-items: baseline; }
.concern .why { color: var(--muted); font-size: 0.9rem; }
.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.15rem 0.8rem; margin: 0.5rem 0 0; font-size: 0.93rem; }
.facts dt { color: var(--muted); } .facts dd { margin: 0; }
ol.actions, ul.plain { margin: 0.2rem 0; padding-left: 1.4rem; }
ol.actions li, ul.plain li { margin: 0.2rem 0; }
.qty { font-variant-numeric: tabular-nums; white-space: nowrap; }
.walkers { margin: 0.3rem 0 0.8rem; padding-left: 1.2rem; }
.group { margin: 0.6rem 0; break-inside: avoid; page-break-inside: avoid; }
.group h3 { font-size: 0.95rem; margin-bottom: 0.3rem; }
.chips { display: flex; flex-wrap: wrap; gap: 0.3rem; list-style: none; padding: 0; margin: 0; }
.chip { min-width: 4.6rem; border-radius: 5px; padding: 0.15rem 0.4rem; font-size: 0.8rem; line-height: 1.25;
  border: 1px solid var(--line); -webkit-print-color-adjust: exact; print-color-adjust: exact; }
.chip b { display: block; font-size: 0.85rem; }
.chip.s-clear { background: #e7f3ec; border-color: var(--clear); }
.chip.s-watch { background: #fbf0d9; border-color: var(--watch); }
.chip.s-act { background: #fde5d8; border-color: var(--act); }
.chip.s-critical { background: #fbdada; border-color: var(--critical); font-weight: 700; }
.chip.s-none { background: var(--soft); }
.chip.s-skipped { background: repeating-linear-gradient(135deg, #f4f6f8 0 4px, #e4e8ec 4px 8px); color: var(--muted); }
.chip.s-missed { border: 1.5px dashed var(--critical); color: var(--critical); background: var(--paper); }
.legend { display: flex; flex-wrap: wrap; gap: 0.2rem 1rem; font-size: 0.82rem; color: var(--muted); margin: 0.5rem 0; padding: 0; list-style: none; }
.scroll { overflow-x: auto; -webkit-overflow-scrolling: touch; }
table { border-collapse: collapse; width: 100%; font-size: 0.9rem; }
th, td { text-align: left; vertical-align: top; padding: 0.3rem 0.5rem; border-bottom: 1px solid var(--line); }
th { font-size: 0.78rem; text-transform: uppercase; letter-spacing: 0.03em; color: var(--muted); }
td.num { font-variant-numeric: tabular-nums; white-space: nowrap; }
.water { margin: 1.2rem 0 1.6rem; }
.water > header { break-after: avoid; page-break-after: avoid; }
.water .meta { font-size: 0.92rem; }
.charts { display: grid; grid-template-columns: repeat(auto-fill, minmax(21rem, 1fr)); gap: 0.6rem 1rem; margin: 0.6rem 0; }
figure { margin: 0; break-inside: avoid; page-break-inside: avoid; }
svg.chart { display: block; width: 100%; height: auto; }
figcaption { font-size: 0.8rem; color: var(--muted); }
ol.events { font-size: 0.88rem; margin: 0.3rem 0; padding-left: 1.8rem; }
ol.events li::marker { color: var(--event); font-weight: 700; }
.key { font-size: 0.88rem; color: var(--muted); }
footer { margin-top: 2rem; border-top: 1px solid var(--line); padding-top: 0.6rem; font-size: 0.88rem; }
@media (max-width: 40rem) {
  body { padding: 0.7rem 0.7rem 2rem; }
  h1 { font-size: 1.35rem; }
  .charts { grid-template-columns: 1fr; }
  .facts { grid-template-columns: 1fr; } .facts dt { margin-top: 0.3rem; }
  table.open th:nth-child(2), table.open td:nth-child(2) { display: none; }
  th, td { padding: 0.3rem 0.3rem; }
}
@page { margin: 14mm 13mm; }
@media print {
  body { max-width: 182mm; padding: 0; font-size: 10pt; }
  h2 { margin-top: 1.2rem; break-after: avoid; page-break-after: avoid; }
  .charts { grid-template-columns: 1fr 1fr; }
  .scroll { overflow: visible; }
  a { color: inherit; text-decoration: none; }
}
"#;

/// Renders the report as one self-contained HTML file.
pub fn render(report: &RoundReport) -> String {
    let mut out = String::with_capacity(64 * 1024);
    let o = &mut out;
    let _ = write!(
        o,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\" />\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\" />\n\
         <meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'\" />\n\
         <meta name=\"generator\" content=\"tankwalk {}\" />\n<title>{} · {}</title>\n<style>{}</style>\n</head>\n<body>\n",
        env!("CARGO_PKG_VERSION"),
        escape(&report.title),
        escape(&words::day(&report.round.window.until)),
        STYLE
    );
    let _ = write!(
        o,
        "<header>\n<p class=\"kicker\">{}</p>\n<h1>{}</h1>\n<p class=\"sub\">{}</p>\n</header>\n",
        escape(&kicker(report)),
        escape(&report.title),
        escape(&super::text::subtitle(report))
    );
    caution(o, report);
    glance(o, report);
    attention(o, report);
    round(o, report);
    waters(o, report);
    sightings(o, report);
    key(o, report);
    let _ = write!(
        o,
        "<footer>\n<p>{}</p>\n<p class=\"muted\">Made with tankwalk {} on {}.</p>\n</footer>\n</body>\n</html>\n",
        caution_html(report.caution),
        env!("CARGO_PKG_VERSION"),
        escape(&when(&report.generated_at))
    );
    out
}

fn kicker(report: &RoundReport) -> String {
    format!("{} · {}", report.room, words::day(&report.round.window.until))
}

/// The caution with its first sentence in bold.
fn caution_html(caution: &str) -> String {
    match caution.split_once(". ") {
        Some((first, rest)) => format!("<strong>{}.</strong> {}", escape(first), escape(rest)),
        None => format!("<strong>{}</strong>", escape(caution)),
    }
}

fn caution(o: &mut String, report: &RoundReport) {
    let _ = writeln!(o, "<p class=\"caution\" role=\"note\">{}</p>", caution_html(report.caution));
}

fn badge(band: Option<Band>) -> String {
    match band {
        Some(b) => format!("<span class=\"badge b-{}\">{} {}</span>", b.name(), b.glyph(), b.name()),
        None => "<span class=\"badge b-none\">no NH3 figure</span>".to_string(),
    }
}

fn glance(o: &mut String, report: &RoundReport) {
    let c = &report.counts;
    let _ = write!(
        o,
        "<section id=\"summary\" aria-label=\"Summary\">\n<p class=\"headline\">{}</p>\n<div class=\"cards\">\n",
        escape(&words::headline(report))
    );
    let card = |o: &mut String, value: String, label: &str, class: &str| {
        let _ = writeln!(o, "<div class=\"card{class}\"><b>{}</b><span>{}</span></div>", escape(&value), escape(label));
    };
    card(o, format!("{} / {}", c.done, c.tanks), "tanks checked", "");
    card(o, c.skipped.to_string(), "skipped", "");
    card(o, c.not_reached.to_string(), "not reached", if c.not_reached > 0 { " bad" } else { "" });
    card(o, c.critical.to_string(), "▲ critical (latest reading)", if c.critical > 0 { " worst" } else { "" });
    card(o, c.act.to_string(), "◆ act (latest reading)", if c.act > 0 { " bad" } else { "" });
    card(o, c.latent_risks.to_string(), "hidden risks if pH rose", if c.latent_risks > 0 { " bad" } else { "" });
    card(o, c.deaths.to_string(), "deaths over the period", if c.deaths > 0 { " worst" } else { "" });
    let _ = write!(o, "</div>\n</section>\n");
}

fn attention(o: &mut String, report: &RoundReport) {
    let _ = write!(o, "<section id=\"attention\">\n<h2>Needs attention</h2>\n");
    if report.attention.is_empty() {
        let _ = writeln!(o, "<p>No tank is in act or critical, and no hidden ammonia risk was found.</p>");
    }
    for c in &report.attention {
        concern(o, report, c);
    }
    let _ = writeln!(o, "</section>");
}

fn concern(o: &mut String, report: &RoundReport, c: &Concern) {
    let shown = c.band.or(c.measured_band);
    let class = match shown {
        Some(b) if b >= Band::Act => b.name(),
        _ if c.reasons.contains(&super::Reason::Latent) => "latent",
        Some(b) => b.name(),
        None => "none",
    };
    let mut why = escape(&words::reasons(&c.reasons));
    if let Some(l) = c.latent.filter(|l| c.reasons.contains(&super::Reason::Latent) && Some(l.band) > shown) {
        why.push_str(&format!(": {} if pH rose to {:.1}", badge(Some(l.band)), l.ph));
    }
    let (what, tanks) = match &c.target {
        crate::model::record::Target::System(id) => {
            (format!("System {id}"), format!(" <small>{}</small>", escape(&words::tanks(&c.tanks))))
        }
        crate::model::record::Target::Tank(id) => (format!("Tank {id}"), String::new()),
    };
    let _ = write!(
        o,
        "<article class=\"concern c-{class}\">\n<header>{} <h3>{}{tanks}</h3> <span class=\"why\">{}</span></header>\n",
        badge(shown),
        escape(&what),
        why
    );
    let _ = writeln!(o, "<dl class=\"facts\">");
    let fact = |o: &mut String, term: &str, value: &str| {
        let _ = writeln!(o, "<dt>{}</dt><dd>{}</dd>", escape(term), value);
    };
    if matches!(c.target, crate::model::record::Target::System(_)) {
        let groups: Vec<String> =
            c.tank_bands.iter().map(|g| format!("{} {}", badge(g.band), escape(&g.tanks.join(", ")))).collect();
        fact(o, "Tanks", &groups.join("<br />"));
    }
    if let Some(judged) = words::judged_for(c) {
        fact(o, "Advice", &escape(&words::capitalise(&judged)));
    }
    if !c.species.is_empty() {
        fact(o, "Species", &escape(&c.species.join(", ")));
    }
    let r = &c.reading;
    fact(
        o,
        "Reading",
        &format!(
            "{} by {} ({})<br />{}",
            escape(&when(&r.at)),
            escape(&r.by),
            escape(&words::target(&r.target)),
            escape(&figures(&report.units, r))
        ),
    );
    if let Some(seen) = fish(&r.signs, r.deaths) {
        fact(o, "Fish", &format!("<strong>{}</strong>", escape(&seen)));
    }
    if !c.raised_by.is_empty() {
        fact(
            o,
            "Band raised",
            &escape(&format!("one step for what was seen in the fish ({})", c.raised_by.join(", "))),
        );
    }
    if let Some(l) = c.latent.as_ref().filter(|_| words::latent_matters(c)) {
        fact(
            o,
            "If pH rose",
            &format!(
                "to {:.1} ({}): NH3-N {} mg/L {}",
                l.ph,
                escape(words::latent_basis(l.basis)),
                escape(&conc(l.nh3_n_mg_l)),
                badge(Some(l.band))
            ),
        );
    }
    if let Some(t) = &c.trend {
        fact(o, "Trend", &escape(&words::trend(t)));
    }
    fact(o, "Biofilter", &escape(&c.biofilter.describe()));
    let _ = writeln!(o, "</dl>");
    if !c.actions.is_empty() {
        let _ = write!(o, "<h4>Suggested</h4>\n<ol class=\"actions\">\n");
        for a in &c.actions {
            let mut amount = String::new();
            if let (Some(q), Some(unit)) = (a.quantity, a.unit) {
                amount = format!(" <span class=\"qty\">{} {}", quantity(q), escape(unit));
                if let Some(also) = a.also {
                    amount.push_str(&format!(" ({} {})", quantity(also.quantity), escape(also.unit)));
                }
                if let Some(times) = a.repeat {
                    amount.push_str(&format!(", {times} times"));
                }
                amount.push_str("</span>");
            }
            let _ = writeln!(o, "<li><strong>{}{amount}</strong>: {}</li>", escape(a.kind.title()), escape(&a.reason));
        }
        let _ = writeln!(o, "</ol>");
    }
    if !c.warnings.is_empty() {
        let _ = write!(o, "<h4>Do not</h4>\n<ul class=\"plain\">\n");
        for w in &c.warnings {
            let _ = writeln!(o, "<li>{}</li>", escape(&w.message));
        }
        let _ = writeln!(o, "</ul>");
    }
    let _ = writeln!(o, "<h4>Recorded since the reading</h4>");
    if c.events_since.is_empty() {
        let _ = writeln!(o, "<p class=\"muted\">Nothing yet.</p>");
    } else {
        let _ = writeln!(o, "<ul class=\"plain\">");
        for e in &c.events_since {
            let _ = writeln!(o, "<li>{}</li>", escape(&words::event_line(e)));
        }
        let _ = writeln!(o, "</ul>");
    }
    let _ = writeln!(o, "</article>");
}

fn chip_class(t: &RoundTank) -> &'static str {
    match t.status {
        TankStatus::Skipped => "s-skipped",
        TankStatus::NotReached => "s-missed",
        TankStatus::Done => match t.band {
            Some(Band::Clear) => "s-clear",
            Some(Band::Watch) => "s-watch",
            Some(Band::Act) => "s-act",
            Some(Band::Critical) => "s-critical",
            None => "s-none",
        },
    }
}

fn chip_text(t: &RoundTank) -> String {
    match t.status {
        TankStatus::Done => {
            let mut s = t.band.map_or_else(|| "checked".to_string(), |b| format!("{} {}", b.glyph(), b.name()));
            if t.fish_signs {
                s.push_str(" · fish");
            }
            s
        }
        TankStatus::Skipped => "– skipped".to_string(),
        TankStatus::NotReached => "✗ not reached".to_string(),
    }
}

fn round(o: &mut String, report: &RoundReport) {
    let r = &report.round;
    let _ = write!(
        o,
        "<section id=\"round\">\n<h2>The round</h2>\n<p>{} <span class=\"muted\">(rounds every {} h)</span></p>\n",
        escape(&words::span(&r.window.since, &r.window.until)),
        r.interval_hours
    );
    if r.walked_by.is_empty() {
        let _ = writeln!(o, "<p><strong>Nobody recorded a reading or a skip in this window.</strong></p>");
    } else {
        let _ = writeln!(o, "<ul class=\"walkers\">");
        for w in &r.walked_by {
            let _ = writeln!(
                o,
                "<li><strong>{}</strong>: {}{}, {}–{}</li>",
                escape(&w.operator),
                count(w.readings, "reading", "readings"),
                if w.skips > 0 { format!(", {}", count(w.skips, "skip", "skips")) } else { String::new() },
                words::clock(&w.first),
                words::clock(&w.last)
            );
        }
        let _ = writeln!(o, "</ul>");
    }
    // One group per system, standalone tanks together, in round order.
    let mut groups: Vec<(Option<String>, Vec<&RoundTank>)> = Vec::new();
    for t in &r.tanks {
        match groups.last_mut() {
            Some((system, tanks)) if *system == t.system => tanks.push(t),
            _ => groups.push((t.system.clone(), vec![t])),
        }
    }
    for (system, tanks) in &groups {
        let heading = match system {
            Some(s) => {
                let name = report
                    .waters
                    .iter()
                    .find(|w| w.target == crate::model::record::Target::System(s.clone()))
                    .map(|w| format!(" · {}", w.name))
                    .unwrap_or_default();
                format!("System {s}{name}")
            }
            None => "Standalone tanks".to_string(),
        };
        let _ = write!(o, "<div class=\"group\">\n<h3>{}</h3>\n<ul class=\"chips\">\n", escape(&heading));
        for t in tanks {
            let mut tip = words::status(t);
            if let Some(by) = &t.by {
                tip.push_str(&format!(", {by}"));
            }
            let _ = writeln!(
                o,
                "<li class=\"chip {}\" title=\"{}\"><b>{}</b>{}</li>",
                chip_class(t),
                escape(&tip),
                escape(&t.tank),
                escape(&chip_text(t))
            );
        }
        let _ = write!(o, "</ul>\n</div>\n");
    }
    let _ = writeln!(
        o,
        "<ul class=\"legend\"><li>· clear</li><li>○ watch</li><li>◆ act</li><li>▲ critical</li>\
         <li>– skipped (with a reason)</li><li>✗ not reached</li><li>fish: signs or deaths seen</li></ul>"
    );
    let open: Vec<(Vec<String>, &RoundTank)> =
        words::runs(&r.tanks).into_iter().filter(|(_, t)| t.status != TankStatus::Done).collect();
    if !open.is_empty() {
        let _ = write!(
            o,
            "<h4>Skipped and not reached</h4>\n<div class=\"scroll\"><table class=\"open\">\n<thead><tr><th>Tanks</th><th>System</th><th>Status</th><th>By</th><th>When</th></tr></thead>\n<tbody>\n"
        );
        for (tanks, t) in open {
            let status = match t.status {
                TankStatus::Skipped => {
                    format!("skipped: {}", t.reason.as_deref().map(words::one_line).unwrap_or_default())
                }
                _ => "not reached".to_string(),
            };
            let _ = writeln!(
                o,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{}</td></tr>",
                escape(&words::tanks(&tanks)),
                escape(t.system.as_deref().unwrap_or("")),
                escape(&status),
                escape(t.by.as_deref().unwrap_or("")),
                escape(&t.at.as_ref().map(words::clock).unwrap_or_default())
            );
        }
        let _ = write!(o, "</tbody>\n</table></div>\n");
    }
    let _ = writeln!(o, "</section>");
}

fn waters(o: &mut String, report: &RoundReport) {
    let _ = write!(
        o,
        "<section id=\"trends\">\n<h2>Trends over the period</h2>\n<p class=\"muted\">{}. Numbered marks on the time axis are the events listed under each set of charts.</p>\n",
        escape(&words::span(&report.period.since, &report.period.until))
    );
    for (i, w) in report.waters.iter().enumerate() {
        water(o, report, i, w);
    }
    if !report.not_charted.is_empty() {
        let _ = writeln!(
            o,
            "<p class=\"muted\">Standalone tanks with nothing of concern, not charted: {}. A report on one tank (<code>tankwalk report --tank ID</code>) charts it.</p>",
            escape(&report.not_charted.join(", "))
        );
    }
    let _ = writeln!(o, "</section>");
}

fn water(o: &mut String, report: &RoundReport, index: usize, w: &Water) {
    let _ = write!(
        o,
        "<section class=\"water\">\n<header>\n<h3>{} · {}</h3>\n<p class=\"meta\">{}{}</p>\n",
        escape(&words::capitalise(&words::target(&w.target))),
        escape(&w.name),
        escape(&match w.tanks.as_slice() {
            [one] => format!("Tank {one}"),
            many => format!("Tanks {}", words::tanks(many)),
        }),
        if w.species.is_empty() { String::new() } else { format!(" · {}", escape(&w.species.join(", "))) }
    );
    match &w.latest {
        Some(r) => {
            let _ = writeln!(
                o,
                "<p class=\"meta\">Latest {}: {} {}</p>",
                escape(&when(&r.at)),
                escape(&figures(&report.units, r)),
                badge(w.band)
            );
        }
        None => {
            let _ = writeln!(o, "<p class=\"meta\">No reading yet.</p>");
        }
    }
    if let Some(t) = &w.trend {
        let _ = writeln!(o, "<p class=\"meta\">Trend: {}</p>", escape(&words::trend(t)));
    }
    let _ = write!(o, "</header>\n<div class=\"charts\">\n");
    for s in &w.series {
        let chart = chart_of(report, index, w, s);
        let _ = write!(o, "<figure>\n{}\n</figure>\n", svg::line_chart(&chart));
    }
    let _ = writeln!(o, "</div>");
    if !w.events.is_empty() {
        let _ = writeln!(o, "<ol class=\"events\">");
        for e in &w.events {
            let mut line = format!("{} · {} · {}", when(&e.at), words::target(&e.target), e.text);
            line.push_str(&format!(" · {}", e.by));
            if let Some(note) = &e.note {
                line.push_str(&format!(" · “{}”", words::one_line(note)));
            }
            let _ = writeln!(o, "<li value=\"{}\">{}</li>", e.number.unwrap_or(0), escape(&line));
        }
        let _ = writeln!(o, "</ol>");
    } else {
        let _ = writeln!(o, "<p class=\"muted\">No events recorded over the period.</p>");
    }
    let _ = writeln!(o, "</section>");
}

/// The chart of one series of a water.
pub fn chart_of(report: &RoundReport, index: usize, w: &Water, s: &Series) -> LineChart {
    let measure = s.measure;
    let title = match measure {
        Measure::Ph => "pH".to_string(),
        _ => format!("{}, {}", measure.title(), s.unit),
    };
    let values: Vec<f64> = s.points.iter().map(|p| p.value).collect();
    let fmt = |v: f64| match measure {
        Measure::Ph => format!("{v:.2}"),
        Measure::Temperature => words::plain(v, 1),
        _ => conc(v),
    };
    let description = match (values.first(), values.last()) {
        (Some(_), Some(last)) => {
            let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
            let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
            let mut d = format!(
                "{} of {} over the period: {}, lowest {}, highest {}, latest {} {}.",
                measure.title(),
                words::target(&w.target),
                count(values.len(), "reading", "readings"),
                fmt(lo),
                fmt(hi),
                fmt(*last),
                s.unit
            );
            if measure == Measure::Nh3 {
                let e = &w.band_edges;
                d.push_str(&format!(
                    " Band edges: watch {}, act {}, critical {} mg/L NH3-N.",
                    words::plain(e.watch, 4),
                    words::plain(e.act, 4),
                    words::plain(e.critical, 4)
                ));
            }
            if !w.events.is_empty() {
                d.push_str(&format!(" {} marked.", count(w.events.len(), "event", "events")));
            }
            d
        }
        _ => format!("No {} readings of {} over the period.", measure.title(), words::target(&w.target)),
    };
    let mut chart = LineChart {
        id: format!("w{}-{}", index + 1, measure_id(measure)),
        title,
        description,
        from: report.period.since.timestamp(),
        until: report.period.until.timestamp(),
        offset: *report.period.until.offset(),
        points: s
            .points
            .iter()
            .map(|p| Point { t: p.at.timestamp(), value: p.value, colour: p.band.map(band_colour) })
            .collect(),
        from_zero: !matches!(measure, Measure::Ph | Measure::Temperature),
        min_span: match measure {
            Measure::Ph => 0.6,
            Measure::Temperature => 2.0,
            Measure::Nh3 => w.band_edges.watch,
            _ => 0.2,
        },
        include: Vec::new(),
        references: Vec::new(),
        shades: Vec::new(),
        markers: w
            .events
            .iter()
            .map(|e| Marker {
                t: e.at.timestamp(),
                label: e.number.unwrap_or(0).to_string(),
                title: format!("{}. {}: {}", e.number.unwrap_or(0), when(&e.at), e.text),
            })
            .collect(),
        gap: 3 * 3600 * i64::from(report.round.interval_hours.max(12)),
        empty_text: "no readings in this period".to_string(),
        standalone: false,
    };
    match measure {
        Measure::Nh3 => {
            let e = w.band_edges;
            let high = values.iter().copied().fold(0.0, f64::max);
            chart.include = if high >= e.act { vec![e.act, e.critical.min(high * 1.05)] } else { vec![e.act] };
            chart.references = [(Band::Watch, e.watch), (Band::Act, e.act), (Band::Critical, e.critical)]
                .into_iter()
                .map(|(b, v)| Reference {
                    value: v,
                    label: format!("{} {}", b.name(), words::plain(v, 4)),
                    colour: band_colour(b),
                })
                .collect();
            chart.shades = vec![
                Shade {
                    from: e.watch,
                    to: e.act,
                    colour: band_colour(Band::Watch),
                    opacity: 0.07,
                    title: "watch".into(),
                },
                Shade {
                    from: e.act,
                    to: e.critical,
                    colour: band_colour(Band::Act),
                    opacity: 0.09,
                    title: "act".into(),
                },
                Shade {
                    from: e.critical,
                    to: f64::INFINITY,
                    colour: band_colour(Band::Critical),
                    opacity: 0.11,
                    title: "critical".into(),
                },
            ];
        }
        Measure::Ph | Measure::Temperature => {
            let range = if measure == Measure::Ph { w.ph_range } else { w.temperature_range };
            if let Some(r) = range {
                chart.include = vec![r.min, r.max];
                chart.shades = vec![Shade {
                    from: r.min,
                    to: r.max,
                    colour: band_colour(Band::Clear),
                    opacity: 0.08,
                    title: format!("kept range of the species: {}–{}", fmt(r.min), fmt(r.max)),
                }];
                chart.references = vec![
                    Reference { value: r.min, label: format!("low {}", fmt(r.min)), colour: "#5f6b76" },
                    Reference { value: r.max, label: format!("high {}", fmt(r.max)), colour: "#5f6b76" },
                ];
            }
        }
        Measure::TotalAmmonia | Measure::Nitrite => {}
    }
    chart
}

fn measure_id(measure: Measure) -> &'static str {
    match measure {
        Measure::TotalAmmonia => "tan",
        Measure::Nh3 => "nh3",
        Measure::Ph => "ph",
        Measure::Temperature => "temp",
        Measure::Nitrite => "no2",
    }
}

fn sightings(o: &mut String, report: &RoundReport) {
    let _ = write!(o, "<section id=\"sightings\">\n<h2>Deaths and signs in the fish</h2>\n");
    if report.sightings.is_empty() {
        let _ = write!(o, "<p>None recorded over the period.</p>\n</section>\n");
        return;
    }
    let _ = write!(
        o,
        "<div class=\"scroll\"><table>\n<thead><tr><th>When</th><th>Where</th><th>Seen</th><th>By</th><th>Note</th></tr></thead>\n<tbody>\n"
    );
    for s in &report.sightings {
        let _ = writeln!(
            o,
            "<tr><td class=\"num\">{}</td><td>{}</td><td><strong>{}</strong></td><td>{}</td><td>{}</td></tr>",
            escape(&when(&s.at)),
            escape(&words::target(&s.target)),
            escape(&fish(&s.signs, s.deaths).unwrap_or_default()),
            escape(&s.by),
            escape(&s.note.as_deref().map(words::one_line).unwrap_or_default())
        );
    }
    let _ = write!(o, "</tbody>\n</table></div>\n</section>\n");
}

fn key(o: &mut String, report: &RoundReport) {
    let _ = write!(
        o,
        "<section class=\"key\" id=\"how-to-read\">\n<h2>How to read this report</h2>\n\
         <p>Ammonia is toxic in its un-ionized form (NH3), and how much of the total is un-ionized depends on pH, \
         temperature and salinity; it is computed here with published equations (Emerson et al. 1975; Bower &amp; \
         Bidwell 1978) and shown as mg/L of nitrogen (NH3-N). Each tank's band compares that figure with the edges \
         of its most demanding species: <strong>· clear</strong>, <strong>○ watch</strong> (look again soon, find \
         the cause), <strong>◆ act</strong> (act today), <strong>▲ critical</strong> (act now). Signs in the fish \
         or deaths raise the band one step. A <em>hidden risk</em> is ammonia that would become toxic if the pH \
         rose, for example after a water change with water of a higher pH.</p>\n\
         <p>Temperatures are in {}, volumes in {}. pH: {}. Times are local ({}).</p>\n</section>\n",
        escape(report.units.temperature),
        escape(report.units.volume),
        escape(report.ph_convention),
        escape(&report.generated_at.format("UTC%:z").to_string())
    );
}
