//! A small SVG writer for time-series line charts: a time axis with day or
//! hour ticks, a y axis with round-number ticks, one series drawn as a line
//! with a dot per reading, labelled horizontal reference lines (band edges),
//! shaded ranges (bands, a species' kept range), and numbered event markers
//! on the time axis.
//!
//! The output is one self-contained `<svg>` element: presentation attributes
//! only (no stylesheet, no script, no external reference), a `viewBox` so it
//! scales to any width, and a `<title>` and `<desc>` for screen readers. It
//! carries no `xmlns` unless asked (inline SVG in HTML needs none).

use std::fmt::Write;

use chrono::{DateTime, Datelike, Duration, FixedOffset, NaiveTime, TimeZone, Timelike};

/// Width of the drawing, in user units (the `viewBox`).
pub const WIDTH: f64 = 440.0;
/// Height of the drawing, in user units.
pub const HEIGHT: f64 = 200.0;
const LEFT: f64 = 44.0;
const RIGHT: f64 = WIDTH - 72.0;
const TOP: f64 = 38.0;
const BOTTOM: f64 = HEIGHT - 30.0;
const INK: &str = "#1f2933";
const GRID: &str = "#d9dee3";
const MUTED: &str = "#5f6b76";
const LINE: &str = "#2f5d8a";
const EVENT: &str = "#6b4fa3";

/// One reading on the chart.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    /// Seconds since the Unix epoch.
    pub t: i64,
    /// The value.
    pub value: f64,
    /// Fill colour of its dot (a band's colour), or `None` for the line's.
    pub colour: Option<&'static str>,
}

/// A labelled horizontal line (a band edge).
#[derive(Debug, Clone, PartialEq)]
pub struct Reference {
    /// Where it is.
    pub value: f64,
    /// Its label, drawn to the right of the plot.
    pub label: String,
    /// Its colour.
    pub colour: &'static str,
}

/// A shaded horizontal range (a band's zone, a kept range).
#[derive(Debug, Clone, PartialEq)]
pub struct Shade {
    /// Lower end (`f64::NEG_INFINITY` for the bottom of the plot).
    pub from: f64,
    /// Upper end (`f64::INFINITY` for the top of the plot).
    pub to: f64,
    /// Fill colour.
    pub colour: &'static str,
    /// Fill opacity, 0–1.
    pub opacity: f64,
    /// What it means, as a tooltip.
    pub title: String,
}

/// An event on the time axis.
#[derive(Debug, Clone, PartialEq)]
pub struct Marker {
    /// Seconds since the Unix epoch.
    pub t: i64,
    /// Short label in the flag (a number keyed to the list of events).
    pub label: String,
    /// What happened, as a tooltip.
    pub title: String,
}

/// Everything one chart shows.
#[derive(Debug, Clone, PartialEq)]
pub struct LineChart {
    /// Prefix of the element ids (unique within the page).
    pub id: String,
    /// Heading drawn at the top left, also the accessible title.
    pub title: String,
    /// A sentence or two for screen readers (what the chart shows in numbers).
    pub description: String,
    /// The time span shown, seconds since the Unix epoch.
    pub from: i64,
    /// End of the time span shown.
    pub until: i64,
    /// The offset the time labels are written in.
    pub offset: FixedOffset,
    /// The readings.
    pub points: Vec<Point>,
    /// Keep zero at the bottom of the y axis (concentrations).
    pub from_zero: bool,
    /// The y axis spans at least this much (so noise is not blown up).
    pub min_span: f64,
    /// Values the y axis must include (the edges that matter).
    pub include: Vec<f64>,
    /// Horizontal reference lines.
    pub references: Vec<Reference>,
    /// Shaded ranges, drawn under everything else.
    pub shades: Vec<Shade>,
    /// Event markers.
    pub markers: Vec<Marker>,
    /// Readings further apart than this (seconds) are not joined by the line.
    pub gap: i64,
    /// Shown in the plot when there is no reading.
    pub empty_text: String,
    /// Add the SVG namespace (for a stand-alone `.svg` file).
    pub standalone: bool,
}

