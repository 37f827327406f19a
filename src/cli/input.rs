//! Command-line input shared by `record`, `event`, `correct` and `log`:
//! reading fields, event kinds, who and when, and where (the room seam).
//!
//! Everything here is parsed and checked before any command opens the store,
//! and every refusal names the option it is about.

use anyhow::Result;
use chrono::{DateTime, Duration, FixedOffset, Local, NaiveDate, NaiveDateTime, NaiveTime, SubsecRound, TimeZone, Utc};
use clap::{ArgGroup, Args, Subcommand};

use tankwalk::core::salinity::SalinityReading;
use tankwalk::core::units::{self, AmmoniaBasis, NitrogenIonBasis};
use tankwalk::model::Facility;
use tankwalk::model::record::{
    Alkalinity, AlkalinityUnit, EventKind, Field, FieldWarning, Measurements, MedicationClass, NitrogenReading,
    Observations, RecordError, Sign, Target, Temperature, TotalAmmonia,
};

use super::bad_input;

/// How far in the future a time may be (a laptop clock a little fast).
const FUTURE_SLACK_MINUTES: i64 = 5;

/// `--tank` and `--system`.
#[derive(Debug, Clone, Default, Args)]
pub struct TargetArgs {
    /// Tank (or tub) id, as written on it.
    #[arg(long, value_name = "ID", global = true)]
    pub tank: Option<String>,
    /// System id (shared water); with --tank, the tank's system.
    #[arg(long, value_name = "ID", global = true)]
    pub system: Option<String>,
}

/// Where a record goes and whose history it belongs to.
#[derive(Debug, Clone, PartialEq)]
pub struct Located {
    /// The tank, or the system when no tank was given.
    pub target: Target,
    /// The tank id, when a tank was given.
    pub tank: Option<String>,
    /// The system: given, or the tank's system in the room.
    pub system: Option<String>,
}

impl Located {
    /// The targets whose records make this place's history: the tank and
    /// its system (a reading on the shared water applies to every tank on it).
    pub fn history_targets(&self) -> Vec<Target> {
        let mut targets = Vec::new();
        if let Some(tank) = &self.tank {
            targets.push(Target::Tank(tank.clone()));
        }
        if let Some(system) = &self.system {
            targets.push(Target::System(system.clone()));
        }
        targets
    }
}

/// Resolves `--tank`/`--system` into a place, against the room when one is
/// known: unknown ids are refused with the closest known one, a system given
/// with a tank must be the tank's, and a tank's system is filled in. Without
/// a room the ids are taken as given (checked for form only).
pub fn locate(room: Option<&Facility>, tank: Option<&str>, system: Option<&str>) -> Result<Located> {
    let checked = |target: Target, option: &str| -> Result<Target> {
        target.check().map_err(|e| bad_input!("{option}: {}", e.message()))?;
        Ok(target)
    };
    let tank = tank.map(|t| checked(Target::Tank(t.to_string()), "--tank")).transpose()?;
    let system = system.map(|s| checked(Target::System(s.to_string()), "--system")).transpose()?;
    let (mut tank, mut system) = (tank.map(|t| t.id().to_string()), system.map(|s| s.id().to_string()));
    if let Some(facility) = room {
        if let Some(id) = &tank {
            let Some(known) = facility.tank(id) else {
                let ids: Vec<&str> = facility.tanks.iter().map(|t| t.id.as_str()).collect();
                return Err(bad_input!("--tank: no tank '{id}' in room '{}'{}", facility.room.name, closest(id, &ids)));
            };
            let own = facility.system_of(known).map(|s| s.id.as_str().to_string());
            if let Some(given) = &system
                && own.as_deref().is_none_or(|o| !o.eq_ignore_ascii_case(given))
            {
                let is = own.map_or("is standalone".to_string(), |o| format!("is on system {o}"));
                return Err(bad_input!("--system: tank {} {is}, not on '{given}'", known.id));
            }
            tank = Some(known.id.as_str().to_string());
            system = facility.system_of(known).map(|s| s.id.as_str().to_string());
        } else if let Some(id) = &system {
            let Some(known) = facility.system(id) else {
                let ids: Vec<&str> = facility.systems.iter().map(|s| s.id.as_str()).collect();
                return Err(bad_input!(
                    "--system: no system '{id}' in room '{}'{}",
                    facility.room.name,
                    closest(id, &ids)
                ));
            };
            system = Some(known.id.as_str().to_string());
        }
    }
    let target = match (&tank, &system) {
        (Some(t), _) => Target::Tank(t.clone()),
        (None, Some(s)) => Target::System(s.clone()),
        (None, None) => return Err(bad_input!("say where: give --tank ID or --system ID")),
    };
    Ok(Located { target, tank, system })
}

