//! `tankwalk skip`: note that a tank or system was passed over on a round, and why.

use std::process::ExitCode;

use anyhow::Result;
use clap::Args;
use ulid::Ulid;

use tankwalk::model::record::{DeviceId, Field, Record, RecordBody, Skip};

use super::GlobalArgs;
use super::input::{self, TargetArgs, WhoWhenArgs};

#[derive(Debug, Args)]
pub struct SkipArgs {
    #[command(flatten)]
    place: TargetArgs,
    /// Why it was skipped (tank empty, being moved, no access, kit ran out...).
    #[arg(long, value_name = "TEXT")]
    reason: String,
    #[command(flatten)]
    who: WhoWhenArgs,
    /// Print one JSON object instead of text.
    #[arg(long)]
    json: bool,
}

pub fn run(global: &GlobalArgs, args: &SkipArgs) -> Result<ExitCode> {
    // Everything is parsed and checked before the store is opened.
    let room = super::room::resolve_room_optional(global)?;
    let facility = room.as_ref().map(|(_, f)| f);
    let place = input::locate(facility, args.place.tank.as_deref(), args.place.system.as_deref())?;
    let operator = args.who.operator()?;
    let taken_at = args.who.taken_at(input::now_local())?;
    let skip = Skip { target: place.target.clone(), reason: args.reason.trim().to_string() };
    let record = Record::new(DeviceId(Ulid::nil()), operator, taken_at, RecordBody::Skip(skip));
    record.check().map_err(|e| {
        let option = if e.field() == Field::Operator { "--operator" } else { "--reason" };
        input::refuse(option, &e)
    })?;

    super::record::save_and_print(global, facility, record, Vec::new(), args.json)
}
