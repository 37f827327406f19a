//! `tankwalk keymap check FILE` and `tankwalk keymap show`, and loading the
//! keymap the screen uses: the built-in one with the person's own file merged
//! over it (`--keymap FILE`, else `keymap.toml` in the data folder).

use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context as _;
use clap::{Args, Subcommand};
use serde::Serialize;
use tankwalk::tui::help::{self, HelpRow};
use tankwalk::tui::keymap::{Context, DEFAULT_KEYMAP_ORIGIN, Keymap, keymap_text};

use super::{GlobalArgs, bad_input};

/// The name of a person's own keymap in the data folder.
pub const USER_KEYMAP_FILE: &str = "keymap.toml";

/// Options of the commands that use a keymap.
#[derive(Debug, Clone, Args)]
pub struct KeymapOption {
    /// Key bindings (TOML) merged over the built-in keys; otherwise `keymap.toml`
    /// in the data folder when it exists.
    #[arg(long, global = true, env = "TANKWALK_KEYMAP", value_name = "FILE")]
    pub keymap: Option<PathBuf>,
}

/// `tankwalk keymap ...`
#[derive(Debug, Args)]
pub struct KeymapArgs {
    #[command(subcommand)]
    command: KeymapCommand,
}

#[derive(Debug, Subcommand)]
enum KeymapCommand {
    /// Check a keymap file: every mistake with its line (exit 1 when there are any).
    Check {
        /// The keymap file (TOML), as it would be merged over the built-in keys.
        file: PathBuf,
    },
    /// List the keys in use: the built-in keys with your own file merged over them.
    Show {
        /// Only this screen, with the global keys it inherits (global, board, walk,
        /// tank, whatif, summary, pick, prompt, confirm).
        #[arg(long, value_name = "CONTEXT", value_parser = parse_context)]
        context: Option<Context>,
        /// Print JSON: an array of {context, action, keys, doc}.
        #[arg(long)]
        json: bool,
    },
}

fn parse_context(text: &str) -> Result<Context, String> {
    text.parse()
}

/// The keymap in use and the files it came from, in merge order.
#[derive(Debug)]
pub struct LoadedKeymap {
    /// The merged keymap.
    pub keymap: Keymap,
    /// The built-in keymap, then the person's file when there is one.
    pub sources: Vec<String>,
}

/// Loads the built-in keymap with the person's file merged over it. A file
/// that is named but missing, unreadable or wrong stops with every mistake
/// (exit 2); it is never skipped silently.
pub fn load(global: &GlobalArgs, option: &KeymapOption) -> anyhow::Result<LoadedKeymap> {
    let user_file = match &option.keymap {
        Some(path) => Some(path.clone()),
        None => match global.data_dir() {
            Ok(dir) => Some(dir.join(USER_KEYMAP_FILE)).filter(|path| path.exists()),
            // No data folder: the built-in keys are all there is.
            Err(_) => None,
        },
    };
    let mut sources = vec![DEFAULT_KEYMAP_ORIGIN.to_string()];
    let keymap = match user_file {
        None => Keymap::default_map(),
        Some(path) => {
            let keymap = read_over_default(&path)?;
            sources.push(path.display().to_string());
            keymap
        }
    };
    Ok(LoadedKeymap { keymap, sources })
}

fn read_over_default(path: &Path) -> anyhow::Result<Keymap> {
    let bytes = std::fs::read(path).map_err(|err| bad_input!("cannot read the keymap '{}': {err}", path.display()))?;
    let origin = path.display().to_string();
    keymap_text(&bytes, &origin)
        .and_then(|text| Keymap::default_with_overrides(text, &origin))
        .map_err(|errors| bad_input!("the keymap has mistakes (fix them, or move the file away):\n{errors}"))
}

/// Runs `tankwalk keymap ...`.
pub fn run(global: &GlobalArgs, option: &KeymapOption, args: &KeymapArgs) -> anyhow::Result<ExitCode> {
    match &args.command {
        KeymapCommand::Check { file } => check(file),
        KeymapCommand::Show { context, json } => show(global, option, *context, *json),
    }
}

