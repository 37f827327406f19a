//! Prompts (a line of text or a number), yes/no questions and pick lists,
//! what each one is for, and the event form built from them.

use crate::model::record::{Event, EventKind, MedicationClass, RecordBody, Target};

use super::super::action::Action;
use super::super::keymap::Context;
use super::field::{FieldKind, NumberField, Provenance};
use super::{App, Effect, SaveFor, StatusKind, board, round, walk};

/// Longest free text a prompt takes (a record's note limit).
pub const MAX_TEXT_CHARS: usize = crate::model::record::MAX_TEXT_CHARS;

/// What a prompt's line holds.
#[derive(Debug, Clone, PartialEq)]
pub enum PromptInput {
    /// Free text.
    Text(String),
    /// A number, checked as it is typed.
    Number(NumberField),
}

/// What a prompt's answer is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PromptFor {
    /// The walk entry's note.
    Note,
    /// The walk entry's count of dead fish.
    Deaths,
    /// A skip reason typed by hand.
    SkipReason,
    /// The board's text filter (applied as it is typed).
    FilterText,
    /// Why a saved reading is corrected.
    CorrectionReason,
    /// An answer of the event form.
    Event(EventQuestion),
}

/// A line to type into.
#[derive(Debug, Clone, PartialEq)]
pub struct Prompt {
    /// The question.
    pub title: String,
    /// The line.
    pub input: PromptInput,
    /// What it is for.
    pub purpose: PromptFor,
    /// True when an empty answer is accepted.
    pub optional: bool,
    /// Why the last answer was refused.
    pub error: Option<String>,
}

/// What a yes/no question decides.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ConfirmFor {
    /// Quit although the entry is unsaved.
    Quit,
    /// Leave the tank although the entry is unsaved.
    Leave(walk::Leave),
    /// A yes/no answer of the event form ("no" is an answer, not a cancel).
    Event(EventQuestion),
}

/// A yes/no question.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Confirm {
    /// The question.
    pub question: String,
    /// What it decides.
    pub then: ConfirmFor,
}

/// What a pick list chooses.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PickFor {
    /// Why a tank is skipped.
    SkipReason,
    /// Whether changed carried values correct the system's reading or are the tank's own.
    CorrectWhich,
    /// The kind of event.
    EventKind,
    /// Whether the event is the whole system's or the tank's.
    EventTarget,
    /// Antibiotic or other medication.
    MedicationClass,
}

/// A list to choose one line from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Pick {
    /// The question.
    pub title: String,
    /// The choices.
    pub items: Vec<String>,
    /// The highlighted choice.
    pub selected: usize,
    /// What it chooses.
    pub purpose: PickFor,
}

/// A prompt, question or pick list over the screen.
#[derive(Debug, Clone, PartialEq)]
pub enum Modal {
    /// A line to type.
    Prompt(Prompt),
    /// A yes/no question.
    Confirm(Confirm),
    /// A list to choose from.
    Pick(Pick),
}

impl Modal {
    /// The keymap context while it is open.
    pub fn context(&self) -> Context {
        match self {
            Modal::Prompt(_) => Context::Prompt,
            Modal::Confirm(_) => Context::Confirm,
            Modal::Pick(_) => Context::Pick,
        }
    }

    /// Types a character into a prompt.
    pub fn type_char(&mut self, c: char) {
        if let Modal::Prompt(prompt) = self {
            prompt.error = None;
            match &mut prompt.input {
                PromptInput::Text(text) => {
                    if text.chars().count() < MAX_TEXT_CHARS && !c.is_control() {
                        text.push(c);
                    }
                }
                PromptInput::Number(field) => field.type_char(c),
            }
        }
    }

    /// A prompt for free text.
    pub fn text(title: impl Into<String>, text: impl Into<String>, purpose: PromptFor, optional: bool) -> Modal {
        Modal::Prompt(Prompt {
            title: title.into(),
            input: PromptInput::Text(text.into()),
            purpose,
            optional,
            error: None,
        })
    }

