//! Help built from the live keymap: the overlay, the footer hints and
//! `tankwalk keymap show` all read [`help_rows`], so a remapped key shows up
//! everywhere and no list of keys is written by hand.

use ratatui::buffer::Buffer;
use ratatui::layout::{Constraint, Rect};
use ratatui::style::{Modifier, Style};
use ratatui::text::Line;
use ratatui::widgets::{Block, BorderType, Cell, Clear, Row, Table, Widget};

use super::action::Action;
use super::keymap::{Context, KeyChord, Keymap, TextInput};

/// One line of help: an action and every key sequence that triggers it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct HelpRow {
    /// The action.
    pub action: Action,
    /// Its key sequences in this context, in file order.
    pub chords: Vec<KeyChord>,
}

impl HelpRow {
    /// The keys as written in keymap files, joined: `"down, j"`.
    pub fn keys(&self) -> String {
        self.chords.iter().map(ToString::to_string).collect::<Vec<_>>().join(", ")
    }

    /// What the action does.
    pub fn doc(&self) -> &'static str {
        self.action.doc()
    }
}

/// The live bindings of `context` (its own and the global ones it inherits),
/// one row per action in [`Action::ALL`] order; unbound actions are left out.
pub fn help_rows(keymap: &Keymap, context: Context) -> Vec<HelpRow> {
    Action::ALL
        .iter()
        .filter_map(|&action| {
            let chords: Vec<KeyChord> = keymap.chords_for(context, action).into_iter().cloned().collect();
            (!chords.is_empty()).then_some(HelpRow { action, chords })
        })
        .collect()
}

/// The rows of `context`'s own table only (for `keymap show` without a context).
pub fn own_rows(keymap: &Keymap, context: Context) -> Vec<HelpRow> {
    Action::ALL
        .iter()
        .filter_map(|&action| {
            let chords: Vec<KeyChord> =
                keymap.own(context).filter(|b| b.action == action).map(|b| b.chord.clone()).collect();
            (!chords.is_empty()).then_some(HelpRow { action, chords })
        })
        .collect()
}

/// What typing plain characters does in `context`, as a help line, when they type.
pub fn text_input_note(context: Context) -> Option<(&'static str, &'static str)> {
    match context.text_input() {
        TextInput::None => None,
        TextInput::Number => Some(("0-9 . ,", "Type the number (a comma counts as a point)")),
        TextInput::Free => Some(("letters", "Type the text")),
    }
}

/// Every context's own keys as a Markdown page (`docs/keys.md` is this, for
/// the built-in keymap; a test keeps it current).
pub fn keys_markdown(keymap: &Keymap) -> String {
    use std::fmt::Write as _;
    let mut page = String::from(
        "# Keys\n\nGenerated from `keymaps/default.toml` by the tests (`TANKWALK_WRITE_DOCS=1 cargo test --test \
         keymaps` rewrites it). `tankwalk keymap show` prints the keys in use, your own file included.\n",
    );
    for &context in Context::ALL {
        let _ = write!(page, "\n## {} (`[{}]`)\n\n", context.title(), context.name());
        if context.inherits_global() && context != Context::Global {
            page.push_str("The keys of `[global]` work here too, unless this table uses the same key.\n\n");
        }
        page.push_str("| keys | action | does |\n|---|---|---|\n");
        if let Some((keys, doc)) = text_input_note(context) {
            let _ = writeln!(page, "| {keys} | | {doc} |");
        }
        for row in own_rows(keymap, context) {
            let keys: Vec<String> = row.chords.iter().map(|c| format!("`{c}`")).collect();
            let _ =
                writeln!(page, "| {} | `{}` | {} |", keys.join(", ").replace('|', "\\|"), row.action.name(), row.doc());
        }
    }
    page
}

/// A footer hint: the first key of an action and its short label.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Hint {
    /// The first key sequence bound to the action.
    pub keys: String,
    /// A word or two.
    pub label: &'static str,
}

/// Footer hints for the `wanted` actions that have a key in `context`, in the
/// order asked for.
pub fn footer_hints(keymap: &Keymap, context: Context, wanted: &[Action]) -> Vec<Hint> {
    wanted
        .iter()
        .filter_map(|&action| {
            keymap
                .chords_for(context, action)
                .first()
                .map(|chord| Hint { keys: chord.to_string(), label: action.short() })
        })
        .collect()
}

const SCROLL_DOWN: &[Action] = &[Action::SelectNext, Action::NextField, Action::PageDown];
const SCROLL_UP: &[Action] = &[Action::SelectPrevious, Action::PreviousField, Action::PageUp];

/// How an action moves the help overlay while it is open: +1 down, -1 up.
pub fn scroll_action(action: Action) -> Option<i8> {
    if SCROLL_DOWN.contains(&action) {
        Some(1)
    } else if SCROLL_UP.contains(&action) {
        Some(-1)
    } else {
        None
    }
}

/// The help overlay: a box in the middle of the screen listing the live keys
/// of a context. `scroll` skips that many rows when they do not all fit.
#[derive(Debug, Clone)]
pub struct HelpOverlay<'a> {
    /// The keymap in use.
    pub keymap: &'a Keymap,
    /// The screen whose keys are shown.
    pub context: Context,
    /// Rows skipped at the top.
    pub scroll: usize,
}

