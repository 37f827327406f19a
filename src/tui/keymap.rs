//! Keys, key sequences and keymaps: from a key press to an [`Action`].
//!
//! A keymap is a TOML file with one table per screen context, each line binding
//! a key sequence to an action name:
//!
//! ```toml
//! [board]
//! "down" = "select-next"
//! "g g" = "select-first"
//! ```
//!
//! The shipped default (`keymaps/default.toml`) is embedded in the binary; a
//! person's own file is merged over it key by key (`"none"` removes a default
//! binding). Parsing never reads files and lookup ([`Keymap::feed`]) is a pure
//! function of the keymap, the keys pressed so far and the new key, so both are
//! tested without a terminal.

use std::collections::BTreeMap;
use std::fmt;
use std::str::FromStr;
use std::sync::Arc;

use ratatui::crossterm::event::{KeyCode as CtKeyCode, KeyEvent, KeyEventKind, KeyModifiers};
use serde::Deserialize;
use toml::Spanned;

use super::action::Action;

/// The keymap shipped with tankwalk, embedded so it is always there.
pub const DEFAULT_KEYMAP: &str = include_str!("../../keymaps/default.toml");

/// The name under which errors in the embedded default are reported.
pub const DEFAULT_KEYMAP_ORIGIN: &str = "keymaps/default.toml (built in)";

/// A key without modifiers.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum KeyCode {
    /// A printable character, space included; case carries the shift key.
    Char(char),
    /// Enter / Return.
    Enter,
    /// Escape.
    Esc,
    /// Tab (shift-tab is `Tab` with shift).
    Tab,
    /// Backspace.
    Backspace,
    /// Delete.
    Delete,
    /// Insert.
    Insert,
    /// Arrow up.
    Up,
    /// Arrow down.
    Down,
    /// Arrow left.
    Left,
    /// Arrow right.
    Right,
    /// Home.
    Home,
    /// End.
    End,
    /// Page up.
    PageUp,
    /// Page down.
    PageDown,
    /// A function key, F1 to F24.
    F(u8),
}

const NAMED_KEYS: &[(&str, KeyCode)] = &[
    ("enter", KeyCode::Enter),
    ("esc", KeyCode::Esc),
    ("tab", KeyCode::Tab),
    ("backspace", KeyCode::Backspace),
    ("delete", KeyCode::Delete),
    ("insert", KeyCode::Insert),
    ("up", KeyCode::Up),
    ("down", KeyCode::Down),
    ("left", KeyCode::Left),
    ("right", KeyCode::Right),
    ("home", KeyCode::Home),
    ("end", KeyCode::End),
    ("pageup", KeyCode::PageUp),
    ("pagedown", KeyCode::PageDown),
    ("space", KeyCode::Char(' ')),
];

/// Other spellings accepted in files; [`Key`]'s `Display` prints the names above.
const KEY_ALIASES: &[(&str, &str)] = &[
    ("return", "enter"),
    ("escape", "esc"),
    ("del", "delete"),
    ("ins", "insert"),
    ("pgup", "pageup"),
    ("pgdn", "pagedown"),
    ("page-up", "pageup"),
    ("page-down", "pagedown"),
];

/// One key press: a key and its modifiers.
///
/// Normalised so that equal presses compare equal: a character carries shift
/// in its case (`"G"`, not `"shift-g"`), and a control character is lower case
/// (terminals cannot tell ctrl-s from ctrl-S).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Key {
    /// The key.
    pub code: KeyCode,
    /// Control held.
    pub ctrl: bool,
    /// Alt (Option, Meta) held.
    pub alt: bool,
    /// Shift held (never set for characters).
    pub shift: bool,
}

impl Key {
    /// A key with modifiers, normalised (see [`Key`]).
    pub fn new(code: KeyCode, ctrl: bool, alt: bool, shift: bool) -> Key {
        Key { code, ctrl, alt, shift }.normalised()
    }

    /// A key with no modifiers.
    pub const fn plain(code: KeyCode) -> Key {
        Key { code, ctrl: false, alt: false, shift: false }
    }

    /// A character key with no modifiers.
    pub const fn char(c: char) -> Key {
        Key::plain(KeyCode::Char(c))
    }

    /// A character with control held.
    pub const fn ctrl(c: char) -> Key {
        Key { code: KeyCode::Char(c), ctrl: true, alt: false, shift: false }
    }

