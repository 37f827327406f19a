//! `tankwalk calc`: toxic ammonia for one reading typed on the command line.

use std::io::Write;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use serde::Serialize;

use tankwalk::core::band::{Band, BandEdges};
use tankwalk::core::limits::{self, Quantity, Unusual};
use tankwalk::core::salinity::SalinityReading;
use tankwalk::core::sample::{self, WaterSample};
use tankwalk::core::units::{self, AmmoniaBasis};
use tankwalk::numfmt::sig;

use tankwalk::model::record::{Reading, Target, Temperature, TotalAmmonia};
use tankwalk::model::{EffectiveProfile, Facility, VolumeUnit, WaterType};
use tankwalk::rules::latent::{Latent, latent};
use tankwalk::rules::water_change::SourceWater;
use tankwalk::rules::what_if::{WhatIf, apply};
use tankwalk::rules::{Assessment, Inputs, RulesConfig, assess};

use super::advice;

use super::room::resolve_room;
use super::{GlobalArgs, bad_input};

#[derive(Debug, Args)]
#[command(group(clap::ArgGroup::new("temperature").required(true).args(["temp_c", "temp_f"])))]
#[command(group(clap::ArgGroup::new("salt").args(["salinity_ppt", "sg", "cond_us_cm"])))]
pub struct CalcArgs {
    /// Water temperature in °C (0–40).
    #[arg(long, value_name = "C")]
    temp_c: Option<f64>,
    /// Water temperature in °F (32–104).
    #[arg(long, value_name = "F")]
    temp_f: Option<f64>,
    /// pH, as read by a glass electrode calibrated with NBS buffers, or a kit (0–14).
    #[arg(long)]
    ph: f64,
    /// Total ammonia in mg/L (ppm), on the basis given by --tan-as.
    #[arg(long, value_name = "MG_L")]
    tan: f64,
    /// How the kit reports total ammonia: n (as nitrogen, TAN-N), nh3 or nh4 [default: n, or the
    /// room's kit_basis with --tank].
    #[arg(long, value_name = "BASIS")]
    tan_as: Option<AmmoniaBasis>,
    /// Salinity in g/L (ppt), 0–45; without it, the tank's salinity with --tank, else fresh water.
    #[arg(long, value_name = "PPT")]
    salinity_ppt: Option<f64>,
    /// Specific gravity from a hydrometer or refractometer.
    #[arg(long, value_name = "SG")]
    sg: Option<f64>,
    /// Reference temperature of the SG instrument in °C (15.6 for 60/60 °F; 20; 25).
    #[arg(long, value_name = "C", default_value_t = 25.0, requires = "sg")]
    sg_ref_c: f64,
    /// Conductivity in µS/cm, compensated to --cond-ref-c.
    #[arg(long, value_name = "US_CM")]
    cond_us_cm: Option<f64>,
    /// Temperature the conductivity meter compensates to, °C.
    #[arg(long, value_name = "C", default_value_t = 25.0, requires = "cond_us_cm")]
    cond_ref_c: f64,
    /// Dissolved oxygen in mg/L, to show percent saturation.
    #[arg(long, value_name = "MG_L")]
    do_mg_l: Option<f64>,
    /// Elevation of the room in metres, for oxygen saturation [default: 0, or the room's with --tank].
    #[arg(long, value_name = "M")]
    elevation_m: Option<f64>,
    /// The tank (label on the glass) the reading is from: uses its species' band edges, its
    /// salinity unless one is given, and the room's kit basis and elevation (needs a room).
    #[arg(long, value_name = "ID")]
    tank: Option<String>,
    /// Try changes and see NH3 and band move: comma-separated `ph=`, `temp-c=`, `temp-f=`,
    /// `salinity=` (g/L) and `change=` (water-change percent, with the room's source water;
    /// needs --tank), e.g. `--what-if change=40,temp-c=24`.
    #[arg(long, value_name = "CHANGES")]
    what_if: Option<String>,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
}

