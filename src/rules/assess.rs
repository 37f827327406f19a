//! The assessment of one reading: band, latent risk, trend, biofilter state,
//! actions and warnings, from everything known about the tank.
//!
//! The trade's rules of thumb applied here are common practice, no source,
//! unless a comment names one.

use chrono::{DateTime, Duration, Utc};
use serde::Serialize;

use super::action::{Action, ActionKind, Warning, WarningKind};
use super::biofilter::{self, Biofilter, BiofilterRules, DatedEvent, FilterReading};
use super::latent::{Latent, LatentBasis, latent};
use super::trend::{Direction, Trend, TrendWindow, trend};
use super::water_change::{self, Planned, SourceWater, TankWater};
use crate::core::band::{Band, BandEdges};
use crate::core::sample::{Derived, WaterSample, derive};
use crate::core::units::{NACL_PER_CL, nitrite_n_to_ion};
use crate::model::facility::{Facility, Tank, TemperatureUnit, VolumeUnit};
use crate::model::record::{EventKind, Reading};
use crate::model::species::{EffectiveProfile, WaterType};
use crate::numfmt::sig;

/// Thresholds of the assessment.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RulesConfig {
    /// Biofilter thresholds (cycling age, at-risk window...).
    pub biofilter: BiofilterRules,
    /// Plans aim at this share of the watch edge, for a margin below it.
    pub clear_margin: f64,
    /// Dissolved oxygen under this percent of saturation is low (common
    /// practice, no source).
    pub low_oxygen_percent: f64,
    /// The most salt suggested against ammonia, g/L (common practice, no source).
    pub max_salt_g_l: f64,
    /// Chloride to keep per unit of nitrite, by mass (SRAC Publication 462,
    /// Durborow, Crosby & Brunson 1997: at least 10 : 1).
    pub chloride_to_nitrite: f64,
    /// How far to lower the heater at most, °C (common practice, no source).
    pub max_cooling_c: f64,
}

impl Default for RulesConfig {
    fn default() -> Self {
        RulesConfig {
            biofilter: BiofilterRules::default(),
            clear_margin: 0.9,
            low_oxygen_percent: 80.0,
            max_salt_g_l: 5.0,
            chloride_to_nitrite: 10.0,
            max_cooling_c: 2.0,
        }
    }
}

/// An earlier reading of the tank or its system (the current value after
/// corrections), with its time.
#[derive(Debug, Clone, Copy)]
pub struct PastReading<'a> {
    /// When it was taken.
    pub at: DateTime<Utc>,
    /// What it measured and saw.
    pub reading: &'a Reading,
}

/// Everything the assessment looks at.
#[derive(Debug, Clone, Copy)]
pub struct Inputs<'a> {
    /// The room.
    pub facility: &'a Facility,
    /// The tank assessed.
    pub tank: &'a Tank,
    /// The reading assessed (a system reading carried to this tank is fine).
    pub reading: &'a Reading,
    /// When it was taken.
    pub at: DateTime<Utc>,
    /// Earlier readings of the tank and its system, in any order, not
    /// including `reading`.
    pub history: &'a [PastReading<'a>],
    /// Events on the tank and its system, in any order.
    pub events: &'a [DatedEvent<'a>],
    /// Thresholds.
    pub config: &'a RulesConfig,
}

/// The figures of the assessed sample.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Figures {
    /// Temperature, °C.
    pub temp_c: f64,
    /// pH.
    pub ph: f64,
    /// Total ammonia, mg TAN-N/L.
    pub tan_n_mg_l: f64,
    /// Salinity used, g/L (measured, or the tank's configured salinity).
    pub salinity_ppt: f64,
    /// pKa of NH4+.
    pub pka: f64,
    /// Un-ionized fraction.
    pub nh3_fraction: f64,
    /// NH3, mg/L.
    pub nh3_mg_l: f64,
    /// NH3-N, mg/L.
    pub nh3_n_mg_l: f64,
    /// EPA 2013 acute criterion, mg TAN-N/L (fresh water only).
    pub epa2013_acute_tan_n_mg_l: Option<f64>,
    /// EPA 2013 chronic criterion, mg TAN-N/L (fresh water only).
    pub epa2013_chronic_tan_n_mg_l: Option<f64>,
    /// Oxygen saturation, mg/L.
    pub do_saturation_mg_l: f64,
    /// Measured oxygen as percent of saturation.
    pub do_percent: Option<f64>,
}