    fn normalised(mut self) -> Key {
        if let KeyCode::Char(c) = self.code {
            let c = if self.ctrl {
                c.to_ascii_lowercase()
            } else if self.shift {
                c.to_ascii_uppercase()
            } else {
                c
            };
            self.code = KeyCode::Char(c);
            self.shift = false;
        }
        self
    }

    /// The key of a terminal key event; `None` for releases, repeats of
    /// nothing we bind (media keys, modifiers alone) and other non-presses.
    pub fn from_event(event: &KeyEvent) -> Option<Key> {
        if event.kind != KeyEventKind::Press {
            return None;
        }
        let mut shift = event.modifiers.contains(KeyModifiers::SHIFT);
        let code = match event.code {
            CtKeyCode::Char(c) => KeyCode::Char(c),
            CtKeyCode::Enter => KeyCode::Enter,
            CtKeyCode::Esc => KeyCode::Esc,
            CtKeyCode::Tab => KeyCode::Tab,
            CtKeyCode::BackTab => {
                shift = true;
                KeyCode::Tab
            }
            CtKeyCode::Backspace => KeyCode::Backspace,
            CtKeyCode::Delete => KeyCode::Delete,
            CtKeyCode::Insert => KeyCode::Insert,
            CtKeyCode::Up => KeyCode::Up,
            CtKeyCode::Down => KeyCode::Down,
            CtKeyCode::Left => KeyCode::Left,
            CtKeyCode::Right => KeyCode::Right,
            CtKeyCode::Home => KeyCode::Home,
            CtKeyCode::End => KeyCode::End,
            CtKeyCode::PageUp => KeyCode::PageUp,
            CtKeyCode::PageDown => KeyCode::PageDown,
            CtKeyCode::F(n) if (1..=24).contains(&n) => KeyCode::F(n),
            _ => return None,
        };
        Some(
            Key {
                code,
                ctrl: event.modifiers.contains(KeyModifiers::CONTROL),
                alt: event.modifiers.contains(KeyModifiers::ALT),
                shift,
            }
            .normalised(),
        )
    }

    /// The character this key types into a field, when it is a plain character.
    pub fn typed_char(&self) -> Option<char> {
        match self.code {
            KeyCode::Char(c) if !self.ctrl && !self.alt => Some(c),
            _ => None,
        }
    }
}

impl fmt::Display for Key {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.ctrl {
            f.write_str("ctrl-")?;
        }
        if self.alt {
            f.write_str("alt-")?;
        }
        if self.shift {
            f.write_str("shift-")?;
        }
        match self.code {
            KeyCode::Char(' ') => f.write_str("space"),
            KeyCode::Char(c) => write!(f, "{c}"),
            KeyCode::F(n) => write!(f, "f{n}"),
            code => {
                let name = NAMED_KEYS.iter().find(|(_, c)| *c == code).map_or("?", |(name, _)| name);
                f.write_str(name)
            }
        }
    }
}

/// A key that could not be read from its written form.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("bad key '{text}': {reason}")]
pub struct KeyParseError {
    /// The text as written.
    pub text: String,
    /// What is wrong with it.
    pub reason: String,
}

impl FromStr for Key {
    type Err = KeyParseError;

    fn from_str(text: &str) -> Result<Self, Self::Err> {
        let fail = |reason: String| KeyParseError { text: text.to_string(), reason };
        let mut key = Key::plain(KeyCode::Esc);
        let mut rest = text;
        // Strip modifiers; "ctrl--" is control with the minus key.
        loop {
            let lower = rest.to_ascii_lowercase();
            let (flag, prefix_len) = if lower.starts_with("ctrl-") {
                (&mut key.ctrl, 5)
            } else if lower.starts_with("alt-") {
                (&mut key.alt, 4)
            } else if lower.starts_with("shift-") {
                (&mut key.shift, 6)
            } else {
                break;
            };
            if rest.len() == prefix_len {
                break;
            }
            if *flag {
                return Err(fail(format!("'{}' is given twice", &rest[..prefix_len - 1])));
            }
            *flag = true;
            rest = &rest[prefix_len..];
        }
        if rest.is_empty() {
            return Err(fail("no key given".to_string()));
        }
        let mut chars = rest.chars();
        key.code = match (chars.next(), chars.next()) {
            (Some(c), None) if c.is_whitespace() || c.is_control() => {
                return Err(fail("write a blank as 'space'; tabs and line breaks are 'tab' and 'enter'".to_string()));
            }
            (Some(c), None) => KeyCode::Char(c),
            _ => {
                let lower = rest.to_ascii_lowercase();
                let name = KEY_ALIASES.iter().find(|(alias, _)| *alias == lower).map_or(lower.as_str(), |(_, n)| n);
                if name == "backtab" {
                    key.shift = true;
                    KeyCode::Tab
                } else if let Some((_, code)) = NAMED_KEYS.iter().find(|(n, _)| *n == name) {
                    *code
                } else if let Some(n) = name.strip_prefix('f').and_then(|n| n.parse::<u8>().ok()) {
                    if !(1..=24).contains(&n) {
                        return Err(fail("function keys go from f1 to f24".to_string()));
                    }
                    KeyCode::F(n)
                } else if rest.contains(' ') {
                    return Err(fail(
                        "a key has no blanks; separate the keys of a sequence with one space".to_string(),
                    ));
                } else {
                    return Err(fail(format!(
                        "not a key name (a single character, or one of {}, f1..f24, \
                         with ctrl-, alt- or shift- in front)",
                        NAMED_KEYS.iter().map(|(n, _)| *n).collect::<Vec<_>>().join(", ")
                    )));
                }
            }
        };
        if let KeyCode::Char(c) = key.code
            && key.shift
            && !c.is_ascii_alphabetic()
        {
            return Err(fail(format!("write the shifted character itself, not 'shift-{c}'")));
        }
        Ok(key.normalised())
    }
}

