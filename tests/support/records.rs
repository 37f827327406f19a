//! Random valid records of every kind, for the exchange tests.
//!
//! Included with `#[path]` by the test files that need it.

use chrono::{DateTime, FixedOffset, TimeZone};
use proptest::prelude::*;
use tankwalk::core::salinity::SalinityReading;
use tankwalk::core::units::{AmmoniaBasis, NitrogenIonBasis};
use tankwalk::model::record::*;
use ulid::Ulid;

/// Free text as people type it, sometimes starting with a character a
/// spreadsheet would run as a formula, with accents and line breaks.
pub fn note() -> impl Strategy<Value = String> {
    ("[=+@\\-\t\n]?", "[a-zA-Z0-9 ,.;:'\"°éñ%()/=+\\-\n]{0,40}")
        .prop_map(|(lead, rest)| format!("{lead}{rest}"))
        .prop_filter("not blank", |s| !s.trim().is_empty())
}

/// A person's name: printable, not blank.
pub fn name() -> impl Strategy<Value = String> {
    "[A-Z][a-zé]{1,10} [A-Z][a-z,=@+\\-]{1,12}"
}

pub fn target() -> impl Strategy<Value = Target> {
    (any::<bool>(), "[A-Z][A-Z0-9]{0,3}-?[0-9]{1,3}")
        .prop_map(|(tank, id)| if tank { Target::Tank(id) } else { Target::System(id) })
}

fn opt<T: std::fmt::Debug + Clone + 'static>(s: impl Strategy<Value = T> + 'static) -> BoxedStrategy<Option<T>> {
    prop_oneof![1 => Just(None), 2 => s.prop_map(Some)].boxed()
}

pub fn measurements() -> impl Strategy<Value = Measurements> {
    let temperature =
        prop_oneof![(0.0..40.0f64).prop_map(Temperature::celsius), (32.0..104.0f64).prop_map(Temperature::fahrenheit),];
    let basis = prop_oneof![Just(AmmoniaBasis::N), Just(AmmoniaBasis::Nh3), Just(AmmoniaBasis::Nh4)];
    let ion = prop_oneof![Just(NitrogenIonBasis::N), Just(NitrogenIonBasis::Ion)];
    let salinity = prop_oneof![
        (0.0..45.0f64).prop_map(|value| SalinityReading::Ppt { value }),
        (1.002..1.025f64).prop_map(|value| SalinityReading::SpecificGravity { value, reference_c: 25.0 }),
        (100.0..55_000.0f64).prop_map(|value_us_cm| SalinityReading::Conductivity { value_us_cm, reference_c: 25.0 }),
    ];
    let alkalinity = prop_oneof![
        (0.0..2000.0f64).prop_map(|value| Alkalinity { value, unit: AlkalinityUnit::MgLCaco3 }),
        (0.0..100.0f64).prop_map(|value| Alkalinity { value, unit: AlkalinityUnit::Dkh }),
        (0.0..39.0f64).prop_map(|value| Alkalinity { value, unit: AlkalinityUnit::MeqL }),
    ];
    (
        opt(temperature),
        opt(0.0..14.0f64),
        opt((0.0..1000.0f64, basis).prop_map(|(value, basis)| TotalAmmonia { value, basis })),
        opt((0.0..1000.0f64, ion.clone()).prop_map(|(value, basis)| NitrogenReading { value, basis })),
        opt((0.0..10_000.0f64, ion).prop_map(|(value, basis)| NitrogenReading { value, basis })),
        opt(salinity),
        opt(0.0..40.0f64),
        opt(0.0..40_000.0f64),
        opt(alkalinity),
    )
        .prop_map(|(temperature, ph, total_ammonia, nitrite, nitrate, salinity, dox, chloride, alkalinity)| {
            Measurements {
                temperature,
                ph,
                total_ammonia,
                nitrite,
                nitrate,
                salinity,
                dissolved_oxygen_mg_l: dox,
                chloride_mg_l: chloride,
                alkalinity,
            }
        })
}

pub fn reading() -> impl Strategy<Value = Reading> {
    (target(), measurements(), any::<[bool; 5]>(), prop_oneof![3 => Just(0u32), 1 => 1u32..50], opt(note())).prop_map(
        |(target, mut measurements, signs, deaths, note)| {
            let [gasping, hyperactive, nervous_signs, cloudy_eyes, excess_mucus] = signs;
            let observations = Observations { gasping, hyperactive, nervous_signs, cloudy_eyes, excess_mucus, deaths };
            if measurements.is_empty() && observations.is_empty() {
                measurements.ph = Some(7.0);
            }
            Reading { target, measurements, observations, note }
        },
    )
}

