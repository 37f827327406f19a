//! Range checks for every measured quantity: a hard range outside which a
//! value is refused, and a narrower "usual" range outside which it is accepted
//! with a warning the caller can show.
//!
//! The hard ranges are those the equations are used over (pH 0–14, 0–40 °C,
//! S 0–45) or physical limits; the usual ranges are where fish-room readings
//! fall (common practice, no source).

use std::fmt;

/// A measured quantity, with its canonical unit and ranges.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Quantity {
    /// pH, NBS-buffer electrode reading.
    Ph,
    /// Water temperature, °C.
    TemperatureC,
    /// Total ammonia, mg/L on the kit's basis.
    TotalAmmonia,
    /// Nitrite, mg/L on the kit's basis.
    Nitrite,
    /// Nitrate, mg/L on the kit's basis.
    Nitrate,
    /// Practical salinity (≈ g/L, ppt).
    Salinity,
    /// Specific gravity (t/t).
    SpecificGravity,
    /// Electrical conductivity, µS/cm.
    Conductivity,
    /// Dissolved oxygen, mg/L.
    DissolvedOxygen,
    /// Chloride, mg/L.
    Chloride,
    /// Total alkalinity, mg/L as CaCO3.
    Alkalinity,
    /// Elevation above sea level, m.
    Elevation,
    /// A reference temperature for specific gravity or conductivity, °C.
    ReferenceTemperatureC,
}

impl Quantity {
    /// Human name, as used in messages.
    pub fn label(self) -> &'static str {
        match self {
            Quantity::Ph => "pH",
            Quantity::TemperatureC => "temperature",
            Quantity::TotalAmmonia => "total ammonia",
            Quantity::Nitrite => "nitrite",
            Quantity::Nitrate => "nitrate",
            Quantity::Salinity => "salinity",
            Quantity::SpecificGravity => "specific gravity",
            Quantity::Conductivity => "conductivity",
            Quantity::DissolvedOxygen => "dissolved oxygen",
            Quantity::Chloride => "chloride",
            Quantity::Alkalinity => "alkalinity",
            Quantity::Elevation => "elevation",
            Quantity::ReferenceTemperatureC => "reference temperature",
        }
    }

    /// Canonical unit.
    pub fn unit(self) -> &'static str {
        match self {
            Quantity::Ph | Quantity::SpecificGravity => "",
            Quantity::TemperatureC | Quantity::ReferenceTemperatureC => "°C",
            Quantity::TotalAmmonia
            | Quantity::Nitrite
            | Quantity::Nitrate
            | Quantity::DissolvedOxygen
            | Quantity::Chloride => "mg/L",
            Quantity::Salinity => "g/L",
            Quantity::Conductivity => "µS/cm",
            Quantity::Alkalinity => "mg/L CaCO3",
            Quantity::Elevation => "m",
        }
    }

    /// Values outside this closed range are refused.
    pub fn hard_range(self) -> (f64, f64) {
        match self {
            Quantity::Ph => (0.0, 14.0),
            Quantity::TemperatureC | Quantity::ReferenceTemperatureC => (0.0, 40.0),
            Quantity::TotalAmmonia | Quantity::Nitrite => (0.0, 1000.0),
            Quantity::Nitrate => (0.0, 10_000.0),
            Quantity::Salinity => (0.0, 45.0),
            Quantity::SpecificGravity => (0.990, 1.040),
            Quantity::Conductivity => (0.0, 80_000.0),
            Quantity::DissolvedOxygen => (0.0, 40.0),
            Quantity::Chloride => (0.0, 40_000.0),
            Quantity::Alkalinity => (0.0, 2_000.0),
            Quantity::Elevation => (-450.0, 5_000.0),
        }
    }

    /// Values outside this range are accepted but flagged as unusual.
    pub fn usual_range(self) -> (f64, f64) {
        match self {
            Quantity::Ph => (5.0, 10.0),
            Quantity::TemperatureC => (4.0, 35.0),
            Quantity::ReferenceTemperatureC => (10.0, 30.0),
            Quantity::TotalAmmonia => (0.0, 20.0),
            Quantity::Nitrite => (0.0, 20.0),
            Quantity::Nitrate => (0.0, 500.0),
            Quantity::Salinity => (0.0, 40.0),
            Quantity::SpecificGravity => (0.997, 1.031),
            Quantity::Conductivity => (0.0, 60_000.0),
            Quantity::DissolvedOxygen => (2.0, 20.0),
            Quantity::Chloride => (0.0, 25_000.0),
            Quantity::Alkalinity => (0.0, 500.0),
            Quantity::Elevation => (-100.0, 3_000.0),
        }
    }
}

