//! The walk: the tank, its last reading, the entry fields and the verdict.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::Style;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Paragraph, Wrap};

use super::board::species_names;
use super::{SELECTED, SHORT_CAUTION, Theme, UNSELECTED, band_span, key_of};
use crate::model::record::Sign;
use crate::numfmt::{fixed, sig};
use crate::rules::assess::Assessment;
use crate::rules::latent::LatentBasis;
use crate::tui::action::Action;
use crate::tui::keymap::{Context, Keymap};
use crate::tui::state::App;
use crate::tui::state::field::{Provenance, format_value};
use crate::tui::state::round::{Due, age};
use crate::tui::state::walk::{TankEntry, WalkState};

/// The signs a person can toggle, with the action that toggles each.
const SIGN_KEYS: [(Action, &str, Sign); 5] = [
    (Action::ToggleGasping, "gasping", Sign::Gasping),
    (Action::ToggleHyperactive, "hyperactive", Sign::Hyperactive),
    (Action::ToggleNervous, "nervous", Sign::NervousSigns),
    (Action::ToggleCloudyEyes, "cloudy eyes", Sign::CloudyEyes),
    (Action::ToggleMucus, "mucus", Sign::ExcessMucus),
];

pub(super) fn render(app: &App, theme: Theme, keymap: &Keymap, frame: &mut Frame, area: Rect) {
    let Some(walk) = &app.walk else {
        frame.render_widget(Paragraph::new(" The walk has not started."), area);
        return;
    };
    let entry = &walk.entry;
    let [identity, last, panels] =
        Layout::vertical([Constraint::Length(1), Constraint::Length(1), Constraint::Fill(1)]).areas(area);
    render_identity(app, walk, theme, frame, identity);
    render_last(app, entry, theme, frame, last);
    let left_width = if area.width >= 120 { 62 } else { 48 };
    let [left, right] = Layout::horizontal([Constraint::Length(left_width), Constraint::Fill(1)]).areas(panels);
    render_fields(app, entry, theme, keymap, frame, left);
    render_verdict(&entry.verdict, theme, keymap, frame, right, area.width >= 120);
}

fn render_identity(app: &App, walk: &WalkState, theme: Theme, frame: &mut Frame, area: Rect) {
    let tank = app.tank(walk.entry.tank);
    let (volume, what) = app.water_volume(tank);
    let shared = if tank.system.is_some() { format!(" · {what}, {} L shared", sig(volume, 3)) } else { String::new() };
    let status = &app.statuses[walk.entry.tank];
    let state = match status.due {
        Due::Done if walk.entry.own.is_some() => "done: changes save a correction",
        Due::Done => "done (system reading)",
        Due::Skipped => "skipped",
        _ => "to read",
    };
    let line = Line::from(vec![
        Span::styled(
            format!(" {} ", tank.id.as_str()),
            theme.heading().add_modifier(ratatui::style::Modifier::REVERSED),
        ),
        Span::styled(format!(" {} · {} L{shared}", species_names(app, tank), sig(tank.volume_l, 3)), theme.heading()),
        Span::styled(format!(" · {}/{} · {state}", walk.pos + 1, app.round_order.len()), theme.dim()),
    ]);
    frame.render_widget(Paragraph::new(line), area);
}

fn render_last(app: &App, entry: &TankEntry, theme: Theme, frame: &mut Frame, area: Rect) {
    let line = match &entry.previous {
        None => Line::styled(" No earlier reading of this tank.", theme.dim()),
        Some(previous) => {
            let mut spans = vec![Span::raw(format!(
                " Last reading {} ago ({})",
                age(app.now, previous.at),
                previous.at.format("%a %d %b %H:%M")
            ))];
            if let Some((nh3, band)) = previous.nh3 {
                spans.push(Span::raw(format!(" · NH3-N {} ", sig(nh3, 2))));
                spans.push(band_span(theme, Some(band)));
            }
            if let Some(t) = &entry.history_trend {
                spans.push(Span::raw(format!(" · trend {} {}", t.direction.arrow(), t.direction.name())));
            }
            Line::from(spans)
        }
    };
    frame.render_widget(Paragraph::new(line), area);
}

