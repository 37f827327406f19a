//! A tank's page: charts over 7, 30 or 90 days and the history table.

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::Style;
use ratatui::symbols::Marker;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Axis, Block, Chart, Dataset, GraphType, Paragraph};

use super::board::species_names;
use super::{SELECTED, Theme, UNSELECTED, scroll_offset};
use crate::core::band::Band;
use crate::model::record::Target;
use crate::numfmt::sig;
use crate::tui::state::App;
use crate::tui::state::tank_page::{ChartKind, TankPage, event_label, history_rows, series};

pub(super) fn render(app: &App, page: &TankPage, theme: Theme, frame: &mut Frame, area: Rect) {
    let tank = app.tank(page.tank);
    let [info, rest] = Layout::vertical([Constraint::Length(1), Constraint::Fill(1)]).areas(area);
    let (volume, what) = app.water_volume(tank);
    let system =
        if tank.system.is_some() { format!(" · {what} ({} L shared)", sig(volume, 3)) } else { String::new() };
    let age_days = (app.now.date_naive() - tank.set_up).num_days();
    frame.render_widget(
        Paragraph::new(Line::styled(
            format!(
                " {} · {} · {} L{system} · {} fish · set up {age_days} d ago ({})",
                tank.id.as_str(),
                species_names(app, tank),
                sig(tank.volume_l, 3),
                tank.stock_count,
                tank.set_up
            ),
            theme.heading(),
        )),
        info,
    );
    let wide = area.width >= 120 && area.height >= 36;
    let chart_height = if wide { area.height / 2 } else { 9 };
    let [charts, table] = Layout::vertical([Constraint::Length(chart_height), Constraint::Fill(1)]).areas(rest);
    if wide {
        let [top, bottom] = Layout::vertical([Constraint::Fill(1), Constraint::Fill(1)]).areas(charts);
        let [a, b] = Layout::horizontal([Constraint::Fill(1), Constraint::Fill(1)]).areas(top);
        let [c, d] = Layout::horizontal([Constraint::Fill(1), Constraint::Fill(1)]).areas(bottom);
        for (kind, cell) in ChartKind::ALL.into_iter().zip([a, b, c, d]) {
            render_chart(app, page, kind, theme, frame, cell);
        }
    } else {
        render_chart(app, page, page.chart, theme, frame, charts);
    }
    render_table(app, page, theme, frame, table);
}

fn bounds(points: &[(f64, f64)], from_zero: bool, include: &[f64]) -> [f64; 2] {
    let values = points.iter().map(|p| p.1).chain(include.iter().copied());
    let (lo, hi) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| (lo.min(v), hi.max(v)));
    if !lo.is_finite() {
        return [0.0, 1.0];
    }
    let lo = if from_zero { 0.0 } else { lo };
    let span = (hi - lo).max(hi.abs() * 0.05).max(0.01);
    [if from_zero { 0.0 } else { lo - span * 0.1 }, hi + span * 0.1]
}

fn render_chart(app: &App, page: &TankPage, kind: ChartKind, theme: Theme, frame: &mut Frame, area: Rect) {
    let days = page.range_days;
    let points = series(app, page.tank, kind, days);
    let unit = match kind {
        ChartKind::Temperature => app.facility.room.temperature_unit.symbol(),
        _ => "",
    };
    let title = format!(" {} {unit} · last {days} days ", kind.title());
    let block = Block::bordered().title(title);
    if points.is_empty() {
        let inner = block.inner(area);
        frame.render_widget(block, area);
        frame.render_widget(
            Paragraph::new(Line::styled(format!(" No readings in the last {days} days."), theme.dim())),
            inner,
        );
        return;
    }
    let edges = app.facility.effective_profile(app.tank(page.tank)).band_edges;
    let edge_values: Vec<(Band, f64)> =
        if kind == ChartKind::Nh3 { vec![(Band::Watch, edges.watch), (Band::Act, edges.act)] } else { Vec::new() };
    let include: Vec<f64> = edge_values.iter().map(|e| e.1).collect();
    let y = bounds(&points, matches!(kind, ChartKind::TotalAmmonia | ChartKind::Nh3), &include);
    let x = [-f64::from(days), 0.0];
    let edge_lines: Vec<(Band, [(f64, f64); 2])> =
        edge_values.iter().map(|(b, v)| (*b, [(x[0], *v), (x[1], *v)])).collect();
    let mut datasets = vec![
        Dataset::default()
            .name(kind.title().split(" (").next().unwrap_or(""))
            .marker(Marker::Braille)
            .graph_type(GraphType::Line)
            .style(if theme_colour(theme) { Style::new().fg(ratatui::style::Color::Cyan) } else { Style::new() })
            .data(&points),
    ];
    for (band, line) in &edge_lines {
        datasets.push(
            Dataset::default()
                .name(format!("{} edge", band.name()))
                .marker(Marker::Dot)
                .graph_type(GraphType::Line)
                .style(theme.band(*band))
                .data(line),
        );
    }
    let fmt = |v: f64| sig(v, 2);
    let chart = Chart::new(datasets)
        .block(block)
        .x_axis(
            Axis::default()
                .bounds(x)
                .labels([format!("-{days} d"), format!("-{} d", days / 2), "now".to_string()])
                .style(theme.dim()),
        )
        .y_axis(Axis::default().bounds(y).labels([fmt(y[0]), fmt((y[0] + y[1]) / 2.0), fmt(y[1])]).style(theme.dim()))
        .hidden_legend_constraints((Constraint::Ratio(1, 3), Constraint::Ratio(1, 3)));
    // One line needs no legend; the band edges do.
    let chart = if edge_lines.is_empty() { chart.legend_position(None) } else { chart };
    frame.render_widget(chart, area);
}