    /// A prompt for a number.
    pub fn number(title: impl Into<String>, field: NumberField, purpose: PromptFor, optional: bool) -> Modal {
        Modal::Prompt(Prompt { title: title.into(), input: PromptInput::Number(field), purpose, optional, error: None })
    }

    /// A pick list.
    pub fn pick(title: impl Into<String>, items: Vec<String>, purpose: PickFor) -> Modal {
        Modal::Pick(Pick { title: title.into(), items, selected: 0, purpose })
    }
}

/// The answer of a prompt.
#[derive(Debug, Clone, PartialEq)]
pub enum Answer {
    /// Text (trimmed), possibly empty when the prompt is optional.
    Text(String),
    /// A number, or `None` when left empty and optional.
    Number(Option<f64>),
}

/// Keys in a prompt, question or pick list.
pub fn act(app: &mut App, action: Action) -> Vec<Effect> {
    let Some(modal) = app.modal.take() else { return Vec::new() };
    match modal {
        Modal::Prompt(mut prompt) => match action {
            Action::Cancel | Action::Back => {
                if prompt.purpose == PromptFor::FilterText {
                    board::filter_text_cancelled(app);
                }
                if matches!(prompt.purpose, PromptFor::Event(_)) {
                    app.event = None;
                    app.say(StatusKind::Info, "Event not recorded");
                }
                if prompt.purpose == PromptFor::CorrectionReason
                    && let Some(walk) = &mut app.walk
                {
                    walk.save_draft = None;
                }
                Vec::new()
            }
            Action::Erase => {
                match &mut prompt.input {
                    PromptInput::Text(text) => {
                        text.pop();
                    }
                    PromptInput::Number(field) => field.erase(),
                }
                prompt.error = None;
                app.modal = Some(Modal::Prompt(prompt));
                board::after_prompt_edit(app);
                Vec::new()
            }
            Action::ClearField => {
                match &mut prompt.input {
                    PromptInput::Text(text) => text.clear(),
                    PromptInput::Number(field) => field.clear(),
                }
                app.modal = Some(Modal::Prompt(prompt));
                board::after_prompt_edit(app);
                Vec::new()
            }
            Action::Confirm => {
                let answer = match &prompt.input {
                    PromptInput::Text(text) => {
                        let text = text.trim().to_string();
                        if text.is_empty() && !prompt.optional {
                            Err("type something, or cancel".to_string())
                        } else {
                            Ok(Answer::Text(text))
                        }
                    }
                    PromptInput::Number(field) => match (field.value(), field.error()) {
                        (_, Some(reason)) => Err(reason.to_string()),
                        (Some(v), None) => Ok(Answer::Number(Some(v))),
                        (None, None) if prompt.optional => Ok(Answer::Number(None)),
                        (None, None) => Err("type a number, or cancel".to_string()),
                    },
                };
                match answer {
                    Ok(answer) => answered(app, prompt.purpose, answer),
                    Err(reason) => {
                        prompt.error = Some(reason);
                        app.modal = Some(Modal::Prompt(prompt));
                        Vec::new()
                    }
                }
            }
            _ => {
                app.modal = Some(Modal::Prompt(prompt));
                Vec::new()
            }
        },
        Modal::Confirm(confirm) => match action {
            Action::Confirm => confirmed(app, confirm.then, true),
            Action::Cancel | Action::Back => confirmed(app, confirm.then, false),
            _ => {
                app.modal = Some(Modal::Confirm(confirm));
                Vec::new()
            }
        },
        Modal::Pick(mut pick) => {
            let last = pick.items.len().saturating_sub(1);
            match action {
                Action::SelectNext => pick.selected = (pick.selected + 1).min(last),
                Action::SelectPrevious => pick.selected = pick.selected.saturating_sub(1),
                Action::SelectFirst => pick.selected = 0,
                Action::SelectLast => pick.selected = last,
                Action::Confirm => return picked(app, pick.purpose, pick.selected),
                Action::Cancel | Action::Back => {
                    if matches!(pick.purpose, PickFor::EventKind | PickFor::EventTarget | PickFor::MedicationClass) {
                        app.event = None;
                        app.say(StatusKind::Info, "Event not recorded");
                    }
                    if pick.purpose == PickFor::CorrectWhich
                        && let Some(walk) = &mut app.walk
                    {
                        walk.save_draft = None;
                    }
                    return Vec::new();
                }
                _ => {}
            }
            app.modal = Some(Modal::Pick(pick));
            Vec::new()
        }
    }
}