/// " (closest: X)" for the known id nearest to `id`, or nothing.
fn closest(id: &str, known: &[&str]) -> String {
    known
        .iter()
        .min_by_key(|k| strsim::damerau_levenshtein(&k.to_lowercase(), &id.to_lowercase()))
        .map(|k| format!(" (closest: {k})"))
        .unwrap_or_default()
}

/// The system of `tank` in the room, when it has one.
pub fn system_of(room: Option<&Facility>, tank: &str) -> Option<String> {
    let facility = room?;
    facility.tank(tank).and_then(|t| facility.system_of(t)).map(|s| s.id.as_str().to_string())
}

/// `--operator` and `--taken-at`.
#[derive(Debug, Clone, Default, Args)]
pub struct WhoWhenArgs {
    /// Who did it; default: TANKWALK_OPERATOR, else the login name.
    #[arg(long, value_name = "NAME", env = "TANKWALK_OPERATOR", global = true)]
    pub operator: Option<String>,
    /// When it was done, if not now: 2026-12-01T07:30, "2026-12-01 07:30", RFC 3339, or 2h (ago).
    #[arg(long, value_name = "WHEN", global = true)]
    pub taken_at: Option<String>,
}

impl WhoWhenArgs {
    /// The operator's name: the option, the environment, or the login name.
    pub fn operator(&self) -> Result<String> {
        let name = self
            .operator
            .clone()
            .or_else(|| ["USER", "LOGNAME", "USERNAME"].iter().find_map(|v| std::env::var(v).ok()))
            .map(|n| n.trim().to_string())
            .filter(|n| !n.is_empty())
            .ok_or_else(|| bad_input!("--operator: say who took it (--operator NAME, or set TANKWALK_OPERATOR)"))?;
        Ok(name)
    }

    /// When: the option, or now, with the local offset.
    pub fn taken_at(&self, now: DateTime<FixedOffset>) -> Result<DateTime<FixedOffset>> {
        match &self.taken_at {
            None => Ok(now),
            Some(text) => {
                let at = parse_when(text, now, Bound::Start).map_err(|e| bad_input!("--taken-at: {e}"))?;
                if at > now + Duration::minutes(FUTURE_SLACK_MINUTES) {
                    return Err(bad_input!("--taken-at: {text} is in the future"));
                }
                Ok(at)
            }
        }
    }
}

/// Which end of a day a bare date means.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bound {
    /// The day's first instant (for `--since`, `--taken-at`).
    Start,
    /// The day's last millisecond (for `--until`).
    End,
}

/// The current local time with its offset, to the millisecond (the
/// precision history is ordered by).
pub fn now_local() -> DateTime<FixedOffset> {
    Local::now().fixed_offset().trunc_subsecs(3)
}

