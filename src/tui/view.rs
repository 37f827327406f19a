//! Drawing: reads the state and the keymap, never changes them.
//!
//! Every frame is laid out from the frame's area, so a resize is a redraw.
//! Below [`MIN_WIDTH`]×[`MIN_HEIGHT`] one line says the size needed. Colour
//! is optional: bands carry a glyph, the selection a `▶` marker, so nothing
//! depends on colour alone (NO_COLOR turns colour off).

mod board;
mod modal;
mod summary;
mod tank_page;
mod walk;
mod whatif;

use ratatui::Frame;
use ratatui::layout::{Constraint, Layout, Rect};
use ratatui::style::{Color, Modifier, Style};
use ratatui::text::{Line, Span};
use ratatui::widgets::Paragraph;

use super::action::Action;
use super::help::{self, HelpOverlay};
use super::keymap::{Context, Keymap};
use super::state::{App, Screen, StatusKind};
use crate::core::band::Band;

/// The smallest terminal the screen draws in.
pub const MIN_WIDTH: u16 = 80;
/// The smallest terminal the screen draws in.
pub const MIN_HEIGHT: u16 = 24;

/// The marker of the selected line (the selection never relies on colour).
pub const SELECTED: &str = "▶ ";
/// The marker of other lines.
pub const UNSELECTED: &str = "  ";

/// The short caution shown wherever advice is given.
pub const SHORT_CAUTION: &str = "Guidance only, not veterinary advice; local rules govern disposal and medication.";

/// Styles, with or without colour.
#[derive(Debug, Clone, Copy)]
pub struct Theme {
    colour: bool,
}

impl Theme {
    /// The theme for `app` (colour unless NO_COLOR).
    pub fn of(app: &App) -> Theme {
        Theme { colour: app.colour }
    }

    fn fg(self, colour: Color) -> Style {
        if self.colour { Style::new().fg(colour) } else { Style::new() }
    }

    /// A band's style: colour when allowed, bold for the two worst.
    pub fn band(self, band: Band) -> Style {
        let style = match band {
            Band::Clear => self.fg(Color::Green),
            Band::Watch => self.fg(Color::Yellow),
            Band::Act => self.fg(Color::LightRed),
            Band::Critical => self.fg(Color::Red),
        };
        if band >= Band::Act { style.add_modifier(Modifier::BOLD) } else { style }
    }

    /// The selected line.
    pub fn selected(self) -> Style {
        Style::new().add_modifier(Modifier::REVERSED)
    }

    /// Headings.
    pub fn heading(self) -> Style {
        Style::new().add_modifier(Modifier::BOLD)
    }

    /// Secondary text.
    pub fn dim(self) -> Style {
        if self.colour { Style::new().fg(Color::DarkGray) } else { Style::new() }
    }

    /// Refusals and failures.
    pub fn error(self) -> Style {
        self.fg(Color::Red).add_modifier(Modifier::BOLD)
    }

    /// Saved and done.
    pub fn success(self) -> Style {
        self.fg(Color::Green)
    }

    /// Key names in hints.
    pub fn key(self) -> Style {
        if self.colour { Style::new().fg(Color::Cyan).add_modifier(Modifier::BOLD) } else { Style::new() }
    }
}

/// A band as glyph and name, styled.
pub fn band_span(theme: Theme, band: Option<Band>) -> Span<'static> {
    match band {
        Some(b) => Span::styled(format!("{} {}", b.glyph(), b.name()), theme.band(b)),
        None => Span::styled("– no reading", theme.dim()),
    }
}

/// Draws the whole screen.
pub fn render(app: &App, keymap: &Keymap, frame: &mut Frame) {
    let area = frame.area();
    if area.width < MIN_WIDTH || area.height < MIN_HEIGHT {
        let text = format!(
            "tankwalk needs a terminal of at least {MIN_WIDTH}×{MIN_HEIGHT}; this one is {}×{}",
            area.width, area.height
        );
        frame.render_widget(Paragraph::new(text), area);
        return;
    }
    let theme = Theme::of(app);
    let [header, body, status, footer] =
        Layout::vertical([Constraint::Length(1), Constraint::Fill(1), Constraint::Length(1), Constraint::Length(1)])
            .areas(area);
    render_header(app, theme, frame, header);
    match app.screen() {
        Screen::Board => board::render(app, theme, keymap, frame, body),
        Screen::Walk => walk::render(app, theme, keymap, frame, body),
        Screen::Tank(page) => tank_page::render(app, page, theme, frame, body),
        Screen::Summary(state) => summary::render(app, state, theme, frame, body),
    }
    if let Some(panel) = &app.whatif {
        whatif::render(panel, theme, frame, body);
    }
    if let Some(m) = &app.modal {
        modal::render(m, theme, keymap, frame, body);
    }
    render_status(app, theme, frame, status);
    render_footer(app, theme, keymap, frame, footer);
    if let Some(scroll) = app.help {
        let overlay = HelpOverlay { keymap, context: app.context(), scroll };
        frame.render_widget(&overlay, area);
    }
}

fn screen_title(app: &App) -> String {
    match app.screen() {
        Screen::Board => "Room board".to_string(),
        Screen::Walk => "Walk".to_string(),
        Screen::Tank(page) => format!("Tank {}", app.tank(page.tank).id.as_str()),
        Screen::Summary(_) => "Round summary".to_string(),
    }
}

