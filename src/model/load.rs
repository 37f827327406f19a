//! From text to a checked [`Facility`]: parse with spans, read each entry on
//! its own (so one bad tank does not hide the next), then validate.

use std::ops::Range;
use std::path::Path;

use chrono::NaiveDate;
use serde::de::DeserializeOwned;
use toml::Spanned;
use toml::de::{DeTable, DeValue, ValueDeserializer};

use super::facility::Facility;
use super::problem::{FacilityErrors, LoadError, Problem, Severity};
use super::raw::{RawRoom, RawSpecies, RawSystem, RawTank};
use super::validate;

/// A facility that loaded, with the warnings found on the way.
#[derive(Debug, Clone, PartialEq)]
pub struct Checked {
    /// The facility.
    pub facility: Facility,
    /// Things that do not stop the file from loading but deserve a look.
    pub warnings: Vec<Problem>,
}

impl Facility {
    /// Parses and validates the text of a facility file; `origin` names the
    /// file in messages. Returns every error found, not just the first.
    pub fn parse(text: &str, origin: &Path) -> Result<Facility, FacilityErrors> {
        Facility::check(text, origin, None).map(|checked| checked.facility)
    }

    /// Like [`Facility::parse`], and also returns warnings; with `today`, a
    /// set-up date after it is a warning.
    pub fn check(text: &str, origin: &Path, today: Option<NaiveDate>) -> Result<Checked, FacilityErrors> {
        let mut ctx = Context::new(text, origin);
        let raw = read_entries(text, &mut ctx);
        let facility = raw.and_then(|raw| validate::build(raw, today, &mut ctx));
        let (mut errors, mut warnings): (Vec<Problem>, Vec<Problem>) =
            ctx.problems.into_iter().partition(|p| p.severity == Severity::Error);
        errors.sort_by_key(|p| (p.line, p.column));
        warnings.sort_by_key(|p| (p.line, p.column));
        match facility {
            Some(facility) if errors.is_empty() => Ok(Checked { facility, warnings }),
            _ if errors.is_empty() => {
                // Validation refuses a facility only with an error; this is a safety net, not a path.
                let p = Locator::new(text, origin).problem(
                    0,
                    "",
                    "the file could not be read as a facility, and no specific problem was found; please report this"
                        .to_string(),
                    Severity::Error,
                );
                Err(FacilityErrors { errors: vec![p] })
            }
            _ => Err(FacilityErrors { errors }),
        }
    }

    /// Like [`Facility::check`], from the file's bytes: text that is not
    /// UTF-8 is refused at the line and column of its first bad byte.
    pub fn check_bytes(bytes: &[u8], origin: &Path, today: Option<NaiveDate>) -> Result<Checked, FacilityErrors> {
        match crate::text::decode(bytes) {
            Ok(text) => Facility::check(text, origin, today),
            Err(bad) => Err(FacilityErrors {
                errors: vec![Problem {
                    file: origin.to_path_buf(),
                    line: bad.line,
                    column: bad.column,
                    field: String::new(),
                    message: bad.to_string(),
                    severity: Severity::Error,
                }],
            }),
        }
    }

    /// Reads and parses a facility file.
    pub fn load(path: &Path) -> Result<Facility, LoadError> {
        Facility::load_checked(path, None).map(|checked| checked.facility)
    }

    /// Reads a facility file and checks it (see [`Facility::check`]).
    pub fn load_checked(path: &Path, today: Option<NaiveDate>) -> Result<Checked, LoadError> {
        let bytes = std::fs::read(path).map_err(|source| LoadError::Read { path: path.to_path_buf(), source })?;
        Facility::check_bytes(&bytes, path, today).map_err(LoadError::Invalid)
    }
}

/// Collects problems, located in one text.
pub(super) struct Context<'a> {
    locator: Locator<'a>,
    pub problems: Vec<Problem>,
}

impl<'a> Context<'a> {
    fn new(text: &'a str, file: &'a Path) -> Context<'a> {
        Context { locator: Locator::new(text, file), problems: Vec::new() }
    }

    /// Records an error at a span of the text.
    pub fn error(&mut self, span: &Range<usize>, field: &str, message: impl Into<String>) {
        let p = self.locator.problem(span.start, field, message.into(), Severity::Error);
        self.problems.push(p);
    }

    /// Records a warning at a span of the text.
    pub fn warn(&mut self, span: &Range<usize>, field: &str, message: impl Into<String>) {
        let p = self.locator.problem(span.start, field, message.into(), Severity::Warning);
        self.problems.push(p);
    }

    /// The number of errors so far.
    pub fn error_count(&self) -> usize {
        self.problems.iter().filter(|p| p.severity == Severity::Error).count()
    }

    /// Line of a span, for messages that point at another place.
    pub fn line_of(&self, span: &Range<usize>) -> usize {
        self.locator.line_column(span.start).0
    }
}

