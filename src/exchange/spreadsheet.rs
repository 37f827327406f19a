//! The readings CSV: one row a reading for a spreadsheet.
//!
//! Canonical units (°C, mg TAN-N/L, ...), with NH3 and its band derived the
//! same way the rest of tankwalk does ([`sample::derive`]) against the tank's
//! species edges when the room is known, else the defaults, and a column that
//! says which. RFC 4180 through the `csv` crate (CRLF line ends, quotes where
//! needed), UTF-8 with a byte-order mark so that spreadsheets read accents
//! right.
//!
//! A spreadsheet runs a cell that starts with `=`, `+`, `-`, `@`, a tab, a
//! carriage return or a line feed as a formula (OWASP, "CSV Injection"). Every
//! text cell that starts so gets a leading `'`, which spreadsheets show as
//! text; number cells are never touched, so a negative number stays a number.

use std::borrow::Cow;
use std::collections::HashMap;
use std::io::Write;

use ulid::Ulid;

use crate::core::band::BandEdges;
use crate::core::sample;
use crate::model::facility::Facility;
use crate::model::record::{Reading, Record, Target};
use crate::model::species::{EdgesOrigin, EffectiveProfile};

/// The first column's name (also how a CSV export is recognised).
pub const FIRST_COLUMN: &str = "id";

/// The columns, in order.
pub const COLUMNS: [&str; 29] = [
    FIRST_COLUMN,
    "taken_at",
    "local_date",
    "local_time",
    "tank",
    "system",
    "operator",
    "device",
    "temp_c",
    "ph",
    "tan_n_mg_l",
    "nh3_n_mg_l",
    "nh3_mg_l",
    "nh3_fraction",
    "band",
    "band_edges",
    "nh3_salinity_ppt",
    "nh3_salinity_from",
    "nitrite_n_mg_l",
    "nitrate_n_mg_l",
    "salinity_ppt",
    "do_mg_l",
    "chloride_mg_l",
    "alkalinity_mg_l_caco3",
    "signs",
    "deaths",
    "note",
    "corrected",
    "current_id",
];

/// Characters that make a spreadsheet read a cell as a formula when they come
/// first (OWASP "CSV Injection", with line feed and NUL from later revisions).
pub const FORMULA_TRIGGERS: [char; 8] = ['=', '+', '-', '@', '\t', '\r', '\n', '\0'];

/// A text cell made safe to open: prefixed with `'` when it starts with a
/// [`FORMULA_TRIGGERS`] character.
pub fn neutralise(text: &str) -> Cow<'_, str> {
    match text.chars().next() {
        Some(c) if FORMULA_TRIGGERS.contains(&c) => Cow::Owned(format!("'{text}")),
        _ => Cow::Borrowed(text),
    }
}

/// One cell of a row.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    /// Text: neutralised when written.
    Text(String),
    /// A number, written in the shortest form that reads back exactly.
    Number(f64),
    /// A count.
    Count(u64),
    /// Nothing (not measured).
    Empty,
}

impl Cell {
    /// The cell as written in the file.
    pub fn render(&self) -> Cow<'_, str> {
        match self {
            Cell::Text(t) => neutralise(t),
            Cell::Number(x) => Cow::Owned(x.to_string()),
            Cell::Count(n) => Cow::Owned(n.to_string()),
            Cell::Empty => Cow::Borrowed(""),
        }
    }

    fn text(s: impl Into<String>) -> Cell {
        Cell::Text(s.into())
    }

    fn number(x: Option<f64>) -> Cell {
        x.map_or(Cell::Empty, Cell::Number)
    }
}

/// What the room says about one target: the band edges, the salinity it is
/// run at and its system.
#[derive(Debug, Clone, PartialEq)]
pub struct TargetContext {
    /// Edges to classify NH3-N with.
    pub edges: BandEdges,
    /// Where they come from, as written in the `band_edges` column.
    pub edges_source: String,
    /// The salinity the tank or system is run at, g/L, when the room says.
    pub salinity_g_l: Option<f64>,
    /// The tank's system, when on one.
    pub system: Option<String>,
}

/// Looks targets up in the room, when one is known (cached: a room has few targets).
#[derive(Debug)]
pub struct RoomContext<'a> {
    facility: Option<&'a Facility>,
    cache: HashMap<Target, TargetContext>,
}