/// Parses `--what-if`: `key=value` pairs separated by commas, each range-checked.
fn parse_what_if(text: &str, has_tank: bool) -> Result<WhatIf> {
    let mut what_if = WhatIf::default();
    for part in text.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        let Some((key, value)) = part.split_once('=') else {
            return Err(bad_input!(
                "--what-if: '{part}' is not key=value (keys: ph, temp-c, temp-f, salinity, change)"
            ));
        };
        let key = key.trim().to_ascii_lowercase();
        let value: f64 =
            value.trim().parse().map_err(|_| bad_input!("--what-if {key}: '{}' is not a number", value.trim()))?;
        let mut ignored = Vec::new();
        let check =
            |q: Quantity, v: f64, ignored: &mut Vec<String>| checked(&format!("--what-if {key}"), q, v, ignored);
        match key.as_str() {
            "ph" => what_if.ph = Some(check(Quantity::Ph, value, &mut ignored)?),
            "temp-c" | "temp" => what_if.temp_c = Some(check(Quantity::TemperatureC, value, &mut ignored)?),
            "temp-f" => {
                what_if.temp_c = Some(check(Quantity::TemperatureC, units::fahrenheit_to_celsius(value), &mut ignored)?)
            }
            "salinity" | "salinity-ppt" => what_if.salinity_ppt = Some(check(Quantity::Salinity, value, &mut ignored)?),
            "change" | "water-change" => {
                if !has_tank {
                    return Err(bad_input!(
                        "--what-if change: a water change needs the tank and its room's source water: add --tank"
                    ));
                }
                if !(0.0..=100.0).contains(&value) {
                    return Err(bad_input!("--what-if change: {value} % is outside 0–100 %"));
                }
                what_if.water_change_percent = Some(value);
            }
            other => {
                return Err(bad_input!(
                    "--what-if: unknown change '{other}' (use ph, temp-c, temp-f, salinity, change)"
                ));
            }
        }
    }
    if what_if.is_empty() {
        return Err(bad_input!("--what-if: no change given (for example --what-if change=40,temp-c=24)"));
    }
    Ok(what_if)
}

/// Checks one option's value against its quantity's range.
fn checked(option: &str, quantity: Quantity, value: f64, warnings: &mut Vec<String>) -> Result<f64> {
    match limits::check(quantity, value) {
        Ok(None) => Ok(value),
        Ok(Some(unusual)) => {
            warnings.push(describe(option, &unusual));
            Ok(value)
        }
        Err(err) => Err(bad_input!("{option}: {err}")),
    }
}

fn describe(option: &str, unusual: &Unusual) -> String {
    format!("{option}: {unusual}")
}

/// The validated sample, plus everything a person needs to know about how it was read.
struct Parsed {
    sample: WaterSample,
    tan_as_given: f64,
    tan_as: AmmoniaBasis,
    salinity_source: String,
    elevation_m: f64,
    warnings: Vec<String>,
}

/// What the tank and its room say when an option is not given.
#[derive(Default)]
struct Defaults {
    tan_as: Option<AmmoniaBasis>,
    elevation_m: Option<f64>,
    /// The tank's salinity, g/L, and where it comes from.
    salinity: Option<(f64, String)>,
}

