//! The chemistry core against published equations, tables and independent
//! reference libraries.
//!
//! `tests/fixtures/chemistry-check-values.csv` holds 398 check values. Each
//! row names its producer: a closed-form equation from the cited paper, a
//! published table (UF/IFAS FA-16, Francis-Floyd & Watson 1990, rev. 1996;
//! UNESCO 1983 / Fofonoff & Millard, UNESCO Tech. Pap. Mar. Sci. 44), or a
//! general-purpose library from the package registries (gsw 3.6.23 for
//! TEOS-10, seawater 3.3.5 for EOS-80/PSS-78, PyCO2SYS 1.8.3.4 for the
//! Clegg & Whitfield 1995 constants). Every row is checked to the tolerance
//! the row states; a failing assert names the row and its reference.

use tankwalk::core::ammonia::{ionic_strength, pka, pka_cw95_total, pka_freshwater, unionized_fraction};
use tankwalk::core::units::{self, AmmoniaBasis};
use tankwalk::core::{dilution, epa2013, oxygen, salinity};

#[derive(Debug, serde::Deserialize)]
struct Row {
    row_id: String,
    section: String,
    quantity: String,
    #[serde(rename = "T_C")]
    t_c: Option<f64>,
    #[serde(rename = "pH")]
    ph: Option<f64>,
    #[serde(rename = "S")]
    s: Option<f64>,
    other_inputs: String,
    value: f64,
    tol_abs: Option<f64>,
    tol_rel: Option<f64>,
    reference: String,
    note: String,
}

fn rows() -> Vec<Row> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/fixtures/chemistry-check-values.csv");
    let mut reader = csv::Reader::from_path(path).expect("fixture present");
    reader.deserialize().collect::<Result<_, _>>().expect("fixture parses")
}

impl Row {
    fn t(&self) -> f64 {
        self.t_c.unwrap_or_else(|| panic!("{}: no temperature", self.row_id))
    }
    fn ph(&self) -> f64 {
        self.ph.unwrap_or_else(|| panic!("{}: no pH", self.row_id))
    }
    fn s(&self) -> f64 {
        self.s.unwrap_or(0.0)
    }
    /// A `name=value` pair from `other_inputs` ("R=1.0; t68=15.0; p=0.0 dbar").
    fn other(&self, name: &str) -> f64 {
        self.other_inputs
            .split(';')
            .filter_map(|part| part.trim().split_once('='))
            .find(|(k, _)| k.trim() == name)
            .and_then(|(_, v)| v.split_whitespace().next()?.parse().ok())
            .unwrap_or_else(|| panic!("{}: no {name} in '{}'", self.row_id, self.other_inputs))
    }

    /// Asserts `got` against the row's value and its own tolerance.
    fn assert_close(&self, got: f64) {
        let expected = self.value;
        let allowed = match (self.tol_abs, self.tol_rel) {
            (Some(a), _) => a,
            (None, Some(r)) => r * expected.abs(),
            (None, None) => panic!("{}: row has no tolerance", self.row_id),
        };
        assert!(
            (got - expected).abs() <= allowed,
            "{} {}: got {got}, expected {expected} ± {allowed} ({})",
            self.row_id,
            self.quantity,
            self.reference
        );
    }
}

/// Fahrenheit 60 °F in °C, the hydrometer convention "60/60 °F".
const T60F: f64 = (60.0 - 32.0) / 1.8;

