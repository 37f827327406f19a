//! tankwalk: morning water checks for rooms of fish tanks.
//!
//! The crate is layered so that dependencies point inward:
//!
//! - [`core`]: pure water chemistry (no I/O, no clock);
//! - [`model`]: the facility (room, species profiles, systems, tanks), parsed
//!   and validated from its TOML file, and the records of readings, events and
//!   corrections;
//! - [`rules`]: the assessment (band, latent risk, trend, biofilter, actions),
//!   pure: inputs in, assessment out;
//! - [`store`]: durable storage of records (journal + sled);
//! - [`exchange`]: export, import and sync of records between laptops through files;
//! - [`timeline`]: a tank's stored history, ready for the assessment;
//! - [`report`]: the round report (data, text, Markdown, HTML with SVG charts, JSON);
//! - [`tui`]: the terminal screen (keymaps, pure state and update, views);
//!
//! The command line (`src/cli.rs`, in the binary) is the only place that
//! prints, and the only place that uses `anyhow`.
//!
//! Everything tankwalk advises is guidance: see [`CAUTION`].

pub mod core;
pub mod demo;
pub mod exchange;
pub mod model;
pub mod numfmt;
pub mod paths;
pub mod report;
pub mod rules;
pub mod store;
pub mod text;
pub mod timeline;
pub mod tui;

/// The caution shown with every assessment.
pub const CAUTION: &str = "Guidance only, not veterinary advice. Local rules and licensed practice govern \
water disposal and medication; for sick or dying fish, call an aquatic veterinarian.";

/// How pH readings are interpreted, stated wherever NH3 is shown.
pub const PH_CONVENTION: &str = "NBS-buffer glass-electrode or kit reading";
