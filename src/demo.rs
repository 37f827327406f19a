//! A generated history for trying tankwalk on a sample room: daily morning
//! rounds over many days, weekly water changes, and a few stories a fish-room
//! lead would recognise (a rack whose filter suffered after an antibiotic, an
//! acid tank whose ammonia is hidden by its low pH, a tank with sick fish).
//!
//! Deterministic: the same room, end time and seed give the same records, so
//! tests and screenshots are stable. Every name in it is invented.

use chrono::{DateTime, Duration, FixedOffset};
use ulid::Ulid;

use crate::core::salinity::SalinityReading;
use crate::core::units::NitrogenIonBasis;
use crate::model::facility::{Facility, Tank};
use crate::model::record::{
    DeviceId, Event, EventKind, Measurements, MedicationClass, NitrogenReading, Reading, Record, RecordBody, Skip,
    Target, Temperature, TotalAmmonia,
};

/// The people who walk the demo rounds (invented).
pub const OPERATORS: [&str; 3] = ["Ines Okafor", "Tomasz Whitlow", "Anneke Sollis"];

/// A small, fast, seedable generator (splitmix64); quality is ample for demo data.
#[derive(Debug, Clone)]
pub struct Rng(u64);

impl Rng {
    /// A generator from a seed.
    pub fn new(seed: u64) -> Rng {
        Rng(seed)
    }

    /// The next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// A number in `[0, 1)`.
    pub fn unit(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }

    /// A number in `[-1, 1)`.
    pub fn signed(&mut self) -> f64 {
        self.unit() * 2.0 - 1.0
    }
}

fn round_to(x: f64, step: f64) -> f64 {
    ((x / step).round() * step * 1e6).round() / 1e6
}

/// What a water of the room is like, and how it drifts.
#[derive(Debug, Clone)]
struct Water {
    target: Target,
    temp_c: f64,
    ph: f64,
    /// Where temperature and pH wander around (the heater's set-point, the
    /// water's buffer): the drift stays within reach of them however long the history.
    usual_temp_c: f64,
    usual_ph: f64,
    tan: f64,
    nitrite: f64,
    nitrate: f64,
    salinity: f64,
    volume_l: f64,
    story: Story,
}

impl Water {
    /// A water with nothing special happening: temperature and pH near the
    /// middle of its species' ranges (pH held within `ph_range`), a little
    /// ammonia (up to 0.1 + `tan_spread` mg/L TAN-N), nitrite and nitrate.
    fn steady(
        target: Target,
        (temp, ph): (f64, f64),
        ph_range: (f64, f64),
        tan_spread: f64,
        salinity: f64,
        volume_l: f64,
        rng: &mut Rng,
    ) -> Water {
        let temp_c = round_to(temp, 0.5);
        let ph = round_to(ph.clamp(ph_range.0, ph_range.1), 0.1);
        Water {
            target,
            temp_c,
            ph,
            usual_temp_c: temp_c,
            usual_ph: ph,
            tan: 0.1 + tan_spread * rng.unit(),
            nitrite: 0.05 * rng.unit(),
            nitrate: 10.0 + 20.0 * rng.unit(),
            salinity,
            volume_l,
            story: Story::Steady,
        }
    }
}

/// Something that happens to one water over the history.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Story {
    /// Nothing special.
    Steady,
    /// An antibiotic some days ago; ammonia and nitrite climb since.
    FilterHurt,
    /// Soft, acid water that hides a high total ammonia.
    AcidTank,
    /// Fish sick in the last days.
    SickFish,
}

fn middle(tank: Option<&Tank>, facility: &Facility) -> (f64, f64) {
    let profile = tank.map(|t| facility.effective_profile(t));
    let temp = profile.as_ref().and_then(|p| p.temp_c).map_or(25.0, |b| (b.min + b.max) / 2.0);
    let ph = profile.as_ref().and_then(|p| p.ph).map_or(7.4, |b| (b.min + b.max) / 2.0);
    (temp, ph)
}

