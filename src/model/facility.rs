//! The facility: one room, its species profiles, its shared systems and its
//! tanks, with the questions the rest of the program asks about them.
//!
//! A loaded [`Facility`] is consistent: every id is unique, every species key
//! and system named by a tank exists, each tank is on at most one system and
//! both sides agree (`Tank::system` and `System::tanks`), a tank on a system
//! carries that system's water type and salinity, and every mixed tank has a
//! temperature and pH range all its species accept. The queries rely on it.

use std::fmt;

use chrono::{DateTime, FixedOffset, NaiveDate, Timelike};
use serde::{Deserialize, Serialize};

use super::id::Id;
use super::species::{EffectiveProfile, SpeciesProfile, WaterType};
use crate::core::units::AmmoniaBasis;

/// One room as described by its facility file.
#[derive(Debug, Clone, PartialEq)]
pub struct Facility {
    /// The room and its defaults.
    pub room: Room,
    /// Species profiles, as listed.
    pub species: Vec<SpeciesProfile>,
    /// Shared systems (racks on one sump), as listed.
    pub systems: Vec<System>,
    /// Tanks and tubs, as listed.
    pub tanks: Vec<Tank>,
}

/// The room: its name, where it is, how its kit reports and how it is walked.
#[derive(Debug, Clone, PartialEq)]
pub struct Room {
    /// Name shown on every screen and report.
    pub name: String,
    /// Elevation above sea level, m (for oxygen saturation).
    pub elevation_m: f64,
    /// How the room's ammonia kit or meter reports total ammonia.
    pub kit_basis: AmmoniaBasis,
    /// Temperature unit shown by default.
    pub temperature_unit: TemperatureUnit,
    /// Volume unit shown by default.
    pub volume_unit: VolumeUnit,
    /// The order tanks are walked in.
    pub round_order: RoundOrder,
    /// The water used for water changes, when known.
    pub source_water: Option<SourceWater>,
    /// Hours after its last reading when a tank is due again.
    pub round_interval_hours: u32,
    /// The fields read at every tank, in the order the person reads them;
    /// `None` when the file does not say (see [`Room::field_order`]).
    pub reading_fields: Option<Vec<ReadingField>>,
    /// The fields offered below them, filled only when measured; `None` when
    /// the file does not say (see [`Room::field_order`]).
    pub optional_fields: Option<Vec<ReadingField>>,
    /// Free notes (who runs the room, when the round is walked).
    pub notes: String,
}

impl Room {
    /// The start of the round that `now` falls in: see [`round_start`].
    pub fn round_start(&self, now: DateTime<FixedOffset>) -> DateTime<FixedOffset> {
        round_start(now, self.round_interval_hours)
    }

    /// The fields the walk asks for at a tank, routine first: the room's
    /// lists where it gives them, else [`DEFAULT_READING_FIELDS`] and the
    /// default optional fields (salinity first in salt water, where it is read
    /// every time). A list the room leaves out takes its default without the
    /// fields the other list names.
    pub fn field_order(&self, salt_water: bool) -> FieldOrder {
        let default_optional: &[ReadingField] =
            if salt_water { &DEFAULT_OPTIONAL_FIELDS_SALT } else { &DEFAULT_OPTIONAL_FIELDS };
        let without = |defaults: &[ReadingField], other: &[ReadingField]| -> Vec<ReadingField> {
            defaults.iter().copied().filter(|f| !other.contains(f)).collect()
        };
        match (&self.reading_fields, &self.optional_fields) {
            (Some(routine), Some(optional)) => FieldOrder { routine: routine.clone(), optional: optional.clone() },
            (Some(routine), None) => {
                FieldOrder { routine: routine.clone(), optional: without(default_optional, routine) }
            }
            (None, Some(optional)) => {
                FieldOrder { routine: without(&DEFAULT_READING_FIELDS, optional), optional: optional.clone() }
            }
            (None, None) => {
                FieldOrder { routine: DEFAULT_READING_FIELDS.to_vec(), optional: default_optional.to_vec() }
            }
        }
    }
}

