//! Pure water-chemistry computation: no I/O, no clock, no allocation.
//!
//! Every function documents its equation, its valid range and its source.
//! Callers outside this module validate readings with [`limits`] first; the
//! equations themselves return a number for any finite input so that the
//! screen can update on every key press without a `Result` in the hot path.

pub mod ammonia;
pub mod band;
pub mod dilution;
pub mod epa2013;
pub mod limits;
pub mod oxygen;
pub mod salinity;
pub mod sample;
pub mod units;

pub use ammonia::{AmmoniaInputs, ToxicAmmonia, toxic_ammonia};
pub use band::{Band, BandEdges};