/// One entry of a list of tables, read.
pub(super) struct Entry<T> {
    /// Position in its list, from 0.
    pub index: usize,
    /// The entry's header (`[[tanks]]`) or its inline table.
    pub span: Range<usize>,
    pub raw: T,
}

/// Every entry of the file that could be read, and the ids of those that could not.
pub(super) struct RawFile {
    pub room: Option<Entry<RawRoom>>,
    pub species: Vec<Entry<RawSpecies>>,
    pub systems: Vec<Entry<RawSystem>>,
    pub tanks: Vec<Entry<RawTank>>,
    /// Lower-cased ids and keys of entries that could not be read: references to
    /// them are not reported again as unknown.
    pub unreadable: Vec<String>,
    /// Whether the file has a `[room]` at all (read or not).
    pub room_seen: bool,
    /// How many `[[tanks]]` entries the file has (read or not).
    pub tank_entries: usize,
    /// Length of the text, to point at its end.
    pub end: usize,
}

const TOP_LEVEL: [&str; 4] = ["room", "species", "systems", "tanks"];

/// Parses the text and reads each entry; `None` when the text is not TOML.
fn read_entries(text: &str, ctx: &mut Context) -> Option<RawFile> {
    let (doc, syntax) = DeTable::parse_recoverable(text);
    if !syntax.is_empty() {
        // After the first error on a line the parser's recovery guesses; one per line is what helps.
        let mut seen_lines = Vec::new();
        for e in syntax {
            let span = e.span().unwrap_or(0..0);
            let line = ctx.line_of(&span);
            if !seen_lines.contains(&line) {
                seen_lines.push(line);
                let mut message = format!("not valid TOML: {}", e.message());
                if e.message().starts_with("duplicate key") {
                    // The parser names no key; the text at the error is the key.
                    let key = text.get(span.clone()).unwrap_or("").trim();
                    if !key.is_empty() && key.len() <= 40 {
                        message = format!("not valid TOML: duplicate key '{key}'");
                    }
                    message.push_str(" (a key may appear once in each table)");
                }
                ctx.error(&span, "", message);
            }
        }
        return None;
    }
    let doc_span = doc.span();
    let doc = doc.into_inner();
    let mut file = RawFile {
        room: None,
        species: Vec::new(),
        systems: Vec::new(),
        tanks: Vec::new(),
        unreadable: Vec::new(),
        room_seen: false,
        tank_entries: 0,
        end: doc_span.end.max(text.len()),
    };
    for (key, value) in doc.iter() {
        let name: &str = key.get_ref();
        match name {
            "room" => {
                file.room_seen = true;
                if !value.get_ref().is_table() {
                    ctx.error(&key.span(), "room", "'room' must be a table: write it as [room] followed by its fields");
                    continue;
                }
                if let Some(raw) = read_one::<RawRoom>(value, "room", "[room]", ctx) {
                    file.room = Some(Entry { index: 0, span: key.span(), raw });
                }
            }
            "species" => read_list(value, &key.span(), "species", "key", ctx, &mut file.unreadable, &mut file.species),
            "systems" => read_list(value, &key.span(), "systems", "id", ctx, &mut file.unreadable, &mut file.systems),
            "tanks" => {
                file.tank_entries = value.get_ref().as_array().map_or(1, |a| a.len());
                read_list(value, &key.span(), "tanks", "id", ctx, &mut file.unreadable, &mut file.tanks);
            }
            other => {
                let mut message = format!("unknown section '{other}'");
                if let Some(near) = closest(other, &TOP_LEVEL) {
                    message.push_str(&format!(" (did you mean '{near}'?)"));
                }
                message.push_str("; a facility file has [room], [[species]], [[systems]] and [[tanks]]");
                ctx.error(&key.span(), other, message);
            }
        }
    }
    Some(file)
}