fn waters(facility: &Facility, rng: &mut Rng) -> Vec<Water> {
    let mut waters = Vec::new();
    for system in &facility.systems {
        let first = facility.tanks_on(system).into_iter().next();
        let target = Target::System(system.id.as_str().to_string());
        let ph_range = (6.8, 8.2);
        waters.push(Water::steady(
            target,
            middle(first, facility),
            ph_range,
            0.15,
            system.salinity_g_l,
            system.volume_l,
            rng,
        ));
    }
    for tank in facility.tanks.iter().filter(|t| t.system.is_none()) {
        let target = Target::Tank(tank.id.as_str().to_string());
        let ph_range = (6.0, 8.4);
        waters.push(Water::steady(
            target,
            middle(Some(tank), facility),
            ph_range,
            0.2,
            tank.salinity_g_l,
            tank.volume_l,
            rng,
        ));
    }
    // The stories: the second shared water's filter is hurt, the first
    // standalone water is acid, the last standalone one has sick fish.
    // The filter story needs alkaline water to show: the shared water with the highest pH.
    let systems = facility.systems.len();
    let hurt =
        (0..systems).max_by(|a, b| waters[*a].ph.total_cmp(&waters[*b].ph)).or((!waters.is_empty()).then_some(0));
    if let Some(i) = hurt {
        waters[i].story = Story::FilterHurt;
    }
    let standalone: Vec<usize> = (systems..waters.len()).collect();
    if let Some(&i) = standalone.first() {
        waters[i].story = Story::AcidTank;
        waters[i].ph = 6.5;
        waters[i].usual_ph = 6.5;
        waters[i].tan = 2.5;
    }
    if standalone.len() >= 2
        && let Some(&i) = standalone.last()
    {
        waters[i].story = Story::SickFish;
    }
    waters
}

/// A generated room for trying tankwalk at scale (benchmarks, load tests):
/// `racks` systems of 20 guppy tanks each (`SYS-00`, tanks `S00-00` ...) and
/// `tubs` standalone tubs (`TUB-000` ...). The species figures are the
/// demo's, not advice.
pub fn generated_room(racks: usize, tubs: usize) -> Facility {
    use std::fmt::Write as _;
    let mut toml = String::from(
        "[room]\nname = \"Generated hall\"\nelevation_m = 0\nkit_basis = \"n\"\n\n\
         [[species]]\nkey = \"guppy\"\nname = \"Guppy (Poecilia reticulata)\"\nwater_type = \"fresh\"\n\
         temp_c = [22, 28]\nph = [7.0, 8.5]\nsalt_tolerance_g_l = 10\n\n",
    );
    let mut tanks = String::new();
    for s in 0..racks {
        let ids: Vec<String> = (0..20).map(|t| format!("\"S{s:02}-{t:02}\"")).collect();
        let _ = writeln!(
            toml,
            "[[systems]]\nid = \"SYS-{s:02}\"\nname = \"Rack {s}\"\nvolume_l = 2600\nwater_type = \"fresh\"\ntanks = [{}]\n",
            ids.join(", ")
        );
        for t in 0..20 {
            let _ = writeln!(
                tanks,
                "[[tanks]]\nid = \"S{s:02}-{t:02}\"\nvolume_l = 120\nspecies = \"guppy\"\nstock_count = 50\nset_up = 2024-01-01\n"
            );
        }
    }
    for t in 0..tubs {
        let _ = writeln!(
            tanks,
            "[[tanks]]\nid = \"TUB-{t:03}\"\nvolume_l = 80\nspecies = \"guppy\"\nstock_count = 20\nset_up = 2024-01-01\n"
        );
    }
    toml.push_str(&tanks);
    // Racks and tubs are numbered within the id rules, so the file is valid by construction.
    Facility::parse(&toml, std::path::Path::new("generated-hall.toml")).expect("the generated room is valid")
}

