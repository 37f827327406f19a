//! Risk bands for un-ionized ammonia, and the one place the default edges live.
//!
//! Edges are compared on the NH3-N basis (mg NH3-N/L); both bases are shown to
//! the user. The default edges are a design decision of this project anchored
//! on published figures:
//!
//! | band     | from (mg NH3-N/L) | anchor |
//! |----------|-------------------|--------|
//! | clear    | 0                 | — |
//! | watch    | 0.02              | EIFAC (1970) long-term limit 0.025 mg NH3/L, EIFAC Tech. Pap. 11 (value from memory) |
//! | act      | 0.05              | UF/IFAS FA-16 (Francis-Floyd & Watson 1990, rev. 1996): 0.05 mg/L un-ionized ammonia as N "may harm fish" |
//! | critical | 0.2               | design decision: within a few-fold of acute LC50s of sensitive species (from memory) |
//!
//! A species profile may override the edges.

use serde::{Deserialize, Serialize};
use std::fmt;

use super::units::NH3_PER_N;

/// How bad the un-ionized ammonia is for the fish in a tank.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Band {
    /// Below the long-term safe level.
    Clear,
    /// Above the long-term level: look again soon, find the cause.
    Watch,
    /// Harmful with exposure: act today.
    Act,
    /// Dangerous now: act immediately.
    Critical,
}

impl Band {
    /// All bands from best to worst.
    pub const ALL: [Band; 4] = [Band::Clear, Band::Watch, Band::Act, Band::Critical];

    /// Lower-case name used in output and files.
    pub fn name(self) -> &'static str {
        match self {
            Band::Clear => "clear",
            Band::Watch => "watch",
            Band::Act => "act",
            Band::Critical => "critical",
        }
    }

    /// A glyph that carries the band without colour: more ink, more danger.
    pub fn glyph(self) -> &'static str {
        match self {
            Band::Clear => "·",
            Band::Watch => "○",
            Band::Act => "◆",
            Band::Critical => "▲",
        }
    }

    /// Plain-ASCII form of [`Band::glyph`], for terminals and files that need it.
    pub fn ascii_glyph(self) -> char {
        match self {
            Band::Clear => '.',
            Band::Watch => 'o',
            Band::Act => '*',
            Band::Critical => '!',
        }
    }

    /// One band worse, saturating at critical.
    pub fn raised(self) -> Band {
        match self {
            Band::Clear => Band::Watch,
            Band::Watch => Band::Act,
            Band::Act | Band::Critical => Band::Critical,
        }
    }
}

impl fmt::Display for Band {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl std::str::FromStr for Band {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Band::ALL
            .into_iter()
            .find(|b| b.name().eq_ignore_ascii_case(s.trim()))
            .ok_or_else(|| format!("'{s}' is not a band (clear, watch, act, critical)"))
    }
}

/// The lower edges of the watch, act and critical bands, in mg NH3-N/L.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct BandEdges {
    /// NH3-N at and above which the band is `watch`.
    pub watch: f64,
    /// NH3-N at and above which the band is `act`.
    pub act: f64,
    /// NH3-N at and above which the band is `critical`.
    pub critical: f64,
}

impl BandEdges {
    /// The project's default edges (see the module documentation for sources).
    pub const DEFAULT: BandEdges = BandEdges { watch: 0.02, act: 0.05, critical: 0.2 };

    /// Edges given on the NH3 basis (mg NH3/L), converted to NH3-N.
    pub fn from_nh3(watch: f64, act: f64, critical: f64) -> BandEdges {
        BandEdges { watch: watch / NH3_PER_N, act: act / NH3_PER_N, critical: critical / NH3_PER_N }
    }

    /// True when the edges are positive and strictly increasing.
    pub fn is_ordered(&self) -> bool {
        self.watch > 0.0 && self.watch < self.act && self.act < self.critical && self.critical.is_finite()
    }

    /// The band of an NH3-N concentration (mg NH3-N/L).
    #[inline]
    pub fn classify(&self, nh3_n_mg_l: f64) -> Band {
        if nh3_n_mg_l >= self.critical {
            Band::Critical
        } else if nh3_n_mg_l >= self.act {
            Band::Act
        } else if nh3_n_mg_l >= self.watch {
            Band::Watch
        } else {
            Band::Clear
        }
    }

    /// The lower edge of `band` in mg NH3-N/L (0 for clear).
    pub fn lower_edge(&self, band: Band) -> f64 {
        match band {
            Band::Clear => 0.0,
            Band::Watch => self.watch,
            Band::Act => self.act,
            Band::Critical => self.critical,
        }
    }
}

impl Default for BandEdges {
    fn default() -> Self {
        BandEdges::DEFAULT
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn default_edges_classify_at_their_boundaries() {
        let e = BandEdges::DEFAULT;
        assert_eq!(e.classify(0.0), Band::Clear);
        assert_eq!(e.classify(0.0199), Band::Clear);
        assert_eq!(e.classify(0.02), Band::Watch);
        assert_eq!(e.classify(0.05), Band::Act);
        assert_eq!(e.classify(0.2), Band::Critical);
        assert!(e.is_ordered());
    }

    #[test]
    fn nh3_basis_edges_match_the_reference_table() {
        // water-chemistry reference §5 decision table: 0.024 / 0.061 / 0.243 mg NH3/L.
        let e = BandEdges::from_nh3(0.02 * NH3_PER_N, 0.05 * NH3_PER_N, 0.2 * NH3_PER_N);
        assert!((e.act - 0.05).abs() < 1e-15);
        assert!((0.05 * NH3_PER_N - 0.061).abs() < 5e-4);
    }

    #[test]
    fn raising_saturates_and_names_parse() {
        assert_eq!(Band::Critical.raised(), Band::Critical);
        for b in Band::ALL {
            assert_eq!(b.name().parse::<Band>(), Ok(b));
            assert!(b.raised() >= b);
        }
    }
}