impl Figures {
    fn new(sample: &WaterSample, derived: &Derived) -> Figures {
        Figures {
            temp_c: sample.temp_c,
            ph: sample.ph,
            tan_n_mg_l: sample.tan_n_mg_l,
            salinity_ppt: sample.salinity_ppt,
            pka: derived.toxic.pka,
            nh3_fraction: derived.toxic.fraction,
            nh3_mg_l: derived.toxic.nh3_mg_l,
            nh3_n_mg_l: derived.toxic.nh3_n_mg_l,
            epa2013_acute_tan_n_mg_l: derived.epa_acute_tan_n_mg_l,
            epa2013_chronic_tan_n_mg_l: derived.epa_chronic_tan_n_mg_l,
            do_saturation_mg_l: derived.do_saturation_mg_l,
            do_percent: derived.do_percent,
        }
    }
}

/// The assessment of one reading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Assessment {
    /// The tank's label.
    pub tank: String,
    /// Its system, when it shares water.
    pub system: Option<String>,
    /// The water volume actions are sized for, L.
    pub water_volume_l: f64,
    /// The band edges used, mg NH3-N/L.
    pub band_edges: BandEdges,
    /// What is missing for the NH3 figure (empty when complete).
    pub missing: Vec<&'static str>,
    /// The sample's figures, when temperature, pH and total ammonia are known.
    pub figures: Option<Figures>,
    /// Band of the NH3 alone.
    pub measured_band: Option<Band>,
    /// Band after raising one step for signs in the fish or deaths.
    pub band: Option<Band>,
    /// Why the band was raised (signs seen, deaths).
    pub raised_by: Vec<String>,
    /// NH3 and band if pH rose.
    pub latent: Option<Latent>,
    /// Trend of NH3-N over the last readings.
    pub trend: Option<Trend>,
    /// Trend of total ammonia over the last readings.
    pub tan_trend: Option<Trend>,
    /// The biofilter's state.
    pub biofilter: Biofilter,
    /// Suggested actions, most urgent first.
    pub actions: Vec<Action>,
    /// What not to do.
    pub warnings: Vec<Warning>,
    /// Guidance, not veterinary advice.
    pub caution: &'static str,
}

/// How the room shows temperatures and volumes in reasons.
#[derive(Clone, Copy)]
struct Units {
    temperature: TemperatureUnit,
    volume: VolumeUnit,
}

impl Units {
    fn temp(self, c: f64) -> String {
        match self.temperature {
            TemperatureUnit::Celsius => format!("{c:.1} °C"),
            TemperatureUnit::Fahrenheit => format!("{:.1} °F", crate::core::units::celsius_to_fahrenheit(c)),
        }
    }
    fn temp_value(self, c: f64) -> (f64, &'static str) {
        match self.temperature {
            TemperatureUnit::Celsius => (round_to(c, 0.5), "°C"),
            TemperatureUnit::Fahrenheit => (round_to(crate::core::units::celsius_to_fahrenheit(c), 1.0), "°F"),
        }
    }
    fn volume(self, litres: f64) -> String {
        let (v, unit) = self.volume_value(litres);
        format!("{} {unit}", sig(v, 3).trim_end_matches(".0"))
    }
    fn volume_value(self, litres: f64) -> (f64, &'static str) {
        match self.volume {
            VolumeUnit::Litre => (practical(litres), "L"),
            VolumeUnit::UsGallon => (practical(self.volume.from_litres(litres)), "US gal"),
        }
    }
}

/// Rounds to `step`.
fn round_to(x: f64, step: f64) -> f64 {
    (x / step).round() * step
}

/// Rounds an amount to what a person measures: 0.1 below 10, whole units below
/// 1,000, tens above.
fn practical(x: f64) -> f64 {
    if x < 10.0 {
        round_to(x, 0.1)
    } else if x < 1000.0 {
        x.round()
    } else {
        round_to(x, 10.0)
    }
}

/// Grams for people: kilograms from 1 kg up.
fn mass_text(grams: f64) -> String {
    if grams >= 1000.0 { format!("{} kg", sig(grams / 1000.0, 3)) } else { format!("{} g", sig(grams, 3)) }
}

fn nh3_text(nh3_n: f64) -> String {
    format!("{} mg/L NH3-N", sig(nh3_n, 2))
}

/// NH3-N of a sample changed in temperature or salinity.
fn nh3_n_at(sample: &WaterSample, temp_c: f64, salinity_ppt: f64) -> f64 {
    WaterSample { temp_c, salinity_ppt, ..*sample }.toxic().nh3_n_mg_l
}

fn percent_change(before: f64, after: f64) -> String {
    format!("{:+.0} %", 100.0 * (after / before - 1.0))
}

