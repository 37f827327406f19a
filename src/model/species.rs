//! Species profiles: what water the animals in a tank need, and the NH3 edges
//! their risk bands use.

use std::fmt;

use serde::{Deserialize, Serialize};

use super::id::Id;
use crate::core::band::BandEdges;

/// The kind of water a species lives in, or a system or tank holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum WaterType {
    /// Fresh water (a little added salt, a few g/L, is still fresh).
    Fresh,
    /// Brackish water, between fresh and sea water.
    Brackish,
    /// Sea water, or artificial sea water.
    Marine,
}

impl WaterType {
    /// All water types, freshest first.
    pub const ALL: [WaterType; 3] = [WaterType::Fresh, WaterType::Brackish, WaterType::Marine];

    /// The name used in files and output.
    pub fn name(self) -> &'static str {
        match self {
            WaterType::Fresh => "fresh",
            WaterType::Brackish => "brackish",
            WaterType::Marine => "marine",
        }
    }
}

impl fmt::Display for WaterType {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl std::str::FromStr for WaterType {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        WaterType::ALL
            .into_iter()
            .find(|w| w.name().eq_ignore_ascii_case(s.trim()))
            .ok_or_else(|| format!("'{s}' is not a water type (fresh, brackish, marine)"))
    }
}

/// A closed range of acceptable values, `min <= max`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bounds {
    /// Lowest acceptable value.
    pub min: f64,
    /// Highest acceptable value.
    pub max: f64,
}

impl Bounds {
    /// A range from `min` to `max`.
    pub const fn new(min: f64, max: f64) -> Bounds {
        Bounds { min, max }
    }

    /// True when `value` lies within the range, ends included.
    pub fn contains(&self, value: f64) -> bool {
        self.min <= value && value <= self.max
    }

    /// The values both ranges accept, or `None` when they do not overlap.
    pub fn intersect(&self, other: &Bounds) -> Option<Bounds> {
        let b = Bounds { min: self.min.max(other.min), max: self.max.min(other.max) };
        (b.min <= b.max).then_some(b)
    }
}

/// What one species needs: the water it lives in and how much NH3 it bears.
///
/// Band edges are on the NH3-N basis (mg NH3-N/L), like [`BandEdges`]; the file
/// may state them as NH3-N or as NH3 (see `docs/facility-format.md`).
#[derive(Debug, Clone, PartialEq)]
pub struct SpeciesProfile {
    /// The key tanks use to name this species (`guppy`).
    pub key: Id,
    /// Display name, common and scientific (`Guppy (Poecilia reticulata)`).
    pub name: String,
    /// The water the species lives in.
    pub water_type: WaterType,
    /// Temperature range the species is kept at, °C.
    pub temp_c: Bounds,
    /// pH range the species is kept at.
    pub ph: Bounds,
    /// The most salt the species tolerates, g/L; 0 means none.
    pub salt_tolerance_g_l: f64,
    /// NH3-N edges of the watch, act and critical bands; `None` uses [`BandEdges::DEFAULT`].
    pub band_edges: Option<BandEdges>,
    /// Free notes (sources, husbandry).
    pub notes: String,
}

impl SpeciesProfile {
    /// The band edges to use: the profile's own or the project's defaults.
    pub fn edges(&self) -> BandEdges {
        self.band_edges.unwrap_or(BandEdges::DEFAULT)
    }
}

/// Where the band edges of an [`EffectiveProfile`] come from.
#[derive(Debug, Clone, PartialEq)]
pub enum EdgesOrigin {
    /// No species in the tank states edges: the project's defaults.
    Default,
    /// One species' profile.
    Species(Id),
    /// The lowest of several species' edges (and the defaults, for any species without).
    LowestOf(Vec<Id>),
}

impl fmt::Display for EdgesOrigin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            EdgesOrigin::Default => f.write_str("tankwalk defaults"),
            EdgesOrigin::Species(key) => write!(f, "species profile '{key}'"),
            EdgesOrigin::LowestOf(keys) => {
                let keys: Vec<&str> = keys.iter().map(Id::as_str).collect();
                write!(f, "lowest of {}", keys.join(", "))
            }
        }
    }
}

/// The needs of everything living in one tank, combined.
///
/// For a mixed tank the most demanding species sets each limit: the lowest of
/// each band edge (a species without edges counts with the defaults), the
/// intersection of the temperature and pH ranges, and the lowest salt
/// tolerance. An empty tank (cycling, waiting for stock) has no ranges and the
/// default edges.
#[derive(Debug, Clone, PartialEq)]
pub struct EffectiveProfile {
    /// Keys of the species in the tank, as listed.
    pub species: Vec<Id>,
    /// Temperature every species accepts, °C; `None` for an empty tank.
    pub temp_c: Option<Bounds>,
    /// pH every species accepts; `None` for an empty tank.
    pub ph: Option<Bounds>,
    /// The lowest salt tolerance, g/L; `None` for an empty tank.
    pub salt_tolerance_g_l: Option<f64>,
    /// The band edges to classify NH3-N with, mg NH3-N/L.
    pub band_edges: BandEdges,
    /// Where the band edges come from, for display.
    pub edges_origin: EdgesOrigin,
}