/// Parses a point in time: RFC 3339 (`2026-12-01T07:30:00+01:00`), a local
/// date and time (`2026-12-01T07:30`, `2026-12-01 07:30:15`), a local date
/// (`2026-12-01`: its start or end by `bound`), `today`, `yesterday`, or a
/// time ago (`90m`, `12h`, `7d`).
pub fn parse_when(text: &str, now: DateTime<FixedOffset>, bound: Bound) -> Result<DateTime<FixedOffset>, String> {
    let t = text.trim();
    if let Ok(at) = DateTime::parse_from_rfc3339(t) {
        return Ok(at);
    }
    let local = |naive: NaiveDateTime| -> Result<DateTime<FixedOffset>, String> {
        Local
            .from_local_datetime(&naive)
            .earliest()
            .map(|d| d.fixed_offset())
            .ok_or_else(|| format!("{t} does not exist in the local time zone (clocks changed)"))
    };
    let day = |date: NaiveDate| -> Result<DateTime<FixedOffset>, String> {
        match bound {
            Bound::Start => local(date.and_time(NaiveTime::MIN)),
            Bound::End => {
                let next = date.succ_opt().ok_or_else(|| format!("{t} is out of range"))?;
                Ok(local(next.and_time(NaiveTime::MIN))? - Duration::milliseconds(1))
            }
        }
    };
    for format in ["%Y-%m-%dT%H:%M:%S%.f", "%Y-%m-%dT%H:%M", "%Y-%m-%d %H:%M:%S%.f", "%Y-%m-%d %H:%M"] {
        if let Ok(naive) = NaiveDateTime::parse_from_str(t, format) {
            return local(naive);
        }
    }
    if let Ok(date) = NaiveDate::parse_from_str(t, "%Y-%m-%d") {
        return day(date);
    }
    match t.to_ascii_lowercase().as_str() {
        "now" => return Ok(now),
        "today" => return day(now.with_timezone(&Local).date_naive()),
        "yesterday" => {
            let today = now.with_timezone(&Local).date_naive();
            return day(today.pred_opt().ok_or_else(|| format!("{t} is out of range"))?);
        }
        _ => {}
    }
    let ago = |unit: char, minutes: i64| -> Option<Result<DateTime<FixedOffset>, String>> {
        let number = t.strip_suffix(unit)?.trim();
        let n: i64 = number.parse().ok().filter(|n| *n >= 0)?;
        Some(
            n.checked_mul(minutes)
                .and_then(Duration::try_minutes)
                .and_then(|d| now.checked_sub_signed(d))
                .ok_or_else(|| format!("{t} is too long ago")),
        )
    };
    for (unit, minutes) in [('m', 1), ('h', 60), ('d', 1440), ('w', 7 * 1440)] {
        if let Some(result) = ago(unit, minutes) {
            return result;
        }
    }
    Err(format!(
        "'{t}' is not a time (use 2026-12-01, 2026-12-01T07:30, RFC 3339 such as 2026-12-01T07:30:00+01:00, \
         today, yesterday, or an age such as 12h or 7d)"
    ))
}

/// The instant as UTC.
pub fn utc(at: DateTime<FixedOffset>) -> DateTime<Utc> {
    at.with_timezone(&Utc)
}

fn nitrogen_basis(s: &str) -> Result<NitrogenIonBasis, String> {
    match s.trim().to_ascii_lowercase().as_str() {
        "n" | "no2-n" | "no3-n" => Ok(NitrogenIonBasis::N),
        "ion" | "no2" | "no3" => Ok(NitrogenIonBasis::Ion),
        other => Err(format!("'{other}' is not a basis (use n, as nitrogen, or ion)")),
    }
}