/// A sequence of one or more key presses bound to one action, such as `g g`.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct KeyChord(Vec<Key>);

impl KeyChord {
    /// A chord of one key.
    pub fn single(key: Key) -> KeyChord {
        KeyChord(vec![key])
    }

    /// The keys in the order they are pressed.
    pub fn keys(&self) -> &[Key] {
        &self.0
    }

    /// True when `self` is the start of `other` and shorter.
    pub fn is_strict_prefix_of(&self, other: &KeyChord) -> bool {
        self.0.len() < other.0.len() && other.0.starts_with(&self.0)
    }
}

impl fmt::Display for KeyChord {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, key) in self.0.iter().enumerate() {
            if i > 0 {
                f.write_str(" ")?;
            }
            write!(f, "{key}")?;
        }
        Ok(())
    }
}

impl FromStr for KeyChord {
    type Err = KeyParseError;

    fn from_str(text: &str) -> Result<Self, Self::Err> {
        if text.chars().count() == 1 {
            // A lone blank is refused by `Key`, with the reason.
            return Ok(KeyChord(vec![text.parse()?]));
        }
        if text.trim().is_empty() {
            return Err(KeyParseError { text: text.to_string(), reason: "no key given".to_string() });
        }
        let keys = text.split(' ').filter(|k| !k.is_empty()).map(str::parse).collect::<Result<Vec<Key>, _>>()?;
        Ok(KeyChord(keys))
    }
}

/// How a context treats a plain character typed while nothing else is pending.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TextInput {
    /// Characters are keys like any other.
    None,
    /// Digits, `.` and `,` type a number into the focused field.
    Number,
    /// Every plain character is text.
    Free,
}

impl TextInput {
    /// True when `key` is typed as text rather than looked up.
    pub fn takes(self, key: &Key) -> bool {
        match (self, key.typed_char()) {
            (TextInput::None, _) | (_, None) => false,
            (TextInput::Number, Some(c)) => c.is_ascii_digit() || c == '.' || c == ',',
            (TextInput::Free, Some(_)) => true,
        }
    }
}

macro_rules! contexts {
    ($($variant:ident => $name:literal, $title:literal, $text:expr, $inherits:expr, [$($action:ident),* $(,)?];)*) => {
        /// A screen or modal part of a screen with its own key bindings.
        #[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
        pub enum Context {
            $(#[doc = $title] $variant,)*
        }

        impl Context {
            /// Every context, in the order of the keymap files.
            pub const ALL: &'static [Context] = &[$(Context::$variant),*];

            /// The table name in keymap files.
            pub fn name(self) -> &'static str {
                match self { $(Context::$variant => $name,)* }
            }

            /// A title for help.
            pub fn title(self) -> &'static str {
                match self { $(Context::$variant => $title,)* }
            }

            /// What plain characters do here.
            pub fn text_input(self) -> TextInput {
                match self { $(Context::$variant => $text,)* }
            }

            /// True when the `[global]` bindings also work here.
            pub fn inherits_global(self) -> bool {
                match self { $(Context::$variant => $inherits,)* }
            }

            /// The actions that do something here; binding another is an error.
            pub fn actions(self) -> &'static [Action] {
                match self { $(Context::$variant => &[$(Action::$action),*],)* }
            }
        }

        #[derive(Deserialize)]
        #[serde(deny_unknown_fields)]
        #[allow(non_snake_case)] // fields are named after the variants
        struct RawKeymap {
            $(#[serde(default, rename = $name)] $variant: Option<RawTable>,)*
        }

        impl RawKeymap {
            fn into_tables(self) -> Vec<(Context, RawTable)> {
                let mut tables = Vec::new();
                $(if let Some(table) = self.$variant { tables.push((Context::$variant, table)); })*
                tables
            }
        }
    };
}

