//! Assessment: from a reading and what is known of the tank to a band, the
//! latent risk, a trend, the biofilter's state and an ordered list of actions,
//! each with its quantity and its reason. Pure: inputs in, assessment out.

pub mod action;
pub mod assess;
pub mod biofilter;
pub mod latent;
pub mod trend;
pub mod water_change;
pub mod what_if;

pub use action::{Action, ActionKind, Warning, WarningKind};
pub use assess::{Assessment, Inputs, PastReading, RulesConfig, assess};
pub use biofilter::{Biofilter, DatedEvent};