/// Round-number ticks covering `lo..=hi`: the step and the first and last tick.
pub fn nice_ticks(lo: f64, hi: f64, target: usize) -> (f64, f64, f64) {
    let span = (hi - lo).abs().max(f64::EPSILON);
    let raw = span / target.max(1) as f64;
    let magnitude = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 2.5, 5.0, 10.0].iter().map(|m| m * magnitude).find(|s| *s >= raw).unwrap_or(10.0 * magnitude);
    let first = (lo / step).floor() * step;
    let last = (hi / step).ceil() * step;
    (step, first, last)
}

/// Decimals needed to print ticks `step` apart.
fn decimals_for(step: f64) -> usize {
    let mut d = 0;
    while d < 6 && ((step * 10f64.powi(d as i32)).round() - step * 10f64.powi(d as i32)).abs() > 1e-6 {
        d += 1;
    }
    d
}

/// Tick steps of the time axis, shortest first.
const TIME_STEPS_HOURS: [i64; 11] = [1, 2, 3, 6, 12, 24, 48, 7 * 24, 14 * 24, 28 * 24, 56 * 24];

/// Ticks of the time axis between `from` and `until` (seconds), at most
/// `max` of them, aligned to the local clock of `offset`: whole hours, or
/// local midnights (weeks start on Monday). Each tick is a time and a label.
pub fn time_ticks(from: i64, until: i64, offset: FixedOffset, max: usize) -> Vec<(i64, String)> {
    if until <= from {
        return Vec::new();
    }
    let span_hours = (until - from) / 3600;
    let step_h = TIME_STEPS_HOURS
        .iter()
        .copied()
        .find(|h| span_hours / h <= max as i64)
        .unwrap_or(TIME_STEPS_HOURS[TIME_STEPS_HOURS.len() - 1]);
    let Some(start) = DateTime::from_timestamp(from, 0) else { return Vec::new() };
    let start = start.with_timezone(&offset);
    let first = if step_h < 24 {
        let hour = start.hour() as i64;
        let aligned = (hour + step_h - 1) / step_h * step_h;
        let base = offset.from_local_datetime(&start.date_naive().and_time(NaiveTime::MIN)).single();
        base.map(|b| b + Duration::hours(aligned))
    } else {
        let mut day = start.date_naive();
        if start.time() != NaiveTime::MIN {
            day = day.succ_opt().unwrap_or(day);
        }
        if step_h >= 7 * 24 {
            while day.weekday() != chrono::Weekday::Mon {
                day = day.succ_opt().unwrap_or(day);
            }
        }
        offset.from_local_datetime(&day.and_time(NaiveTime::MIN)).single()
    };
    let Some(mut tick) = first else { return Vec::new() };
    let mut ticks = Vec::new();
    while tick.timestamp() <= until && ticks.len() <= max {
        let label = if step_h < 24 && (tick.hour() != 0 || ticks.is_empty() && span_hours <= 24) {
            tick.format("%H:%M").to_string()
        } else {
            tick.format("%-d %b").to_string()
        };
        ticks.push((tick.timestamp(), label));
        tick += Duration::hours(step_h);
    }
    ticks
}

/// Escapes text for XML content and attribute values.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c if c.is_control() && c != '\n' && c != '\t' => {}
            c => out.push(c),
        }
    }
    out
}

/// A coordinate, rounded to a tenth.
fn n(x: f64) -> String {
    let r = (x * 10.0).round() / 10.0;
    if r == r.trunc() { format!("{}", r as i64) } else { format!("{r:.1}") }
}

/// The y range of a chart: the data and the values to include, padded, on round ticks.
fn y_range(chart: &LineChart, values: &[f64]) -> (f64, f64, f64) {
    let mut lo = values.iter().chain(&chart.include).copied().fold(f64::INFINITY, f64::min);
    let mut hi = values.iter().chain(&chart.include).copied().fold(f64::NEG_INFINITY, f64::max);
    if !lo.is_finite() || !hi.is_finite() {
        (lo, hi) = (0.0, 1.0);
    }
    if chart.from_zero {
        lo = lo.min(0.0);
    }
    let span = (hi - lo).max(chart.min_span).max(1e-9);
    let middle = (hi + lo) / 2.0;
    if hi - lo < span {
        (lo, hi) = (middle - span / 2.0, middle + span / 2.0);
        if chart.from_zero && lo < 0.0 {
            (lo, hi) = (0.0, span);
        }
    }
    let pad = 0.06 * span;
    hi += pad;
    if !chart.from_zero {
        lo -= pad;
    } else {
        lo = lo.max(0.0);
    }
    let (step, first, last) = nice_ticks(lo, hi, 4);
    (step, if chart.from_zero { first.max(0.0) } else { first }, last)
}