fn provenance_mark(p: &Provenance) -> &'static str {
    match p {
        Provenance::Typed => " ",
        Provenance::Previous => "=",
        Provenance::Carried(_) => "↳",
        Provenance::Saved => "✓",
    }
}

fn render_fields(app: &App, entry: &TankEntry, theme: Theme, keymap: &Keymap, frame: &mut Frame, area: Rect) {
    let block = Block::bordered().title(" Reading ");
    let inner = block.inner(area);
    frame.render_widget(block, area);
    let mut lines: Vec<Line> = Vec::new();
    lines.push(Line::styled(format!("  {:<14}{:<11}{:<13}{:>5}", "", " now", "", "last"), theme.dim()));
    for (i, field) in entry.fields.iter().enumerate() {
        if i == entry.routine {
            lines.push(Line::styled("  optional", theme.dim()));
        }
        let focused = i == entry.focus;
        let cursor = if focused { "▏" } else { " " };
        let value = format!("{}{}{cursor}", provenance_mark(&field.provenance), field.text);
        let value: String = value.chars().take(9).collect();
        let last = entry.previous.as_ref().and_then(|p| p.values[i]).map_or(String::new(), format_value);
        let unit: String = field.kind.unit().chars().take(12).collect();
        let value_style = if field.error().is_some() {
            theme.error()
        } else if matches!(field.provenance, Provenance::Carried(_)) {
            theme.dim()
        } else {
            Style::new()
        };
        let mut line = Line::from(vec![
            Span::raw(if focused { SELECTED } else { UNSELECTED }),
            Span::raw(format!("{:<14}", field.kind.label())),
            Span::styled(format!("[{value:<9}]"), value_style),
            Span::raw(format!(" {unit:<12}")),
            Span::styled(format!("{last:>5}"), theme.dim()),
        ]);
        if focused {
            line = line.style(theme.selected());
        }
        lines.push(line);
    }
    // What the focused field says: a refused key, an error, a warning, or where its value came from.
    let focused = &entry.fields[entry.focus];
    let message = if let Some(refused) = &focused.refused {
        Line::styled(format!("  ✗ {refused}"), theme.error())
    } else if let Some(error) = entry.fields.iter().find_map(|f| f.error().map(|e| (f.kind.label(), e))) {
        Line::styled(format!("  ✗ {}: {}", error.0, error.1), theme.error())
    } else if let Some(warning) = focused.warning() {
        Line::styled(format!("  ! {warning}"), theme.band(crate::core::band::Band::Watch))
    } else if let Provenance::Carried(from) = &focused.provenance {
        Line::styled(format!("  ↳ from {from}: shared water, no need to test again"), theme.dim())
    } else if let Some(carried) = &entry.carried {
        Line::styled(format!("  ↳ carried from system {} {}", carried.system, carried.at.format("%H:%M")), theme.dim())
    } else if entry.fields.iter().any(|f| f.provenance == Provenance::Saved) {
        Line::styled("  ✓ saved this round", theme.dim())
    } else if app.tank(entry.tank).system.is_some() && entry.carried.is_none() && entry.own.is_none() {
        let system = app.tank(entry.tank).system.as_ref().map_or("", |s| s.as_str());
        Line::styled(format!("  Saved as {system}'s water (all its tanks)"), theme.dim())
    } else {
        Line::raw("")
    };
    lines.push(message);
    // Signs, toggled by single keys named from the keymap.
    let mut rows: Vec<Vec<Span>> =
        vec![vec![Span::raw("  Seen:")], vec![Span::raw("       ")], vec![Span::raw("       ")]];
    for (i, (action, label, sign)) in SIGN_KEYS.into_iter().enumerate() {
        let on = entry.observations.has(sign);
        let key = key_of(keymap, Context::Walk, action);
        let style = if on { theme.error() } else { Style::new() };
        rows[i / 2].push(Span::styled(format!(" [{}]{key} {label:<12}", if on { "x" } else { " " }), style));
    }
    let deaths = entry.observations.deaths;
    rows[2].push(Span::styled(
        format!(" {} deaths: {deaths}", key_of(keymap, Context::Walk, Action::SetDeaths)),
        if deaths > 0 { theme.error() } else { Style::new() },
    ));
    lines.extend(rows.into_iter().map(Line::from));
    let note = entry.note.as_deref().unwrap_or("—");
    lines.push(Line::raw(format!("  {} note: {note}", key_of(keymap, Context::Walk, Action::EditNote))));
    frame.render_widget(Paragraph::new(lines), inner);
}