/// The measurement and observation options of a reading.
#[derive(Debug, Clone, Default, Args)]
#[command(group(ArgGroup::new("temperature").args(["temp_c", "temp_f"])))]
#[command(group(ArgGroup::new("salt").args(["salinity_ppt", "sg", "cond_us_cm"])))]
pub struct ReadingArgs {
    /// Water temperature in °C.
    #[arg(long, value_name = "C", help_heading = "Reading")]
    pub temp_c: Option<f64>,
    /// Water temperature in °F.
    #[arg(long, value_name = "F", help_heading = "Reading")]
    pub temp_f: Option<f64>,
    /// pH (NBS-buffer electrode or kit reading).
    #[arg(long, help_heading = "Reading")]
    pub ph: Option<f64>,
    /// Total ammonia, mg/L (ppm), on the basis given by --tan-as.
    #[arg(long, value_name = "MG_L", help_heading = "Reading")]
    pub tan: Option<f64>,
    /// How the ammonia kit reports: n (TAN-N), nh3 or nh4 [default: n].
    #[arg(long, value_name = "BASIS", requires = "tan", help_heading = "Reading")]
    pub tan_as: Option<AmmoniaBasis>,
    /// Nitrite, mg/L, on the basis given by --nitrite-as.
    #[arg(long, value_name = "MG_L", help_heading = "Reading")]
    pub nitrite: Option<f64>,
    /// How the nitrite kit reports: n (NO2-N) or ion (NO2-) [default: n].
    #[arg(long, value_name = "BASIS", value_parser = nitrogen_basis, requires = "nitrite", help_heading = "Reading")]
    pub nitrite_as: Option<NitrogenIonBasis>,
    /// Nitrate, mg/L, on the basis given by --nitrate-as.
    #[arg(long, value_name = "MG_L", help_heading = "Reading")]
    pub nitrate: Option<f64>,
    /// How the nitrate kit reports: n (NO3-N) or ion (NO3-) [default: n].
    #[arg(long, value_name = "BASIS", value_parser = nitrogen_basis, requires = "nitrate", help_heading = "Reading")]
    pub nitrate_as: Option<NitrogenIonBasis>,
    /// Salinity in g/L (ppt).
    #[arg(long, value_name = "PPT", help_heading = "Reading")]
    pub salinity_ppt: Option<f64>,
    /// Specific gravity from a hydrometer or refractometer.
    #[arg(long, value_name = "SG", help_heading = "Reading")]
    pub sg: Option<f64>,
    /// Reference temperature of the SG instrument, °C (15.6 for 60/60 °F) [default: 25].
    #[arg(long, value_name = "C", requires = "sg", help_heading = "Reading")]
    pub sg_ref_c: Option<f64>,
    /// Conductivity, µS/cm, compensated to --cond-ref-c.
    #[arg(long, value_name = "US_CM", help_heading = "Reading")]
    pub cond_us_cm: Option<f64>,
    /// Temperature the conductivity meter compensates to, °C [default: 25].
    #[arg(long, value_name = "C", requires = "cond_us_cm", help_heading = "Reading")]
    pub cond_ref_c: Option<f64>,
    /// Dissolved oxygen, mg/L.
    #[arg(long, value_name = "MG_L", help_heading = "Reading")]
    pub do_mg_l: Option<f64>,
    /// Chloride, mg/L.
    #[arg(long, value_name = "MG_L", help_heading = "Reading")]
    pub chloride_mg_l: Option<f64>,
    /// Total alkalinity, in the unit given by --alkalinity-as.
    #[arg(long, value_name = "VALUE", help_heading = "Reading")]
    pub alkalinity: Option<f64>,
    /// Unit of --alkalinity: caco3 (mg/L as CaCO3), dkh or meq (meq/L) [default: caco3].
    #[arg(long, value_name = "UNIT", requires = "alkalinity", help_heading = "Reading")]
    pub alkalinity_as: Option<AlkalinityUnit>,
    /// Signs seen in the fish, comma-separated: gasping, hyperactive, nervous-signs, cloudy-eyes, excess-mucus.
    #[arg(long, value_name = "SIGNS", value_delimiter = ',', help_heading = "Reading")]
    pub observe: Vec<String>,
    /// Fish found dead.
    #[arg(long, value_name = "N", help_heading = "Reading")]
    pub deaths: Option<u32>,
}

impl ReadingArgs {
    /// The measurements given, as entered.
    /// The measurements as entered; total ammonia on `--tan-as`, else `kit_basis` (the room's).
    pub fn measurements(&self, kit_basis: AmmoniaBasis) -> Measurements {
        let temperature = match (self.temp_c, self.temp_f) {
            (Some(c), _) => Some(Temperature::celsius(c)),
            (None, Some(f)) => Some(Temperature::fahrenheit(f)),
            (None, None) => None,
        };
        let salinity = if let Some(value) = self.salinity_ppt {
            Some(SalinityReading::Ppt { value })
        } else if let Some(value) = self.sg {
            Some(SalinityReading::SpecificGravity { value, reference_c: self.sg_ref_c.unwrap_or(25.0) })
        } else {
            self.cond_us_cm.map(|value_us_cm| SalinityReading::Conductivity {
                value_us_cm,
                reference_c: self.cond_ref_c.unwrap_or(25.0),
            })
        };
        Measurements {
            temperature,
            ph: self.ph,
            // The room's kit basis becomes the default once rooms load (see `locate`).
            total_ammonia: self.tan.map(|value| TotalAmmonia { value, basis: self.tan_as.unwrap_or(kit_basis) }),
            nitrite: self.nitrite.map(|value| NitrogenReading { value, basis: self.nitrite_as.unwrap_or_default() }),
            nitrate: self.nitrate.map(|value| NitrogenReading { value, basis: self.nitrate_as.unwrap_or_default() }),
            salinity,
            dissolved_oxygen_mg_l: self.do_mg_l,
            chloride_mg_l: self.chloride_mg_l,
            alkalinity: self
                .alkalinity
                .map(|value| Alkalinity { value, unit: self.alkalinity_as.unwrap_or(AlkalinityUnit::MgLCaco3) }),
        }
    }

