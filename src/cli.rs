//! The command line: argument definitions, dispatch and exit codes.
//!
//! Exit codes: 0 success; 1 the command ran and failed (or found problems);
//! 2 the command line or an input value was wrong, and nothing was done.

mod advice;
mod calc;
mod check_room;
mod correct;
mod doctor;
mod entry_view;
mod event;
mod export;
mod import;
mod input;
mod keymap;
mod log;
mod progress;
mod rebuild;
mod record;
mod report;
mod room;
mod screen;
mod skip;
mod sync;

use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// An input error: reported with exit code 2, and nothing was changed.
#[derive(Debug, thiserror::Error)]
#[error("{0}")]
pub struct BadInput(pub String);

/// Returns a [`BadInput`] error from a format string.
macro_rules! bad_input {
    ($($arg:tt)*) => { anyhow::Error::new($crate::cli::BadInput(format!($($arg)*))) };
}
pub(crate) use bad_input;

#[derive(Debug, Parser)]
#[command(
    name = "tankwalk",
    version,
    about = "Morning water checks for rooms of fish tanks: toxic ammonia, risk bands and what to do",
    long_about = "Morning water checks for rooms of fish tanks: toxic ammonia, risk bands and what to do.\n\nWithout a command, tankwalk opens the walk screen on the current room (--room, or the one used last). `tankwalk demo` tries it on a sample room in a throw-away store.",
    after_help = tankwalk::CAUTION
)]
struct Cli {
    #[command(flatten)]
    global: GlobalArgs,
    #[command(flatten)]
    keymap: keymap::KeymapOption,
    #[command(subcommand)]
    command: Option<Command>,
}

/// Options every command accepts.
#[derive(Debug, Clone, clap::Args)]
pub struct GlobalArgs {
    /// Facility file (TOML) of the room; otherwise the one used last.
    #[arg(long, global = true, env = "TANKWALK_ROOM", value_name = "FILE")]
    pub room: Option<std::path::PathBuf>,
    /// Folder of the record store; otherwise the platform's per-user data folder.
    #[arg(long, global = true, env = "TANKWALK_DATA", value_name = "DIR")]
    pub data_dir: Option<std::path::PathBuf>,
}

impl GlobalArgs {
    /// The data folder: `--data-dir`, `TANKWALK_DATA`, or the platform's per-user data folder.
    pub fn data_dir(&self) -> anyhow::Result<std::path::PathBuf> {
        match &self.data_dir {
            Some(dir) => Ok(dir.clone()),
            None => tankwalk::paths::default_data_dir().ok_or_else(|| {
                bad_input!("no per-user data folder is known on this system: give one with --data-dir or TANKWALK_DATA")
            }),
        }
    }
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Compute toxic (un-ionized) ammonia and its band for one reading.
    #[command(allow_negative_numbers = true)]
    Calc(calc::CalcArgs),
    /// Check a facility file: list every error with its line, or summarise the room.
    CheckRoom(check_room::CheckRoomArgs),
    /// Check a keymap file, or list the keys in use.
    Keymap(keymap::KeymapArgs),
    /// Open the screen on a sample room with a generated history, in a throw-away store.
    Demo(screen::DemoArgs),
    /// Save a reading of a tank or a system; prints its id, NH3 and band.
    Record(record::RecordArgs),
    /// Save something done to a tank or a system (water change, medication, ...).
    Event(event::EventArgs),
    /// Correct or withdraw a saved reading or event; the original is kept.
    Correct(correct::CorrectArgs),
    /// History, newest first, with NH3 and band computed on the fly.
    Log(log::LogArgs),
    /// Note that a tank or system was passed over on a round, and why.
    Skip(skip::SkipArgs),
    /// Check that the record database and its journal agree.
    Doctor(doctor::DoctorArgs),
    /// Recreate the record database from the journal (nothing is deleted).
    Rebuild(rebuild::RebuildArgs),
    /// The round report: who walked it, tanks to act on, trends and deaths, as text, Markdown, HTML or JSON.
    Report(report::ReportArgs),
    /// Write the records to a folder: JSON Lines (lossless) and CSV (for spreadsheets), with a manifest.
    Export(export::ExportArgs),
    /// Add the records of files exported on other laptops; each file is checked whole first.
    Import(import::ImportArgs),
    /// Send new records to a shared folder and take in the other laptops' records from it.
    Sync(sync::SyncArgs),
}

/// Opens the record store of the data folder, saying what opening repaired.
pub fn open_store(global: &GlobalArgs) -> anyhow::Result<tankwalk::store::SledStore> {
    let dir = global.data_dir()?;
    let store = tankwalk::store::SledStore::open(&dir)?;
    let opened = store.opened();
    if opened.caught_up > 0 {
        eprintln!(
            "tankwalk: note: applied {} saved records from the journal that the database lacked",
            opened.caught_up
        );
    }
    if let Some(aside) = &opened.set_aside {
        eprintln!(
            "tankwalk: note: the journal ended with an unfinished line (a save cut short, never confirmed); kept in {}",
            aside.display()
        );
    }
    Ok(store)
}

