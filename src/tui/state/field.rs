//! A number typed into a field: the text as typed, what it parses to, and why
//! it is refused when it is.
//!
//! Fields check every key press against the quantity's ranges
//! ([`crate::core::limits`]), so the field itself says what is wrong long
//! before anything is saved.

use crate::core::limits::{self, Quantity};
use crate::core::units;

/// Longest number a field accepts, in characters.
pub const MAX_FIELD_CHARS: usize = 9;

/// What a field holds, with the unit it is typed in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum FieldKind {
    /// Water temperature in °C.
    TemperatureC,
    /// Water temperature in °F.
    TemperatureF,
    /// pH.
    Ph,
    /// Total ammonia on the room kit's basis.
    TotalAmmonia(units::AmmoniaBasis),
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
    /// A water change, percent of the water volume (what-if).
    WaterChangePercent,
    /// A count of fish.
    Count,
    /// A mass of salt or a product, grams.
    Grams,
}

impl FieldKind {
    /// The label shown beside the field.
    pub fn label(self) -> &'static str {
        match self {
            FieldKind::TemperatureC | FieldKind::TemperatureF => "Temperature",
            FieldKind::Ph => "pH",
            FieldKind::TotalAmmonia(_) => "Total ammonia",
            FieldKind::Nitrite => "Nitrite",
            FieldKind::Nitrate => "Nitrate",
            FieldKind::Salinity => "Salinity",
            FieldKind::DissolvedOxygen => "Dissolved O2",
            FieldKind::Chloride => "Chloride",
            FieldKind::Alkalinity => "Alkalinity",
            FieldKind::WaterChangePercent => "Water change",
            FieldKind::Count => "Count",
            FieldKind::Grams => "Amount",
        }
    }

    /// The unit shown after the value.
    pub fn unit(self) -> &'static str {
        match self {
            FieldKind::TemperatureC => "°C",
            FieldKind::TemperatureF => "°F",
            FieldKind::Ph | FieldKind::Count => "",
            FieldKind::TotalAmmonia(basis) => basis.unit_label(),
            FieldKind::Nitrite => "mg/L NO2-N",
            FieldKind::Nitrate => "mg/L NO3-N",
            FieldKind::Salinity => "g/L",
            FieldKind::DissolvedOxygen => "mg/L",
            FieldKind::Chloride => "mg/L Cl-",
            FieldKind::Alkalinity => "mg/L CaCO3",
            FieldKind::WaterChangePercent => "%",
            FieldKind::Grams => "g",
        }
    }

    /// True for fields that take only whole numbers.
    pub fn whole(self) -> bool {
        matches!(self, FieldKind::Count)
    }

    /// Checks a value typed in this field's unit: an error outside the hard
    /// range, a warning outside the usual one.
    pub fn check(self, value: f64) -> Result<Option<String>, String> {
        let quantity = match self {
            FieldKind::TemperatureC => Quantity::TemperatureC,
            // Checked in °C, but said in the unit the person typed.
            FieldKind::TemperatureF => {
                let celsius = units::fahrenheit_to_celsius(value);
                return match limits::check(Quantity::TemperatureC, celsius) {
                    Err(_) => Err(format!("temperature {value} °F is outside the allowed range 32–104 °F")),
                    Ok(Some(_)) => Ok(Some(format!("temperature {value} °F is unusual; check the reading"))),
                    Ok(None) => Ok(None),
                };
            }
            FieldKind::Ph => Quantity::Ph,
            FieldKind::TotalAmmonia(_) => Quantity::TotalAmmonia,
            FieldKind::Nitrite => Quantity::Nitrite,
            FieldKind::Nitrate => Quantity::Nitrate,
            FieldKind::Salinity => Quantity::Salinity,
            FieldKind::DissolvedOxygen => Quantity::DissolvedOxygen,
            FieldKind::Chloride => Quantity::Chloride,
            FieldKind::Alkalinity => Quantity::Alkalinity,
            FieldKind::WaterChangePercent => {
                return if (0.0..=100.0).contains(&value) {
                    Ok(None)
                } else {
                    Err(format!("a water change of {value} % is outside 0–100 %"))
                };
            }
            FieldKind::Count => {
                return if (0.0..=1_000_000.0).contains(&value) {
                    Ok(None)
                } else {
                    Err(format!("{value} is more than one record may count"))
                };
            }
            FieldKind::Grams => {
                return if (0.0..=1_000_000.0).contains(&value) {
                    Ok(None)
                } else {
                    Err(format!("{value} g is more than one record may hold (1 000 000 g)"))
                };
            }
        };
        match limits::check(quantity, value) {
            Err(err) => Err(err.to_string()),
            Ok(unusual) => Ok(unusual.map(|u| u.to_string())),
        }
    }

    /// The step of the what-if panel's increase and decrease keys.
    pub fn step(self) -> f64 {
        match self {
            FieldKind::TemperatureC | FieldKind::TemperatureF => 0.5,
            FieldKind::Ph => 0.1,
            FieldKind::TotalAmmonia(_) | FieldKind::Nitrite => 0.1,
            FieldKind::Nitrate => 5.0,
            FieldKind::Salinity => 1.0,
            FieldKind::DissolvedOxygen => 0.5,
            FieldKind::Chloride | FieldKind::Alkalinity => 10.0,
            FieldKind::WaterChangePercent => 5.0,
            FieldKind::Count => 1.0,
            FieldKind::Grams => 10.0,
        }
    }
}