impl<'a> RoomContext<'a> {
    /// Context from `facility`, or the defaults for everything without one.
    pub fn new(facility: Option<&'a Facility>) -> RoomContext<'a> {
        RoomContext { facility, cache: HashMap::new() }
    }

    /// True when the defaults are used for every reading (no room).
    pub fn has_room(&self) -> bool {
        self.facility.is_some()
    }

    /// The context of `target`.
    pub fn of(&mut self, target: &Target) -> &TargetContext {
        let facility = self.facility;
        self.cache.entry(target.clone()).or_insert_with(|| context_of(facility, target))
    }
}

fn defaults(why: &str) -> TargetContext {
    TargetContext {
        edges: BandEdges::DEFAULT,
        edges_source: format!("{} ({why})", EdgesOrigin::Default),
        salinity_g_l: None,
        system: None,
    }
}

fn context_of(facility: Option<&Facility>, target: &Target) -> TargetContext {
    let Some(facility) = facility else { return defaults("no room given") };
    match target {
        Target::Tank(id) => match facility.tank(id) {
            Some(tank) => {
                let profile = facility.effective_profile(tank);
                TargetContext {
                    edges: profile.band_edges,
                    edges_source: profile.edges_origin.to_string(),
                    salinity_g_l: Some(facility.salinity_g_l(tank)),
                    system: facility.system_of(tank).map(|s| s.id.as_str().to_string()),
                }
            }
            None => defaults(&format!("tank {id} is not in the room file")),
        },
        Target::System(id) => match facility.system(id) {
            Some(system) => {
                // Water shared by several tanks: the most demanding species on it sets the edges.
                let profiles: Vec<_> =
                    facility.tanks_on(system).into_iter().flat_map(|t| facility.species_of(t)).collect();
                let profile = EffectiveProfile::combine(&profiles);
                TargetContext {
                    edges: profile.band_edges,
                    edges_source: profile.edges_origin.to_string(),
                    salinity_g_l: Some(system.salinity_g_l),
                    system: Some(system.id.as_str().to_string()),
                }
            }
            None => defaults(&format!("system {id} is not in the room file")),
        },
    }
}

/// The row of a reading. `original` is the record as first saved (its id, time,
/// who and where from); `reading` the current value; `current_id` the record
/// holding it.
pub fn reading_row(
    room: &mut RoomContext<'_>,
    original: &Record,
    reading: &Reading,
    current_id: Ulid,
    corrected: bool,
) -> Vec<Cell> {
    let context = room.of(&reading.target).clone();
    let m = &reading.measurements;
    let measured_salinity = m.salinity_ppt();
    let salinity_from = match (measured_salinity, context.salinity_g_l) {
        (Some(_), _) => "measured",
        (None, Some(_)) => "room file",
        (None, None) => "assumed fresh",
    };
    // The one water-sample rule: measured salinity, else the room's, else fresh water.
    let sample = m.water_sample(context.salinity_g_l.unwrap_or(0.0));
    let salinity_used = sample.map(|s| s.salinity_ppt);
    let derived = sample.map(|s| sample::derive(&s, &context.edges, 0.0));
    let local = original.taken_at;
    let signs: Vec<&str> = reading.observations.signs().into_iter().map(|s| s.name()).collect();
    vec![
        Cell::text(original.id.to_string()),
        Cell::text(original.taken_at.to_rfc3339_opts(chrono::SecondsFormat::Millis, true)),
        Cell::text(local.format("%Y-%m-%d").to_string()),
        Cell::text(local.format("%H:%M:%S").to_string()),
        reading.target.tank().map_or(Cell::Empty, Cell::text),
        context.system.map_or(Cell::Empty, Cell::Text),
        Cell::text(original.operator.clone()),
        Cell::text(original.device.to_string()),
        Cell::number(m.temp_c()),
        Cell::number(m.ph),
        Cell::number(m.tan_n_mg_l()),
        Cell::number(derived.map(|d| d.toxic.nh3_n_mg_l)),
        Cell::number(derived.map(|d| d.toxic.nh3_mg_l)),
        Cell::number(derived.map(|d| d.toxic.fraction)),
        derived.map_or(Cell::Empty, |d| Cell::text(d.band.name())),
        if derived.is_some() { Cell::Text(context.edges_source) } else { Cell::Empty },
        if derived.is_some() { Cell::number(salinity_used) } else { Cell::Empty },
        if derived.is_some() { Cell::text(salinity_from) } else { Cell::Empty },
        Cell::number(m.nitrite_n_mg_l()),
        Cell::number(m.nitrate_n_mg_l()),
        Cell::number(measured_salinity),
        Cell::number(m.dissolved_oxygen_mg_l),
        Cell::number(m.chloride_mg_l),
        Cell::number(m.alkalinity_mg_l_caco3()),
        if signs.is_empty() { Cell::Empty } else { Cell::text(signs.join("; ")) },
        Cell::Count(u64::from(reading.observations.deaths)),
        reading.note.as_deref().map_or(Cell::Empty, Cell::text),
        Cell::text(if corrected { "yes" } else { "no" }),
        Cell::text(current_id.to_string()),
    ]
}

/// Writes the readings CSV: byte-order mark, header row, then one row a reading.
pub struct ReadingsCsv<W: Write> {
    writer: csv::Writer<W>,
    rows: u64,
}

impl<W: Write> ReadingsCsv<W> {
    /// Starts the file with its byte-order mark and header row.
    pub fn new(mut out: W) -> csv::Result<ReadingsCsv<W>> {
        out.write_all("\u{feff}".as_bytes())?;
        let mut writer = csv::WriterBuilder::new().terminator(csv::Terminator::CRLF).from_writer(out);
        writer.write_record(COLUMNS)?;
        Ok(ReadingsCsv { writer, rows: 0 })
    }