fn parse(args: &CalcArgs, defaults: &Defaults) -> Result<Parsed> {
    let mut warnings = Vec::new();
    let temp_c = match (args.temp_c, args.temp_f) {
        (Some(c), _) => checked("--temp-c", Quantity::TemperatureC, c, &mut warnings)?,
        (None, Some(f)) => {
            if !f.is_finite() {
                return Err(bad_input!("--temp-f: temperature must be a finite number"));
            }
            let c = units::fahrenheit_to_celsius(f);
            if !(0.0..=40.0).contains(&c) {
                return Err(bad_input!("--temp-f: temperature {f} °F is outside the allowed range 32–104 °F"));
            }
            checked("--temp-f", Quantity::TemperatureC, c, &mut warnings)?
        }
        (None, None) => return Err(bad_input!("give the water temperature with --temp-c or --temp-f")),
    };
    let ph = checked("--ph", Quantity::Ph, args.ph, &mut warnings)?;
    let tan_as_given = checked("--tan", Quantity::TotalAmmonia, args.tan, &mut warnings)?;
    let (reading, salinity_source) = if let Some(s) = args.salinity_ppt {
        let s = checked("--salinity-ppt", Quantity::Salinity, s, &mut warnings)?;
        (Some(SalinityReading::Ppt { value: s }), "as given".to_string())
    } else if let Some(sg) = args.sg {
        let sg = checked("--sg", Quantity::SpecificGravity, sg, &mut warnings)?;
        let reference_c = checked("--sg-ref-c", Quantity::ReferenceTemperatureC, args.sg_ref_c, &mut warnings)?;
        (
            Some(SalinityReading::SpecificGravity { value: sg, reference_c }),
            "from specific gravity (EOS-80)".to_string(),
        )
    } else if let Some(cond) = args.cond_us_cm {
        let cond = checked("--cond-us-cm", Quantity::Conductivity, cond, &mut warnings)?;
        let reference_c = checked("--cond-ref-c", Quantity::ReferenceTemperatureC, args.cond_ref_c, &mut warnings)?;
        (
            Some(SalinityReading::Conductivity { value_us_cm: cond, reference_c }),
            "from conductivity (PSS-78)".to_string(),
        )
    } else if let Some((s, source)) = &defaults.salinity {
        (Some(SalinityReading::Ppt { value: *s }), source.clone())
    } else {
        (None, "none given: fresh water".to_string())
    };
    let salinity_ppt = reading.map_or(0.0, |r| r.practical_salinity());
    if reading.is_some() && !matches!(reading, Some(SalinityReading::Ppt { .. })) {
        checked("salinity", Quantity::Salinity, salinity_ppt, &mut warnings)?;
    }
    let do_mg_l = match args.do_mg_l {
        Some(d) => Some(checked("--do-mg-l", Quantity::DissolvedOxygen, d, &mut warnings)?),
        None => None,
    };
    let elevation_m = match args.elevation_m {
        Some(e) => checked("--elevation-m", Quantity::Elevation, e, &mut warnings)?,
        None => defaults.elevation_m.unwrap_or(0.0),
    };
    let tan_as = args.tan_as.or(defaults.tan_as).unwrap_or_default();
    Ok(Parsed {
        sample: WaterSample { temp_c, ph, tan_n_mg_l: tan_as.to_tan_n(tan_as_given), salinity_ppt, do_mg_l },
        tan_as_given,
        tan_as,
        salinity_source,
        elevation_m,
        warnings,
    })
}

#[derive(Debug, Serialize)]
struct CalcOutput {
    temp_c: f64,
    ph: f64,
    ph_scale: &'static str,
    tan_as_given: f64,
    tan_as: &'static str,
    tan_n_mg_l: f64,
    salinity_ppt: f64,
    pka: f64,
    pka_method: &'static str,
    nh3_fraction: f64,
    nh3_mg_l: f64,
    nh3_n_mg_l: f64,
    band: Band,
    band_edges_nh3_n_mg_l: BandEdges,
    band_edges_source: String,
    epa2013_acute_tan_n_mg_l: Option<f64>,
    epa2013_chronic_tan_n_mg_l: Option<f64>,
    do_saturation_mg_l: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    do_mg_l: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    do_percent: Option<f64>,
    elevation_m: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    tank: Option<TankOutput>,
    /// Band if pH rose (to the source water's pH with --tank, else by 0.5).
    latent_band: Band,
    latent: Latent,
    /// The tank's assessment (with --tank): trend, biofilter, actions, what not to do.
    #[serde(skip_serializing_if = "Option::is_none", flatten)]
    advice: Option<AdviceFields>,
    #[serde(skip_serializing_if = "Option::is_none")]
    what_if: Option<WhatIfOutput>,
    warnings: Vec<String>,
    caution: &'static str,
}