#[test]
fn every_reference_row_is_reproduced() {
    let rows = rows();
    assert_eq!(rows.len(), 398, "fixture changed: review the new rows");
    let mut checked = 0;
    for row in &rows {
        let got = match (row.section.as_str(), row.quantity.as_str()) {
            ("NH3_FW", "pKa_NH4") => pka_freshwater(row.t()),
            ("NH3_FW", "fraction_unionized") => unionized_fraction(pka(row.t(), 0.0), row.ph()),
            ("NH3_FW", "fraction_unionized_published_table") => {
                if row.tol_abs.is_none() {
                    // FA-16's 32 °C point lies outside Emerson's 0–30 °C table: not a check value.
                    continue;
                }
                unionized_fraction(pka(row.t(), 0.0), row.ph())
            }
            ("NH3_SW", "ionic_strength_BB") => ionic_strength(row.s()),
            ("NH3_SW" | "SCENARIO", "fraction_unionized_BB") => unionized_fraction(pka(row.t(), row.s()), row.ph()),
            ("NH3_SW", "fraction_unionized_CW95") | ("SCENARIO", "fraction_unionized_CW95_total_scale") => {
                unionized_fraction(pka_cw95_total(row.t(), row.s()), row.ph())
            }
            ("NH3_SW", "pKa_NH4_total_scale_CW95") => pka_cw95_total(row.t(), row.s()),
            // pH-scale conversions and NBS-input CW95 fractions are used in
            // `salt_term_sits_between_the_ph_scale_readings` below.
            ("NH3_SW", q) if q.starts_with("pH_") || q == "fraction_unionized_CW95_from_NBS_pH" => continue,
            ("UNITS", "M_NH3") => units::M_NH3,
            ("UNITS", "M_NH4") => units::M_NH4,
            ("UNITS", "M_NO2") => units::M_NO2,
            ("UNITS", "M_NO3") => units::M_NO3,
            ("UNITS", "NH3_per_N") => AmmoniaBasis::Nh3.from_tan_n(1.0),
            ("UNITS", "NH4_per_N") => AmmoniaBasis::Nh4.from_tan_n(1.0),
            ("UNITS", "N_per_NH3") => AmmoniaBasis::Nh3.to_tan_n(1.0),
            ("UNITS", "N_per_NH4") => AmmoniaBasis::Nh4.to_tan_n(1.0),
            ("UNITS", "NO2_per_N") => units::nitrite_n_to_ion(1.0),
            ("UNITS", "N_per_NO2") => units::nitrite_to_n(1.0, units::NitrogenIonBasis::Ion),
            ("UNITS", "NO3_per_N") => 1.0 / units::nitrate_to_n(1.0, units::NitrogenIonBasis::Ion),
            ("UNITS", "NaCl_per_Cl") => units::NACL_PER_CL,
            ("UNITS", "NH3_mg_per_L_from_1mg_TAN_at_pH8_25C") => {
                let t = tankwalk::core::toxic_ammonia(&tankwalk::core::AmmoniaInputs {
                    tan_n_mg_l: 1.0,
                    ph: 8.0,
                    temp_c: 25.0,
                    salinity_ppt: 0.0,
                });
                t.nh3_mg_l
            }
            ("UNITS", "mgL_per_mgkg_S35_25C") => salinity::seawater_density(35.0, 25.0) / 1000.0,
            ("EPA2013", "CMC_Oncorhynchus_present") => epa2013::acute(row.ph(), row.t(), epa2013::Salmonids::Present),
            ("EPA2013", "CMC_Oncorhynchus_absent") => epa2013::acute(row.ph(), row.t(), epa2013::Salmonids::Absent),
            ("EPA2013", "CCC") => epa2013::chronic(row.ph(), row.t()),
            ("DO", "O2_sat_mgL_BK84") => oxygen::saturation_1atm(row.t(), row.s()),
            ("DO", "O2_sat_mgL_BK84_pressure") => oxygen::saturation(row.t(), row.s(), row.other("P")),
            ("DO", "P_atm_from_elevation") => oxygen::pressure_at_elevation_atm(row.other("elevation")),
            ("DO", "O2_sat_mgL_BK84_elevation") => {
                oxygen::saturation(row.t(), row.s(), oxygen::pressure_at_elevation_atm(row.other("elevation")))
            }
            ("DO", "O2_sat_mgL_from_gsw") => {
                // Independent library (gsw, Garcia & Gordon 1992 fit to the same data):
                // the reference sheet finds agreement within 0.0016 mg/L everywhere.
                let ours = oxygen::saturation_1atm(row.t(), row.s());
                assert!((ours - row.value).abs() < 0.002, "{}: {ours} vs gsw {}", row.row_id, row.value);
                checked += 1;
                continue;
            }
            ("DO", "O2_sat_umolkg_gsw") => continue, // same data in µmol/kg; the mg/L rows assert it
            ("PSS78", "SP_from_R") => practical_salinity_from_ratio(row.other("R"), row.t(), row.other("p")),
            ("PSS78", "SP_from_C") | ("PSS78", "SP_from_C_25C") => {
                salinity::practical_salinity(row.other("C"), row.t(), row.other("p"))
            }
            ("DENS", "rho_EOS80_p0") => salinity::seawater_density(row.s(), row.t()),
            ("DENS", "rho_EOS80") => continue, // 10,000 dbar: a tank is at the surface
            ("DENS", "rho_TEOS10_p0") => {
                // TEOS-10 (gsw) vs EOS-80: the standards agree to well within what a
                // hydrometer resolves (reference sheet §7: 0.0005 kg/m³ at S = 35, 25 °C).
                let ours = salinity::seawater_density(row.s(), row.t());
                assert!((ours - row.value).abs() < 0.01, "{}: {ours} vs TEOS-10 {}", row.row_id, row.value);
                checked += 1;
                continue;
            }
            ("SG", "SG_60F_60F") => salinity::specific_gravity(row.s(), T60F),
            ("SG", "SG_25C_25C") => salinity::specific_gravity(row.s(), 25.0),
            ("SG", "SG_25C_4C") => salinity::seawater_density(row.s(), 25.0) / salinity::seawater_density(0.0, 3.98),
            ("SG", "S_from_SG_60F_60F") => salinity::salinity_from_specific_gravity(row.other("SG"), T60F),
            ("SG", "S_from_SG_25C_25C") => salinity::salinity_from_specific_gravity(row.other("SG"), 25.0),
            ("WATERCHANGE", "TAN_after_n_changes") => {
                dilution::after_changes(row.other("c0"), row.other("c_source"), row.other("x"), row.other("n") as u32)
            }
            ("WATERCHANGE", "NH3_N_mgL") => row.other("TAN") * unionized_fraction(pka(row.t(), 0.0), row.ph()),
            (section, quantity) => panic!("{}: no check written for {section}/{quantity}", row.row_id),
        };
        row.assert_close(got);
        checked += 1;
    }
    assert!(checked > 330, "only {checked} rows checked");
}