type RawTable = BTreeMap<Spanned<String>, Spanned<String>>;

contexts! {
    Global => "global", "Everywhere", TextInput::None, false, [ToggleHelp, Quit, Back];
    Board => "board", "Room board", TextInput::None, true,
        [SelectNext, SelectPrevious, SelectFirst, SelectLast, PageDown, PageUp, StartWalk, OpenTank, FilterText,
         FilterBand, ShowSummary, OpenWhatIf, Sync];
    Walk => "walk", "Walk: entering readings", TextInput::Number, true,
        [NextField, PreviousField, KeepPrevious, Erase, ClearField, SaveAndNext, SkipTank, NextTank, PreviousTank,
         ToggleGasping, ToggleHyperactive, ToggleNervous, ToggleCloudyEyes, ToggleMucus, SetDeaths, EditNote,
         OpenWhatIf, OpenTank, ShowSummary];
    Tank => "tank", "Tank page", TextInput::None, true,
        [SelectNext, SelectPrevious, SelectFirst, SelectLast, PageDown, PageUp, NextRange, PreviousRange, NextChart,
         AddEvent, OpenWhatIf, StartWalk];
    WhatIf => "whatif", "What-if panel", TextInput::Number, true,
        [NextField, PreviousField, Increase, Decrease, Erase, ClearField, ResetWhatIf];
    Summary => "summary", "Round summary", TextInput::None, true,
        [SelectNext, SelectPrevious, SelectFirst, SelectLast, PageDown, PageUp, OpenTank, StartWalk, Export, WriteReport];
    Pick => "pick", "Choosing from a list", TextInput::None, false,
        [SelectNext, SelectPrevious, SelectFirst, SelectLast, Confirm, Cancel];
    Prompt => "prompt", "Typing a text or number", TextInput::Free, false, [Confirm, Cancel, Erase, ClearField];
    Confirm => "confirm", "Answering a question", TextInput::None, false, [Confirm, Cancel];
}

impl Context {
    /// True when `action` may be bound here: one of its own, or a global one it inherits.
    pub fn allows(self, action: Action) -> bool {
        self.actions().contains(&action) || (self.inherits_global() && Context::Global.actions().contains(&action))
    }
}

impl fmt::Display for Context {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Context {
    type Err = String;

    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Context::ALL.iter().copied().find(|c| c.name() == s.trim()).ok_or_else(|| {
            format!(
                "unknown context '{s}' (contexts: {})",
                Context::ALL.iter().map(|c| c.name()).collect::<Vec<_>>().join(", ")
            )
        })
    }
}

/// Where a binding was written: a file (or the built-in default) and a line.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Origin {
    /// The file as the person named it, or [`DEFAULT_KEYMAP_ORIGIN`].
    pub file: Arc<str>,
    /// Line number, from 1.
    pub line: usize,
}

impl fmt::Display for Origin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}:{}", self.file, self.line)
    }
}

/// One line of a keymap: a key sequence, its action, and where it was written.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Binding {
    /// The keys.
    pub chord: KeyChord,
    /// What they do.
    pub action: Action,
    /// Where the binding came from.
    pub origin: Origin,
}

/// A mistake in a keymap file, located by file and line.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{file}:{line}: {reason}")]
pub struct KeymapError {
    /// The file as the person named it.
    pub file: Arc<str>,
    /// Line number, from 1.
    pub line: usize,
    /// What is wrong, naming the key or action in 'single quotes'.
    pub reason: String,
}

/// Every mistake found in a keymap (at least one), in file and line order.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct KeymapErrors(pub Vec<KeymapError>);

impl fmt::Display for KeymapErrors {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, error) in self.0.iter().enumerate() {
            if i > 0 {
                f.write_str("\n")?;
            }
            write!(f, "{error}")?;
        }
        Ok(())
    }
}