fn answered(app: &mut App, purpose: PromptFor, answer: Answer) -> Vec<Effect> {
    match (purpose, answer) {
        (PromptFor::Note, Answer::Text(text)) => walk::set_note(app, text),
        (PromptFor::Deaths, Answer::Number(n)) => walk::set_deaths(app, n.unwrap_or(0.0)),
        (PromptFor::SkipReason, Answer::Text(text)) => walk::skip(app, text),
        (PromptFor::FilterText, Answer::Text(_)) => Vec::new(),
        (PromptFor::CorrectionReason, Answer::Text(text)) => walk::correction_reason(app, text),
        (PromptFor::Event(question), answer) => event_answer(app, question, EventValue::from(answer)),
        _ => Vec::new(),
    }
}

fn confirmed(app: &mut App, then: ConfirmFor, yes: bool) -> Vec<Effect> {
    match then {
        ConfirmFor::Quit if yes => vec![Effect::Quit],
        ConfirmFor::Quit => Vec::new(),
        ConfirmFor::Leave(leave) if yes => walk::leave(app, leave),
        ConfirmFor::Leave(_) => Vec::new(),
        ConfirmFor::Event(question) => event_answer(app, question, EventValue::YesNo(yes)),
    }
}

fn picked(app: &mut App, purpose: PickFor, index: usize) -> Vec<Effect> {
    match purpose {
        PickFor::SkipReason => walk::skip_reason_picked(app, index),
        PickFor::CorrectWhich => walk::correct_which_picked(app, index == 0),
        PickFor::EventKind => match EventChoice::ALL.get(index) {
            Some(choice) => event_kind_picked(app, *choice),
            None => Vec::new(),
        },
        PickFor::EventTarget => event_answer(app, EventQuestion::Target, EventValue::YesNo(index == 0)),
        PickFor::MedicationClass => event_answer(app, EventQuestion::MedicationClass, EventValue::YesNo(index == 0)),
    }
}

/// The kinds of event offered, in order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EventChoice {
    /// Water change.
    WaterChange,
    /// Feeding held.
    FeedingHeld,
    /// Feeding resumed.
    FeedingResumed,
    /// Medication given.
    Medication,
    /// Filter cleaned.
    FilterCleaned,
    /// Substrate replaced.
    SubstrateReplaced,
    /// Fish added.
    FishAdded,
    /// Dead fish removed.
    DeadFishRemoved,
    /// Salt added.
    SaltAdded,
    /// Heater set-point changed.
    HeaterSetPoint,
    /// Nitrifying culture added.
    NitrifyingCulture,
    /// Ammonia binder added.
    AmmoniaBinder,
    /// Zeolite added.
    Zeolite,
}

impl EventChoice {
    /// Every kind, in the order of the pick list.
    pub const ALL: [EventChoice; 13] = [
        EventChoice::WaterChange,
        EventChoice::FeedingHeld,
        EventChoice::FeedingResumed,
        EventChoice::Medication,
        EventChoice::FilterCleaned,
        EventChoice::SubstrateReplaced,
        EventChoice::FishAdded,
        EventChoice::DeadFishRemoved,
        EventChoice::SaltAdded,
        EventChoice::HeaterSetPoint,
        EventChoice::NitrifyingCulture,
        EventChoice::AmmoniaBinder,
        EventChoice::Zeolite,
    ];

