//! Records: what a person measured, saw and did at a tank or a system.
//!
//! Three kinds of record exist, all immutable once saved:
//!
//! - a [`Reading`]: measurements, each kept exactly as entered (value and
//!   unit or kit basis), with canonical values derived by methods, plus
//!   observations of the fish and a note;
//! - an [`Event`]: something done to the water or the stock (water change,
//!   medication, salt, ...);
//! - a [`Correction`]: a later record that supersedes an earlier one with a
//!   replacement (or withdraws it) and says why. The original stays; the
//!   history shows the current value and the trail that led to it.
//!
//! Every value is checked with [`crate::core::limits`] by [`Record::check`],
//! which callers run on anything built from user input or read from a file;
//! its errors name the [`Field`].
//!
//! The serde form (JSON) is the stored form, the journal's line format and the
//! sync format: see `docs/journal-format.md`. Unknown fields are refused so
//! that nothing is silently dropped on a round trip.

use std::fmt;
use std::str::FromStr;

use chrono::{DateTime, FixedOffset};
use serde::{Deserialize, Serialize};
use ulid::Ulid;

use crate::core::limits::{self, Quantity, RangeError, Unusual};
use crate::core::salinity::SalinityReading;
use crate::core::sample::WaterSample;
use crate::core::units::{self, AmmoniaBasis, NitrogenIonBasis};

/// Longest tank or system id, in characters.
pub const MAX_TARGET_ID_CHARS: usize = 64;
/// Longest operator name, in characters.
pub const MAX_OPERATOR_CHARS: usize = 100;
/// Longest note, reason or medication name, in characters.
pub const MAX_TEXT_CHARS: usize = 4000;
/// Most deaths or fish one record may count (a sanity limit; common practice, no source).
pub const MAX_FISH_COUNT: u32 = 1_000_000;
/// Most salt one event may record, grams (one tonne; a sanity limit, no source).
pub const MAX_SALT_GRAMS: f64 = 1_000_000.0;

/// The laptop (strictly: the data folder) a record was made on.
///
/// Created once, at the first use of a data folder, and kept with the store
/// and in the journal's header; sync keeps each device's records apart by it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(transparent)]
pub struct DeviceId(pub Ulid);

impl DeviceId {
    /// A new, random device id.
    pub fn generate() -> DeviceId {
        DeviceId(Ulid::generate())
    }
}

impl fmt::Display for DeviceId {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.0)
    }
}

impl FromStr for DeviceId {
    type Err = ulid::DecodeError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Ulid::from_string(s.trim()).map(DeviceId)
    }
}

/// What a reading or an event is about: one tank, or a system of tanks
/// sharing water (which then applies to every tank on it).
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Target {
    /// A tank or tub, by the id written on it.
    Tank(String),
    /// A system (shared water: racks on one sump), by its id.
    System(String),
}

impl Target {
    /// The tank or system id.
    pub fn id(&self) -> &str {
        match self {
            Target::Tank(id) | Target::System(id) => id,
        }
    }

    /// `"tank"` or `"system"`.
    pub fn kind_name(&self) -> &'static str {
        match self {
            Target::Tank(_) => "tank",
            Target::System(_) => "system",
        }
    }

    /// The tank id, when this is a tank.
    pub fn tank(&self) -> Option<&str> {
        match self {
            Target::Tank(id) => Some(id),
            Target::System(_) => None,
        }
    }

    /// The system id, when this is a system.
    pub fn system(&self) -> Option<&str> {
        match self {
            Target::System(id) => Some(id),
            Target::Tank(_) => None,
        }
    }

    /// Checks the id: 1 to [`MAX_TARGET_ID_CHARS`] characters, no control
    /// characters, no space at either end.
    pub fn check(&self) -> Result<(), RecordError> {
        let id = self.id();
        let what = self.kind_name();
        if id.is_empty() {
            return Err(RecordError::invalid(Field::Target, format!("the {what} id is empty")));
        }
        if id.chars().count() > MAX_TARGET_ID_CHARS {
            return Err(RecordError::invalid(
                Field::Target,
                format!("the {what} id is longer than {MAX_TARGET_ID_CHARS} characters"),
            ));
        }
        if id.chars().any(char::is_control) {
            return Err(RecordError::invalid(Field::Target, format!("the {what} id contains a control character")));
        }
        if id.trim() != id {
            return Err(RecordError::invalid(
                Field::Target,
                format!("the {what} id '{id}' starts or ends with a space"),
            ));
        }
        Ok(())
    }
}

impl fmt::Display for Target {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} {}", self.kind_name(), self.id())
    }
}

/// One saved record: who, when, on which device, and what.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Record {
    /// Unique id, created with the record; its time part is when it was made.
    pub id: Ulid,
    /// The device the record was made on.
    pub device: DeviceId,
    /// Who took the reading or did the work.
    pub operator: String,
    /// When the sample was taken or the work done: a UTC instant plus the
    /// local offset it was taken at.
    pub taken_at: DateTime<FixedOffset>,
    /// What the record says.
    pub body: RecordBody,
}

impl Record {
    /// A new record with a fresh id.
    pub fn new(
        device: DeviceId,
        operator: impl Into<String>,
        taken_at: DateTime<FixedOffset>,
        body: RecordBody,
    ) -> Record {
        Record { id: Ulid::generate(), device, operator: operator.into(), taken_at, body }
    }

    /// Checks every field; returns the accepted-but-unusual values as warnings.
    pub fn check(&self) -> Result<Vec<FieldWarning>, RecordError> {
        check_text(Field::Operator, &self.operator, MAX_OPERATOR_CHARS, false)?;
        if self.operator.trim().is_empty() {
            return Err(RecordError::invalid(Field::Operator, "the operator's name is empty"));
        }
        self.body.check()
    }

    /// Time order of records: when taken, then id.
    pub fn time_key(&self) -> (i64, Ulid) {
        (self.taken_at.timestamp_millis(), self.id)
    }
}

/// What a record says: a reading, an event or a correction.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum RecordBody {
    /// Measurements and observations.
    Reading(Reading),
    /// Something done to the water or the stock.
    Event(Event),
    /// A replacement for (or withdrawal of) an earlier record.
    Correction(Correction),
    /// A tank or system passed over on a round, and why.
    Skip(Skip),
}