/// Builds `days` days of morning rounds ending the day before `end` (so the
/// round of `end`'s day is still to walk), on `device`, from `seed`.
pub fn history(facility: &Facility, device: DeviceId, end: DateTime<FixedOffset>, days: u32, seed: u64) -> Vec<Record> {
    let mut rng = Rng::new(seed);
    let mut waters = waters(facility, &mut rng);
    let mut records = Vec::new();
    let start_day = end.date_naive() - Duration::days(i64::from(days));
    let offset = *end.offset();
    let basis = facility.room.kit_basis;
    let round_order: Vec<&Tank> = facility.round();
    for day in 0..days {
        let date = start_day + Duration::days(i64::from(day));
        let days_left = i64::from(days) - i64::from(day);
        let Some(naive) = date.and_hms_opt(7, 20, 0) else { continue };
        let Some(morning) = naive.and_local_timezone(offset).single() else { continue };
        let operator = OPERATORS[(day as usize) % OPERATORS.len()];
        let mut minute = 0i64;
        let mut done_systems: Vec<String> = Vec::new();
        for tank in &round_order {
            minute += 1 + i64::try_from(rng.next_u64() % 2).unwrap_or(0);
            let at = morning
                + Duration::minutes(minute)
                + Duration::seconds(i64::try_from(rng.next_u64() % 50).unwrap_or(0));
            let key = match &tank.system {
                Some(system) if done_systems.iter().any(|s| s == system.as_str()) => None,
                Some(system) => {
                    done_systems.push(system.as_str().to_string());
                    Some(Target::System(system.as_str().to_string()))
                }
                None => Some(Target::Tank(tank.id.as_str().to_string())),
            };
            if let Some(target) = key
                && let Some(water) = waters.iter_mut().find(|w| w.target == target)
            {
                drift(water, days_left, &mut rng);
                records.push(reading(water, at, operator, device, basis, &mut rng));
                // Weekly water change on each water, on its own weekday.
                let weekday = (water.target.id().bytes().map(u64::from).sum::<u64>() % 7) as u32;
                if day % 7 == weekday && days_left > 1 {
                    let percent = round_to(25.0 + 10.0 * rng.unit(), 5.0);
                    water.tan *= 1.0 - percent / 100.0;
                    water.nitrate *= 1.0 - percent / 100.0;
                    water.nitrite *= 1.0 - percent / 100.0;
                    records.push(event(
                        water.target.clone(),
                        at + Duration::minutes(90),
                        operator,
                        device,
                        EventKind::WaterChange {
                            percent,
                            source_ph: facility.room.source_water.as_ref().and_then(|s| s.ph),
                            source_tan_n_mg_l: None,
                            source_temp_c: None,
                            dechlorinated: true,
                        },
                        &mut rng,
                    ));
                }
                if water.story == Story::FilterHurt && days_left == 12 {
                    records.push(event(
                        water.target.clone(),
                        at + Duration::minutes(120),
                        operator,
                        device,
                        EventKind::Medication { class: MedicationClass::Antibiotic, name: "nitrofurazone bath".into() },
                        &mut rng,
                    ));
                }
                if water.story == Story::FilterHurt && days_left == 3 {
                    records.push(event(
                        water.target.clone(),
                        at + Duration::minutes(5),
                        operator,
                        device,
                        EventKind::FeedingHeld,
                        &mut rng,
                    ));
                }
            }
            // Sick fish: signs and a death on the tank itself in the last days.
            if let Some(water) = waters.iter().find(|w| w.story == Story::SickFish)
                && water.target == Target::Tank(tank.id.as_str().to_string())
                && days_left <= 2
            {
                let mut own = Reading::new(Target::Tank(tank.id.as_str().to_string()));
                own.observations.gasping = true;
                own.observations.excess_mucus = days_left == 1;
                own.observations.deaths = u32::from(days_left == 1);
                own.note = Some("two fish at the surface, clamped fins".into());
                records.push(record(RecordBody::Reading(own), at + Duration::seconds(30), operator, device, &mut rng));
            }
        }
    }
    records
}