/// The assessment fields calc adds with --tank (band and latent are already above).
#[derive(Debug, Serialize)]
struct AdviceFields {
    measured_band: Option<Band>,
    raised_by: Vec<String>,
    biofilter: tankwalk::rules::Biofilter,
    actions: Vec<tankwalk::rules::Action>,
    do_not: Vec<tankwalk::rules::Warning>,
}

/// The water after `--what-if`, with its NH3, band and (with --tank) actions.
#[derive(Debug, Serialize)]
struct WhatIfOutput {
    changes: WhatIf,
    temp_c: f64,
    ph: f64,
    tan_n_mg_l: f64,
    salinity_ppt: f64,
    nh3_fraction: f64,
    nh3_mg_l: f64,
    nh3_n_mg_l: f64,
    band: Band,
    latent_band: Band,
    #[serde(skip_serializing_if = "Option::is_none")]
    actions: Option<Vec<tankwalk::rules::Action>>,
}

/// The tank a reading came from, as the facility file describes it.
#[derive(Debug, Serialize)]
struct TankOutput {
    id: String,
    room: String,
    room_file: std::path::PathBuf,
    #[serde(skip_serializing_if = "Option::is_none")]
    system: Option<String>,
    species: Vec<String>,
    species_names: Vec<String>,
    water_type: WaterType,
    salinity_g_l: f64,
    tank_volume_l: f64,
    water_volume_l: f64,
    volume_unit: &'static str,
    stock_count: u32,
}

/// The tank named by `--tank` in the room, with what it sets by default.
struct TankContext {
    output: TankOutput,
    defaults: Defaults,
    profile: EffectiveProfile,
    facility: Facility,
}

fn tank_context(label: &str, global: &GlobalArgs) -> Result<TankContext> {
    let (path, facility) = resolve_room(global)?;
    let Some(tank) = facility.tank(label) else {
        let labels: Vec<&str> = facility.tanks.iter().map(|t| t.id.as_str()).collect();
        let mut hint = String::new();
        if let Some(near) =
            labels.iter().min_by_key(|l| strsim::damerau_levenshtein(&l.to_lowercase(), &label.to_lowercase()))
        {
            hint = format!(" (closest: {near})");
        }
        return Err(bad_input!("--tank: no tank '{label}' in room {}{hint}", path.display()));
    };
    let system = facility.system_of(tank);
    let salinity_g_l = facility.salinity_g_l(tank);
    let salinity_from = match system {
        Some(s) => format!("system {} in the facility file", s.id),
        None => format!("tank {} in the facility file", tank.id),
    };
    let species = facility.species_of(tank);
    Ok(TankContext {
        defaults: Defaults {
            tan_as: Some(facility.room.kit_basis),
            elevation_m: Some(facility.room.elevation_m),
            salinity: Some((salinity_g_l, salinity_from)),
        },
        profile: facility.effective_profile(tank),
        output: TankOutput {
            id: tank.id.to_string(),
            room: facility.room.name.clone(),
            room_file: path.clone(),
            system: system.map(|s| s.id.to_string()),
            species: species.iter().map(|p| p.key.to_string()).collect(),
            species_names: species.iter().map(|p| p.name.clone()).collect(),
            water_type: facility.water_type(tank),
            salinity_g_l,
            tank_volume_l: tank.volume_l,
            water_volume_l: facility.water_volume_l(tank),
            volume_unit: facility.room.volume_unit.symbol(),
            stock_count: tank.stock_count,
        },
        facility,
    })
}

impl TankContext {
    /// The assessment of `sample` in this tank, taken now.
    fn assess(&self, sample: &WaterSample) -> Assessment {
        let tank = self.facility.tank(&self.output.id).expect("the tank was found when the context was built");
        let mut reading = Reading::new(Target::Tank(self.output.id.clone()));
        let m = &mut reading.measurements;
        m.temperature = Some(Temperature::celsius(sample.temp_c));
        m.ph = Some(sample.ph);
        m.total_ammonia = Some(TotalAmmonia { value: sample.tan_n_mg_l, basis: AmmoniaBasis::N });
        m.salinity = Some(SalinityReading::Ppt { value: sample.salinity_ppt });
        m.dissolved_oxygen_mg_l = sample.do_mg_l;
        let config = RulesConfig::default();
        assess(&Inputs {
            facility: &self.facility,
            tank,
            reading: &reading,
            at: chrono::Utc::now(),
            history: &[],
            events: &[],
            config: &config,
        })
    }