impl fmt::Display for Quantity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.label())
    }
}

fn with_unit(value: f64, unit: &str) -> String {
    if unit.is_empty() { format!("{value}") } else { format!("{value} {unit}") }
}

/// A value refused by [`check`].
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RangeError {
    /// Not a finite number (NaN or infinite).
    #[error("{quantity} must be a finite number")]
    NotFinite {
        /// What was measured.
        quantity: Quantity,
    },
    /// Outside the hard range.
    #[error("{quantity} {} is outside the allowed range {}–{}", with_unit(*.value, .quantity.unit()), .min, with_unit(*.max, .quantity.unit()))]
    OutOfRange {
        /// What was measured.
        quantity: Quantity,
        /// The refused value.
        value: f64,
        /// Lower end of the allowed range.
        min: f64,
        /// Upper end of the allowed range.
        max: f64,
    },
}

/// A value accepted by [`check`] but outside the usual range.
#[derive(Debug, Clone, PartialEq)]
pub struct Unusual {
    /// What was measured.
    pub quantity: Quantity,
    /// The value.
    pub value: f64,
    /// Lower end of the usual range.
    pub min: f64,
    /// Upper end of the usual range.
    pub max: f64,
}

impl fmt::Display for Unusual {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{} {} is unusual (usual range {}–{}); check the reading",
            self.quantity,
            with_unit(self.value, self.quantity.unit()),
            self.min,
            with_unit(self.max, self.quantity.unit())
        )
    }
}

/// Checks `value` against the ranges of `quantity`: an error outside the hard
/// range, `Ok(Some(_))` outside the usual range, `Ok(None)` otherwise.
pub fn check(quantity: Quantity, value: f64) -> Result<Option<Unusual>, RangeError> {
    if !value.is_finite() {
        return Err(RangeError::NotFinite { quantity });
    }
    let (min, max) = quantity.hard_range();
    if value < min || value > max {
        return Err(RangeError::OutOfRange { quantity, value, min, max });
    }
    let (umin, umax) = quantity.usual_range();
    Ok((value < umin || value > umax).then_some(Unusual { quantity, value, min: umin, max: umax }))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn refuses_outside_and_warns_near_the_edges() {
        assert!(check(Quantity::Ph, 14.1).is_err());
        assert!(check(Quantity::Ph, -0.1).is_err());
        assert!(check(Quantity::Ph, f64::NAN).is_err());
        assert!(check(Quantity::Ph, 4.5).unwrap().is_some());
        assert!(check(Quantity::Ph, 7.2).unwrap().is_none());
        assert!(check(Quantity::TotalAmmonia, -0.01).is_err());
        assert!(check(Quantity::TemperatureC, 41.0).is_err());
        assert!(check(Quantity::Salinity, 45.5).is_err());
    }

    #[test]
    fn messages_name_the_quantity_and_range() {
        let err = check(Quantity::Ph, 15.0).unwrap_err().to_string();
        assert_eq!(err, "pH 15 is outside the allowed range 0–14");
        let err = check(Quantity::TemperatureC, 45.0).unwrap_err().to_string();
        assert_eq!(err, "temperature 45 °C is outside the allowed range 0–40 °C");
    }
}
