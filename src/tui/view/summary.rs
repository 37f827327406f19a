//! The round summary.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::text::{Line, Span};
use ratatui::widgets::{Paragraph, Wrap};

use super::{SELECTED, Theme, UNSELECTED, band_span, scroll_offset};
use crate::numfmt::sig;
use crate::tui::state::App;
use crate::tui::state::summary::{SummaryState, summarize};

pub(super) fn render(app: &App, state: &SummaryState, theme: Theme, frame: &mut Frame, area: Rect) {
    let summary = summarize(app);
    let [counts, body, caution] =
        Layout::vertical([Constraint::Length(1), Constraint::Fill(1), Constraint::Length(2)]).areas(area);
    frame.render_widget(
        Paragraph::new(Line::styled(
            format!(
                " Done {} · skipped {} · not reached {} · not due {} · need action {}",
                summary.done.len(),
                summary.skipped.len(),
                summary.not_reached.len(),
                summary.not_due.len(),
                summary.attention.len()
            ),
            theme.heading(),
        )),
        counts,
    );
    // Lines that name a tank can be selected, in the order of `Summary::lines`.
    let mut lines: Vec<(bool, Line)> = Vec::new();
    let tank_line = |lines: &mut Vec<(bool, Line<'static>)>, n: usize, spans: Vec<Span<'static>>| {
        let selected = n == state.selected;
        let mut all = vec![Span::raw(if selected { SELECTED } else { UNSELECTED })];
        all.extend(spans);
        let mut line = Line::from(all);
        if selected {
            line = line.style(theme.selected());
        }
        lines.push((true, line));
    };
    let mut n = 0;
    lines.push((false, Line::styled(" Needs action now (act or critical)", theme.heading())));
    if summary.attention.is_empty() {
        lines.push((false, Line::styled("   none", theme.dim())));
    }
    for attention in &summary.attention {
        let label = match &attention.shared {
            Some((system, n)) if *n > 1 => format!("{system} ({n} tanks, shared water)"),
            _ => app.tank(attention.tank).id.as_str().to_string(),
        };
        tank_line(
            &mut lines,
            n,
            vec![
                band_span(theme, Some(attention.band)),
                Span::raw(format!(" {label:<8} NH3-N {}", sig(attention.nh3_n_mg_l, 2))),
            ],
        );
        n += 1;
        for action in attention.actions.iter().take(3) {
            lines.push((false, Line::raw(format!("      • {}", super::action_text(action)))));
        }
        if attention.actions.len() > 3 {
            lines.push((
                false,
                Line::styled(format!("      + {} more on its page", attention.actions.len() - 3), theme.dim()),
            ));
        }
    }
    lines.push((false, Line::styled(format!(" Skipped ({})", summary.skipped.len()), theme.heading())));
    for (tank, reason) in &summary.skipped {
        tank_line(&mut lines, n, vec![Span::raw(format!("– {:<8} {reason}", app.tank(*tank).id.as_str()))]);
        n += 1;
    }
    lines.push((false, Line::styled(format!(" Not reached ({})", summary.not_reached.len()), theme.heading())));
    for tank in &summary.not_reached {
        let due = app.statuses[*tank].due.mark();
        tank_line(&mut lines, n, vec![Span::raw(format!("  {:<8} {due}", app.tank(*tank).id.as_str()))]);
        n += 1;
    }
    lines.push((false, Line::styled(format!(" Done ({})", summary.done.len()), theme.heading())));
    for tank in &summary.done {
        let band = app.statuses[*tank].band;
        tank_line(&mut lines, n, vec![band_span(theme, band), Span::raw(format!(" {}", app.tank(*tank).id.as_str()))]);
        n += 1;
    }
    // Keep the selected line in view.
    let mut seen = 0;
    let selected_line = lines
        .iter()
        .position(|(selectable, _)| {
            if *selectable {
                seen += 1;
                seen == state.selected + 1
            } else {
                false
            }
        })
        .unwrap_or(0);
    let height = usize::from(body.height);
    let offset = scroll_offset(selected_line, height, lines.len());
    let shown: Vec<Line> = lines.into_iter().skip(offset).take(height).map(|(_, l)| l).collect();
    frame.render_widget(Paragraph::new(shown), body);
    frame.render_widget(
        Paragraph::new(Line::styled(
            format!(" {}", if area.width >= 120 { crate::CAUTION } else { super::SHORT_CAUTION }),
            theme.dim(),
        ))
        .wrap(Wrap { trim: true }),
        caution,
    );
}