/// The source water a change would use, and where its pH comes from: the
/// last water-change event that measured it, else the room's source water.
fn source_water(inputs: &Inputs<'_>) -> (SourceWater, Option<(f64, LatentBasis)>, bool) {
    let room = inputs.facility.room.source_water.as_ref();
    let last_change = inputs
        .events
        .iter()
        .filter(|e| e.at <= inputs.at)
        .filter_map(|e| match e.kind {
            EventKind::WaterChange { source_ph, source_tan_n_mg_l, source_temp_c, .. } => {
                Some((e.at, *source_ph, *source_tan_n_mg_l, *source_temp_c))
            }
            _ => None,
        })
        .max_by_key(|c| c.0);
    let event_ph = last_change.and_then(|c| c.1);
    let ph_basis = match (event_ph, room.and_then(|r| r.ph)) {
        (Some(ph), _) => Some((ph, LatentBasis::LastWaterChange)),
        (None, Some(ph)) => Some((ph, LatentBasis::SourceWater)),
        (None, None) => None,
    };
    let source = SourceWater {
        tan_n_mg_l: last_change.and_then(|c| c.2).or(room.and_then(|r| r.tan_n_mg_l)).unwrap_or(0.0),
        ph: ph_basis.map(|p| p.0),
        temp_c: last_change.and_then(|c| c.3).or(room.and_then(|r| r.temp_c)),
    };
    (source, ph_basis, room.is_some_and(|r| r.chloramine))
}

/// Whether feeding is currently held: the newest feeding event is a hold.
fn feeding_held(inputs: &Inputs<'_>) -> bool {
    inputs
        .events
        .iter()
        .filter(|e| e.at <= inputs.at)
        .filter(|e| matches!(e.kind, EventKind::FeedingHeld | EventKind::FeedingResumed))
        .max_by_key(|e| e.at)
        .is_some_and(|e| matches!(e.kind, EventKind::FeedingHeld))
}

fn had_event(inputs: &Inputs<'_>, within: Duration, test: impl Fn(&EventKind) -> bool) -> bool {
    inputs.events.iter().any(|e| e.at <= inputs.at && inputs.at - e.at <= within && test(e.kind))
}

/// The sample of a reading, with the tank's configured salinity when none was measured.
fn sample_of(reading: &Reading, default_salinity: f64) -> Option<WaterSample> {
    reading.measurements.water_sample(default_salinity)
}

/// Assesses one reading.
pub fn assess(inputs: &Inputs<'_>) -> Assessment {
    let facility = inputs.facility;
    let tank = inputs.tank;
    let config = inputs.config;
    let profile = facility.effective_profile(tank);
    let edges = profile.band_edges;
    // What is done to the water (heater, salt) reaches every tank on a shared
    // system, so those steps must suit every species on it, not only this tank's.
    let water_profile = match facility.system_of(tank) {
        Some(system) => {
            let tanks = facility.tanks_on(system);
            let species: Vec<_> = tanks.iter().flat_map(|t| facility.species_of(t)).collect();
            EffectiveProfile::combine(&species)
        }
        None => profile.clone(),
    };
    let water_type = facility.water_type(tank);
    let configured_salinity = facility.salinity_g_l(tank);
    let volume_l = facility.water_volume_l(tank);
    let units = Units { temperature: facility.room.temperature_unit, volume: facility.room.volume_unit };
    let reading = inputs.reading;
    let observations = &reading.observations;

    let sample = sample_of(reading, configured_salinity);
    let mut missing = Vec::new();
    let m = &reading.measurements;
    if m.temp_c().is_none() {
        missing.push("temperature");
    }
    if m.ph.is_none() {
        missing.push("pH");
    }
    if m.tan_n_mg_l().is_none() {
        missing.push("total ammonia");
    }
    let derived = sample.map(|s| derive(&s, &edges, facility.room.elevation_m));
    let measured_band = derived.map(|d| d.band);

    // Signs in the fish or deaths raise the band by one, never lower it.
    let mut raised_by: Vec<String> = observations.signs().iter().map(|s| s.name().replace('-', " ")).collect();
    if observations.deaths > 0 {
        raised_by.push(format!("{} dead", observations.deaths));
    }
    let band = measured_band.map(|b| if raised_by.is_empty() { b } else { b.raised() });

    let (source, source_ph, chloramine) = source_water(inputs);
    // Signs in the fish raise the latent band too: they are about the fish, not the pH.
    let latent = sample.map(|s| {
        let mut l = latent(&s, &edges, source_ph);
        if !raised_by.is_empty() {
            l.band = l.band.raised();
        }
        l
    });

    // Trends over this reading and the earlier ones.
    let mut nh3_points = Vec::new();
    let mut tan_points = Vec::new();
    let mut filter_readings = Vec::new();
    let mut push = |at: DateTime<Utc>, r: &Reading| {
        if let Some(s) = sample_of(r, configured_salinity) {
            nh3_points.push((at, s.toxic().nh3_n_mg_l));
        }
        if let Some(t) = r.measurements.tan_n_mg_l() {
            tan_points.push((at, t));
        }
        filter_readings.push(FilterReading {
            at,
            tan_n_mg_l: r.measurements.tan_n_mg_l(),
            nitrite_n_mg_l: r.measurements.nitrite_n_mg_l(),
            nitrate_n_mg_l: r.measurements.nitrate_n_mg_l(),
            deaths: r.observations.deaths,
        });
    };
    for past in inputs.history.iter().filter(|p| p.at < inputs.at) {
        push(past.at, past.reading);
    }
    push(inputs.at, reading);
    let nh3_trend = trend(&nh3_points, TrendWindow::default(), 0.1 * edges.watch);
    // Total ammonia is steady within 0.05 mg/L a day: a quarter of a kit's
    // smallest step over five days (design decision).
    let tan_trend = trend(&tan_points, TrendWindow::default(), 0.05);
    let tan_rising = tan_trend.is_some_and(|t| t.direction == Direction::Rising);
    let biofilter = biofilter::state(
        tank.set_up,
        tank.stock_count,
        inputs.at,
        &filter_readings,
        inputs.events,
        tan_rising,
        &config.biofilter,
    );

    let mut plan = Plan {
        inputs,
        config,
        units,
        profile: &profile,
        water_profile: &water_profile,
        edges,
        water_type,
        volume_l,
        source,
        chloramine,
        actions: Vec::new(),
        warnings: Vec::new(),
    };
    plan.signs_and_deaths(reading);
    if let (Some(sample), Some(derived), Some(measured)) = (sample, derived, measured_band) {
        plan.ammonia(&sample, &derived, measured, latent.as_ref(), nh3_trend.as_ref(), &biofilter);
        plan.oxygen(&sample, &derived, measured);
        plan.ranges(&sample);
    }
    plan.nitrite(reading, measured_band);
    plan.feeding(measured_band, nh3_trend.as_ref(), &biofilter, reading, inputs.history);
    plan.actions.sort_by_key(|a| a.kind);

    Assessment {
        tank: tank.id.as_str().to_string(),
        system: tank.system.as_ref().map(|s| s.as_str().to_string()),
        water_volume_l: volume_l,
        band_edges: edges,
        missing,
        figures: sample.zip(derived).map(|(s, d)| Figures::new(&s, &d)),
        measured_band,
        band,
        raised_by,
        latent,
        trend: nh3_trend,
        tan_trend,
        biofilter,
        actions: plan.actions,
        warnings: plan.warnings,
        caution: crate::CAUTION,
    }
}

