//! The assessment, scenario by scenario, across the three sample rooms.
//!
//! Each scenario states a reading and its context and asserts the band, the
//! latent band, and the actions that must and must not appear. Expected bands
//! follow from the equations (Emerson et al. 1975; Khoo et al. 1977 as used by
//! Bower & Bidwell 1978) and the edges in force: the defaults 0.02 / 0.05 / 0.2
//! mg NH3-N/L, or a species' own edges from its sample-room profile. NH3-N
//! values quoted in the comments were worked out independently of tankwalk
//! with the same published equations.

use std::path::Path;

use chrono::{DateTime, Duration, NaiveDate, TimeZone, Utc};
use tankwalk::core::band::Band;
use tankwalk::core::units::{AmmoniaBasis, NitrogenIonBasis};
use tankwalk::model::Facility;
use tankwalk::model::record::{
    EventKind, MedicationClass, NitrogenReading, Reading, Sign, Target, Temperature, TotalAmmonia,
};
use tankwalk::rules::{
    ActionKind as A, Assessment, DatedEvent, Inputs, PastReading, RulesConfig, WarningKind as W, assess,
};

#[derive(Clone, Copy, Debug)]
enum Room {
    Harbourside,
    Tubs,
    Marine,
}

fn load(room: Room) -> Facility {
    let file = match room {
        Room::Harbourside => "harbourside-holding.toml",
        Room::Tubs => "cattail-bend-tubs.toml",
        Room::Marine => "saltmarsh-marine.toml",
    };
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms").join(file);
    Facility::load(&path).unwrap_or_else(|e| panic!("{file}: {e}"))
}

fn now() -> DateTime<Utc> {
    Utc.with_ymd_and_hms(2026, 12, 1, 8, 0, 0).unwrap()
}

/// A reading under construction.
#[derive(Clone)]
struct R(Reading);

fn water(temp: Temperature, ph: f64, tan: f64, basis: AmmoniaBasis) -> R {
    let mut r = Reading::new(Target::Tank(String::new()));
    r.measurements.temperature = Some(temp);
    r.measurements.ph = Some(ph);
    r.measurements.total_ammonia = Some(TotalAmmonia { value: tan, basis });
    R(r)
}

fn c(temp: f64, ph: f64, tan_n: f64) -> R {
    water(Temperature::celsius(temp), ph, tan_n, AmmoniaBasis::N)
}

impl R {
    fn nitrite_n(mut self, v: f64) -> R {
        self.0.measurements.nitrite = Some(NitrogenReading { value: v, basis: NitrogenIonBasis::N });
        self
    }
    fn nitrate_n(mut self, v: f64) -> R {
        self.0.measurements.nitrate = Some(NitrogenReading { value: v, basis: NitrogenIonBasis::N });
        self
    }
    fn chloride(mut self, v: f64) -> R {
        self.0.measurements.chloride_mg_l = Some(v);
        self
    }
    fn oxygen(mut self, v: f64) -> R {
        self.0.measurements.dissolved_oxygen_mg_l = Some(v);
        self
    }
    fn sign(mut self, sign: Sign) -> R {
        self.0.observations.set(sign, true);
        self
    }
    fn deaths(mut self, n: u32) -> R {
        self.0.observations.deaths = n;
        self
    }
}

struct Scenario {
    name: &'static str,
    room: Room,
    tank: &'static str,
    reading: R,
    /// Earlier readings: (days ago, reading).
    history: Vec<(f64, R)>,
    /// Events: (days ago, what).
    events: Vec<(f64, EventKind)>,
    band: Band,
    latent: Band,
    must: &'static [A],
    must_not: &'static [A],
    warnings: &'static [W],
    /// The biofilter state expected, when the scenario is about it.
    biofilter: Option<&'static str>,
}

