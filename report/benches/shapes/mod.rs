//! Invented datapaths shaped like firmware, for the analysis benchmark and
//! the profiling example (`cargo run --release -p qbound-report --example
//! analysis_profile -- fir_bank 100000`).
//!
//! - `fir_bank`: a bank of 64-tap FIR filters (16-bit coefficients, exact
//!   40-bit accumulation, one final rounding) over the same 64 quantized
//!   samples of an ADC: every input's quantization reaches every output;
//! - `long_fir`: one dot product with `n/3` taps (one accumulation chain,
//!   every coefficient its own term at the output);
//! - `random_blocks`: many independent random expressions of about 50
//!   nodes (fan-in 2, operands from the same block, every operator and
//!   rounding mode, wide results rescaled to 24 bits);
//! - `decaying_cascade`: `s = round(s/2 + c·x)` unrolled. The exact ideal
//!   range of step `k` needs `k` bits, so the exact result itself grows
//!   quadratically with the depth unless the analysis rounds outward;
//! - `recursion`: `y_k = rescale(y_(k-1)·c + x_k, Q0.7, floor, saturate)`
//!   unrolled, with `c = 0.9` (a decimal constant: exact ranges would need
//!   more bits at every step);
//! - `balanced_tree`: the mean of `n/4` quantized samples as a balanced
//!   tree of `rescale((a + b) >> 1, Q0.15, nearest-even, saturate)`.

#![allow(dead_code)]

use qbound::{Format, Overflow, Rounding};
use qbound_report::{Builder, Datapath, InputKind, NodeId, Num, parse_decimal};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// A shape by name.
pub fn by_name(name: &str) -> Option<fn(usize) -> Datapath> {
    Some(match name {
        "fir_bank" => fir_bank,
        "long_fir" => long_fir,
        "random_blocks" => random_blocks,
        "decaying_cascade" => decaying_cascade,
        "recursion" => recursion,
        "balanced_tree" => balanced_tree,
        _ => return None,
    })
}

fn q15() -> Format {
    Format::signed(0, 15).unwrap()
}

fn sample_range() -> (Num, Num) {
    (Num::from(-1), Num::dyadic(32767, -15))
}

/// An exact 16-bit sample input in `[-1, 1 - 2^-15]`.
fn sample(b: &mut Builder, name: &str) -> NodeId {
    let (lo, hi) = sample_range();
    b.input(name, q15(), lo, hi, InputKind::Exact).unwrap()
}

/// A Q0.15 constant rounded to nearest.
fn q15_const(b: &mut Builder, name: &str, value: Num) -> NodeId {
    b.constant(name, value, q15(), Rounding::NearestTiesEven)
        .unwrap()
}

/// `round(s + p)` into the accumulator format (no bits dropped: a range
/// check), or `p` alone for the first tap.
fn accumulate(b: &mut Builder, s: Option<NodeId>, p: NodeId, acc: Format) -> NodeId {
    let t = match s {
        None => p,
        Some(s) => b.add(s, p).unwrap(),
    };
    b.rescale(t, acc, Rounding::Floor, Overflow::Wrap).unwrap()
}

/// A coefficient `±0.dddd` (invented), never zero.
fn coefficient(rng: &mut ChaCha8Rng) -> Num {
    let d: u32 = rng.random_range(1..5000);
    let v = parse_decimal(&format!("0.{d:04}")).unwrap();
    if rng.random_bool(0.5) { -v } else { v }
}