pub fn event_kind() -> impl Strategy<Value = EventKind> {
    prop_oneof![
        (0.5..100.0f64, opt(0.0..14.0f64), opt(0.0..5.0f64), opt(0.0..40.0f64), any::<bool>()).prop_map(
            |(percent, source_ph, source_tan_n_mg_l, source_temp_c, dechlorinated)| EventKind::WaterChange {
                percent,
                source_ph,
                source_tan_n_mg_l,
                source_temp_c,
                dechlorinated
            }
        ),
        Just(EventKind::FeedingHeld),
        Just(EventKind::FeedingResumed),
        (any::<bool>(), "[a-z]{3,12}( [a-z]{2,8})?").prop_map(|(anti, name)| EventKind::Medication {
            class: if anti { MedicationClass::Antibiotic } else { MedicationClass::Other },
            name
        }),
        any::<bool>().prop_map(|rinsed_in_tap_water| EventKind::FilterCleaned { rinsed_in_tap_water }),
        Just(EventKind::SubstrateReplaced),
        (1u32..1000).prop_map(|count| EventKind::FishAdded { count }),
        (1u32..1000).prop_map(|count| EventKind::DeadFishRemoved { count }),
        (0.1..5000.0f64).prop_map(|grams| EventKind::SaltAdded { grams }),
        (10.0..32.0f64).prop_map(|temp_c| EventKind::HeaterSetPoint { temp_c }),
        Just(EventKind::NitrifyingCultureAdded),
        Just(EventKind::AmmoniaBinderAdded),
        Just(EventKind::ZeoliteAdded),
    ]
}

pub fn plain_body() -> impl Strategy<Value = RecordBody> {
    prop_oneof![
        4 => reading().prop_map(RecordBody::Reading),
        2 => (target(), event_kind(), opt(note())).prop_map(|(target, kind, note)| RecordBody::Event(Event { target, kind, note })),
        1 => (target(), note()).prop_map(|(target, reason)| RecordBody::Skip(Skip { target, reason })),
    ]
}

/// An instant between 1995 and 2045 with a random offset (−12:00 to +14:00)
/// and sub-second part.
pub fn taken_at() -> impl Strategy<Value = DateTime<FixedOffset>> {
    (788_918_400i64..2_366_841_600, 0u32..1_000_000_000, -48i32..=56).prop_map(|(secs, nanos, quarters)| {
        FixedOffset::east_opt(quarters * 900).unwrap().timestamp_opt(secs, nanos).unwrap()
    })
}

/// What a generated record is: a plain one, or a correction of an earlier one.
#[derive(Debug, Clone)]
pub enum Planned {
    Plain(RecordBody),
    /// Corrects the record `index` places back (modulo how many there are), with a replacement or a withdrawal.
    Correction {
        back: usize,
        replacement: Option<RecordBody>,
        reason: String,
    },
}

pub fn planned() -> impl Strategy<Value = Planned> {
    prop_oneof![
        4 => plain_body().prop_map(Planned::Plain),
        1 => (0usize..10, opt(plain_body()), note())
            .prop_map(|(back, replacement, reason)| Planned::Correction { back, replacement, reason }),
    ]
}

/// A history of valid records: readings, events, skips and corrections of earlier ones.
pub fn history(size: std::ops::Range<usize>) -> impl Strategy<Value = Vec<Record>> {
    prop::collection::vec((planned(), name(), taken_at(), any::<u128>(), any::<u128>()), size).prop_map(|items| {
        let mut records: Vec<Record> = Vec::new();
        for (plan, operator, taken_at, id, device) in items {
            let body = match plan {
                Planned::Plain(body) => body,
                Planned::Correction { .. } if records.is_empty() => continue,
                Planned::Correction { back, replacement, reason } => {
                    let of = &records[records.len() - 1 - back % records.len()];
                    RecordBody::Correction(Correction {
                        supersedes: of.id,
                        replacement: replacement.map(Box::new),
                        reason,
                    })
                }
            };
            let record = Record { id: Ulid(id), device: DeviceId(Ulid(device)), operator, taken_at, body };
            if record.check().is_ok() {
                records.push(record);
            }
        }
        records
    })
}
