//! Prompts, questions and pick lists, drawn over the screen.

use ratatui::Frame;
use ratatui::layout::Rect;
use ratatui::text::{Line, Span};
use ratatui::widgets::{Block, Clear, Paragraph, Wrap};

use super::{SELECTED, Theme, UNSELECTED, centered, key_of};
use crate::tui::action::Action;
use crate::tui::keymap::{Context, Keymap};
use crate::tui::state::modal::{Modal, PromptInput};

fn keys_line(theme: Theme, keymap: &Keymap, context: Context, yes: &str, no: &str) -> Line<'static> {
    Line::from(vec![
        Span::styled(key_of(keymap, context, Action::Confirm), theme.key()),
        Span::raw(format!(" {yes} · ")),
        Span::styled(key_of(keymap, context, Action::Cancel), theme.key()),
        Span::raw(format!(" {no}")),
    ])
}

pub(super) fn render(modal: &Modal, theme: Theme, keymap: &Keymap, frame: &mut Frame, area: Rect) {
    let (title, lines): (String, Vec<Line>) = match modal {
        Modal::Prompt(prompt) => {
            let width = usize::from(area.width.min(70).saturating_sub(6));
            let text = match &prompt.input {
                PromptInput::Text(text) => text.clone(),
                PromptInput::Number(field) => {
                    let unit = field.kind.unit();
                    if unit.is_empty() { field.text.clone() } else { format!("{}  {unit}", field.text) }
                }
            };
            // Show the end of a long line, where the typing is.
            let chars: Vec<char> = text.chars().collect();
            let visible: String = chars[chars.len().saturating_sub(width.saturating_sub(1))..].iter().collect();
            let error = match &prompt.input {
                PromptInput::Number(field) => field.refused.clone().or(field.error().map(ToString::to_string)),
                PromptInput::Text(_) => None,
            }
            .or(prompt.error.clone());
            let mut lines =
                vec![Line::from(vec![Span::raw("> "), Span::styled(format!("{visible}▏"), theme.heading())])];
            lines.push(match error {
                Some(e) => Line::styled(format!("✗ {e}"), theme.error()),
                None if prompt.optional => Line::styled("(may be left empty)", theme.dim()),
                None => Line::raw(""),
            });
            lines.push(keys_line(theme, keymap, Context::Prompt, "accept", "cancel"));
            (prompt.title.clone(), lines)
        }
        Modal::Confirm(confirm) => (
            "Please answer".to_string(),
            vec![
                Line::raw(confirm.question.clone()),
                Line::raw(""),
                keys_line(theme, keymap, Context::Confirm, "yes", "no"),
            ],
        ),
        Modal::Pick(pick) => {
            let mut lines: Vec<Line> = pick
                .items
                .iter()
                .enumerate()
                .map(|(i, item)| {
                    let selected = i == pick.selected;
                    let line = Line::raw(format!("{}{item}", if selected { SELECTED } else { UNSELECTED }));
                    if selected { line.style(theme.selected()) } else { line }
                })
                .collect();
            lines.push(keys_line(theme, keymap, Context::Pick, "choose", "cancel"));
            (pick.title.clone(), lines)
        }
    };
    let height = u16::try_from(lines.len() + 2).unwrap_or(u16::MAX).max(5);
    let width = u16::try_from(lines.iter().map(Line::width).chain([title.chars().count() + 4]).max().unwrap_or(40) + 4)
        .unwrap_or(u16::MAX)
        .clamp(40, 76);
    let rect = centered(area, width, height + 1);
    frame.render_widget(Clear, rect);
    let block = Block::bordered().title(format!(" {title} "));
    let inner = block.inner(rect);
    frame.render_widget(block, rect);
    frame.render_widget(Paragraph::new(lines).wrap(Wrap { trim: false }), inner);
}
