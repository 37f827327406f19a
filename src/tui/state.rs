//! The screen's state and its pure update: no terminal, no store, no clock.
//!
//! [`update`] takes the state, the keymap, one [`Input`] and the time, changes
//! the state and returns the [`Effect`]s for `run.rs` to carry out (save to
//! the store, export, quit). The outcome of a save comes back as another
//! input, so the screen says "saved" only once the store has flushed.
//!
//! - [`field`]: numbers typed into fields, checked on every key;
//! - [`history`]: records with corrections applied, by tank and system;
//! - [`round`]: the round, due and overdue tanks, each tank's band;
//! - [`verdict`]: the assessment seam (NH3, band, latent risk, trend, actions);
//! - [`board`], [`walk`], [`tank_page`], [`summary`]: the screens;
//! - [`whatif`]: the what-if panel;
//! - [`modal`]: prompts, questions and pick lists, and the event form.

pub mod board;
pub mod field;
pub mod history;
pub mod modal;
pub mod round;
pub mod summary;
pub mod tank_page;
pub mod verdict;
pub mod walk;
pub mod whatif;

use chrono::{DateTime, FixedOffset, Utc};
use ulid::Ulid;

use crate::model::facility::{Facility, Tank};
use crate::model::record::{DeviceId, Record, RecordBody};
use crate::rules::latent::LatentBasis;
use crate::rules::water_change::SourceWater;

use super::action::Action;
use super::help;
use super::keymap::{Context, Key, KeyResult, Keymap};
use board::BoardState;
use history::History;
use modal::{Confirm, ConfirmFor, Modal};
use round::{Due, TankStatus};
use summary::SummaryState;
use tank_page::TankPage;
use walk::WalkState;
use whatif::WhatIfState;

/// Who is walking and on which laptop: fixed for a run.
#[derive(Debug, Clone, PartialEq)]
pub struct SessionInfo {
    /// The person's name, written into every record.
    pub operator: String,
    /// The store's device id.
    pub device: DeviceId,
    /// Random bits for new record ids (the time part comes from the clock).
    pub id_seed: u128,
}

/// A screen on the stack.
#[derive(Debug, Clone, PartialEq)]
pub enum Screen {
    /// The room board.
    Board,
    /// The walk (its state lives in [`App::walk`], so it survives leaving it).
    Walk,
    /// One tank's page.
    Tank(TankPage),
    /// The round summary.
    Summary(SummaryState),
}

/// How the status line reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StatusKind {
    /// Neutral information.
    Info,
    /// Something worked (a save reached the disk).
    Success,
    /// Something did not work or was refused.
    Error,
}

/// The line at the bottom that says what just happened.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Status {
    /// What it says.
    pub text: String,
    /// How it reads.
    pub kind: StatusKind,
}

/// Something that happened, for [`update`].
#[derive(Debug, Clone, PartialEq)]
pub enum Input {
    /// A key press (releases are never inputs).
    Key(Key),
    /// The store's answer to [`Effect::Save`]: the records, now flushed, or why not.
    Saved(Result<Vec<Record>, String>),
    /// The answer to [`Effect::Export`]: where the files went, or why not.
    Exported(Result<String, String>),
    /// The answer to [`Effect::Report`]: where the report went, or why not.
    Reported(Result<String, String>),
    /// The answer to [`Effect::Sync`]: what was sent and received and the
    /// records now in the store (the screen's view is rebuilt from them), or why not.
    Synced(Result<(String, Vec<Record>), String>),
    /// The terminal changed size (the next frame lays out afresh).
    Resize,
    /// Time passed (ages and the round boundary move on).
    Tick,
}

/// Something for `run.rs` to do.
#[derive(Debug, Clone, PartialEq)]
pub enum Effect {
    /// Save these records in one batch, flush, then answer with [`Input::Saved`].
    Save(Vec<Record>),
    /// Export the records, then answer with [`Input::Exported`].
    Export,
    /// Write the round report, then answer with [`Input::Reported`].
    Report,
    /// Sync with the shared folder, then answer with [`Input::Synced`].
    Sync,
    /// Leave the program (every save has already been answered).
    Quit,
}

