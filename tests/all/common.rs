//! Helpers shared by the test modules: the format grid, value strategies and
//! the reference arithmetic written with `rug` from the definitions (exact
//! integer or rational, then the rounding rule, then the overflow rule). The
//! reference never calls qbound's arithmetic.
#![allow(dead_code)]

use std::cell::Cell;
use std::panic::{AssertUnwindSafe, catch_unwind};
use std::sync::Once;

use proptest::prelude::*;
use qbound::{Format, Overflow, QValue, Rounding, Wide};
use rug::{Integer, Rational};

/// The exact value of a run-time fixed-point value as a rational.
pub fn exact(v: QValue) -> Rational {
    Rational::from((
        wide_to_integer(v.bits()),
        Integer::from(1) << v.format().frac_bits(),
    ))
}

/// A 129-bit integer as a `rug::Integer`.
pub fn wide_to_integer(w: Wide) -> Integer {
    let lo = Integer::from(w.low_bits());
    if w.is_negative() {
        lo - (Integer::from(1) << 128)
    } else {
        lo
    }
}

/// A `rug::Integer` in `[-2^128, 2^128)` as a 129-bit integer.
pub fn integer_to_wide(x: &Integer) -> Wide {
    let limit = Integer::from(1) << 128;
    assert!(*x >= Integer::from(-&limit) && *x < limit);
    let lo = Integer::from(x.keep_bits_ref(128)).to_u128().unwrap();
    Wide::from_parts(*x < 0, lo)
}

/// The smallest and largest stored integers of a format.
pub fn bit_range(f: Format) -> (Integer, Integer) {
    (wide_to_integer(f.min_bits()), wide_to_integer(f.max_bits()))
}

/// The smallest and largest stored integers of a format, from the
/// definition (not from qbound): signed `[-2^(W-1), 2^(W-1) - 1]`, unsigned
/// `[0, 2^W - 1]`.
pub fn def_range(f: Format) -> (Integer, Integer) {
    let w = f.width();
    if f.is_signed() {
        (
            -(Integer::from(1) << (w - 1)),
            (Integer::from(1) << (w - 1)) - 1,
        )
    } else {
        (Integer::ZERO, (Integer::from(1) << w) - 1)
    }
}

/// A run-time value from an exact stored integer.
pub fn value_of(f: Format, bits: &Integer) -> QValue {
    QValue::new(f, integer_to_wide(bits)).expect("bits in range")
}

pub fn q(i: u32, f: u32) -> Format {
    Format::signed(i, f).unwrap()
}

pub fn uq(i: u32, f: u32) -> Format {
    Format::unsigned(i, f).unwrap()
}

/// The format grid for property tests: 1-bit, 128-bit, I = 0, F = 0, odd
/// and FPGA-style widths (12, 18, 24, 40) and the native widths.
pub fn grid() -> Vec<Format> {
    vec![
        // 1 bit
        q(0, 0),
        uq(1, 0),
        uq(0, 1),
        // small and I = 0 / F = 0
        q(0, 7),
        q(7, 0),
        uq(0, 8),
        uq(8, 0),
        q(3, 4),
        uq(2, 3),
        // odd and non-native widths
        q(3, 8),   // 12
        uq(12, 0), // 12
        q(1, 16),  // 18
        uq(5, 13), // 18
        q(7, 16),  // 24
        uq(12, 12),
        q(9, 30), // 40
        uq(0, 40),
        q(0, 39),
        // native widths
        q(7, 8),
        q(0, 15),
        uq(8, 8),
        q(1, 30),
        uq(0, 32),
        q(31, 32),
        q(0, 63),
        uq(64, 0),
        q(20, 45),  // 66
        uq(50, 51), // 101
        // 128 bits
        q(127, 0),
        q(0, 127),
        q(63, 64),
        uq(128, 0),
        uq(0, 128),
        uq(64, 64),
    ]
}

/// Every format of word length `lo..=hi`, signed and unsigned, every split.
pub fn all_formats(lo: u32, hi: u32) -> Vec<Format> {
    let mut v = Vec::new();
    for w in lo..=hi {
        for i in 0..w {
            v.push(q(i, w - 1 - i));
        }
        for i in 0..=w {
            v.push(uq(i, w - i));
        }
    }
    v
}

/// Every stored integer of a small format, in order.
pub fn all_bits(f: Format) -> impl Iterator<Item = i128> {
    let lo = f.min_bits().to_i128().unwrap();
    let hi = f.max_bits().to_i128().unwrap();
    lo..=hi
}