fn theme_colour(theme: Theme) -> bool {
    theme.dim() != Style::new()
}

fn cell(v: Option<f64>, digits: usize) -> String {
    v.map_or("·".to_string(), |v| sig(v, digits))
}

fn render_table(app: &App, page: &TankPage, theme: Theme, frame: &mut Frame, area: Rect) {
    let rows = history_rows(app, page.tank);
    let block = Block::bordered().title(format!(" History: {} readings and events ", rows.len()));
    let inner = block.inner(area);
    frame.render_widget(block, area);
    let temp_unit = app.facility.room.temperature_unit.symbol();
    let mut lines = vec![Line::styled(
        format!(
            "  {:<13}{:<8}{:>6}{:>6}{:>7}{:>7}{:>8}  {}",
            "when", "of", temp_unit, "pH", "TAN", "NO2", "NH3-N", "band · seen · note"
        ),
        theme.dim(),
    )];
    if rows.is_empty() {
        lines.push(Line::styled("  Nothing recorded yet.", theme.dim()));
    }
    let height = usize::from(inner.height.saturating_sub(1));
    let offset = scroll_offset(page.selected, height, rows.len());
    let fahrenheit = app.facility.room.temperature_unit == crate::model::facility::TemperatureUnit::Fahrenheit;
    for (i, row) in rows.iter().enumerate().skip(offset).take(height) {
        let selected = i == page.selected;
        let of = match row.entry.body.target() {
            Some(Target::System(id)) => id.clone(),
            _ => "tank".to_string(),
        };
        let when = row.entry.taken_at.format("%d %b %H:%M").to_string();
        let corrected = if row.entry.corrected { "*" } else { " " };
        let mut spans = vec![Span::raw(if selected { SELECTED } else { UNSELECTED })];
        if let Some(reading) = row.entry.reading() {
            let m = &reading.measurements;
            let temp = m.temp_c().map(|c| if fahrenheit { crate::core::units::celsius_to_fahrenheit(c) } else { c });
            spans.push(Span::raw(format!(
                "{when:<12}{corrected}{:<8}{:>6}{:>6}{:>7}{:>7}{:>8}  ",
                of.chars().take(7).collect::<String>(),
                cell(temp, 3),
                cell(m.ph, 2),
                cell(m.tan_n_mg_l(), 2),
                cell(m.nitrite_n_mg_l(), 2),
                row.nh3.map_or("·".to_string(), |(n, _)| sig(n, 2)),
            )));
            if let Some((_, band)) = row.nh3 {
                spans.push(Span::styled(format!("{} {} ", band.glyph(), band.name()), theme.band(band)));
            }
            let signs: Vec<String> = reading.observations.signs().iter().map(|s| s.name().to_string()).collect();
            let mut extra = signs.join(", ");
            if reading.observations.deaths > 0 {
                extra.push_str(&format!(" {} dead", reading.observations.deaths));
            }
            if let Some(note) = &reading.note {
                extra.push_str(&format!(" “{note}”"));
            }
            spans.push(Span::styled(extra, theme.error()));
        } else if let Some(event) = row.entry.event() {
            spans.push(Span::styled(
                format!(
                    "{when:<12}{corrected}{:<8}event: {}",
                    of.chars().take(7).collect::<String>(),
                    event_label(&event.kind)
                ),
                theme.heading(),
            ));
        }
        let mut line = Line::from(spans);
        if selected {
            line = line.style(theme.selected());
        }
        lines.push(line);
    }
    frame.render_widget(Paragraph::new(lines), inner);
}
