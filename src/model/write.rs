//! Writing a facility back to TOML, in canonical units (litres, °C, NH3-N):
//! what [`Facility::to_toml_string`] writes, [`Facility::parse`] reads back
//! to an equal facility.

use serde::Serialize;

use super::facility::{Facility, ReadingField, RoundOrder, TemperatureUnit, VolumeUnit};
use super::species::WaterType;

#[derive(Serialize)]
struct OutFile<'a> {
    room: OutRoom<'a>,
    species: Vec<OutSpecies<'a>>,
    systems: Vec<OutSystem<'a>>,
    tanks: Vec<OutTank<'a>>,
}

#[derive(Serialize)]
struct OutRoom<'a> {
    name: &'a str,
    elevation_m: f64,
    kit_basis: &'static str,
    temperature_unit: &'static str,
    volume_unit: &'static str,
    round_order: OutRoundOrder<'a>,
    round_interval_hours: u32,
    #[serde(skip_serializing_if = "Option::is_none")]
    reading_fields: Option<Vec<&'static str>>,
    #[serde(skip_serializing_if = "Option::is_none")]
    optional_fields: Option<Vec<&'static str>>,
    #[serde(skip_serializing_if = "str::is_empty")]
    notes: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    source_water: Option<OutSourceWater<'a>>,
}

#[derive(Serialize)]
#[serde(untagged)]
enum OutRoundOrder<'a> {
    Word(&'static str),
    Ids(Vec<&'a str>),
}

#[derive(Serialize)]
struct OutSourceWater<'a> {
    #[serde(skip_serializing_if = "Option::is_none")]
    ph: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    tan_n_mg_l: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    temp_c: Option<f64>,
    chloramine: bool,
    #[serde(skip_serializing_if = "str::is_empty")]
    note: &'a str,
}

#[derive(Serialize)]
struct OutSpecies<'a> {
    key: &'a str,
    name: &'a str,
    water_type: &'static str,
    temp_c: [f64; 2],
    ph: [f64; 2],
    salt_tolerance_g_l: f64,
    #[serde(skip_serializing_if = "str::is_empty")]
    notes: &'a str,
    #[serde(skip_serializing_if = "Option::is_none")]
    band_edges: Option<OutEdges>,
}

#[derive(Serialize)]
struct OutEdges {
    basis: &'static str,
    watch: f64,
    act: f64,
    critical: f64,
}

#[derive(Serialize)]
struct OutSystem<'a> {
    id: &'a str,
    name: &'a str,
    volume_l: f64,
    water_type: &'static str,
    salinity_g_l: f64,
    tanks: Vec<&'a str>,
    #[serde(skip_serializing_if = "str::is_empty")]
    notes: &'a str,
}

#[derive(Serialize)]
struct OutTank<'a> {
    id: &'a str,
    volume_l: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    system: Option<&'a str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    water_type: Option<&'static str>,
    #[serde(skip_serializing_if = "Option::is_none")]
    salinity_g_l: Option<f64>,
    species: Vec<&'a str>,
    stock_count: u32,
    set_up: toml::value::Datetime,
    #[serde(skip_serializing_if = "str::is_empty")]
    notes: &'a str,
}

/// A list of reading fields by name; left out when the room does not give it.
fn names(fields: Option<&[ReadingField]>) -> Option<Vec<&'static str>> {
    fields.map(|fields| fields.iter().map(|f| f.name()).collect())
}

fn water(w: WaterType) -> &'static str {
    w.name()
}

impl Facility {
    /// The facility as a TOML facility file, in canonical units (litres, °C,
    /// band edges as NH3-N); loading it gives back an equal facility. Comments
    /// of the original file are not kept.
    pub fn to_toml_string(&self) -> String {
        let room = &self.room;
        let out = OutFile {
            room: OutRoom {
                name: &room.name,
                elevation_m: room.elevation_m,
                kit_basis: room.kit_basis.name(),
                temperature_unit: match room.temperature_unit {
                    TemperatureUnit::Celsius => "C",
                    TemperatureUnit::Fahrenheit => "F",
                },
                volume_unit: match room.volume_unit {
                    VolumeUnit::Litre => "L",
                    VolumeUnit::UsGallon => "gal",
                },
                round_order: match &room.round_order {
                    RoundOrder::AsListed => OutRoundOrder::Word("as-listed"),
                    RoundOrder::Ids(ids) => OutRoundOrder::Ids(ids.iter().map(|i| i.as_str()).collect()),
                },
                round_interval_hours: room.round_interval_hours,
                reading_fields: names(room.reading_fields.as_deref()),
                optional_fields: names(room.optional_fields.as_deref()),
                notes: &room.notes,
                source_water: room.source_water.as_ref().map(|w| OutSourceWater {
                    ph: w.ph,
                    tan_n_mg_l: w.tan_n_mg_l,
                    temp_c: w.temp_c,
                    chloramine: w.chloramine,
                    note: &w.note,
                }),
            },
            species: self
                .species
                .iter()
                .map(|s| OutSpecies {
                    key: s.key.as_str(),
                    name: &s.name,
                    water_type: water(s.water_type),
                    temp_c: [s.temp_c.min, s.temp_c.max],
                    ph: [s.ph.min, s.ph.max],
                    salt_tolerance_g_l: s.salt_tolerance_g_l,
                    notes: &s.notes,
                    band_edges: s.band_edges.map(|e| OutEdges {
                        basis: "nh3-n",
                        watch: e.watch,
                        act: e.act,
                        critical: e.critical,
                    }),
                })
                .collect(),
            systems: self
                .systems
                .iter()
                .map(|s| OutSystem {
                    id: s.id.as_str(),
                    name: &s.name,
                    volume_l: s.volume_l,
                    water_type: water(s.water_type),
                    salinity_g_l: s.salinity_g_l,
                    tanks: s.tanks.iter().map(|t| t.as_str()).collect(),
                    notes: &s.notes,
                })
                .collect(),
            tanks: self
                .tanks
                .iter()
                .map(|t| {
                    let standalone = t.system.is_none();
                    OutTank {
                        id: t.id.as_str(),
                        volume_l: t.volume_l,
                        system: t.system.as_ref().map(|s| s.as_str()),
                        water_type: standalone.then(|| water(t.water_type)),
                        salinity_g_l: standalone.then_some(t.salinity_g_l),
                        species: t.species.iter().map(|s| s.as_str()).collect(),
                        stock_count: t.stock_count,
                        set_up: date(t.set_up),
                        notes: &t.notes,
                    }
                })
                .collect(),
        };
        // Every field is a string, number, boolean, date or list of them: serialising cannot fail.
        toml::to_string(&out).unwrap_or_else(|e| format!("# could not write the facility: {e}\n"))
    }
}

fn date(d: chrono::NaiveDate) -> toml::value::Datetime {
    use chrono::Datelike;
    toml::value::Datetime {
        date: Some(toml::value::Date {
            year: u16::try_from(d.year()).unwrap_or(0),
            month: u8::try_from(d.month()).unwrap_or(1),
            day: u8::try_from(d.day()).unwrap_or(1),
        }),
        time: None,
        offset: None,
    }
}