/// This morning's round, begun after a [`history`] that ends the day before
/// `now` and not finished: the first half of the room's waters (systems once,
/// standalone tanks each) read from 07:25, the second water's ammonia up
/// overnight; the last water of that half skipped ("being moved to the new
/// stand"), the next one read and the one after skipped ("emptied for
/// cleaning"); the rest not reached. An hour later the second water gets a 30 %
/// water change with the room's source water. For the round report and its
/// tests: done, skipped and not reached, and an event after the readings.
pub fn round_in_progress(
    facility: &Facility,
    device: DeviceId,
    history: &[Record],
    now: DateTime<FixedOffset>,
    seed: u64,
) -> Vec<Record> {
    let mut rng = Rng::new(seed ^ 0x5EED_0F0D_A100);
    let mut targets: Vec<Target> = Vec::new();
    for tank in facility.round() {
        let target = match &tank.system {
            Some(system) => Target::System(system.as_str().to_string()),
            None => Target::Tank(tank.id.as_str().to_string()),
        };
        if !targets.contains(&target) {
            targets.push(target);
        }
    }
    let Some(start) = now.date_naive().and_hms_opt(7, 25, 0).and_then(|t| t.and_local_timezone(*now.offset()).single())
    else {
        return Vec::new();
    };
    let last_reading = |target: &Target| {
        history
            .iter()
            .rev()
            .filter_map(|r| r.body.as_reading())
            .find(|r| &r.target == target && r.water_sample().is_some())
            .cloned()
    };
    let half = targets.len() / 2;
    let mut records = Vec::new();
    for (i, target) in targets.iter().enumerate() {
        let operator = if i + 1 < half { OPERATORS[0] } else { OPERATORS[2] };
        let at = start + Duration::minutes(6 * i as i64);
        let skip = |reason: &str, rng: &mut Rng| {
            record(RecordBody::Skip(Skip { target: target.clone(), reason: reason.into() }), at, operator, device, rng)
        };
        if i + 1 < half || i == half {
            let Some(mut reading) = last_reading(target) else { continue };
            if i == 1
                && let Some(tan) = reading.measurements.total_ammonia.as_mut()
            {
                tan.value = round_to(tan.value * 2.0 + 0.4, 0.01);
                reading.note = Some("water hazy, fish at the front glass".into());
            }
            records.push(record(RecordBody::Reading(reading), at, operator, device, &mut rng));
        } else if i + 1 == half {
            records.push(skip("being moved to the new stand", &mut rng));
        } else if i == half + 1 {
            records.push(skip("emptied for cleaning", &mut rng));
        }
    }
    if let Some(second) = targets.get(1) {
        let water_change = EventKind::WaterChange {
            percent: 30.0,
            source_ph: facility.room.source_water.as_ref().and_then(|s| s.ph),
            source_tan_n_mg_l: None,
            source_temp_c: facility.room.source_water.as_ref().and_then(|s| s.temp_c),
            dechlorinated: true,
        };
        let mut change =
            event(second.clone(), start + Duration::minutes(70), OPERATORS[1], device, water_change, &mut rng);
        if let RecordBody::Event(e) = &mut change.body {
            e.note = Some("aged water from the vat".into());
        }
        records.push(change);
    }
    records
}

fn drift(water: &mut Water, days_left: i64, rng: &mut Rng) {
    water.temp_c = (water.temp_c + 0.15 * rng.signed()).clamp(water.usual_temp_c - 1.0, water.usual_temp_c + 1.0);
    water.ph = (water.ph + 0.04 * rng.signed()).clamp(water.usual_ph - 0.2, water.usual_ph + 0.2);
    match water.story {
        Story::FilterHurt if days_left <= 11 => {
            water.tan += 0.2 + 0.1 * rng.unit();
            water.nitrite += 0.05 + 0.05 * rng.unit();
        }
        Story::AcidTank => water.tan = (water.tan + 0.1 * rng.signed()).clamp(1.5, 4.0),
        _ => {
            // Feeding adds, nitrification takes away: a low, noisy level.
            water.tan = (water.tan * 0.9 + 0.02 + 0.04 * rng.unit()).clamp(0.02, 0.6);
            water.nitrite = (water.nitrite * 0.8 + 0.01 * rng.unit()).clamp(0.0, 0.2);
        }
    }
    water.nitrate += 0.8 + 0.4 * rng.unit();
}

fn reading(
    water: &Water,
    at: DateTime<FixedOffset>,
    operator: &str,
    device: DeviceId,
    basis: crate::core::units::AmmoniaBasis,
    rng: &mut Rng,
) -> Record {
    let mut m = Measurements {
        temperature: Some(Temperature::celsius(round_to(water.temp_c, 0.1))),
        ph: Some(round_to(water.ph, 0.1)),
        total_ammonia: Some(TotalAmmonia { value: round_to(basis.from_tan_n(water.tan), 0.01), basis }),
        nitrite: Some(NitrogenReading { value: round_to(water.nitrite, 0.01), basis: NitrogenIonBasis::N }),
        ..Measurements::default()
    };
    if water.salinity > 0.0 {
        m.salinity = Some(SalinityReading::Ppt { value: round_to(water.salinity + 0.4 * rng.signed(), 0.1) });
    }
    // Nitrate once a week or so.
    if rng.unit() < 0.15 {
        m.nitrate = Some(NitrogenReading { value: round_to(water.nitrate, 1.0), basis: NitrogenIonBasis::N });
    }
    let mut r = Reading::new(water.target.clone());
    r.measurements = m;
    let _ = water.volume_l;
    record(RecordBody::Reading(r), at, operator, device, rng)
}

