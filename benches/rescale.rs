//! What `rescale` costs per rounding mode and per overflow mode, at word
//! lengths of 16, 32, 64 and 128 bits.
//!
//! At width N the source is Q3.(N-4) (N bits) and the target Q1.(N/2-2)
//! (N/2 bits): the rescale drops N/2-2 fraction bits and two integer bits,
//! so both the rounding and the overflow path are exercised. Each iteration
//! converts 256 seeded pseudo-random values; divide the time by 256 for the
//! cost of one rescale. The rounding modes are timed with `Saturate`, the
//! overflow modes with `NearestTiesEven`. Beside them, the same conversions
//! hand-written with primitive integers (floor + wrap, nearest-ties-up +
//! saturate) show what the typed version should cost.

use std::hint::black_box;

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use qbound::{Overflow, Q, Rounding};

const N: usize = 256;

fn seeded(seed: u64) -> impl FnMut() -> u128 {
    let mut s = seed;
    move || {
        let mut next = || {
            s ^= s << 13;
            s ^= s >> 7;
            s ^= s << 17;
            s
        };
        ((next() as u128) << 64) | next() as u128
    }
}

macro_rules! width_group {
    ($c:expr, $n:literal, $Src:ty, $Dst:ty, $s:ty, $d:ty) => {{
        let mut rnd = seeded(0x5eed_0000 + $n);
        let src: Vec<$Src> = (0..N)
            .map(|_| <$Src>::wrapping_from_bits(rnd() as $s))
            .collect();
        let words: Vec<u64> = (0..N).map(|_| rnd() as u64).collect();
        let mut g = $c.benchmark_group(concat!("rescale_", $n, "bit"));
        g.throughput(Throughput::Elements(N as u64));
        macro_rules! case {
            ($group:literal, $name:literal, $r:expr, $o:expr) => {
                g.bench_function(BenchmarkId::new($group, $name), |b| {
                    b.iter(|| {
                        let mut out = [<$Dst>::ZERO; N];
                        for i in 0..N {
                            out[i] = black_box(src[i]).rescale::<$Dst>($r, $o);
                        }
                        black_box(out)
                    })
                });
            };
        }
        case!("rounding", "floor", Rounding::Floor, Overflow::Saturate);
        case!("rounding", "ceil", Rounding::Ceil, Overflow::Saturate);
        case!(
            "rounding",
            "toward-zero",
            Rounding::TowardZero,
            Overflow::Saturate
        );
        case!(
            "rounding",
            "away-from-zero",
            Rounding::AwayFromZero,
            Overflow::Saturate
        );
        case!(
            "rounding",
            "nearest-up",
            Rounding::NearestTiesUp,
            Overflow::Saturate
        );
        case!(
            "rounding",
            "nearest-away",
            Rounding::NearestTiesAway,
            Overflow::Saturate
        );
        case!(
            "rounding",
            "nearest-even",
            Rounding::NearestTiesEven,
            Overflow::Saturate
        );
        case!("rounding", "odd", Rounding::ToOdd, Overflow::Saturate);
        g.bench_function(BenchmarkId::new("rounding", "stochastic"), |b| {
            b.iter(|| {
                let mut out = [<$Dst>::ZERO; N];
                for i in 0..N {
                    out[i] = black_box(src[i])
                        .rescale::<$Dst>(Rounding::Stochastic(words[i]), Overflow::Saturate);
                }
                black_box(out)
            })
        });
        case!(
            "overflow",
            "wrap",
            Rounding::NearestTiesEven,
            Overflow::Wrap
        );
        case!(
            "overflow",
            "saturate",
            Rounding::NearestTiesEven,
            Overflow::Saturate
        );
        case!(
            "overflow",
            "saturate-symmetric",
            Rounding::NearestTiesEven,
            Overflow::SaturateSymmetric
        );
        // Hand-written baselines on the raw integers.
        let raw: Vec<$s> = src.iter().map(|x| x.to_bits()).collect();
        let k = <$Src>::FORMAT.frac_bits() - <$Dst>::FORMAT.frac_bits();
        let (lo, hi) = (<$Dst>::MIN.to_bits() as $s, <$Dst>::MAX.to_bits() as $s);
        let wd = <$Dst>::FORMAT.width();
        g.bench_function(BenchmarkId::new("hand", "floor+wrap"), |b| {
            b.iter(|| {
                let mut out = [0 as $d; N];
                for i in 0..N {
                    let q = (black_box(raw[i]) >> k) as $d;
                    out[i] = (q << (<$d>::BITS - wd)) >> (<$d>::BITS - wd);
                }
                black_box(out)
            })
        });
        g.bench_function(BenchmarkId::new("hand", "nearest-up+saturate"), |b| {
            b.iter(|| {
                let mut out = [0 as $d; N];
                for i in 0..N {
                    let x = black_box(raw[i]);
                    let q = (x >> k) + ((x >> (k - 1)) & 1);
                    out[i] = q.clamp(lo, hi) as $d;
                }
                black_box(out)
            })
        });
        g.finish();
    }};
}

fn bench(c: &mut Criterion) {
    width_group!(c, 16, Q<3, 12>, Q<1, 6>, i16, i8);
    width_group!(c, 32, Q<3, 28>, Q<1, 14>, i32, i16);
    width_group!(c, 64, Q<3, 60>, Q<1, 30>, i64, i32);
    width_group!(c, 128, Q<3, 124>, Q<1, 62>, i128, i64);
}

criterion_group! {
    name = benches;
    config = Criterion::default()
        .warm_up_time(std::time::Duration::from_millis(300))
        .measurement_time(std::time::Duration::from_secs(1));
    targets = bench
}
criterion_main!(benches);
