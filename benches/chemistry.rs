//! Throughput of the chemistry core: the fraction is computed on every key
//! press of the walk screen and for every row of an export.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use tankwalk::core::band::BandEdges;
use tankwalk::core::sample::{WaterSample, derive};
use tankwalk::core::{AmmoniaInputs, salinity, toxic_ammonia};

fn chemistry(c: &mut Criterion) {
    let inputs = AmmoniaInputs { tan_n_mg_l: 0.8, ph: 7.6, temp_c: 26.0, salinity_ppt: 0.0 };
    c.bench_function("toxic_ammonia (fresh)", |b| b.iter(|| toxic_ammonia(black_box(&inputs))));
    let marine = AmmoniaInputs { salinity_ppt: 33.0, ..inputs };
    c.bench_function("toxic_ammonia (marine)", |b| b.iter(|| toxic_ammonia(black_box(&marine))));
    let sample = WaterSample { temp_c: 26.0, ph: 7.6, tan_n_mg_l: 0.8, salinity_ppt: 0.0, do_mg_l: Some(6.5) };
    let edges = BandEdges::DEFAULT;
    c.bench_function("derive (all figures of a sample)", |b| {
        b.iter(|| derive(black_box(&sample), black_box(&edges), black_box(250.0)))
    });
    c.bench_function("salinity from SG (bisection)", |b| {
        b.iter(|| salinity::salinity_from_specific_gravity(black_box(1.0245), black_box(25.0)))
    });
    c.bench_function("salinity from conductivity (PSS-78)", |b| {
        b.iter(|| salinity::practical_salinity(black_box(52.0), black_box(25.0), 0.0))
    });
}

criterion_group!(benches, chemistry);
criterion_main!(benches);