fn run(s: &Scenario) -> Assessment {
    let facility = load(s.room);
    let tank = facility.tank(s.tank).unwrap_or_else(|| panic!("{}: no tank {}", s.name, s.tank));
    let at = |days: f64| now() - Duration::seconds((days * 86_400.0) as i64);
    let history: Vec<PastReading<'_>> =
        s.history.iter().map(|(d, r)| PastReading { at: at(*d), reading: &r.0 }).collect();
    let events: Vec<DatedEvent<'_>> = s.events.iter().map(|(d, k)| DatedEvent { at: at(*d), kind: k }).collect();
    let config = RulesConfig::default();
    assess(&Inputs {
        facility: &facility,
        tank,
        reading: &s.reading.0,
        at: now(),
        history: &history,
        events: &events,
        config: &config,
    })
}

#[allow(clippy::too_many_arguments)]
fn scenario(
    name: &'static str,
    room: Room,
    tank: &'static str,
    reading: R,
    band: Band,
    latent: Band,
    must: &'static [A],
    must_not: &'static [A],
) -> Scenario {
    Scenario {
        name,
        room,
        tank,
        reading,
        history: vec![],
        events: vec![],
        band,
        latent,
        must,
        must_not,
        warnings: &[],
        biofilter: None,
    }
}

impl Scenario {
    fn history(mut self, h: Vec<(f64, R)>) -> Scenario {
        self.history = h;
        self
    }
    fn events(mut self, e: Vec<(f64, EventKind)>) -> Scenario {
        self.events = e;
        self
    }
    fn filter(mut self, state: &'static str) -> Scenario {
        self.biofilter = Some(state);
        self
    }
    fn warns(mut self, w: &'static [W]) -> Scenario {
        self.warnings = w;
        self
    }
}

use Band::{Act, Clear, Critical, Watch};
use Room::{Harbourside as H, Marine as M, Tubs as T};

fn f(temp_f: f64, ph: f64, tan: f64, basis: AmmoniaBasis) -> R {
    water(Temperature::fahrenheit(temp_f), ph, tan, basis)
}

const NH4: AmmoniaBasis = AmmoniaBasis::Nh4;
const NH3: AmmoniaBasis = AmmoniaBasis::Nh3;