impl RecordBody {
    /// `"reading"`, `"event"`, `"correction"` or `"skip"`.
    pub fn kind_name(&self) -> &'static str {
        match self {
            RecordBody::Reading(_) => "reading",
            RecordBody::Event(_) => "event",
            RecordBody::Correction(_) => "correction",
            RecordBody::Skip(_) => "skip",
        }
    }

    /// The tank or system the record is about; for a correction, the target
    /// of its replacement (none for a withdrawal).
    pub fn target(&self) -> Option<&Target> {
        match self {
            RecordBody::Reading(r) => Some(&r.target),
            RecordBody::Event(e) => Some(&e.target),
            RecordBody::Correction(c) => c.replacement.as_deref().and_then(RecordBody::target),
            RecordBody::Skip(s) => Some(&s.target),
        }
    }

    /// The reading, when this is one.
    pub fn as_reading(&self) -> Option<&Reading> {
        match self {
            RecordBody::Reading(r) => Some(r),
            _ => None,
        }
    }

    /// The event, when this is one.
    pub fn as_event(&self) -> Option<&Event> {
        match self {
            RecordBody::Event(e) => Some(e),
            _ => None,
        }
    }

    /// The correction, when this is one.
    pub fn as_correction(&self) -> Option<&Correction> {
        match self {
            RecordBody::Correction(c) => Some(c),
            _ => None,
        }
    }

    /// The free text a person wrote: a reading's or event's note, a skip's reason.
    pub fn note(&self) -> Option<&str> {
        match self {
            RecordBody::Reading(r) => r.note.as_deref(),
            RecordBody::Event(e) => e.note.as_deref(),
            RecordBody::Correction(_) => None,
            RecordBody::Skip(s) => Some(&s.reason),
        }
    }

    /// The skip, when this is one.
    pub fn as_skip(&self) -> Option<&Skip> {
        match self {
            RecordBody::Skip(s) => Some(s),
            _ => None,
        }
    }

    /// Checks every field; returns the accepted-but-unusual values as warnings.
    pub fn check(&self) -> Result<Vec<FieldWarning>, RecordError> {
        match self {
            RecordBody::Reading(r) => r.check(),
            RecordBody::Event(e) => e.check().map(|()| Vec::new()),
            RecordBody::Correction(c) => c.check(),
            RecordBody::Skip(s) => s.check().map(|()| Vec::new()),
        }
    }
}

/// A tank or system passed over on a round: the round report lists it with
/// its reason instead of as "not reached".
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Skip {
    /// The tank or system skipped.
    pub target: Target,
    /// Why (tank empty, being moved, no access, kit ran out...).
    pub reason: String,
}

impl Skip {
    /// Checks the target and the reason.
    pub fn check(&self) -> Result<(), RecordError> {
        self.target.check()?;
        check_text(Field::Reason, &self.reason, MAX_TEXT_CHARS, true)?;
        if self.reason.trim().is_empty() {
            return Err(RecordError::invalid(Field::Reason, "a skip needs a reason"));
        }
        Ok(())
    }
}

/// Water readings and what was seen of the fish, at one tank or system.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Reading {
    /// Where the water was sampled.
    pub target: Target,
    /// What was measured, as entered.
    #[serde(default)]
    pub measurements: Measurements,
    /// What was seen of the fish.
    #[serde(default)]
    pub observations: Observations,
    /// A free note.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
}

impl Reading {
    /// A reading of `target` with nothing measured or seen yet.
    pub fn new(target: Target) -> Reading {
        Reading { target, measurements: Measurements::default(), observations: Observations::default(), note: None }
    }

    /// The sample the chemistry needs, when temperature, pH and total ammonia
    /// were all measured (fresh water when no salinity was measured).
    pub fn water_sample(&self) -> Option<WaterSample> {
        self.measurements.water_sample(0.0)
    }

    /// True when nothing was measured, no sign or death was seen and no note written.
    pub fn is_empty(&self) -> bool {
        self.measurements.is_empty() && self.observations.is_empty() && self.note.is_none()
    }

    /// Checks every field; returns the accepted-but-unusual values as warnings.
    pub fn check(&self) -> Result<Vec<FieldWarning>, RecordError> {
        self.target.check()?;
        if let Some(note) = &self.note {
            check_note(note)?;
        }
        self.observations.check()?;
        if self.measurements.is_empty() && self.observations.is_empty() {
            return Err(RecordError::invalid(
                Field::Measurements,
                "nothing was measured or observed (give at least one value, sign or death count)",
            ));
        }
        self.measurements.check()
    }
}

/// Temperature units a reading may be entered in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum TemperatureUnit {
    /// Degrees Celsius.
    C,
    /// Degrees Fahrenheit.
    F,
}

/// A temperature as entered.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Temperature {
    /// The number read.
    pub value: f64,
    /// Its unit.
    pub unit: TemperatureUnit,
}

impl Temperature {
    /// A temperature in °C.
    pub fn celsius(value: f64) -> Temperature {
        Temperature { value, unit: TemperatureUnit::C }
    }

    /// A temperature in °F.
    pub fn fahrenheit(value: f64) -> Temperature {
        Temperature { value, unit: TemperatureUnit::F }
    }

    /// The temperature in °C.
    pub fn celsius_value(&self) -> f64 {
        match self.unit {
            TemperatureUnit::C => self.value,
            TemperatureUnit::F => units::fahrenheit_to_celsius(self.value),
        }
    }
}

/// Total ammonia as the kit reports it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TotalAmmonia {
    /// mg/L on the kit's basis.
    pub value: f64,
    /// The kit's basis (as N, as NH3, as NH4+).
    #[serde(rename = "as")]
    pub basis: AmmoniaBasis,
}

/// Nitrite or nitrate as the kit reports it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct NitrogenReading {
    /// mg/L on the kit's basis.
    pub value: f64,
    /// The kit's basis (as N, or as the ion).
    #[serde(rename = "as")]
    pub basis: NitrogenIonBasis,
}

/// Units total alkalinity may be entered in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum AlkalinityUnit {
    /// mg/L as CaCO3.
    MgLCaco3,
    /// German degrees of carbonate hardness (°dKH).
    Dkh,
    /// Milliequivalents per litre.
    MeqL,
}

/// Atomic weight of calcium (g/mol), IUPAC conventional value (Meija et al. 2016).
const CA: f64 = 40.078;
/// Atomic weight of carbon (g/mol), IUPAC conventional value (Meija et al. 2016).
const C: f64 = 12.011;
/// Molar mass of calcium carbonate, CaCO3 (g/mol).
const M_CACO3: f64 = CA + C + 3.0 * units::O;
/// Molar mass of calcium oxide, CaO (g/mol).
const M_CAO: f64 = CA + units::O;

impl AlkalinityUnit {
    /// mg/L as CaCO3 per unit.
    ///
    /// One German degree is 10 mg CaO/L (DIN 38409-6 definition, from memory),
    /// so 10 · M(CaCO3)/M(CaO) = 17.848 mg/L CaCO3; one milliequivalent of
    /// CaCO3 is half its molar mass in mg, 50.04 mg.
    pub fn mg_l_caco3_per_unit(self) -> f64 {
        match self {
            AlkalinityUnit::MgLCaco3 => 1.0,
            AlkalinityUnit::Dkh => 10.0 * M_CACO3 / M_CAO,
            AlkalinityUnit::MeqL => M_CACO3 / 2.0,
        }
    }

    /// The unit as printed.
    pub fn label(self) -> &'static str {
        match self {
            AlkalinityUnit::MgLCaco3 => "mg/L CaCO3",
            AlkalinityUnit::Dkh => "dKH",
            AlkalinityUnit::MeqL => "meq/L",
        }
    }
}