    /// The line in the pick list.
    pub fn label(self) -> &'static str {
        match self {
            EventChoice::WaterChange => "water change",
            EventChoice::FeedingHeld => "feeding held",
            EventChoice::FeedingResumed => "feeding resumed",
            EventChoice::Medication => "medication",
            EventChoice::FilterCleaned => "filter cleaned",
            EventChoice::SubstrateReplaced => "substrate replaced",
            EventChoice::FishAdded => "fish added",
            EventChoice::DeadFishRemoved => "dead fish removed",
            EventChoice::SaltAdded => "salt added",
            EventChoice::HeaterSetPoint => "heater set-point changed",
            EventChoice::NitrifyingCulture => "nitrifying culture added",
            EventChoice::AmmoniaBinder => "ammonia binder added",
            EventChoice::Zeolite => "zeolite added",
        }
    }

    /// True when it acts on the water, so on a shared system it is the system's.
    fn water_wide(self) -> bool {
        matches!(
            self,
            EventChoice::WaterChange
                | EventChoice::Medication
                | EventChoice::SaltAdded
                | EventChoice::HeaterSetPoint
                | EventChoice::NitrifyingCulture
                | EventChoice::AmmoniaBinder
                | EventChoice::Zeolite
                | EventChoice::FilterCleaned
        )
    }
}

/// A question of the event form.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EventQuestion {
    /// The whole system or the tank only.
    Target,
    /// Percent of the water changed.
    Percent,
    /// pH of the new water.
    SourcePh,
    /// Whether the new water was dechlorinated.
    Dechlorinated,
    /// Antibiotic or other.
    MedicationClass,
    /// The medication's name.
    MedicationName,
    /// Whether the media were rinsed in tap water.
    RinsedInTap,
    /// How many fish.
    Count,
    /// Grams of salt.
    Grams,
    /// The new set-point.
    SetPoint,
}

/// An answer of the event form.
#[derive(Debug, Clone, PartialEq)]
pub enum EventValue {
    /// A number (or none, for an optional one left empty).
    Number(Option<f64>),
    /// A text.
    Text(String),
    /// Yes or no (for pick lists of two: the first line is yes).
    YesNo(bool),
}

impl From<Answer> for EventValue {
    fn from(answer: Answer) -> EventValue {
        match answer {
            Answer::Text(t) => EventValue::Text(t),
            Answer::Number(n) => EventValue::Number(n),
        }
    }
}

/// An event being recorded: its kind and the answers so far.
#[derive(Debug, Clone, PartialEq)]
pub struct EventDraft {
    /// The tank whose page it was started from.
    pub tank: usize,
    /// What kind.
    pub kind: EventChoice,
    /// Where: `None` until known.
    pub target: Option<Target>,
    /// The answers, by question.
    pub answers: Vec<(EventQuestion, EventValue)>,
}

impl EventDraft {
    fn answer(&self, question: EventQuestion) -> Option<&EventValue> {
        self.answers.iter().find(|(q, _)| *q == question).map(|(_, v)| v)
    }

    fn number(&self, question: EventQuestion) -> Option<f64> {
        match self.answer(question) {
            Some(EventValue::Number(n)) => *n,
            _ => None,
        }
    }

    fn yes(&self, question: EventQuestion) -> bool {
        matches!(self.answer(question), Some(EventValue::YesNo(true)))
    }

