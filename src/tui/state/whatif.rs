//! The what-if panel: change pH, temperature, salinity and a water change,
//! and watch NH3 and the band move. Pure: built from plain figures, computed
//! with [`crate::rules::what_if`] and [`crate::core::sample::derive`].

use crate::core::band::BandEdges;
use crate::core::sample::{Derived, WaterSample, derive};
use crate::core::units;
use crate::rules::water_change::SourceWater;
use crate::rules::what_if::{self, WhatIf};

use super::field::{FieldKind, NumberField, Provenance};

/// Everything the panel needs to know about the water it starts from.
#[derive(Debug, Clone, PartialEq)]
pub struct WhatIfBase {
    /// What the panel is about ("B2-07" or "system RACK-A").
    pub label: String,
    /// The water as read (or as being typed).
    pub sample: WaterSample,
    /// The band edges of the tank's species.
    pub edges: BandEdges,
    /// The water used for changes.
    pub source: SourceWater,
    /// The volume a water change or a dose acts on, L (the whole system's when shared).
    pub volume_l: f64,
    /// Elevation of the room, m.
    pub elevation_m: f64,
    /// Show and type temperatures in °F.
    pub fahrenheit: bool,
    /// The species' temperature range, °C, when known.
    pub temp_range_c: Option<(f64, f64)>,
    /// The species' salt tolerance, g/L, when known.
    pub salt_tolerance_g_l: Option<f64>,
}

/// The fields of the panel, in order.
pub const WHATIF_FIELDS: usize = 4;

/// The panel: its base, its four fields and which one has the cursor.
#[derive(Debug, Clone, PartialEq)]
pub struct WhatIfState {
    /// Where the panel starts from.
    pub base: WhatIfBase,
    /// pH, temperature, salinity, water change %.
    pub fields: [NumberField; WHATIF_FIELDS],
    /// The field with the cursor.
    pub focus: usize,
}

/// What the changed water would be.
#[derive(Debug, Clone, PartialEq)]
pub struct WhatIfOutcome {
    /// The reading's figures.
    pub before: Derived,
    /// The changed water.
    pub after_sample: WaterSample,
    /// Its figures.
    pub after: Derived,
    /// Quantities and cautions: litres to change, grams of salt, ranges left.
    pub notes: Vec<String>,
}

impl WhatIfState {
    /// A panel showing the base water unchanged.
    pub fn new(base: WhatIfBase) -> WhatIfState {
        let fields = base_fields(&base);
        WhatIfState { base, fields, focus: 0 }
    }

    /// Puts every field back to the base water.
    pub fn reset(&mut self) {
        self.fields = base_fields(&self.base);
    }

    /// The focused field.
    pub fn focused(&mut self) -> &mut NumberField {
        &mut self.fields[self.focus]
    }

    /// Moves the cursor down (wrapping).
    pub fn next_field(&mut self) {
        self.focus = (self.focus + 1) % WHATIF_FIELDS;
    }

    /// Moves the cursor up (wrapping).
    pub fn previous_field(&mut self) {
        self.focus = (self.focus + WHATIF_FIELDS - 1) % WHATIF_FIELDS;
    }

    /// Raises (`+1`) or lowers (`-1`) the focused value one step, within range.
    pub fn step(&mut self, direction: f64) {
        let field = &mut self.fields[self.focus];
        let current = field.value().unwrap_or(0.0);
        let step = field.kind.step();
        let stepped = ((current / step).round() + direction) * step;
        // Stay inside the allowed range: refuse the step that would leave it.
        if field.kind.check(stepped).is_ok() {
            *field = NumberField::with_value(field.kind, stepped, Provenance::Typed);
        } else {
            field.refused = Some(format!("{} stays within its allowed range", field.kind.label()));
        }
    }

    /// The changes the person made, as [`WhatIf`]: untouched fields stay `None`
    /// so that a water change can still bring the source water's pH.
    pub fn what_if(&self) -> WhatIf {
        let touched = |i: usize| {
            let field = &self.fields[i];
            (field.provenance == Provenance::Typed).then(|| field.value()).flatten()
        };
        WhatIf {
            ph: touched(0),
            temp_c: touched(1).map(|t| if self.base.fahrenheit { units::fahrenheit_to_celsius(t) } else { t }),
            salinity_ppt: touched(2),
            water_change_percent: touched(3).filter(|p| *p > 0.0),
        }
    }

