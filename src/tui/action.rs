//! Every action a key can trigger, declared once with its name and its help text.
//!
//! The name is what keymap files use (`"s" = "save-and-next"`); the doc is what
//! the help overlay, the footer and `tankwalk keymap show` print. The order of
//! declaration is the order of the help rows.

use std::fmt;
use std::str::FromStr;

/// Declares [`Action`] with a kebab-case name and a one-line doc per variant.
macro_rules! actions {
    ($($variant:ident => $name:literal, $short:literal, $doc:literal;)*) => {
        /// Something a person can ask of the screen; keys map to these through a keymap.
        #[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
        pub enum Action {
            $(#[doc = $doc] $variant,)*
        }

        impl Action {
            /// Every action, in help order.
            pub const ALL: &'static [Action] = &[$(Action::$variant),*];

            /// The kebab-case name used in keymap files.
            pub fn name(self) -> &'static str {
                match self { $(Action::$variant => $name,)* }
            }

            /// One line saying what the action does.
            pub fn doc(self) -> &'static str {
                match self { $(Action::$variant => $doc,)* }
            }

            /// A word or two for the footer hints.
            pub fn short(self) -> &'static str {
                match self { $(Action::$variant => $short,)* }
            }
        }
    };
}

actions! {
    // Everywhere.
    ToggleHelp => "toggle-help", "help", "Show or hide the keys of this screen";
    Quit => "quit", "quit", "Leave tankwalk (asks first if an entry is unsaved)";
    Back => "back", "back", "Go back: close, clear the filter, or to the board";
    // Walk: entry fields.
    NextField => "next-field", "next field", "Keep what was typed and go to the next field";
    PreviousField => "previous-field", "prev field", "Go to the previous field";
    KeepPrevious => "keep-previous", "same as last", "Take the last reading's value and go on";
    Erase => "erase", "erase", "Delete the last character typed";
    ClearField => "clear-field", "clear", "Empty the field";
    // Walk: the tank.
    SaveAndNext => "save-and-next", "save+next", "Save (on disk before it says so), go to next tank";
    SkipTank => "skip-tank", "skip", "Skip this tank, with a reason";
    NextTank => "next-tank", "next tank", "Go to the next tank without saving";
    PreviousTank => "previous-tank", "prev tank", "Go to the previous tank (a saved one: correct it)";
    ToggleGasping => "toggle-gasping", "gasping", "Seen: fish gasping at the surface";
    ToggleHyperactive => "toggle-hyperactive", "hyperactive", "Seen: fish hyperactive or darting";
    ToggleNervous => "toggle-nervous", "nervous", "Seen: nervous signs (balance lost, spinning)";
    ToggleCloudyEyes => "toggle-cloudy-eyes", "cloudy eyes", "Seen: cloudy eyes";
    ToggleMucus => "toggle-mucus", "mucus", "Seen: excess mucus on skin or gills";
    SetDeaths => "set-deaths", "deaths", "Seen: number of dead fish found";
    EditNote => "edit-note", "note", "Write a note with the reading";
    // Lists: board, history, summary, pickers.
    SelectNext => "select-next", "down", "Move down";
    SelectPrevious => "select-previous", "up", "Move up";
    SelectFirst => "select-first", "top", "Move to the top";
    SelectLast => "select-last", "bottom", "Move to the bottom";
    PageDown => "page-down", "page down", "Move down one page";
    PageUp => "page-up", "page up", "Move up one page";
    // Board and between screens.
    StartWalk => "start-walk", "walk", "Walk the round from the first tank not done";
    FilterText => "filter-text", "find", "Show tanks whose label, species or system has a text";
    FilterBand => "filter-band", "band filter", "Show tanks at a band or worse (watch, act, critical)";
    OpenTank => "open-tank", "tank page", "Open the tank page: history, charts, events";
    OpenWhatIf => "open-whatif", "what-if", "What if pH, temperature, salt or a water change";
    ShowSummary => "show-summary", "summary", "Round summary: done, skipped, missed, actions";
    // Tank page.
    NextRange => "next-range", "longer", "Chart a longer period (7, 30, 90 days)";
    PreviousRange => "previous-range", "shorter", "Chart a shorter period (90, 30, 7 days)";
    NextChart => "next-chart", "next chart", "Chart the next quantity";
    AddEvent => "add-event", "add event", "Record an event: water change, medication and more";
    // What-if panel.
    Increase => "increase", "+", "Raise the value one step";
    Decrease => "decrease", "-", "Lower the value one step";
    ResetWhatIf => "reset-whatif", "reset", "Put every value back to the reading's";
    // Round summary.
    Export => "export", "export", "Export the records (JSON Lines and CSV)";
    Sync => "sync", "sync", "Sync with the other laptops through the shared folder";
    WriteReport => "write-report", "report", "Write the round report (HTML) for the lead or a vet";
    // Prompts and questions.
    Confirm => "confirm", "yes", "Yes / accept";
    Cancel => "cancel", "no", "No / cancel";
}