#[allow(clippy::too_many_lines)]
fn scenarios() -> Vec<Scenario> {
    vec![
        // ---- Harbourside Tropicals: fresh water, racks on shared sumps; source pH 7.6,
        // 0.3 mg/L TAN-N from chloramine.
        // 25 °C, pH 7.4, TAN 0.25: NH3-N 0.0035; at source pH 7.6: 0.0055.
        scenario(
            "routine clear guppy tank",
            H,
            "A-03",
            c(25.0, 7.4, 0.25),
            Clear,
            Clear,
            &[],
            &[A::WaterChange, A::HoldFeeding, A::Aerate, A::RemoveDead],
        )
        .filter("established"),
        // 25 °C, pH 7.8, TAN 0.8: NH3-N 0.0276 (watch); source pH lower, so no rise.
        scenario(
            "watch on a rack tank",
            H,
            "A-03",
            c(25.0, 7.8, 0.8),
            Watch,
            Watch,
            &[A::WaterChange, A::Retest],
            &[A::Zeolite, A::AddSalt, A::HoldFeeding, A::LowerTemperature],
        ),
        // 26 °C, pH 8.0, TAN 1.5: NH3-N 0.086 (act); 24 °C gives 0.075. Guppies take
        // salt, but A-12's bristlenose catfish share RACK-A's water and take none, and
        // the mollies on it need 24 °C: zeolite, not salt, and the heater to 24 °C only.
        scenario(
            "act in a guppy tank on a rack shared with salt-shy catfish",
            H,
            "A-03",
            c(26.0, 8.0, 1.5),
            Act,
            Act,
            &[A::WaterChange, A::HoldFeeding, A::Aerate, A::LowerTemperature, A::Zeolite, A::Retest],
            &[A::AddSalt, A::AmmoniaBinder],
        )
        .warns(&[W::SourceWaterAmmonia, W::DoNotCleanFilter]),
        // Neon edges 0.015 / 0.04 / 0.15: 25 °C, pH 7.0, TAN 8: NH3-N 0.045 (act; the
        // defaults would say watch); at the source's pH 7.6: 0.177 (critical).
        scenario(
            "acid neon tank: act now, critical after a careless change",
            H,
            "B-01",
            c(25.0, 7.0, 8.0),
            Act,
            Critical,
            &[A::WaterChange, A::Zeolite, A::HoldFeeding],
            &[A::AddSalt],
        )
        .warns(&[W::DoNotRaisePh]),
        scenario(
            "zeolite already in the neon tank's filter",
            H,
            "B-01",
            c(25.0, 7.0, 8.0),
            Act,
            Critical,
            &[A::WaterChange],
            &[A::Zeolite, A::AddSalt],
        )
        .events(vec![(5.0, EventKind::ZeoliteAdded)]),
        // Q-1 was set up 7 days before: cycling. Neon edges: 25 °C, pH 7.2, TAN 2.0:
        // NH3-N 0.0178 (watch); at pH 7.6: 0.044 (act).
        scenario(
            "new quarantine tank cycling",
            H,
            "Q-1",
            c(25.0, 7.2, 2.0),
            Watch,
            Act,
            &[A::WaterChange, A::NitrifyingCulture, A::HoldFeeding],
            &[A::AddSalt, A::LowerTemperature],
        )
        .filter("cycling"),
        // Empty new tank: default edges. 25 °C, pH 7.6, TAN 2.0: NH3-N 0.044 (watch).
        scenario(
            "empty tank being cycled",
            H,
            "Q-4",
            c(25.0, 7.6, 2.0),
            Watch,
            Watch,
            &[A::WaterChange, A::NitrifyingCulture],
            &[A::LowerTemperature, A::AddSalt, A::CallVeterinarian],
        ),
        scenario(
            "deaths raise a clear tank to watch",
            H,
            "A-01",
            c(25.0, 7.4, 0.25).deaths(2),
            Watch,
            Watch,
            &[A::RemoveDead, A::CallVeterinarian],
            &[A::WaterChange, A::Isolate],
        ),
        // 26 °C, pH 8.0, TAN 1.5 (act, 0.086) with gasping: raised to critical.
        scenario(
            "gasping fish raise act to critical",
            H,
            "A-01",
            c(26.0, 8.0, 1.5).sign(Sign::Gasping),
            Critical,
            Critical,
            &[A::CallVeterinarian, A::Isolate, A::WaterChange],
            &[A::RemoveDead],
        ),
        // 24 °C, pH 7.5, TAN 1.5: NH3-N 0.0246 (watch); antibiotic three days ago.
        scenario(
            "antibiotic puts the filter at risk",
            H,
            "C-01",
            c(24.0, 7.5, 1.5),
            Watch,
            Watch,
            &[A::CheckBiofilter, A::NitrifyingCulture, A::WaterChange],
            &[A::Zeolite],
        )
        .events(vec![(
            3.0,
            EventKind::Medication { class: MedicationClass::Antibiotic, name: "oxytetracycline".into() },
        )])
        .filter("at risk"),
        // 25 °C, pH 7.6, TAN rising 0.3 → 1.0 over four days in a mature tank: NH3-N 0.022.
        scenario(
            "mature tank with rising ammonia and no event",
            H,
            "D-05",
            c(25.0, 7.6, 1.0),
            Watch,
            Watch,
            &[A::CheckBiofilter, A::HoldFeeding, A::WaterChange],
            &[A::NitrifyingCulture],
        )
        .history(vec![
            (4.0, c(25.0, 7.6, 0.3)),
            (3.0, c(25.0, 7.6, 0.5)),
            (2.0, c(25.0, 7.6, 0.6)),
            (1.0, c(25.0, 7.6, 0.8)),
        ])
        .filter("rising"),
        scenario(
            "nitrite in fresh water, chloride unknown",
            H,
            "A-05",
            c(25.0, 7.4, 0.25).nitrite_n(0.5),
            Clear,
            Clear,
            &[A::AddChloride, A::HoldFeeding],
            &[A::WaterChange],
        ),
        scenario(
            "nitrite with enough chloride",
            H,
            "A-05",
            c(25.0, 7.4, 0.25).nitrite_n(0.5).chloride(60.0),
            Clear,
            Clear,
            &[],
            &[A::AddChloride, A::HoldFeeding],
        ),
        // Benson & Krause: 8.10 mg/L at 26 °C, 12 m; 4.0 mg/L is 49 %.
        scenario(
            "low oxygen",
            H,
            "A-07",
            c(26.0, 7.4, 0.25).oxygen(4.0),
            Clear,
            Clear,
            &[A::Aerate],
            &[A::WaterChange],
        ),
        // 28 °C, pH 8.2, TAN 3.0: NH3-N 0.30 (critical).
        scenario(
            "critical swordtail tank",
            H,
            "A-08",
            c(28.0, 8.2, 3.0),
            Critical,
            Critical,
            &[A::WaterChange, A::AmmoniaBinder, A::HoldFeeding, A::Aerate, A::Retest, A::LowerTemperature, A::Zeolite],
            &[A::AddSalt],
        )
        .warns(&[W::DoNotCleanFilter]),
        scenario(
            "feeding held, two clear readings: resume",
            H,
            "A-09",
            c(25.0, 7.4, 0.25),
            Clear,
            Clear,
            &[A::ResumeFeeding],
            &[A::HoldFeeding],
        )
        .history(vec![(1.0, c(25.0, 7.4, 0.25))])
        .events(vec![(3.0, EventKind::FeedingHeld)]),
        scenario(
            "feeding held, first clear reading: keep holding",
            H,
            "A-09",
            c(25.0, 7.4, 0.25),
            Clear,
            Clear,
            &[A::HoldFeeding],
            &[A::ResumeFeeding],
        )
        .history(vec![(1.0, c(25.0, 7.8, 0.8))])
        .events(vec![(3.0, EventKind::FeedingHeld)]),
        // The last change used pH 8.4 water: that, not the room's 7.6, is the latent pH.
        // 25 °C, TAN 0.8 at pH 7.4: NH3-N 0.011; at 8.4: 0.099 (act).
        scenario(
            "last water change's source pH sets the latent band",
            H,
            "A-04",
            c(25.0, 7.4, 0.8),
            Clear,
            Act,
            &[],
            &[A::WaterChange],
        )
        .events(vec![(
            2.0,
            EventKind::WaterChange {
                percent: 30.0,
                source_ph: Some(8.4),
                source_tan_n_mg_l: Some(0.0),
                source_temp_c: Some(25.0),
                dechlorinated: true,
            },
        )])
        .warns(&[W::DoNotRaisePh]),
        // Q-1 is a week old, but three low readings with nitrate rising show its
        // filter is established (seeded media, common practice, no source).
        scenario(
            "week-old tank already established",
            H,
            "Q-1",
            c(25.0, 7.2, 0.1).nitrite_n(0.02).nitrate_n(5.0),
            Clear,
            Clear,
            &[],
            &[A::NitrifyingCulture, A::WaterChange, A::HoldFeeding],
        )
        .history(vec![
            (2.0, c(25.0, 7.2, 0.1).nitrite_n(0.05).nitrate_n(2.0)),
            (1.0, c(25.0, 7.2, 0.0).nitrite_n(0.03).nitrate_n(3.5)),
        ])
        .filter("established"),
        scenario(
            "many new fish put the filter at risk",
            H,
            "C-04",
            c(24.0, 7.5, 1.5),
            Watch,
            Watch,
            &[A::CheckBiofilter, A::NitrifyingCulture],
            &[],
        )
        .events(vec![(1.0, EventKind::FishAdded { count: 40 })]),
        // ---- Cattail Bend tub room: standalone tubs, °F and US gallons, kit as NH4+,
        // well water at pH 7.9 without ammonia.
        scenario(
            "routine clear tub",
            T,
            "T-01",
            f(77.0, 7.5, 0.25, NH4),
            Clear,
            Clear,
            &[],
            &[A::WaterChange, A::HoldFeeding],
        ),
        // 78 °F, pH 7.0, 12 mg/L as NH4+ (9.32 TAN-N): NH3-N 0.055 (act); at 7.9: 0.42 (critical).
        scenario(
            "acid krib tub with no salt tolerance",
            T,
            "T-26",
            f(78.0, 7.0, 12.0, NH4),
            Act,
            Critical,
            &[A::WaterChange, A::Zeolite, A::HoldFeeding],
            &[A::AddSalt],
        )
        .warns(&[W::DoNotRaisePh]),
        // 80 °F, pH 8.0, 2 mg/L TAN-N: NH3-N 0.12 (act); mollies take 20 g/L.
        scenario(
            "molly tub gets salt, not zeolite",
            T,
            "T-13",
            f(80.0, 8.0, 2.0, AmmoniaBasis::N),
            Act,
            Act,
            &[A::AddSalt, A::LowerTemperature, A::WaterChange],
            &[A::Zeolite],
        ),
        // 77 °F, pH 7.6, 2 mg/L as NH4+ (1.553 TAN-N): NH3-N 0.034 (watch); at 7.9: 0.067 (act).
        scenario(
            "five-day-old guppy tub is cycling",
            T,
            "T-36",
            f(77.0, 7.6, 2.0, NH4),
            Watch,
            Act,
            &[A::NitrifyingCulture, A::WaterChange],
            &[A::AddSalt],
        )
        .history(vec![(1.0, f(77.0, 7.6, 0.5, NH4))]),
        scenario(
            "empty new tub with nitrite",
            T,
            "T-34",
            f(77.0, 7.6, 0.1, NH4).nitrite_n(0.8),
            Clear,
            Clear,
            &[A::AddChloride],
            &[A::WaterChange],
        ),
        scenario(
            "filter rinsed in tap water",
            T,
            "T-24",
            f(78.0, 7.8, 1.0, AmmoniaBasis::N),
            Watch,
            Watch,
            &[A::CheckBiofilter, A::NitrifyingCulture],
            &[],
        )
        .events(vec![(1.0, EventKind::FilterCleaned { rinsed_in_tap_water: true })])
        .filter("at risk"),
        // 82 °F, pH 8.4, 0.5 TAN-N: NH3-N 0.074 (act).
        scenario(
            "alkaline zebra tub",
            T,
            "T-17",
            f(82.0, 8.4, 0.5, AmmoniaBasis::N),
            Act,
            Act,
            &[A::WaterChange, A::LowerTemperature, A::AddSalt],
            &[A::Zeolite],
        ),
        scenario("krib too warm", T, "T-26", f(86.0, 7.0, 0.25, NH4), Clear, Clear, &[], &[A::WaterChange])
            .warns(&[W::TemperatureOutsideRange]),
        scenario(
            "a cloudy-eyed tub",
            T,
            "T-02",
            f(77.0, 7.5, 0.25, NH4).sign(Sign::CloudyEyes),
            Watch,
            Watch,
            &[A::CallVeterinarian, A::Isolate],
            &[A::RemoveDead],
        ),
        // ---- Saltmarsh marine holding: systems at ~33 g/L, kit as NH3, source pH 8.2.
        // 26 °C, pH 8.2, S 33, 0.1 mg/L as NH3: NH3-N 0.0059.
        scenario(
            "routine marine system tank",
            M,
            "S-01",
            water(Temperature::celsius(26.0), 8.2, 0.1, NH3),
            Clear,
            Clear,
            &[],
            &[A::WaterChange, A::Zeolite],
        ),
        // 1.0 mg/L as NH3 (0.822 TAN-N): NH3-N 0.0585 (act).
        scenario(
            "marine act: no zeolite, no salt",
            M,
            "S-01",
            water(Temperature::celsius(26.0), 8.2, 1.0, NH3),
            Act,
            Act,
            &[A::WaterChange, A::HoldFeeding, A::Aerate, A::LowerTemperature],
            &[A::Zeolite, A::AddSalt, A::AddChloride],
        ),
        // Cleaner edges 0.01 / 0.03 / 0.1: 0.3 as NH3 gives NH3-N 0.0176 (watch).
        scenario(
            "sensitive cleaner tank on species edges",
            M,
            "S-10",
            water(Temperature::celsius(26.0), 8.2, 0.3, NH3),
            Watch,
            Watch,
            &[A::WaterChange],
            &[A::Zeolite],
        ),
        // FISH-2 set up 29 days before: cycling. 0.5 as NH3 at pH 8.1, S 32.5: 0.0237 (watch).
        scenario(
            "new marine system cycling",
            M,
            "N-01",
            water(Temperature::celsius(26.0), 8.1, 0.5, NH3),
            Watch,
            Watch,
            &[A::NitrifyingCulture, A::WaterChange, A::HoldFeeding],
            &[A::Zeolite, A::AddSalt],
        )
        .filter("cycling"),
        scenario(
            "zeolite found in a marine filter",
            M,
            "S-02",
            water(Temperature::celsius(26.0), 8.2, 1.0, NH3),
            Act,
            Act,
            &[A::WaterChange],
            &[A::Zeolite],
        )
        .events(vec![(10.0, EventKind::ZeoliteAdded)])
        .warns(&[W::NoZeoliteInSaltWater]),
        scenario(
            "marine nitrite gets no chloride advice",
            M,
            "S-03",
            water(Temperature::celsius(26.0), 8.2, 0.1, NH3).nitrite_n(1.0),
            Clear,
            Clear,
            &[],
            &[A::AddChloride],
        ),
        // pH 7.8: NH3-N 0.0243 (watch); at the source's 8.2: 0.0585 (act).
        scenario(
            "low-pH marine tank with latent risk",
            M,
            "S-04",
            water(Temperature::celsius(26.0), 7.8, 1.0, NH3),
            Watch,
            Act,
            &[A::WaterChange],
            &[A::Zeolite],
        )
        .warns(&[W::DoNotRaisePh]),
        scenario(
            "marine deaths",
            M,
            "S-05",
            water(Temperature::celsius(26.0), 8.2, 0.1, NH3).deaths(1).sign(Sign::Gasping),
            Watch,
            Watch,
            &[A::RemoveDead, A::CallVeterinarian, A::Isolate],
            &[A::WaterChange],
        ),
    ]
}

