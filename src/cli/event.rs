//! `tankwalk event`: save something done to a tank or a system.

use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use ulid::Ulid;

use tankwalk::model::record::{DeviceId, Event, Field, Record, RecordBody};

use super::GlobalArgs;
use super::input::{self, EventKindCommand, TargetArgs, WhoWhenArgs};

#[derive(Debug, Args)]
#[command(allow_negative_numbers = true)]
pub struct EventArgs {
    #[command(flatten)]
    place: TargetArgs,
    #[command(subcommand)]
    kind: EventKindCommand,
    /// A free note.
    #[arg(long, value_name = "TEXT", global = true)]
    note: Option<String>,
    #[command(flatten)]
    who: WhoWhenArgs,
    /// Print one JSON object instead of text.
    #[arg(long, global = true)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &EventArgs) -> Result<ExitCode> {
    // Everything is parsed and checked before the store is opened.
    let room = super::room::resolve_room_optional(global)?;
    let facility = room.as_ref().map(|(_, f)| f);
    let place = input::locate(facility, args.place.tank.as_deref(), args.place.system.as_deref())?;
    let operator = args.who.operator()?;
    let taken_at = args.who.taken_at(input::now_local())?;
    let kind = args.kind.to_kind()?;
    let event = Event { target: place.target.clone(), kind, note: args.note.clone().filter(|n| !n.trim().is_empty()) };
    let record = Record::new(DeviceId(Ulid::nil()), operator, taken_at, RecordBody::Event(event));
    record.check().map_err(|e| {
        let option = match e.field() {
            Field::Note => "--note",
            Field::Operator => "--operator",
            _ => "event",
        };
        input::refuse(option, &e)
    })?;

    super::record::save_and_print(global, facility, record, Vec::new(), args.json)
}
