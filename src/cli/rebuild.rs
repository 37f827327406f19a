//! `tankwalk rebuild`: recreate the record database from the journal.

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use serde::Serialize;
use ulid::Ulid;

use tankwalk::model::record::DeviceId;
use tankwalk::store::repair;

use super::GlobalArgs;

#[derive(Debug, Args)]
pub struct RebuildArgs {
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

#[derive(Debug, Serialize)]
struct RebuildJson {
    data_dir: PathBuf,
    records: usize,
    from_journal: usize,
    from_old_database: usize,
    device: Option<DeviceId>,
    database_moved_to: Option<PathBuf>,
    old_database_error: Option<String>,
    journal_moved_to: Option<PathBuf>,
    unreadable_journal_lines: Vec<u64>,
    conflicts: Vec<Ulid>,
}

pub fn run(global: &GlobalArgs, args: &RebuildArgs) -> Result<ExitCode> {
    let dir = global.data_dir()?;
    let done = repair::rebuild(&dir)?;
    let mut out = std::io::stdout().lock();
    if args.json {
        let view = RebuildJson {
            data_dir: dir,
            records: done.records,
            from_journal: done.from_journal,
            from_old_database: done.from_old_database,
            device: done.device,
            database_moved_to: done.database_moved_to.clone(),
            old_database_error: done.old_database_error.clone(),
            journal_moved_to: done.journal_moved_to.clone(),
            unreadable_journal_lines: done.bad_lines.iter().map(|b| b.number).collect(),
            conflicts: done.conflicts.clone(),
        };
        serde_json::to_writer_pretty(&mut out, &view)?;
        writeln!(out)?;
        return Ok(ExitCode::SUCCESS);
    }
    writeln!(out, "rebuilt the record database in {}: {} records", dir.display(), done.records)?;
    writeln!(out, "  {} from the journal", done.from_journal)?;
    if done.from_old_database > 0 {
        writeln!(out, "  {} only the old database had (now written to the journal too)", done.from_old_database)?;
    }
    if let Some(e) = &done.old_database_error {
        writeln!(out, "  the old database could not be read: {e}")?;
    }
    if let Some(moved) = &done.database_moved_to {
        writeln!(out, "  old database moved to {}", moved.display())?;
    }
    if let Some(moved) = &done.journal_moved_to {
        writeln!(out, "  old journal moved to {}; a clean journal replaces it", moved.display())?;
    }
    for bad in &done.bad_lines {
        writeln!(out, "  journal line {} could not be read and was left out: {}", bad.number, bad.message)?;
    }
    for id in &done.conflicts {
        writeln!(out, "  record {id} differed in the old database; the journal's version was kept")?;
    }
    writeln!(out, "nothing was deleted; remove the moved-aside folders yourself once you no longer need them")?;
    Ok(ExitCode::SUCCESS)
}