/// Reads every entry of a list of tables (`[[tanks]]`), each on its own.
fn read_list<T: DeserializeOwned>(
    value: &Spanned<DeValue<'_>>,
    key_span: &Range<usize>,
    list: &str,
    id_field: &str,
    ctx: &mut Context,
    unreadable: &mut Vec<String>,
    out: &mut Vec<Entry<T>>,
) {
    let single;
    let items: &[Spanned<DeValue>] = match value.get_ref() {
        DeValue::Array(items) => items,
        other => {
            ctx.error(key_span, list, format!("'{list}' must be a list of tables: write each entry as [[{list}]]"));
            if !other.is_table() {
                return;
            }
            // Read the one table anyway, so that what names it is not reported as unknown too.
            single = [value.clone()];
            &single
        }
    };
    for (index, item) in items.iter().enumerate() {
        let path = format!("{list}[{index}]");
        let subject = match item.get_ref().get(id_field).and_then(|v| v.get_ref().as_str()) {
            Some(id) => format!("{} '{id}'", singular(list)),
            None => format!("[[{list}]] entry {}", index + 1),
        };
        match read_one::<T>(item, &path, &subject, ctx) {
            Some(raw) => out.push(Entry { index, span: item.span(), raw }),
            None => {
                if let Some(id) = item.get_ref().get(id_field).and_then(|v| v.get_ref().as_str()) {
                    unreadable.push(id.to_ascii_lowercase());
                }
            }
        }
    }
}

/// The word for one entry of a list, in messages.
pub(super) fn singular(list: &str) -> &'static str {
    match list {
        "species" => "species",
        "systems" => "system",
        _ => "tank",
    }
}

/// Deserializes one table, reporting a failure at the field it concerns.
fn read_one<T: DeserializeOwned>(
    value: &Spanned<DeValue<'_>>,
    path: &str,
    subject: &str,
    ctx: &mut Context,
) -> Option<T> {
    match T::deserialize(ValueDeserializer::from(value.clone())) {
        Ok(raw) => Some(raw),
        Err(e) => {
            let span = e.span().unwrap_or_else(|| value.span());
            let field = field_at(value, span.start);
            let full = if field.is_empty() { path.to_string() } else { format!("{path}.{field}") };
            ctx.error(&span, &full, format!("{subject}: {}", humanize(e.message(), &field)));
            None
        }
    }
}

/// The dotted path of the deepest key whose key or value holds `offset`.
fn field_at(value: &Spanned<DeValue>, offset: usize) -> String {
    let mut path = String::new();
    let mut current = value;
    loop {
        let next = match current.get_ref() {
            DeValue::Table(table) => table.iter().find_map(|(k, v)| {
                let hit = k.span().contains(&offset) || v.span().contains(&offset);
                hit.then(|| (k.get_ref().to_string(), v))
            }),
            DeValue::Array(items) => {
                items.iter().enumerate().find(|(_, v)| v.span().contains(&offset)).map(|(i, v)| (format!("[{i}]"), v))
            }
            _ => None,
        };
        match next {
            Some((segment, v)) => {
                if !path.is_empty() && !segment.starts_with('[') {
                    path.push('.');
                }
                path.push_str(&segment);
                current = v;
            }
            None => return path,
        }
    }
}

/// Rewrites a deserializer message in the words of the facility format.
fn humanize(message: &str, field: &str) -> String {
    let field_name = field.rsplit('.').next().unwrap_or(field);
    if let Some(rest) = message.strip_prefix("unknown field `") {
        let (name, allowed) = rest.split_once('`').unwrap_or((rest, ""));
        let allowed: Vec<&str> = allowed.split('`').skip(1).step_by(2).collect();
        let mut out = format!("unknown field '{name}'");
        if let Some(near) = closest(name, &allowed) {
            out.push_str(&format!(" (did you mean '{near}'?)"));
        }
        if !allowed.is_empty() {
            out.push_str(&format!("; fields here: {}", allowed.join(", ")));
        }
        return out;
    }
    if let Some(rest) = message.strip_prefix("missing field `") {
        let name = rest.trim_end_matches('`');
        return match field_hint(name) {
            Some(hint) => format!("missing field '{name}' ({hint})"),
            None => format!("missing field '{name}'"),
        };
    }
    for prefix in ["invalid type: ", "invalid value: "] {
        if let Some(rest) = message.strip_prefix(prefix)
            && let Some((found, expected)) = rest.split_once(", expected ")
        {
            let subject = if field_name.is_empty() || field_name.starts_with('[') {
                "this value".to_string()
            } else {
                format!("'{field_name}'")
            };
            let expected = match field_name {
                "set_up" => "a date like 2024-03-11".to_string(),
                _ => expected_words(expected),
            };
            return format!("{subject} must be {expected}, not {}", found_words(found));
        }
    }
    message.to_string()
}

fn expected_words(expected: &str) -> String {
    match expected {
        "f64" => "a number".into(),
        "u32" => "a whole number, 0 or more".into(),
        "a string" => "text in quotes".into(),
        "a boolean" => "true or false".into(),
        "a sequence" => "a list in [ ]".into(),
        "a string or a list of strings" => "text in quotes or a list of them".into(),
        "a TOML datetime" => "a date like 2024-03-11".into(),
        other if other.starts_with("struct ") => "a table".into(),
        other => other.to_string(),
    }
}

