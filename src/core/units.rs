//! Molar masses, kit reporting conventions and unit conversions.
//!
//! Atomic weights are the IUPAC/CIAAW conventional ("abridged") values
//! (Meija et al. 2016, *Pure Appl. Chem.* 88:265; unchanged in Prohaska et al.
//! 2022): H 1.008, N 14.007, O 15.999, Na 22.990, Cl 35.45.

use serde::{Deserialize, Serialize};

/// Atomic weight of hydrogen (g/mol), IUPAC conventional value.
pub const H: f64 = 1.008;
/// Atomic weight of nitrogen (g/mol), IUPAC conventional value.
pub const N: f64 = 14.007;
/// Atomic weight of oxygen (g/mol), IUPAC conventional value.
pub const O: f64 = 15.999;
/// Atomic weight of sodium (g/mol), IUPAC conventional value.
pub const NA: f64 = 22.990;
/// Atomic weight of chlorine (g/mol), IUPAC conventional value.
pub const CL: f64 = 35.45;

/// Molar mass of ammonia, NH3 (g/mol).
pub const M_NH3: f64 = N + 3.0 * H;
/// Molar mass of ammonium, NH4+ (g/mol).
pub const M_NH4: f64 = N + 4.0 * H;
/// Molar mass of nitrite, NO2- (g/mol).
pub const M_NO2: f64 = N + 2.0 * O;
/// Molar mass of nitrate, NO3- (g/mol).
pub const M_NO3: f64 = N + 3.0 * O;
/// Molar mass of sodium chloride (g/mol).
pub const M_NACL: f64 = NA + CL;
/// Molar mass of molecular oxygen, O2 (g/mol).
pub const M_O2: f64 = 2.0 * O;

/// mg NH3 per mg NH3-N.
pub const NH3_PER_N: f64 = M_NH3 / N;
/// mg NaCl needed per mg of chloride added.
pub const NACL_PER_CL: f64 = M_NACL / CL;

/// How a test kit or meter reports total ammonia.
///
/// Lab and extension practice reports total ammonia nitrogen (TAN, as N);
/// many hobby kits report the same pool "as NH3" or "as NH4+". The pools are
/// the same; only the mass basis differs.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum AmmoniaBasis {
    /// Total ammonia nitrogen, mg N/L (TAN-N).
    #[default]
    N,
    /// Total ammonia expressed as mg NH3/L.
    Nh3,
    /// Total ammonia expressed as mg NH4+/L.
    Nh4,
}

impl AmmoniaBasis {
    /// All bases, in the order they are offered to a person.
    pub const ALL: [AmmoniaBasis; 3] = [AmmoniaBasis::N, AmmoniaBasis::Nh3, AmmoniaBasis::Nh4];

    /// Molar mass of the species the reading is expressed as.
    const fn molar_mass(self) -> f64 {
        match self {
            AmmoniaBasis::N => N,
            AmmoniaBasis::Nh3 => M_NH3,
            AmmoniaBasis::Nh4 => M_NH4,
        }
    }

    /// Converts a reading on this basis to mg TAN-N/L.
    pub fn to_tan_n(self, value: f64) -> f64 {
        value * N / self.molar_mass()
    }

    /// Converts mg TAN-N/L to a reading on this basis.
    pub fn from_tan_n(self, tan_n: f64) -> f64 {
        tan_n * self.molar_mass() / N
    }

    /// Short unit label, as printed beside a value.
    pub fn unit_label(self) -> &'static str {
        match self {
            AmmoniaBasis::N => "mg/L TAN-N",
            AmmoniaBasis::Nh3 => "mg/L as NH3",
            AmmoniaBasis::Nh4 => "mg/L as NH4+",
        }
    }

    /// The name used on the command line and in files.
    pub fn name(self) -> &'static str {
        match self {
            AmmoniaBasis::N => "n",
            AmmoniaBasis::Nh3 => "nh3",
            AmmoniaBasis::Nh4 => "nh4",
        }
    }
}

impl std::str::FromStr for AmmoniaBasis {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        match s.trim().to_ascii_lowercase().as_str() {
            "n" | "tan" | "tan-n" | "nh3-n" | "nh4-n" => Ok(AmmoniaBasis::N),
            "nh3" => Ok(AmmoniaBasis::Nh3),
            "nh4" | "nh4+" => Ok(AmmoniaBasis::Nh4),
            other => Err(format!("'{other}' is not an ammonia basis (use n, nh3 or nh4)")),
        }
    }
}

/// How a kit reports nitrite (or nitrate): as nitrogen or as the ion.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize, Default)]
#[serde(rename_all = "lowercase")]
pub enum NitrogenIonBasis {
    /// mg N/L (NO2-N or NO3-N).
    #[default]
    N,
    /// mg of the ion per litre (NO2- or NO3-).
    Ion,
}

/// Converts a nitrite reading to mg NO2-N/L.
pub fn nitrite_to_n(value: f64, basis: NitrogenIonBasis) -> f64 {
    match basis {
        NitrogenIonBasis::N => value,
        NitrogenIonBasis::Ion => value * N / M_NO2,
    }
}

/// Converts mg NO2-N/L to mg NO2-/L.
pub fn nitrite_n_to_ion(n: f64) -> f64 {
    n * M_NO2 / N
}

/// Converts a nitrate reading to mg NO3-N/L.
pub fn nitrate_to_n(value: f64, basis: NitrogenIonBasis) -> f64 {
    match basis {
        NitrogenIonBasis::N => value,
        NitrogenIonBasis::Ion => value * N / M_NO3,
    }
}

/// Degrees Fahrenheit to Celsius (exact definition).
pub fn fahrenheit_to_celsius(f: f64) -> f64 {
    (f - 32.0) / 1.8
}

/// Degrees Celsius to Fahrenheit (exact definition).
pub fn celsius_to_fahrenheit(c: f64) -> f64 {
    c * 1.8 + 32.0
}

/// Litres in one US liquid gallon (exact: 231 cubic inches).
pub const LITRES_PER_US_GALLON: f64 = 3.785_411_784;

/// US gallons to litres.
pub fn us_gallons_to_litres(gal: f64) -> f64 {
    gal * LITRES_PER_US_GALLON
}

/// Litres to US gallons.
pub fn litres_to_us_gallons(l: f64) -> f64 {
    l / LITRES_PER_US_GALLON
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bases_round_trip_through_tan() {
        for basis in AmmoniaBasis::ALL {
            let v = 0.37;
            assert!((basis.from_tan_n(basis.to_tan_n(v)) - v).abs() < 1e-15);
        }
    }

    #[test]
    fn basis_names_parse_back() {
        for basis in AmmoniaBasis::ALL {
            assert_eq!(basis.name().parse::<AmmoniaBasis>(), Ok(basis));
        }
        assert!("ppm".parse::<AmmoniaBasis>().is_err());
    }
}
