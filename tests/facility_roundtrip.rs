//! Property: any valid facility, written to TOML, loads back equal (floats
//! exactly, text with quotes, backslashes, newlines and non-ASCII intact).

use std::path::Path;

use chrono::NaiveDate;
use proptest::prelude::*;
use tankwalk::core::band::BandEdges;
use tankwalk::core::units::AmmoniaBasis;
use tankwalk::model::{
    Bounds, Facility, Id, ReadingField, Room, RoundOrder, SourceWater, SpeciesProfile, System, Tank, TemperatureUnit,
    VolumeUnit, WaterType,
};

fn id(prefix: &str, i: usize, tail: &str) -> Id {
    Id::new(&format!("{prefix}{i}{tail}")).expect("generated ids are valid")
}

/// Text a person might type in a name: starts and ends with a letter (names are trimmed).
fn name() -> impl Strategy<Value = String> {
    "[A-Za-zé][A-Za-z0-9 ,'\"\\\\()é°-]{0,24}[a-z]"
}

/// Free notes: anything at all, newlines and control characters included.
fn notes() -> impl Strategy<Value = String> {
    prop_oneof![Just(String::new()), "(?s).{0,40}"]
}

fn edges() -> impl Strategy<Value = Option<BandEdges>> {
    proptest::option::of((0.001..0.1f64, 0.001..0.2f64, 0.001..1.0f64).prop_map(|(w, d1, d2)| BandEdges {
        watch: w,
        act: w + d1,
        critical: w + d1 + d2,
    }))
}

/// Species that can all share one water of type `water` at salinity up to `salt_floor`:
/// every temperature range holds 25 °C and every pH range holds 7.6.
fn species(water: WaterType, salt_floor: f64) -> impl Strategy<Value = Vec<SpeciesProfile>> {
    let one = (name(), 5.0..25.0f64, 25.0..40.0f64, 4.0..7.6f64, 7.6..11.0f64, 0.0..9.0f64, edges(), notes());
    proptest::collection::vec(one, 1..5).prop_map(move |list| {
        list.into_iter()
            .enumerate()
            .map(|(i, (name, t0, t1, p0, p1, extra_salt, band_edges, notes))| SpeciesProfile {
                key: id("sp", i, ""),
                name,
                water_type: water,
                temp_c: Bounds::new(t0, t1),
                ph: Bounds::new(p0, p1),
                salt_tolerance_g_l: (salt_floor + extra_salt).min(45.0),
                band_edges,
                notes,
            })
            .collect()
    })
}

#[derive(Debug, Clone)]
struct TankPlan {
    volume_l: f64,
    species: Vec<usize>,
    stock_count: u32,
    day: i64,
    notes: String,
}

fn tank_plan() -> impl Strategy<Value = TankPlan> {
    (0.1..5000.0f64, proptest::collection::vec(0usize..4, 0..3), 0u32..100_000, 0i64..15_000, notes()).prop_map(
        |(volume_l, species, stock_count, day, notes)| TankPlan { volume_l, species, stock_count, day, notes },
    )
}

fn water() -> impl Strategy<Value = (WaterType, f64)> {
    prop_oneof![
        Just((WaterType::Fresh, 0.0)),
        (0.0..4.0f64).prop_map(|s| (WaterType::Fresh, s)),
        (0.5..30.0f64).prop_map(|s| (WaterType::Brackish, s)),
        (30.0..37.0f64).prop_map(|s| (WaterType::Marine, s)),
    ]
}

/// The room's field lists, as a valid file may give them: both, one, or neither.
/// With both, every field the room reads is in one of them, NH3's three among them;
/// a routine list alone holds NH3's three itself.
fn field_lists() -> impl Strategy<Value = (Option<Vec<ReadingField>>, Option<Vec<ReadingField>>)> {
    (Just(ReadingField::ALL.to_vec()).prop_shuffle(), any::<u16>(), 0usize..=9, 0u8..4).prop_map(
        |(shuffled, mask, split, which)| {
            let kept: Vec<ReadingField> = shuffled
                .iter()
                .enumerate()
                .filter(|(i, f)| ReadingField::FOR_NH3.contains(f) || mask & (1 << i) != 0)
                .map(|(_, f)| *f)
                .collect();
            let split = split.clamp(1, kept.len());
            match which {
                0 => (None, None),
                1 => (Some(kept), None),
                // Any fields at all may be optional: the default routine list keeps the rest.
                2 => (None, Some(shuffled.into_iter().filter(|f| !kept.contains(f) || mask & 1 != 0).collect())),
                _ => (Some(kept[..split].to_vec()), Some(kept[split..].to_vec())),
            }
        },
    )
}

fn room() -> impl Strategy<Value = Room> {
    let source = proptest::option::of((
        proptest::option::of(5.0..10.0f64),
        proptest::option::of(0.0..2.0f64),
        proptest::option::of(4.0..35.0f64),
        any::<bool>(),
        notes(),
    ))
    .prop_map(|w| {
        w.map(|(ph, tan_n_mg_l, temp_c, chloramine, note)| SourceWater { ph, tan_n_mg_l, temp_c, chloramine, note })
    });
    (
        name(),
        -100.0..3000.0f64,
        proptest::sample::select(AmmoniaBasis::ALL.to_vec()),
        any::<bool>(),
        any::<bool>(),
        source,
        1u32..=168,
        field_lists(),
        notes(),
    )
        .prop_map(|(name, elevation_m, kit_basis, fahrenheit, gallons, source_water, hours, fields, notes)| Room {
            name,
            elevation_m,
            kit_basis,
            temperature_unit: if fahrenheit { TemperatureUnit::Fahrenheit } else { TemperatureUnit::Celsius },
            volume_unit: if gallons { VolumeUnit::UsGallon } else { VolumeUnit::Litre },
            round_order: RoundOrder::AsListed,
            source_water,
            round_interval_hours: hours,
            reading_fields: fields.0,
            optional_fields: fields.1,
            notes,
        })
}