    /// The signs given with `--observe`; `None` when the option was not used.
    /// `none` alone means no sign.
    pub fn signs(&self) -> Result<Option<Vec<Sign>>> {
        if self.observe.is_empty() {
            return Ok(None);
        }
        if self.observe.len() == 1 && self.observe[0].trim().eq_ignore_ascii_case("none") {
            return Ok(Some(Vec::new()));
        }
        let signs = self
            .observe
            .iter()
            .filter(|s| !s.trim().is_empty())
            .map(|s| s.parse::<Sign>().map_err(|e| bad_input!("--observe: {e}")))
            .collect::<Result<Vec<_>>>()?;
        Ok(Some(signs))
    }

    /// The observations given (signs and deaths), over `base`.
    pub fn observations(&self, base: Observations) -> Result<Observations> {
        let mut o = base;
        if let Some(signs) = self.signs()? {
            for sign in Sign::ALL {
                o.set(sign, signs.contains(&sign));
            }
        }
        if let Some(deaths) = self.deaths {
            o.deaths = deaths;
        }
        Ok(o)
    }

    /// True when no reading option was given.
    pub fn is_empty(&self) -> bool {
        self.measurements(AmmoniaBasis::N).is_empty() && self.observe.is_empty() && self.deaths.is_none()
    }

    /// The option a refused value came from.
    pub fn option_for(&self, err: &RecordError) -> &'static str {
        use tankwalk::core::limits::{Quantity, RangeError};
        let reference = matches!(
            err,
            RecordError::Range {
                source: RangeError::OutOfRange { quantity: Quantity::ReferenceTemperatureC, .. }
                    | RangeError::NotFinite { quantity: Quantity::ReferenceTemperatureC },
                ..
            }
        );
        match (err.field(), reference) {
            (Field::Salinity, true) if self.sg.is_some() => "--sg-ref-c",
            (Field::Salinity, true) => "--cond-ref-c",
            (field, _) => self.option_for_field(field),
        }
    }

    /// The option a field's value came from.
    pub fn option_for_field(&self, field: Field) -> &'static str {
        match field {
            Field::Temperature if self.temp_f.is_some() && self.temp_c.is_none() => "--temp-f",
            Field::Temperature => "--temp-c",
            Field::Ph => "--ph",
            Field::TotalAmmonia => "--tan",
            Field::Nitrite => "--nitrite",
            Field::Nitrate => "--nitrate",
            Field::Salinity if self.sg.is_some() => "--sg",
            Field::Salinity if self.cond_us_cm.is_some() => "--cond-us-cm",
            Field::Salinity => "--salinity-ppt",
            Field::DissolvedOxygen => "--do-mg-l",
            Field::Chloride => "--chloride-mg-l",
            Field::Alkalinity => "--alkalinity",
            Field::Deaths => "--deaths",
            Field::Note => "--note",
            Field::Operator => "--operator",
            Field::Target => "--tank/--system",
            Field::Reason => "--reason",
            _ => "reading",
        }
    }
}

/// A record check's error as a bad-input error naming the option.
pub fn refuse(option: &str, err: &RecordError) -> anyhow::Error {
    bad_input!("{option}: {}", err.message())
}

/// Warnings as lines naming the option: `--ph: pH 4.5 is unusual …`.
pub fn warning_lines(warnings: &[FieldWarning], option: impl Fn(Field) -> String) -> Vec<String> {
    warnings.iter().map(|w| format!("{}: {}", option(w.field), w.unusual)).collect()
}

/// The kinds of event and their options.
#[derive(Debug, Clone, Subcommand)]
pub enum EventKindCommand {
    /// Part of the water replaced with source water.
    WaterChange(WaterChangeArgs),
    /// Feeding stopped.
    FeedingHeld,
    /// Feeding started again.
    FeedingResumed,
    /// A medication given (antibiotics harm the biofilter).
    Medication(MedicationArgs),
    /// Filter media cleaned.
    FilterCleaned(FilterCleanedArgs),
    /// Gravel or sand replaced.
    SubstrateReplaced,
    /// Fish added to the stock.
    FishAdded(CountArgs),
    /// Dead fish taken out.
    DeadFishRemoved(CountArgs),
    /// Salt dissolved into the water.
    SaltAdded(SaltArgs),
    /// The heater's set-point changed.
    HeaterSetPoint(SetPointArgs),
    /// A culture of nitrifying bacteria added.
    NitrifyingCultureAdded,
    /// An ammonia binder added.
    AmmoniaBinderAdded,
    /// Zeolite added to the filter.
    ZeoliteAdded,
}