    /// The room's source water, for what-if water changes.
    fn source_water(&self) -> SourceWater {
        let room = self.facility.room.source_water.as_ref();
        SourceWater {
            tan_n_mg_l: room.and_then(|r| r.tan_n_mg_l).unwrap_or(0.0),
            ph: room.and_then(|r| r.ph),
            temp_c: room.and_then(|r| r.temp_c),
        }
    }
}

/// Warnings when the water is outside what the tank's species are kept at.
fn range_warnings(profile: &EffectiveProfile, sample: &WaterSample, warnings: &mut Vec<String>) {
    let whose = profile.species.iter().map(|k| k.as_str()).collect::<Vec<_>>().join(", ");
    if let Some(t) = profile.temp_c
        && !t.contains(sample.temp_c)
    {
        warnings.push(format!(
            "temperature {} °C is outside the {}–{} °C kept for {whose}",
            sig(sample.temp_c, 3),
            t.min,
            t.max
        ));
    }
    if let Some(p) = profile.ph
        && !p.contains(sample.ph)
    {
        warnings.push(format!("pH {} is outside the {}–{} kept for {whose}", sample.ph, p.min, p.max));
    }
    if let Some(s) = profile.salt_tolerance_g_l
        && sample.salinity_ppt > s + 1e-9
    {
        warnings.push(format!(
            "salinity {} g/L is above the {} g/L that {whose} tolerates",
            sig(sample.salinity_ppt, 3),
            s
        ));
    }
}

