//! The screen from the command line: `tankwalk` opens the board of the
//! current room on the data folder's store; `tankwalk demo` opens a sample
//! room with a generated history in a throw-away store.
//!
//! Everything that can be refused (no terminal, no room, a bad keymap, the
//! data folder in use) is checked before the screen starts.

use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context as _;
use chrono::{DateTime, FixedOffset};
use clap::{Args, ValueEnum};
use tankwalk::exchange::{self, ExportOptions, Formats};
use tankwalk::model::facility::Facility;
use tankwalk::model::record::Record;
use tankwalk::store::{SledStore, Store};
use tankwalk::tui::run::{self, Records};
use tankwalk::tui::state::{App, SessionInfo};
use tankwalk::tui::terminal;
use ulid::Ulid;

use super::keymap::{self, KeymapOption};
use super::{GlobalArgs, bad_input};

/// The bundled sample rooms, embedded so the demo runs from anywhere.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Sample {
    /// A wholesale holding room: four racks of twelve tanks and four quarantine tanks.
    Harbourside,
    /// A breeder's room of forty standalone tubs.
    Cattail,
    /// A small marine holding room on two systems.
    Saltmarsh,
}

impl Sample {
    fn file(self) -> (&'static str, &'static str) {
        match self {
            Sample::Harbourside => {
                ("sample-rooms/harbourside-holding.toml", include_str!("../../sample-rooms/harbourside-holding.toml"))
            }
            Sample::Cattail => {
                ("sample-rooms/cattail-bend-tubs.toml", include_str!("../../sample-rooms/cattail-bend-tubs.toml"))
            }
            Sample::Saltmarsh => {
                ("sample-rooms/saltmarsh-marine.toml", include_str!("../../sample-rooms/saltmarsh-marine.toml"))
            }
        }
    }
}

/// `tankwalk demo`
#[derive(Debug, Args)]
pub struct DemoArgs {
    /// The sample room to open (`--room FILE` opens your own instead).
    #[arg(long, value_enum, default_value_t = Sample::Harbourside)]
    sample: Sample,
    /// Days of generated history before today.
    #[arg(long, default_value_t = 60, value_parser = clap::value_parser!(u32).range(1..=3650))]
    days: u32,
    /// Keep the demo's store in this folder (new or empty) instead of a throw-away one.
    #[arg(long, value_name = "DIR")]
    keep: Option<PathBuf>,
}

/// The time now, with the local offset.
fn now() -> DateTime<FixedOffset> {
    chrono::Local::now().fixed_offset()
}

/// Who is walking: TANKWALK_OPERATOR, else the login name.
fn operator() -> String {
    ["TANKWALK_OPERATOR", "USER", "LOGNAME", "USERNAME"]
        .iter()
        .find_map(|v| std::env::var(v).ok().map(|n| n.trim().to_string()).filter(|n| !n.is_empty()))
        .unwrap_or_else(|| "unnamed".to_string())
}

/// Saves go to the store (durable when `append` returns); exports go to the
/// data folder's `exports/`, round reports to its `reports/`.
struct StoreRecords {
    store: SledStore,
    facility: Facility,
    exports: PathBuf,
    reports: PathBuf,
    data_dir: PathBuf,
    saved: usize,
    saves: usize,
    /// Fault injection for the tests: panic at this save (see [`PANIC_ON_SAVE`]).
    panic_on_save: Option<usize>,
}

/// Makes the screen panic at the Nth save (1 = the first), while the terminal
/// is in raw mode on the alternate screen: the tests use it to check that a
/// panic leaves the terminal usable and loses no earlier save.
pub const PANIC_ON_SAVE: &str = "TANKWALK_TEST_PANIC_ON_SAVE";

impl Records for StoreRecords {
    fn save(&mut self, records: &[Record]) -> Result<(), String> {
        self.saves += 1;
        if self.panic_on_save == Some(self.saves) {
            panic!("fault injected by {PANIC_ON_SAVE} at save {}", self.saves);
        }
        self.store.append(records).map(|_| self.saved += records.len()).map_err(|e| e.to_string())
    }

    fn export(&mut self) -> Result<String, String> {
        export_folder(&self.store, &self.exports, &self.facility).map_err(|e| format!("{e:#}"))
    }

    fn report(&mut self) -> Result<String, String> {
        super::report::write_round_report(&self.store, &self.facility, &self.reports, now())
            .map_err(|e| format!("{e:#}"))
    }

