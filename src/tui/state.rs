//! The screen's state and its pure update: no terminal, no store, no clock.
//!
//! Parts built so far:
//! - [`field`]: numbers typed into fields, checked on every key;
//! - [`whatif`]: the what-if panel.

pub mod field;
pub mod whatif;