/// PSS-78 from a conductivity ratio R, with C(35, 15, 0) = 42.914 mS/cm.
fn practical_salinity_from_ratio(r: f64, t90: f64, p: f64) -> f64 {
    salinity::practical_salinity(r * salinity::C_35_15_0_MS_CM, t90, p)
}

#[test]
fn epa_tables_match_when_rounded_as_epa_rounds() {
    // EPA-822-R-13-001 tables give 2 significant figures; the fixture notes carry them.
    for row in rows().iter().filter(|r| r.section == "EPA2013") {
        let published: f64 = row.note.trim_start_matches("2 s.f. as EPA tables round: ").parse().unwrap();
        let got = match row.quantity.as_str() {
            "CMC_Oncorhynchus_present" => epa2013::acute(row.ph(), row.t(), epa2013::Salmonids::Present),
            "CMC_Oncorhynchus_absent" => epa2013::acute(row.ph(), row.t(), epa2013::Salmonids::Absent),
            _ => epa2013::chronic(row.ph(), row.t()),
        };
        let rounded: f64 = format!("{got:.1e}").parse().unwrap();
        assert_eq!(rounded, published, "{} at pH {} and {} °C", row.quantity, row.ph(), row.t());
    }
}

#[test]
fn published_fa16_fractions_within_1e4() {
    // Francis-Floyd & Watson, UF/IFAS FA-16 (1990, rev. 1996), fraction table
    // "calculated from data in Emerson et al. (1975)": pH 7 at 6–30 °C and the
    // worked example 0.0502 at pH 8, 24 °C.
    for (t, ph, published) in [
        (6.0, 7.0, 0.0013),
        (10.0, 7.0, 0.0018),
        (16.0, 7.0, 0.0029),
        (20.0, 7.0, 0.0039),
        (24.0, 7.0, 0.0052),
        (28.0, 7.0, 0.0069),
        (30.0, 7.0, 0.0080),
        (24.0, 8.0, 0.0502),
    ] {
        let f = unionized_fraction(pka_freshwater(t), ph);
        assert!((f - published).abs() <= 1e-4, "FA-16 at {t} °C pH {ph}: {f} vs {published}");
    }
}