    /// Writes one row.
    pub fn row(&mut self, cells: &[Cell]) -> csv::Result<()> {
        for cell in cells {
            self.writer.write_field(cell.render().as_bytes())?;
        }
        self.writer.write_record(std::iter::empty::<&[u8]>())?;
        self.rows += 1;
        Ok(())
    }

    /// Rows written.
    pub fn rows(&self) -> u64 {
        self.rows
    }

    /// Flushes and gives back the output.
    pub fn into_inner(self) -> Result<W, std::io::Error> {
        self.writer.into_inner().map_err(|e| e.into_error())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::core::units::AmmoniaBasis;
    use crate::model::record::{DeviceId, RecordBody, Temperature, TotalAmmonia};

    #[test]
    fn only_dangerous_first_characters_are_neutralised() {
        for trigger in FORMULA_TRIGGERS {
            let text = format!("{trigger}1+2");
            assert_eq!(neutralise(&text), format!("'{text}"));
        }
        for safe in ["1+2", "note = fine", "'quoted", "", "B2-07", "été"] {
            assert_eq!(neutralise(safe), safe);
        }
        // Numbers are never touched: a negative number stays a number.
        assert_eq!(Cell::Number(-5.25).render(), "-5.25");
        assert_eq!(Cell::Text("-5.25".into()).render(), "'-5.25");
    }

    #[test]
    fn numbers_are_written_to_read_back_exactly() {
        for x in [0.1, 1.0 / 3.0, 25.0, 1e-7, 123456.789, f64::MIN_POSITIVE] {
            assert_eq!(Cell::Number(x).render().parse::<f64>().unwrap(), x);
        }
        assert_eq!(Cell::Number(25.0).render(), "25");
    }

    #[test]
    fn a_row_has_every_column_and_derives_nh3_with_the_defaults_when_no_room_is_known() {
        let mut r = Reading::new(Target::Tank("B2-07".into()));
        r.measurements.temperature = Some(Temperature::celsius(25.0));
        r.measurements.ph = Some(8.0);
        r.measurements.total_ammonia = Some(TotalAmmonia { value: 1.0, basis: AmmoniaBasis::N });
        r.note = Some("=HYPERLINK(\"x\")".into());
        let at = chrono::DateTime::parse_from_rfc3339("2026-12-01T07:30:00+01:00").unwrap();
        let record = Record::new(DeviceId::generate(), "Ines Varga", at, RecordBody::Reading(r.clone()));
        let mut room = RoomContext::new(None);
        let row = reading_row(&mut room, &record, &r, record.id, false);
        assert_eq!(row.len(), COLUMNS.len());
        let col = |name: &str| row[COLUMNS.iter().position(|c| *c == name).unwrap()].render().into_owned();
        assert_eq!(col("local_date"), "2026-12-01");
        assert_eq!(col("local_time"), "07:30:00");
        assert_eq!(col("taken_at"), "2026-12-01T07:30:00.000+01:00");
        assert_eq!(col("band_edges"), "tankwalk defaults (no room given)");
        assert_eq!(col("nh3_salinity_from"), "assumed fresh");
        assert_eq!(col("note"), "'=HYPERLINK(\"x\")");
        // The same figure the chemistry core gives for this sample.
        let expected = sample::derive(&r.water_sample().unwrap(), &BandEdges::DEFAULT, 0.0);
        assert_eq!(col("nh3_n_mg_l").parse::<f64>().unwrap(), expected.toxic.nh3_n_mg_l);
        assert_eq!(col("band"), expected.band.name());
    }
}