fn render_header(app: &App, theme: Theme, frame: &mut Frame, area: Rect) {
    let counts = app.round_counts();
    let wanted = counts.done + counts.skipped + counts.to_do;
    let right = format!("{}/{wanted} done · {} · {} ", counts.done, app.now.format("%H:%M"), app.session.operator);
    let title = screen_title(app);
    let width = usize::from(area.width);
    // The room's name gives way first; the screen's title stays.
    let room_width = width.saturating_sub(right.chars().count() + title.chars().count() + 5);
    let room: String = app.facility.room.name.chars().take(room_width).collect();
    let left = format!(" {room} · {title}");
    let gap = width.saturating_sub(left.chars().count() + right.chars().count());
    let line = Line::from(vec![
        Span::styled(left, theme.heading()),
        Span::raw(" ".repeat(gap)),
        Span::styled(right, theme.dim()),
    ]);
    frame.render_widget(Paragraph::new(line).style(Style::new().add_modifier(Modifier::UNDERLINED)), area);
}

fn render_status(app: &App, theme: Theme, frame: &mut Frame, area: Rect) {
    let Some(status) = &app.status else { return };
    let (mark, style) = match status.kind {
        StatusKind::Info => ("", Style::new()),
        StatusKind::Success => ("✓ ", theme.success()),
        StatusKind::Error => ("✗ ", theme.error()),
    };
    frame.render_widget(Paragraph::new(Line::styled(format!(" {mark}{}", status.text), style)), area);
}

/// The actions the footer offers on each screen, most used first.
fn footer_actions(context: Context) -> &'static [Action] {
    match context {
        Context::Board => &[
            Action::StartWalk,
            Action::OpenTank,
            Action::FilterText,
            Action::FilterBand,
            Action::ShowSummary,
            Action::ToggleHelp,
            Action::Quit,
        ],
        Context::Walk => &[
            Action::NextField,
            Action::KeepPrevious,
            Action::SaveAndNext,
            Action::SkipTank,
            Action::EditNote,
            Action::ToggleHelp,
            Action::Back,
        ],
        Context::Tank => &[
            Action::NextRange,
            Action::NextChart,
            Action::AddEvent,
            Action::OpenWhatIf,
            Action::StartWalk,
            Action::ToggleHelp,
            Action::Back,
        ],
        Context::WhatIf => &[Action::NextField, Action::Increase, Action::Decrease, Action::ResetWhatIf, Action::Back],
        Context::Summary => &[
            Action::OpenTank,
            Action::WriteReport,
            Action::Export,
            Action::StartWalk,
            Action::ToggleHelp,
            Action::Back,
        ],
        Context::Prompt => &[Action::Confirm, Action::Cancel, Action::Erase],
        Context::Confirm | Context::Pick => &[Action::Confirm, Action::Cancel],
        Context::Global => &[Action::ToggleHelp, Action::Quit],
    }
}

fn render_footer(app: &App, theme: Theme, keymap: &Keymap, frame: &mut Frame, area: Rect) {
    let context = app.context();
    let mut spans = vec![Span::raw(" ")];
    if !app.pending_keys.is_empty() {
        // A sequence in progress: what can follow.
        let typed: Vec<String> = app.pending_keys.iter().map(ToString::to_string).collect();
        spans.push(Span::styled(format!("{} …", typed.join(" ")), theme.key()));
        for binding in keymap.effective(context).filter(|b| b.chord.keys().starts_with(&app.pending_keys)) {
            spans.push(Span::raw(format!("  {} {}", binding.chord, binding.action.short())));
        }
    } else if app.help.is_some() {
        spans.push(Span::styled("help is open", theme.dim()));
    } else {
        for (i, hint) in help::footer_hints(keymap, context, footer_actions(context)).into_iter().enumerate() {
            if i > 0 {
                spans.push(Span::styled(" · ", theme.dim()));
            }
            spans.push(Span::styled(hint.keys, theme.key()));
            spans.push(Span::raw(format!(" {}", hint.label)));
        }
    }
    frame.render_widget(Paragraph::new(Line::from(spans)), area);
}

/// The first line to draw so that `selected` stays in view in `height` lines.
pub fn scroll_offset(selected: usize, height: usize, len: usize) -> usize {
    if height == 0 || len <= height {
        return 0;
    }
    let half = height / 2;
    selected.saturating_sub(half).min(len - height)
}

/// A rectangle of at most `width`×`height` in the middle of `area`.
pub fn centered(area: Rect, width: u16, height: u16) -> Rect {
    let width = width.min(area.width);
    let height = height.min(area.height);
    Rect { x: area.x + (area.width - width) / 2, y: area.y + (area.height - height) / 2, width, height }
}

/// An amount as a person reads it: three significant figures, no trailing zeros.
pub fn amount(value: f64) -> String {
    let text = crate::numfmt::sig(value, 3);
    if text.contains('.') { text.trim_end_matches('0').trim_end_matches('.').to_string() } else { text }
}

/// An action as one line: title, quantity, second quantity, repeats
/// ("Water change 45 % (801 L) ×4").
pub fn action_text(action: &crate::rules::action::Action) -> String {
    let mut text = action.kind.title().to_string();
    if let (Some(q), Some(unit)) = (action.quantity, action.unit) {
        text.push_str(&format!(" {} {unit}", amount(q)));
    }
    if let Some(also) = action.also {
        text.push_str(&format!(" ({} {})", amount(also.quantity), also.unit));
    }
    if let Some(times) = action.repeat {
        text.push_str(&format!(" ×{times}"));
    }
    text
}

/// The first key bound to `action` in `context`, for text such as "press s to save".
pub fn key_of(keymap: &Keymap, context: Context, action: Action) -> String {
    keymap.chords_for(context, action).first().map_or_else(|| action.name().to_string(), ToString::to_string)
}
