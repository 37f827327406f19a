//! Loading a facility file: every command loads the room before it does
//! anything, so a big room must still load in a blink.

use std::fmt::Write;
use std::hint::black_box;
use std::path::Path;

use criterion::{Criterion, criterion_group, criterion_main};
use tankwalk::model::Facility;

/// A room of `racks` racks of 48 tanks each, every tank with its own entry, as a
/// large wholesale facility would write it.
fn big_room(racks: usize) -> String {
    let mut text = String::from(
        "[room]\nname = \"Bench room\"\nkit_basis = \"n\"\n\n\
         [[species]]\nkey = \"neon\"\nname = \"Neon tetra\"\nwater_type = \"fresh\"\ntemp_c = [20, 26]\nph = [5.5, 7.5]\n\
         band_edges = { basis = \"nh3-n\", watch = 0.015, act = 0.04, critical = 0.15 }\n\n\
         [[species]]\nkey = \"cory\"\nname = \"Corydoras\"\nwater_type = \"fresh\"\ntemp_c = [21, 26]\nph = [6.0, 7.8]\n",
    );
    let mut order = Vec::new();
    for r in 0..racks {
        let ids: Vec<String> = (0..48).map(|t| format!("\"R{r}-{t:02}\"")).collect();
        let _ = write!(
            text,
            "\n[[systems]]\nid = \"RACK-{r}\"\nvolume_l = 6000\nwater_type = \"fresh\"\ntanks = [{}]\n",
            ids.join(", ")
        );
        order.push(format!("\"RACK-{r}\""));
    }
    for r in 0..racks {
        for t in 0..48 {
            let species = if t % 5 == 0 { "[\"neon\", \"cory\"]" } else { "\"neon\"" };
            let _ = write!(
                text,
                "\n[[tanks]]\nid = \"R{r}-{t:02}\"\nvolume_l = 110\nspecies = {species}\nstock_count = 300\n\
                 set_up = 2025-04-01\nnotes = \"lot 26-{t}\"\n"
            );
        }
    }
    text.replace("kit_basis = \"n\"\n", &format!("kit_basis = \"n\"\nround_order = [{}]\n", order.join(", ")))
}

fn facility(c: &mut Criterion) {
    let sample = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/sample-rooms/harbourside-holding.toml"))
        .expect("sample room");
    let origin = Path::new("room.toml");
    c.bench_function("parse sample room (52 tanks)", |b| b.iter(|| Facility::parse(black_box(&sample), origin)));
    let big = big_room(42);
    c.bench_function("parse big room (2016 tanks)", |b| b.iter(|| Facility::parse(black_box(&big), origin)));
    let f = Facility::parse(&big, origin).expect("the bench room is valid");
    c.bench_function("round order of the big room", |b| b.iter(|| black_box(&f).round().len()));
    c.bench_function("effective profile of every tank, big room", |b| {
        b.iter(|| f.tanks.iter().map(|t| f.effective_profile(t).band_edges.watch).sum::<f64>())
    });
    c.bench_function("to_toml_string, big room", |b| b.iter(|| black_box(&f).to_toml_string().len()));
}

criterion_group!(benches, facility);
criterion_main!(benches);