/// Builds the action list.
struct Plan<'a> {
    inputs: &'a Inputs<'a>,
    config: &'a RulesConfig,
    units: Units,
    profile: &'a EffectiveProfile,
    /// The combined needs of everything on the tank's water (its system's
    /// tanks when it shares water): heater and salt steps must suit them all.
    water_profile: &'a EffectiveProfile,
    edges: BandEdges,
    water_type: WaterType,
    volume_l: f64,
    source: SourceWater,
    chloramine: bool,
    actions: Vec<Action>,
    warnings: Vec<Warning>,
}

impl Plan<'_> {
    fn warn(&mut self, kind: WarningKind, message: String) {
        self.warnings.push(Warning { kind, message });
    }

    fn volume_name(&self) -> String {
        match self.inputs.tank.system.as_ref() {
            Some(system) => format!("system {system}'s whole volume, {}", self.units.volume(self.volume_l)),
            None => format!("the tank's {}", self.units.volume(self.volume_l)),
        }
    }

    fn salted(&self, sample: &WaterSample) -> bool {
        sample.salinity_ppt >= 0.5 || self.water_type != WaterType::Fresh
    }

    fn signs_and_deaths(&mut self, reading: &Reading) {
        let o = &reading.observations;
        if o.deaths > 0 {
            self.actions.push(Action::amount(
                ActionKind::RemoveDead,
                f64::from(o.deaths),
                "fish",
                format!("{} dead: take them out now (decay adds ammonia) and record them as an event", o.deaths),
            ));
        }
        if o.any_sign() || o.deaths > 0 {
            let seen: Vec<String> = o.signs().iter().map(|s| s.name().replace('-', " ")).collect();
            let what = match (seen.is_empty(), o.deaths) {
                (false, 0) => format!("fish show {}", seen.join(", ")),
                (true, d) => format!("{d} dead"),
                (false, d) => format!("fish show {} and {d} died", seen.join(", ")),
            };
            self.actions.push(Action::plain(
                ActionKind::CallVeterinarian,
                format!(
                    "{what}: ammonia poisoning and disease look alike, so have an aquatic veterinarian examine \
                     them; bring this tank's history"
                ),
            ));
            if o.any_sign() && self.inputs.tank.stock_count > 1 {
                self.actions.push(Action::plain(
                    ActionKind::Isolate,
                    "if only some fish show signs, move them to a quarantine tank with matched water",
                ));
            }
        }
    }

    #[allow(clippy::too_many_lines)]
    fn ammonia(
        &mut self,
        sample: &WaterSample,
        derived: &Derived,
        measured: Band,
        latent: Option<&Latent>,
        nh3_trend: Option<&Trend>,
        biofilter: &Biofilter,
    ) {
        let nh3 = derived.toxic.nh3_n_mg_l;
        let cycling = matches!(biofilter, Biofilter::Cycling { .. });
        let at_risk = matches!(biofilter, Biofilter::AtRisk { .. });

        // Latent risk: what a pH rise would do.
        if let Some(l) = latent
            && l.band > measured
        {
            let cause = match l.basis {
                LatentBasis::SourceWater | LatentBasis::LastWaterChange => {
                    format!("a water change with the source water at pH {:.1}", l.ph)
                }
                LatentBasis::DefaultStep => format!("a rise of pH to {:.1}", l.ph),
            };
            self.warn(
                WarningKind::DoNotRaisePh,
                format!(
                    "{cause} would turn {} ({measured}) into {} ({}): no buffers or coral sand now; bring new water \
                     to the tank's pH ({:.1}) before changing it",
                    nh3_text(nh3),
                    nh3_text(l.nh3_n_mg_l),
                    l.band,
                    sample.ph
                ),
            );
        }
        if self.source.tan_n_mg_l > 0.0 || self.chloramine {
            let carried = if self.source.tan_n_mg_l > 0.0 {
                format!("carries {} mg/L TAN-N", sig(self.source.tan_n_mg_l, 2))
            } else {
                "is treated with chloramine".to_string()
            };
            self.warn(
                WarningKind::SourceWaterAmmonia,
                format!(
                    "the source water {carried}: use a conditioner that removes chlorine and chloramine and binds \
                     the ammonia it releases"
                ),
            );
        }

        if measured >= Band::Watch {
            self.water_change(sample, nh3, measured, cycling);
        }
        if measured >= Band::Act || (cycling && measured >= Band::Watch) {
            self.warn(
                WarningKind::DoNotCleanFilter,
                "leave the filter media alone while ammonia is high: cleaning them removes the bacteria that \
                 clear it"
                    .to_string(),
            );
        }
        if measured >= Band::Act && (cycling || at_risk || measured == Band::Critical) {
            self.actions.push(Action::plain(
                ActionKind::AmmoniaBinder,
                "as a stop-gap, dose an ammonia binder for the whole volume at the label rate: it makes NH3 \
                 non-toxic for about a day but removes nothing, and many kits still read the bound ammonia",
            ));
        }
        let biofilter_reason = match biofilter {
            Biofilter::AtRisk { causes, .. } => Some(format!("recent: {}", causes.join("; "))),
            Biofilter::RisingInEstablished { possible_causes } if possible_causes.is_empty() => Some(
                "ammonia is rising in an established tank with no recorded event: check for a dead fish, \
                 uneaten food, overfeeding and filter flow"
                    .to_string(),
            ),
            Biofilter::RisingInEstablished { possible_causes } => {
                Some(format!("ammonia is rising; recent events that may explain it: {}", possible_causes.join("; ")))
            }
            _ => None,
        };
        if let Some(reason) = biofilter_reason
            && measured >= Band::Watch
        {
            self.actions.push(Action::plain(
                ActionKind::CheckBiofilter,
                format!("{reason}; check the filter runs, is not clogged and was not disturbed"),
            ));
        }
        let recent_culture =
            had_event(self.inputs, Duration::days(7), |k| matches!(k, EventKind::NitrifyingCultureAdded));
        if (cycling || at_risk) && measured >= Band::Watch && !recent_culture {
            self.actions.push(Action::plain(
                ActionKind::NitrifyingCulture,
                "add a nitrifying bacteria culture to the filter, at the label dose, and keep it well aerated",
            ));
        }
        if measured >= Band::Act {
            self.cooling(sample, nh3);
            self.salt_or_zeolite(sample, nh3);
        }
        let rising = nh3_trend.is_some_and(|t| t.direction == Direction::Rising);
        let retest_hours = match measured {
            Band::Critical => Some(2.0),
            Band::Act => Some(12.0),
            Band::Watch => Some(24.0),
            Band::Clear if rising => Some(24.0),
            Band::Clear => None,
        };
        if let Some(hours) = retest_hours {
            let why = match measured {
                Band::Critical => "after the first water change, to see whether another is needed",
                Band::Act => "to check the actions worked",
                _ if rising => "NH3 is rising: test again tomorrow",
                _ => "to see which way it goes",
            };
            self.actions.push(Action::amount(ActionKind::Retest, hours, "h", format!("within {hours} h {why}")));
        }
    }

    fn water_change(&mut self, sample: &WaterSample, nh3: f64, measured: Band, cycling: bool) {
        let target = self.config.clear_margin * self.edges.watch;
        let tank = TankWater {
            tan_n_mg_l: sample.tan_n_mg_l,
            ph: sample.ph,
            temp_c: sample.temp_c,
            salinity_ppt: sample.salinity_ppt,
            volume_l: self.volume_l,
        };
        let mut planned = water_change::plan(&tank, &self.source, target);
        let mut out_of_reach = false;
        if let Planned::Unreachable { source_nh3_n_mg_l } = planned {
            let ph = water_change::planning_ph(sample.ph, &self.source);
            let remedy = if ph > sample.ph + 0.05 {
                "bring the source water's pH down to the tank's first"
            } else {
                "remove or bind the source water's own ammonia first (a chloramine remover that binds ammonia)"
            };
            self.warn(
                WarningKind::SourceCannotDilute,
                format!(
                    "even pure source water would hold {} at pH {ph:.1}: a water change cannot bring NH3 below the \
                     watch edge; {remedy}",
                    nh3_text(source_nh3_n_mg_l),
                ),
            );
            // Clear is out of reach, but dilution still helps: aim a quarter above
            // what the source water itself would leave, when that is a real cut.
            let best = 1.25 * source_nh3_n_mg_l;
            out_of_reach = true;
            planned = if best < 0.8 * nh3 { water_change::plan(&tank, &self.source, best) } else { Planned::NotNeeded };
        }
        match planned {
            Planned::Plan(p) => {
                let percent = (p.fraction_each * 100.0).round();
                let (amount, unit) = self.units.volume_value(p.litres_each);
                let steps = if p.changes > 1 {
                    format!(
                        "{} changes of {percent:.0} % ({} each, testing between changes)",
                        p.changes,
                        self.units.volume(p.litres_each)
                    )
                } else {
                    format!("one change of {percent:.0} % ({})", self.units.volume(p.litres_each))
                };
                let ph_note = if p.ph_after > sample.ph + 0.05 {
                    format!(" at the source water's pH {:.1}", p.ph_after)
                } else {
                    format!(" at pH {:.1}", p.ph_after)
                };
                let daily = if cycling { "; while the tank cycles, repeat daily to keep ammonia low" } else { "" };
                let reach = if out_of_reach { "clear is out of reach with this source water, but " } else { "" };
                let reason = format!(
                    "{reach}{steps} of {}: total ammonia {} → {} mg/L TAN-N, NH3 {} ({measured}) → {} ({}){ph_note} and {}; \
                     dechlorinate the new water and match its temperature and pH{daily}",
                    self.volume_name(),
                    sig(sample.tan_n_mg_l, 2),
                    sig(p.tan_after_n_mg_l, 2),
                    nh3_text(nh3),
                    nh3_text(p.nh3_after_n_mg_l),
                    self.edges.classify(p.nh3_after_n_mg_l),
                    self.units.temp(p.temp_after_c),
                );
                let mut action = Action::amount(ActionKind::WaterChange, percent, "%", reason).and_also(amount, unit);
                action.repeat = (p.changes > 1).then_some(p.changes);
                self.actions.push(action);
                let shock = (p.temp_after_c - sample.temp_c).abs() > 2.0
                    || self.profile.temp_c.is_some_and(|range| !range.contains(p.temp_after_c));
                if let (true, Some(source_c)) = (shock, self.source.temp_c) {
                    self.warn(
                        WarningKind::TemperatureShock,
                        format!(
                            "the source water is {}: these changes would take the tank to {}; bring the new water to \
                             about {} first",
                            self.units.temp(source_c),
                            self.units.temp(p.temp_after_c),
                            self.units.temp(sample.temp_c)
                        ),
                    );
                }
            }
            Planned::Unreachable { .. } | Planned::NotNeeded => {}
        }
    }

    fn cooling(&mut self, sample: &WaterSample, nh3: f64) {
        let Some(range) = self.water_profile.temp_c else { return };
        // Down by at most 2 °C, never below the lowest temperature every species
        // on the water takes (from above the range, lowering helps twice over).
        let target = (sample.temp_c - self.config.max_cooling_c).max(range.min);
        if sample.temp_c - target < 0.5 {
            return;
        }
        let after = nh3_n_at(sample, target, sample.salinity_ppt);
        let (value, unit) = self.units.temp_value(target);
        self.actions.push(Action::amount(
            ActionKind::LowerTemperature,
            value,
            unit,
            format!(
                "lower the heater from {} to {} (the range of every species on this water starts at {}): NH3 {} → \
                 {} ({}), a mild cut that does not remove ammonia",
                self.units.temp(sample.temp_c),
                self.units.temp(target),
                self.units.temp(range.min),
                nh3_text(nh3),
                nh3_text(after),
                percent_change(nh3, after)
            ),
        ));
    }

    fn salt_or_zeolite(&mut self, sample: &WaterSample, nh3: f64) {
        if self.water_type != WaterType::Fresh {
            if had_event(self.inputs, Duration::days(60), |k| matches!(k, EventKind::ZeoliteAdded)) {
                self.warn(
                    WarningKind::NoZeoliteInSaltWater,
                    "zeolite binds little ammonia in salt water and releases what it holds: take it out".to_string(),
                );
            }
            return;
        }
        let tolerance = self.water_profile.salt_tolerance_g_l.unwrap_or(0.0);
        let zeolite_in_filter = had_event(self.inputs, Duration::days(30), |k| matches!(k, EventKind::ZeoliteAdded));
        let target = tolerance.min(self.config.max_salt_g_l);
        // Salt for species that tolerate at least 1 g/L; otherwise zeolite. Never
        // both: salt pushes bound ammonium back out of zeolite.
        if tolerance >= 1.0 {
            if zeolite_in_filter {
                self.warn(
                    WarningKind::NoSaltWithZeolite,
                    "zeolite is in the filter: do not add salt, which releases the ammonia it holds".to_string(),
                );
                return;
            }
            if sample.salinity_ppt < target - 0.25 {
                let grams = practical((target - sample.salinity_ppt) * self.volume_l);
                let after = nh3_n_at(sample, sample.temp_c, target);
                self.actions.push(
                    Action::amount(
                        ActionKind::AddSalt,
                        grams,
                        "g",
                        format!(
                            "every species on this water tolerates {} g/L: dissolve {} of non-iodised salt for {} to go \
                             from {} to {} g/L: NH3 {} → {} ({}), mild, and it eases nitrite and osmotic stress; not with zeolite",
                            sig(tolerance, 2),
                            mass_text(grams),
                            self.volume_name(),
                            sig(sample.salinity_ppt, 2),
                            sig(target, 2),
                            nh3_text(nh3),
                            nh3_text(after),
                            percent_change(nh3, after)
                        ),
                    )
                    .and_also(target, "g/L"),
                );
            }
        } else if !self.salted(sample) && !zeolite_in_filter {
            self.actions.push(Action::plain(
                ActionKind::Zeolite,
                "put zeolite (clinoptilolite) in a mesh bag in the filter flow: it binds ammonium in fresh water; \
                 replace it when saturated, and no salt treatment (grams per litre) while it is in: salt pushes \
                 the ammonia back out",
            ));
        }
    }

    fn oxygen(&mut self, sample: &WaterSample, derived: &Derived, measured: Band) {
        let low = derived.do_percent.filter(|p| *p < self.config.low_oxygen_percent);
        if let Some(percent) = low {
            let target = self.config.low_oxygen_percent / 100.0 * derived.do_saturation_mg_l;
            self.actions.push(Action::amount(
                ActionKind::Aerate,
                practical(target),
                "mg/L",
                format!(
                    "dissolved oxygen {} mg/L is {:.0} % of saturation ({} mg/L at {}): add air stones and break the \
                     surface until it is above {} mg/L; nitrifiers and stressed gills need oxygen",
                    sig(sample.do_mg_l.unwrap_or_default(), 2),
                    percent,
                    sig(derived.do_saturation_mg_l, 3),
                    self.units.temp(sample.temp_c),
                    sig(target, 2)
                ),
            ));
        } else if measured >= Band::Act {
            self.actions.push(Action::plain(
                ActionKind::Aerate,
                "more air and a broken surface: nitrifying bacteria and ammonia-stressed gills need oxygen",
            ));
        }
    }

    fn ranges(&mut self, sample: &WaterSample) {
        if let Some(range) = self.profile.temp_c
            && !range.contains(sample.temp_c)
        {
            self.warn(
                WarningKind::TemperatureOutsideRange,
                format!(
                    "{} is outside the species' range {}–{}",
                    self.units.temp(sample.temp_c),
                    self.units.temp(range.min),
                    self.units.temp(range.max)
                ),
            );
        }
        if let Some(range) = self.profile.ph
            && !range.contains(sample.ph)
        {
            self.warn(
                WarningKind::PhOutsideRange,
                format!("pH {:.1} is outside the species' range {:.1}–{:.1}", sample.ph, range.min, range.max),
            );
        }
    }

    fn nitrite(&mut self, reading: &Reading, measured: Option<Band>) {
        let m = &reading.measurements;
        let Some(nitrite_n) = m.nitrite_n_mg_l() else { return };
        let salinity = m.salinity_ppt().unwrap_or(self.inputs.facility.salinity_g_l(self.inputs.tank));
        if self.water_type != WaterType::Fresh
            || salinity >= 5.0
            || nitrite_n < self.config.biofilter.low_nitrite_n_mg_l
        {
            return;
        }
        // SRAC 462 asks for chloride at least 10× nitrite; whether its nitrite is
        // NO2- or NO2-N is unconfirmed, so the larger dose (as NO2-) is used.
        let nitrite_ion = nitrite_n_to_ion(nitrite_n);
        let needed = self.config.chloride_to_nitrite * nitrite_ion;
        let (have, assumed) = match m.chloride_mg_l {
            Some(cl) => (cl, ""),
            None => (0.0, "; chloride was not measured, so none is assumed: measure it to dose less"),
        };
        if have >= needed {
            return;
        }
        let grams = practical(NACL_PER_CL * (needed - have) * self.volume_l / 1000.0);
        let added_g_l = NACL_PER_CL * (needed - have) / 1000.0;
        let tolerance = self.water_profile.salt_tolerance_g_l.unwrap_or(0.0);
        if added_g_l > 1.0 && added_g_l > tolerance {
            self.warn(
                WarningKind::SaltBeyondTolerance,
                format!(
                    "nitrite {} mg/L NO2-N would need {} g/L of salt, more than the species tolerate: change water \
                     instead",
                    sig(nitrite_n, 2),
                    sig(added_g_l, 2)
                ),
            );
            return;
        }
        self.actions.push(
            Action::amount(
                ActionKind::AddChloride,
                grams,
                "g",
                format!(
                    "nitrite {} mg/L NO2-N ({} mg/L NO2-): keep chloride at least {}× nitrite (SRAC 462) — dissolve {} \
                     of plain salt (NaCl, {} g/L: far below a salt treatment) for {} to raise chloride from {} to {} \
                     mg/L{assumed}",
                    sig(nitrite_n, 2),
                    sig(nitrite_ion, 2),
                    self.config.chloride_to_nitrite,
                    mass_text(grams),
                    sig(added_g_l, 1),
                    self.volume_name(),
                    sig(have, 2),
                    sig(needed, 2)
                ),
            )
            .and_also(needed, "mg/L Cl-"),
        );
        if measured.is_none_or(|b| b < Band::Act) && !feeding_held(self.inputs) {
            self.actions.push(Action::plain(
                ActionKind::HoldFeeding,
                "nitrite is up: hold feeding until nitrite and ammonia are low on two readings in a row",
            ));
        }
    }

    fn feeding(
        &mut self,
        measured: Option<Band>,
        nh3_trend: Option<&Trend>,
        biofilter: &Biofilter,
        reading: &Reading,
        history: &[PastReading<'_>],
    ) {
        if self.actions.iter().any(|a| a.kind == ActionKind::HoldFeeding) {
            return;
        }
        let held = feeding_held(self.inputs);
        let Some(measured) = measured else { return };
        let rising = nh3_trend.is_some_and(|t| t.direction == Direction::Rising);
        let cycling = matches!(biofilter, Biofilter::Cycling { .. });
        let hold = measured >= Band::Act || (measured == Band::Watch && (rising || cycling));
        if hold {
            let reason = if held {
                "keep feeding held until two readings in a row are clear: food is the ammonia source"
            } else {
                "stop feeding until two readings in a row are clear: food is the ammonia source"
            };
            self.actions.push(Action::plain(ActionKind::HoldFeeding, reason));
            return;
        }
        if held && measured == Band::Clear {
            let salinity = self.inputs.facility.salinity_g_l(self.inputs.tank);
            let previous = history
                .iter()
                .filter(|p| p.at < self.inputs.at)
                .filter_map(|p| sample_of(p.reading, salinity).map(|s| (p.at, s)))
                .max_by_key(|p| p.0);
            let previous_clear =
                previous.is_some_and(|(_, s)| self.edges.classify(s.toxic().nh3_n_mg_l) == Band::Clear);
            if previous_clear && !reading.observations.any_sign() {
                self.actions.push(Action::plain(
                    ActionKind::ResumeFeeding,
                    "two readings in a row are clear: resume feeding with small rations and build up over a few days",
                ));
            } else {
                self.actions.push(Action::plain(
                    ActionKind::HoldFeeding,
                    "one clear reading so far: keep feeding held until the next reading is clear too",
                ));
            }
        }
    }
}
