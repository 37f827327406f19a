//! Printing an assessment for people (text) and for scripts (JSON fields):
//! shared by `calc`, `record` and `log`.

use std::io::{self, Write};

use tankwalk::numfmt::sig;
use tankwalk::rules::latent::LatentBasis;
use tankwalk::rules::{Action, Assessment};

/// Where a latent pH comes from, in words.
pub fn latent_basis(basis: LatentBasis) -> &'static str {
    match basis {
        LatentBasis::SourceWater => "the room's source water",
        LatentBasis::LastWaterChange => "the water of the last change",
        LatentBasis::DefaultStep => "source pH unknown: pH + 0.5",
    }
}

/// One action as a line: title, quantities, reason.
pub fn action_line(action: &Action) -> String {
    let mut amount = String::new();
    if let (Some(q), Some(unit)) = (action.quantity, action.unit) {
        amount = format!(" {} {unit}", sig_trim(q));
        if let Some(also) = action.also {
            amount.push_str(&format!(" · {} {}", sig_trim(also.quantity), also.unit));
        }
        if let Some(times) = action.repeat {
            amount.push_str(&format!(" ×{times}"));
        }
    }
    format!("{}{amount}: {}", action.kind.title(), action.reason)
}

/// A quantity without trailing zeros ("608", "0.5", "76").
fn sig_trim(x: f64) -> String {
    if (x - x.round()).abs() < 1e-9 { format!("{x:.0}") } else { sig(x, 3) }
}

/// Writes the parts of an assessment that go after the figures: band raise,
/// latent risk, trend, biofilter, actions and warnings.
pub fn write_text(w: &mut dyn Write, a: &Assessment) -> io::Result<()> {
    let row = |w: &mut dyn Write, label: &str, value: String| writeln!(w, "  {label:<18} {value}");
    if let (Some(band), false) = (a.band, a.raised_by.is_empty()) {
        row(w, "raised to", format!("{} {band}  (fish: {})", band.glyph(), a.raised_by.join(", ")))?;
    }
    if let Some(l) = &a.latent {
        row(
            w,
            "if pH rose",
            format!(
                "to {:.1} ({}): {} mg/L NH3-N {} {}",
                l.ph,
                latent_basis(l.basis),
                sig(l.nh3_n_mg_l, 3),
                l.band.glyph(),
                l.band
            ),
        )?;
    }
    if let Some(t) = &a.trend {
        row(
            w,
            "trend",
            format!(
                "{} {} {:+} mg/L NH3-N a day over {} readings",
                t.direction.arrow(),
                t.direction.name(),
                sig(t.rate_per_day, 2),
                t.readings
            ),
        )?;
    }
    row(w, "biofilter", a.biofilter.describe())?;
    if !a.missing.is_empty() {
        row(w, "missing", format!("{} (needed for the NH3 figure)", a.missing.join(", ")))?;
    }
    if a.actions.is_empty() {
        writeln!(w, "Nothing to do beyond the usual care.")?;
    } else {
        writeln!(w, "Do now:")?;
        for (i, action) in a.actions.iter().enumerate() {
            writeln!(w, "  {}. {}", i + 1, action_line(action))?;
        }
    }
    if !a.warnings.is_empty() {
        writeln!(w, "Do not:")?;
        for warning in &a.warnings {
            writeln!(w, "  - {}", warning.message)?;
        }
    }
    Ok(())
}
