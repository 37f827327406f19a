//! `tankwalk doctor`: check that the record database and the journal agree.

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use serde::Serialize;
use ulid::Ulid;

use tankwalk::model::record::DeviceId;
use tankwalk::store::repair::{self, Report};

use super::GlobalArgs;

#[derive(Debug, Args)]
pub struct DoctorArgs {
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

#[derive(Debug, Serialize)]
struct DoctorJson {
    data_dir: PathBuf,
    agrees: bool,
    problems: Vec<String>,
    journal: PathBuf,
    journal_records: usize,
    journal_device: Option<DeviceId>,
    database: PathBuf,
    database_opens: bool,
    database_records: usize,
    database_device: Option<DeviceId>,
    pending: Vec<Ulid>,
    advice: Option<&'static str>,
    /// Incoming versions of stored records set aside by import or sync.
    conflicts: Vec<ConflictJson>,
}

/// One version set aside because its id is stored with other content.
#[derive(Debug, Serialize)]
struct ConflictJson {
    id: Ulid,
    device: DeviceId,
    kind: &'static str,
    taken_at: chrono::DateTime<chrono::FixedOffset>,
    operator: String,
}

const REBUILD_ADVICE: &str = "run `tankwalk rebuild`: it recreates the database from the journal (and keeps any \
record only the database had); the old files are moved aside, nothing is deleted";

pub fn run(global: &GlobalArgs, args: &DoctorArgs) -> Result<ExitCode> {
    let dir = global.data_dir()?;
    let report = repair::examine(&dir)?;
    let problems = report.problems();
    let agrees = problems.is_empty();
    let advice = (!agrees).then_some(REBUILD_ADVICE);
    // Conflicts need a person's decision, not a repair: they do not change the exit code.
    let conflicts = tankwalk::exchange::conflicts::list(&dir)?;
    let mut out = std::io::stdout().lock();
    if args.json {
        let view = DoctorJson {
            data_dir: dir.clone(),
            agrees,
            problems,
            journal: report.journal.path.clone(),
            journal_records: report.journal.records,
            journal_device: report.journal.header.clone().and_then(Result::ok),
            database: report.database.path.clone(),
            database_opens: report.database.exists && report.database.open_error.is_none(),
            database_records: report.database.records,
            database_device: report.database.device,
            pending: report.pending.clone(),
            advice,
            conflicts: conflicts
                .iter()
                .map(|r| ConflictJson {
                    id: r.id,
                    device: r.device,
                    kind: r.body.kind_name(),
                    taken_at: r.taken_at,
                    operator: r.operator.clone(),
                })
                .collect(),
        };
        serde_json::to_writer_pretty(&mut out, &view)?;
        writeln!(out)?;
    } else {
        write_text(&mut out, &report, &problems, advice)?;
        write_conflicts(&mut out, &conflicts, &dir)?;
    }
    Ok(if agrees { ExitCode::SUCCESS } else { ExitCode::from(1) })
}

fn write_conflicts(
    out: &mut impl Write,
    conflicts: &[tankwalk::model::record::Record],
    dir: &std::path::Path,
) -> Result<()> {
    if conflicts.is_empty() {
        return Ok(());
    }
    let file = dir.join(tankwalk::exchange::conflicts::FILE_NAME);
    writeln!(
        out,
        "conflicts    {} incoming versions of stored records are set aside in {} (the stored versions are kept):",
        conflicts.len(),
        file.display()
    )?;
    for r in conflicts {
        writeln!(
            out,
            "  - record {} ({}, taken {}, by {}, device {})",
            r.id,
            r.body.kind_name(),
            r.taken_at.format("%Y-%m-%d %H:%M"),
            r.operator,
            r.device
        )?;
    }
    writeln!(
        out,
        "compare each with `tankwalk log --json`; when the set-aside version is the right one, enter it with `tankwalk correct`"
    )?;
    Ok(())
}

fn write_text(out: &mut impl Write, report: &Report, problems: &[String], advice: Option<&str>) -> Result<()> {
    let j = &report.journal;
    let d = &report.database;
    writeln!(out, "data folder  {}", report.dir.display())?;
    if j.exists {
        writeln!(out, "journal      {} records, {} bytes ({})", j.records, j.len, j.path.display())?;
    } else {
        writeln!(out, "journal      none yet ({})", j.path.display())?;
    }
    match (d.exists, &d.open_error) {
        (false, _) => writeln!(out, "database     none yet ({})", d.path.display())?,
        (true, Some(_)) => writeln!(out, "database     will not open ({})", d.path.display())?,
        (true, None) => writeln!(out, "database     {} records ({})", d.records, d.path.display())?,
    }
    if !report.pending.is_empty() {
        writeln!(
            out,
            "pending      {} saved records are in the journal only; the next command that opens the store applies them",
            report.pending.len()
        )?;
    }
    if problems.is_empty() {
        writeln!(out, "ok: the journal and the database agree")?;
    } else {
        writeln!(out, "problems:")?;
        for p in problems {
            writeln!(out, "  - {p}")?;
        }
    }
    if let Some(advice) = advice {
        writeln!(out, "{advice}")?;
    }
    Ok(())
}