impl std::error::Error for KeymapErrors {}

/// What a key press amounts to, given the keys pressed before it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum KeyResult {
    /// The keys so far are a whole binding.
    Matched(Action),
    /// The keys so far start one or more bindings: these, with their actions.
    Pending(Vec<(KeyChord, Action)>),
    /// Nothing is bound to these keys; the sequence was dropped.
    NotFound,
    /// Escape abandoned a sequence in progress.
    Cancelled,
}

/// The key bindings of every context.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Keymap {
    bindings: BTreeMap<Context, Vec<Binding>>,
}

/// A parsed but not yet merged keymap file: `None` actions unbind.
type Layer = Vec<(Context, KeyChord, Option<Action>, Origin)>;

fn line_of(text: &str, offset: usize) -> usize {
    text.get(..offset).unwrap_or(text).bytes().filter(|b| *b == b'\n').count() + 1
}

/// The word `unbind` that removes a default binding in a person's file.
pub const UNBIND: &str = "none";

fn parse_layer(text: &str, file: &Arc<str>) -> Result<Layer, KeymapErrors> {
    let error = |line: usize, reason: String| KeymapError { file: file.clone(), line, reason };
    let raw: RawKeymap = toml::from_str(text).map_err(|e| {
        let line = e.span().map_or(1, |s| line_of(text, s.start));
        let message = e.message().trim();
        let reason = match message.strip_prefix("unknown field `").and_then(|m| m.split('`').next()) {
            Some(name) => name.parse::<Context>().err().unwrap_or_else(|| message.to_string()),
            None => message.to_string(),
        };
        KeymapErrors(vec![error(line, reason)])
    })?;
    let mut layer = Layer::new();
    let mut errors = Vec::new();
    for (context, table) in raw.into_tables() {
        // Two spellings of one key ("down", "Down") in one table.
        let mut seen: BTreeMap<KeyChord, (String, usize)> = BTreeMap::new();
        let mut entries: Vec<_> = table.into_iter().collect();
        entries.sort_by_key(|(k, _)| k.span().start);
        for (chord_text, action_text) in entries {
            let line = line_of(text, chord_text.span().start);
            let origin = Origin { file: file.clone(), line };
            let chord = match chord_text.get_ref().parse::<KeyChord>() {
                Ok(chord) => chord,
                Err(e) => {
                    errors.push(error(line, format!("in [{context}], {e}")));
                    continue;
                }
            };
            if let Some((other, other_line)) = seen.get(&chord) {
                errors.push(error(
                    line,
                    format!("in [{context}], '{chord_text}' is the same key as '{other}' on line {other_line}"),
                ));
                continue;
            }
            seen.insert(chord.clone(), (chord_text.get_ref().clone(), line));
            let action_line = line_of(text, action_text.span().start);
            let action = if action_text.get_ref() == UNBIND {
                None
            } else {
                match action_text.get_ref().parse::<Action>() {
                    Ok(action) => Some(action),
                    Err(e) => {
                        errors.push(error(action_line, format!("in [{context}], '{chord}': {e}")));
                        continue;
                    }
                }
            };
            if let Err(reason) = check_binding(context, &chord, action) {
                errors.push(error(line, reason));
                continue;
            }
            layer.push((context, chord, action, origin));
        }
    }
    if errors.is_empty() { Ok(layer) } else { Err(KeymapErrors(errors)) }
}

/// Checks one binding on its own: the action must do something in the context,
/// and the first key must not be one the context types as text.
fn check_binding(context: Context, chord: &KeyChord, action: Option<Action>) -> Result<(), String> {
    if let Some(action) = action
        && !context.allows(action)
    {
        let elsewhere: Vec<&str> =
            Context::ALL.iter().filter(|c| c.actions().contains(&action)).map(|c| c.name()).collect();
        return Err(format!(
            "in [{context}], '{action}' does nothing on this screen (it works in: {})",
            elsewhere.join(", ")
        ));
    }
    let first = chord.keys()[0];
    let typed_in: Vec<&str> = if context == Context::Global {
        Context::ALL.iter().filter(|c| c.inherits_global() && c.text_input().takes(&first)).map(|c| c.name()).collect()
    } else if context.text_input().takes(&first) {
        vec![context.name()]
    } else {
        Vec::new()
    };
    if !typed_in.is_empty() {
        return Err(format!(
            "in [{context}], '{first}' types into the field in [{}] and cannot be bound",
            typed_in.join("], [")
        ));
    }
    Ok(())
}