/// Parses the command line, runs it and maps the outcome to an exit code.
pub fn main() -> ExitCode {
    say_what_a_panic_means();
    if let Some(message) = non_utf8_argument(std::env::args_os()) {
        eprintln!("tankwalk: {message}");
        return ExitCode::from(2);
    }
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(err) => {
            // clap prints help/version to stdout (exit 0) and usage errors to stderr (exit 2).
            let _ = err.print();
            return ExitCode::from(if err.use_stderr() { 2 } else { 0 });
        }
    };
    match run(cli) {
        Ok(code) => code,
        // A reader that stops early (`tankwalk log | head`) is not a failure.
        Err(err) if is_broken_pipe(&err) => ExitCode::SUCCESS,
        Err(err) => {
            eprintln!("tankwalk: {err:#}");
            ExitCode::from(if err.downcast_ref::<BadInput>().is_some() { 2 } else { 1 })
        }
    }
}

/// After the usual panic message, says what it means for the records. The
/// screen's own hook (from `ratatui::try_init`, installed later) restores the
/// terminal first and then calls this one.
fn say_what_a_panic_means() {
    let default = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        default(info);
        eprintln!(
            "tankwalk: this is a bug in tankwalk; please report the message above. Every record that \
             tankwalk said was saved is on disk (`tankwalk doctor` checks); an entry not yet saved was lost."
        );
    }));
}

/// Names the first argument that is not UTF-8 text, by its option: clap
/// would only say that some argument is not.
fn non_utf8_argument(args: impl IntoIterator<Item = std::ffi::OsString>) -> Option<String> {
    let mut previous: Option<String> = None;
    for arg in args.into_iter().skip(1) {
        match arg.to_str() {
            Some(text) => previous = Some(text.to_string()),
            None => {
                let lossy = arg.to_string_lossy();
                let option = match lossy.split_once('=') {
                    Some((option, _)) if option.starts_with("--") => option.to_string(),
                    _ => previous.filter(|p| p.starts_with('-')).unwrap_or_else(|| "an argument".to_string()),
                };
                return Some(format!("{option}: '{lossy}' is not UTF-8 text (the bad bytes are shown as \u{fffd})"));
            }
        }
    }
    None
}

fn is_broken_pipe(err: &anyhow::Error) -> bool {
    err.chain().any(|cause| {
        let kind = cause
            .downcast_ref::<std::io::Error>()
            .map(std::io::Error::kind)
            .or_else(|| cause.downcast_ref::<serde_json::Error>().and_then(serde_json::Error::io_error_kind));
        kind == Some(std::io::ErrorKind::BrokenPipe)
    })
}

fn run(cli: Cli) -> anyhow::Result<ExitCode> {
    match cli.command {
        Some(Command::Calc(args)) => calc::run(&args, &cli.global),
        Some(Command::CheckRoom(args)) => check_room::run(&args),
        Some(Command::Keymap(args)) => keymap::run(&cli.global, &cli.keymap, &args),
        Some(Command::Demo(args)) => screen::demo(&cli.global, &cli.keymap, &args),
        Some(Command::Record(args)) => record::run(&cli.global, &args),
        Some(Command::Event(args)) => event::run(&cli.global, &args),
        Some(Command::Correct(args)) => correct::run(&cli.global, &args),
        Some(Command::Log(args)) => log::run(&cli.global, &args),
        Some(Command::Skip(args)) => skip::run(&cli.global, &args),
        Some(Command::Doctor(args)) => doctor::run(&cli.global, &args),
        Some(Command::Rebuild(args)) => rebuild::run(&cli.global, &args),
        Some(Command::Report(args)) => report::run(&cli.global, &args),
        Some(Command::Export(args)) => export::run(&cli.global, &args),
        Some(Command::Import(args)) => import::run(&cli.global, &args),
        Some(Command::Sync(args)) => sync::run(&cli.global, &args),
        None => screen::open(&cli.global, &cli.keymap),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    #[cfg(unix)]
    fn an_argument_that_is_not_utf8_is_named_by_its_option() {
        use std::ffi::OsString;
        use std::os::unix::ffi::OsStringExt;
        let args = |last: &[u8]| {
            ["tankwalk", "record", "--ph"].iter().map(OsString::from).chain([OsString::from_vec(last.to_vec())])
        };
        assert_eq!(non_utf8_argument(args(b"7.2")), None);
        let message = non_utf8_argument(args(b"\xb35")).unwrap();
        assert!(message.starts_with("--ph: '\u{fffd}5' is not UTF-8"), "{message}");
        let message = non_utf8_argument(args(b"--temp-c=\xb35")).unwrap();
        assert!(message.starts_with("--temp-c: "), "{message}");
    }

    #[test]
    fn command_line_definition_is_consistent() {
        use clap::CommandFactory;
        Cli::command().debug_assert();
    }
}