impl fmt::Display for Action {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// A name that is not an action, with the closest names as suggestions.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("no action named '{name}'{}", did_you_mean(.suggestions))]
pub struct UnknownAction {
    /// The name as written.
    pub name: String,
    /// Actions with a similar name, closest first (at most three).
    pub suggestions: Vec<&'static str>,
}

fn did_you_mean(suggestions: &[&str]) -> String {
    match suggestions {
        [] => " (`tankwalk keymap show` lists them all)".to_string(),
        [one] => format!(" (did you mean '{one}'?)"),
        many => {
            let quoted: Vec<String> = many.iter().map(|s| format!("'{s}'")).collect();
            format!(" (did you mean one of {}?)", quoted.join(", "))
        }
    }
}

impl FromStr for Action {
    type Err = UnknownAction;

    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let wanted = s.trim();
        if let Some(action) = Action::ALL.iter().find(|a| a.name() == wanted) {
            return Ok(*action);
        }
        Err(UnknownAction { name: wanted.to_string(), suggestions: closest_names(wanted) })
    }
}

/// Up to three action names that look like `wanted`: the nearest by edit
/// distance when one is close, otherwise those sharing a word with it.
fn closest_names(wanted: &str) -> Vec<&'static str> {
    let lower = wanted.to_ascii_lowercase().replace(['_', ' '], "-");
    let names = Action::ALL.iter().map(|a| a.name());
    let distances: Vec<(usize, &'static str)> = names.clone().map(|n| (strsim::levenshtein(&lower, n), n)).collect();
    let nearest = distances.iter().map(|(d, _)| *d).min().unwrap_or(usize::MAX);
    if nearest <= 2 {
        return distances.into_iter().filter(|(d, _)| *d == nearest).map(|(_, n)| n).take(3).collect();
    }
    let sharing: Vec<&'static str> = names
        .clone()
        .filter(|name| name.split('-').any(|w| w.len() >= 3 && lower.split('-').any(|l| l == w)))
        .take(3)
        .collect();
    if !sharing.is_empty() {
        return sharing;
    }
    names.filter(|name| strsim::jaro_winkler(&lower, name) >= 0.85).take(1).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_name_parses_back_to_its_action() {
        for action in Action::ALL {
            assert_eq!(action.name().parse::<Action>(), Ok(*action));
            assert_eq!(action.to_string(), action.name());
        }
    }

    #[test]
    fn names_are_unique_kebab_case_and_documented() {
        let mut seen = std::collections::HashSet::new();
        for action in Action::ALL {
            let name = action.name();
            assert!(seen.insert(name), "duplicate name {name}");
            assert!(name.chars().all(|c| c.is_ascii_lowercase() || c == '-'), "{name}");
            assert!(!name.starts_with('-') && !name.ends_with('-') && !name.contains("--"), "{name}");
            assert!(!action.doc().is_empty() && !action.doc().ends_with('.'), "{name}");
            assert!(!action.short().is_empty() && action.short().len() <= 12, "{name}");
            // Docs fit the help overlay at 80 columns.
            assert!(action.doc().chars().count() <= 54, "{name}: doc too long for 80 columns");
        }
    }

    #[test]
    fn unknown_names_suggest_close_ones() {
        let err = "save-and-nxt".parse::<Action>().unwrap_err();
        assert_eq!(err.suggestions.first(), Some(&"save-and-next"));
        assert_eq!(err.to_string(), "no action named 'save-and-nxt' (did you mean 'save-and-next'?)");

        let err = "Quit".parse::<Action>().unwrap_err();
        assert_eq!(err.suggestions.first(), Some(&"quit"));

        let err = "save".parse::<Action>().unwrap_err();
        assert_eq!(err.suggestions, ["save-and-next"]);

        let err = "frobnicate".parse::<Action>().unwrap_err();
        assert!(err.suggestions.is_empty());
        assert!(err.to_string().contains("keymap show"), "{err}");
    }
}