    fn sync(&mut self) -> Result<(String, Vec<Record>), String> {
        let folder = super::room::recall_in(&self.data_dir, super::sync::SYNC_FOLDER_FILE)
            .map_err(|e| format!("{e:#}"))?
            .ok_or("no shared folder yet: run `tankwalk sync DIR` once in a terminal, and tankwalk remembers it")?;
        let summary =
            exchange::sync(&mut self.store, &folder, &mut exchange::no_progress).map_err(|e| e.to_string())?;
        let records = run::records_to_show(&self.store, now()).map_err(|e| format!("{e:#}"))?;
        let sent = summary.sent.as_ref().map_or(0, |s| s.records);
        let mut said = format!("sent {sent}, received {} new", summary.added());
        if summary.conflicts() > 0 {
            said.push_str(&format!(", {} in conflict (see `tankwalk doctor`)", summary.conflicts()));
        }
        if !summary.left.is_empty() {
            said.push_str(&format!(", {} segment(s) left for the next sync", summary.left.len()));
        }
        Ok((said, records))
    }
}

/// Exports every record with [`tankwalk::exchange::export`] (the same code as
/// `tankwalk export`) to a new folder in `dir` named by the time:
/// `records.jsonl`, `readings.csv` with the room's species edges, `manifest.json`.
fn export_folder(store: &SledStore, dir: &Path, facility: &Facility) -> anyhow::Result<String> {
    let folder = dir.join(now().format("%Y%m%d-%H%M%S").to_string());
    let options = ExportOptions { formats: Formats::Both, since: None, room: Some(facility), room_file: None };
    let summary = exchange::export(store, &folder, &options, &mut exchange::no_progress)
        .with_context(|| format!("exporting to {}", folder.display()))?;
    Ok(format!("{} ({} records, {} reading rows)", folder.display(), summary.records, summary.rows))
}

fn run_screen(
    facility: Facility,
    store: SledStore,
    data_dir: &Path,
    keymap: &tankwalk::tui::Keymap,
) -> anyhow::Result<usize> {
    let started = now();
    let records = run::records_to_show(&store, started)?;
    let session = SessionInfo { operator: operator(), device: store.device(), id_seed: Ulid::generate().random() };
    let exported_room = facility.clone();
    let mut app = App::new(facility, records, session, started);
    app.colour = terminal::colour_wanted();
    let panic_on_save = std::env::var(PANIC_ON_SAVE).ok().and_then(|n| n.trim().parse().ok());
    let mut records = StoreRecords {
        store,
        facility: exported_room,
        exports: data_dir.join("exports"),
        reports: data_dir.join("reports"),
        data_dir: data_dir.to_path_buf(),
        saved: 0,
        saves: 0,
        panic_on_save,
    };
    run::run(&mut app, keymap, &mut records, &now)?;
    Ok(records.saved)
}

/// `tankwalk` with no subcommand: the board of the current room.
pub fn open(global: &GlobalArgs, keymap_option: &KeymapOption) -> anyhow::Result<ExitCode> {
    terminal::check_terminal()?;
    let (_, facility) = super::room::resolve_room(global)?;
    let keymap = keymap::load(global, keymap_option)?.keymap;
    let data_dir = global.data_dir()?;
    let store = super::open_store(global)?;
    let saved = run_screen(facility, store, &data_dir, &keymap)?;
    println!(
        "tankwalk: {saved} record{} saved this session, in {}",
        if saved == 1 { "" } else { "s" },
        data_dir.display()
    );
    Ok(ExitCode::SUCCESS)
}

/// `tankwalk demo`: a sample room with a generated history, in a throw-away store.
pub fn demo(global: &GlobalArgs, keymap_option: &KeymapOption, args: &DemoArgs) -> anyhow::Result<ExitCode> {
    terminal::check_terminal()?;
    let facility = match &global.room {
        Some(path) => Facility::load(path).map_err(|e| bad_input!("{e}"))?,
        None => {
            let (name, text) = args.sample.file();
            Facility::parse(text, Path::new(name))
                .map_err(|e| anyhow::anyhow!("the bundled {name} does not load: {e}"))?
        }
    };
    let keymap = keymap::load(global, keymap_option)?.keymap;
    let (dir, throw_away) = match &args.keep {
        Some(dir) => {
            if dir.exists() && std::fs::read_dir(dir).map(|mut d| d.next().is_some()).unwrap_or(true) {
                return Err(bad_input!("--keep {}: give a new or empty folder", dir.display()));
            }
            (dir.clone(), false)
        }
        None => {
            let dir = std::env::temp_dir().join(format!("tankwalk-demo-{}-{}", std::process::id(), Ulid::generate()));
            (dir, true)
        }
    };
    std::fs::create_dir_all(&dir).with_context(|| format!("creating {}", dir.display()))?;
    let result = (|| {
        let mut store = SledStore::open(&dir)?;
        let history = tankwalk::demo::history(&facility, store.device(), now(), args.days, 2026);
        for batch in history.chunks(5_000) {
            store.append(batch)?;
        }
        run_screen(facility, store, &dir, &keymap)
    })();
    if throw_away {
        let _ = std::fs::remove_dir_all(&dir);
        println!("tankwalk: the demo's throw-away store is gone; `tankwalk demo --keep DIR` keeps one");
    } else {
        println!("tankwalk: the demo's store is in {} (open it with --data-dir)", dir.display());
    }
    result.map(|_| ExitCode::SUCCESS)
}