impl FromStr for AlkalinityUnit {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "caco3" | "mg/l" | "mg-l" | "mg_l_caco3" | "ppm" => Ok(AlkalinityUnit::MgLCaco3),
            "dkh" | "kh" => Ok(AlkalinityUnit::Dkh),
            "meq" | "meq/l" | "meq-l" | "meq_l" => Ok(AlkalinityUnit::MeqL),
            other => Err(format!("'{other}' is not an alkalinity unit (use caco3, dkh or meq)")),
        }
    }
}

/// Total alkalinity as entered.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Alkalinity {
    /// The number read.
    pub value: f64,
    /// Its unit.
    pub unit: AlkalinityUnit,
}

impl Alkalinity {
    /// mg/L as CaCO3.
    pub fn mg_l_caco3(&self) -> f64 {
        self.value * self.unit.mg_l_caco3_per_unit()
    }
}

/// What was measured: any of these, each exactly as entered.
///
/// Canonical values come from the methods (°C, mg TAN-N/L, mg NO2-N/L,
/// mg NO3-N/L, g/L, mg/L, mg/L CaCO3).
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Measurements {
    /// Water temperature.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temperature: Option<Temperature>,
    /// pH (NBS-buffer electrode or kit reading).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ph: Option<f64>,
    /// Total ammonia on the kit's basis.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub total_ammonia: Option<TotalAmmonia>,
    /// Nitrite on the kit's basis.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub nitrite: Option<NitrogenReading>,
    /// Nitrate on the kit's basis.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub nitrate: Option<NitrogenReading>,
    /// Salinity, specific gravity or conductivity, as the instrument gives it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub salinity: Option<SalinityReading>,
    /// Dissolved oxygen, mg/L.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dissolved_oxygen_mg_l: Option<f64>,
    /// Chloride, mg/L.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub chloride_mg_l: Option<f64>,
    /// Total alkalinity.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub alkalinity: Option<Alkalinity>,
}

impl Measurements {
    /// True when nothing was measured.
    pub fn is_empty(&self) -> bool {
        *self == Measurements::default()
    }

    /// The sample the chemistry needs, when temperature, pH and total ammonia
    /// were all measured; without a measured salinity, `default_salinity`
    /// (the g/L the tank or system is run at).
    pub fn water_sample(&self, default_salinity: f64) -> Option<WaterSample> {
        Some(WaterSample {
            temp_c: self.temp_c()?,
            ph: self.ph?,
            tan_n_mg_l: self.tan_n_mg_l()?,
            salinity_ppt: self.salinity_ppt().unwrap_or(default_salinity),
            do_mg_l: self.dissolved_oxygen_mg_l,
        })
    }

    /// Temperature, °C.
    pub fn temp_c(&self) -> Option<f64> {
        self.temperature.map(|t| t.celsius_value())
    }

    /// Total ammonia nitrogen, mg TAN-N/L.
    pub fn tan_n_mg_l(&self) -> Option<f64> {
        self.total_ammonia.map(|a| a.basis.to_tan_n(a.value))
    }

    /// Nitrite, mg NO2-N/L.
    pub fn nitrite_n_mg_l(&self) -> Option<f64> {
        self.nitrite.map(|n| units::nitrite_to_n(n.value, n.basis))
    }

    /// Nitrate, mg NO3-N/L.
    pub fn nitrate_n_mg_l(&self) -> Option<f64> {
        self.nitrate.map(|n| units::nitrate_to_n(n.value, n.basis))
    }

    /// Practical salinity, ≈ g/L.
    pub fn salinity_ppt(&self) -> Option<f64> {
        self.salinity.map(|s| s.practical_salinity())
    }

    /// Total alkalinity, mg/L as CaCO3.
    pub fn alkalinity_mg_l_caco3(&self) -> Option<f64> {
        self.alkalinity.map(|a| a.mg_l_caco3())
    }

    /// Checks every value against its quantity's ranges.
    pub fn check(&self) -> Result<Vec<FieldWarning>, RecordError> {
        let mut warnings = Vec::new();
        if let Some(t) = self.temperature {
            check_temperature(Field::Temperature, t, &mut warnings)?;
        }
        if let Some(ph) = self.ph {
            check_value(Field::Ph, Quantity::Ph, ph, &mut warnings)?;
        }
        if let Some(a) = self.total_ammonia {
            check_value(Field::TotalAmmonia, Quantity::TotalAmmonia, a.value, &mut warnings)?;
        }
        if let Some(n) = self.nitrite {
            check_value(Field::Nitrite, Quantity::Nitrite, n.value, &mut warnings)?;
        }
        if let Some(n) = self.nitrate {
            check_value(Field::Nitrate, Quantity::Nitrate, n.value, &mut warnings)?;
        }
        if let Some(s) = self.salinity {
            check_salinity(s, &mut warnings)?;
        }
        if let Some(d) = self.dissolved_oxygen_mg_l {
            check_value(Field::DissolvedOxygen, Quantity::DissolvedOxygen, d, &mut warnings)?;
        }
        if let Some(c) = self.chloride_mg_l {
            check_value(Field::Chloride, Quantity::Chloride, c, &mut warnings)?;
        }
        if let Some(a) = self.alkalinity {
            check_alkalinity(a, &mut warnings)?;
        }
        Ok(warnings)
    }
}

/// A sign of distress a person can see in the fish.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Sign {
    /// Gasping at the surface.
    Gasping,
    /// Darting, hyperactivity.
    Hyperactive,
    /// Nervous signs: loss of balance, spasms, twitching.
    NervousSigns,
    /// Cloudy eyes.
    CloudyEyes,
    /// Excess mucus on skin or gills.
    ExcessMucus,
}

impl Sign {
    /// Every sign, in the order they are offered.
    pub const ALL: [Sign; 5] =
        [Sign::Gasping, Sign::Hyperactive, Sign::NervousSigns, Sign::CloudyEyes, Sign::ExcessMucus];

    /// The name used on the command line and in output.
    pub fn name(self) -> &'static str {
        match self {
            Sign::Gasping => "gasping",
            Sign::Hyperactive => "hyperactive",
            Sign::NervousSigns => "nervous-signs",
            Sign::CloudyEyes => "cloudy-eyes",
            Sign::ExcessMucus => "excess-mucus",
        }
    }
}

impl fmt::Display for Sign {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Sign {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let wanted = s.trim().to_ascii_lowercase().replace('_', "-");
        Sign::ALL.into_iter().find(|sign| sign.name() == wanted).ok_or_else(|| {
            let names: Vec<_> = Sign::ALL.iter().map(|s| s.name()).collect();
            format!("'{}' is not a sign (use {})", s.trim(), names.join(", "))
        })
    }
}