/// The whole state of the screen.
#[derive(Debug, Clone)]
pub struct App {
    /// The room.
    pub facility: Facility,
    /// Its records, corrections applied.
    pub history: History,
    /// Indices into `facility.tanks`, in the order of the round.
    pub round_order: Vec<usize>,
    /// Per tank (same index as `facility.tanks`).
    pub statuses: Vec<TankStatus>,
    /// When this round started.
    pub round_start: DateTime<FixedOffset>,
    /// The time of the last input.
    pub now: DateTime<FixedOffset>,
    /// Screens, the board at the bottom and the one shown on top.
    pub screens: Vec<Screen>,
    /// The board's selection and filters (kept while other screens are shown).
    pub board: BoardState,
    /// The walk, once started.
    pub walk: Option<WalkState>,
    /// The what-if panel, when open.
    pub whatif: Option<WhatIfState>,
    /// A prompt, question or pick list, when open.
    pub modal: Option<Modal>,
    /// The help overlay's scroll, when open.
    pub help: Option<usize>,
    /// Keys of a sequence in progress ("g" of "g g").
    pub pending_keys: Vec<Key>,
    /// What just happened.
    pub status: Option<Status>,
    /// What is being saved, from the request until the store answers.
    pub saving: Option<SaveFor>,
    /// The event being recorded, between its questions.
    pub event: Option<modal::EventDraft>,
    /// Who and where.
    pub session: SessionInfo,
    /// Whether colour is used (NO_COLOR turns it off).
    pub colour: bool,
    ids_made: u64,
}

impl App {
    /// The screen on the room `facility` with its `records`, at `now`.
    pub fn new(
        facility: Facility,
        records: impl IntoIterator<Item = Record>,
        session: SessionInfo,
        now: DateTime<FixedOffset>,
    ) -> App {
        let round_order =
            facility.round().iter().filter_map(|t| facility.tanks.iter().position(|u| u.id == t.id)).collect();
        let round_start = facility.room.round_start(now);
        let mut app = App {
            history: History::from_records(records),
            round_order,
            statuses: Vec::new(),
            round_start,
            now,
            screens: vec![Screen::Board],
            board: BoardState::default(),
            walk: None,
            whatif: None,
            modal: None,
            help: None,
            pending_keys: Vec::new(),
            status: None,
            saving: None,
            event: None,
            session,
            colour: true,
            ids_made: 0,
            facility,
        };
        app.refresh_statuses();
        app
    }

    /// Recomputes every tank's status (after a save, a skip, or time passing).
    pub fn refresh_statuses(&mut self) {
        self.statuses = self
            .facility
            .tanks
            .iter()
            .map(|tank| round::tank_status(&self.facility, &self.history, tank, self.round_start, self.now))
            .collect();
    }

    /// The screen on top.
    pub fn screen(&self) -> &Screen {
        self.screens.last().unwrap_or(&Screen::Board)
    }

    /// The keymap context of what has the keys now.
    pub fn context(&self) -> Context {
        if let Some(modal) = &self.modal {
            return modal.context();
        }
        if self.whatif.is_some() {
            return Context::WhatIf;
        }
        match self.screen() {
            Screen::Board => Context::Board,
            Screen::Walk => Context::Walk,
            Screen::Tank(_) => Context::Tank,
            Screen::Summary(_) => Context::Summary,
        }
    }

    /// The tank at `index` of `facility.tanks`.
    pub fn tank(&self, index: usize) -> &Tank {
        &self.facility.tanks[index]
    }

    /// The index of the tank with this id.
    pub fn tank_index(&self, id: &str) -> Option<usize> {
        self.facility.tanks.iter().position(|t| t.id.as_str() == id)
    }

    /// Says something on the status line.
    pub fn say(&mut self, kind: StatusKind, text: impl Into<String>) {
        self.status = Some(Status { text: text.into(), kind });
    }

    /// True when the walk holds typed values that are not saved.
    pub fn has_unsaved_entry(&self) -> bool {
        self.walk.as_ref().is_some_and(|w| w.entry.is_dirty())
    }

    /// A new record made now by this session.
    pub fn new_record(&mut self, body: RecordBody) -> Record {
        self.ids_made += 1;
        let millis = u64::try_from(self.now.timestamp_millis()).unwrap_or(0);
        let random = self.session.id_seed.wrapping_add(u128::from(self.ids_made)) & ((1u128 << 80) - 1);
        Record {
            id: Ulid::from_parts(millis, random),
            device: self.session.device,
            operator: self.session.operator.clone(),
            taken_at: self.now,
            body,
        }
    }

    /// The water used for changes, as the planner wants it (no ammonia when unknown).
    pub fn source_water(&self) -> SourceWater {
        match &self.facility.room.source_water {
            Some(s) => SourceWater { tan_n_mg_l: s.tan_n_mg_l.unwrap_or(0.0), ph: s.ph, temp_c: s.temp_c },
            None => SourceWater { tan_n_mg_l: 0.0, ph: None, temp_c: None },
        }
    }

