//! The what-if panel, over the screen it was opened from.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Clear, Paragraph, Wrap};

use super::{SELECTED, Theme, UNSELECTED, band_span, centered};
use crate::numfmt::sig;
use crate::tui::state::field::Provenance;
use crate::tui::state::whatif::WhatIfState;

pub(super) fn render(panel: &WhatIfState, theme: Theme, frame: &mut Frame, area: Rect) {
    let rect = centered(area, 76, 13 + u16::try_from(panel.outcome().notes.len()).unwrap_or(0));
    frame.render_widget(Clear, rect);
    let block = Block::bordered().title(format!(" What if · {} ", panel.base.label));
    let inner = block.inner(rect);
    frame.render_widget(block, rect);
    let outcome = panel.outcome();
    let mut lines = Vec::new();
    for (i, field) in panel.fields.iter().enumerate() {
        let focused = i == panel.focus;
        let changed = field.provenance == Provenance::Typed;
        let cursor = if focused { "▏" } else { " " };
        let mut line = Line::from(vec![
            Span::raw(if focused { SELECTED } else { UNSELECTED }),
            Span::raw(format!("{:<14}", field.kind.label())),
            Span::styled(
                format!("[{:<9}]", format!("{}{cursor}", field.text)),
                if field.error().is_some() { theme.error() } else { theme.heading() },
            ),
            Span::raw(format!(" {} {}", field.kind.unit(), if changed { "(changed)" } else { "" })),
        ]);
        if focused {
            line = line.style(theme.selected());
        }
        lines.push(line);
    }
    let focused = &panel.fields[panel.focus];
    match focused.refused.as_deref().or(focused.error()) {
        Some(message) => lines.push(Line::styled(format!("  ✗ {message}"), theme.error())),
        None => lines.push(Line::raw("")),
    }
    let before = outcome.before;
    let after = outcome.after;
    lines.push(Line::from(vec![
        Span::raw(format!("  now    NH3-N {:>7} mg/L  ", sig(before.toxic.nh3_n_mg_l, 2))),
        band_span(theme, Some(before.band)),
    ]));
    lines.push(Line::from(vec![
        Span::raw(format!("  then   NH3-N {:>7} mg/L  ", sig(after.toxic.nh3_n_mg_l, 2))),
        band_span(theme, Some(after.band)),
        Span::raw(format!(
            "   (pH {}, {} °C, {} g/L, TAN-N {})",
            crate::numfmt::fixed(outcome.after_sample.ph, 2),
            crate::numfmt::fixed(outcome.after_sample.temp_c, 1),
            sig(outcome.after_sample.salinity_ppt, 2),
            sig(outcome.after_sample.tan_n_mg_l, 2)
        )),
    ]));
    let ratio = if before.toxic.nh3_n_mg_l > 0.0 { after.toxic.nh3_n_mg_l / before.toxic.nh3_n_mg_l } else { 1.0 };
    lines.push(Line::styled(format!("  NH3 × {}", sig(ratio, 2)), theme.dim()));
    for note in &outcome.notes {
        lines.push(Line::raw(format!("  • {note}")));
    }
    frame.render_widget(Paragraph::new(lines).wrap(Wrap { trim: false }), inner);
}