/// A keymap file's bytes as text: a file that is not UTF-8 is a mistake at
/// the line of its first bad byte.
pub fn keymap_text<'a>(bytes: &'a [u8], origin: &str) -> Result<&'a str, KeymapErrors> {
    crate::text::decode(bytes).map_err(|bad| {
        KeymapErrors(vec![KeymapError {
            file: Arc::from(origin),
            line: bad.line,
            reason: format!("column {}: {bad}", bad.column),
        }])
    })
}

impl Keymap {
    /// The built-in keymap (`keymaps/default.toml`).
    pub fn default_map() -> Keymap {
        // The embedded file is checked by the tests, so this cannot fail at run time.
        Keymap::from_toml(DEFAULT_KEYMAP, DEFAULT_KEYMAP_ORIGIN).expect("the built-in keymap is valid")
    }

    /// Reads a keymap from its TOML text on its own, with nothing merged under
    /// it; `origin` names the file in errors.
    pub fn from_toml(text: &str, origin: &str) -> Result<Keymap, KeymapErrors> {
        let file: Arc<str> = Arc::from(origin);
        let layer = parse_layer(text, &file)?;
        Keymap { bindings: BTreeMap::new() }.merged(layer)
    }

    /// This keymap with a person's file (TOML `text`, named `origin`) merged
    /// over it key by key.
    pub fn with_overrides(&self, text: &str, origin: &str) -> Result<Keymap, KeymapErrors> {
        let file: Arc<str> = Arc::from(origin);
        let layer = parse_layer(text, &file)?;
        self.clone().merged(layer)
    }

    /// The built-in keymap with a person's file merged over it.
    pub fn default_with_overrides(text: &str, origin: &str) -> Result<Keymap, KeymapErrors> {
        Keymap::default_map().with_overrides(text, origin)
    }

    fn merged(mut self, layer: Layer) -> Result<Keymap, KeymapErrors> {
        for (context, chord, action, origin) in layer {
            let table = self.bindings.entry(context).or_default();
            table.retain(|b| b.chord != chord);
            if let Some(action) = action {
                table.push(Binding { chord, action, origin });
            }
        }
        self.check_reachable()?;
        Ok(self)
    }

    /// Every sequence must be typeable: none may start with another bound in
    /// the same context (or in `[global]`, where it applies).
    fn check_reachable(&self) -> Result<(), KeymapErrors> {
        let mut errors = Vec::new();
        for context in Context::ALL {
            let effective: Vec<&Binding> = self.effective(*context).collect();
            for long in &effective {
                for short in &effective {
                    if short.chord.is_strict_prefix_of(&long.chord) {
                        let (file, line) = (long.origin.file.clone(), long.origin.line);
                        let shadowing_context =
                            if self.own(*context).any(|b| b == *short) { *context } else { Context::Global };
                        let reason = format!(
                            "in [{context}], '{}' can never be typed: '{}' is bound to '{}' in [{shadowing_context}] ({})",
                            long.chord, short.chord, short.action, short.origin
                        );
                        let error = KeymapError { file, line, reason };
                        if !errors.contains(&error) {
                            errors.push(error);
                        }
                    }
                }
            }
        }
        if errors.is_empty() {
            return Ok(());
        }
        errors.sort_by(|a, b| (&a.file, a.line).cmp(&(&b.file, b.line)));
        Err(KeymapErrors(errors))
    }

    /// The bindings written in `context`'s own table, in file order.
    pub fn own(&self, context: Context) -> impl Iterator<Item = &Binding> {
        self.bindings.get(&context).into_iter().flatten()
    }

    /// The bindings that work in `context`: its own, then the global ones it
    /// does not override.
    pub fn effective(&self, context: Context) -> impl Iterator<Item = &Binding> {
        let own = self.bindings.get(&context);
        let global = if context.inherits_global() && context != Context::Global {
            self.bindings.get(&Context::Global)
        } else {
            None
        };
        own.into_iter().flatten().chain(
            global.into_iter().flatten().filter(move |g| !own.is_some_and(|o| o.iter().any(|b| b.chord == g.chord))),
        )
    }

    /// The key sequences that trigger `action` in `context`, in file order.
    pub fn chords_for(&self, context: Context, action: Action) -> Vec<&KeyChord> {
        self.effective(context).filter(|b| b.action == action).map(|b| &b.chord).collect()
    }