    /// The pH a careless water change would bring: the room's source water,
    /// else the source pH of the tank's last water change.
    pub fn latent_ph(&self, tank: &Tank) -> Option<(f64, LatentBasis)> {
        if let Some(ph) = self.facility.room.source_water.as_ref().and_then(|s| s.ph) {
            return Some((ph, LatentBasis::SourceWater));
        }
        self.history.of_tank(tank).into_iter().rev().find_map(|e| match e.event().map(|ev| &ev.kind) {
            Some(crate::model::record::EventKind::WaterChange { source_ph: Some(ph), .. }) => {
                Some((*ph, LatentBasis::LastWaterChange))
            }
            _ => None,
        })
    }

    /// The volume a water change acts on, with what it is called.
    pub fn water_volume(&self, tank: &Tank) -> (f64, String) {
        match self.facility.system_of(tank) {
            Some(system) => (system.volume_l, format!("system {}", system.id.as_str())),
            None => (tank.volume_l, format!("tank {}", tank.id.as_str())),
        }
    }

    /// The tank's tanks-to-walk position in the round, when it is in it.
    pub fn round_position(&self, tank: usize) -> Option<usize> {
        self.round_order.iter().position(|t| *t == tank)
    }

    /// The first tank of the round (from position `from`, wrapping) that the round still wants.
    pub fn next_wanted(&self, from: usize) -> Option<usize> {
        let n = self.round_order.len();
        (0..n).map(|k| (from + k) % n).find(|&pos| self.statuses[self.round_order[pos]].due.wanted())
    }

    /// Counts of tanks per state of the round.
    pub fn round_counts(&self) -> RoundCounts {
        let mut counts = RoundCounts::default();
        for status in &self.statuses {
            match status.due {
                Due::Done => counts.done += 1,
                Due::Skipped => counts.skipped += 1,
                Due::NotDue => counts.not_due += 1,
                Due::Due | Due::Overdue | Due::Never => counts.to_do += 1,
            }
        }
        counts
    }

    fn pop_screen(&mut self) {
        if self.screens.len() > 1 {
            self.screens.pop();
        }
    }

    /// Goes back to the board, keeping the walk to resume.
    fn back_to_board(&mut self) {
        self.screens.truncate(1);
    }

    fn request_quit(&mut self) -> Vec<Effect> {
        if self.has_unsaved_entry() {
            let label = self.walk.as_ref().map(|w| self.tank(w.entry.tank).id.as_str().to_string()).unwrap_or_default();
            self.modal = Some(Modal::Confirm(Confirm {
                question: format!("Quit and lose what you typed for {label}? It is not saved."),
                then: ConfirmFor::Quit,
            }));
            Vec::new()
        } else {
            vec![Effect::Quit]
        }
    }
}

/// What a save request was for, so its answer goes back to the right place.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SaveFor {
    /// The walk's entry for this tank (index into `facility.tanks`).
    Entry {
        /// The tank.
        tank: usize,
    },
    /// The walk's skip of this tank.
    Skip {
        /// The tank.
        tank: usize,
    },
    /// An event recorded from this tank's page.
    Event {
        /// The tank.
        tank: usize,
    },
}

/// How many tanks are in each state of the round.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct RoundCounts {
    /// Read this round.
    pub done: usize,
    /// Skipped with a reason.
    pub skipped: usize,
    /// Still to read this round (due, overdue or never read).
    pub to_do: usize,
    /// Read recently enough that this round does not need them.
    pub not_due: usize,
}

/// Ctrl-C: always quits, asking first (a second Ctrl-C answers yes) when an
/// entry is unsaved. It is not in the keymap, so no file can take it away.
pub const INTERRUPT: Key = Key::ctrl('c');

