//! Properties the equilibrium must have whatever the inputs (proptest).

use proptest::prelude::*;
use tankwalk::core::ammonia::{pka, unionized_fraction};
use tankwalk::core::units::{self, AmmoniaBasis, NitrogenIonBasis};
use tankwalk::core::{dilution, salinity};

fn fraction(t: f64, s: f64, ph: f64) -> f64 {
    unionized_fraction(pka(t, s), ph)
}

proptest! {
    #[test]
    fn fraction_is_a_fraction(t in 0.0..40.0f64, s in 0.0..45.0f64, ph in 0.0..14.0f64) {
        let f = fraction(t, s, ph);
        prop_assert!((0.0..=1.0).contains(&f));
    }

    #[test]
    fn fraction_rises_with_ph(t in 0.0..40.0f64, s in 0.0..45.0f64, ph in 4.0..11.0f64, dph in 0.01..2.0f64) {
        prop_assert!(fraction(t, s, ph + dph) > fraction(t, s, ph));
    }

    #[test]
    fn fraction_rises_with_temperature(t in 0.0..39.0f64, dt in 0.05..1.0f64, s in 0.0..45.0f64, ph in 5.0..10.0f64) {
        prop_assert!(fraction(t + dt, s, ph) > fraction(t, s, ph));
    }

    #[test]
    fn fraction_falls_with_salinity(t in 0.0..40.0f64, s in 0.0..44.0f64, ds in 0.05..1.0f64, ph in 5.0..10.0f64) {
        prop_assert!(fraction(t, s + ds, ph) < fraction(t, s, ph));
    }

    #[test]
    fn temperature_round_trips(c in -10.0..50.0f64) {
        prop_assert!((units::fahrenheit_to_celsius(units::celsius_to_fahrenheit(c)) - c).abs() < 1e-12);
    }

    #[test]
    fn volume_round_trips(l in 0.0..100_000.0f64) {
        prop_assert!((units::us_gallons_to_litres(units::litres_to_us_gallons(l)) - l).abs() <= 1e-9 * l.max(1.0));
    }

    #[test]
    fn ammonia_bases_round_trip(v in 0.0..1000.0f64) {
        for basis in AmmoniaBasis::ALL {
            prop_assert!((basis.from_tan_n(basis.to_tan_n(v)) - v).abs() <= 1e-12 * v.max(1.0));
        }
    }

    #[test]
    fn nitrite_bases_round_trip(v in 0.0..1000.0f64) {
        let n = units::nitrite_to_n(v, NitrogenIonBasis::Ion);
        prop_assert!((units::nitrite_n_to_ion(n) - v).abs() <= 1e-12 * v.max(1.0));
    }

    #[test]
    fn specific_gravity_round_trips(s in 0.1..42.0f64, reference in prop::sample::select(vec![15.556, 20.0, 25.0])) {
        let sg = salinity::specific_gravity(s, reference);
        prop_assert!((salinity::salinity_from_specific_gravity(sg, reference) - s).abs() < 1e-8);
    }

    #[test]
    fn conductivity_salinity_increases(c in 0.05..60.0f64, dc in 0.01..1.0f64, t in 1.0..35.0f64) {
        prop_assert!(salinity::practical_salinity(c + dc, t, 0.0) > salinity::practical_salinity(c, t, 0.0));
    }

    #[test]
    fn a_larger_change_never_leaves_more(c0 in 0.0..20.0f64, cs in 0.0..2.0f64, x in 0.0..1.0f64, dx in 0.0..0.5f64) {
        let x2 = (x + dx).min(1.0);
        if c0 >= cs {
            prop_assert!(dilution::after_change(c0, cs, x2) <= dilution::after_change(c0, cs, x) + 1e-12);
        }
    }
}