#[test]
fn every_scenario() {
    let all = scenarios();
    assert!(all.len() >= 30, "{} scenarios", all.len());
    let mut failures = Vec::new();
    for s in &all {
        let a = run(s);
        let kinds: Vec<A> = a.actions.iter().map(|x| x.kind).collect();
        let warns: Vec<W> = a.warnings.iter().map(|w| w.kind).collect();
        let mut wrong = Vec::new();
        if a.band != Some(s.band) {
            wrong.push(format!("band {:?}, expected {:?}", a.band, s.band));
        }
        if a.latent.map(|l| l.band) != Some(s.latent) {
            wrong.push(format!("latent {:?}, expected {:?}", a.latent.map(|l| l.band), s.latent));
        }
        for k in s.must {
            if !kinds.contains(k) {
                wrong.push(format!("missing action {k:?}"));
            }
        }
        for k in s.must_not {
            if kinds.contains(k) {
                wrong.push(format!("unexpected action {k:?}"));
            }
        }
        if let Some(state) = s.biofilter
            && a.biofilter.name() != state
        {
            wrong.push(format!("biofilter {:?}, expected {state}", a.biofilter));
        }
        for w in s.warnings {
            if !warns.contains(w) {
                wrong.push(format!("missing warning {w:?}"));
            }
        }
        if !wrong.is_empty() {
            failures.push(format!(
                "{} ({}): {}\n  actions {kinds:?}\n  warnings {warns:?}",
                s.name,
                s.tank,
                wrong.join("; ")
            ));
        }
        assert_eq!(a.caution, tankwalk::CAUTION);
    }
    assert!(failures.is_empty(), "{} scenario(s) failed:\n{}", failures.len(), failures.join("\n"));
}