fn event(
    target: Target,
    at: DateTime<FixedOffset>,
    operator: &str,
    device: DeviceId,
    kind: EventKind,
    rng: &mut Rng,
) -> Record {
    record(RecordBody::Event(Event { target, kind, note: None }), at, operator, device, rng)
}

fn record(body: RecordBody, at: DateTime<FixedOffset>, operator: &str, device: DeviceId, rng: &mut Rng) -> Record {
    let millis = u64::try_from(at.timestamp_millis()).unwrap_or(0);
    let random = (u128::from(rng.next_u64()) << 16 | u128::from(rng.next_u64() & 0xFFFF)) & ((1u128 << 80) - 1);
    Record { id: Ulid::from_parts(millis, random), device, operator: operator.to_string(), taken_at: at, body }
}

#[cfg(test)]
mod tests {
    use super::*;
    use chrono::TimeZone;
    use std::path::Path;

    fn room() -> Facility {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms/harbourside-holding.toml");
        Facility::load(&path).unwrap()
    }

    fn end() -> DateTime<FixedOffset> {
        FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 0, 0).unwrap()
    }

    #[test]
    fn every_generated_record_passes_the_record_checks() {
        let records = history(&room(), DeviceId(Ulid::from_parts(1, 1)), end(), 60, 7);
        assert!(records.len() > 60 * 8, "{}", records.len());
        for r in &records {
            r.check().unwrap_or_else(|e| panic!("{e}: {r:?}"));
            assert!(r.taken_at < end());
        }
        let mut ids: Vec<_> = records.iter().map(|r| r.id).collect();
        ids.sort();
        ids.dedup();
        assert_eq!(ids.len(), records.len());
    }

    /// Temperature and pH used to wander without bound (the clamp was around
    /// the moving value): eleven years of history on the benchmark's room reached
    /// 40.2 °C, which the record checks refuse (found by the limits benchmark).
    #[test]
    fn temperature_and_ph_stay_near_their_usual_values_over_ten_years() {
        let records = history(&room(), DeviceId(Ulid::from_parts(1, 1)), end(), 3650, 11);
        let mut seen: std::collections::HashMap<String, (f64, f64, f64, f64)> = std::collections::HashMap::new();
        for r in &records {
            r.check().unwrap_or_else(|e| panic!("{e}: {r:?}"));
            let Some(reading) = r.body.as_reading() else { continue };
            let (Some(t), Some(ph)) = (reading.measurements.temp_c(), reading.measurements.ph) else { continue };
            let e = seen.entry(reading.target.to_string()).or_insert((t, t, ph, ph));
            *e = (e.0.min(t), e.1.max(t), e.2.min(ph), e.3.max(ph));
        }
        for (water, (t_min, t_max, ph_min, ph_max)) in seen {
            assert!(t_max - t_min <= 2.1, "{water}: temperature {t_min}–{t_max}");
            assert!(ph_max - ph_min <= 0.41, "{water}: pH {ph_min}–{ph_max}");
        }
    }

    #[test]
    fn a_round_in_progress_reads_skips_and_leaves_tanks() {
        let facility = room();
        let device = DeviceId(Ulid::from_parts(1, 1));
        let now = end() + Duration::hours(3);
        let past = history(&facility, device, now, 10, 3);
        let today = round_in_progress(&facility, device, &past, now, 3);
        let kinds: Vec<&str> = today.iter().map(|r| r.body.kind_name()).collect();
        // Harbourside: four racks and four quarantine tanks; the fourth rack and Q-2 skipped, Q-3 and Q-4 left.
        assert_eq!(kinds, ["reading", "reading", "reading", "skip", "reading", "skip", "event"]);
        assert_eq!(today[3].body.target(), Some(&Target::System("RACK-D".into())));
        assert_eq!(today[5].body.target(), Some(&Target::Tank("Q-2".into())));
        for r in &today {
            r.check().unwrap();
            assert_eq!(r.taken_at.date_naive(), now.date_naive());
        }
        assert_eq!(today, round_in_progress(&facility, device, &past, now, 3));
    }

    #[test]
    fn the_same_seed_gives_the_same_history() {
        let device = DeviceId(Ulid::from_parts(1, 1));
        assert_eq!(history(&room(), device, end(), 10, 3), history(&room(), device, end(), 10, 3));
        assert_ne!(history(&room(), device, end(), 10, 3), history(&room(), device, end(), 10, 4));
    }
}
