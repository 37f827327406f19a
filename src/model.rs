//! The facility and what happens in it: records of readings, events and corrections.

pub mod record;