fn action(a: &Assessment, kind: A) -> &tankwalk::rules::Action {
    a.actions.iter().find(|x| x.kind == kind).unwrap_or_else(|| panic!("no {kind:?} in {:?}", a.actions))
}

#[test]
fn rack_tank_water_change_is_sized_for_the_whole_system() {
    // A-03 is on RACK-A, whose shared volume (tanks + sump) is 1780 L.
    let s = scenario("", H, "A-03", c(25.0, 7.8, 0.8), Watch, Watch, &[], &[]);
    let a = run(&s);
    assert_eq!(a.water_volume_l, 1780.0);
    let change = action(&a, A::WaterChange);
    let percent = change.quantity.unwrap();
    let litres = change.also.unwrap();
    assert_eq!(litres.unit, "L");
    assert!((litres.quantity - percent / 100.0 * 1780.0).abs() < 1.0, "{change:?}");
    assert!(change.reason.contains("RACK-A"), "{}", change.reason);
}

#[test]
fn mass_balance_by_hand() {
    // Hand computation for S-01 on FISH-1 (1350 L, 33 g/L, 26 °C, pH 8.2), kit
    // reading 1.0 mg/L as NH3 = 0.82244 mg TAN-N/L (IUPAC weights). Source water:
    // pH 8.2, no ammonia, 25 °C (room file). Target: 0.9 × watch edge = 0.018 mg NH3-N/L.
    //   pKa(26 °C, S 33) = 0.09018 + 2729.92/299.15 + (0.1552 − 0.000314·26)·I(33),
    //   I(33) = 19.9273·33/(1000 − 1.005109·33) = 0.68055 → pKa = 9.31552,
    //   f(pH 8.2) = 1/(1 + 10^1.11552) = 0.07117 → NH3-N now 0.05853.
    // Replacing x of the water: TAN 0.82244·(1 − x), temperature 26 − x (the source
    // is 1 °C cooler). x = 0.70 leaves TAN 0.24673 at 25.3 °C, f = 0.06646 →
    // NH3-N 0.01640 (< 0.018); x = 0.65 would leave 0.28785 at 25.35 °C → 0.01916.
    // More than 50 % → two changes: 1 − (1 − 0.70)^(1/2) = 0.452 → 45 % each
    // (5 % steps); equivalent 1 − 0.55² = 0.6975, TAN 0.24879, 25.30 °C.
    let s = scenario("", M, "S-01", water(Temperature::celsius(26.0), 8.2, 1.0, NH3), Act, Act, &[], &[]);
    let a = run(&s);
    let change = action(&a, A::WaterChange);
    assert_eq!(change.quantity, Some(45.0));
    let litres = change.also.unwrap();
    assert_eq!((litres.quantity, litres.unit), (608.0, "L")); // 0.45 × 1350 = 607.5 → 608
    assert_eq!(change.repeat, Some(2));
    assert!(change.reason.starts_with("2 changes of 45 %"), "{}", change.reason);
    assert!(change.reason.contains("0.82 → 0.25 mg/L TAN-N"), "{}", change.reason);
}

