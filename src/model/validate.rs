//! Checks every entry of a read facility file and builds the model, recording
//! each problem at the place in the text it concerns.
//!
//! Salinity against water type uses the Venice system's bounds (fresh below
//! 0.5 g/L, brackish 0.5–30, sea water above 30; Venice symposium 1958, from
//! memory), loosened for fish-room practice (common practice, no source): fresh
//! systems often carry a few g/L of added salt, and marine fish are held at
//! reduced salinity for treatment, so those give warnings, not errors.

use std::collections::HashMap;
use std::ops::Range;

use chrono::NaiveDate;
use toml::Spanned;

use super::facility::{
    DEFAULT_ROUND_INTERVAL_HOURS, Facility, ReadingField, Room, RoundOrder, SourceWater, System, Tank, TemperatureUnit,
    VolumeUnit,
};
use super::id::Id;
use super::load::{Context, Entry, RawFile, closest};
use super::raw::{OneOrMany, RawBandEdges, RawRoom, RawSourceWater, RawSpecies, RawSystem, RawTank};
use super::species::{Bounds, SpeciesProfile, WaterType};
use crate::core::band::BandEdges;
use crate::core::limits::{self, Quantity};
use crate::core::units::{self, AmmoniaBasis};

/// Above this salinity (g/L) fresh water is suspicious (common practice, no source).
const FRESH_MAX_G_L: f64 = 5.0;
/// Brackish water lies between these salinities, g/L (Venice system 1958, from memory).
const BRACKISH_G_L: (f64, f64) = (0.5, 30.0);
/// Below this salinity (g/L) marine water is suspicious (common practice, no source).
const MARINE_MIN_G_L: f64 = 25.0;
/// Two salinities closer than this are the same setting, g/L.
const SALINITY_SAME_G_L: f64 = 1e-9;

/// Validates everything read and builds the facility; `None` when any error was found.
pub(super) fn build(raw: RawFile, today: Option<NaiveDate>, ctx: &mut Context) -> Option<Facility> {
    let mut v = Validator { ctx, unreadable: raw.unreadable, volume_unit: VolumeUnit::Litre };
    let room = match &raw.room {
        Some(entry) => v.room(entry),
        None => {
            if !raw.room_seen {
                v.ctx.error(&(0..0), "room", "missing [room]: the file starts with [room] and its name and kit_basis");
            }
            None
        }
    };
    if let Some(room) = &room {
        v.volume_unit = room.volume_unit;
    }
    let species = v.all_species(&raw.species);
    let mut ids = IdRegistry::default();
    let systems: Vec<Option<BuiltSystem>> = raw.systems.iter().map(|e| v.system(e, &mut ids)).collect();
    let tanks: Vec<Option<BuiltTank>> = raw.tanks.iter().map(|e| v.tank(e, &mut ids, today)).collect();
    // Entries with errors of their own are still known by name: naming them elsewhere is no further error.
    let failed_species = raw.species.iter().zip(&species).filter(|(_, b)| b.is_none()).map(|(e, _)| &e.raw.key);
    let failed_systems = raw.systems.iter().zip(&systems).filter(|(_, b)| b.is_none()).map(|(e, _)| &e.raw.id);
    let failed_tanks = raw.tanks.iter().zip(&tanks).filter(|(_, b)| b.is_none()).map(|(e, _)| &e.raw.id);
    let failed: Vec<String> =
        failed_species.chain(failed_systems).chain(failed_tanks).map(|id| id.get_ref().to_ascii_lowercase()).collect();
    v.unreadable.extend(failed);
    // Tanks of a system with errors of its own: their water is unknown, so it is not checked.
    let orphans: Vec<String> = raw
        .systems
        .iter()
        .zip(&systems)
        .filter(|(_, b)| b.is_none())
        .flat_map(|(e, _)| e.raw.tanks.iter().map(|t| t.get_ref().to_ascii_lowercase()))
        .collect();
    if raw.tank_entries == 0 {
        v.ctx.error(&(raw.end..raw.end), "tanks", "the file has no [[tanks]]: add one entry for each tank or tub");
    }
    let (systems, mut tanks) = v.membership(&raw.systems, systems, &raw.tanks, tanks);
    v.water_and_species(&raw.tanks, &mut tanks, &systems, &raw.species, &species, &orphans);
    v.system_volumes(&raw.systems, &systems, &tanks);
    let order = raw.room.as_ref().and_then(|e| e.raw.round_order.as_ref());
    let round_order = v.round_order(order, &systems, &tanks);
    if v.ctx.error_count() > 0 {
        return None;
    }
    let mut room = room?;
    room.round_order = round_order?;
    Some(Facility {
        room,
        species: species.into_iter().map(|s| s.map(|s| s.profile)).collect::<Option<Vec<_>>>()?,
        systems: systems.into_iter().map(|s| s.map(|s| s.system)).collect::<Option<Vec<_>>>()?,
        tanks: tanks.into_iter().map(|t| t.map(|t| t.tank)).collect::<Option<Vec<_>>>()?,
    })
}

/// The room's `reading_fields` and `optional_fields`, each when given.
type FieldLists = (Option<Vec<ReadingField>>, Option<Vec<ReadingField>>);

struct Validator<'c, 'a> {
    ctx: &'c mut Context<'a>,
    unreadable: Vec<String>,
    volume_unit: VolumeUnit,
}

struct BuiltSpecies {
    profile: SpeciesProfile,
}

struct BuiltSystem {
    system: System,
    /// Spans of the listed tank ids, parallel to the raw list (`None` where the id was bad).
    listed: Vec<(Option<Id>, Range<usize>)>,
    volume_span: Range<usize>,
    id_span: Range<usize>,
    index: usize,
}

struct BuiltTank {
    tank: Tank,
    /// The water type as stated in the file, if it was.
    stated_water: Option<(WaterType, Range<usize>)>,
    /// The salinity as stated in the file, if it was.
    stated_salinity: Option<(f64, Range<usize>)>,
    /// The system named by the tank's `system` field.
    declared_system: Option<(String, Range<usize>)>,
    /// Each species key with its place and field path.
    species_at: Vec<(Id, Range<usize>, String)>,
    /// The whole `species` value.
    species_span: Option<Range<usize>>,
    /// The entry's header.
    entry_span: Range<usize>,
}

/// Where a value sits: its entry's path, the entry named for messages, the entry's header.
#[derive(Clone, Copy)]
struct Place<'p> {
    path: &'p str,
    subject: &'p str,
    entry: &'p Range<usize>,
}

/// Tank and system ids share one namespace (the round order names both).
#[derive(Default)]
struct IdRegistry {
    seen: HashMap<String, (&'static str, Range<usize>)>,
}

impl Validator<'_, '_> {
    fn is_unreadable(&self, id: &str) -> bool {
        self.unreadable.contains(&id.to_ascii_lowercase())
    }