/// A value the walk takes at each tank, by its name in the facility file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ReadingField {
    /// Water temperature, in the room's temperature unit.
    Temperature,
    /// pH.
    Ph,
    /// Total ammonia, on the room's kit basis.
    TotalAmmonia,
    /// Nitrite, mg/L as N.
    Nitrite,
    /// Nitrate, mg/L as N.
    Nitrate,
    /// Practical salinity, g/L.
    Salinity,
    /// Dissolved oxygen, mg/L.
    DissolvedOxygen,
    /// Chloride, mg/L.
    Chloride,
    /// Total alkalinity, mg/L as CaCO3.
    Alkalinity,
}

impl ReadingField {
    /// Every field, in the default order.
    pub const ALL: [ReadingField; 9] = [
        ReadingField::Temperature,
        ReadingField::Ph,
        ReadingField::TotalAmmonia,
        ReadingField::Nitrite,
        ReadingField::Nitrate,
        ReadingField::Salinity,
        ReadingField::DissolvedOxygen,
        ReadingField::Chloride,
        ReadingField::Alkalinity,
    ];

    /// The fields un-ionized ammonia is computed from: a room must read them.
    pub const FOR_NH3: [ReadingField; 3] = [ReadingField::Temperature, ReadingField::Ph, ReadingField::TotalAmmonia];

    /// The name in the facility file.
    pub fn name(self) -> &'static str {
        match self {
            ReadingField::Temperature => "temperature",
            ReadingField::Ph => "ph",
            ReadingField::TotalAmmonia => "total-ammonia",
            ReadingField::Nitrite => "nitrite",
            ReadingField::Nitrate => "nitrate",
            ReadingField::Salinity => "salinity",
            ReadingField::DissolvedOxygen => "dissolved-oxygen",
            ReadingField::Chloride => "chloride",
            ReadingField::Alkalinity => "alkalinity",
        }
    }

    /// The field named `name`: any case, `_` or a space for `-`.
    pub fn from_name(name: &str) -> Option<ReadingField> {
        let name = name.trim().to_ascii_lowercase().replace(['_', ' '], "-");
        ReadingField::ALL.into_iter().find(|f| f.name() == name)
    }
}

impl fmt::Display for ReadingField {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// The fields read at every tank when the room does not say, in order.
pub const DEFAULT_READING_FIELDS: [ReadingField; 4] =
    [ReadingField::Temperature, ReadingField::Ph, ReadingField::TotalAmmonia, ReadingField::Nitrite];

/// The optional fields in fresh water when the room does not say.
pub const DEFAULT_OPTIONAL_FIELDS: [ReadingField; 3] =
    [ReadingField::Nitrate, ReadingField::Salinity, ReadingField::DissolvedOxygen];

/// The optional fields in salt water when the room does not say: salinity,
/// read every time there, comes first.
pub const DEFAULT_OPTIONAL_FIELDS_SALT: [ReadingField; 3] =
    [ReadingField::Salinity, ReadingField::Nitrate, ReadingField::DissolvedOxygen];

/// The fields of a tank's entry in the walk.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FieldOrder {
    /// Read at every tank, in order.
    pub routine: Vec<ReadingField>,
    /// Below them, filled only when measured.
    pub optional: Vec<ReadingField>,
}

/// The start of the round that `now` falls in: local midnight (in `now`'s
/// offset) for rooms read once a day or less often, else the start of the
/// current block of `interval_hours` of the day. A round is what a person
/// means by "this morning's round": yesterday's late reading does not count
/// for it, and the screen and the report use this one rule.
pub fn round_start(now: DateTime<FixedOffset>, interval_hours: u32) -> DateTime<FixedOffset> {
    let midnight = now.with_hour(0).and_then(|t| t.with_minute(0)).and_then(|t| t.with_second(0));
    let midnight = midnight.and_then(|t| t.with_nanosecond(0)).unwrap_or(now);
    if interval_hours == 0 || interval_hours >= 24 {
        return midnight;
    }
    let blocks = now.hour() / interval_hours;
    midnight + chrono::Duration::hours(i64::from(blocks * interval_hours))
}

/// Hours between readings when the file does not say.
pub const DEFAULT_ROUND_INTERVAL_HOURS: u32 = 24;