/// What was seen of the fish.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Observations {
    /// Gasping at the surface.
    pub gasping: bool,
    /// Darting, hyperactivity.
    pub hyperactive: bool,
    /// Nervous signs: loss of balance, spasms, twitching.
    pub nervous_signs: bool,
    /// Cloudy eyes.
    pub cloudy_eyes: bool,
    /// Excess mucus on skin or gills.
    pub excess_mucus: bool,
    /// Fish found dead.
    pub deaths: u32,
}

impl Observations {
    /// Whether `sign` was seen.
    pub fn has(&self, sign: Sign) -> bool {
        match sign {
            Sign::Gasping => self.gasping,
            Sign::Hyperactive => self.hyperactive,
            Sign::NervousSigns => self.nervous_signs,
            Sign::CloudyEyes => self.cloudy_eyes,
            Sign::ExcessMucus => self.excess_mucus,
        }
    }

    /// Marks `sign` as seen (or not).
    pub fn set(&mut self, sign: Sign, seen: bool) {
        let slot = match sign {
            Sign::Gasping => &mut self.gasping,
            Sign::Hyperactive => &mut self.hyperactive,
            Sign::NervousSigns => &mut self.nervous_signs,
            Sign::CloudyEyes => &mut self.cloudy_eyes,
            Sign::ExcessMucus => &mut self.excess_mucus,
        };
        *slot = seen;
    }

    /// The signs seen, in [`Sign::ALL`] order.
    pub fn signs(&self) -> Vec<Sign> {
        Sign::ALL.into_iter().filter(|s| self.has(*s)).collect()
    }

    /// True when the fish show any sign of distress.
    pub fn any_sign(&self) -> bool {
        Sign::ALL.into_iter().any(|s| self.has(s))
    }

    /// True when no sign and no death was recorded.
    pub fn is_empty(&self) -> bool {
        !self.any_sign() && self.deaths == 0
    }

    /// Checks the death count.
    pub fn check(&self) -> Result<(), RecordError> {
        if self.deaths > MAX_FISH_COUNT {
            return Err(RecordError::invalid(
                Field::Deaths,
                format!("{} deaths is more than one record may count ({MAX_FISH_COUNT})", self.deaths),
            ));
        }
        Ok(())
    }
}

/// Something done to the water or the stock of a tank or system.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Event {
    /// Where it was done.
    pub target: Target,
    /// What was done.
    #[serde(rename = "event")]
    pub kind: EventKind,
    /// A free note.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
}

impl Event {
    /// Checks every field.
    pub fn check(&self) -> Result<(), RecordError> {
        self.target.check()?;
        if let Some(note) = &self.note {
            check_note(note)?;
        }
        self.kind.check()
    }
}

/// The class of a medication: antibiotics can kill the nitrifying bacteria.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum MedicationClass {
    /// An antibiotic.
    Antibiotic,
    /// Anything else (antiparasitic, antifungal, ...).
    Other,
}

impl MedicationClass {
    /// The name used on the command line and in output.
    pub fn name(self) -> &'static str {
        match self {
            MedicationClass::Antibiotic => "antibiotic",
            MedicationClass::Other => "other",
        }
    }
}

impl FromStr for MedicationClass {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "antibiotic" => Ok(MedicationClass::Antibiotic),
            "other" => Ok(MedicationClass::Other),
            other => Err(format!("'{other}' is not a medication class (use antibiotic or other)")),
        }
    }
}

/// The kinds of event.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(tag = "type", rename_all = "snake_case", deny_unknown_fields)]
pub enum EventKind {
    /// Part of the water replaced with source water.
    WaterChange {
        /// Percent of the water volume replaced.
        percent: f64,
        /// pH of the source water, when measured.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        source_ph: Option<f64>,
        /// Total ammonia of the source water, mg TAN-N/L, when measured.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        source_tan_n_mg_l: Option<f64>,
        /// Temperature of the source water, °C, when measured.
        #[serde(default, skip_serializing_if = "Option::is_none")]
        source_temp_c: Option<f64>,
        /// Whether chlorine and chloramine were removed from the source water.
        dechlorinated: bool,
    },
    /// Feeding stopped.
    FeedingHeld,
    /// Feeding started again.
    FeedingResumed,
    /// A medication given.
    Medication {
        /// Antibiotic or other.
        class: MedicationClass,
        /// Product or substance name.
        name: String,
    },
    /// Filter media cleaned.
    FilterCleaned {
        /// Whether the media were rinsed in tap (chlorinated) water.
        rinsed_in_tap_water: bool,
    },
    /// Gravel or sand replaced.
    SubstrateReplaced,
    /// Fish added to the stock.
    FishAdded {
        /// How many.
        count: u32,
    },
    /// Dead fish taken out.
    DeadFishRemoved {
        /// How many.
        count: u32,
    },
    /// Salt dissolved into the water.
    SaltAdded {
        /// Grams of salt.
        grams: f64,
    },
    /// The heater's set-point changed.
    HeaterSetPoint {
        /// The new set-point, °C.
        temp_c: f64,
    },
    /// A culture of nitrifying bacteria added.
    NitrifyingCultureAdded,
    /// An ammonia binder added.
    AmmoniaBinderAdded,
    /// Zeolite added to the filter.
    ZeoliteAdded,
}

impl EventKind {
    /// The name used on the command line and in output.
    pub fn name(&self) -> &'static str {
        match self {
            EventKind::WaterChange { .. } => "water-change",
            EventKind::FeedingHeld => "feeding-held",
            EventKind::FeedingResumed => "feeding-resumed",
            EventKind::Medication { .. } => "medication",
            EventKind::FilterCleaned { .. } => "filter-cleaned",
            EventKind::SubstrateReplaced => "substrate-replaced",
            EventKind::FishAdded { .. } => "fish-added",
            EventKind::DeadFishRemoved { .. } => "dead-fish-removed",
            EventKind::SaltAdded { .. } => "salt-added",
            EventKind::HeaterSetPoint { .. } => "heater-set-point",
            EventKind::NitrifyingCultureAdded => "nitrifying-culture-added",
            EventKind::AmmoniaBinderAdded => "ammonia-binder-added",
            EventKind::ZeoliteAdded => "zeolite-added",
        }
    }

    /// Checks every number and name.
    pub fn check(&self) -> Result<(), RecordError> {
        let mut ignored = Vec::new();
        match self {
            EventKind::WaterChange { percent, source_ph, source_tan_n_mg_l, source_temp_c, dechlorinated: _ } => {
                if !percent.is_finite() || *percent <= 0.0 || *percent > 100.0 {
                    return Err(RecordError::invalid(
                        Field::WaterChangePercent,
                        format!("{percent} % is not a water change (give more than 0 and at most 100 %)"),
                    ));
                }
                if let Some(ph) = source_ph {
                    check_value(Field::SourcePh, Quantity::Ph, *ph, &mut ignored)?;
                }
                if let Some(tan) = source_tan_n_mg_l {
                    check_value(Field::SourceTotalAmmonia, Quantity::TotalAmmonia, *tan, &mut ignored)?;
                }
                if let Some(t) = source_temp_c {
                    check_value(Field::SourceTemperature, Quantity::TemperatureC, *t, &mut ignored)?;
                }
            }
            EventKind::Medication { class: _, name } => {
                check_text(Field::MedicationName, name, MAX_OPERATOR_CHARS, false)?;
                if name.trim().is_empty() {
                    return Err(RecordError::invalid(Field::MedicationName, "the medication's name is empty"));
                }
            }
            EventKind::FishAdded { count } | EventKind::DeadFishRemoved { count } => {
                if *count == 0 || *count > MAX_FISH_COUNT {
                    return Err(RecordError::invalid(
                        Field::FishCount,
                        format!("{count} fish is not a count this event takes (1 to {MAX_FISH_COUNT})"),
                    ));
                }
            }
            EventKind::SaltAdded { grams } => {
                if !grams.is_finite() || *grams <= 0.0 || *grams > MAX_SALT_GRAMS {
                    return Err(RecordError::invalid(
                        Field::SaltGrams,
                        format!(
                            "{grams} g of salt is outside the allowed range (more than 0, at most {MAX_SALT_GRAMS} g)"
                        ),
                    ));
                }
            }
            EventKind::HeaterSetPoint { temp_c } => {
                check_value(Field::SetPointTemperature, Quantity::TemperatureC, *temp_c, &mut ignored)?;
            }
            EventKind::FeedingHeld
            | EventKind::FeedingResumed
            | EventKind::FilterCleaned { .. }
            | EventKind::SubstrateReplaced
            | EventKind::NitrifyingCultureAdded
            | EventKind::AmmoniaBinderAdded
            | EventKind::ZeoliteAdded => {}
        }
        Ok(())
    }
}

