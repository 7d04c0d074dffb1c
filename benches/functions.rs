//! Cost of each function at 16, 32 and 64 bits, beside the host's `f64`
//! functions for scale: `cargo bench -p qbound --bench functions`.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use qbound::{Overflow, Q, Rounding, UQ};

const RND: Rounding = Rounding::NearestTiesEven;
const OVF: Overflow = Overflow::Saturate;

macro_rules! width {
    ($c:expr, $bits:literal, $x:ty, $ux:ty, $unit:ty, $x_bits:expr, $u_bits:expr, $y_bits:expr) => {{
        let mut g = $c.benchmark_group(concat!("functions/", $bits));
        let x = <$x>::from_bits($x_bits);
        let y = <$x>::from_bits($y_bits);
        let u = <$ux>::from_bits($u_bits);
        g.bench_function("div", |b| {
            b.iter(|| black_box(black_box(x).div::<$x>(black_box(y), RND, OVF)))
        });
        g.bench_function("recip", |b| {
            b.iter(|| black_box(black_box(y).recip::<$x>(RND, OVF)))
        });
        g.bench_function("sqrt", |b| {
            b.iter(|| black_box(black_box(u).sqrt::<$ux>(RND, OVF)))
        });
        g.bench_function("sin_turns", |b| {
            b.iter(|| black_box(black_box(u).sin_turns::<$unit>(RND, OVF)))
        });
        g.bench_function("sin", |b| {
            b.iter(|| black_box(black_box(x).sin::<$unit>(RND, OVF)))
        });
        g.bench_function("atan2_turns", |b| {
            b.iter(|| black_box(black_box(x).atan2_turns::<$unit>(black_box(y), RND, OVF)))
        });
        g.bench_function("exp2", |b| {
            b.iter(|| black_box(black_box(x).exp2::<$ux>(RND, OVF)))
        });
        g.bench_function("log2", |b| {
            b.iter(|| black_box(black_box(u).log2::<$x>(RND, OVF)))
        });
        g.finish();
    }};
}

fn functions(c: &mut Criterion) {
    // Invented operands: a 0.37 turn phase, x = 2.3, y = -1.7 and their
    // neighbours at each width.
    width!(c, "16", Q<4, 11>, UQ<4, 12>, Q<1, 14>, 4710, 1515, -3482);
    width!(c, "32", Q<8, 23>, UQ<8, 24>, Q<1, 30>, 19_293_798, 6_207_570, -14_260_634);
    width!(c, "64", Q<16, 47>, UQ<16, 48>, Q<1, 62>, 323_692_921_196_544, 104_145_548_599_541, -239_265_368_618_598);

    let mut g = c.benchmark_group("functions/f64");
    let (x, y, u) = (2.3f64, -1.7f64, 0.37f64);
    g.bench_function("div", |b| b.iter(|| black_box(black_box(x) / black_box(y))));
    g.bench_function("recip", |b| b.iter(|| black_box(1.0 / black_box(y))));
    g.bench_function("sqrt", |b| b.iter(|| black_box(black_box(u).sqrt())));
    g.bench_function("sin_turns", |b| {
        b.iter(|| black_box((black_box(u) * std::f64::consts::TAU).sin()))
    });
    g.bench_function("sin", |b| b.iter(|| black_box(black_box(x).sin())));
    g.bench_function("atan2_turns", |b| {
        b.iter(|| black_box(black_box(x).atan2(black_box(y)) / std::f64::consts::TAU))
    });
    g.bench_function("exp2", |b| b.iter(|| black_box(black_box(x).exp2())));
    g.bench_function("log2", |b| b.iter(|| black_box(black_box(u).log2())));
    g.finish();
}

criterion_group!(benches, functions);
criterion_main!(benches);