    fn id(&mut self, value: &Spanned<String>, field: &str, subject: &str) -> Option<Id> {
        match Id::new(value.get_ref()) {
            Ok(id) => Some(id),
            Err(e) => {
                self.ctx.error(&value.span(), field, format!("{subject}: {e}"));
                None
            }
        }
    }

    /// A measured value checked against its quantity's ranges: an error outside
    /// the hard range, a warning outside the usual one.
    fn quantity(&mut self, value: f64, span: &Range<usize>, field: &str, subject: &str, q: Quantity) -> Option<f64> {
        match limits::check(q, value) {
            Ok(None) => Some(value),
            Ok(Some(unusual)) => {
                self.ctx.warn(span, field, format!("{subject}: {unusual}"));
                Some(value)
            }
            Err(e) => {
                self.ctx.error(span, field, format!("{subject}: {e}"));
                None
            }
        }
    }

    /// A value that must lie in a quantity's hard range (no "unusual" warning).
    fn within(&mut self, value: f64, span: &Range<usize>, field: &str, subject: &str, q: Quantity) -> Option<f64> {
        match limits::check(q, value) {
            Ok(_) => Some(value),
            Err(e) => {
                self.ctx.error(span, field, format!("{subject}: {e}"));
                None
            }
        }
    }

    fn word<T>(
        &mut self,
        value: &Spanned<String>,
        field: &str,
        subject: &str,
        parse: impl Fn(&str) -> Option<T>,
        choices: &str,
    ) -> Option<T> {
        let parsed = parse(value.get_ref().trim());
        if parsed.is_none() {
            let got = value.get_ref();
            self.ctx.error(
                &value.span(),
                field,
                format!("{subject}: '{got}' is not a {field_name}; use {choices}", field_name = leaf(field)),
            );
        }
        parsed
    }

    fn water_type(&mut self, value: &Spanned<String>, field: &str, subject: &str) -> Option<WaterType> {
        self.word(value, field, subject, |s| s.parse().ok(), "fresh, brackish or marine")
    }