/// A record that supersedes an earlier one. The earlier record stays; the
/// current value is the replacement of the newest correction in its chain.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Correction {
    /// The record this one supersedes (an original or an earlier correction).
    pub supersedes: Ulid,
    /// What the record should have said; `None` withdraws it (recorded by
    /// mistake), which hides it from the current history but keeps it in the trail.
    pub replacement: Option<Box<RecordBody>>,
    /// Why: shown in the audit trail.
    pub reason: String,
}

impl Correction {
    /// Checks the reason and the replacement.
    pub fn check(&self) -> Result<Vec<FieldWarning>, RecordError> {
        check_text(Field::Reason, &self.reason, MAX_TEXT_CHARS, true)?;
        if self.reason.trim().is_empty() {
            return Err(RecordError::invalid(Field::Reason, "a correction needs a reason"));
        }
        match self.replacement.as_deref() {
            None => Ok(Vec::new()),
            Some(RecordBody::Correction(_)) => {
                Err(RecordError::invalid(Field::Replacement, "a correction's replacement cannot be another correction"))
            }
            Some(body) => body.check(),
        }
    }
}

/// The field a check refers to, named as in the stored form.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Field {
    /// The tank or system id.
    Target,
    /// Who made the record.
    Operator,
    /// The free note.
    Note,
    /// The set of measurements as a whole.
    Measurements,
    /// Water temperature.
    Temperature,
    /// pH.
    Ph,
    /// Total ammonia.
    TotalAmmonia,
    /// Nitrite.
    Nitrite,
    /// Nitrate.
    Nitrate,
    /// Salinity, specific gravity or conductivity.
    Salinity,
    /// Dissolved oxygen.
    DissolvedOxygen,
    /// Chloride.
    Chloride,
    /// Total alkalinity.
    Alkalinity,
    /// Deaths counted with a reading.
    Deaths,
    /// Percent of a water change.
    WaterChangePercent,
    /// pH of a water change's source water.
    SourcePh,
    /// Total ammonia of a water change's source water.
    SourceTotalAmmonia,
    /// Temperature of a water change's source water.
    SourceTemperature,
    /// A medication's name.
    MedicationName,
    /// Grams of salt added.
    SaltGrams,
    /// A heater set-point.
    SetPointTemperature,
    /// Fish added or removed.
    FishCount,
    /// A correction's reason.
    Reason,
    /// A correction's replacement.
    Replacement,
}

impl Field {
    /// The field's path in the stored form.
    pub fn key(self) -> &'static str {
        match self {
            Field::Target => "target",
            Field::Operator => "operator",
            Field::Note => "note",
            Field::Measurements => "measurements",
            Field::Temperature => "measurements.temperature",
            Field::Ph => "measurements.ph",
            Field::TotalAmmonia => "measurements.total_ammonia",
            Field::Nitrite => "measurements.nitrite",
            Field::Nitrate => "measurements.nitrate",
            Field::Salinity => "measurements.salinity",
            Field::DissolvedOxygen => "measurements.dissolved_oxygen_mg_l",
            Field::Chloride => "measurements.chloride_mg_l",
            Field::Alkalinity => "measurements.alkalinity",
            Field::Deaths => "observations.deaths",
            Field::WaterChangePercent => "event.percent",
            Field::SourcePh => "event.source_ph",
            Field::SourceTotalAmmonia => "event.source_tan_n_mg_l",
            Field::SourceTemperature => "event.source_temp_c",
            Field::MedicationName => "event.name",
            Field::SaltGrams => "event.grams",
            Field::SetPointTemperature => "event.temp_c",
            Field::FishCount => "event.count",
            Field::Reason => "reason",
            Field::Replacement => "replacement",
        }
    }
}

impl fmt::Display for Field {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.key())
    }
}

/// A value refused by a check, with the field it is in.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RecordError {
    /// A measured value outside its hard range.
    #[error("{field}: {source}")]
    Range {
        /// Where.
        field: Field,
        /// What is wrong.
        source: RangeError,
    },
    /// Any other refused value.
    #[error("{field}: {message}")]
    Invalid {
        /// Where.
        field: Field,
        /// What is wrong.
        message: String,
    },
}

impl RecordError {
    fn invalid(field: Field, message: impl Into<String>) -> RecordError {
        RecordError::Invalid { field, message: message.into() }
    }

    /// The field the error is in.
    pub fn field(&self) -> Field {
        match self {
            RecordError::Range { field, .. } | RecordError::Invalid { field, .. } => *field,
        }
    }

    /// What is wrong, without the field.
    pub fn message(&self) -> String {
        match self {
            RecordError::Range { source, .. } => source.to_string(),
            RecordError::Invalid { message, .. } => message.clone(),
        }
    }
}

/// A value accepted but outside the usual range: worth a second look.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldWarning {
    /// Where.
    pub field: Field,
    /// What is unusual.
    pub unusual: Unusual,
}

impl fmt::Display for FieldWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}: {}", self.field, self.unusual)
    }
}

fn check_value(
    field: Field,
    quantity: Quantity,
    value: f64,
    warnings: &mut Vec<FieldWarning>,
) -> Result<(), RecordError> {
    match limits::check(quantity, value) {
        Ok(None) => Ok(()),
        Ok(Some(unusual)) => {
            warnings.push(FieldWarning { field, unusual });
            Ok(())
        }
        Err(source) => Err(RecordError::Range { field, source }),
    }
}