    /// NH3 and band before and after the changes, with quantities.
    pub fn outcome(&self) -> WhatIfOutcome {
        let base = &self.base;
        let before = derive(&base.sample, &base.edges, base.elevation_m);
        let changes = self.what_if();
        let after_sample = what_if::apply(&base.sample, &base.source, &changes);
        let after = derive(&after_sample, &base.edges, base.elevation_m);
        let mut notes = Vec::new();
        if let Some(percent) = changes.water_change_percent {
            let litres = percent / 100.0 * base.volume_l;
            notes.push(format!(
                "change {} L of {} L; total ammonia {} → {} mg/L TAN-N",
                crate::numfmt::sig(litres, 3),
                crate::numfmt::sig(base.volume_l, 3),
                crate::numfmt::sig(base.sample.tan_n_mg_l, 3),
                crate::numfmt::sig(after_sample.tan_n_mg_l, 3)
            ));
            if changes.ph.is_none() && after_sample.ph > base.sample.ph {
                notes.push(format!(
                    "the source water's pH {} raises the tank's pH: more of the ammonia turns toxic",
                    crate::numfmt::fixed(after_sample.ph, 1)
                ));
            }
            if percent > 50.0 {
                notes.push("more than half at once stresses fish: split it into changes of 50 % or less".to_string());
            }
        }
        if let Some(salinity) = changes.salinity_ppt {
            let added = salinity - base.sample.salinity_ppt;
            if added > 0.0 {
                notes.push(format!(
                    "add about {} g of salt to {} L (from {} to {} g/L)",
                    crate::numfmt::sig(added * base.volume_l, 3),
                    crate::numfmt::sig(base.volume_l, 3),
                    crate::numfmt::sig(base.sample.salinity_ppt, 2),
                    crate::numfmt::sig(salinity, 2)
                ));
            }
            match base.salt_tolerance_g_l {
                Some(limit) if salinity > limit => {
                    notes.push(format!("above what the species tolerates ({} g/L)", crate::numfmt::sig(limit, 2)));
                }
                _ => {}
            }
        }
        if let (Some(temp), Some((low, high))) = (changes.temp_c, base.temp_range_c)
            && !(low..=high).contains(&temp)
        {
            notes.push(format!(
                "outside the species' range {}–{} °C",
                crate::numfmt::fixed(low, 1),
                crate::numfmt::fixed(high, 1)
            ));
        }
        WhatIfOutcome { before, after_sample, after, notes }
    }
}

fn base_fields(base: &WhatIfBase) -> [NumberField; WHATIF_FIELDS] {
    let (temp_kind, temp) = if base.fahrenheit {
        (FieldKind::TemperatureF, units::celsius_to_fahrenheit(base.sample.temp_c))
    } else {
        (FieldKind::TemperatureC, base.sample.temp_c)
    };
    [
        NumberField::with_value(FieldKind::Ph, base.sample.ph, Provenance::Saved),
        NumberField::with_value(temp_kind, temp, Provenance::Saved),
        NumberField::with_value(FieldKind::Salinity, base.sample.salinity_ppt, Provenance::Saved),
        NumberField::with_value(FieldKind::WaterChangePercent, 0.0, Provenance::Saved),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::core::band::Band;

    fn base() -> WhatIfBase {
        WhatIfBase {
            label: "B2-07".into(),
            sample: WaterSample { temp_c: 26.0, ph: 7.0, tan_n_mg_l: 4.0, salinity_ppt: 0.0, do_mg_l: None },
            edges: BandEdges::DEFAULT,
            source: SourceWater { tan_n_mg_l: 0.0, ph: Some(8.0), temp_c: Some(26.0) },
            volume_l: 400.0,
            elevation_m: 0.0,
            fahrenheit: false,
            temp_range_c: Some((24.0, 28.0)),
            salt_tolerance_g_l: Some(3.0),
        }
    }

    #[test]
    fn unchanged_panel_shows_the_reading() {
        let panel = WhatIfState::new(base());
        let outcome = panel.outcome();
        assert_eq!(outcome.before, outcome.after);
        assert!(outcome.notes.is_empty());
        assert!(panel.what_if().is_empty());
    }

    #[test]
    fn raising_ph_raises_nh3_and_the_band() {
        let mut panel = WhatIfState::new(base());
        panel.fields[0].set_text("8.2".into(), Provenance::Typed);
        let outcome = panel.outcome();
        assert!(outcome.after.toxic.nh3_n_mg_l > 10.0 * outcome.before.toxic.nh3_n_mg_l);
        assert!(outcome.after.band > outcome.before.band);
        assert_eq!(outcome.after.band, Band::Critical);
    }

    #[test]
    fn a_water_change_brings_the_source_ph_and_says_so() {
        let mut panel = WhatIfState::new(base());
        panel.focus = 3;
        for _ in 0..10 {
            panel.step(1.0);
        }
        assert_eq!(panel.fields[3].value(), Some(50.0));
        let outcome = panel.outcome();
        assert_eq!(outcome.after_sample.tan_n_mg_l, 2.0);
        assert_eq!(outcome.after_sample.ph, 8.0);
        assert!(outcome.notes[0].starts_with("change 200 L of 400 L"), "{:?}", outcome.notes);
        assert!(outcome.notes[1].contains("raises the tank's pH"), "{:?}", outcome.notes);
    }

    #[test]
    fn salt_gives_grams_for_the_volume_and_warns_past_tolerance() {
        let mut panel = WhatIfState::new(base());
        panel.fields[2].set_text("5".into(), Provenance::Typed);
        let notes = panel.outcome().notes;
        assert!(notes[0].starts_with("add about 2000 g of salt to 400 L"), "{notes:?}");
        assert!(notes[1].contains("tolerates (3.0 g/L)"), "{notes:?}");
    }

    #[test]
    fn steps_stay_in_range_and_reset_restores() {
        let mut panel = WhatIfState::new(base());
        panel.focus = 3;
        panel.step(-1.0);
        assert!(panel.fields[3].refused.is_some());
        assert_eq!(panel.fields[3].value(), Some(0.0));
        panel.focus = 0;
        panel.step(1.0);
        assert_eq!(panel.fields[0].value(), Some(7.1));
        panel.reset();
        assert!(panel.what_if().is_empty());
    }

    #[test]
    fn fahrenheit_rooms_type_fahrenheit() {
        let mut panel = WhatIfState::new(WhatIfBase { fahrenheit: true, ..base() });
        assert_eq!(panel.fields[1].text, "78.8");
        panel.fields[1].set_text("77".into(), Provenance::Typed);
        assert!((panel.what_if().temp_c.unwrap() - 25.0).abs() < 1e-12);
    }
}
