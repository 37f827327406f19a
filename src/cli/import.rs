//! `tankwalk import`: records files from other laptops, each checked whole before any of it is saved.

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;

use tankwalk::exchange::{self, ConflictLog, ImportSummary};
use tankwalk::store::Store;

use super::GlobalArgs;
use super::progress::Bar;

#[derive(Debug, Args)]
pub struct ImportArgs {
    /// Records files (records.jsonl of an export, or a sync segment).
    #[arg(required = true, value_name = "FILE")]
    files: Vec<PathBuf>,
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &ImportArgs) -> Result<ExitCode> {
    let mut store = super::open_store(global)?;
    let conflicts = ConflictLog::in_data_dir(store.dir(), store.device());
    let mut bar = Bar::on_terminal();
    let summary = exchange::import(&mut store, &conflicts, &args.files, &mut |p| bar.update(p))?;
    bar.clear();
    drop(store);

    if args.json {
        let mut out = std::io::stdout().lock();
        serde_json::to_writer_pretty(&mut out, &summary)?;
        writeln!(out)?;
    } else {
        write_text(&summary, &conflicts)?;
    }
    Ok(exit_code(&summary))
}

/// 0 when every file was applied without conflict; 2 when every file was
/// refused (nothing was saved); 1 otherwise.
fn exit_code(summary: &ImportSummary) -> ExitCode {
    if summary.refused() == summary.files.len() {
        ExitCode::from(2)
    } else if summary.refused() > 0 || summary.conflicts() > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    }
}

fn write_text(summary: &ImportSummary, conflicts: &ConflictLog) -> Result<()> {
    let mut out = std::io::stdout().lock();
    let mut err = std::io::stderr().lock();
    for file in &summary.files {
        let path = file.path.display();
        match &file.result {
            Ok(applied) => {
                let checked = match &file.manifest {
                    Some(m) => format!(" (checksum checked against {})", m.display()),
                    None => String::new(),
                };
                writeln!(
                    out,
                    "{path}: {} records: {} added, {} already here{checked}",
                    applied.records,
                    applied.added,
                    applied.already + applied.repeated
                )?;
                for c in &applied.conflicts {
                    writeln!(err, "tankwalk: conflict: {c}")?;
                }
            }
            Err(problems) => {
                writeln!(err, "tankwalk: {path}: refused, nothing of it was saved:")?;
                for p in problems {
                    writeln!(err, "  {p}")?;
                }
            }
        }
        for w in &file.warnings {
            writeln!(err, "tankwalk: warning: {w}")?;
        }
    }
    if summary.conflicts() > 0 {
        writeln!(
            err,
            "tankwalk: {} conflicting versions are kept in {}; `tankwalk doctor` lists them, and `tankwalk correct` \
             enters the right value if the stored one is wrong",
            summary.conflicts(),
            conflicts.path().display()
        )?;
    }
    if summary.files.len() > 1 {
        writeln!(
            out,
            "{} records added from {} files; {} refused",
            summary.added(),
            summary.files.len(),
            summary.refused()
        )?;
    }
    Ok(())
}
