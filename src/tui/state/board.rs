//! The room board: every tank grouped by system, filtered by band or text.

use crate::core::band::Band;
use crate::model::facility::Tank;

use super::super::action::Action;
use super::super::keymap::Keymap;
use super::modal::{Modal, PromptFor};
use super::{App, Effect, StatusKind, summary, tank_page, walk};

/// The board's selection and filters.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct BoardState {
    /// The selected tank (index into `facility.tanks`); kept across filters.
    pub selected: Option<usize>,
    /// Show only tanks whose label, species or system contains this (any case).
    pub text: String,
    /// Show only tanks at this band or worse.
    pub band: Option<Band>,
}

impl BoardState {
    /// True when a filter hides tanks.
    pub fn filtered(&self) -> bool {
        !self.text.is_empty() || self.band.is_some()
    }
}

/// A line of the board.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BoardRow {
    /// A system's heading (`None`: the standalone tanks), with how many of
    /// its tanks the filter shows.
    Group(Option<usize>, usize),
    /// A tank (index into `facility.tanks`).
    Tank(usize),
}

fn matches_text(app: &App, tank: &Tank, text: &str) -> bool {
    if text.is_empty() {
        return true;
    }
    let wanted = text.to_lowercase();
    let has = |s: &str| s.to_lowercase().contains(&wanted);
    has(tank.id.as_str())
        || tank
            .species
            .iter()
            .any(|k| has(k.as_str()) || app.facility.species_profile(k.as_str()).is_some_and(|p| has(&p.name)))
        || app.facility.system_of(tank).is_some_and(|s| has(s.id.as_str()) || has(&s.name))
}

/// The tanks the filters let through, in board order (by system, in round order).
pub fn visible_tanks(app: &App) -> Vec<usize> {
    rows(app)
        .into_iter()
        .filter_map(|r| match r {
            BoardRow::Tank(t) => Some(t),
            BoardRow::Group(..) => None,
        })
        .collect()
}

/// The board's lines: a heading per system (in the order the round reaches
/// them, standalone tanks as one group), then its tanks in round order.
pub fn rows(app: &App) -> Vec<BoardRow> {
    let mut groups: Vec<(Option<usize>, Vec<usize>)> = Vec::new();
    for &t in &app.round_order {
        let tank = app.tank(t);
        let visible = matches_text(app, tank, &app.board.text)
            && app.board.band.is_none_or(|b| app.statuses[t].band.is_some_and(|tb| tb >= b));
        if !visible {
            continue;
        }
        let system = tank.system.as_ref().and_then(|s| app.facility.systems.iter().position(|x| x.id == *s));
        match groups.iter_mut().find(|(g, _)| *g == system) {
            Some((_, tanks)) => tanks.push(t),
            None => groups.push((system, vec![t])),
        }
    }
    let mut rows = Vec::with_capacity(app.round_order.len() + groups.len());
    for (system, tanks) in groups {
        rows.push(BoardRow::Group(system, tanks.len()));
        rows.extend(tanks.into_iter().map(BoardRow::Tank));
    }
    rows
}

/// The selected tank, kept on a visible one.
pub fn selected(app: &App) -> Option<usize> {
    let visible = visible_tanks(app);
    match app.board.selected {
        Some(t) if visible.contains(&t) => Some(t),
        _ => visible.first().copied(),
    }
}

/// How many tanks a page-down moves.
pub const PAGE: usize = 10;

fn move_selection(app: &mut App, to: impl Fn(usize, usize) -> usize) {
    let visible = visible_tanks(app);
    if visible.is_empty() {
        return;
    }
    let at = selected(app).and_then(|t| visible.iter().position(|v| *v == t)).unwrap_or(0);
    let last = visible.len() - 1;
    app.board.selected = Some(visible[to(at, last).min(last)]);
}

/// Keys of the board.
pub fn act(app: &mut App, _keymap: &Keymap, action: Action) -> Vec<Effect> {
    match action {
        Action::SelectNext => move_selection(app, |at, last| (at + 1).min(last)),
        Action::SelectPrevious => move_selection(app, |at, _| at.saturating_sub(1)),
        Action::SelectFirst => move_selection(app, |_, _| 0),
        Action::SelectLast => move_selection(app, |_, last| last),
        Action::PageDown => move_selection(app, |at, last| (at + PAGE).min(last)),
        Action::PageUp => move_selection(app, |at, _| at.saturating_sub(PAGE)),
        Action::StartWalk => walk::start(app, None),
        Action::OpenTank => match selected(app) {
            Some(t) => tank_page::open(app, t),
            None => app.say(StatusKind::Info, "No tank is shown: clear the filter first"),
        },
        Action::FilterText => {
            let text = app.board.text.clone();
            app.modal =
                Some(Modal::text("Show tanks containing (label, species, system)", text, PromptFor::FilterText, true));
        }
        Action::FilterBand => {
            app.board.band = match app.board.band {
                None => Some(Band::Watch),
                Some(Band::Clear | Band::Watch) => Some(Band::Act),
                Some(Band::Act) => Some(Band::Critical),
                Some(Band::Critical) => None,
            };
            let shown = visible_tanks(app).len();
            let what = app.board.band.map_or("all bands".to_string(), |b| format!("{} or worse", b.name()));
            app.say(StatusKind::Info, format!("Showing {what}: {shown} tanks"));
        }
        Action::ShowSummary => summary::open(app),
        Action::Sync => {
            app.say(StatusKind::Info, "Syncing with the shared folder…");
            return vec![Effect::Sync];
        }
        Action::OpenWhatIf => {
            if let Some(t) = selected(app) {
                tank_page::open_whatif_for(app, t);
            }
        }
        Action::Back if app.board.filtered() => {
            app.board.text.clear();
            app.board.band = None;
            app.say(StatusKind::Info, "Filter cleared: every tank is shown");
        }
        _ => {}
    }
    Vec::new()
}

/// Applies the filter prompt's text as it is typed.
pub fn after_prompt_edit(app: &mut App) {
    if let Some(Modal::Prompt(prompt)) = &app.modal
        && prompt.purpose == PromptFor::FilterText
        && let super::modal::PromptInput::Text(text) = &prompt.input
    {
        app.board.text = text.trim().to_string();
    }
}

/// The filter prompt was cancelled: the text filter goes.
pub fn filter_text_cancelled(app: &mut App) {
    app.board.text.clear();
}