impl EffectiveProfile {
    /// Combines the profiles of the species in one tank (most demanding wins).
    ///
    /// Ranges that do not overlap give `None`; a loaded facility never has such
    /// a tank, because validation refuses it.
    pub fn combine(profiles: &[&SpeciesProfile]) -> EffectiveProfile {
        let species: Vec<Id> = profiles.iter().map(|p| p.key.clone()).collect();
        let mut temp_c: Option<Bounds> = None;
        let mut ph: Option<Bounds> = None;
        let mut salt: Option<f64> = None;
        for (i, p) in profiles.iter().enumerate() {
            if i == 0 {
                temp_c = Some(p.temp_c);
                ph = Some(p.ph);
            } else {
                temp_c = temp_c.and_then(|t| t.intersect(&p.temp_c));
                ph = ph.and_then(|r| r.intersect(&p.ph));
            }
            salt = Some(salt.map_or(p.salt_tolerance_g_l, |s| s.min(p.salt_tolerance_g_l)));
        }
        let band_edges = profiles.iter().map(|p| p.edges()).reduce(|a, b| BandEdges {
            watch: a.watch.min(b.watch),
            act: a.act.min(b.act),
            critical: a.critical.min(b.critical),
        });
        let stating: Vec<Id> = profiles.iter().filter(|p| p.band_edges.is_some()).map(|p| p.key.clone()).collect();
        let edges_origin = match (stating.len(), profiles.len()) {
            (0, _) => EdgesOrigin::Default,
            (1, 1) => EdgesOrigin::Species(stating[0].clone()),
            _ => EdgesOrigin::LowestOf(species.clone()),
        };
        EffectiveProfile {
            species,
            temp_c,
            ph,
            salt_tolerance_g_l: salt,
            band_edges: band_edges.unwrap_or(BandEdges::DEFAULT),
            edges_origin,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn profile(key: &str, temp: (f64, f64), ph: (f64, f64), salt: f64, edges: Option<BandEdges>) -> SpeciesProfile {
        SpeciesProfile {
            key: Id::new(key).unwrap(),
            name: key.to_string(),
            water_type: WaterType::Fresh,
            temp_c: Bounds::new(temp.0, temp.1),
            ph: Bounds::new(ph.0, ph.1),
            salt_tolerance_g_l: salt,
            band_edges: edges,
            notes: String::new(),
        }
    }

    #[test]
    fn mixed_tank_takes_the_most_demanding_limits() {
        let hardy =
            profile("hardy", (20.0, 30.0), (6.5, 8.5), 5.0, Some(BandEdges { watch: 0.03, act: 0.08, critical: 0.3 }));
        let fussy = profile("fussy", (24.0, 28.0), (6.0, 7.5), 0.0, None);
        let e = EffectiveProfile::combine(&[&hardy, &fussy]);
        assert_eq!(e.temp_c, Some(Bounds::new(24.0, 28.0)));
        assert_eq!(e.ph, Some(Bounds::new(6.5, 7.5)));
        assert_eq!(e.salt_tolerance_g_l, Some(0.0));
        // fussy has no edges, so it counts with the defaults, which are lower.
        assert_eq!(e.band_edges, BandEdges::DEFAULT);
        assert_eq!(e.edges_origin.to_string(), "lowest of hardy, fussy");
        assert!(e.band_edges.is_ordered());
    }

    #[test]
    fn lowest_edges_are_taken_edge_by_edge() {
        let a = profile("a", (20.0, 30.0), (6.0, 8.0), 0.0, Some(BandEdges { watch: 0.01, act: 0.08, critical: 0.3 }));
        let b = profile("b", (20.0, 30.0), (6.0, 8.0), 0.0, Some(BandEdges { watch: 0.02, act: 0.04, critical: 0.5 }));
        let e = EffectiveProfile::combine(&[&a, &b]);
        assert_eq!(e.band_edges, BandEdges { watch: 0.01, act: 0.04, critical: 0.3 });
        assert!(e.band_edges.is_ordered());
    }

    #[test]
    fn single_and_empty_tanks() {
        let a = profile("a", (22.0, 26.0), (6.0, 7.0), 1.0, Some(BandEdges { watch: 0.01, act: 0.03, critical: 0.1 }));
        let e = EffectiveProfile::combine(&[&a]);
        assert_eq!(e.edges_origin, EdgesOrigin::Species(a.key.clone()));
        assert_eq!(e.temp_c, Some(a.temp_c));
        let none = EffectiveProfile::combine(&[]);
        assert_eq!(none.band_edges, BandEdges::DEFAULT);
        assert_eq!(none.edges_origin, EdgesOrigin::Default);
        assert_eq!(none.temp_c, None);
    }

    #[test]
    fn ranges_that_do_not_meet_have_no_intersection() {
        assert_eq!(Bounds::new(20.0, 24.0).intersect(&Bounds::new(25.0, 28.0)), None);
        assert_eq!(Bounds::new(20.0, 25.0).intersect(&Bounds::new(25.0, 28.0)), Some(Bounds::new(25.0, 25.0)));
    }
}