/// `y_j = round(Σ_k h_jk·x_k)` for as many 64-tap filters as fit in `n`
/// nodes, over 64 shared inputs quantized from a real signal.
pub fn fir_bank(n: usize) -> Datapath {
    let mut rng = ChaCha8Rng::seed_from_u64(1);
    let acc = Format::signed(9, 30).unwrap();
    let mut b = Builder::new();
    let (lo, hi) = sample_range();
    let xs: Vec<NodeId> = (0..64)
        .map(|k| {
            b.input(
                &format!("x{k}"),
                q15(),
                lo.clone(),
                hi.clone(),
                InputKind::Quantized(Rounding::NearestTiesEven),
            )
            .unwrap()
        })
        .collect();
    let mut j = 0;
    while b.len() + 3 * 64 <= n {
        let mut s: Option<NodeId> = None;
        for (k, &x) in xs.iter().enumerate() {
            // Coefficients of magnitude < 0.5/64 keep the sum in range.
            let c = coefficient(&mut rng).mul_pow2(-6);
            let c = q15_const(&mut b, &format!("h{j}_{k}"), c);
            let p = b.mul(c, x).unwrap();
            s = Some(accumulate(&mut b, s, p, acc));
        }
        let y = b
            .rescale(
                s.unwrap(),
                q15(),
                Rounding::NearestTiesEven,
                Overflow::Saturate,
            )
            .unwrap();
        b.output(&format!("y{j}"), y, None).unwrap();
        j += 1;
    }
    b.build()
}

/// One dot product of about `n/3` taps.
pub fn long_fir(n: usize) -> Datapath {
    let mut rng = ChaCha8Rng::seed_from_u64(2);
    let acc = Format::signed(20, 30).unwrap();
    let mut b = Builder::new();
    let mut s: Option<NodeId> = None;
    let mut k = 0;
    while b.len() + 5 <= n {
        let x = sample(&mut b, &format!("x{k}"));
        let c = q15_const(&mut b, &format!("h{k}"), coefficient(&mut rng));
        let p = b.mul(c, x).unwrap();
        s = Some(accumulate(&mut b, s, p, acc));
        k += 1;
    }
    let y = b
        .rescale(
            s.unwrap(),
            Format::signed(15, 15).unwrap(),
            Rounding::NearestTiesEven,
            Overflow::Saturate,
        )
        .unwrap();
    b.output("y", y, None).unwrap();
    b.build()
}

/// Independent random blocks of about 50 nodes each, one output per block.
pub fn random_blocks(n: usize) -> Datapath {
    let mut rng = ChaCha8Rng::seed_from_u64(3);
    let narrow = Format::signed(3, 20).unwrap();
    let mut b = Builder::new();
    let mut j = 0;
    while b.len() + 60 <= n {
        let mut pool: Vec<NodeId> = Vec::new();
        for k in 0..4 {
            let kind = if rng.random_bool(0.5) {
                InputKind::Exact
            } else {
                InputKind::Quantized(Rounding::ALL[rng.random_range(0..Rounding::ALL.len())])
            };
            let hi = Num::dyadic(i128::from(rng.random_range(1..8u32)), -2);
            let lo = -hi.clone();
            pool.push(
                b.input(&format!("b{j}_x{k}"), narrow, lo, hi, kind)
                    .unwrap(),
            );
        }
        for k in 0..2 {
            pool.push(
                b.constant(
                    &format!("b{j}_c{k}"),
                    coefficient(&mut rng),
                    q15(),
                    Rounding::NearestTiesEven,
                )
                .unwrap(),
            );
        }
        while pool.len() < 50 {
            let x = pool[rng.random_range(0..pool.len())];
            let y = pool[rng.random_range(0..pool.len())];
            let node = match rng.random_range(0..6) {
                0 => b.add(x, y),
                1 => b.sub(x, y),
                2 => b.mul(x, y),
                3 => b.neg(x),
                4 => b.shift(x, rng.random_range(-3..=3)),
                _ => b.rescale(
                    x,
                    narrow,
                    Rounding::ALL[rng.random_range(0..Rounding::ALL.len())],
                    Overflow::ALL[rng.random_range(0..2)],
                ),
            };
            let Ok(mut v) = node else { continue };
            // Keep every value in a firmware-sized word.
            if b.format_of(v).width() > 40 {
                v = b
                    .rescale(v, narrow, Rounding::NearestTiesEven, Overflow::Saturate)
                    .unwrap();
            }
            pool.push(v);
        }
        b.output(&format!("b{j}"), *pool.last().unwrap(), None)
            .unwrap();
        j += 1;
    }
    b.build()
}