#[test]
fn salt_grams_follow_the_tub_volume() {
    // T-13: 150 US gal = 567.8 L, already run at 2 g/L (room file); mollies
    // tolerate 20 g/L, the salt step stops at 5 g/L: (5 − 2) g/L × 567.8 L =
    // 1703 g → 1700 g (amounts above 1 kg are rounded to 10 g).
    let s = scenario("", T, "T-13", f(80.0, 8.0, 2.0, AmmoniaBasis::N), Act, Act, &[], &[]);
    let a = run(&s);
    let salt = action(&a, A::AddSalt);
    assert_eq!((salt.quantity, salt.unit), (Some(1700.0), Some("g")));
    // Lowering by 2 °C from 80 °F (26.7 °C) in the tub room is shown in °F: 76 °F.
    let cool = action(&a, A::LowerTemperature);
    assert_eq!((cool.quantity, cool.unit), (Some(76.0), Some("°F")));
    // The water change is also given in the room's unit.
    assert_eq!(action(&a, A::WaterChange).also.unwrap().unit, "US gal");
}

#[test]
fn chloride_dose_by_hand() {
    // A-05 on RACK-A (1780 L): nitrite 0.5 mg/L NO2-N = 1.6422 mg/L NO2-.
    // SRAC 462: chloride ≥ 10 × nitrite → 16.42 mg/L; none measured, so all of it:
    // NaCl = 1.64852 × 16.422 mg/L × 1780 L = 48.19 g → 48 g.
    let s = scenario("", H, "A-05", c(25.0, 7.4, 0.25).nitrite_n(0.5), Clear, Clear, &[], &[]);
    let a = run(&s);
    let dose = action(&a, A::AddChloride);
    assert_eq!((dose.quantity, dose.unit), (Some(48.0), Some("g")));
}