    /// Looks up a key press. `pending` holds the keys of a sequence in progress
    /// and is updated; the caller keeps it between presses (and shows it).
    pub fn feed(&self, pending: &mut Vec<Key>, context: Context, key: Key) -> KeyResult {
        if key == Key::plain(KeyCode::Esc) && !pending.is_empty() {
            pending.clear();
            return KeyResult::Cancelled;
        }
        pending.push(key);
        let mut candidates = Vec::new();
        for binding in self.effective(context) {
            if binding.chord.keys() == pending.as_slice() {
                pending.clear();
                return KeyResult::Matched(binding.action);
            }
            if binding.chord.keys().starts_with(pending) {
                candidates.push((binding.chord.clone(), binding.action));
            }
        }
        if candidates.is_empty() {
            pending.clear();
            KeyResult::NotFound
        } else {
            KeyResult::Pending(candidates)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn key(s: &str) -> Key {
        s.parse().unwrap()
    }

    #[test]
    fn keys_parse_and_print_in_canonical_form() {
        for (written, canonical) in [
            ("q", "q"),
            ("G", "G"),
            ("shift-g", "G"),
            ("ctrl-s", "ctrl-s"),
            ("CTRL-S", "ctrl-s"),
            ("ctrl-S", "ctrl-s"),
            ("ctrl-shift-a", "ctrl-a"),
            ("alt-x", "alt-x"),
            ("ctrl-alt-delete", "ctrl-alt-delete"),
            ("-", "-"),
            ("ctrl--", "ctrl--"),
            ("Enter", "enter"),
            ("return", "enter"),
            ("backtab", "shift-tab"),
            ("shift-tab", "shift-tab"),
            ("space", "space"),
            ("PgDn", "pagedown"),
            ("f5", "f5"),
            ("?", "?"),
        ] {
            assert_eq!(key(written).to_string(), canonical, "{written}");
            assert_eq!(key(canonical), key(written), "{written}");
        }
    }

    #[test]
    fn nonsense_keys_are_refused_with_a_reason() {
        for (text, reason_part) in [
            ("", "no key given"),
            ("ctrl-", "not a key name"),
            ("hyper-x", "not a key name"),
            ("f25", "f1 to f24"),
            ("ctrl-ctrl-x", "given twice"),
            ("shift-1", "shifted character"),
            (" ", "space"),
        ] {
            let err = text.parse::<KeyChord>().unwrap_err();
            assert!(err.to_string().contains(reason_part), "{text:?}: {err}");
        }
    }

    #[test]
    fn sequences_parse_with_single_spaces() {
        let chord: KeyChord = "g g".parse().unwrap();
        assert_eq!(chord.keys(), &[Key::char('g'), Key::char('g')]);
        assert_eq!(chord.to_string(), "g g");
        let chord: KeyChord = "ctrl-x  space".parse().unwrap();
        assert_eq!(chord.to_string(), "ctrl-x space");
    }

    #[test]
    fn events_become_normalised_keys_and_releases_are_ignored() {
        use ratatui::crossterm::event::KeyEventState;
        let press = KeyEvent::new(CtKeyCode::Char('G'), KeyModifiers::SHIFT);
        assert_eq!(Key::from_event(&press), Some(Key::char('G')));
        let backtab = KeyEvent::new(CtKeyCode::BackTab, KeyModifiers::SHIFT);
        assert_eq!(Key::from_event(&backtab), Some(key("shift-tab")));
        let release = KeyEvent {
            code: CtKeyCode::Char('q'),
            modifiers: KeyModifiers::NONE,
            kind: KeyEventKind::Release,
            state: KeyEventState::NONE,
        };
        assert_eq!(Key::from_event(&release), None);
    }

    fn map(text: &str) -> Keymap {
        Keymap::from_toml(text, "test.toml").unwrap()
    }

    #[test]
    fn feed_matches_sequences_and_escape_cancels() {
        let keymap = map("[board]\n\"g g\" = \"select-first\"\nj = \"select-next\"\n[global]\nq = \"quit\"\n");
        let mut pending = Vec::new();
        assert_eq!(keymap.feed(&mut pending, Context::Board, key("j")), KeyResult::Matched(Action::SelectNext));
        let first = keymap.feed(&mut pending, Context::Board, key("g"));
        assert_eq!(first, KeyResult::Pending(vec![("g g".parse().unwrap(), Action::SelectFirst)]));
        assert_eq!(keymap.feed(&mut pending, Context::Board, key("g")), KeyResult::Matched(Action::SelectFirst));
        assert!(pending.is_empty());
        keymap.feed(&mut pending, Context::Board, key("g"));
        assert_eq!(keymap.feed(&mut pending, Context::Board, key("esc")), KeyResult::Cancelled);
        assert!(pending.is_empty());
        keymap.feed(&mut pending, Context::Board, key("g"));
        assert_eq!(keymap.feed(&mut pending, Context::Board, key("x")), KeyResult::NotFound);
        assert!(pending.is_empty());
        // Global bindings reach the board, but not a prompt.
        assert_eq!(keymap.feed(&mut pending, Context::Board, key("q")), KeyResult::Matched(Action::Quit));
        assert_eq!(keymap.feed(&mut pending, Context::Prompt, key("q")), KeyResult::NotFound);
    }

    #[test]
    fn a_context_binding_overrides_the_global_one() {
        let keymap = map("[global]\nq = \"quit\"\n[board]\nq = \"filter-band\"\n");
        let mut pending = Vec::new();
        assert_eq!(keymap.feed(&mut pending, Context::Board, key("q")), KeyResult::Matched(Action::FilterBand));
        assert_eq!(keymap.feed(&mut pending, Context::Walk, key("q")), KeyResult::Matched(Action::Quit));
    }

    #[test]
    fn overrides_merge_key_by_key_and_none_unbinds() {
        let base = map("[board]\nj = \"select-next\"\nk = \"select-previous\"\ng = \"select-first\"\n");
        let merged = base
            .with_overrides("[board]\nj = \"select-previous\"\ng = \"none\"\n\"g g\" = \"select-first\"\n", "mine.toml")
            .unwrap();
        assert_eq!(merged.chords_for(Context::Board, Action::SelectPrevious).len(), 2);
        assert!(merged.chords_for(Context::Board, Action::SelectNext).is_empty());
        let first = merged.chords_for(Context::Board, Action::SelectFirst);
        assert_eq!(first.iter().map(ToString::to_string).collect::<Vec<_>>(), ["g g"]);
        let origin = &merged.own(Context::Board).find(|b| b.action == Action::SelectFirst).unwrap().origin;
        assert_eq!(origin.to_string(), "mine.toml:4");
    }

    fn errors(text: &str) -> Vec<String> {
        Keymap::from_toml(text, "bad.toml").unwrap_err().0.iter().map(ToString::to_string).collect()
    }

    #[test]
    fn each_mistake_is_reported_with_its_line() {
        assert_eq!(
            errors("[board]\nj = \"select-nxt\"\n"),
            ["bad.toml:2: in [board], 'j': no action named 'select-nxt' (did you mean 'select-next'?)"]
        );
        assert_eq!(
            errors("[boad]\nj = \"select-next\"\n"),
            [
                "bad.toml:1: unknown context 'boad' (contexts: global, board, walk, tank, whatif, summary, pick, prompt, confirm)"
            ]
        );
        assert_eq!(errors("\n[board]\n\"ctl-x\" = \"quit\"\n")[0].split(':').nth(1), Some("3"));
        assert_eq!(
            errors("[board]\ng = \"select-first\"\n\"g g\" = \"select-last\"\n"),
            [
                "bad.toml:3: in [board], 'g g' can never be typed: 'g' is bound to 'select-first' in [board] (bad.toml:2)"
            ]
        );
        assert_eq!(
            errors("[global]\ng = \"quit\"\n[board]\n\"g g\" = \"select-last\"\n"),
            ["bad.toml:4: in [board], 'g g' can never be typed: 'g' is bound to 'quit' in [global] (bad.toml:2)"]
        );
        assert_eq!(
            errors("[walk]\n\"1\" = \"save-and-next\"\n"),
            ["bad.toml:2: in [walk], '1' types into the field in [walk] and cannot be bound"]
        );
        assert_eq!(
            errors("[board]\n\"s\" = \"save-and-next\"\n"),
            ["bad.toml:2: in [board], 'save-and-next' does nothing on this screen (it works in: walk)"]
        );
        assert_eq!(
            errors("[board]\ndown = \"select-next\"\nDown = \"select-next\"\n"),
            ["bad.toml:3: in [board], 'Down' is the same key as 'down' on line 2"]
        );
        assert_eq!(errors("[board]\nj = 3\n")[0].split(':').nth(1), Some("2"));
    }

    #[test]
    fn all_errors_are_collected() {
        let found = errors("[board]\nj = \"nope\"\n\"ctl-x\" = \"quit\"\n");
        assert_eq!(found.len(), 2, "{found:?}");
    }
}
