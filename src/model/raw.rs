//! The shapes of a facility file as written, every value with its place in the
//! text, before any check. Enumerations are read as text so that a wrong word
//! gets a message listing the right ones.

use serde::Deserialize;
use serde::de::{self, Deserializer, SeqAccess, Visitor};
use toml::Spanned;

/// `[room]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawRoom {
    pub name: Spanned<String>,
    pub elevation_m: Option<Spanned<f64>>,
    pub kit_basis: Option<Spanned<String>>,
    pub temperature_unit: Option<Spanned<String>>,
    pub volume_unit: Option<Spanned<String>>,
    pub round_order: Option<Spanned<OneOrMany>>,
    pub round_interval_hours: Option<Spanned<u32>>,
    pub reading_fields: Option<Spanned<Vec<Spanned<String>>>>,
    pub optional_fields: Option<Spanned<Vec<Spanned<String>>>>,
    pub source_water: Option<Spanned<RawSourceWater>>,
    #[serde(default)]
    pub notes: String,
}

/// `[room.source_water]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawSourceWater {
    pub ph: Option<Spanned<f64>>,
    pub tan_n_mg_l: Option<Spanned<f64>>,
    pub tan_mg_l: Option<Spanned<f64>>,
    pub temp_c: Option<Spanned<f64>>,
    pub temp_f: Option<Spanned<f64>>,
    #[serde(default)]
    pub chloramine: bool,
    #[serde(default)]
    pub note: String,
}

/// One `[[species]]` entry.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawSpecies {
    pub key: Spanned<String>,
    pub name: Spanned<String>,
    pub water_type: Spanned<String>,
    pub temp_c: Option<Spanned<Vec<Spanned<f64>>>>,
    pub temp_f: Option<Spanned<Vec<Spanned<f64>>>>,
    pub ph: Spanned<Vec<Spanned<f64>>>,
    pub salt_tolerance_g_l: Option<Spanned<f64>>,
    pub band_edges: Option<Spanned<RawBandEdges>>,
    #[serde(default)]
    pub notes: String,
}

/// `band_edges = { basis = "nh3-n", watch = .., act = .., critical = .. }`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawBandEdges {
    pub basis: Spanned<String>,
    pub watch: Spanned<f64>,
    pub act: Spanned<f64>,
    pub critical: Spanned<f64>,
}

/// One `[[systems]]` entry.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawSystem {
    pub id: Spanned<String>,
    pub name: Option<Spanned<String>>,
    pub volume_l: Option<Spanned<f64>>,
    pub volume_gal: Option<Spanned<f64>>,
    pub water_type: Spanned<String>,
    pub salinity_g_l: Option<Spanned<f64>>,
    #[serde(default)]
    pub tanks: Vec<Spanned<String>>,
    #[serde(default)]
    pub notes: String,
}

/// One `[[tanks]]` entry.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub(super) struct RawTank {
    pub id: Spanned<String>,
    pub volume_l: Option<Spanned<f64>>,
    pub volume_gal: Option<Spanned<f64>>,
    pub system: Option<Spanned<String>>,
    pub water_type: Option<Spanned<String>>,
    pub salinity_g_l: Option<Spanned<f64>>,
    pub species: Option<Spanned<OneOrMany>>,
    #[serde(default)]
    pub stock_count: Option<Spanned<u32>>,
    pub set_up: Spanned<toml::Value>,
    #[serde(default)]
    pub notes: String,
}

/// A value written either as one string or as a list of strings
/// (`species = "guppy"` or `species = ["guppy", "ancistrus"]`).
#[derive(Debug)]
pub(super) enum OneOrMany {
    One(String),
    Many(Vec<Spanned<String>>),
}

impl<'de> Deserialize<'de> for OneOrMany {
    fn deserialize<D: Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
        struct OneOrManyVisitor;
        impl<'de> Visitor<'de> for OneOrManyVisitor {
            type Value = OneOrMany;
            fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
                f.write_str("a string or a list of strings")
            }
            fn visit_str<E: de::Error>(self, v: &str) -> Result<OneOrMany, E> {
                Ok(OneOrMany::One(v.to_string()))
            }
            fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<OneOrMany, A::Error> {
                let mut items = Vec::new();
                while let Some(item) = seq.next_element::<Spanned<String>>()? {
                    items.push(item);
                }
                Ok(OneOrMany::Many(items))
            }
        }
        deserializer.deserialize_any(OneOrManyVisitor)
    }
}