fn found_words(found: &str) -> String {
    match found {
        "map" => "a table".into(),
        "sequence" => "a list".into(),
        other => other.replace('`', ""),
    }
}

/// What a required field holds, for "missing field" messages.
fn field_hint(name: &str) -> Option<&'static str> {
    Some(match name {
        "name" => "the name shown on screens and reports",
        "id" => "the label written on the glass or the sump, like B2-07",
        "key" => "the short name tanks use for this species, like guppy",
        "water_type" => "fresh, brackish or marine",
        "ph" => "the pH range kept, like [6.8, 7.8]",
        "set_up" => "the day the tank was filled, like 2024-03-11",
        "basis" => "nh3-n or nh3: how the edges are stated",
        "watch" | "act" | "critical" => "band edges need watch, act and critical",
        _ => return None,
    })
}

/// The closest of `candidates` to `word`, when it is close enough to be a typo.
pub(super) fn closest<'c>(word: &str, candidates: &[&'c str]) -> Option<&'c str> {
    let word = word.to_ascii_lowercase();
    candidates
        .iter()
        .map(|c| (strsim::damerau_levenshtein(&word, &c.to_ascii_lowercase()), *c))
        .filter(|(distance, c)| *distance <= c.len().div_ceil(3))
        .min_by_key(|(distance, _)| *distance)
        .map(|(_, c)| c)
}

/// Turns byte offsets of one text into 1-based lines and character columns.
pub(super) struct Locator<'a> {
    text: &'a str,
    file: &'a Path,
    line_starts: Vec<usize>,
}

impl<'a> Locator<'a> {
    fn new(text: &'a str, file: &'a Path) -> Locator<'a> {
        let line_starts = std::iter::once(0).chain(text.match_indices('\n').map(|(i, _)| i + 1)).collect();
        Locator { text, file, line_starts }
    }

    /// Line and column (both from 1) of a byte offset; offsets past the end
    /// land just after the last character.
    fn line_column(&self, offset: usize) -> (usize, usize) {
        let mut offset = offset.min(self.text.len());
        while !self.text.is_char_boundary(offset) {
            offset -= 1;
        }
        let line = self.line_starts.partition_point(|&start| start <= offset);
        let start = self.line_starts[line - 1];
        let column = self.text[start..offset].chars().count() + 1;
        (line, column)
    }

    /// A problem at a byte offset.
    fn problem(&self, offset: usize, field: &str, message: String, severity: Severity) -> Problem {
        let (line, column) = self.line_column(offset);
        Problem { file: self.file.to_path_buf(), line, column, field: field.to_string(), message, severity }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn offsets_become_lines_and_character_columns() {
        let text = "a = 1\nname = \"Bücher\"\n\nx";
        let loc = Locator::new(text, Path::new("f.toml"));
        assert_eq!(loc.line_column(0), (1, 1));
        assert_eq!(loc.line_column(4), (1, 5));
        assert_eq!(loc.line_column(6), (2, 1));
        // after the two-byte ü, the column counts characters
        let e = text.find("her").unwrap();
        assert_eq!(loc.line_column(e), (2, 12));
        assert_eq!(loc.line_column(text.len() - 1), (4, 1));
        assert_eq!(loc.line_column(text.len() + 10), (4, 2));
    }

    #[test]
    fn typos_find_their_field() {
        assert_eq!(closest("volum_l", &["id", "volume_l", "volume_gal"]), Some("volume_l"));
        assert_eq!(closest("speceis", &["species", "systems"]), Some("species"));
        assert_eq!(closest("colour", &["id", "volume_l"]), None);
    }

    #[test]
    fn deserializer_messages_read_as_advice() {
        assert_eq!(
            humanize("invalid type: string \"big\", expected f64", "volume_l"),
            "'volume_l' must be a number, not string \"big\""
        );
        assert_eq!(
            humanize("invalid value: integer `-3`, expected u32", "stock_count"),
            "'stock_count' must be a whole number, 0 or more, not integer -3"
        );
        assert_eq!(
            humanize("unknown field `volum_l`, expected one of `id`, `volume_l`", "volum_l"),
            "unknown field 'volum_l' (did you mean 'volume_l'?); fields here: id, volume_l"
        );
        assert_eq!(
            humanize("missing field `set_up`", ""),
            "missing field 'set_up' (the day the tank was filled, like 2024-03-11)"
        );
    }
}