/// Where a field's value came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Provenance {
    /// Typed now.
    Typed,
    /// Taken unchanged from the last reading (the keep-previous key).
    Previous,
    /// Carried over from the system's reading this round, with what to call it.
    Carried(String),
    /// Shown from a record saved earlier (a tank already done).
    Saved,
}

/// The state of a field's text.
#[derive(Debug, Clone, PartialEq)]
pub enum Parsed {
    /// Nothing typed.
    Empty,
    /// A number within range, with a warning when it is unusual.
    Value(f64, Option<String>),
    /// Not accepted, and why.
    Invalid(String),
}

/// One number field.
#[derive(Debug, Clone, PartialEq)]
pub struct NumberField {
    /// What it holds.
    pub kind: FieldKind,
    /// The text as typed (a comma already turned into a point).
    pub text: String,
    /// Where the value came from.
    pub provenance: Provenance,
    /// What the text parses to.
    pub parsed: Parsed,
    /// A refused key press, said until the next one.
    pub refused: Option<String>,
}

impl NumberField {
    /// An empty field.
    pub fn new(kind: FieldKind) -> NumberField {
        NumberField { kind, text: String::new(), provenance: Provenance::Typed, parsed: Parsed::Empty, refused: None }
    }

    /// A field holding `value`, formatted the way a person would type it.
    pub fn with_value(kind: FieldKind, value: f64, provenance: Provenance) -> NumberField {
        let mut field = NumberField::new(kind);
        field.set_text(format_value(value), provenance);
        field
    }

    /// Replaces the text.
    pub fn set_text(&mut self, text: String, provenance: Provenance) {
        self.text = text;
        self.provenance = provenance;
        self.refused = None;
        self.reparse();
    }

    fn reparse(&mut self) {
        self.parsed = parse(self.kind, &self.text);
    }

    /// Types one character; refuses (and says why) what cannot be part of a number.
    pub fn type_char(&mut self, c: char) {
        self.refused = None;
        if self.provenance != Provenance::Typed {
            // Typing over a carried, kept or saved value starts afresh.
            self.text.clear();
            self.provenance = Provenance::Typed;
        }
        let c = if c == ',' { '.' } else { c };
        if c == '.' && self.kind.whole() {
            self.refused = Some("a whole number, please".to_string());
        } else if c == '.' && self.text.contains('.') {
            self.refused = Some("one decimal point only".to_string());
        } else if !(c.is_ascii_digit() || c == '.') {
            self.refused = Some(format!("'{c}' is not part of a number"));
        } else if self.text.chars().count() >= MAX_FIELD_CHARS {
            self.refused = Some(format!("at most {MAX_FIELD_CHARS} characters"));
        } else {
            self.text.push(c);
        }
        self.reparse();
    }

    /// Deletes the last character.
    pub fn erase(&mut self) {
        self.refused = None;
        if self.provenance != Provenance::Typed {
            self.text.clear();
            self.provenance = Provenance::Typed;
        } else {
            self.text.pop();
        }
        self.reparse();
    }

