//! Runs one of the benchmarks' key operations `N` times, for counting
//! instructions with valgrind (repeatable on a shared machine, where times
//! vary by 10-20 %). `scripts/instruction-counts.sh` runs it under
//! `valgrind --tool=cachegrind` at two counts and prints the instructions
//! per call (the difference, so start-up is not counted).
//!
//! Run: `cargo run --release -p qbound --example instruction_counts -- NAME N`;
//! `NAME` is one of the names printed by `-- list`.

use std::hint::black_box;

use qbound::{Overflow, Q, Rounding, UQ};

const RND: Rounding = Rounding::NearestTiesEven;
const OVF: Overflow = Overflow::Saturate;
const TAPS: usize = 64;

/// The same invented operands as `benches/functions.rs` (32 bits) and
/// `benches/dot.rs`.
/// A named operation; the argument is the iteration number.
type Op = (&'static str, Box<dyn Fn(u64)>);

fn ops() -> Vec<Op> {
    let x = Q::<8, 23>::from_bits(19_293_798);
    let y = Q::<8, 23>::from_bits(-14_260_634);
    let u = UQ::<8, 24>::from_bits(6_207_570);
    let (xf, yf, uf) = (2.3f64, -1.7f64, 0.37f64);
    let mut s = 0x2545_f491_4f6c_dd1du64;
    let mut next = move || {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        s as i16
    };
    let xs: [Q<0, 15>; TAPS] = core::array::from_fn(|_| Q::<0, 15>::from_bits(next()));
    let hs: [Q<0, 15>; TAPS] = core::array::from_fn(|_| Q::<0, 15>::from_bits(next()));
    let xi: [i16; TAPS] = xs.map(|v| v.to_bits());
    let hi: [i16; TAPS] = hs.map(|v| v.to_bits());
    let wide = Q::<9, 30>::from_bits(123_456_789_012);
    vec![
        (
            "sin_turns",
            Box::new(move |_| {
                black_box(black_box(u).sin_turns::<Q<1, 30>>(RND, OVF));
            }),
        ),
        (
            "cos_turns",
            Box::new(move |_| {
                black_box(black_box(u).cos_turns::<Q<1, 30>>(RND, OVF));
            }),
        ),
        (
            "atan2_turns",
            Box::new(move |_| {
                black_box(black_box(x).atan2_turns::<Q<1, 30>>(black_box(y), RND, OVF));
            }),
        ),
        (
            "exp2",
            Box::new(move |_| {
                black_box(black_box(x).exp2::<UQ<8, 24>>(RND, OVF));
            }),
        ),
        (
            "log2",
            Box::new(move |_| {
                black_box(black_box(u).log2::<Q<8, 23>>(RND, OVF));
            }),
        ),
        (
            "sin",
            Box::new(move |_| {
                black_box(black_box(x).sin::<Q<1, 30>>(RND, OVF));
            }),
        ),
        (
            "sqrt",
            Box::new(move |_| {
                black_box(black_box(u).sqrt::<UQ<8, 24>>(RND, OVF));
            }),
        ),
        (
            "div",
            Box::new(move |_| {
                black_box(black_box(x).div::<Q<8, 23>>(black_box(y), RND, OVF));
            }),
        ),
        (
            "f64_sin_turns",
            Box::new(move |_| {
                black_box((black_box(uf) * std::f64::consts::TAU).sin());
            }),
        ),
        (
            "f64_atan2_turns",
            Box::new(move |_| {
                black_box(black_box(xf).atan2(black_box(yf)) / std::f64::consts::TAU);
            }),
        ),
        (
            "f64_exp2",
            Box::new(move |_| {
                black_box(black_box(xf).exp2());
            }),
        ),
        (
            "f64_log2",
            Box::new(move |_| {
                black_box(black_box(uf).log2());
            }),
        ),
        (
            "rescale_q9.30_to_q0.15",
            Box::new(move |_| {
                black_box(black_box(wide).rescale::<Q<0, 15>>(RND, OVF));
            }),
        ),
        (
            "dot64_typed",
            Box::new(move |_| {
                let acc = Q::<9, 30>::dot(black_box(&xs), black_box(&hs));
                black_box(acc.rescale::<Q<0, 15>>(RND, OVF));
            }),
        ),
        (
            "dot64_hand",
            Box::new(move |_| {
                let (x, h) = (black_box(&xi), black_box(&hi));
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
                black_box(q.clamp(i16::MIN as i64, i16::MAX as i64) as i16);
            }),
        ),
    ]
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let ops = ops();
    if args.len() < 3 {
        for (name, _) in &ops {
            println!("{name}");
        }
        return;
    }
    let n: u64 = args[2].parse().expect("a count");
    let (_, f) = ops
        .iter()
        .find(|(name, _)| *name == args[1])
        .expect("a name from `list`");
    for i in 0..n {
        f(i);
    }
}
