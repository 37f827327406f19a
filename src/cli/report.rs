//! `tankwalk report`: the round report for a lead, an owner or a vet, as
//! text, Markdown, one self-contained HTML file with charts, or JSON.

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, Result};
use chrono::{DateTime, Duration, FixedOffset, NaiveDate};
use clap::Args;

use tankwalk::report::{self, DEFAULT_PERIOD_DAYS, Format, Request, Selection};

use super::input::{self, Bound};
use super::room::resolve_room;
use super::{GlobalArgs, bad_input};

#[derive(Debug, Args)]
pub struct ReportArgs {
    /// The round of this day (2026-12-01, today, yesterday): the round that starts at its local
    /// midnight, with the 14 days up to its end charted. Without --date or --since: the round under
    /// way (since local midnight, or since the start of the room's block of the day) up to now.
    #[arg(long, value_name = "DATE", conflicts_with_all = ["since", "until"])]
    date: Option<String>,
    /// Report on a period from this time (2026-11-01, 2026-11-01T07:00, RFC 3339, or an age: 30d);
    /// the round shown is the last one of the period.
    #[arg(long, value_name = "WHEN")]
    since: Option<String>,
    /// End of the period (a date means its whole day) [default: now].
    #[arg(long, value_name = "WHEN")]
    until: Option<String>,
    /// Only the tanks of this system (shared water).
    #[arg(long, value_name = "ID", conflicts_with = "tank")]
    system: Option<String>,
    /// Only this tank (its own readings and its system's).
    #[arg(long, value_name = "ID")]
    tank: Option<String>,
    /// text, markdown, html or json [default: from the --out file's extension, else text].
    #[arg(long, value_name = "FORMAT")]
    format: Option<Format>,
    /// Write the report to this file (replaced whole, never left half-written) instead of printing it.
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
}

/// A day given to `--date`: a calendar date, `today` or `yesterday`.
fn is_day(text: &str) -> bool {
    let t = text.trim();
    NaiveDate::parse_from_str(t, "%Y-%m-%d").is_ok()
        || ["today", "yesterday"].contains(&t.to_ascii_lowercase().as_str())
}

/// Writes the HTML report of the round under way into `dir` (created when
/// missing) as `round-YYYYMMDD-HHMM.html`; returns the file. The round
/// summary screen calls this.
pub fn write_round_report(
    store: &tankwalk::store::SledStore,
    facility: &tankwalk::model::Facility,
    dir: &std::path::Path,
    now: DateTime<FixedOffset>,
) -> Result<String> {
    let request = Request::round_ending(facility, now, Selection::Room);
    let report = report::from_store(store, facility, &request)?;
    std::fs::create_dir_all(dir).with_context(|| format!("cannot create {}", dir.display()))?;
    let path = dir.join(format!("round-{}.html", now.format("%Y%m%d-%H%M")));
    report::write_atomically(&path, Format::Html.render(&report).as_bytes())
        .with_context(|| format!("cannot write {}", path.display()))?;
    Ok(path.display().to_string())
}

pub fn run(global: &GlobalArgs, args: &ReportArgs) -> Result<ExitCode> {
    // Everything is parsed and checked before the store is opened.
    let now = input::now_local();
    let when = |option: &str, text: &str, bound: Bound| -> Result<DateTime<FixedOffset>> {
        input::parse_when(text, now, bound).map_err(|e| bad_input!("{option}: {e}"))
    };
    let format = match (args.format, &args.out) {
        (Some(format), _) => format,
        (None, Some(path)) => Format::from_extension(path).unwrap_or(Format::Text),
        (None, None) => Format::Text,
    };
    let (_, facility) = resolve_room(global)?;
    let selection = match (&args.tank, &args.system) {
        (Some(tank), _) => Selection::Tank(tank.clone()),
        (None, Some(system)) => Selection::System(system.clone()),
        (None, None) => Selection::Room,
    };
    let selection = report::check_selection(&facility, &selection).map_err(|e| {
        let option = if args.tank.is_some() { "--tank" } else { "--system" };
        bad_input!("{option}: {e}")
    })?;
    let mut request = if let Some(date) = &args.date {
        if !is_day(date) {
            return Err(bad_input!("--date: '{date}' is not a day (use 2026-12-01, today or yesterday)"));
        }
        Request::day(&facility, when("--date", date, Bound::Start)?, selection)
    } else if args.since.is_some() || args.until.is_some() {
        let until = match &args.until {
            Some(text) => when("--until", text, Bound::End)?,
            None => now,
        };
        let since = match &args.since {
            Some(text) => when("--since", text, Bound::Start)?,
            None => until - Duration::days(DEFAULT_PERIOD_DAYS),
        };
        if since > until {
            return Err(bad_input!("--since is after --until"));
        }
        Request::period(&facility, since, until, selection)
    } else {
        Request::round_ending(&facility, now, selection)
    };
    request.generated_at = now;
    if let Some(path) = &args.out
        && path.is_dir()
    {
        return Err(bad_input!("--out: {} is a folder; give a file name such as round.html", path.display()));
    }

    let store = super::open_store(global)?;
    let report = report::from_store(&store, &facility, &request)?;
    drop(store);
    let rendered = format.render(&report);

    match &args.out {
        Some(path) => {
            report::write_atomically(path, rendered.as_bytes())
                .with_context(|| format!("cannot write the report to {}", path.display()))?;
            println!(
                "report written to {} ({format}, {} kB): {}",
                path.display(),
                rendered.len().div_ceil(1024),
                report::headline(&report)
            );
        }
        None => {
            let mut stdout = std::io::stdout().lock();
            stdout.write_all(rendered.as_bytes())?;
            stdout.flush()?;
        }
    }
    Ok(ExitCode::SUCCESS)
}