pub fn run(args: &CalcArgs, global: &GlobalArgs) -> Result<ExitCode> {
    let tank = args.tank.as_deref().map(|label| tank_context(label, global)).transpose()?;
    let no_defaults = Defaults::default();
    let mut parsed = parse(args, tank.as_ref().map_or(&no_defaults, |t| &t.defaults))?;
    let (edges, edges_source) = match &tank {
        Some(t) => {
            range_warnings(&t.profile, &parsed.sample, &mut parsed.warnings);
            (t.profile.band_edges, t.profile.edges_origin.to_string())
        }
        None => (BandEdges::DEFAULT, "tankwalk defaults".to_string()),
    };
    let what_if = args.what_if.as_deref().map(|text| parse_what_if(text, tank.is_some())).transpose()?;
    let derived = sample::derive(&parsed.sample, &edges, parsed.elevation_m);
    let assessment = tank.as_ref().map(|t| t.assess(&parsed.sample));
    let latent_of = |sample: &WaterSample, assessment: Option<&Assessment>| {
        assessment.and_then(|a| a.latent).unwrap_or_else(|| latent(sample, &edges, None))
    };
    let latent_now = latent_of(&parsed.sample, assessment.as_ref());
    let what_if_out = what_if.map(|changes| {
        let source =
            tank.as_ref().map_or(SourceWater { tan_n_mg_l: 0.0, ph: None, temp_c: None }, |t| t.source_water());
        let changed = apply(&parsed.sample, &source, &changes);
        let d = sample::derive(&changed, &edges, parsed.elevation_m);
        let changed_assessment = tank.as_ref().map(|t| t.assess(&changed));
        WhatIfOutput {
            changes,
            temp_c: changed.temp_c,
            ph: changed.ph,
            tan_n_mg_l: changed.tan_n_mg_l,
            salinity_ppt: changed.salinity_ppt,
            nh3_fraction: d.toxic.fraction,
            nh3_mg_l: d.toxic.nh3_mg_l,
            nh3_n_mg_l: d.toxic.nh3_n_mg_l,
            band: d.band,
            latent_band: latent_of(&changed, changed_assessment.as_ref()).band,
            actions: changed_assessment.map(|a| a.actions),
        }
    });
    let out = CalcOutput {
        temp_c: parsed.sample.temp_c,
        ph: parsed.sample.ph,
        ph_scale: "NBS",
        tan_as_given: parsed.tan_as_given,
        tan_as: parsed.tan_as.name(),
        tan_n_mg_l: parsed.sample.tan_n_mg_l,
        salinity_ppt: parsed.sample.salinity_ppt,
        pka: derived.toxic.pka,
        pka_method: if parsed.sample.salinity_ppt > 0.0 {
            "Emerson et al. 1975 + Khoo et al. 1977 ionic-strength term (Bower & Bidwell 1978)"
        } else {
            "Emerson et al. 1975"
        },
        nh3_fraction: derived.toxic.fraction,
        nh3_mg_l: derived.toxic.nh3_mg_l,
        nh3_n_mg_l: derived.toxic.nh3_n_mg_l,
        band: derived.band,
        band_edges_nh3_n_mg_l: edges,
        band_edges_source: edges_source,
        epa2013_acute_tan_n_mg_l: derived.epa_acute_tan_n_mg_l,
        epa2013_chronic_tan_n_mg_l: derived.epa_chronic_tan_n_mg_l,
        do_saturation_mg_l: derived.do_saturation_mg_l,
        do_mg_l: parsed.sample.do_mg_l,
        do_percent: derived.do_percent,
        elevation_m: parsed.elevation_m,
        tank: tank.map(|t| t.output),
        latent_band: latent_now.band,
        latent: latent_now,
        advice: assessment.as_ref().map(|a| AdviceFields {
            measured_band: a.measured_band,
            raised_by: a.raised_by.clone(),
            biofilter: a.biofilter.clone(),
            actions: a.actions.clone(),
            do_not: a.warnings.clone(),
        }),
        what_if: what_if_out,
        warnings: parsed.warnings.clone(),
        caution: tankwalk::CAUTION,
    };
    let mut stdout = std::io::stdout().lock();
    if args.json {
        serde_json::to_writer_pretty(&mut stdout, &out)?;
        writeln!(stdout)?;
    } else {
        write_table(&mut stdout, &out, &parsed)?;
        match &assessment {
            Some(a) => advice::write_text(&mut stdout, a)?,
            None => writeln!(
                stdout,
                "  {:<18} to {:.1} (source pH unknown: pH + 0.5): {} mg/L NH3-N {} {}\n\
                 Give --room FILE --tank ID for actions sized to the tank.",
                "if pH rose",
                latent_now.ph,
                sig(latent_now.nh3_n_mg_l, 3),
                latent_now.band.glyph(),
                latent_now.band
            )?,
        }
        if let Some(w) = &out.what_if {
            write_what_if(&mut stdout, w)?;
        }
        writeln!(stdout, "{}", out.caution)?;
    }
    Ok(ExitCode::SUCCESS)
}