/// `s = round(s/2 + c·x)` unrolled: a deep recursion whose exact ranges
/// need one more bit per step.
pub fn decaying_cascade(n: usize) -> Datapath {
    let acc = Format::signed(3, 20).unwrap();
    let mut b = Builder::new();
    let x = sample(&mut b, "x");
    let mut s = b
        .rescale(x, acc, Rounding::Floor, Overflow::Saturate)
        .unwrap();
    let mut k = 0;
    while b.len() + 5 <= n {
        let c = q15_const(
            &mut b,
            &format!("c{k}"),
            parse_decimal(&format!("0.{:04}", 1000 + (k * 7919) % 8000)).unwrap(),
        );
        let xi = sample(&mut b, &format!("x{k}"));
        let p = b.mul(c, xi).unwrap();
        let half = b.shift(s, -1).unwrap();
        let t = b.add(half, p).unwrap();
        s = b
            .rescale(t, acc, Rounding::NearestTiesEven, Overflow::Saturate)
            .unwrap();
        k += 1;
    }
    b.output("y", s, None).unwrap();
    b.build()
}

/// `y_k = rescale(y_(k-1)·c + x_k, Q0.7, floor, saturate)` unrolled, one
/// fresh quantized sample `x_k` per step, `c = 0.9`.
pub fn recursion(n: usize) -> Datapath {
    let q7 = Format::signed(0, 7).unwrap();
    let mut b = Builder::new();
    let c = b
        .constant(
            "c",
            parse_decimal("0.9").unwrap(),
            q15(),
            Rounding::NearestTiesEven,
        )
        .unwrap();
    // A real sample in [-0.05, 0.05], rounded to nearest into Q0.7.
    let sample = |b: &mut Builder, name: &str| {
        b.input(
            name,
            q7,
            Num::decimal(-5, -2),
            Num::decimal(5, -2),
            InputKind::Quantized(Rounding::NearestTiesEven),
        )
        .unwrap()
    };
    let mut y = sample(&mut b, "x0");
    let mut k = 1;
    while b.len() + 4 <= n {
        let x = sample(&mut b, &format!("x{k}"));
        let p = b.mul(y, c).unwrap();
        let t = b.add(p, x).unwrap();
        y = b
            .rescale(t, q7, Rounding::Floor, Overflow::Saturate)
            .unwrap();
        k += 1;
    }
    b.output("y", y, None).unwrap();
    b.build()
}

/// The mean of `n/4` quantized samples as a balanced tree of
/// `rescale((a + b) >> 1, Q0.15, nearest-even, saturate)`.
pub fn balanced_tree(n: usize) -> Datapath {
    let mut b = Builder::new();
    let (lo, hi) = sample_range();
    let leaves = (n / 4).max(2);
    let mut level: Vec<NodeId> = (0..leaves)
        .map(|k| {
            b.input(
                &format!("x{k}"),
                q15(),
                lo.clone(),
                hi.clone(),
                InputKind::Quantized(Rounding::NearestTiesEven),
            )
            .unwrap()
        })
        .collect();
    while level.len() > 1 {
        let mut next = Vec::with_capacity(level.len().div_ceil(2));
        for pair in level.chunks(2) {
            if let [a, c] = pair {
                let s = b.add(*a, *c).unwrap();
                let h = b.shift(s, -1).unwrap();
                next.push(
                    b.rescale(h, q15(), Rounding::NearestTiesEven, Overflow::Saturate)
                        .unwrap(),
                );
            } else {
                next.push(pair[0]);
            }
        }
        level = next;
    }
    b.output("mean", level[0], None).unwrap();
    b.build()
}