/// The water used for changes (tap, RO, mixed): its pH and ammonia decide
/// whether a change is safe and how much it dilutes.
#[derive(Debug, Clone, PartialEq)]
pub struct SourceWater {
    /// pH of the source water.
    pub ph: Option<f64>,
    /// Total ammonia of the source water, mg TAN-N/L (chloramine releases some).
    pub tan_n_mg_l: Option<f64>,
    /// Temperature the source water is delivered at, °C.
    pub temp_c: Option<f64>,
    /// True when the supply is treated with chloramine.
    pub chloramine: bool,
    /// Free note (what it is, how it is treated).
    pub note: String,
}

/// A temperature unit for display.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize, Deserialize)]
pub enum TemperatureUnit {
    /// Degrees Celsius.
    #[default]
    #[serde(rename = "C", alias = "c")]
    Celsius,
    /// Degrees Fahrenheit.
    #[serde(rename = "F", alias = "f")]
    Fahrenheit,
}

impl TemperatureUnit {
    /// The symbol shown after a value.
    pub fn symbol(self) -> &'static str {
        match self {
            TemperatureUnit::Celsius => "°C",
            TemperatureUnit::Fahrenheit => "°F",
        }
    }

    /// Converts °C to this unit.
    pub fn from_celsius(self, celsius: f64) -> f64 {
        match self {
            TemperatureUnit::Celsius => celsius,
            TemperatureUnit::Fahrenheit => crate::core::units::celsius_to_fahrenheit(celsius),
        }
    }
}

/// A volume unit for display (the model keeps litres).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize, Deserialize)]
pub enum VolumeUnit {
    /// Litres.
    #[default]
    #[serde(rename = "L", alias = "l")]
    Litre,
    /// US liquid gallons.
    #[serde(rename = "gal", alias = "GAL", alias = "US gal")]
    UsGallon,
}

impl VolumeUnit {
    /// The symbol shown after a value.
    pub fn symbol(self) -> &'static str {
        match self {
            VolumeUnit::Litre => "L",
            VolumeUnit::UsGallon => "US gal",
        }
    }

    /// Converts litres to this unit.
    pub fn from_litres(self, litres: f64) -> f64 {
        match self {
            VolumeUnit::Litre => litres,
            VolumeUnit::UsGallon => crate::core::units::litres_to_us_gallons(litres),
        }
    }
}

/// The order of the round.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum RoundOrder {
    /// Tanks in the order of the file's `[[tanks]]` entries.
    #[default]
    AsListed,
    /// The ids given, in order: a system id stands for all its tanks (in the
    /// system's order); tanks the list does not reach come last, as listed.
    Ids(Vec<Id>),
}

/// Shared water: tanks plumbed to one sump, one filter, one water volume.
#[derive(Debug, Clone, PartialEq)]
pub struct System {
    /// Short id (`RACK-A`).
    pub id: Id,
    /// Display name.
    pub name: String,
    /// The whole shared volume, tanks plus sump and pipework, L.
    pub volume_l: f64,
    /// The water the system holds.
    pub water_type: WaterType,
    /// The salinity the system is run at, g/L (0 for plain fresh water).
    pub salinity_g_l: f64,
    /// Ids of the tanks on the system, in walking order.
    pub tanks: Vec<Id>,
    /// Free notes.
    pub notes: String,
}

/// One tank or tub.
#[derive(Debug, Clone, PartialEq)]
pub struct Tank {
    /// The label on the glass (`B2-07`).
    pub id: Id,
    /// Water volume of the tank itself, L.
    pub volume_l: f64,
    /// The system it shares water with, or `None` when standalone.
    pub system: Option<Id>,
    /// The water it holds (its system's, when on one).
    pub water_type: WaterType,
    /// The salinity it is run at, g/L (its system's, when on one).
    pub salinity_g_l: f64,
    /// Keys of the species in it: one, several (mixed), or none (cycling, empty).
    pub species: Vec<Id>,
    /// Number of animals.
    pub stock_count: u32,
    /// The day it was set up (filled with water), for cycling state.
    pub set_up: NaiveDate,
    /// Free notes.
    pub notes: String,
}

impl Tank {
    /// True when the tank shares water with a system.
    pub fn is_on_system(&self) -> bool {
        self.system.is_some()
    }
}