/// Options of a water change.
#[derive(Debug, Clone, Args)]
#[command(group(ArgGroup::new("treated").required(true).args(["dechlorinated", "not_dechlorinated"])))]
#[command(group(ArgGroup::new("source_temp").args(["source_temp_c", "source_temp_f"])))]
pub struct WaterChangeArgs {
    /// Percent of the water replaced (more than 0, at most 100).
    #[arg(long, value_name = "PERCENT")]
    pub percent: f64,
    /// pH of the source water.
    #[arg(long, value_name = "PH")]
    pub source_ph: Option<f64>,
    /// Total ammonia of the source water, mg/L on the basis of --source-tan-as.
    #[arg(long, value_name = "MG_L")]
    pub source_tan: Option<f64>,
    /// How the kit reports --source-tan: n, nh3 or nh4 [default: n].
    #[arg(long, value_name = "BASIS", requires = "source_tan")]
    pub source_tan_as: Option<AmmoniaBasis>,
    /// Temperature of the source water, °C.
    #[arg(long, value_name = "C")]
    pub source_temp_c: Option<f64>,
    /// Temperature of the source water, °F.
    #[arg(long, value_name = "F")]
    pub source_temp_f: Option<f64>,
    /// The source water was treated for chlorine and chloramine.
    #[arg(long)]
    pub dechlorinated: bool,
    /// The source water was NOT treated for chlorine and chloramine.
    #[arg(long)]
    pub not_dechlorinated: bool,
}

/// Options of a medication.
#[derive(Debug, Clone, Args)]
pub struct MedicationArgs {
    /// antibiotic or other.
    #[arg(long)]
    pub class: MedicationClass,
    /// Product or substance name.
    #[arg(long)]
    pub name: String,
}

/// Options of a filter cleaning.
#[derive(Debug, Clone, Args)]
pub struct FilterCleanedArgs {
    /// The media were rinsed in tap (chlorinated) water rather than tank water.
    #[arg(long)]
    pub rinsed_in_tap_water: bool,
}

/// A number of fish.
#[derive(Debug, Clone, Args)]
pub struct CountArgs {
    /// How many fish.
    #[arg(long, value_name = "N")]
    pub count: u32,
}

/// Grams of salt.
#[derive(Debug, Clone, Args)]
pub struct SaltArgs {
    /// Grams of salt added.
    #[arg(long, value_name = "G")]
    pub grams: f64,
}

/// A heater set-point.
#[derive(Debug, Clone, Args)]
#[command(group(ArgGroup::new("set_point").required(true).args(["temp_c", "temp_f"])))]
pub struct SetPointArgs {
    /// New set-point, °C.
    #[arg(long, value_name = "C")]
    pub temp_c: Option<f64>,
    /// New set-point, °F.
    #[arg(long, value_name = "F")]
    pub temp_f: Option<f64>,
}