/// Draws the chart.
pub fn line_chart(chart: &LineChart) -> String {
    let mut s = String::new();
    let id = escape(&chart.id);
    let xmlns = if chart.standalone { r#" xmlns="http://www.w3.org/2000/svg""# } else { "" };
    let _ = write!(
        s,
        r#"<svg{xmlns} viewBox="0 0 {w} {h}" role="img" aria-labelledby="{id}-t {id}-d" font-family="system-ui, -apple-system, 'Segoe UI', Roboto, sans-serif" font-size="11" class="chart">"#,
        w = n(WIDTH),
        h = n(HEIGHT),
    );
    let _ = write!(s, r#"<title id="{id}-t">{}</title>"#, escape(&chart.title));
    let _ = write!(s, r#"<desc id="{id}-d">{}</desc>"#, escape(&chart.description));
    let _ = write!(
        s,
        r#"<text x="{}" y="14" font-size="13" font-weight="600" fill="{INK}">{}</text>"#,
        n(LEFT - 40.0),
        escape(&chart.title)
    );

    let from = chart.from;
    let until = chart.until.max(from + 1);
    let x = |t: i64| LEFT + (RIGHT - LEFT) * (t - from) as f64 / (until - from) as f64;
    let points: Vec<Point> =
        chart.points.iter().copied().filter(|p| p.t >= from && p.t <= until && p.value.is_finite()).collect();
    let values: Vec<f64> = points.iter().map(|p| p.value).collect();
    let (step, lo, hi) = y_range(chart, &values);
    let y = |v: f64| BOTTOM - (BOTTOM - TOP) * (v - lo) / (hi - lo);
    let clamp_y = |v: f64| y(v.clamp(lo, hi));

    // Shaded ranges under everything.
    for shade in &chart.shades {
        let (a, b) = (shade.from.max(lo), shade.to.min(hi));
        if b <= a {
            continue;
        }
        let _ = write!(
            s,
            r#"<rect x="{}" y="{}" width="{}" height="{}" fill="{}" fill-opacity="{}"><title>{}</title></rect>"#,
            n(LEFT),
            n(clamp_y(b)),
            n(RIGHT - LEFT),
            n(clamp_y(a) - clamp_y(b)),
            shade.colour,
            shade.opacity,
            escape(&shade.title)
        );
    }

    // Grid and y ticks.
    let decimals = decimals_for(step);
    let mut v = lo;
    let mut guard = 0;
    while v <= hi + step * 1e-6 && guard < 50 {
        let yy = n(y(v));
        let _ = write!(
            s,
            r#"<line x1="{}" y1="{yy}" x2="{}" y2="{yy}" stroke="{GRID}" stroke-width="0.8"/>"#,
            n(LEFT),
            n(RIGHT)
        );
        let _ = write!(
            s,
            r#"<text x="{}" y="{}" text-anchor="end" fill="{MUTED}">{}</text>"#,
            n(LEFT - 5.0),
            n(y(v) + 3.5),
            format_args!("{:.*}", decimals, v + 0.0)
        );
        v += step;
        guard += 1;
    }

    // Time axis.
    for (t, label) in time_ticks(from, until, chart.offset, 7) {
        let xx = n(x(t));
        let _ = write!(
            s,
            r#"<line x1="{xx}" y1="{}" x2="{xx}" y2="{}" stroke="{GRID}" stroke-width="0.8"/>"#,
            n(TOP),
            n(BOTTOM + 4.0)
        );
        let _ = write!(
            s,
            r#"<text x="{xx}" y="{}" text-anchor="middle" fill="{MUTED}">{}</text>"#,
            n(BOTTOM + 16.0),
            escape(&label)
        );
    }
    let _ = write!(
        s,
        r#"<line x1="{l}" y1="{b}" x2="{r}" y2="{b}" stroke="{MUTED}" stroke-width="1"/><line x1="{l}" y1="{t}" x2="{l}" y2="{b}" stroke="{MUTED}" stroke-width="1"/>"#,
        l = n(LEFT),
        r = n(RIGHT),
        t = n(TOP),
        b = n(BOTTOM)
    );

    // Reference lines, labels pushed apart so they never overlap.
    let mut refs: Vec<(&Reference, f64)> =
        chart.references.iter().filter(|r| r.value >= lo && r.value <= hi).map(|r| (r, y(r.value))).collect();
    refs.sort_by(|a, b| b.1.total_cmp(&a.1));
    let mut last_label_y = f64::INFINITY;
    for (reference, yy) in refs {
        let _ = write!(
            s,
            r#"<line x1="{}" y1="{}" x2="{}" y2="{}" stroke="{}" stroke-width="1.4" stroke-dasharray="6 3"/>"#,
            n(LEFT),
            n(yy),
            n(RIGHT),
            n(yy),
            reference.colour
        );
        let label_y = (yy + 3.5).min(last_label_y - 11.0);
        last_label_y = label_y;
        let _ = write!(
            s,
            r#"<text x="{}" y="{}" fill="{}" font-size="10" font-weight="600">{}</text>"#,
            n(RIGHT + 4.0),
            n(label_y),
            reference.colour,
            escape(&reference.label)
        );
    }

    // Event markers: a dashed line across the plot and a numbered flag on top, staggered when close.
    let mut rows: [f64; 2] = [f64::NEG_INFINITY; 2];
    for marker in chart.markers.iter().filter(|m| m.t >= from && m.t <= until) {
        let xx = x(marker.t);
        let row = if xx - rows[0] >= 16.0 {
            0
        } else if xx - rows[1] >= 16.0 {
            1
        } else {
            0
        };
        rows[row] = xx;
        let flag_y = TOP - 10.0 + 12.0 * row as f64;
        let _ = write!(
            s,
            r#"<g><title>{}</title><line x1="{x}" y1="{}" x2="{x}" y2="{}" stroke="{EVENT}" stroke-width="1" stroke-dasharray="2 3"/><circle cx="{x}" cy="{}" r="6" fill="white" stroke="{EVENT}" stroke-width="1.2"/><text x="{x}" y="{}" text-anchor="middle" font-size="8.5" font-weight="700" fill="{EVENT}">{}</text></g>"#,
            escape(&marker.title),
            n(flag_y + 6.0),
            n(BOTTOM),
            n(flag_y),
            n(flag_y + 3.0),
            escape(&marker.label),
            x = n(xx),
        );
    }

    // The series.
    if points.is_empty() {
        let _ = write!(
            s,
            r#"<text x="{}" y="{}" text-anchor="middle" fill="{MUTED}" font-style="italic">{}</text>"#,
            n((LEFT + RIGHT) / 2.0),
            n((TOP + BOTTOM) / 2.0),
            escape(&chart.empty_text)
        );
    } else {
        let mut sorted = points.clone();
        sorted.sort_by_key(|p| p.t);
        let mut runs: Vec<Vec<Point>> = Vec::new();
        for p in sorted {
            match runs.last_mut() {
                Some(run) if run.last().is_some_and(|q| p.t - q.t <= chart.gap) => run.push(p),
                _ => runs.push(vec![p]),
            }
        }
        for run in runs.iter().filter(|r| r.len() > 1) {
            let path: Vec<String> = run.iter().map(|p| format!("{},{}", n(x(p.t)), n(y(p.value)))).collect();
            let _ = write!(
                s,
                r#"<polyline points="{}" fill="none" stroke="{LINE}" stroke-width="1.8" stroke-linejoin="round"/>"#,
                path.join(" ")
            );
        }
        let radius = if points.len() > 90 { 1.6 } else { 2.6 };
        for p in runs.iter().flatten() {
            let _ = write!(
                s,
                r#"<circle cx="{}" cy="{}" r="{radius}" fill="{}" stroke="white" stroke-width="0.6"/>"#,
                n(x(p.t)),
                n(y(p.value)),
                p.colour.unwrap_or(LINE)
            );
        }
    }
    s.push_str("</svg>");
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    fn offset() -> FixedOffset {
        FixedOffset::east_opt(3600).unwrap()
    }

    fn at(day: u32, hour: u32) -> i64 {
        offset().with_ymd_and_hms(2026, 11, day, hour, 0, 0).unwrap().timestamp()
    }

    fn chart(points: Vec<Point>) -> LineChart {
        LineChart {
            id: "c1".into(),
            title: "NH3-N, mg/L".into(),
            description: "five readings & <one> event".into(),
            from: at(1, 0),
            until: at(15, 0),
            offset: offset(),
            points,
            from_zero: true,
            min_span: 0.01,
            include: vec![0.05],
            references: vec![
                Reference { value: 0.02, label: "watch 0.02".into(), colour: "#b7791f" },
                Reference { value: 0.05, label: "act 0.05".into(), colour: "#c05621" },
                Reference { value: 0.2, label: "critical 0.2".into(), colour: "#c53030" },
            ],
            shades: vec![Shade {
                from: 0.05,
                to: f64::INFINITY,
                colour: "#c05621",
                opacity: 0.08,
                title: "act".into(),
            }],
            markers: vec![
                Marker { t: at(5, 9), label: "1".into(), title: "water change 30 %".into() },
                Marker { t: at(5, 10), label: "2".into(), title: "feeding held".into() },
                Marker { t: at(30, 10), label: "3".into(), title: "outside".into() },
            ],
            gap: 3 * 86_400,
            empty_text: "no readings".into(),
            standalone: true,
        }
    }

    fn points() -> Vec<Point> {
        vec![
            Point { t: at(2, 7), value: 0.010, colour: None },
            Point { t: at(3, 7), value: 0.018, colour: None },
            Point { t: at(4, 7), value: 0.031, colour: Some("#b7791f") },
            // A gap of six days: the line is broken here.
            Point { t: at(10, 7), value: 0.044, colour: None },
            Point { t: at(11, 7), value: 0.061, colour: Some("#c05621") },
            Point { t: at(20, 7), value: 9.0, colour: None }, // outside the span: not drawn
        ]
    }

    #[test]
    fn ticks_are_round_numbers_covering_the_range() {
        assert_eq!(nice_ticks(0.0, 0.061, 4), (0.02, 0.0, 0.08));
        assert_eq!(nice_ticks(6.9, 7.6, 4), (0.2, 6.800000000000001, 7.6000000000000005));
        let (step, first, last) = nice_ticks(24.1, 26.3, 4);
        assert_eq!(step, 1.0);
        assert!((first - 24.0).abs() < 1e-9 && (last - 27.0).abs() < 1e-9);
        let (step, first, last) = nice_ticks(24.1, 25.9, 4);
        assert_eq!(step, 0.5);
        assert!((first - 24.0).abs() < 1e-9 && (last - 26.0).abs() < 1e-9);
        assert_eq!(decimals_for(0.02), 2);
        assert_eq!(decimals_for(0.5), 1);
        assert_eq!(decimals_for(5.0), 0);
    }

    #[test]
    fn time_ticks_fall_on_local_midnights_or_hours() {
        let days = time_ticks(at(1, 7), at(15, 7), offset(), 8);
        assert_eq!(days.first().map(|t| t.1.as_str()), Some("2 Nov"), "{days:?}");
        assert!(days.len() <= 8 && days.len() >= 4, "{days:?}");
        for (t, _) in &days {
            let local = DateTime::from_timestamp(*t, 0).unwrap().with_timezone(&offset());
            assert_eq!((local.hour(), local.minute()), (0, 0));
        }
        let hours = time_ticks(at(1, 6), at(1, 18), offset(), 8);
        assert_eq!(
            hours.iter().map(|t| t.1.as_str()).collect::<Vec<_>>(),
            ["06:00", "08:00", "10:00", "12:00", "14:00", "16:00", "18:00"]
        );
        let month = time_ticks(at(1, 0), at(30, 0), offset(), 8);
        assert!(month.len() >= 4 && month.len() <= 8, "{month:?}");
        assert!(time_ticks(at(2, 0), at(1, 0), offset(), 8).is_empty());
    }

    #[test]
    fn the_chart_is_well_formed_and_draws_what_it_is_given() {
        let svg = line_chart(&chart(points()));
        let doc = roxmltree::Document::parse(&svg).expect("well-formed XML");
        let root = doc.root_element();
        assert_eq!(root.tag_name().name(), "svg");
        assert_eq!(root.attribute("role"), Some("img"));
        let title = root.children().find(|n| n.has_tag_name("title")).unwrap();
        assert_eq!(title.text(), Some("NH3-N, mg/L"));
        let desc = root.children().find(|n| n.has_tag_name("desc")).unwrap();
        assert_eq!(desc.text(), Some("five readings & <one> event"));
        // Two runs (the gap breaks the line), each a polyline; five dots in the span.
        let lines: Vec<_> = doc.descendants().filter(|n| n.has_tag_name("polyline")).collect();
        assert_eq!(lines.len(), 2);
        let dots = doc.descendants().filter(|n| n.has_tag_name("circle") && n.attribute("r") == Some("2.6")).count();
        assert_eq!(dots, 5);
        // The watch and act edges are in range and labelled; critical (0.2) is above the axis.
        let texts: Vec<&str> = doc.descendants().filter_map(|n| n.text()).collect();
        assert!(texts.contains(&"watch 0.02") && texts.contains(&"act 0.05"), "{texts:?}");
        assert!(!texts.contains(&"critical 0.2"));
        // Two markers in the span, the third outside; both flags labelled.
        let flags = doc.descendants().filter(|n| n.has_tag_name("g")).count();
        assert_eq!(flags, 2);
        assert!(texts.contains(&"1") && texts.contains(&"2") && !texts.contains(&"3"));
        for node in doc.descendants() {
            for attr in node.attributes() {
                assert!(
                    !attr.value().contains("NaN") && !attr.value().contains("inf"),
                    "{}={}",
                    attr.name(),
                    attr.value()
                );
            }
        }
    }

    #[test]
    fn an_empty_chart_says_so_and_inline_charts_carry_no_namespace() {
        let mut c = chart(Vec::new());
        c.standalone = false;
        let svg = line_chart(&c);
        assert!(!svg.contains("xmlns"));
        let doc = roxmltree::Document::parse(&svg).unwrap();
        assert!(doc.descendants().any(|n| n.text() == Some("no readings")));
        assert_eq!(doc.descendants().filter(|n| n.has_tag_name("polyline")).count(), 0);
    }

    #[test]
    fn a_flat_series_keeps_a_minimum_span_and_odd_text_is_escaped() {
        let mut c = chart(vec![
            Point { t: at(2, 7), value: 7.4, colour: None },
            Point { t: at(3, 7), value: 7.4, colour: None },
        ]);
        c.from_zero = false;
        c.min_span = 0.6;
        c.include.clear();
        c.references.clear();
        c.title = "pH \"NBS\" <kit> & co".into();
        let svg = line_chart(&c);
        let doc = roxmltree::Document::parse(&svg).unwrap();
        let ticks: Vec<f64> = doc
            .descendants()
            .filter(|n| n.attribute("text-anchor") == Some("end"))
            .filter_map(|n| n.text()?.parse().ok())
            .collect();
        let span = ticks.iter().copied().fold(f64::NEG_INFINITY, f64::max)
            - ticks.iter().copied().fold(f64::INFINITY, f64::min);
        assert!(span >= 0.6 - 1e-9, "{ticks:?}");
        assert!(ticks.iter().all(|t| (6.5..=8.3).contains(t)), "{ticks:?}");
        assert_eq!(
            doc.root_element().children().find(|n| n.has_tag_name("title")).unwrap().text(),
            Some("pH \"NBS\" <kit> & co")
        );
    }
}