/// A stored integer of `f` chosen from a raw random word and a selector
/// that favours the edges of the range (min, max, zero, neighbours, small
/// magnitudes) about half of the time.
pub fn pick_bits(f: Format, raw: u128, sel: u8) -> Integer {
    let (lo, hi) = def_range(f);
    let w = f.width();
    let modulus = Integer::from(1) << w;
    let uniform = Integer::from(raw).keep_bits(w) + &lo; // lo .. lo + 2^W - 1
    let small = Integer::from((raw % 9) as i64) - 4;
    let v = match sel % 16 {
        0 => lo.clone(),
        1 => hi.clone(),
        2 => lo.clone() + 1,
        3 => hi.clone() - 1,
        4 => Integer::ZERO,
        5 | 6 => small,
        7 => Integer::from(raw >> 64).keep_bits(w.min(20)) + &lo,
        _ => uniform,
    };
    // Fold into range (neighbours of the edges of 1-bit formats fall out).
    if v < lo || v > hi {
        let mut r = (v - &lo) % &modulus;
        if r < 0 {
            r += &modulus;
        }
        r + lo
    } else {
        v
    }
}

/// A strategy for a value of `f`.
pub fn arb_value(f: Format) -> impl Strategy<Value = QValue> {
    (any::<u128>(), any::<u8>()).prop_map(move |(raw, sel)| value_of(f, &pick_bits(f, raw, sel)))
}

/// A strategy for a rounding mode (stochastic with any random word).
pub fn arb_rounding() -> impl Strategy<Value = Rounding> {
    prop_oneof![
        proptest::sample::select(Rounding::ALL[..8].to_vec()),
        any::<u64>().prop_map(Rounding::Stochastic),
    ]
}

/// A strategy for a format of the grid.
pub fn arb_format() -> impl Strategy<Value = Format> {
    proptest::sample::select(grid())
}

// ---------------------------------------------------------------------------
// Reference rounding and overflow, from the definitions.

/// `floor(frac × 2^64)` for a fraction `num / 2^k` in `[0, 1)`.
pub fn frac64(num: &Integer, k: u32) -> u64 {
    let scaled = if k >= 64 {
        Integer::from(num >> (k - 64))
    } else {
        Integer::from(num << (64 - k))
    };
    scaled.to_u64().unwrap()
}

/// `x / 2^k` (an exact integer divided by a power of two) rounded to an
/// integer by `mode`, from the definitions of the modes.
pub fn round_shift(x: &Integer, k: u32, mode: Rounding) -> Integer {
    if k == 0 {
        return x.clone();
    }
    // x = fl * 2^k + r with 0 <= r < 2^k.
    let fl = Integer::from(x >> k);
    let r = x - Integer::from(&fl << k);
    debug_assert!(r >= 0);
    if r == 0 {
        return fl;
    }
    let half = Integer::from(1) << (k - 1);
    let neg = *x < 0;
    let odd = fl.is_odd();
    let up = match mode {
        Rounding::Floor => false,
        Rounding::Ceil => true,
        Rounding::TowardZero => neg,
        Rounding::AwayFromZero => !neg,
        Rounding::NearestTiesUp => r >= half,
        Rounding::NearestTiesAway => r > half || (r == half && !neg),
        Rounding::NearestTiesEven => r > half || (r == half && odd),
        Rounding::ToOdd => !odd,
        Rounding::Stochastic(random) => random < frac64(&r, k),
    };
    if up { fl + 1 } else { fl }
}

/// The exact stored integer of `exact` rounded to the step of `dst`: the
/// value `num × 2^-src_frac` re-expressed with `dst`'s fraction bits.
pub fn round_to(num: &Integer, src_frac: u32, dst_frac: u32, mode: Rounding) -> Integer {
    if dst_frac >= src_frac {
        Integer::from(num << (dst_frac - src_frac))
    } else {
        round_shift(num, src_frac - dst_frac, mode)
    }
}

/// What an overflow mode makes of the rounded integer `n`: the stored
/// integer, or `None` for a panic (or a checked error).
pub fn overflow_ref(n: &Integer, dst: Format, mode: Overflow) -> Option<Integer> {
    let (lo, hi) = def_range(dst);
    let fits = *n >= lo && *n <= hi;
    match mode {
        Overflow::Wrap => Some(wrap_ref(n, dst)),
        Overflow::Saturate => Some(n.clone().clamp(&lo, &hi)),
        Overflow::SaturateSymmetric => {
            let sym_lo = if dst.is_signed() {
                Integer::from(-&hi)
            } else {
                lo
            };
            Some(n.clone().clamp(&sym_lo, &hi))
        }
        Overflow::Panic => fits.then(|| n.clone()),
    }
}