impl EventKindCommand {
    /// The event kind, checked; errors name the option.
    pub fn to_kind(&self) -> Result<EventKind> {
        let kind = match self {
            EventKindCommand::WaterChange(a) => EventKind::WaterChange {
                percent: a.percent,
                source_ph: a.source_ph,
                source_tan_n_mg_l: a.source_tan.map(|v| a.source_tan_as.unwrap_or_default().to_tan_n(v)),
                source_temp_c: a.source_temp_c.or(a.source_temp_f.map(units::fahrenheit_to_celsius)),
                dechlorinated: a.dechlorinated && !a.not_dechlorinated,
            },
            EventKindCommand::FeedingHeld => EventKind::FeedingHeld,
            EventKindCommand::FeedingResumed => EventKind::FeedingResumed,
            EventKindCommand::Medication(a) => {
                EventKind::Medication { class: a.class, name: a.name.trim().to_string() }
            }
            EventKindCommand::FilterCleaned(a) => {
                EventKind::FilterCleaned { rinsed_in_tap_water: a.rinsed_in_tap_water }
            }
            EventKindCommand::SubstrateReplaced => EventKind::SubstrateReplaced,
            EventKindCommand::FishAdded(a) => EventKind::FishAdded { count: a.count },
            EventKindCommand::DeadFishRemoved(a) => EventKind::DeadFishRemoved { count: a.count },
            EventKindCommand::SaltAdded(a) => EventKind::SaltAdded { grams: a.grams },
            EventKindCommand::HeaterSetPoint(a) => EventKind::HeaterSetPoint {
                temp_c: a.temp_c.or(a.temp_f.map(units::fahrenheit_to_celsius)).unwrap_or(f64::NAN),
            },
            EventKindCommand::NitrifyingCultureAdded => EventKind::NitrifyingCultureAdded,
            EventKindCommand::AmmoniaBinderAdded => EventKind::AmmoniaBinderAdded,
            EventKindCommand::ZeoliteAdded => EventKind::ZeoliteAdded,
        };
        kind.check().map_err(|e| refuse(self.option_for(e.field()), &e))?;
        Ok(kind)
    }

    fn option_for(&self, field: Field) -> &'static str {
        match (self, field) {
            (_, Field::WaterChangePercent) => "--percent",
            (_, Field::SourcePh) => "--source-ph",
            (_, Field::SourceTotalAmmonia) => "--source-tan",
            (EventKindCommand::WaterChange(a), Field::SourceTemperature) if a.source_temp_c.is_none() => {
                "--source-temp-f"
            }
            (_, Field::SourceTemperature) => "--source-temp-c",
            (_, Field::MedicationName) => "--name",
            (_, Field::FishCount) => "--count",
            (_, Field::SaltGrams) => "--grams",
            (EventKindCommand::HeaterSetPoint(a), Field::SetPointTemperature) if a.temp_c.is_none() => "--temp-f",
            (_, Field::SetPointTemperature) => "--temp-c",
            _ => "event",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(s: &str) -> DateTime<FixedOffset> {
        DateTime::parse_from_rfc3339(s).unwrap()
    }

    #[test]
    fn times_parse_in_every_offered_form() {
        let now = at("2026-12-01T09:00:00+01:00");
        assert_eq!(
            parse_when("2026-11-30T07:30:00+01:00", now, Bound::Start).unwrap(),
            at("2026-11-30T07:30:00+01:00")
        );
        assert_eq!(parse_when("2026-11-30T06:30:00Z", now, Bound::Start).unwrap(), at("2026-11-30T07:30:00+01:00"));
        assert_eq!(parse_when("12h", now, Bound::Start).unwrap(), at("2026-11-30T21:00:00+01:00"));
        assert_eq!(parse_when("7d", now, Bound::Start).unwrap(), at("2026-11-24T09:00:00+01:00"));
        assert_eq!(parse_when("now", now, Bound::Start).unwrap(), now);
        // Local forms depend on the machine's zone; they must at least be the same local wall time.
        let local = parse_when("2026-11-30 07:30", now, Bound::Start).unwrap();
        assert_eq!(local.naive_local().to_string(), "2026-11-30 07:30:00");
        let start = parse_when("2026-11-30", now, Bound::Start).unwrap();
        let end = parse_when("2026-11-30", now, Bound::End).unwrap();
        assert_eq!(start.naive_local().to_string(), "2026-11-30 00:00:00");
        assert_eq!(end.naive_local().to_string(), "2026-11-30 23:59:59.999");
        for bad in ["", "tomorrowish", "2026-13-01", "-3d", "12 parsecs"] {
            assert!(parse_when(bad, now, Bound::Start).is_err(), "{bad}");
        }
    }

    #[test]
    fn locate_checks_ids_and_prefers_the_tank() {
        let l = locate(None, Some("B2-07"), Some("RACK-B")).unwrap();
        assert_eq!(l.target, Target::Tank("B2-07".into()));
        assert_eq!(l.history_targets(), vec![Target::Tank("B2-07".into()), Target::System("RACK-B".into())]);
        assert_eq!(locate(None, None, Some("RACK-B")).unwrap().target, Target::System("RACK-B".into()));
        assert!(locate(None, None, None).is_err());
        assert!(locate(None, Some(""), None).unwrap_err().to_string().starts_with("--tank:"));
    }
}
