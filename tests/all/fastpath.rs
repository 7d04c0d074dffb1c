//! The 64-bit fast paths of sin/cos (turns), atan2 (turns), exp2 and log2
//! against MPFR, each path on its own: the fast path must return the
//! correctly rounded result whenever it returns one (and must return one
//! for nearly every call with a 32-bit output), and the 128-bit kernel it
//! falls back to must still meet its contract. Exhaustive over small
//! formats, proptest over a grid with the edges.

use super::functions::funcref::{self, Func, fmt, round_ref};
use proptest::prelude::*;
use qbound::__paths::{self, Kernel};
use qbound::{Format, QValue, Rounding};
use rug::Integer;

const KERNELS: [(Kernel, Func); 5] = [
    (Kernel::SinTurns, Func::SinTurns),
    (Kernel::CosTurns, Func::CosTurns),
    (Kernel::Atan2Turns, Func::Atan2Turns),
    (Kernel::Exp2, Func::Exp2),
    (Kernel::Log2, Func::Log2),
];

/// The correctly rounded result wrapped into `dst` (the paths wrap), or
/// `None` outside the domain.
fn expected(func: Func, a: QValue, b: QValue, dst: Format, rnd: Rounding) -> Option<Integer> {
    let v = func.reference(a, b)?;
    let r = round_ref(&v, dst.frac_bits(), rnd);
    let m = Integer::from(1) << dst.width();
    let mut w = r % &m;
    if w < 0 {
        w += &m;
    }
    if dst.is_signed() && w >= Integer::from(1) << (dst.width() - 1) {
        w -= &m;
    }
    Some(w)
}

/// Check both paths on one case; return whether the fast path decided
/// (`None` outside the domain).
fn check(k: Kernel, func: Func, a: QValue, b: QValue, dst: Format, rnd: Rounding) -> Option<bool> {
    let Some(want) = expected(func, a, b, dst, rnd) else {
        assert!(__paths::fast(k, a, b, dst, rnd).is_none());
        assert!(__paths::slow(k, a, b, dst, rnd).is_err());
        return None;
    };
    let fast = __paths::fast(k, a, b, dst, rnd);
    if let Some(f) = fast {
        assert_eq!(
            funcref::wide_to_integer(f.bits()),
            want,
            "fast {k:?} of {a:?} {b:?} into {dst} with {rnd:?}"
        );
    }
    // The slow path: correctly rounded for outputs up to 100 fraction bits
    // (the 2^-112 allowance has never been met there); wider outputs are
    // checked against the allowance in `functions.rs`.
    let slow = __paths::slow(k, a, b, dst, rnd).unwrap();
    // Wrapped overflows are exact only while the scaled result is below
    // 2^100 (see the contract); `functions.rs` checks the rest.
    let v = func.reference(a, b).unwrap();
    let unwrapped = round_ref(&v, dst.frac_bits(), rnd);
    if dst.frac_bits() > 100 || unwrapped.significant_bits() > 100 {
        return Some(fast.is_some());
    }
    assert_eq!(
        funcref::wide_to_integer(slow.bits()),
        want,
        "slow {k:?} of {a:?} {b:?} into {dst} with {rnd:?}"
    );
    Some(fast.is_some())
}

fn modes() -> Vec<Rounding> {
    let mut m: Vec<Rounding> = Rounding::ALL[..8].to_vec();
    m.extend([0u64, 1 << 63, u64::MAX].map(Rounding::Stochastic));
    m
}

fn all_values(f: Format) -> impl Iterator<Item = QValue> {
    funcref::common::all_bits(f).map(move |b| QValue::from_i128_bits(f, b).unwrap())
}

/// Every input of small formats, every mode, into small and 32-bit
/// outputs; the fast path must decide most of them.
#[test]
fn fast_paths_exhaustive_small_formats() {
    let ins = [
        "UQ0.8", "Q0.7", "Q3.4", "UQ4.4", "Q0.0", "UQ1.0", "UQ0.1", "Q2.9",
    ];
    let outs = [
        "Q0.7", "UQ0.8", "Q1.14", "Q1.30", "UQ0.32", "UQ8.8", "Q3.12", "Q0.0", "UQ1.0",
    ];
    let modes = modes();
    let one = QValue::from_i128_bits(fmt("Q1.6"), 64).unwrap();
    let other = QValue::from_i128_bits(fmt("Q1.6"), -45).unwrap();
    for (k, func) in KERNELS {
        let (mut taken, mut total) = (0u64, 0u64);
        for i in ins {
            for a in all_values(fmt(i)) {
                for o in outs {
                    for &rnd in &modes {
                        // atan2: each ordinate with two abscissas.
                        for b in [one, other] {
                            if let Some(t) = check(k, func, a, b, fmt(o), rnd) {
                                total += 1;
                                taken += t as u64;
                            }
                        }
                    }
                }
            }
        }
        eprintln!("{k:?}: fast path decided {taken} of {total}");
        // Exact points (quarter turns, axes, diagonals, powers of two) and
        // the domain errors are left to the 128-bit kernel by design.
        assert!(taken * 100 > total * 95, "{k:?}: {taken} of {total}");
    }
}