    /// The questions this kind asks, in order.
    fn questions(&self) -> &'static [EventQuestion] {
        match self.kind {
            EventChoice::WaterChange => {
                &[EventQuestion::Percent, EventQuestion::SourcePh, EventQuestion::Dechlorinated]
            }
            EventChoice::Medication => &[EventQuestion::MedicationClass, EventQuestion::MedicationName],
            EventChoice::FilterCleaned => &[EventQuestion::RinsedInTap],
            EventChoice::FishAdded | EventChoice::DeadFishRemoved => &[EventQuestion::Count],
            EventChoice::SaltAdded => &[EventQuestion::Grams],
            EventChoice::HeaterSetPoint => &[EventQuestion::SetPoint],
            _ => &[],
        }
    }

    /// The event, once every question is answered.
    fn event_kind(&self, fahrenheit: bool) -> EventKind {
        let count = self.number(EventQuestion::Count).unwrap_or(0.0) as u32;
        match self.kind {
            EventChoice::WaterChange => EventKind::WaterChange {
                percent: self.number(EventQuestion::Percent).unwrap_or(0.0),
                source_ph: self.number(EventQuestion::SourcePh),
                source_tan_n_mg_l: None,
                source_temp_c: None,
                dechlorinated: self.yes(EventQuestion::Dechlorinated),
            },
            EventChoice::FeedingHeld => EventKind::FeedingHeld,
            EventChoice::FeedingResumed => EventKind::FeedingResumed,
            EventChoice::Medication => EventKind::Medication {
                class: if self.yes(EventQuestion::MedicationClass) {
                    MedicationClass::Antibiotic
                } else {
                    MedicationClass::Other
                },
                name: match self.answer(EventQuestion::MedicationName) {
                    Some(EventValue::Text(t)) => t.clone(),
                    _ => String::new(),
                },
            },
            EventChoice::FilterCleaned => {
                EventKind::FilterCleaned { rinsed_in_tap_water: self.yes(EventQuestion::RinsedInTap) }
            }
            EventChoice::SubstrateReplaced => EventKind::SubstrateReplaced,
            EventChoice::FishAdded => EventKind::FishAdded { count },
            EventChoice::DeadFishRemoved => EventKind::DeadFishRemoved { count },
            EventChoice::SaltAdded => EventKind::SaltAdded { grams: self.number(EventQuestion::Grams).unwrap_or(0.0) },
            EventChoice::HeaterSetPoint => {
                let t = self.number(EventQuestion::SetPoint).unwrap_or(0.0);
                let temp_c = if fahrenheit { crate::core::units::fahrenheit_to_celsius(t) } else { t };
                EventKind::HeaterSetPoint { temp_c }
            }
            EventChoice::NitrifyingCulture => EventKind::NitrifyingCultureAdded,
            EventChoice::AmmoniaBinder => EventKind::AmmoniaBinderAdded,
            EventChoice::Zeolite => EventKind::ZeoliteAdded,
        }
    }
}

/// Starts recording an event for a tank: the list of kinds.
pub fn start_event(app: &mut App, tank: usize) {
    app.event = None;
    app.event = Some(EventDraft { tank, kind: EventChoice::WaterChange, target: None, answers: Vec::new() });
    let label = app.tank(tank).id.as_str().to_string();
    app.modal = Some(Modal::pick(
        format!("What was done at {label}?"),
        EventChoice::ALL.iter().map(|c| c.label().to_string()).collect(),
        PickFor::EventKind,
    ));
}

fn event_kind_picked(app: &mut App, kind: EventChoice) -> Vec<Effect> {
    let Some(draft) = &mut app.event else { return Vec::new() };
    draft.kind = kind;
    let tank = app.facility.tanks[draft.tank].clone();
    match (kind.water_wide(), app.facility.system_of(&tank)) {
        (true, Some(system)) => {
            let n = app.facility.tanks_on(system).len();
            app.modal = Some(Modal::pick(
                format!("{}: the whole system or this tank?", kind.label()),
                vec![
                    format!("system {} (all {n} tanks share its water)", system.id.as_str()),
                    format!("tank {} only", tank.id.as_str()),
                ],
                PickFor::EventTarget,
            ));
            Vec::new()
        }
        _ => {
            draft.target = Some(round::tank_target(&tank));
            ask_next(app)
        }
    }
}