fn latent_basis(basis: LatentBasis) -> &'static str {
    match basis {
        LatentBasis::SourceWater => "source water",
        LatentBasis::LastWaterChange => "last water change",
        LatentBasis::DefaultStep => "pH +0.5",
    }
}

fn render_verdict(a: &Assessment, theme: Theme, keymap: &Keymap, frame: &mut Frame, area: Rect, wide: bool) {
    let block = Block::bordered().title(" Verdict ");
    let inner = block.inner(area);
    frame.render_widget(block, area);
    let mut lines: Vec<Line> = Vec::new();
    match (&a.figures, a.band) {
        (Some(f), Some(band)) => {
            lines.push(Line::from(vec![
                Span::styled(format!("NH3-N {} mg/L", sig(f.nh3_n_mg_l, 2)), theme.heading()),
                Span::raw(format!(" (NH3 {}, {} %)", sig(f.nh3_mg_l, 2), fixed(f.nh3_fraction * 100.0, 2))),
            ]));
            let mut band_line = vec![band_span(theme, Some(band))];
            if !a.raised_by.is_empty() {
                let measured = a.measured_band.map_or("", |b| b.name());
                band_line.push(Span::raw(format!(" (NH3 alone: {measured}; raised by {})", a.raised_by.join(", "))));
            }
            lines.push(Line::from(band_line));
            if let Some(latent) = &a.latent
                && latent.band > a.measured_band.unwrap_or(latent.band)
            {
                lines.push(Line::from(vec![
                    Span::raw("if pH rises: "),
                    band_span(theme, Some(latent.band)),
                    Span::raw(format!(
                        " at pH {} ({}), NH3-N {}",
                        fixed(latent.ph, 1),
                        latent_basis(latent.basis),
                        sig(latent.nh3_n_mg_l, 2)
                    )),
                ]));
            }
        }
        _ => {
            let missing = a.missing.join(", ");
            lines.push(Line::styled(format!("Type {missing} to see NH3 and the band."), theme.dim()));
        }
    }
    if !a.actions.is_empty() {
        lines.push(Line::styled("Do now:", theme.heading()));
        for (i, action) in a.actions.iter().enumerate() {
            lines.push(Line::raw(format!("{}. {}", i + 1, super::action_text(action))));
            if wide {
                lines.push(Line::styled(format!("   {}", action.reason), theme.dim()));
            }
        }
    }
    let whatif = key_of(keymap, Context::Walk, Action::OpenWhatIf);
    for warning in &a.warnings {
        lines.push(Line::styled(format!("✗ {}", warning.message), theme.band(crate::core::band::Band::Act)));
    }
    if let Some(t) = &a.trend {
        lines.push(Line::raw(format!(
            "trend {} {} {:+.3} NH3-N/day ({} readings)",
            t.direction.arrow(),
            t.direction.name(),
            t.rate_per_day,
            t.readings
        )));
    }
    lines.push(Line::raw(format!("biofilter: {}", a.biofilter.name())));
    lines.push(Line::styled(format!("{whatif}: what if pH, temperature, salt or a change"), theme.dim()));
    // The caution keeps its place at the bottom, whatever the list above holds.
    let caution = if wide { crate::CAUTION } else { SHORT_CAUTION };
    let caution_height = if wide { 2 } else { 3 };
    let [content, bottom] = Layout::vertical([Constraint::Fill(1), Constraint::Length(caution_height)]).areas(inner);
    frame.render_widget(Paragraph::new(lines).wrap(Wrap { trim: true }), content);
    frame.render_widget(Paragraph::new(Line::styled(caution, theme.dim())).wrap(Wrap { trim: true }), bottom);
}
