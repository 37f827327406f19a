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

use super::bad_input;

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
    /// How the kit reports total ammonia: n (as nitrogen, TAN-N), nh3 or nh4.
    #[arg(long, value_name = "BASIS", default_value = "n")]
    tan_as: AmmoniaBasis,
    /// Salinity in g/L (ppt), 0–45; fresh water when no salinity is given.
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
    /// Elevation of the room in metres, for oxygen saturation.
    #[arg(long, value_name = "M", default_value_t = 0.0)]
    elevation_m: f64,
    /// Print one JSON object instead of a table.
    #[arg(long)]
    json: bool,
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
    salinity_source: &'static str,
    elevation_m: f64,
    warnings: Vec<String>,
}

fn parse(args: &CalcArgs) -> Result<Parsed> {
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
        (Some(SalinityReading::Ppt { value: s }), "as given")
    } else if let Some(sg) = args.sg {
        let sg = checked("--sg", Quantity::SpecificGravity, sg, &mut warnings)?;
        let reference_c = checked("--sg-ref-c", Quantity::ReferenceTemperatureC, args.sg_ref_c, &mut warnings)?;
        (Some(SalinityReading::SpecificGravity { value: sg, reference_c }), "from specific gravity (EOS-80)")
    } else if let Some(cond) = args.cond_us_cm {
        let cond = checked("--cond-us-cm", Quantity::Conductivity, cond, &mut warnings)?;
        let reference_c = checked("--cond-ref-c", Quantity::ReferenceTemperatureC, args.cond_ref_c, &mut warnings)?;
        (Some(SalinityReading::Conductivity { value_us_cm: cond, reference_c }), "from conductivity (PSS-78)")
    } else {
        (None, "none given: fresh water")
    };
    let salinity_ppt = reading.map_or(0.0, |r| r.practical_salinity());
    if reading.is_some() && !matches!(reading, Some(SalinityReading::Ppt { .. })) {
        checked("salinity", Quantity::Salinity, salinity_ppt, &mut warnings)?;
    }
    let do_mg_l = match args.do_mg_l {
        Some(d) => Some(checked("--do-mg-l", Quantity::DissolvedOxygen, d, &mut warnings)?),
        None => None,
    };
    let elevation_m = checked("--elevation-m", Quantity::Elevation, args.elevation_m, &mut warnings)?;
    Ok(Parsed {
        sample: WaterSample { temp_c, ph, tan_n_mg_l: args.tan_as.to_tan_n(tan_as_given), salinity_ppt, do_mg_l },
        tan_as_given,
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
    band_edges_source: &'static str,
    epa2013_acute_tan_n_mg_l: Option<f64>,
    epa2013_chronic_tan_n_mg_l: Option<f64>,
    do_saturation_mg_l: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    do_mg_l: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    do_percent: Option<f64>,
    elevation_m: f64,
    warnings: Vec<String>,
    caution: &'static str,
}

pub fn run(args: &CalcArgs) -> Result<ExitCode> {
    let parsed = parse(args)?;
    let edges = BandEdges::DEFAULT;
    let derived = sample::derive(&parsed.sample, &edges, parsed.elevation_m);
    let out = CalcOutput {
        temp_c: parsed.sample.temp_c,
        ph: parsed.sample.ph,
        ph_scale: "NBS",
        tan_as_given: parsed.tan_as_given,
        tan_as: args.tan_as.name(),
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
        band_edges_source: "tankwalk defaults",
        epa2013_acute_tan_n_mg_l: derived.epa_acute_tan_n_mg_l,
        epa2013_chronic_tan_n_mg_l: derived.epa_chronic_tan_n_mg_l,
        do_saturation_mg_l: derived.do_saturation_mg_l,
        do_mg_l: parsed.sample.do_mg_l,
        do_percent: derived.do_percent,
        elevation_m: parsed.elevation_m,
        warnings: parsed.warnings.clone(),
        caution: tankwalk::CAUTION,
    };
    let mut stdout = std::io::stdout().lock();
    if args.json {
        serde_json::to_writer_pretty(&mut stdout, &out)?;
        writeln!(stdout)?;
    } else {
        write_table(&mut stdout, &out, &parsed)?;
    }
    Ok(ExitCode::SUCCESS)
}

fn write_table(w: &mut impl Write, out: &CalcOutput, parsed: &Parsed) -> std::io::Result<()> {
    let row = |w: &mut dyn Write, label: &str, value: String| writeln!(w, "  {label:<18} {value}");
    writeln!(w, "Toxic ammonia")?;
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
            out.band_edges_source
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
    writeln!(w, "{}", out.caution)
}
