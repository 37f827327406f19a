//! The terminal screen: keymaps and actions, pure state and update, views, and
//! the one loop that touches the terminal and the store.
//!
//! - [`action`]: every action, declared once with its name and help text;
//! - [`keymap`]: keys, key sequences, keymap files and the pure key lookup;
//! - [`help`]: help rows built from the live keymap (overlay, footer, `keymap show`);
//! - [`state`]: the pure state and update of every screen;
//! - [`view`]: drawing, which only reads the state;
//! - [`terminal`]: entering and leaving the terminal safely;
//! - [`run`]: the loop, the only code that touches the terminal and the store.

pub mod action;
pub mod help;
pub mod keymap;
pub mod run;
pub mod state;
pub mod terminal;
pub mod view;

pub use action::Action;
pub use keymap::{Context, Key, KeyChord, KeyResult, Keymap};
