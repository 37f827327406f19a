//! The round summary: what is done, skipped (and why), not reached, and the
//! tanks in `act` or `critical` with their open actions.

use crate::core::band::Band;

use super::super::action::Action;
use super::round::{self, Due};
use super::verdict;
use super::{App, Effect, Screen, walk};
use crate::rules::action::{Action as Suggestion, Warning};

/// The summary screen's state.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct SummaryState {
    /// The selected line (over [`Summary::lines`]).
    pub selected: usize,
}

/// A tank that needs action now.
#[derive(Debug, Clone, PartialEq)]
pub struct Attention {
    /// Index into `facility.tanks`.
    pub tank: usize,
    /// Its band.
    pub band: Band,
    /// NH3-N, mg/L.
    pub nh3_n_mg_l: f64,
    /// What to do.
    pub actions: Vec<Suggestion>,
    /// What not to do.
    pub warnings: Vec<Warning>,
    /// For a shared water: the system and how many of its tanks share this verdict.
    pub shared: Option<(String, usize)>,
}

/// The round in figures.
#[derive(Debug, Clone, PartialEq)]
pub struct Summary {
    /// Tanks read this round, in round order.
    pub done: Vec<usize>,
    /// Tanks skipped, with the reason.
    pub skipped: Vec<(usize, String)>,
    /// Tanks the round wanted and did not reach.
    pub not_reached: Vec<usize>,
    /// Tanks not due this round.
    pub not_due: Vec<usize>,
    /// Tanks in `act` or `critical`, worst first.
    pub attention: Vec<Attention>,
}

impl Summary {
    /// The tanks in the order the screen lists them (attention, skipped, not reached, done).
    pub fn lines(&self) -> Vec<usize> {
        let mut lines: Vec<usize> = self.attention.iter().map(|a| a.tank).collect();
        lines.extend(self.skipped.iter().map(|(t, _)| *t));
        lines.extend(&self.not_reached);
        lines.extend(&self.done);
        lines
    }
}

/// Summarises the round.
pub fn summarize(app: &App) -> Summary {
    let mut summary = Summary {
        done: Vec::new(),
        skipped: Vec::new(),
        not_reached: Vec::new(),
        not_due: Vec::new(),
        attention: Vec::new(),
    };
    for &t in &app.round_order {
        match app.statuses[t].due {
            Due::Done => summary.done.push(t),
            Due::Skipped => summary.skipped.push((
                t,
                round::skip_this_round(&app.history, app.tank(t), app.round_start).unwrap_or_default().to_string(),
            )),
            Due::NotDue => summary.not_due.push(t),
            Due::Due | Due::Overdue | Due::Never => summary.not_reached.push(t),
        }
        let status = &app.statuses[t];
        if status.band.is_some_and(|b| b >= Band::Act) {
            let tank = app.tank(t);
            if let Some((entry, _)) = round::latest_water(&app.facility, &app.history, tank) {
                // The water's reading with what was seen of this tank's fish this round.
                let mut reading = entry
                    .reading()
                    .cloned()
                    .unwrap_or_else(|| crate::model::record::Reading::new(round::tank_target(tank)));
                reading.observations = round::observations_this_round(&app.history, tank, app.round_start);
                let a = verdict::assess_reading(app, t, &reading, entry.taken_at, entry.taken_at);
                if let (Some(band), Some(figures)) = (a.band, a.figures) {
                    let system = tank.system.as_ref().map(|s| s.as_str().to_string());
                    // Tanks of one system with the same verdict are one line: the water is shared.
                    let same = summary.attention.iter_mut().find(|x| {
                        x.shared.as_ref().map(|(s, _)| Some(s)) == Some(system.as_ref())
                            && x.band == band
                            && x.nh3_n_mg_l == figures.nh3_n_mg_l
                    });
                    match same {
                        Some(existing) => {
                            if let Some((_, n)) = &mut existing.shared {
                                *n += 1;
                            }
                        }
                        None => summary.attention.push(Attention {
                            tank: t,
                            band,
                            nh3_n_mg_l: figures.nh3_n_mg_l,
                            actions: a.actions,
                            warnings: a.warnings,
                            shared: system.map(|s| (s, 1)),
                        }),
                    }
                }
            }
        }
    }
    summary.attention.sort_by(|a, b| b.band.cmp(&a.band).then(b.nh3_n_mg_l.total_cmp(&a.nh3_n_mg_l)));
    summary
}

/// Opens the summary (or brings it to the top).
pub fn open(app: &mut App) {
    if let Some(Screen::Summary(_)) = app.screens.last() {
        return;
    }
    app.screens.push(Screen::Summary(SummaryState::default()));
}

/// Keys of the summary.
pub fn act(app: &mut App, action: Action) -> Vec<Effect> {
    let lines = summarize(app).lines();
    let last = lines.len().saturating_sub(1);
    let Some(Screen::Summary(state)) = app.screens.last_mut() else { return Vec::new() };
    match action {
        Action::SelectNext => state.selected = (state.selected + 1).min(last),
        Action::SelectPrevious => state.selected = state.selected.saturating_sub(1),
        Action::SelectFirst => state.selected = 0,
        Action::SelectLast => state.selected = last,
        Action::PageDown => state.selected = (state.selected + 10).min(last),
        Action::PageUp => state.selected = state.selected.saturating_sub(10),
        Action::OpenTank => {
            if let Some(&tank) = lines.get(state.selected) {
                super::tank_page::open(app, tank);
            }
        }
        Action::StartWalk => walk::start(app, None),
        Action::Export => {
            app.say(super::StatusKind::Info, "Exporting…");
            return vec![Effect::Export];
        }
        Action::WriteReport => {
            app.say(super::StatusKind::Info, "Writing the round report…");
            return vec![Effect::Report];
        }
        Action::Back => app.pop_screen(),
        _ => {}
    }
    Vec::new()
}