    /// Empties the field.
    pub fn clear(&mut self) {
        self.set_text(String::new(), Provenance::Typed);
    }

    /// The value, when the field holds a valid one.
    pub fn value(&self) -> Option<f64> {
        match self.parsed {
            Parsed::Value(v, _) => Some(v),
            _ => None,
        }
    }

    /// Why the field is refused, when it is.
    pub fn error(&self) -> Option<&str> {
        match &self.parsed {
            Parsed::Invalid(reason) => Some(reason),
            _ => None,
        }
    }

    /// The warning of an unusual value.
    pub fn warning(&self) -> Option<&str> {
        match &self.parsed {
            Parsed::Value(_, Some(warning)) => Some(warning),
            _ => None,
        }
    }

    /// True when nothing is typed.
    pub fn is_empty(&self) -> bool {
        self.parsed == Parsed::Empty
    }
}

fn parse(kind: FieldKind, text: &str) -> Parsed {
    if text.is_empty() {
        return Parsed::Empty;
    }
    if text == "." {
        return Parsed::Invalid("a point needs digits".to_string());
    }
    match text.parse::<f64>() {
        Ok(value) => match kind.check(value) {
            Ok(warning) => Parsed::Value(value, warning),
            Err(reason) => Parsed::Invalid(reason),
        },
        Err(_) => Parsed::Invalid(format!("'{text}' is not a number")),
    }
}

/// A value as a person would type it: no trailing zeros, at most four decimals.
pub fn format_value(value: f64) -> String {
    let text = format!("{value:.4}");
    let text = text.trim_end_matches('0').trim_end_matches('.');
    if text == "-0" { "0".to_string() } else { text.to_string() }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn typed(kind: FieldKind, keys: &str) -> NumberField {
        let mut field = NumberField::new(kind);
        keys.chars().for_each(|c| field.type_char(c));
        field
    }

    #[test]
    fn typing_a_number_parses_it_and_a_comma_is_a_point() {
        assert_eq!(typed(FieldKind::Ph, "7.4").value(), Some(7.4));
        assert_eq!(typed(FieldKind::Ph, "7,4").text, "7.4");
        assert_eq!(typed(FieldKind::TemperatureC, "26").value(), Some(26.0));
    }

    #[test]
    fn out_of_range_values_say_why() {
        let field = typed(FieldKind::Ph, "15");
        assert_eq!(field.error(), Some("pH 15 is outside the allowed range 0–14"));
        let field = typed(FieldKind::TemperatureF, "120");
        assert_eq!(field.error(), Some("temperature 120 °F is outside the allowed range 32–104 °F"));
        assert!(typed(FieldKind::Ph, "4.5").warning().is_some());
        assert_eq!(typed(FieldKind::Ph, ".").error(), Some("a point needs digits"));
    }

    #[test]
    fn bad_keys_are_refused_and_leave_the_text_alone() {
        let mut field = typed(FieldKind::Ph, "7.2");
        field.type_char('.');
        assert_eq!(field.refused.as_deref(), Some("one decimal point only"));
        assert_eq!(field.text, "7.2");
        field.type_char('x');
        assert_eq!(field.refused.as_deref(), Some("'x' is not part of a number"));
        let mut count = NumberField::new(FieldKind::Count);
        count.type_char('.');
        assert_eq!(count.refused.as_deref(), Some("a whole number, please"));
        let long = typed(FieldKind::Nitrate, "1234567891");
        assert_eq!(long.text.len(), MAX_FIELD_CHARS);
    }

    #[test]
    fn typing_over_a_carried_value_starts_afresh() {
        let mut field =
            NumberField::with_value(FieldKind::Ph, 7.8, Provenance::Carried("system RACK-A at 07:12".into()));
        assert_eq!(field.text, "7.8");
        field.type_char('7');
        assert_eq!((field.text.as_str(), &field.provenance), ("7", &Provenance::Typed));
        let mut field = NumberField::with_value(FieldKind::Ph, 7.8, Provenance::Previous);
        field.erase();
        assert!(field.is_empty());
    }

    #[test]
    fn values_format_as_typed() {
        assert_eq!(format_value(26.0), "26");
        assert_eq!(format_value(0.25), "0.25");
        assert_eq!(format_value(7.123456), "7.1235");
        assert_eq!(format_value(-0.0), "0");
    }
}