fn write_table(w: &mut impl Write, out: &CalcOutput, parsed: &Parsed) -> std::io::Result<()> {
    let row = |w: &mut dyn Write, label: &str, value: String| writeln!(w, "  {label:<18} {value}");
    writeln!(w, "Toxic ammonia")?;
    if let Some(t) = &out.tank {
        let unit = if t.volume_unit == "L" { VolumeUnit::Litre } else { VolumeUnit::UsGallon };
        let shown = |l: f64| format!("{} {}", sig(unit.from_litres(l), 3), unit.symbol());
        let species =
            if t.species_names.is_empty() { "none (empty tank)".to_string() } else { t.species_names.join(", ") };
        row(w, "tank", format!("{}, {} animals  ({})", t.id, t.stock_count, t.room))?;
        row(w, "species", species)?;
        let water = match &t.system {
            Some(system) => {
                format!(
                    "{} shared on system {system} (the tank itself {})",
                    shown(t.water_volume_l),
                    shown(t.tank_volume_l)
                )
            }
            None => format!("{}, standalone", shown(t.water_volume_l)),
        };
        row(w, "water", format!("{water}; {} water", t.water_type))?;
    }
    row(w, "temperature", format!("{} °C", sig(out.temp_c, 3)))?;
    row(w, "pH", format!("{:.2}  ({})", out.ph, tankwalk::PH_CONVENTION))?;
    row(w, "salinity", format!("{} g/L  ({})", sig(out.salinity_ppt, 3), parsed.salinity_source))?;
    let basis: AmmoniaBasis = out.tan_as.parse().unwrap_or_default();
    let mut tan = format!("{} {}", sig(out.tan_as_given, 3), basis.unit_label());
    if basis != AmmoniaBasis::N {
        tan.push_str(&format!("  = {} mg/L TAN-N", sig(out.tan_n_mg_l, 3)));
    }
    row(w, "total ammonia", tan)?;
    row(w, "pKa (NH4+)", format!("{:.4}  {}", out.pka, out.pka_method))?;
    row(w, "un-ionized", format!("{} %", sig(out.nh3_fraction * 100.0, 4)))?;
    row(w, "NH3", format!("{} mg/L NH3  = {} mg/L NH3-N", sig(out.nh3_mg_l, 3), sig(out.nh3_n_mg_l, 3)))?;
    let e = &out.band_edges_nh3_n_mg_l;
    row(
        w,
        "band",
        format!(
            "{} {}  (NH3-N edges {} / {} / {} mg/L, {})",
            out.band.glyph(),
            out.band,
            e.watch,
            e.act,
            e.critical,
            &out.band_edges_source
        ),
    )?;
    match (out.epa2013_acute_tan_n_mg_l, out.epa2013_chronic_tan_n_mg_l) {
        (Some(acute), Some(chronic)) => row(
            w,
            "US EPA 2013",
            format!("acute {} / chronic {} mg/L TAN-N at this pH and temperature", sig(acute, 2), sig(chronic, 2)),
        )?,
        _ => row(w, "US EPA 2013", "freshwater criteria; not shown for brackish or marine water".into())?,
    }
    let mut oxygen = format!("{} mg/L at saturation", sig(out.do_saturation_mg_l, 3));
    if let (Some(d), Some(p)) = (out.do_mg_l, out.do_percent) {
        oxygen = format!("{} mg/L = {} % of saturation ({oxygen})", sig(d, 3), sig(p, 3));
    }
    row(w, "dissolved oxygen", oxygen)?;
    for warning in &out.warnings {
        writeln!(w, "warning: {warning}")?;
    }
    Ok(())
}

fn write_what_if(w: &mut impl Write, out: &WhatIfOutput) -> std::io::Result<()> {
    let c = &out.changes;
    let mut changed = Vec::new();
    if let Some(p) = c.water_change_percent {
        changed.push(format!("a {p} % water change"));
    }
    if let Some(ph) = c.ph {
        changed.push(format!("pH {ph}"));
    }
    if let Some(t) = c.temp_c {
        changed.push(format!("{} °C", sig(t, 3)));
    }
    if let Some(s) = c.salinity_ppt {
        changed.push(format!("{} g/L salt", sig(s, 3)));
    }
    writeln!(w, "What if {}:", changed.join(", "))?;
    writeln!(
        w,
        "  total ammonia {} mg/L TAN-N at pH {:.2}, {} °C, {} g/L → NH3 {} mg/L NH3-N ({} mg/L NH3) {} {}; if pH rose: {}",
        sig(out.tan_n_mg_l, 3),
        out.ph,
        sig(out.temp_c, 3),
        sig(out.salinity_ppt, 3),
        sig(out.nh3_n_mg_l, 3),
        sig(out.nh3_mg_l, 3),
        out.band.glyph(),
        out.band,
        out.latent_band
    )?;
    if let Some(actions) = &out.actions {
        for (i, action) in actions.iter().enumerate() {
            writeln!(w, "  {}. {}", i + 1, advice::action_line(action))?;
        }
    }
    Ok(())
}
