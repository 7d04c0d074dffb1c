//! A 64-tap dot product — Q0.15 samples × Q0.15 coefficients into a 40-bit
//! Q9.30 accumulator, one final rounding to Q0.15 (nearest, ties to even,
//! saturating) — written three ways:
//!
//! - `hand`: primitive integers, as firmware would write it;
//! - `typed_sum_of_products`: qbound's guard-bit accumulation;
//! - `typed_add_assign`: the naive typed loop with `acc += x * h`, which
//!   keeps the 40-bit word length exact (wrap-around at 40 bits) after
//!   every step.
//!
//! The inputs are seeded pseudo-random bits (a fixed xorshift), the same for
//! all three, and each result is checked equal before timing.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use qbound::{Overflow, Q, Rounding};

const TAPS: usize = 64;

fn bits(seed: u64) -> [i16; TAPS] {
    let mut s = seed;
    core::array::from_fn(|_| {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        s as i16
    })
}

/// Hand-written: i32 products, i64 accumulator, round half to even by 15
/// bits, saturate to i16.
#[inline(never)]
fn hand(x: &[i16; TAPS], h: &[i16; TAPS]) -> i16 {
    let mut acc: i64 = 0;
    for i in 0..TAPS {
        acc += (x[i] as i32 * h[i] as i32) as i64;
    }
    let q = acc >> 15;
    let r = acc & 0x7fff;
    let q = if r > 0x4000 || (r == 0x4000 && q & 1 == 1) {
        q + 1
    } else {
        q
    };
    q.clamp(i16::MIN as i64, i16::MAX as i64) as i16
}

#[inline(never)]
fn typed_sum_of_products(x: &[Q<0, 15>; TAPS], h: &[Q<0, 15>; TAPS]) -> Q<0, 15> {
    let acc = Q::<9, 30>::dot(x, h);
    acc.rescale(Rounding::NearestTiesEven, Overflow::Saturate)
}

#[inline(never)]
fn typed_add_assign(x: &[Q<0, 15>; TAPS], h: &[Q<0, 15>; TAPS]) -> Q<0, 15> {
    let mut acc = Q::<9, 30>::ZERO;
    for i in 0..TAPS {
        acc += x[i] * h[i];
    }
    acc.rescale(Rounding::NearestTiesEven, Overflow::Saturate)
}

fn bench(c: &mut Criterion) {
    let xb = bits(0x9e37_79b9_7f4a_7c15);
    let hb = bits(0x2545_f491_4f6c_dd1d);
    let xq: [Q<0, 15>; TAPS] = xb.map(Q::<0, 15>::from_bits);
    let hq: [Q<0, 15>; TAPS] = hb.map(Q::<0, 15>::from_bits);
    let expect = hand(&xb, &hb);
    assert_eq!(typed_sum_of_products(&xq, &hq).to_bits(), expect);
    assert_eq!(typed_add_assign(&xq, &hq).to_bits(), expect);

    let mut g = c.benchmark_group("dot64_q15_acc40");
    g.bench_function("hand", |b| b.iter(|| hand(black_box(&xb), black_box(&hb))));
    g.bench_function("typed_sum_of_products", |b| {
        b.iter(|| typed_sum_of_products(black_box(&xq), black_box(&hq)))
    });
    g.bench_function("typed_add_assign", |b| {
        b.iter(|| typed_add_assign(black_box(&xq), black_box(&hq)))
    });
    g.finish();
}

criterion_group! {
    name = benches;
    config = Criterion::default()
        .warm_up_time(std::time::Duration::from_millis(500))
        .measurement_time(std::time::Duration::from_secs(2));
    targets = bench
}
criterion_main!(benches);