/// Checks a result against the reference: the stored integer in `dst`,
/// or `None` when a panic was expected (and happened).
pub fn assert_outcome(
    expect: &Option<Integer>,
    got: Option<QValue>,
    dst: Format,
    ctx: impl Fn() -> String,
) {
    match (expect, got) {
        (Some(e), Some(g)) => {
            assert_eq!(g.format(), dst, "{}", ctx());
            assert_eq!(wide_to_integer(g.bits()), *e, "{}", ctx());
        }
        (None, None) => {}
        (e, g) => panic!("{}: expected {e:?}, got {g:?}", ctx()),
    }
}

/// `n` reduced modulo `2^W` into the range of `dst`.
pub fn wrap_ref(n: &Integer, dst: Format) -> Integer {
    let (lo, _) = def_range(dst);
    let m = Integer::from(1) << dst.width();
    let mut r = Integer::from(n - &lo) % &m;
    if r < 0 {
        r += &m;
    }
    r + lo
}

/// Whether `n` lies in the range of `dst`.
pub fn fits(n: &Integer, dst: Format) -> bool {
    let (lo, hi) = def_range(dst);
    *n >= lo && *n <= hi
}

// ---------------------------------------------------------------------------
// Expected panics without noise in the test output.

thread_local! {
    static QUIET: Cell<bool> = const { Cell::new(false) };
}
static HOOK: Once = Once::new();

/// Runs `f`, returning `None` if it panicked. The panic message of an
/// expected panic is not printed; other threads' panics still are.
pub fn catch<T>(f: impl FnOnce() -> T) -> Option<T> {
    HOOK.call_once(|| {
        let previous = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            if !QUIET.with(Cell::get) {
                previous(info);
            }
        }));
    });
    QUIET.with(|q| q.set(true));
    let r = catch_unwind(AssertUnwindSafe(f));
    QUIET.with(|q| q.set(false));
    r.ok()
}

/// A small deterministic generator (splitmix64) for sampled, reproducible
/// value sets outside proptest.
pub struct Mix(pub u64);

impl Mix {
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9e37_79b9_7f4a_7c15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
    pub fn next_u128(&mut self) -> u128 {
        (u128::from(self.next_u64()) << 64) | u128::from(self.next_u64())
    }
}

/// The result format of the exact operations, written out from the table
/// in DESIGN.md (independently of `Format::sum` and friends): `None` when
/// it would pass 128 bits.
pub fn table_format(op: char, a: Format, b: Format) -> Option<Format> {
    let (sa, sb) = (a.is_signed(), b.is_signed());
    let (ia, ib, fa, fb) = (a.int_bits(), b.int_bits(), a.frac_bits(), b.frac_bits());
    let (signed, i, f) = match op {
        '+' if !sa && !sb => (false, ia.max(ib) + 1, fa.max(fb)),
        '+' => (true, ia.max(ib) + 1, fa.max(fb)),
        '-' if !sa && !sb => (true, ia.max(ib), fa.max(fb)),
        '-' => (true, ia.max(ib) + 1, fa.max(fb)),
        '*' if sa && sb => (true, ia + ib + 1, fa + fb),
        '*' if !sa && !sb => (false, ia + ib, fa + fb),
        '*' => (true, ia + ib, fa + fb),
        'n' if sa => (true, ia + 1, fa),
        'n' => (true, ia, fa),
        _ => unreachable!(),
    };
    if u32::from(signed) + i + f > 128 {
        None
    } else {
        Some(Format::new(signed, i, f).unwrap())
    }
}

/// Every rounding mode, with the stochastic mode at the two random words
/// around its threshold for this particular discarded fraction (so the
/// documented rule `up iff random < frac64` is checked at its boundary),
/// plus the extreme words 0 and `u64::MAX`.
pub fn roundings_for(num: &Integer, src_frac: u32, dst_frac: u32) -> Vec<Rounding> {
    let mut v = Rounding::ALL[..8].to_vec();
    let mut words = vec![0, u64::MAX];
    if dst_frac < src_frac {
        let k = src_frac - dst_frac;
        let r = Integer::from(num.keep_bits_ref(k));
        let t = frac64(&r, k);
        words.push(t);
        words.push(t.wrapping_sub(1));
    }
    v.extend(words.into_iter().map(Rounding::Stochastic));
    v
}
