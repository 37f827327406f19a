//! The facility model (one room's species profiles, shared systems and tanks,
//! read from a TOML facility file, `docs/facility-format.md`) and the records
//! of what happens in it (readings, events, corrections).
//!
//! Parsing takes text and returns every problem it finds, each located by
//! file, line and column; reading the file is the thin [`Facility::load`].
//! Nothing here reads the clock: the caller passes today's date where a check
//! needs it.

pub mod facility;
pub mod id;
mod load;
pub mod problem;
mod raw;
pub mod record;
pub mod species;
mod validate;
mod write;

pub use facility::{
    DEFAULT_OPTIONAL_FIELDS, DEFAULT_OPTIONAL_FIELDS_SALT, DEFAULT_READING_FIELDS, DEFAULT_ROUND_INTERVAL_HOURS,
    Facility, FieldOrder, ReadingField, Room, RoundOrder, SourceWater, System, Tank, TemperatureUnit, VolumeUnit,
};
pub use id::{Id, IdError};
pub use load::Checked;
pub use problem::{FacilityErrors, LoadError, Problem, Severity};
pub use species::{Bounds, EdgesOrigin, EffectiveProfile, SpeciesProfile, WaterType};