fn check(file: &Path) -> anyhow::Result<ExitCode> {
    let bytes = std::fs::read(file).map_err(|err| bad_input!("cannot read the keymap '{}': {err}", file.display()))?;
    let origin = file.display().to_string();
    match keymap_text(&bytes, &origin).and_then(|text| Keymap::default_with_overrides(text, &origin).map(|k| (k, text)))
    {
        Ok((keymap, text)) => {
            let own = Keymap::from_toml(text, &origin)
                .map(|own| Context::ALL.iter().map(|c| own.own(*c).count()).sum::<usize>())
                .unwrap_or(0);
            let total: usize = Context::ALL.iter().map(|c| keymap.own(*c).count()).sum();
            println!(
                "{}: fine ({own} binding{} of its own; {total} in all with the built-in keys)",
                file.display(),
                if own == 1 { "" } else { "s" }
            );
            Ok(ExitCode::SUCCESS)
        }
        Err(errors) => {
            for error in &errors.0 {
                eprintln!("{error}");
            }
            let n = errors.0.len();
            eprintln!("{n} mistake{} in {}", if n == 1 { "" } else { "s" }, file.display());
            Ok(ExitCode::from(1))
        }
    }
}

#[derive(Serialize)]
struct JsonRow<'a> {
    context: &'static str,
    action: &'static str,
    keys: Vec<String>,
    doc: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    inherited_from: Option<&'a str>,
}

fn show(global: &GlobalArgs, option: &KeymapOption, only: Option<Context>, json: bool) -> anyhow::Result<ExitCode> {
    let loaded = load(global, option)?;
    let keymap = &loaded.keymap;
    let sections: Vec<(Context, Vec<HelpRow>)> = match only {
        Some(context) => vec![(context, help::help_rows(keymap, context))],
        None => Context::ALL.iter().map(|&c| (c, help::own_rows(keymap, c))).collect(),
    };
    if json {
        let mut rows = Vec::new();
        for (context, section) in &sections {
            for row in section {
                let own = keymap.own(*context).any(|b| b.action == row.action);
                rows.push(JsonRow {
                    context: context.name(),
                    action: row.action.name(),
                    keys: row.chords.iter().map(ToString::to_string).collect(),
                    doc: row.doc(),
                    inherited_from: (!own).then_some("global"),
                });
            }
        }
        let mut text = serde_json::to_string_pretty(&rows).context("writing JSON")?;
        text.push('\n');
        return write_stdout(&text);
    }
    let mut out = String::new();
    let _ = writeln!(out, "Keys in use: {}", loaded.sources.join(", then "));
    for (context, rows) in sections {
        out.push('\n');
        let inherits = if only.is_some() && context.inherits_global() { " (with the global keys)" } else { "" };
        let _ = writeln!(out, "[{}] {}{inherits}", context.name(), context.title());
        let mut lines: Vec<(String, &str, &str)> =
            rows.iter().map(|row| (row.keys(), row.action.name(), row.doc())).collect();
        if let Some((keys, doc)) = help::text_input_note(context) {
            lines.insert(0, (keys.to_string(), "", doc));
        }
        let key_width = lines.iter().map(|(k, _, _)| k.chars().count()).max().unwrap_or(0);
        let name_width = lines.iter().map(|(_, n, _)| n.len()).max().unwrap_or(0);
        for (keys, name, doc) in lines {
            let _ = writeln!(out, "  {keys:<key_width$}  {name:<name_width$}  {doc}");
        }
    }
    write_stdout(&out)
}

/// Writes `text` to standard output; a reader that went away (`| head`) is not an error.
fn write_stdout(text: &str) -> anyhow::Result<ExitCode> {
    use std::io::Write as _;
    let mut stdout = std::io::stdout().lock();
    match stdout.write_all(text.as_bytes()).and_then(|()| stdout.flush()) {
        Err(err) if err.kind() != std::io::ErrorKind::BrokenPipe => Err(err).context("writing to standard output"),
        _ => Ok(ExitCode::SUCCESS),
    }
}