#[test]
fn unesco_pss78_check_values() {
    // Fofonoff & Millard 1983, UNESCO Tech. Pap. Mar. Sci. 44, p. 9 (t on IPTS-68).
    for (r, t68, p, published) in
        [(1.0, 15.0, 0.0, 35.000000), (1.2, 20.0, 2000.0, 37.245628), (0.65, 5.0, 1500.0, 27.995347)]
    {
        let s = practical_salinity_from_ratio(r, t68 / 1.00024, p);
        assert!((s - published).abs() < 2e-6, "R={r} t68={t68} p={p}: {s} vs {published}");
    }
}

#[test]
fn apha_oxygen_table_values() {
    // APHA Standard Methods Table 4500-O:I, zero chlorinity (values from memory,
    // matching Benson & Krause 1984): 14.621 at 0 °C, 9.092 at 20 °C, 8.263 at 25 °C.
    for (t, published) in [(0.0, 14.621), (20.0, 9.092), (25.0, 8.263)] {
        let c = oxygen::saturation_1atm(t, 0.0);
        assert!((c - published).abs() < 5e-4, "{t} °C: {c} vs {published}");
    }
}

#[test]
fn salt_term_sits_between_the_ph_scale_readings() {
    // Cross-check of the Khoo/Bower–Bidwell form against Clegg & Whitfield
    // (1995) via PyCO2SYS 1.8.3.4 (fixture rows NH3_SW-051..059 and -074..076).
    // At S = 35 the same electrode reading of pH 8.0 gives CW95 fractions of
    // 0.0130/0.0277/0.0398 if the reading is NBS-scale and 0.0164/0.0367/0.0537
    // if it is total-scale (10/20/25 °C). Which scale a fish-room electrode
    // reads is the open question (reference sheet §2c), so the tolerance is the
    // whole bracket: the Bower–Bidwell value must fall inside it. The
    // erroneous printed Khoo form reported by Bell et al. (2007) overstates NH3
    // by up to ~500 % and would fall far outside.
    let rows = rows();
    let find = |q: &str, t: f64| -> f64 {
        rows.iter()
            .find(|r| r.quantity == q && r.t_c == Some(t) && r.s == Some(35.0) && r.ph == Some(8.0))
            .map(|r| r.value)
            .unwrap()
    };
    for t in [10.0, 20.0, 25.0] {
        let nbs = find("fraction_unionized_CW95_from_NBS_pH", t);
        let total = find("fraction_unionized_CW95", t);
        let bb = unionized_fraction(pka(t, 35.0), 8.0);
        assert!(nbs < bb && bb < total, "{t} °C: CW95(NBS) {nbs} < BB {bb} < CW95(total) {total}");
    }
    // And the salt effect on pKa at S = 34, 25 °C is +0.10, as in CW95 (§2a).
    let shift = pka(25.0, 34.0) - pka(25.0, 0.0);
    assert!((shift - 0.10).abs() < 0.005, "salt shift {shift}");
}

#[test]
fn cooler_and_saltier_cuts_nh3_only_mildly() {
    // Common practice, no source: lowering a tropical freshwater tank from 25 to
    // 23 °C and adding 5 g/L salt cuts toxic ammonia only mildly. Computed in the
    // reference sheet (SCENARIO rows): about −16 % at pH 7–8, most of it from
    // temperature.
    for ph in [7.0, 7.5, 8.0] {
        let base = unionized_fraction(pka(25.0, 0.0), ph);
        let both = unionized_fraction(pka(23.0, 5.0), ph) / base - 1.0;
        let cooler = unionized_fraction(pka(23.0, 0.0), ph) / base - 1.0;
        let saltier = unionized_fraction(pka(25.0, 5.0), ph) / base - 1.0;
        assert!((-0.18..=-0.14).contains(&both), "pH {ph}: both {both}");
        assert!(cooler.abs() > 3.0 * saltier.abs(), "pH {ph}: temperature {cooler} vs salt {saltier}");
        assert!(saltier < 0.0 && cooler < 0.0);
    }
}