impl Facility {
    /// The tank with this label (exact, or ignoring ASCII case).
    pub fn tank(&self, id: &str) -> Option<&Tank> {
        find(&self.tanks, id, |t| &t.id)
    }

    /// The system with this id (exact, or ignoring ASCII case).
    pub fn system(&self, id: &str) -> Option<&System> {
        find(&self.systems, id, |s| &s.id)
    }

    /// The species profile with this key (exact, or ignoring ASCII case).
    pub fn species_profile(&self, key: &str) -> Option<&SpeciesProfile> {
        find(&self.species, key, |s| &s.key)
    }

    /// The system a tank is on, or `None` when it is standalone.
    pub fn system_of(&self, tank: &Tank) -> Option<&System> {
        tank.system.as_ref().and_then(|id| self.system(id.as_str()))
    }

    /// The tanks on a system, in the system's order.
    pub fn tanks_on(&self, system: &System) -> Vec<&Tank> {
        system.tanks.iter().filter_map(|id| self.tank(id.as_str())).collect()
    }

    /// The water volume a dose or a water change acts on, L: the whole shared
    /// volume when the tank is on a system, else the tank's own.
    pub fn water_volume_l(&self, tank: &Tank) -> f64 {
        self.system_of(tank).map_or(tank.volume_l, |s| s.volume_l)
    }

    /// The profiles of the species in a tank, as listed.
    pub fn species_of(&self, tank: &Tank) -> Vec<&SpeciesProfile> {
        tank.species.iter().filter_map(|key| self.species_profile(key.as_str())).collect()
    }

    /// The combined needs of everything in a tank: for a mixed tank the most
    /// demanding species sets each limit (lowest band edges, intersection of
    /// temperature and pH ranges, lowest salt tolerance); see
    /// [`EffectiveProfile::combine`].
    pub fn effective_profile(&self, tank: &Tank) -> EffectiveProfile {
        EffectiveProfile::combine(&self.species_of(tank))
    }

    /// The water a tank holds (its system's when on one).
    pub fn water_type(&self, tank: &Tank) -> WaterType {
        self.system_of(tank).map_or(tank.water_type, |s| s.water_type)
    }

    /// The salinity a tank is run at, g/L (its system's when on one).
    pub fn salinity_g_l(&self, tank: &Tank) -> f64 {
        self.system_of(tank).map_or(tank.salinity_g_l, |s| s.salinity_g_l)
    }

    /// The fields the walk asks for at a tank (see [`Room::field_order`]):
    /// any salt in its water counts as salt water.
    pub fn field_order(&self, tank: &Tank) -> FieldOrder {
        self.room.field_order(self.salinity_g_l(tank) > 0.0)
    }

    /// Every tank once, in the order of the round (see [`RoundOrder`]).
    pub fn round(&self) -> Vec<&Tank> {
        let ids = match &self.room.round_order {
            RoundOrder::AsListed => return self.tanks.iter().collect(),
            RoundOrder::Ids(ids) => ids,
        };
        // Positions by exact id, so a room of thousands of tanks is ordered in linear time.
        let position: std::collections::HashMap<&str, usize> =
            self.tanks.iter().enumerate().map(|(i, t)| (t.id.as_str(), i)).collect();
        let index_of = |tank: &Tank| position.get(tank.id.as_str()).copied();
        let mut taken = vec![false; self.tanks.len()];
        let mut order: Vec<usize> = Vec::with_capacity(self.tanks.len());
        let mut take = |i: usize| {
            if !taken[i] {
                taken[i] = true;
                order.push(i);
            }
        };
        for id in ids {
            // A loaded facility names tanks and systems exactly as written; the lookups
            // that ignore case only serve facilities built by hand.
            if let Some(&i) = position.get(id.as_str()) {
                take(i);
            } else if let Some(system) = self.system(id.as_str()) {
                let on = system.tanks.iter().filter_map(|t| {
                    position.get(t.as_str()).copied().or_else(|| self.tank(t.as_str()).and_then(index_of))
                });
                on.for_each(&mut take);
            } else if let Some(tank) = self.tank(id.as_str()) {
                index_of(tank).into_iter().for_each(&mut take);
            }
        }
        (0..self.tanks.len()).for_each(&mut take);
        order.into_iter().map(|i| &self.tanks[i]).collect()
    }