fn facility() -> impl Strategy<Value = Facility> {
    water()
        .prop_flat_map(|(water_type, salinity)| {
            (
                Just((water_type, salinity)),
                room(),
                species(water_type, salinity),
                // systems: each a list of tanks and a sump volume
                proptest::collection::vec((proptest::collection::vec(tank_plan(), 0..4), 0.0..2000.0f64, name()), 0..3),
                proptest::collection::vec(tank_plan(), 1..4),
                any::<bool>(),
                any::<u64>(),
            )
        })
        .prop_map(|((water_type, salinity), mut room, species, system_plans, standalone, explicit_order, seed)| {
            let date = |day: i64| NaiveDate::from_ymd_opt(1990, 1, 1).unwrap() + chrono::Days::new(day as u64);
            let make_tank = |label: Id, plan: &TankPlan, system: Option<Id>| {
                let mut keys: Vec<Id> = Vec::new();
                for i in &plan.species {
                    let key = species[i % species.len()].key.clone();
                    if !keys.contains(&key) {
                        keys.push(key);
                    }
                }
                Tank {
                    id: label,
                    volume_l: plan.volume_l,
                    system,
                    water_type,
                    salinity_g_l: salinity,
                    stock_count: if keys.is_empty() { 0 } else { plan.stock_count },
                    species: keys,
                    set_up: date(plan.day),
                    notes: plan.notes.clone(),
                }
            };
            let mut systems = Vec::new();
            let mut tanks = Vec::new();
            for (si, (plans, sump, system_name)) in system_plans.iter().enumerate() {
                let system_id = id("S", si, "-sys");
                let mut on = Vec::new();
                for (ti, plan) in plans.iter().enumerate() {
                    let tank = make_tank(id("t", si * 10 + ti, ".on"), plan, Some(system_id.clone()));
                    on.push(tank.id.clone());
                    tanks.push(tank);
                }
                let volume_l: f64 = plans.iter().map(|p| p.volume_l).sum::<f64>() + sump + 1.0;
                systems.push(System {
                    id: system_id,
                    name: system_name.clone(),
                    volume_l,
                    water_type,
                    salinity_g_l: salinity,
                    tanks: on,
                    notes: String::new(),
                });
            }
            for (i, plan) in standalone.iter().enumerate() {
                tanks.push(make_tank(id("Q", i, ""), plan, None));
            }
            if explicit_order {
                // Systems and standalone tanks, in an order drawn from the seed.
                let mut stops: Vec<Id> = systems.iter().map(|s| s.id.clone()).collect();
                stops.extend(tanks.iter().filter(|t| t.system.is_none()).map(|t| t.id.clone()));
                let n = stops.len();
                for i in 0..n {
                    let j = (seed.rotate_left(i as u32) as usize) % n;
                    stops.swap(i, j);
                }
                room.round_order = RoundOrder::Ids(stops);
            }
            Facility { room, species, systems, tanks }
        })
}

#[test]
fn the_rooms_field_lists_are_written_and_read_back() {
    let text = "[room]\nname = \"Bench\"\nkit_basis = \"n\"\nreading_fields = [\"ph\", \"Temperature\", \"total_ammonia\"]\n\
                optional_fields = []\n\n[[tanks]]\nid = \"T-1\"\nvolume_l = 40\nwater_type = \"fresh\"\nset_up = 2024-01-01\n";
    let f = Facility::parse(text, Path::new("bench.toml")).unwrap();
    let written = f.to_toml_string();
    assert!(written.contains("reading_fields = [\"ph\", \"temperature\", \"total-ammonia\"]\n"), "{written}");
    assert!(written.contains("optional_fields = []\n"), "{written}");
    assert_eq!(Facility::parse(&written, Path::new("written.toml")).unwrap(), f);
    // A room that does not say is written without them, and keeps the defaults.
    let plain = Facility::parse(
        &text.replace("optional_fields = []\n", "").replace("reading_fields", "# reading_fields"),
        Path::new("plain.toml"),
    )
    .unwrap();
    let written = plain.to_toml_string();
    assert!(!written.contains("reading_fields") && !written.contains("optional_fields"), "{written}");
    assert_eq!(Facility::parse(&written, Path::new("written.toml")).unwrap(), plain);
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn written_facilities_load_back_equal(f in facility()) {
        let text = f.to_toml_string();
        let back = Facility::parse(&text, Path::new("written.toml"));
        prop_assert!(back.is_ok(), "{}\n--- written ---\n{text}", back.unwrap_err());
        prop_assert_eq!(back.unwrap(), f);
    }

    #[test]
    fn parsing_any_text_never_panics(text in "(?s).{0,400}") {
        let _ = Facility::parse(&text, Path::new("any.toml"));
    }

    #[test]
    fn damaging_a_written_facility_gives_located_errors(f in facility(), cut in 0usize..4000) {
        // Truncate the file somewhere: the result either loads or says where it is wrong.
        let text = f.to_toml_string();
        let mut end = cut.min(text.len());
        while !text.is_char_boundary(end) {
            end -= 1;
        }
        if let Err(errors) = Facility::parse(&text[..end], Path::new("cut.toml")) {
            prop_assert!(!errors.errors.is_empty());
            let lines = text[..end].lines().count().max(1);
            for e in &errors.errors {
                prop_assert!(e.line >= 1 && e.line <= lines + 1, "{e} beyond {lines} lines");
                prop_assert!(e.column >= 1);
                prop_assert!(!e.message.is_empty());
            }
        }
    }
}