fn check_temperature(field: Field, t: Temperature, warnings: &mut Vec<FieldWarning>) -> Result<(), RecordError> {
    if t.unit == TemperatureUnit::F {
        if !t.value.is_finite() {
            return Err(RecordError::Range {
                field,
                source: RangeError::NotFinite { quantity: Quantity::TemperatureC },
            });
        }
        let (min, max) = Quantity::TemperatureC.hard_range();
        let c = t.celsius_value();
        if !(min..=max).contains(&c) {
            return Err(RecordError::invalid(
                field,
                format!(
                    "temperature {} °F is outside the allowed range {}–{} °F",
                    t.value,
                    units::celsius_to_fahrenheit(min),
                    units::celsius_to_fahrenheit(max)
                ),
            ));
        }
    }
    check_value(field, Quantity::TemperatureC, t.celsius_value(), warnings)
}

fn check_salinity(reading: SalinityReading, warnings: &mut Vec<FieldWarning>) -> Result<(), RecordError> {
    let field = Field::Salinity;
    match reading {
        SalinityReading::Ppt { value } => return check_value(field, Quantity::Salinity, value, warnings),
        SalinityReading::SpecificGravity { value, reference_c } => {
            check_value(field, Quantity::SpecificGravity, value, warnings)?;
            check_value(field, Quantity::ReferenceTemperatureC, reference_c, warnings)?;
        }
        SalinityReading::Conductivity { value_us_cm, reference_c } => {
            check_value(field, Quantity::Conductivity, value_us_cm, warnings)?;
            check_value(field, Quantity::ReferenceTemperatureC, reference_c, warnings)?;
        }
    }
    // The derived salinity must be one the equations hold for.
    let derived = reading.practical_salinity();
    let (min, max) = Quantity::Salinity.hard_range();
    if !(min..=max).contains(&derived) {
        return Err(RecordError::invalid(
            field,
            format!("that reading gives salinity {derived:.1} g/L, outside the allowed range {min}–{max} g/L"),
        ));
    }
    Ok(())
}

fn check_alkalinity(a: Alkalinity, warnings: &mut Vec<FieldWarning>) -> Result<(), RecordError> {
    let field = Field::Alkalinity;
    if a.unit == AlkalinityUnit::MgLCaco3 {
        return check_value(field, Quantity::Alkalinity, a.value, warnings);
    }
    if !a.value.is_finite() {
        return Err(RecordError::Range { field, source: RangeError::NotFinite { quantity: Quantity::Alkalinity } });
    }
    let per = a.unit.mg_l_caco3_per_unit();
    let (min, max) = Quantity::Alkalinity.hard_range();
    let canonical = a.mg_l_caco3();
    if !(min..=max).contains(&canonical) {
        return Err(RecordError::invalid(
            field,
            format!(
                "alkalinity {} {} is outside the allowed range {}–{:.1} {}",
                a.value,
                a.unit.label(),
                min / per,
                max / per,
                a.unit.label()
            ),
        ));
    }
    check_value(field, Quantity::Alkalinity, canonical, warnings)
}

/// Checks a note: at most [`MAX_TEXT_CHARS`] characters, no control
/// characters other than newline and tab.
pub fn check_note(note: &str) -> Result<(), RecordError> {
    check_text(Field::Note, note, MAX_TEXT_CHARS, true)
}