impl HelpOverlay<'_> {
    /// Every line the overlay can show, text input first.
    fn lines(&self) -> Vec<(String, &'static str)> {
        let mut lines: Vec<(String, &'static str)> = Vec::new();
        if let Some((keys, doc)) = text_input_note(self.context) {
            lines.push((keys.to_string(), doc));
        }
        lines.extend(help_rows(self.keymap, self.context).into_iter().map(|row| (row.keys(), row.doc())));
        lines
    }

    /// "? or esc closes", from the keys bound to toggle-help and back.
    fn closing_keys(&self) -> String {
        let keys: Vec<String> = [Action::ToggleHelp, Action::Back]
            .iter()
            .filter_map(|a| self.keymap.chords_for(self.context, *a).first().map(ToString::to_string))
            .collect();
        if keys.is_empty() { "any key closes".to_string() } else { format!("{} closes", keys.join(" or ")) }
    }

    /// The first keys that scroll the overlay down and up (see [`scroll_action`]).
    fn scroll_keys(&self) -> Option<(String, String)> {
        // Arrows read best when they are bound; otherwise the first key found.
        let pick = |actions: &[Action], arrow: &str| {
            let chords: Vec<String> = actions
                .iter()
                .flat_map(|a| self.keymap.chords_for(self.context, *a))
                .map(ToString::to_string)
                .collect();
            chords.iter().find(|c| *c == arrow).or(chords.first()).cloned()
        };
        Some((pick(SCROLL_DOWN, "down")?, pick(SCROLL_UP, "up")?))
    }

    /// The largest useful scroll for an overlay drawn in `area`.
    pub fn max_scroll(&self, area: Rect) -> usize {
        let visible = usize::from(self.box_area(area).height.saturating_sub(3));
        self.lines().len().saturating_sub(visible)
    }

    fn box_area(&self, area: Rect) -> Rect {
        let wanted = u16::try_from(self.lines().len() + 3).unwrap_or(u16::MAX);
        let width = area.width.saturating_sub(4).min(84);
        let height = area.height.saturating_sub(2).min(wanted);
        Rect { x: area.x + (area.width - width) / 2, y: area.y + (area.height - height) / 2, width, height }
    }
}

impl Widget for &HelpOverlay<'_> {
    fn render(self, area: Rect, buf: &mut Buffer) {
        let area = self.box_area(area.intersection(buf.area));
        if area.width < 10 || area.height < 4 {
            return;
        }
        Clear.render(area, buf);
        let lines = self.lines();
        let visible = usize::from(area.height.saturating_sub(3));
        let scroll = self.scroll.min(lines.len().saturating_sub(visible));
        let more_below = lines.len() > scroll + visible;
        let title =
            Line::from(format!(" Keys · {} ", self.context.title())).style(Style::new().add_modifier(Modifier::BOLD));
        let closes = self.closing_keys();
        let footer = match (scroll > 0 || more_below, self.scroll_keys()) {
            (true, Some((down, up))) => format!(
                " {down}/{up}: more ({}–{} of {}) · {closes} ",
                scroll + 1,
                (scroll + visible).min(lines.len()),
                lines.len()
            ),
            (true, None) => {
                format!(" {}–{} of {} · {closes} ", scroll + 1, (scroll + visible).min(lines.len()), lines.len())
            }
            (false, _) => format!(" {closes} "),
        };
        let block = Block::bordered().border_type(BorderType::Plain).title_top(title).title_bottom(Line::from(footer));
        let key_width = lines.iter().map(|(k, _)| k.chars().count()).max().unwrap_or(0).min(24);
        let rows = lines
            .iter()
            .skip(scroll)
            .take(visible)
            .map(|(keys, doc)| Row::new([Cell::from(keys.as_str()), Cell::from(*doc)]));
        let key_width = u16::try_from(key_width).unwrap_or(24);
        let table = Table::new(rows, [Constraint::Length(key_width), Constraint::Fill(1)])
            .column_spacing(2)
            .header(Row::new(["key", "does"]).style(Style::new().add_modifier(Modifier::UNDERLINED)))
            .block(block);
        Widget::render(table, area, buf);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_follow_action_order_and_group_keys() {
        let keymap = Keymap::from_toml(
            "[global]\nq = \"quit\"\n\"?\" = \"toggle-help\"\n[board]\nj = \"select-next\"\ndown = \"select-next\"\n",
            "t.toml",
        )
        .unwrap();
        let rows = help_rows(&keymap, Context::Board);
        let listed: Vec<(&str, String)> = rows.iter().map(|r| (r.action.name(), r.keys())).collect();
        assert_eq!(
            listed,
            [("toggle-help", "?".to_string()), ("quit", "q".to_string()), ("select-next", "j, down".to_string())]
        );
        assert_eq!(own_rows(&keymap, Context::Board).len(), 1);
    }

    #[test]
    fn footer_hints_use_the_first_key_and_skip_unbound_actions() {
        let keymap = Keymap::from_toml("[walk]\nenter = \"next-field\"\ntab = \"next-field\"\n", "t.toml").unwrap();
        let hints = footer_hints(&keymap, Context::Walk, &[Action::NextField, Action::SaveAndNext]);
        assert_eq!(hints, [Hint { keys: "enter".into(), label: "next field" }]);
    }

    #[test]
    fn overlay_never_panics_on_small_areas() {
        let keymap = Keymap::default_map();
        for w in 0..=12 {
            for h in 0..=6 {
                let mut buf = Buffer::empty(Rect::new(0, 0, w, h));
                let overlay = HelpOverlay { keymap: &keymap, context: Context::Walk, scroll: 99 };
                (&overlay).render(buf.area, &mut buf);
            }
        }
    }
}