    /// Exactly one of two ways to state a value (`volume_l` or `volume_gal`).
    fn one_of<'r>(
        &mut self,
        [(first_name, first), (second_name, second)]: [(&str, Option<&'r Spanned<f64>>); 2],
        place: Place,
        required: bool,
    ) -> Option<(bool, &'r Spanned<f64>)> {
        let Place { path, subject, entry } = place;
        let names = (first_name, second_name);
        match (first, second) {
            (Some(a), None) => Some((true, a)),
            (None, Some(b)) => Some((false, b)),
            (Some(_), Some(b)) => {
                self.ctx.error(
                    &b.span(),
                    &format!("{path}.{}", names.1),
                    format!("{subject}: give {} or {}, not both", names.0, names.1),
                );
                None
            }
            (None, None) => {
                if required {
                    self.ctx.error(entry, path, format!("{subject}: missing field '{}' (or '{}')", names.0, names.1));
                }
                None
            }
        }
    }

    fn volume(
        &mut self,
        litres: Option<&Spanned<f64>>,
        gallons: Option<&Spanned<f64>>,
        path: &str,
        subject: &str,
        entry: &Range<usize>,
    ) -> Option<(f64, Range<usize>)> {
        let (is_litres, value) =
            self.one_of([("volume_l", litres), ("volume_gal", gallons)], Place { path, subject, entry }, true)?;
        let field = format!("{path}.{}", if is_litres { "volume_l" } else { "volume_gal" });
        let v = *value.get_ref();
        if !(v.is_finite() && v > 0.0) {
            self.ctx.error(&value.span(), &field, format!("{subject}: volume must be a number above 0, not {v}"));
            return None;
        }
        let l = if is_litres { v } else { units::us_gallons_to_litres(v) };
        Some((l, value.span()))
    }

    fn show_volume(&self, litres: f64) -> String {
        format!("{} {}", amount(self.volume_unit.from_litres(litres)), self.volume_unit.symbol())
    }

    /// `[room]`; the round order is checked once tanks and systems are known.
    fn room(&mut self, entry: &Entry<RawRoom>) -> Option<Room> {
        let raw = &entry.raw;
        let subject = "[room]";
        let errors = self.ctx.error_count();
        let name = raw.name.get_ref().trim().to_string();
        if name.is_empty() {
            self.ctx.error(
                &raw.name.span(),
                "room.name",
                "[room]: name is empty; give the room a name people know it by",
            );
        }
        let elevation_m = match &raw.elevation_m {
            Some(e) => self.quantity(*e.get_ref(), &e.span(), "room.elevation_m", subject, Quantity::Elevation),
            None => Some(0.0),
        };
        let kit_basis = match &raw.kit_basis {
            Some(k) => match k.get_ref().parse::<AmmoniaBasis>() {
                Ok(b) => Some(b),
                Err(e) => {
                    self.ctx.error(&k.span(), "room.kit_basis", format!("{subject}: kit_basis: {e}"));
                    None
                }
            },
            None => {
                self.ctx.error(
                    &entry.span,
                    "room.kit_basis",
                    "[room]: missing field 'kit_basis': how the room's ammonia kit reports total ammonia, \
                     \"n\" (as nitrogen, TAN-N), \"nh3\" or \"nh4\"; the label on the kit's colour card says which",
                );
                None
            }
        };
        let temperature_unit = match &raw.temperature_unit {
            Some(t) => self.word(
                t,
                "room.temperature_unit",
                subject,
                |s| match s.to_ascii_lowercase().trim_start_matches('°') {
                    "c" | "celsius" => Some(TemperatureUnit::Celsius),
                    "f" | "fahrenheit" => Some(TemperatureUnit::Fahrenheit),
                    _ => None,
                },
                "\"C\" or \"F\"",
            ),
            None => Some(TemperatureUnit::default()),
        };
        let volume_unit = match &raw.volume_unit {
            Some(t) => self.word(
                t,
                "room.volume_unit",
                subject,
                |s| match s.to_ascii_lowercase().as_str() {
                    "l" | "litre" | "liter" | "litres" | "liters" => Some(VolumeUnit::Litre),
                    "gal" | "us gal" | "gallon" | "gallons" | "us gallon" => Some(VolumeUnit::UsGallon),
                    _ => None,
                },
                "\"L\" or \"gal\" (US gallons)",
            ),
            None => Some(VolumeUnit::default()),
        };
        let round_interval_hours = match &raw.round_interval_hours {
            Some(h) if *h.get_ref() == 0 => {
                self.ctx.error(
                    &h.span(),
                    "room.round_interval_hours",
                    "[room]: round_interval_hours must be at least 1",
                );
                None
            }
            Some(h) => {
                if *h.get_ref() > 24 * 7 {
                    self.ctx.warn(
                        &h.span(),
                        "room.round_interval_hours",
                        format!("[room]: round_interval_hours {} is more than a week between checks", h.get_ref()),
                    );
                }
                Some(*h.get_ref())
            }
            None => Some(DEFAULT_ROUND_INTERVAL_HOURS),
        };
        let source_water = match &raw.source_water {
            Some(w) => self.source_water(w, kit_basis).map(Some),
            None => Some(None),
        };
        let fields = self.field_lists(raw);
        if self.ctx.error_count() > errors {
            return None;
        }
        let (reading_fields, optional_fields) = fields?;
        Some(Room {
            name,
            elevation_m: elevation_m?,
            kit_basis: kit_basis?,
            temperature_unit: temperature_unit?,
            volume_unit: volume_unit?,
            round_order: RoundOrder::AsListed,
            source_water: source_water?,
            round_interval_hours: round_interval_hours?,
            reading_fields,
            optional_fields,
            notes: raw.notes.clone(),
        })
    }

    /// `reading_fields` and `optional_fields`: known names, each field in one
    /// place, and the fields NH3 is computed from read somewhere.
    fn field_lists(&mut self, raw: &RawRoom) -> Option<FieldLists> {
        let errors = self.ctx.error_count();
        let mut seen = Vec::new();
        let routine = raw.reading_fields.as_ref().map(|list| self.field_list(list, "reading_fields", &mut seen));
        let optional = raw.optional_fields.as_ref().map(|list| self.field_list(list, "optional_fields", &mut seen));
        if let Some(list) = raw.reading_fields.as_ref().filter(|l| l.get_ref().is_empty()) {
            self.ctx.error(
                &list.span(),
                "room.reading_fields",
                "[room]: reading_fields is empty; list the fields read at every tank, in the order they are read, \
                 like [\"temperature\", \"ph\", \"total-ammonia\", \"nitrite\"]",
            );
        }
        if self.ctx.error_count() > errors {
            return None;
        }
        // Left out, the optional list holds none of these: only a routine list given can miss them.
        if let (Some(list), Some(routine)) = (&raw.reading_fields, &routine) {
            let missing: Vec<&str> = ReadingField::FOR_NH3
                .into_iter()
                .filter(|f| !routine.contains(f) && !optional.as_ref().is_some_and(|o| o.contains(f)))
                .map(ReadingField::name)
                .collect();
            if !missing.is_empty() {
                let them = if missing.len() == 1 { "it" } else { "them" };
                let where_ = if optional.is_some() { "optional_fields" } else { "an optional_fields list" };
                self.ctx.error(
                    &list.span(),
                    "room.reading_fields",
                    format!(
                        "[room]: reading_fields leaves out {}: NH3 cannot be computed without temperature, pH and \
                         total ammonia; add {them} here or to {where_}",
                        and_list(&missing)
                    ),
                );
                return None;
            }
        }
        Some((routine, optional))
    }

    /// One list of field names; `seen` holds the fields of the lists read before, with their key and place.
    fn field_list(
        &mut self,
        list: &Spanned<Vec<Spanned<String>>>,
        key: &'static str,
        seen: &mut Vec<(ReadingField, &'static str, Range<usize>)>,
    ) -> Vec<ReadingField> {
        let mut fields = Vec::new();
        for (i, item) in list.get_ref().iter().enumerate() {
            let path = format!("room.{key}[{i}]");
            let name = item.get_ref();
            let Some(field) = ReadingField::from_name(name) else {
                let names: Vec<&str> = ReadingField::ALL.iter().map(|f| f.name()).collect();
                let near = closest(name, &names).map(|n| format!(" (did you mean '{n}'?)")).unwrap_or_default();
                self.ctx.error(
                    &item.span(),
                    &path,
                    format!(
                        "[room]: {key} names '{name}', which is not a reading field{near}; the walk takes {}",
                        names.join(", ")
                    ),
                );
                continue;
            };
            if let Some((_, first_key, first)) = seen.iter().find(|(f, _, _)| *f == field) {
                let line = self.ctx.line_of(first);
                let message = if *first_key == key {
                    format!("[room]: '{name}' is listed twice in {key} (first on line {line}); each field is read once")
                } else {
                    format!(
                        "[room]: '{name}' is in both {first_key} (line {line}) and {key}; a field is read every time \
                         or is optional, not both"
                    )
                };
                self.ctx.error(&item.span(), &path, message);
                continue;
            }
            seen.push((field, key, item.span()));
            fields.push(field);
        }
        fields
    }

    fn source_water(&mut self, w: &Spanned<RawSourceWater>, kit: Option<AmmoniaBasis>) -> Option<SourceWater> {
        let raw = w.get_ref();
        let subject = "[room.source_water]";
        let path = "room.source_water";
        let errors = self.ctx.error_count();
        let ph = raw
            .ph
            .as_ref()
            .and_then(|p| self.quantity(*p.get_ref(), &p.span(), "room.source_water.ph", subject, Quantity::Ph));
        let tan = self.one_of(
            [("tan_n_mg_l", raw.tan_n_mg_l.as_ref()), ("tan_mg_l", raw.tan_mg_l.as_ref())],
            Place { path, subject, entry: &w.span() },
            false,
        );
        let tan_n_mg_l = tan.and_then(|(as_n, v)| {
            let field = format!("{path}.{}", if as_n { "tan_n_mg_l" } else { "tan_mg_l" });
            let value = self.quantity(*v.get_ref(), &v.span(), &field, subject, Quantity::TotalAmmonia)?;
            // tan_mg_l is read the way the room's kit reports.
            if as_n { Some(value) } else { kit.map(|k| k.to_tan_n(value)) }
        });
        let temp = self.one_of(
            [("temp_c", raw.temp_c.as_ref()), ("temp_f", raw.temp_f.as_ref())],
            Place { path, subject, entry: &w.span() },
            false,
        );
        let temp_c = temp.and_then(|(is_c, v)| {
            let field = format!("{path}.{}", if is_c { "temp_c" } else { "temp_f" });
            let c = if is_c { *v.get_ref() } else { units::fahrenheit_to_celsius(*v.get_ref()) };
            self.quantity(c, &v.span(), &field, subject, Quantity::TemperatureC)
        });
        if self.ctx.error_count() > errors {
            return None;
        }
        Some(SourceWater { ph, tan_n_mg_l, temp_c, chloramine: raw.chloramine, note: raw.note.clone() })
    }

    fn all_species(&mut self, entries: &[Entry<RawSpecies>]) -> Vec<Option<BuiltSpecies>> {
        let mut seen: HashMap<String, Range<usize>> = HashMap::new();
        entries
            .iter()
            .map(|e| {
                let built = self.species(e);
                let key = e.raw.key.get_ref().to_ascii_lowercase();
                if let Some(first) = seen.get(&key) {
                    let line = self.ctx.line_of(first);
                    self.ctx.error(
                        &e.raw.key.span(),
                        &format!("species[{}].key", e.index),
                        format!("duplicate species key '{}': already used on line {line}", e.raw.key.get_ref()),
                    );
                    return None;
                }
                seen.insert(key, e.raw.key.span());
                built
            })
            .collect()
    }

    fn species(&mut self, entry: &Entry<RawSpecies>) -> Option<BuiltSpecies> {
        let raw = &entry.raw;
        let path = format!("species[{}]", entry.index);
        let subject = format!("species '{}'", raw.key.get_ref());
        let errors = self.ctx.error_count();
        let key = self.id(&raw.key, &format!("{path}.key"), "species key");
        let name = raw.name.get_ref().trim().to_string();
        if name.is_empty() {
            self.ctx.error(&raw.name.span(), &format!("{path}.name"), format!("{subject}: name is empty"));
        }
        let water_type = self.water_type(&raw.water_type, &format!("{path}.water_type"), &subject);
        let temp = self.one_of_ranges(raw, &path, &subject, &entry.span);
        let ph = self.range(&raw.ph, &format!("{path}.ph"), &subject, "pH", Quantity::Ph, |x| x);
        let salt_tolerance_g_l = match (&raw.salt_tolerance_g_l, water_type) {
            (Some(s), _) => self.within(
                *s.get_ref(),
                &s.span(),
                &format!("{path}.salt_tolerance_g_l"),
                &subject,
                Quantity::Salinity,
            ),
            (None, Some(WaterType::Fresh)) => Some(0.0),
            (None, Some(w)) => {
                self.ctx.error(
                    &raw.water_type.span(),
                    &format!("{path}.salt_tolerance_g_l"),
                    format!("{subject}: a {w} species needs salt_tolerance_g_l, the most salt it bears in g/L"),
                );
                None
            }
            (None, None) => None,
        };
        let band_edges = match &raw.band_edges {
            Some(b) => self.band_edges(b, &format!("{path}.band_edges"), &subject).map(Some),
            None => Some(None),
        };
        if self.ctx.error_count() > errors {
            return None;
        }
        Some(BuiltSpecies {
            profile: SpeciesProfile {
                key: key?,
                name,
                water_type: water_type?,
                temp_c: temp?,
                ph: ph?,
                salt_tolerance_g_l: salt_tolerance_g_l?,
                band_edges: band_edges?,
                notes: raw.notes.clone(),
            },
        })
    }

    fn one_of_ranges(&mut self, raw: &RawSpecies, path: &str, subject: &str, entry: &Range<usize>) -> Option<Bounds> {
        match (&raw.temp_c, &raw.temp_f) {
            (Some(c), None) => {
                self.range(c, &format!("{path}.temp_c"), subject, "temperature", Quantity::TemperatureC, |x| x)
            }
            (None, Some(f)) => self.range(
                f,
                &format!("{path}.temp_f"),
                subject,
                "temperature",
                Quantity::TemperatureC,
                units::fahrenheit_to_celsius,
            ),
            (Some(_), Some(f)) => {
                self.ctx.error(
                    &f.span(),
                    &format!("{path}.temp_f"),
                    format!("{subject}: give temp_c or temp_f, not both"),
                );
                None
            }
            (None, None) => {
                self.ctx.error(
                    entry,
                    path,
                    format!(
                        "{subject}: missing field 'temp_c' (the temperature range kept, like [22, 28]; or temp_f in °F)"
                    ),
                );
                None
            }
        }
    }

    /// A `[low, high]` pair, each end within the quantity's hard range.
    fn range(
        &mut self,
        value: &Spanned<Vec<Spanned<f64>>>,
        field: &str,
        subject: &str,
        what: &str,
        q: Quantity,
        to_canonical: impl Fn(f64) -> f64,
    ) -> Option<Bounds> {
        let items = value.get_ref();
        if items.len() != 2 {
            self.ctx.error(
                &value.span(),
                field,
                format!("{subject}: {} must be two numbers, [low, high]; found {}", leaf(field), items.len()),
            );
            return None;
        }
        let low = self.within(to_canonical(*items[0].get_ref()), &items[0].span(), field, subject, q);
        let high = self.within(to_canonical(*items[1].get_ref()), &items[1].span(), field, subject, q);
        let (low, high) = (low?, high?);
        if low > high {
            self.ctx.error(
                &value.span(),
                field,
                format!(
                    "{subject}: {what} range is reversed: {} is above {}; write [low, high]",
                    items[0].get_ref(),
                    items[1].get_ref()
                ),
            );
            return None;
        }
        Some(Bounds::new(low, high))
    }

    fn band_edges(&mut self, b: &Spanned<RawBandEdges>, path: &str, subject: &str) -> Option<BandEdges> {
        let raw = b.get_ref();
        let as_nh3 = match raw.basis.get_ref().trim().to_ascii_lowercase().as_str() {
            "nh3-n" | "n" => false,
            "nh3" => true,
            other => {
                self.ctx.error(
                    &raw.basis.span(),
                    &format!("{path}.basis"),
                    format!("{subject}: band edge basis '{other}' is not known; use \"nh3-n\" (mg NH3-N/L) or \"nh3\" (mg NH3/L)"),
                );
                return None;
            }
        };
        let mut ok = true;
        for (name, v) in [("watch", &raw.watch), ("act", &raw.act), ("critical", &raw.critical)] {
            let x = *v.get_ref();
            if !(x.is_finite() && x > 0.0) {
                self.ctx.error(
                    &v.span(),
                    &format!("{path}.{name}"),
                    format!("{subject}: band edge {name} must be more than 0, not {x}"),
                );
                ok = false;
            }
        }
        if !ok {
            return None;
        }
        let (w, a, c) = (*raw.watch.get_ref(), *raw.act.get_ref(), *raw.critical.get_ref());
        let edges = if as_nh3 { BandEdges::from_nh3(w, a, c) } else { BandEdges { watch: w, act: a, critical: c } };
        if !edges.is_ordered() {
            self.ctx.error(
                &b.span(),
                path,
                format!("{subject}: band edges must rise from watch to act to critical; here watch {w}, act {a}, critical {c}"),
            );
            return None;
        }
        Some(edges)
    }

    /// Registers a tank or system id; reports a duplicate.
    fn register(&mut self, ids: &mut IdRegistry, id: &Id, kind: &'static str, span: Range<usize>, field: &str) -> bool {
        let key = id.as_str().to_ascii_lowercase();
        if let Some((other_kind, first)) = ids.seen.get(&key) {
            let line = self.ctx.line_of(first);
            self.ctx.error(
                &span,
                field,
                format!("duplicate id '{id}': the {other_kind} on line {line} already uses it (ids of tanks and systems must differ, ignoring case)"),
            );
            return false;
        }
        ids.seen.insert(key, (kind, span));
        true
    }

    /// Water type and salinity stated for a system or a standalone tank.
    fn salinity_for(
        &mut self,
        water: WaterType,
        stated: Option<&Spanned<f64>>,
        field: &str,
        subject: &str,
        water_span: &Range<usize>,
    ) -> Option<f64> {
        let Some(s) = stated else {
            if water == WaterType::Fresh {
                return Some(0.0);
            }
            self.ctx.error(
                water_span,
                field,
                format!(
                    "{subject}: {water} water needs salinity_g_l, the salinity it is run at in g/L (for example 33)"
                ),
            );
            return None;
        };
        let value = self.within(*s.get_ref(), &s.span(), field, subject, Quantity::Salinity)?;
        let odd = match water {
            WaterType::Fresh if value > FRESH_MAX_G_L => {
                Some(format!("fresh water at {} g/L is salty; is it brackish?", amount(value)))
            }
            WaterType::Brackish if !(BRACKISH_G_L.0..=BRACKISH_G_L.1).contains(&value) => Some(format!(
                "brackish water at {} g/L is outside the usual {}–{} g/L",
                amount(value),
                BRACKISH_G_L.0,
                BRACKISH_G_L.1
            )),
            WaterType::Marine if value < MARINE_MIN_G_L => Some(format!(
                "marine water at {} g/L is low (a hyposalinity treatment?); check salinity_g_l",
                amount(value)
            )),
            _ => None,
        };
        if let Some(message) = odd {
            self.ctx.warn(&s.span(), field, format!("{subject}: {message}"));
        }
        Some(value)
    }

    fn system(&mut self, entry: &Entry<RawSystem>, ids: &mut IdRegistry) -> Option<BuiltSystem> {
        let raw = &entry.raw;
        let path = format!("systems[{}]", entry.index);
        let subject = format!("system '{}'", raw.id.get_ref());
        let errors = self.ctx.error_count();
        let id = self.id(&raw.id, &format!("{path}.id"), "system id");
        if let Some(id) = &id
            && !self.register(ids, id, "system", raw.id.span(), &format!("{path}.id"))
        {
            return None;
        }
        let volume = self.volume(raw.volume_l.as_ref(), raw.volume_gal.as_ref(), &path, &subject, &entry.span);
        let water_type = self.water_type(&raw.water_type, &format!("{path}.water_type"), &subject);
        let salinity = water_type.and_then(|w| {
            self.salinity_for(
                w,
                raw.salinity_g_l.as_ref(),
                &format!("{path}.salinity_g_l"),
                &subject,
                &raw.water_type.span(),
            )
        });
        let listed: Vec<(Option<Id>, Range<usize>)> = raw
            .tanks
            .iter()
            .enumerate()
            .map(|(i, t)| (self.id(t, &format!("{path}.tanks[{i}]"), &format!("{subject}: tank id")), t.span()))
            .collect();
        if self.ctx.error_count() > errors {
            return None;
        }
        let (volume_l, volume_span) = volume?;
        let id = id?;
        let name = raw.name.as_ref().map(|n| n.get_ref().trim().to_string()).filter(|n| !n.is_empty());
        Some(BuiltSystem {
            system: System {
                name: name.unwrap_or_else(|| id.to_string()),
                id,
                volume_l,
                water_type: water_type?,
                salinity_g_l: salinity?,
                tanks: Vec::new(),
                notes: raw.notes.clone(),
            },
            listed,
            volume_span,
            id_span: raw.id.span(),
            index: entry.index,
        })
    }

    fn tank(&mut self, entry: &Entry<RawTank>, ids: &mut IdRegistry, today: Option<NaiveDate>) -> Option<BuiltTank> {
        let raw = &entry.raw;
        let path = format!("tanks[{}]", entry.index);
        let subject = format!("tank '{}'", raw.id.get_ref());
        let errors = self.ctx.error_count();
        let id = self.id(&raw.id, &format!("{path}.id"), "tank id");
        if let Some(id) = &id
            && !self.register(ids, id, "tank", raw.id.span(), &format!("{path}.id"))
        {
            return None;
        }
        let volume = self.volume(raw.volume_l.as_ref(), raw.volume_gal.as_ref(), &path, &subject, &entry.span);
        let stated_water = raw
            .water_type
            .as_ref()
            .and_then(|w| self.water_type(w, &format!("{path}.water_type"), &subject).map(|t| (t, w.span())));
        let stated_salinity = match &raw.salinity_g_l {
            Some(s) => self
                .within(*s.get_ref(), &s.span(), &format!("{path}.salinity_g_l"), &subject, Quantity::Salinity)
                .map(|v| (v, s.span())),
            None => None,
        };
        let species: Vec<(Option<Id>, Range<usize>, String)> = match &raw.species {
            None => Vec::new(),
            Some(list) => match list.get_ref() {
                OneOrMany::One(key) => {
                    let spanned = Spanned::new(list.span(), key.clone());
                    let field = format!("{path}.species");
                    vec![(self.id(&spanned, &field, &format!("{subject}: species key")), list.span(), field)]
                }
                OneOrMany::Many(keys) => keys
                    .iter()
                    .enumerate()
                    .map(|(i, k)| {
                        let field = format!("{path}.species[{i}]");
                        (self.id(k, &field, &format!("{subject}: species key")), k.span(), field)
                    })
                    .collect(),
            },
        };
        let mut species_at: Vec<(Id, Range<usize>, String)> = Vec::new();
        for (key, span, field) in species {
            let Some(key) = key else { continue };
            if species_at.iter().any(|(k, _, _)| k.matches(key.as_str())) {
                self.ctx.error(&span, &field, format!("{subject}: species '{key}' is listed twice"));
            } else {
                species_at.push((key, span, field));
            }
        }
        let stock_count = raw.stock_count.as_ref().map_or(0, |s| *s.get_ref());
        let no_species = match raw.species.as_ref().map(|s| s.get_ref()) {
            None => true,
            Some(OneOrMany::Many(list)) => list.is_empty(),
            Some(OneOrMany::One(_)) => false,
        };
        if stock_count > 0 && no_species {
            let span = raw.stock_count.as_ref().map_or(entry.span.clone(), |s| s.span());
            self.ctx.error(
                &span,
                &format!("{path}.stock_count"),
                format!("{subject} has {stock_count} animals but no species: add species = \"key\" (or a list for a mixed tank)"),
            );
        }
        let set_up = self.date(&raw.set_up, &format!("{path}.set_up"), &subject);
        if let (Some(date), Some(today)) = (set_up, today)
            && date > today
        {
            self.ctx.warn(
                &raw.set_up.span(),
                &format!("{path}.set_up"),
                format!("{subject} was set up on {date}, which is after today ({today}); check the date"),
            );
        }
        let declared_system = raw.system.as_ref().map(|s| (s.get_ref().clone(), s.span()));
        if self.ctx.error_count() > errors {
            return None;
        }
        let (volume_l, _) = volume?;
        Some(BuiltTank {
            tank: Tank {
                id: id?,
                volume_l,
                system: None,
                // Settled once systems and species are known.
                water_type: stated_water.as_ref().map_or(WaterType::Fresh, |(w, _)| *w),
                salinity_g_l: stated_salinity.as_ref().map_or(0.0, |(s, _)| *s),
                species: species_at.iter().map(|(k, _, _)| k.clone()).collect(),
                stock_count,
                set_up: set_up?,
                notes: raw.notes.clone(),
            },
            stated_water,
            stated_salinity,
            declared_system,
            species_at,
            species_span: raw.species.as_ref().map(|s| s.span()),
            entry_span: entry.span.clone(),
        })
    }

    fn date(&mut self, value: &Spanned<toml::Value>, field: &str, subject: &str) -> Option<NaiveDate> {
        let date = match value.get_ref() {
            toml::Value::Datetime(dt) => match (dt.date, dt.time) {
                (Some(d), None) => NaiveDate::from_ymd_opt(i32::from(d.year), u32::from(d.month), u32::from(d.day)),
                _ => None,
            },
            toml::Value::String(s) => NaiveDate::parse_from_str(s.trim(), "%Y-%m-%d").ok(),
            _ => None,
        };
        if date.is_none() {
            let shown = match value.get_ref() {
                toml::Value::String(s) => format!("'{s}'"),
                other => other.to_string(),
            };
            self.ctx.error(
                &value.span(),
                field,
                format!("{subject}: set_up {shown} is not a date; write the day like 2024-03-11"),
            );
        }
        date
    }

    /// Settles which tanks are on which system, from both sides of the file.
    fn membership(
        &mut self,
        raw_systems: &[Entry<RawSystem>],
        mut systems: Vec<Option<BuiltSystem>>,
        raw_tanks: &[Entry<RawTank>],
        mut tanks: Vec<Option<BuiltTank>>,
    ) -> (Vec<Option<BuiltSystem>>, Vec<Option<BuiltTank>>) {
        let tank_at: HashMap<String, usize> = tanks
            .iter()
            .enumerate()
            .filter_map(|(i, t)| t.as_ref().map(|t| (t.tank.id.as_str().to_ascii_lowercase(), i)))
            .collect();
        let tank_ids: Vec<&str> = raw_tanks.iter().map(|t| t.raw.id.get_ref().as_str()).collect();
        // tank index → (system index, span of the listing)
        let mut listed_on: HashMap<usize, (usize, Range<usize>)> = HashMap::new();
        for (si, system) in systems.iter().enumerate() {
            let Some(system) = system else { continue };
            for (li, (id, span)) in system.listed.iter().enumerate() {
                let Some(id) = id else { continue };
                let field = format!("systems[{}].tanks[{li}]", system.index);
                let subject = format!("system '{}'", system.system.id);
                let Some(&ti) = tank_at.get(&id.as_str().to_ascii_lowercase()) else {
                    if !self.is_unreadable(id.as_str()) {
                        self.ctx.error(
                            span,
                            &field,
                            format!(
                                "{subject} lists tank '{id}', but no [[tanks]] entry has that id{}",
                                suggest(id.as_str(), &tank_ids)
                            ),
                        );
                    }
                    continue;
                };
                match listed_on.get(&ti) {
                    None => {
                        listed_on.insert(ti, (si, span.clone()));
                    }
                    Some((sj, first)) if *sj == si => {
                        let line = self.ctx.line_of(first);
                        self.ctx.error(
                            span,
                            &field,
                            format!("{subject} lists tank '{id}' twice (also on line {line})"),
                        );
                    }
                    Some((sj, first)) => {
                        let line = self.ctx.line_of(first);
                        let other = systems[*sj].as_ref().map(|s| s.system.id.to_string()).unwrap_or_default();
                        self.ctx.error(
                            span,
                            &field,
                            format!("tank '{id}' is on two systems: listed under system '{other}' on line {line} and under {subject} here; a tank shares water with one system only"),
                        );
                    }
                }
            }
        }
        let system_ids: Vec<&str> = raw_systems.iter().map(|s| s.raw.id.get_ref().as_str()).collect();
        let system_at = |name: &str| systems.iter().position(|s| s.as_ref().is_some_and(|s| s.system.id.matches(name)));
        let mut on_system: Vec<Option<usize>> = vec![None; tanks.len()];
        for (ti, tank) in tanks.iter().enumerate() {
            let Some(tank) = tank else { continue };
            let listed = listed_on.get(&ti).map(|(si, _)| *si);
            on_system[ti] = listed;
            let Some((name, span)) = &tank.declared_system else { continue };
            let field = format!("tanks[{}].system", raw_tanks[ti].index);
            let subject = format!("tank '{}'", tank.tank.id);
            match system_at(name) {
                None => {
                    if !self.is_unreadable(name) {
                        let known = if system_ids.is_empty() {
                            "; the file defines no [[systems]]".to_string()
                        } else {
                            suggest(name, &system_ids)
                        };
                        self.ctx.error(
                            span,
                            &field,
                            format!("{subject} names system '{name}', which is not defined{known}"),
                        );
                    }
                }
                Some(si) => match listed {
                    Some(sj) if sj != si => {
                        let (other, line) =
                            listed_on.get(&ti).map(|(_, sp)| (sj, self.ctx.line_of(sp))).unwrap_or((sj, 0));
                        let other = systems[other].as_ref().map(|s| s.system.id.to_string()).unwrap_or_default();
                        self.ctx.error(
                            span,
                            &field,
                            format!("{subject} is on two systems: it says system '{name}' here, but system '{other}' lists it on line {line}; a tank shares water with one system only"),
                        );
                    }
                    _ => on_system[ti] = Some(si),
                },
            }
        }
        // Both sides agree from here: the system lists its tanks (listed order,
        // then tanks that name it, in file order) and each tank names its system.
        for (si, system) in systems.iter_mut().enumerate() {
            let Some(system) = system else { continue };
            let mut order: Vec<usize> = system
                .listed
                .iter()
                .filter_map(|(id, _)| {
                    id.as_ref().and_then(|id| tank_at.get(&id.as_str().to_ascii_lowercase()).copied())
                })
                .filter(|ti| on_system[*ti] == Some(si))
                .collect();
            order.dedup();
            let mut unique = Vec::new();
            for ti in order.into_iter().chain((0..tanks.len()).filter(|ti| on_system[*ti] == Some(si))) {
                if !unique.contains(&ti) {
                    unique.push(ti);
                }
            }
            system.system.tanks =
                unique.iter().filter_map(|ti| tanks[*ti].as_ref().map(|t| t.tank.id.clone())).collect();
            if system.system.tanks.is_empty() && system.listed.is_empty() {
                self.ctx.warn(
                    &system.id_span,
                    &format!("systems[{}].tanks", system.index),
                    format!(
                        "system '{}' has no tanks: list them here with tanks = [..], or give each tank system = \"{}\"",
                        system.system.id, system.system.id
                    ),
                );
            }
            for ti in unique {
                if let Some(t) = tanks[ti].as_mut() {
                    t.tank.system = Some(system.system.id.clone());
                }
            }
        }
        (systems, tanks)
    }

    /// Water type and salinity of each tank, and whether its species can live in it.
    fn water_and_species(
        &mut self,
        raw_tanks: &[Entry<RawTank>],
        tanks: &mut [Option<BuiltTank>],
        systems: &[Option<BuiltSystem>],
        raw_species: &[Entry<RawSpecies>],
        species: &[Option<BuiltSpecies>],
        orphans: &[String],
    ) {
        let keys: Vec<&str> = raw_species.iter().map(|s| s.raw.key.get_ref().as_str()).collect();
        let profiles: Vec<&SpeciesProfile> = species.iter().flatten().map(|s| &s.profile).collect();
        for (entry, tank) in raw_tanks.iter().zip(tanks.iter_mut()) {
            let Some(t) = tank else { continue };
            let on_broken_system = t.tank.system.is_none()
                && (t.declared_system.is_some() || orphans.contains(&t.tank.id.as_str().to_ascii_lowercase()));
            let path = format!("tanks[{}]", entry.index);
            let subject = format!("tank '{}'", t.tank.id);
            let mut found: Vec<(&SpeciesProfile, &Range<usize>, &str)> = Vec::new();
            let mut unresolved = false;
            for (key, span, field) in &t.species_at {
                match profiles.iter().find(|p| p.key.matches(key.as_str())) {
                    Some(p) => found.push((p, span, field)),
                    None => {
                        unresolved = true;
                        if !self.is_unreadable(key.as_str()) {
                            let known = if keys.is_empty() {
                                "; the file defines no [[species]]".to_string()
                            } else {
                                suggest(key.as_str(), &keys)
                            };
                            self.ctx.error(span, field, format!("{subject}: unknown species '{key}'{known}"));
                        }
                    }
                }
            }
            // Tanks name species as the profile spells its key.
            t.tank.species = found.iter().map(|(p, _, _)| p.key.clone()).collect();
            let system = t.tank.system.as_ref().and_then(|id| systems.iter().flatten().find(|s| &s.system.id == id));
            let (water, salinity, place) = match system {
                Some(sys) => {
                    let sys = &sys.system;
                    if let Some((w, span)) = &t.stated_water
                        && *w != sys.water_type
                    {
                        self.ctx.error(
                            span,
                            &format!("{path}.water_type"),
                            format!(
                                "{subject} is on system '{}', which holds {} water, but its water_type says {w}; a tank on a system holds the system's water (remove water_type here or correct it)",
                                sys.id, sys.water_type
                            ),
                        );
                    }
                    if let Some((s, span)) = &t.stated_salinity
                        && (s - sys.salinity_g_l).abs() > SALINITY_SAME_G_L
                    {
                        self.ctx.error(
                            span,
                            &format!("{path}.salinity_g_l"),
                            format!(
                                "{subject} is on system '{}', run at {} g/L, but its salinity_g_l says {}; a tank on a system holds the system's water (remove salinity_g_l here or correct it)",
                                sys.id,
                                amount(sys.salinity_g_l),
                                amount(*s)
                            ),
                        );
                    }
                    (sys.water_type, sys.salinity_g_l, format!(" (system '{}')", sys.id))
                }
                None if on_broken_system => continue,
                None => {
                    let water = match &t.stated_water {
                        Some((w, _)) => *w,
                        None if unresolved => continue,
                        None => match found.first().map(|(p, _, _)| p.water_type) {
                            None => {
                                self.ctx.error(
                                    &t.entry_span,
                                    &format!("{path}.water_type"),
                                    format!("{subject} is standalone and has no species: state its water_type (fresh, brackish or marine)"),
                                );
                                continue;
                            }
                            Some(first)
                                if first != WaterType::Brackish
                                    && found.iter().all(|(p, _, _)| p.water_type == first) =>
                            {
                                first
                            }
                            Some(_) => {
                                let span = t.species_span.clone().unwrap_or_else(|| t.entry_span.clone());
                                self.ctx.error(
                                    &span,
                                    &format!("{path}.water_type"),
                                    format!("{subject}: state its water_type (fresh, brackish or marine); it cannot be told from its species"),
                                );
                                continue;
                            }
                        },
                    };
                    let water_span = t.stated_water.as_ref().map_or_else(|| t.entry_span.clone(), |(_, s)| s.clone());
                    let Some(salinity) = self.salinity_for(
                        water,
                        entry.raw.salinity_g_l.as_ref(),
                        &format!("{path}.salinity_g_l"),
                        &subject,
                        &water_span,
                    ) else {
                        continue;
                    };
                    (water, salinity, String::new())
                }
            };
            t.tank.water_type = water;
            t.tank.salinity_g_l = salinity;
            for (p, span, field) in &found {
                let clash = match (p.water_type, water) {
                    (WaterType::Marine, WaterType::Fresh | WaterType::Brackish) => Some("a marine species"),
                    (WaterType::Fresh, WaterType::Marine) => Some("a freshwater species"),
                    _ => None,
                };
                if let Some(kind) = clash {
                    self.ctx.error(
                        span,
                        field,
                        format!("{subject} holds {water} water{place}, but '{}' is {kind}", p.key),
                    );
                } else if salinity > p.salt_tolerance_g_l + SALINITY_SAME_G_L {
                    self.ctx.error(
                        span,
                        field,
                        format!(
                            "{subject} is run at {} g/L{place}, above the {} g/L that '{}' tolerates (its salt_tolerance_g_l)",
                            amount(salinity),
                            amount(p.salt_tolerance_g_l),
                            p.key
                        ),
                    );
                }
            }
            if found.len() > 1 {
                let span = t.species_span.clone().unwrap_or_else(|| t.entry_span.clone());
                let field = format!("{path}.species");
                let all: Vec<&SpeciesProfile> = found.iter().map(|(p, _, _)| *p).collect();
                let list = |b: fn(&SpeciesProfile) -> Bounds, unit: &str| {
                    all.iter()
                        .map(|p| format!("'{}' {}–{}{unit}", p.key, amount(b(p).min), amount(b(p).max)))
                        .collect::<Vec<_>>()
                        .join(", ")
                };
                let meet = |b: fn(&SpeciesProfile) -> Bounds| {
                    all.iter().skip(1).try_fold(b(all[0]), |acc, p| acc.intersect(&b(p)))
                };
                if meet(|p| p.temp_c).is_none() {
                    self.ctx.error(
                        &span,
                        &field,
                        format!("{subject}: no temperature suits all its species: {}", list(|p| p.temp_c, " °C")),
                    );
                }
                if meet(|p| p.ph).is_none() {
                    self.ctx.error(
                        &span,
                        &field,
                        format!("{subject}: no pH suits all its species: {}", list(|p| p.ph, "")),
                    );
                }
            }
        }
    }

    fn system_volumes(
        &mut self,
        raw_systems: &[Entry<RawSystem>],
        systems: &[Option<BuiltSystem>],
        tanks: &[Option<BuiltTank>],
    ) {
        for (entry, system) in raw_systems.iter().zip(systems) {
            let Some(system) = system else { continue };
            let on: Vec<&Tank> = tanks
                .iter()
                .flatten()
                .map(|t| &t.tank)
                .filter(|t| t.system.as_ref() == Some(&system.system.id))
                .collect();
            let sum: f64 = on.iter().map(|t| t.volume_l).sum();
            if system.system.volume_l < sum {
                self.ctx.error(
                    &system.volume_span,
                    &format!("systems[{}].volume", entry.index),
                    format!(
                        "system '{}' holds {} in all, less than the {} of its {} tanks; the system volume is the whole shared water: tanks plus sump and pipes",
                        system.system.id,
                        self.show_volume(system.system.volume_l),
                        self.show_volume(sum),
                        on.len()
                    ),
                );
            }
        }
    }

    fn round_order(
        &mut self,
        order: Option<&Spanned<OneOrMany>>,
        systems: &[Option<BuiltSystem>],
        tanks: &[Option<BuiltTank>],
    ) -> Option<RoundOrder> {
        let Some(order) = order else { return Some(RoundOrder::AsListed) };
        let field = "room.round_order";
        let items = match order.get_ref() {
            OneOrMany::One(word) => {
                let w = word.trim().to_ascii_lowercase().replace(['_', ' '], "-");
                if w == "as-listed" {
                    return Some(RoundOrder::AsListed);
                }
                self.ctx.error(
                    &order.span(),
                    field,
                    format!("[room]: round_order '{word}' is not known; write \"as-listed\" or a list of system and tank ids, like [\"RACK-A\", \"Q-01\"]"),
                );
                return None;
            }
            OneOrMany::Many(items) => items,
        };
        if items.is_empty() {
            self.ctx.error(
                &order.span(),
                field,
                "[room]: round_order is an empty list; write \"as-listed\" or list system and tank ids",
            );
            return None;
        }
        let all_tanks: Vec<&Tank> = tanks.iter().flatten().map(|t| &t.tank).collect();
        let all_systems: Vec<&System> = systems.iter().flatten().map(|s| &s.system).collect();
        let names: Vec<&str> =
            all_systems.iter().map(|s| s.id.as_str()).chain(all_tanks.iter().map(|t| t.id.as_str())).collect();
        let errors = self.ctx.error_count();
        let mut ids = Vec::new();
        // tank id → the round_order entry that reached it, and where
        let mut reached: HashMap<String, (String, Range<usize>)> = HashMap::new();
        for (i, item) in items.iter().enumerate() {
            let field = format!("{field}[{i}]");
            let name = item.get_ref();
            let (canonical, reaches): (Id, Vec<&Tank>) = if let Some(t) = all_tanks.iter().find(|t| t.id.matches(name))
            {
                (t.id.clone(), vec![*t])
            } else if let Some(s) = all_systems.iter().find(|s| s.id.matches(name)) {
                (s.id.clone(), all_tanks.iter().copied().filter(|t| t.system.as_ref() == Some(&s.id)).collect())
            } else {
                if !self.is_unreadable(name) {
                    self.ctx.error(
                        &item.span(),
                        &field,
                        format!(
                            "[room]: round_order names '{name}', which is neither a system nor a tank{}",
                            suggest(name, &names)
                        ),
                    );
                }
                continue;
            };
            for t in reaches {
                let key = t.id.as_str().to_ascii_lowercase();
                if let Some((first, _)) = reached.get(&key) {
                    let already = if t.id.matches(first) {
                        "it is named earlier".to_string()
                    } else {
                        format!("system '{first}', named earlier, includes it")
                    };
                    let here =
                        if t.id.matches(name) { String::new() } else { format!(" through system '{canonical}'") };
                    self.ctx.error(
                        &item.span(),
                        &field,
                        format!("[room]: round_order reaches tank '{}' a second time here{here}: {already}; each tank is walked once", t.id),
                    );
                } else {
                    reached.insert(key, (canonical.to_string(), item.span()));
                }
            }
            ids.push(canonical);
        }
        let missed: Vec<&str> = all_tanks
            .iter()
            .filter(|t| !reached.contains_key(&t.id.as_str().to_ascii_lowercase()))
            .map(|t| t.id.as_str())
            .collect();
        if !missed.is_empty() && self.ctx.error_count() == errors {
            self.ctx.warn(
                &order.span(),
                field,
                format!("[room]: round_order does not reach {}: walked last, in file order", list_some(&missed, 8)),
            );
        }
        (self.ctx.error_count() == errors).then_some(RoundOrder::Ids(ids))
    }
}

/// The last segment of a field path.
fn leaf(field: &str) -> &str {
    let last = field.rsplit('.').next().unwrap_or(field);
    last.split('[').next().unwrap_or(last)
}

/// "(did you mean 'x'?)" or the list of what there is.
fn suggest(name: &str, known: &[&str]) -> String {
    match closest(name, known) {
        Some(near) => format!(" (did you mean '{near}'?)"),
        None if known.is_empty() => String::new(),
        None => format!("; known: {}", list_some(known, 12)),
    }
}

/// "a", "a and b", "a, b and c".
fn and_list(names: &[&str]) -> String {
    match names {
        [] => String::new(),
        [one] => one.to_string(),
        [rest @ .., last] => format!("{} and {last}", rest.join(", ")),
    }
}

/// Up to `max` names, then how many more.
fn list_some(names: &[&str], max: usize) -> String {
    let mut out = names.iter().take(max).copied().collect::<Vec<_>>().join(", ");
    if names.len() > max {
        out.push_str(&format!(" and {} more", names.len() - max));
    }
    out
}

/// A number for a message: at most two decimals, no trailing zeros.
fn amount(x: f64) -> String {
    let s = format!("{x:.2}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" { "0".into() } else { s.to_string() }
}