fn check_text(field: Field, text: &str, max_chars: usize, multi_line: bool) -> Result<(), RecordError> {
    if text.chars().count() > max_chars {
        return Err(RecordError::invalid(field, format!("longer than {max_chars} characters")));
    }
    let allowed = |c: char| !c.is_control() || (multi_line && (c == '\n' || c == '\t'));
    if !text.chars().all(allowed) {
        return Err(RecordError::invalid(field, "contains a control character"));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(s: &str) -> DateTime<FixedOffset> {
        DateTime::parse_from_rfc3339(s).unwrap()
    }

    fn full_reading() -> Reading {
        Reading {
            target: Target::Tank("B2-07".into()),
            measurements: Measurements {
                temperature: Some(Temperature::fahrenheit(77.0)),
                ph: Some(8.0),
                total_ammonia: Some(TotalAmmonia { value: 1.2158920539730134, basis: AmmoniaBasis::Nh3 }),
                nitrite: Some(NitrogenReading { value: 0.33, basis: NitrogenIonBasis::Ion }),
                nitrate: Some(NitrogenReading { value: 20.0, basis: NitrogenIonBasis::N }),
                salinity: Some(SalinityReading::SpecificGravity { value: 1.0025, reference_c: 25.0 }),
                dissolved_oxygen_mg_l: Some(6.8),
                chloride_mg_l: Some(40.0),
                alkalinity: Some(Alkalinity { value: 6.0, unit: AlkalinityUnit::Dkh }),
            },
            observations: Observations { gasping: true, cloudy_eyes: true, deaths: 2, ..Observations::default() },
            note: Some("two dead at the back, \"cloudy\"\nfilter noisy".into()),
        }
    }

    fn record(body: RecordBody) -> Record {
        Record {
            id: Ulid::from_string("01JEX5V3QK8T0W9Y2Z4A6B8C0D").unwrap(),
            device: DeviceId(Ulid::from_string("01JEX5TZZZ0000000000000000").unwrap()),
            operator: "Ines Varga".into(),
            taken_at: at("2026-12-01T07:32:10.250+01:00"),
            body,
        }
    }

    #[test]
    fn json_shape_is_the_documented_one() {
        let r = record(RecordBody::Reading(Reading {
            target: Target::Tank("B2-07".into()),
            measurements: Measurements {
                temperature: Some(Temperature::celsius(25.5)),
                ph: Some(7.8),
                total_ammonia: Some(TotalAmmonia { value: 0.5, basis: AmmoniaBasis::N }),
                ..Measurements::default()
            },
            observations: Observations::default(),
            note: None,
        }));
        let json = serde_json::to_string(&r).unwrap();
        assert_eq!(
            json,
            r#"{"id":"01JEX5V3QK8T0W9Y2Z4A6B8C0D","device":"01JEX5TZZZ0000000000000000","operator":"Ines Varga","taken_at":"2026-12-01T07:32:10.250+01:00","body":{"kind":"reading","target":{"tank":"B2-07"},"measurements":{"temperature":{"value":25.5,"unit":"c"},"ph":7.8,"total_ammonia":{"value":0.5,"as":"n"}},"observations":{"gasping":false,"hyperactive":false,"nervous_signs":false,"cloudy_eyes":false,"excess_mucus":false,"deaths":0}}}"#
        );
    }

    fn every_kind_of_body() -> Vec<RecordBody> {
        let tank = || Target::Tank("B2-07".into());
        let mut bodies = vec![RecordBody::Reading(full_reading())];
        let kinds = vec![
            EventKind::WaterChange {
                percent: 30.0,
                source_ph: Some(7.6),
                source_tan_n_mg_l: Some(0.1),
                source_temp_c: Some(24.5),
                dechlorinated: true,
            },
            EventKind::WaterChange {
                percent: 100.0,
                source_ph: None,
                source_tan_n_mg_l: None,
                source_temp_c: None,
                dechlorinated: false,
            },
            EventKind::FeedingHeld,
            EventKind::FeedingResumed,
            EventKind::Medication { class: MedicationClass::Antibiotic, name: "oxytetracycline".into() },
            EventKind::Medication { class: MedicationClass::Other, name: "praziquantel".into() },
            EventKind::FilterCleaned { rinsed_in_tap_water: true },
            EventKind::SubstrateReplaced,
            EventKind::FishAdded { count: 40 },
            EventKind::DeadFishRemoved { count: 3 },
            EventKind::SaltAdded { grams: 250.5 },
            EventKind::HeaterSetPoint { temp_c: 24.0 },
            EventKind::NitrifyingCultureAdded,
            EventKind::AmmoniaBinderAdded,
            EventKind::ZeoliteAdded,
        ];
        for kind in kinds {
            bodies.push(RecordBody::Event(Event { target: Target::System("RACK-B".into()), kind, note: None }));
        }
        bodies.push(RecordBody::Skip(Skip { target: tank(), reason: "tank emptied for moving".into() }));
        bodies.push(RecordBody::Correction(Correction {
            supersedes: Ulid::from_string("01JEX5V3QK8T0W9Y2Z4A6B8C0E").unwrap(),
            replacement: Some(Box::new(RecordBody::Reading(Reading::new(tank())).with_ph(7.4))),
            reason: "misread the colour chart".into(),
        }));
        bodies.push(RecordBody::Correction(Correction {
            supersedes: Ulid::from_string("01JEX5V3QK8T0W9Y2Z4A6B8C0F").unwrap(),
            replacement: None,
            reason: "entered on the wrong day".into(),
        }));
        bodies
    }

    impl RecordBody {
        fn with_ph(mut self, ph: f64) -> RecordBody {
            if let RecordBody::Reading(r) = &mut self {
                r.measurements.ph = Some(ph);
            }
            self
        }
    }

    #[test]
    fn every_kind_round_trips_through_json_exactly() {
        for body in every_kind_of_body() {
            let r = record(body);
            r.check().unwrap_or_else(|e| panic!("{e} in {r:?}"));
            let json = serde_json::to_string(&r).unwrap();
            let back: Record = serde_json::from_str(&json).unwrap();
            assert_eq!(back, r);
            assert_eq!(serde_json::to_string(&back).unwrap(), json, "serialisation is deterministic");
        }
    }

    #[test]
    fn unknown_fields_are_refused_everywhere() {
        let r = record(RecordBody::Reading(full_reading()));
        let json = serde_json::to_value(&r).unwrap();
        let paths: [&[&str]; 4] = [&[], &["body"], &["body", "measurements"], &["body", "observations"]];
        for path in paths {
            let mut v = json.clone();
            let mut obj = &mut v;
            for key in path {
                obj = obj.get_mut(*key).unwrap();
            }
            obj.as_object_mut().unwrap().insert("colour".into(), serde_json::json!(1));
            assert!(serde_json::from_value::<Record>(v).is_err(), "extra field under {path:?} accepted");
        }
        let event = record(RecordBody::Event(Event {
            target: Target::Tank("T1".into()),
            kind: EventKind::SaltAdded { grams: 10.0 },
            note: None,
        }));
        let mut v = serde_json::to_value(&event).unwrap();
        v["body"]["event"].as_object_mut().unwrap().insert("kilos".into(), serde_json::json!(1));
        assert!(serde_json::from_value::<Record>(v).is_err());
    }

    #[test]
    fn canonical_values_convert_the_entered_ones() {
        let m = full_reading().measurements;
        // 77 °F is exactly 25 °C (definition of the Fahrenheit scale).
        assert_eq!(m.temp_c(), Some(25.0));
        // 1.21589 mg/L as NH3 is 1 mg TAN-N/L (IUPAC atomic weights; reference §3).
        assert!((m.tan_n_mg_l().unwrap() - 1.0).abs() < 1e-12);
        // 0.33 mg NO2-/L × 14.007/46.005 = 0.10047 mg NO2-N/L (IUPAC atomic weights).
        assert!((m.nitrite_n_mg_l().unwrap() - 0.33 * 14.007 / 46.005).abs() < 1e-12);
        assert_eq!(m.nitrate_n_mg_l(), Some(20.0));
        // 1 dKH = 17.848 mg/L CaCO3 (German degree = 10 mg CaO/L; from memory).
        assert!((m.alkalinity_mg_l_caco3().unwrap() - 6.0 * 17.848).abs() < 6.0 * 0.001);
        // 1 meq/L = 50.04 mg/L CaCO3 (half of M(CaCO3) = 100.09 g/mol; IUPAC atomic weights).
        assert!((AlkalinityUnit::MeqL.mg_l_caco3_per_unit() - 50.04).abs() < 0.005);
        assert!(m.salinity_ppt().unwrap() > 0.0);
    }

    #[test]
    fn water_sample_needs_temperature_ph_and_ammonia() {
        let full = full_reading();
        let sample = full.water_sample().unwrap();
        assert_eq!(sample.temp_c, 25.0);
        assert_eq!(sample.ph, 8.0);
        assert_eq!(sample.do_mg_l, Some(6.8));
        assert!(sample.salinity_ppt > 0.0);
        for drop in 0..3 {
            let mut r = full.clone();
            match drop {
                0 => r.measurements.temperature = None,
                1 => r.measurements.ph = None,
                _ => r.measurements.total_ammonia = None,
            }
            assert!(r.water_sample().is_none());
        }
        let mut fresh = full.clone();
        fresh.measurements.salinity = None;
        assert_eq!(fresh.water_sample().unwrap().salinity_ppt, 0.0);
    }

    fn reading_with(set: impl FnOnce(&mut Measurements)) -> Reading {
        let mut r = Reading::new(Target::Tank("T1".into()));
        set(&mut r.measurements);
        r
    }

    #[test]
    fn out_of_range_values_name_their_field() {
        let cases: Vec<(Reading, Field)> = vec![
            (reading_with(|m| m.temperature = Some(Temperature::celsius(41.0))), Field::Temperature),
            (reading_with(|m| m.temperature = Some(Temperature::fahrenheit(105.0))), Field::Temperature),
            (reading_with(|m| m.temperature = Some(Temperature::celsius(f64::NAN))), Field::Temperature),
            (reading_with(|m| m.ph = Some(14.5)), Field::Ph),
            (
                reading_with(|m| m.total_ammonia = Some(TotalAmmonia { value: -0.1, basis: AmmoniaBasis::N })),
                Field::TotalAmmonia,
            ),
            (
                reading_with(|m| m.nitrite = Some(NitrogenReading { value: 1001.0, basis: NitrogenIonBasis::N })),
                Field::Nitrite,
            ),
            (
                reading_with(|m| m.nitrate = Some(NitrogenReading { value: -1.0, basis: NitrogenIonBasis::Ion })),
                Field::Nitrate,
            ),
            (reading_with(|m| m.salinity = Some(SalinityReading::Ppt { value: 46.0 })), Field::Salinity),
            (
                reading_with(|m| {
                    m.salinity = Some(SalinityReading::SpecificGravity { value: 1.039, reference_c: 25.0 })
                }),
                Field::Salinity,
            ),
            (reading_with(|m| m.dissolved_oxygen_mg_l = Some(41.0)), Field::DissolvedOxygen),
            (reading_with(|m| m.chloride_mg_l = Some(-3.0)), Field::Chloride),
            (
                reading_with(|m| m.alkalinity = Some(Alkalinity { value: 200.0, unit: AlkalinityUnit::Dkh })),
                Field::Alkalinity,
            ),
        ];
        for (reading, field) in cases {
            let err = reading.check().unwrap_err();
            assert_eq!(err.field(), field, "{err}");
            assert!(err.to_string().starts_with(field.key()), "{err}");
        }
        let err = reading_with(|m| m.temperature = Some(Temperature::fahrenheit(105.0))).check().unwrap_err();
        assert_eq!(err.message(), "temperature 105 °F is outside the allowed range 32–104 °F");
    }

    #[test]
    fn unusual_values_warn_and_are_kept() {
        let warnings = reading_with(|m| m.ph = Some(4.5)).check().unwrap();
        assert_eq!(warnings.len(), 1);
        assert_eq!(warnings[0].field, Field::Ph);
    }

    #[test]
    fn empty_readings_and_bad_text_are_refused() {
        let err = Reading::new(Target::Tank("T1".into())).check().unwrap_err();
        assert_eq!(err.field(), Field::Measurements);
        let mut only_signs = Reading::new(Target::Tank("T1".into()));
        only_signs.observations.gasping = true;
        assert!(only_signs.check().is_ok());
        for bad in ["", " T1", "T\u{0}1", &"x".repeat(65)] {
            let r = reading_with(|m| m.ph = Some(7.0));
            let r = Reading { target: Target::Tank(bad.to_string()), ..r };
            assert_eq!(r.check().unwrap_err().field(), Field::Target, "{bad:?}");
        }
        let mut r = record(RecordBody::Reading(full_reading()));
        r.operator = "  ".into();
        assert_eq!(r.check().unwrap_err().field(), Field::Operator);
    }

    #[test]
    fn event_numbers_are_checked() {
        let bad = [
            (
                EventKind::WaterChange {
                    percent: 0.0,
                    source_ph: None,
                    source_tan_n_mg_l: None,
                    source_temp_c: None,
                    dechlorinated: true,
                },
                Field::WaterChangePercent,
            ),
            (
                EventKind::WaterChange {
                    percent: 101.0,
                    source_ph: None,
                    source_tan_n_mg_l: None,
                    source_temp_c: None,
                    dechlorinated: true,
                },
                Field::WaterChangePercent,
            ),
            (
                EventKind::WaterChange {
                    percent: 20.0,
                    source_ph: Some(15.0),
                    source_tan_n_mg_l: None,
                    source_temp_c: None,
                    dechlorinated: true,
                },
                Field::SourcePh,
            ),
            (
                EventKind::WaterChange {
                    percent: 20.0,
                    source_ph: None,
                    source_tan_n_mg_l: Some(-1.0),
                    source_temp_c: None,
                    dechlorinated: true,
                },
                Field::SourceTotalAmmonia,
            ),
            (
                EventKind::WaterChange {
                    percent: 20.0,
                    source_ph: None,
                    source_tan_n_mg_l: None,
                    source_temp_c: Some(50.0),
                    dechlorinated: true,
                },
                Field::SourceTemperature,
            ),
            (EventKind::Medication { class: MedicationClass::Other, name: " ".into() }, Field::MedicationName),
            (EventKind::FishAdded { count: 0 }, Field::FishCount),
            (EventKind::DeadFishRemoved { count: MAX_FISH_COUNT + 1 }, Field::FishCount),
            (EventKind::SaltAdded { grams: -5.0 }, Field::SaltGrams),
            (EventKind::SaltAdded { grams: f64::INFINITY }, Field::SaltGrams),
            (EventKind::HeaterSetPoint { temp_c: 45.0 }, Field::SetPointTemperature),
        ];
        for (kind, field) in bad {
            let e = Event { target: Target::Tank("T1".into()), kind, note: None };
            assert_eq!(e.check().unwrap_err().field(), field);
        }
    }

    #[test]
    fn corrections_need_a_reason_and_no_nesting() {
        let inner = Correction { supersedes: Ulid::nil(), replacement: None, reason: "x".into() };
        let nested = Correction {
            supersedes: Ulid::nil(),
            replacement: Some(Box::new(RecordBody::Correction(inner))),
            reason: "y".into(),
        };
        assert_eq!(nested.check().unwrap_err().field(), Field::Replacement);
        let no_reason = Correction { supersedes: Ulid::nil(), replacement: None, reason: "".into() };
        assert_eq!(no_reason.check().unwrap_err().field(), Field::Reason);
        let bad_replacement = Correction {
            supersedes: Ulid::nil(),
            replacement: Some(Box::new(RecordBody::Reading(reading_with(|m| m.ph = Some(-1.0))))),
            reason: "typo".into(),
        };
        assert_eq!(bad_replacement.check().unwrap_err().field(), Field::Ph);
    }

    #[test]
    fn signs_parse_and_set() {
        let mut o = Observations::default();
        for sign in Sign::ALL {
            assert_eq!(sign.name().parse::<Sign>(), Ok(sign));
            o.set(sign, true);
        }
        assert_eq!(o.signs().len(), 5);
        assert_eq!("Cloudy_Eyes".parse::<Sign>(), Ok(Sign::CloudyEyes));
        assert!("coughing".parse::<Sign>().is_err());
    }

    #[test]
    fn targets_name_tank_or_system() {
        let r = RecordBody::Reading(full_reading());
        assert_eq!(r.target().unwrap().tank(), Some("B2-07"));
        assert_eq!(Target::System("RACK-B".into()).to_string(), "system RACK-B");
        let withdraw =
            RecordBody::Correction(Correction { supersedes: Ulid::nil(), replacement: None, reason: "x".into() });
        assert!(withdraw.target().is_none());
    }

    #[test]
    fn a_skip_needs_a_reason() {
        let skip = Skip { target: Target::Tank("B2-07".into()), reason: "  ".into() };
        assert!(skip.check().unwrap_err().to_string().contains("a skip needs a reason"));
        let body = RecordBody::Skip(Skip { target: Target::Tank("B2-07".into()), reason: "no access".into() });
        assert_eq!(body.kind_name(), "skip");
        assert_eq!(body.note(), Some("no access"));
        assert_eq!(body.target(), Some(&Target::Tank("B2-07".into())));
    }
}