    /// Total water in the room, L: every system's whole volume plus every standalone tank.
    pub fn total_water_l(&self) -> f64 {
        self.systems.iter().map(|s| s.volume_l).sum::<f64>()
            + self.tanks.iter().filter(|t| !t.is_on_system()).map(|t| t.volume_l).sum::<f64>()
    }

    /// Total animals in the room.
    pub fn total_stock(&self) -> u64 {
        self.tanks.iter().map(|t| u64::from(t.stock_count)).sum()
    }
}

/// Finds by exact id, then by id ignoring ASCII case (validation guarantees at
/// most one such match).
fn find<'a, T>(items: &'a [T], id: &str, key: impl Fn(&T) -> &Id) -> Option<&'a T> {
    items.iter().find(|item| key(item).as_str() == id).or_else(|| items.iter().find(|item| key(item).matches(id)))
}

impl fmt::Display for RoundOrder {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RoundOrder::AsListed => f.write_str("as listed"),
            RoundOrder::Ids(ids) => {
                let ids: Vec<&str> = ids.iter().map(Id::as_str).collect();
                f.write_str(&ids.join(", "))
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(day: u32, hour: u32, minute: u32) -> DateTime<FixedOffset> {
        use chrono::TimeZone;
        FixedOffset::east_opt(-5 * 3600).unwrap().with_ymd_and_hms(2026, 12, day, hour, minute, 0).unwrap()
    }

    #[test]
    fn daily_rounds_start_at_local_midnight_and_shorter_ones_on_the_interval() {
        assert_eq!(round_start(at(2, 7, 40), 24), at(2, 0, 0));
        assert_eq!(round_start(at(2, 7, 40), 48), at(2, 0, 0));
        assert_eq!(round_start(at(2, 13, 5), 12), at(2, 12, 0));
        assert_eq!(round_start(at(2, 5, 5), 8), at(2, 0, 0));
    }

    use crate::core::band::BandEdges;
    use crate::model::species::Bounds;

    fn id(s: &str) -> Id {
        Id::new(s).unwrap()
    }

    fn tank(label: &str, volume_l: f64, system: Option<&str>, species: &[&str]) -> Tank {
        Tank {
            id: id(label),
            volume_l,
            system: system.map(id),
            water_type: WaterType::Fresh,
            salinity_g_l: 0.0,
            species: species.iter().map(|s| id(s)).collect(),
            stock_count: 10,
            set_up: NaiveDate::from_ymd_opt(2024, 5, 1).unwrap(),
            notes: String::new(),
        }
    }

    fn species(key: &str, temp: (f64, f64), edges: Option<BandEdges>) -> SpeciesProfile {
        SpeciesProfile {
            key: id(key),
            name: key.into(),
            water_type: WaterType::Fresh,
            temp_c: Bounds::new(temp.0, temp.1),
            ph: Bounds::new(6.5, 8.0),
            salt_tolerance_g_l: 0.0,
            band_edges: edges,
            notes: String::new(),
        }
    }

    fn small_room(order: RoundOrder) -> Facility {
        Facility {
            room: Room {
                name: "test room".into(),
                elevation_m: 0.0,
                kit_basis: AmmoniaBasis::N,
                temperature_unit: TemperatureUnit::Celsius,
                volume_unit: VolumeUnit::Litre,
                round_order: order,
                source_water: None,
                round_interval_hours: DEFAULT_ROUND_INTERVAL_HOURS,
                reading_fields: None,
                optional_fields: None,
                notes: String::new(),
            },
            species: vec![
                species("guppy", (22.0, 28.0), None),
                species("pleco", (24.0, 30.0), Some(BandEdges { watch: 0.01, act: 0.04, critical: 0.15 })),
            ],
            systems: vec![System {
                id: id("RACK-A"),
                name: "Rack A".into(),
                volume_l: 500.0,
                water_type: WaterType::Fresh,
                salinity_g_l: 0.0,
                tanks: vec![id("A-02"), id("A-01")],
                notes: String::new(),
            }],
            tanks: vec![
                tank("Q-1", 60.0, None, &["guppy", "pleco"]),
                tank("A-01", 100.0, Some("RACK-A"), &["guppy"]),
                tank("A-02", 100.0, Some("RACK-A"), &[]),
            ],
        }
    }

    #[test]
    fn lookups_and_volumes() {
        let f = small_room(RoundOrder::AsListed);
        let a1 = f.tank("a-01").expect("case-insensitive lookup");
        assert_eq!(a1.id, "A-01");
        assert_eq!(f.system_of(a1).map(|s| s.id.as_str()), Some("RACK-A"));
        assert_eq!(f.water_volume_l(a1), 500.0, "a tank on a system acts on the whole shared volume");
        let q = f.tank("Q-1").unwrap();
        assert_eq!(f.system_of(q), None);
        assert_eq!(f.water_volume_l(q), 60.0);
        let rack = f.system("RACK-A").unwrap();
        let on: Vec<&str> = f.tanks_on(rack).iter().map(|t| t.id.as_str()).collect();
        assert_eq!(on, ["A-02", "A-01"]);
        assert_eq!(f.total_water_l(), 560.0);
        assert_eq!(f.total_stock(), 30);
        assert!(f.tank("nope").is_none());
    }

    #[test]
    fn mixed_tank_profile_is_the_most_demanding() {
        let f = small_room(RoundOrder::AsListed);
        let q = f.tank("Q-1").unwrap();
        assert_eq!(f.species_of(q).len(), 2);
        let e = f.effective_profile(q);
        assert_eq!(e.temp_c, Some(Bounds::new(24.0, 28.0)));
        assert_eq!(e.band_edges, BandEdges { watch: 0.01, act: 0.04, critical: 0.15 });
        let empty = f.effective_profile(f.tank("A-02").unwrap());
        assert_eq!(empty.band_edges, BandEdges::DEFAULT);
    }

    #[test]
    fn round_order_expands_systems_and_appends_the_rest() {
        let labels = |f: &Facility| f.round().iter().map(|t| t.id.to_string()).collect::<Vec<_>>();
        assert_eq!(labels(&small_room(RoundOrder::AsListed)), ["Q-1", "A-01", "A-02"]);
        assert_eq!(labels(&small_room(RoundOrder::Ids(vec![id("RACK-A"), id("Q-1")]))), ["A-02", "A-01", "Q-1"]);
        assert_eq!(labels(&small_room(RoundOrder::Ids(vec![id("A-01")]))), ["A-01", "Q-1", "A-02"]);
    }

    #[test]
    fn field_order_defaults_to_the_usual_four_and_puts_salinity_first_in_salt_water() {
        use ReadingField::*;
        let mut room = small_room(RoundOrder::AsListed).room;
        let fresh = room.field_order(false);
        assert_eq!(fresh.routine, [Temperature, Ph, TotalAmmonia, Nitrite]);
        assert_eq!(fresh.optional, [Nitrate, Salinity, DissolvedOxygen]);
        assert_eq!(room.field_order(true).optional, [Salinity, Nitrate, DissolvedOxygen]);
        // A routine list alone: the default optional fields without those it names.
        room.reading_fields = Some(vec![Salinity, Ph, Temperature, TotalAmmonia]);
        assert_eq!(room.field_order(false).optional, [Nitrate, DissolvedOxygen]);
        // An optional list alone: the usual four without those it names.
        room.reading_fields = None;
        room.optional_fields = Some(vec![Nitrite, Alkalinity]);
        assert_eq!(
            room.field_order(true),
            FieldOrder { routine: vec![Temperature, Ph, TotalAmmonia], optional: vec![Nitrite, Alkalinity] }
        );
        // Both given: exactly as written, salt water or not.
        room.reading_fields = Some(vec![Ph, Temperature, TotalAmmonia]);
        room.optional_fields = Some(vec![]);
        assert_eq!(
            room.field_order(true),
            FieldOrder { routine: vec![Ph, Temperature, TotalAmmonia], optional: vec![] }
        );
    }

    #[test]
    fn reading_field_names_read_back() {
        for field in ReadingField::ALL {
            assert_eq!(ReadingField::from_name(field.name()), Some(field));
            assert_eq!(ReadingField::from_name(&field.name().to_uppercase().replace('-', "_")), Some(field));
        }
        assert_eq!(ReadingField::from_name("ammonia"), None);
    }
}