fn event_answer(app: &mut App, question: EventQuestion, value: EventValue) -> Vec<Effect> {
    let Some(draft) = &mut app.event else { return Vec::new() };
    if question == EventQuestion::Target {
        let tank = &app.facility.tanks[draft.tank];
        draft.target = match value {
            EventValue::YesNo(true) => round::system_target(tank),
            _ => Some(round::tank_target(tank)),
        };
    } else {
        draft.answers.push((question, value));
    }
    ask_next(app)
}

/// Asks the next unanswered question, or saves the event when none is left.
fn ask_next(app: &mut App) -> Vec<Effect> {
    let fahrenheit = app.facility.room.temperature_unit == crate::model::facility::TemperatureUnit::Fahrenheit;
    let Some(draft) = &app.event else { return Vec::new() };
    let next = draft.questions().iter().copied().find(|q| draft.answer(*q).is_none());
    let kind = draft.kind.label();
    let number = |kind: FieldKind| NumberField::new(kind);
    app.modal = match next {
        Some(q @ EventQuestion::Percent) => Some(Modal::number(
            "Percent of the water changed",
            number(FieldKind::WaterChangePercent),
            PromptFor::Event(q),
            false,
        )),
        Some(q @ EventQuestion::SourcePh) => Some(Modal::number(
            "pH of the new water (leave empty if not measured)",
            number(FieldKind::Ph),
            PromptFor::Event(q),
            true,
        )),
        Some(q @ EventQuestion::Dechlorinated) => Some(Modal::Confirm(Confirm {
            question: "Was the new water dechlorinated?".into(),
            then: ConfirmFor::Event(q),
        })),
        Some(EventQuestion::MedicationClass) => Some(Modal::pick(
            "What kind of medication?",
            vec!["antibiotic (it can harm the filter bacteria)".into(), "other".into()],
            PickFor::MedicationClass,
        )),
        Some(q @ EventQuestion::MedicationName) => {
            Some(Modal::text("Name of the medication or product", "", PromptFor::Event(q), false))
        }
        Some(q @ EventQuestion::RinsedInTap) => Some(Modal::Confirm(Confirm {
            question: "Were the filter media rinsed in tap (chlorinated) water?".into(),
            then: ConfirmFor::Event(q),
        })),
        Some(q @ EventQuestion::Count) => Some(Modal::number(
            format!("How many fish ({kind})?"),
            number(FieldKind::Count),
            PromptFor::Event(q),
            false,
        )),
        Some(q @ EventQuestion::Grams) => {
            Some(Modal::number("Grams of salt added", number(FieldKind::Grams), PromptFor::Event(q), false))
        }
        Some(q @ EventQuestion::SetPoint) => Some(Modal::number(
            "The heater's new set-point",
            number(if fahrenheit { FieldKind::TemperatureF } else { FieldKind::TemperatureC }),
            PromptFor::Event(q),
            false,
        )),
        Some(EventQuestion::Target) | None => None,
    };
    if app.modal.is_some() {
        return Vec::new();
    }
    // Every question answered: save it.
    let Some(draft) = app.event.clone() else { return Vec::new() };
    let Some(target) = draft.target.clone() else { return Vec::new() };
    let event = Event { target, kind: draft.event_kind(fahrenheit), note: None };
    if let Err(err) = event.check() {
        app.event = None;
        app.say(StatusKind::Error, format!("Event not recorded: {err}"));
        return Vec::new();
    }
    let record = app.new_record(RecordBody::Event(event));
    app.saving = Some(SaveFor::Event { tank: draft.tank });
    vec![Effect::Save(vec![record])]
}

/// A field holding a value for a prompt.
pub fn prefilled(kind: FieldKind, value: f64) -> NumberField {
    NumberField::with_value(kind, value, Provenance::Saved)
}