#[test]
fn incomplete_reading_names_what_is_missing() {
    let facility = load(H);
    let tank = facility.tank("A-01").unwrap();
    let mut reading = Reading::new(Target::Tank("A-01".into()));
    reading.measurements.ph = Some(7.5);
    reading.observations.deaths = 1;
    let config = RulesConfig::default();
    let a = assess(&Inputs {
        facility: &facility,
        tank,
        reading: &reading,
        at: now(),
        history: &[],
        events: &[],
        config: &config,
    });
    assert_eq!(a.missing, vec!["temperature", "total ammonia"]);
    assert_eq!(a.band, None);
    assert!(a.actions.iter().any(|x| x.kind == A::RemoveDead));
    let _ = NaiveDate::MIN;
}

mod properties {
    use super::*;
    use proptest::prelude::*;

    fn signs() -> impl Strategy<Value = Vec<Sign>> {
        proptest::sample::subsequence(Sign::ALL.to_vec(), 0..=5)
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(200))]

        #[test]
        fn signs_never_lower_the_band(temp in 18.0..32.0f64, ph in 6.0..9.0f64, tan in 0.0..6.0f64, seen in signs(), deaths in 0u32..5) {
            let facility = load(H);
            let tank = facility.tank("C-07").unwrap();
            let plain = c(temp, ph, tan);
            let mut marked = plain.clone();
            for s in &seen { marked = marked.sign(*s); }
            marked = marked.deaths(deaths);
            let config = RulesConfig::default();
            let go = |r: &R| assess(&Inputs { facility: &facility, tank, reading: &r.0, at: now(), history: &[], events: &[], config: &config });
            let (a, b) = (go(&plain), go(&marked));
            prop_assert!(b.band >= a.band);
            if !seen.is_empty() || deaths > 0 {
                prop_assert_eq!(b.band, a.band.map(Band::raised));
            }
        }

        #[test]
        fn a_larger_change_never_leaves_more_ammonia(temp in 18.0..32.0f64, ph in 6.0..9.0f64, tan in 0.0..10.0f64, x in 0.0..90.0f64, dx in 0.0..10.0f64) {
            use tankwalk::core::sample::WaterSample;
            use tankwalk::rules::water_change::SourceWater;
            use tankwalk::rules::what_if::{WhatIf, apply};
            let sample = WaterSample { temp_c: temp, ph, tan_n_mg_l: tan, salinity_ppt: 0.0, do_mg_l: None };
            let source = SourceWater { tan_n_mg_l: 0.3, ph: Some(7.6), temp_c: Some(temp) };
            let small = apply(&sample, &source, &WhatIf { water_change_percent: Some(x), ..WhatIf::default() });
            let large = apply(&sample, &source, &WhatIf { water_change_percent: Some(x + dx), ..WhatIf::default() });
            if x > 0.0 && tan >= 0.3 {
                prop_assert!(large.tan_n_mg_l <= small.tan_n_mg_l + 1e-12);
            }
        }
    }
}

#[test]
fn heater_steps_suit_every_species_on_the_shared_water() {
    // RACK-A carries guppies (22–28 °C), platies (20–28), swordtails (22–28), mollies
    // (24–28) and, in A-12, bristlenose catfish (22–27): every species takes 24–27 °C
    // (room file, values from memory). At 26 °C the heater may go down to 24 °C, not to
    // the guppies' 22 °C, whichever tank the reading is from.
    let s = scenario("", H, "A-03", c(26.0, 8.0, 1.5), Act, Act, &[], &[]);
    let a = run(&s);
    let cool = action(&a, A::LowerTemperature);
    assert_eq!((cool.quantity, cool.unit), (Some(24.0), Some("°C")));
    // From above the shared range (28 °C, catfish to 27 °C), lowering by 2 °C is offered.
    let s = scenario("", H, "A-08", c(28.0, 8.2, 3.0), Critical, Critical, &[], &[]);
    assert_eq!(action(&run(&s), A::LowerTemperature).quantity, Some(26.0));
}
