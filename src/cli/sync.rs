//! `tankwalk sync`: exchange records with the other laptops through a shared folder.

use std::io::Write;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::Result;
use clap::Args;

use tankwalk::exchange::{self, SyncSummary};

use super::export::count;
use super::progress::Bar;
use super::{GlobalArgs, bad_input};

/// The data folder's file that remembers the shared folder (for the screen's sync key too).
pub const SYNC_FOLDER_FILE: &str = "sync-folder";

#[derive(Debug, Args)]
pub struct SyncArgs {
    /// The shared folder (network share, synced folder or USB stick) every laptop syncs with;
    /// remembered, so later syncs (and the board's sync key) can leave it out.
    #[arg(value_name = "DIR")]
    folder: Option<PathBuf>,
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &SyncArgs) -> Result<ExitCode> {
    let folder = match &args.folder {
        Some(given) => std::path::absolute(given).map_err(|e| bad_input!("{}: {e}", given.display()))?,
        None => super::room::recall(global, SYNC_FOLDER_FILE)?.ok_or_else(|| {
            bad_input!("no shared folder given: run `tankwalk sync DIR` once, and tankwalk remembers it")
        })?,
    };
    let mut store = super::open_store(global)?;
    let mut bar = Bar::on_terminal();
    let summary = exchange::sync(&mut store, &folder, &mut |p| bar.update(p))?;
    bar.clear();
    drop(store);
    if args.folder.is_some()
        && let Err(err) = super::room::remember(global, SYNC_FOLDER_FILE, &folder)
    {
        eprintln!("tankwalk: warning: could not remember the shared folder for next time: {err:#}");
    }

    if args.json {
        let mut out = std::io::stdout().lock();
        serde_json::to_writer_pretty(&mut out, &summary)?;
        writeln!(out)?;
    } else {
        write_text(&summary)?;
    }
    let troubled = summary.conflicts() > 0 || summary.left.iter().any(|l| !l.incomplete);
    Ok(if troubled { ExitCode::from(1) } else { ExitCode::SUCCESS })
}

fn write_text(s: &SyncSummary) -> Result<()> {
    let mut out = std::io::stdout().lock();
    let mut err = std::io::stderr().lock();
    match &s.sent {
        Some(sent) => writeln!(out, "sent {} ({})", count(sent.records, "record"), sent.path.display())?,
        None => writeln!(out, "nothing new to send")?,
    }
    let records: usize = s.received.iter().map(|r| r.records).sum();
    if s.received.is_empty() {
        writeln!(out, "nothing new to receive")?;
    } else {
        let laptops = s.devices_received_from().len();
        writeln!(
            out,
            "received {} from {} ({}): {} new, {} already here",
            count(records as u64, "record"),
            count(laptops as u64, "laptop"),
            count(s.received.len() as u64, "segment"),
            s.added(),
            records - s.added() - s.conflicts()
        )?;
    }
    for r in &s.received {
        for c in &r.conflicts {
            writeln!(err, "tankwalk: conflict: {c}")?;
        }
    }
    for left in &s.left {
        for reason in &left.reasons {
            if left.incomplete {
                writeln!(out, "waiting: {reason}")?;
            } else {
                writeln!(err, "tankwalk: left for the next run, damaged: {reason}")?;
            }
        }
    }
    for note in &s.notes {
        writeln!(err, "tankwalk: note: {note}")?;
    }
    writeln!(out, "this laptop's folder: {}", s.folder.join(s.device.to_string()).display())?;
    Ok(())
}