/// Applies one input at time `now`; returns what `run.rs` must do.
pub fn update(app: &mut App, keymap: &Keymap, input: Input, now: DateTime<FixedOffset>) -> Vec<Effect> {
    app.now = now;
    let start = app.facility.room.round_start(now);
    if start != app.round_start {
        // A new round began while the screen was open.
        app.round_start = start;
        app.refresh_statuses();
    }
    match input {
        Input::Key(key) => on_key(app, keymap, key),
        Input::Saved(result) => {
            match app.saving.take() {
                Some(SaveFor::Entry { tank }) => walk::saved(app, tank, result),
                Some(SaveFor::Skip { tank }) => walk::skip_saved(app, tank, result),
                Some(SaveFor::Event { tank }) => tank_page::event_saved(app, tank, result),
                None => {}
            }
            Vec::new()
        }
        Input::Exported(Ok(place)) => {
            app.say(StatusKind::Success, format!("Exported to {place}"));
            Vec::new()
        }
        Input::Exported(Err(why)) => {
            app.say(StatusKind::Error, format!("Export failed: {why}"));
            Vec::new()
        }
        Input::Reported(Ok(place)) => {
            app.say(StatusKind::Success, format!("Report written to {place}"));
            Vec::new()
        }
        Input::Reported(Err(why)) => {
            app.say(StatusKind::Error, format!("Report failed: {why}"));
            Vec::new()
        }
        Input::Synced(Ok((said, records))) => {
            app.history = History::from_records(records);
            app.refresh_statuses();
            app.say(StatusKind::Success, format!("Synced: {said}"));
            Vec::new()
        }
        Input::Synced(Err(why)) => {
            app.say(StatusKind::Error, format!("Sync failed: {why}"));
            Vec::new()
        }
        Input::Resize => Vec::new(),
        Input::Tick => {
            app.refresh_statuses();
            Vec::new()
        }
    }
}

fn on_key(app: &mut App, keymap: &Keymap, key: Key) -> Vec<Effect> {
    if key == INTERRUPT {
        if matches!(&app.modal, Some(Modal::Confirm(Confirm { then: ConfirmFor::Quit, .. }))) {
            return vec![Effect::Quit];
        }
        app.help = None;
        app.modal = None;
        return app.request_quit();
    }
    if app.saving.is_some() {
        // The store has not answered yet; keys wait for it.
        return Vec::new();
    }
    let context = app.context();
    if let Some(scroll) = app.help {
        match keymap.feed(&mut app.pending_keys, context, key) {
            KeyResult::Matched(Action::ToggleHelp | Action::Back | Action::Cancel) => app.help = None,
            KeyResult::Matched(action) => match help::scroll_action(action) {
                Some(1) => app.help = Some(scroll + 1),
                Some(_) => app.help = Some(scroll.saturating_sub(1)),
                None => {}
            },
            _ => {}
        }
        return Vec::new();
    }
    if app.pending_keys.is_empty()
        && context.text_input().takes(&key)
        && let Some(c) = key.typed_char()
    {
        type_char(app, c);
        return Vec::new();
    }
    match keymap.feed(&mut app.pending_keys, context, key) {
        KeyResult::Matched(action) => act(app, keymap, context, action),
        KeyResult::Pending(_) | KeyResult::Cancelled => Vec::new(),
        KeyResult::NotFound => {
            let help_key = keymap.chords_for(context, Action::ToggleHelp).first().map(ToString::to_string);
            let hint = help_key.map(|k| format!("; {k} lists the keys")).unwrap_or_default();
            app.say(StatusKind::Info, format!("'{key}' does nothing here{hint}"));
            Vec::new()
        }
    }
}

fn type_char(app: &mut App, c: char) {
    if let Some(modal) = &mut app.modal {
        modal.type_char(c);
        board::after_prompt_edit(app);
        return;
    }
    if let Some(panel) = &mut app.whatif {
        panel.focused().type_char(c);
        return;
    }
    if matches!(app.screen(), Screen::Walk) {
        walk::type_char(app, c);
    }
}

fn act(app: &mut App, keymap: &Keymap, context: Context, action: Action) -> Vec<Effect> {
    match action {
        Action::ToggleHelp => {
            app.help = Some(0);
            return Vec::new();
        }
        Action::Quit => return app.request_quit(),
        _ => {}
    }
    match context {
        Context::Prompt | Context::Confirm | Context::Pick => modal::act(app, action),
        Context::WhatIf => {
            if let Some(panel) = &mut app.whatif {
                match action {
                    Action::Back => app.whatif = None,
                    Action::NextField => panel.next_field(),
                    Action::PreviousField => panel.previous_field(),
                    Action::Increase => panel.step(1.0),
                    Action::Decrease => panel.step(-1.0),
                    Action::Erase => panel.focused().erase(),
                    Action::ClearField => panel.focused().clear(),
                    Action::ResetWhatIf => panel.reset(),
                    _ => {}
                }
            }
            Vec::new()
        }
        Context::Board => board::act(app, keymap, action),
        Context::Walk => walk::act(app, action),
        Context::Tank => tank_page::act(app, action),
        Context::Summary => summary::act(app, action),
        Context::Global => Vec::new(),
    }
}

/// The time as the trend and chart code wants it.
pub fn utc(at: DateTime<FixedOffset>) -> DateTime<Utc> {
    at.with_timezone(&Utc)
}