/// The fast path decides nearly every call with a 32-bit output.
#[test]
fn fast_paths_decide_32_bit_outputs() {
    let mut seed = 0x2545_f491_4f6c_dd1du64;
    let mut next = || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        seed
    };
    for (k, func) in KERNELS {
        let (inf, outf) = match k {
            Kernel::SinTurns | Kernel::CosTurns => ("UQ0.32", "Q1.30"),
            Kernel::Atan2Turns => ("Q15.16", "Q0.31"),
            Kernel::Exp2 => ("Q4.27", "UQ16.16"),
            Kernel::Log2 => ("UQ16.16", "Q5.26"),
        };
        let (inf, outf) = (fmt(inf), fmt(outf));
        let mut taken = 0;
        for _ in 0..2000 {
            let a = funcref::value_from_word(inf, next() as u128);
            let b = funcref::value_from_word(inf, next() as u128);
            taken += u32::from(check(k, func, a, b, outf, Rounding::NearestTiesEven) == Some(true));
        }
        assert!(taken >= 1990, "{k:?}: fast path decided {taken} of 2000");
    }
}

/// Output formats of the property tests: every one the fast paths accept
/// (up to 52 fraction bits), with 1-bit, I = 0, F = 0 and odd widths, and
/// some beyond (which the fast paths must decline).
fn out_grid() -> Vec<Format> {
    [
        "Q0.0", "UQ1.0", "UQ0.1", "Q0.7", "UQ0.8", "Q1.14", "Q0.15", "UQ1.15", "Q3.12", "Q2.13",
        "UQ8.8", "Q5.26", "Q1.30", "Q0.31", "UQ0.32", "UQ16.16", "Q3.28", "Q8.23", "Q1.40",
        "UQ0.45", "Q1.51", "UQ0.52", "Q0.53", "Q1.62", "UQ64.0", "Q31.32", "Q127.0", "UQ0.128",
    ]
    .iter()
    .map(|s| fmt(s))
    .collect()
}

/// Input formats: 1-bit, 128-bit, I = 0, F = 0, odd widths, more than 64
/// fraction bits (the fast paths cut them, with a wider error bound).
fn in_grid() -> Vec<Format> {
    [
        "UQ0.1", "Q0.0", "UQ1.0", "Q0.7", "UQ0.16", "Q3.12", "UQ0.32", "Q4.27", "Q15.16",
        "UQ16.16", "Q0.31", "UQ0.64", "Q5.58", "Q31.32", "UQ64.0", "Q0.127", "UQ0.128", "Q63.64",
        "UQ128.0", "Q20.45", "UQ50.51", "Q9.30", "UQ5.13",
    ]
    .iter()
    .map(|s| fmt(s))
    .collect()
}

proptest! {
    #[test]
    fn fast_and_slow_paths_match_mpfr(
        ki in 0..KERNELS.len(),
        (ia, ib, io) in (0usize..100, 0usize..100, 0usize..100),
        (ra, rb) in (any::<u128>(), any::<u128>()),
        shift in 0u32..128,
        mi in 0..9usize,
        word in any::<u64>(),
    ) {
        let (ins, outs) = (in_grid(), out_grid());
        let (k, func) = KERNELS[ki];
        let a = funcref::value_from_word(ins[ia % ins.len()], ra >> shift);
        let b = funcref::value_from_word(ins[ib % ins.len()], rb >> (shift / 2));
        let dst = outs[io % outs.len()];
        let rnd = match Rounding::ALL[mi] {
            Rounding::Stochastic(_) => Rounding::Stochastic(word),
            r => r,
        };
        let fast = check(k, func, a, b, dst, rnd);
        // exp2's gate counts the result's magnitude too.
        if dst.frac_bits() > 52 && k != Kernel::Exp2 {
            prop_assert!(fast != Some(true), "fast path taken for {dst}");
        }
    }
}
