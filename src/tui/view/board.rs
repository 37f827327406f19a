//! The room board.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;

use super::{SELECTED, Theme, UNSELECTED, key_of, scroll_offset};
use crate::core::band::Band;
use crate::model::facility::Tank;
use crate::numfmt::sig;
use crate::tui::action::Action;
use crate::tui::keymap::{Context, Keymap};
use crate::tui::state::App;
use crate::tui::state::board::{BoardRow, rows, selected};
use crate::tui::state::round::age;

/// The species of a tank, by their common names ("Guppy, Platy").
pub fn species_names(app: &App, tank: &Tank) -> String {
    if tank.species.is_empty() {
        return "(no stock)".to_string();
    }
    tank.species
        .iter()
        .map(|k| {
            app.facility
                .species_profile(k.as_str())
                .map_or(k.as_str().to_string(), |p| p.name.split(" (").next().unwrap_or(&p.name).to_string())
        })
        .collect::<Vec<_>>()
        .join(", ")
}

fn fit(text: &str, width: usize) -> String {
    let count = text.chars().count();
    if count <= width {
        format!("{text:<width$}")
    } else {
        let mut cut: String = text.chars().take(width.saturating_sub(1)).collect();
        cut.push('…');
        cut
    }
}

pub(super) fn render(app: &App, theme: Theme, keymap: &Keymap, frame: &mut Frame, area: Rect) {
    let [counts, filter, list] =
        Layout::vertical([Constraint::Length(1), Constraint::Length(1), Constraint::Fill(1)]).areas(area);
    // Counts per band, worst first; glyphs carry the band without colour.
    let mut spans = vec![Span::raw(" ")];
    for band in Band::ALL.iter().rev() {
        let n = app.statuses.iter().filter(|s| s.band == Some(*band)).count();
        spans.push(Span::styled(format!("{} {n} {}", band.glyph(), band.name()), theme.band(*band)));
        spans.push(Span::raw("   "));
    }
    let unknown = app.statuses.iter().filter(|s| s.band.is_none()).count();
    spans.push(Span::styled(format!("– {unknown} no reading"), theme.dim()));
    frame.render_widget(Paragraph::new(Line::from(spans)), counts);

    let filter_line = if app.board.filtered() {
        let mut parts = Vec::new();
        if !app.board.text.is_empty() {
            parts.push(format!("containing '{}'", app.board.text));
        }
        if let Some(b) = app.board.band {
            parts.push(format!("{} or worse", b.name()));
        }
        Line::styled(
            format!(" Showing tanks {} · {} shows all", parts.join(", "), key_of(keymap, Context::Board, Action::Back)),
            theme.heading(),
        )
    } else {
        Line::styled(
            format!("   {:<2}{:<9}{:<24}{:>11}  {:<8}{}", "", "tank", "species", "NH3-N", "read", "round"),
            theme.dim(),
        )
    };
    frame.render_widget(Paragraph::new(filter_line), filter);

    let board_rows = rows(app);
    if board_rows.is_empty() {
        let text =
            if app.facility.tanks.is_empty() { " The room has no tanks." } else { " No tank matches the filter." };
        frame.render_widget(Paragraph::new(text), list);
        return;
    }
    let chosen = selected(app);
    let chosen_row = board_rows.iter().position(|r| *r == BoardRow::Tank(chosen.unwrap_or(usize::MAX))).unwrap_or(0);
    let height = usize::from(list.height);
    let offset = scroll_offset(chosen_row, height, board_rows.len());
    let width = usize::from(list.width);
    let species_width = width.saturating_sub(2 + 2 + 9 + 11 + 2 + 8 + 10 + 1).clamp(8, 40);
    let lines: Vec<Line> = board_rows
        .iter()
        .skip(offset)
        .take(height)
        .map(|row| match *row {
            BoardRow::Group(system, shown) => {
                let text = match system.map(|s| &app.facility.systems[s]) {
                    Some(s) => format!(
                        " {} · {} · {shown} tank{} · {} L shared",
                        s.id.as_str(),
                        s.name,
                        if shown == 1 { "" } else { "s" },
                        sig(s.volume_l, 3)
                    ),
                    None => format!(" Standalone · {shown} tank{}", if shown == 1 { "" } else { "s" }),
                };
                Line::styled(text, theme.heading())
            }
            BoardRow::Tank(t) => {
                let tank = app.tank(t);
                let status = &app.statuses[t];
                let is_selected = chosen == Some(t);
                let glyph = status.band.map_or(Span::styled("– ", theme.dim()), |b| {
                    Span::styled(format!("{} ", b.glyph()), theme.band(b))
                });
                let nh3 = status.nh3_n_mg_l.map_or("—".to_string(), |n| sig(n, 2));
                let read = status.last_at.map_or("never".to_string(), |at| age(app.now, at));
                let signs = if status.signs { " signs!" } else { "" };
                let mut line = Line::from(vec![
                    Span::raw(if is_selected { SELECTED } else { UNSELECTED }),
                    glyph,
                    Span::raw(format!("{} ", fit(tank.id.as_str(), 8))),
                    Span::raw(fit(&species_names(app, tank), species_width)),
                    Span::raw(format!("{nh3:>11}  ")),
                    Span::raw(format!("{read:<8}")),
                    Span::raw(format!("{}{signs}", status.due.mark())),
                ]);
                if is_selected {
                    line = line.style(theme.selected());
                }
                line
            }
        })
        .collect();
    frame.render_widget(Paragraph::new(lines), list);
}
