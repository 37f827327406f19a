//! The round report: gathering (every tank judged against its history) and
//! rendering, for the sample wholesale room and a 2016-tank room.

use std::fmt::Write;
use std::hint::black_box;
use std::path::Path;

use chrono::{DateTime, FixedOffset, TimeZone};
use criterion::{Criterion, criterion_group, criterion_main};
use tankwalk::model::Facility;
use tankwalk::model::record::DeviceId;
use tankwalk::report::{Format, Request, Selection, gather};
use tankwalk::store::Entry;
use ulid::Ulid;

/// 42 racks of 48 tanks on shared sumps (2016 tanks), every fifth tank mixed.
fn big_room() -> Facility {
    let mut text = String::from(
        "[room]\nname = \"Bench room\"\nkit_basis = \"n\"\n\n\
         [room.source_water]\nph = 7.6\n\n\
         [[species]]\nkey = \"neon\"\nname = \"Neon tetra\"\nwater_type = \"fresh\"\ntemp_c = [20, 26]\nph = [5.5, 7.5]\n\n\
         [[species]]\nkey = \"cory\"\nname = \"Corydoras\"\nwater_type = \"fresh\"\ntemp_c = [21, 26]\nph = [6.0, 7.8]\n",
    );
    for r in 0..42 {
        let ids: Vec<String> = (0..48).map(|t| format!("\"R{r}-{t:02}\"")).collect();
        let _ = write!(
            text,
            "\n[[systems]]\nid = \"RACK-{r}\"\nvolume_l = 6000\nwater_type = \"fresh\"\ntanks = [{}]\n",
            ids.join(", ")
        );
    }
    for r in 0..42 {
        for t in 0..48 {
            let species = if t % 5 == 0 { "[\"neon\", \"cory\"]" } else { "\"neon\"" };
            let _ = write!(
                text,
                "\n[[tanks]]\nid = \"R{r}-{t:02}\"\nvolume_l = 110\nspecies = {species}\nstock_count = 300\nset_up = 2025-04-01\n"
            );
        }
    }
    Facility::parse(&text, Path::new("bench-room.toml")).expect("the bench room is valid")
}

fn now() -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 9, 30, 0).unwrap()
}

/// `days` of generated rounds and this morning's round begun, as history entries.
fn entries(facility: &Facility, days: u32) -> Vec<Entry> {
    let device = DeviceId(Ulid::from_parts(1, 7));
    let mut records = tankwalk::demo::history(facility, device, now(), days, 2026);
    records.extend(tankwalk::demo::round_in_progress(facility, device, &records, now(), 2026));
    records.into_iter().map(|original| Entry { original, corrections: Vec::new() }).collect()
}

fn report(c: &mut Criterion) {
    let sample =
        Facility::load(Path::new(concat!(env!("CARGO_MANIFEST_DIR"), "/sample-rooms/harbourside-holding.toml")))
            .expect("sample room");
    let history = entries(&sample, 45);
    let request = Request::round_ending(&sample, now(), Selection::Room);
    let report = gather(&sample, &history, &request).expect("report");
    let html = Format::Html.render(&report);
    eprintln!("sample room: {} entries, HTML {} bytes", history.len(), html.len());
    c.bench_function("gather, sample room (52 tanks, 45 days)", |b| {
        b.iter(|| gather(&sample, black_box(&history), &request).map(|r| r.counts.done))
    });
    c.bench_function("render HTML, sample room", |b| b.iter(|| Format::Html.render(black_box(&report)).len()));
    c.bench_function("render text, sample room", |b| b.iter(|| Format::Text.render(black_box(&report)).len()));
    c.bench_function("render JSON, sample room", |b| b.iter(|| Format::Json.render(black_box(&report)).len()));

    let big = big_room();
    let history = entries(&big, 45);
    let request = Request::round_ending(&big, now(), Selection::Room);
    let report = gather(&big, &history, &request).expect("report");
    let html = Format::Html.render(&report);
    eprintln!("big room: {} entries, HTML {} bytes", history.len(), html.len());
    let mut group = c.benchmark_group("big room");
    group.sample_size(10);
    group.bench_function("gather, big room (2016 tanks, 45 days)", |b| {
        b.iter(|| gather(&big, black_box(&history), &request).map(|r| r.counts.done))
    });
    group.bench_function("render HTML, big room", |b| b.iter(|| Format::Html.render(black_box(&report)).len()));
    let one = Request::round_ending(&big, now(), Selection::System("RACK-7".into()));
    group.bench_function("gather, one system of the big room", |b| {
        b.iter(|| gather(&big, black_box(&history), &one).map(|r| r.counts.done))
    });
    group.finish();
}

criterion_group!(benches, report);
criterion_main!(benches);
