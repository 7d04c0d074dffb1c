//! Fast paths on 64-bit integers for outputs with at most [`MAX_FRAC`]
//! fraction bits (feature `function-tables`, on by default).
//!
//! Each kernel reduces its argument with a table of 129 (or 128) entries
//! generated with MPFR (`fast_tables.rs`) and evaluates a short Taylor
//! polynomial of the small remainder with 64×64→128-bit products. It
//! returns an approximation `a·2^-P` with a bound `err` on its error, both
//! proven below; the result is used only if `a - err` and `a + err` round
//! to the same value (every rounding mode is monotone, so the exact value
//! between them rounds to it too). Otherwise (about one call in 2^20 for
//! 32-bit outputs) the caller runs the 128-bit shift-and-add kernels. A
//! fast result is therefore always the correctly rounded one: the fast
//! paths change speed only.
//!
//! Units: `uN` means `2^-N`. `⌊·⌋` products lose less than one unit.
//! Error bounds are in units of the result; each is at least twice the sum
//! of the terms listed in its comment.

use super::fast_tables::*;
use crate::format::Format;
use crate::kernel::{self, Fitted};
use crate::rounding::Rounding;
use crate::storage::Storage;
use crate::value::QValue;

/// Outputs with more fraction bits (plus the result's integer bits, for
/// exp2) go straight to the 128-bit kernels: the fast paths carry about 60
/// bits, and need 8 guard bits to decide most roundings.
pub(crate) const MAX_FRAC: u32 = 52;

/// The rounding of `a·2^-frac` if every value within `err` of it rounds
/// the same way.
#[inline(always)]
fn decide<D: Storage>(
    a: i128,
    err: i128,
    frac: u32,
    dst: Format,
    rnd: Rounding,
) -> Option<Fitted<D>> {
    let lo = kernel::rescale::<i128, D>(a - err, frac, dst, rnd);
    let hi = kernel::rescale::<i128, D>(a + err, frac, dst, rnd);
    (lo.wrapped == hi.wrapped && lo.side == hi.side).then_some(lo)
}

/// `⌊a·b / 2^s⌋` on 128-bit products (the result fits 64 bits).
#[inline(always)]
fn mul_shr(a: i64, b: i64, s: u32) -> i64 {
    ((a as i128 * b as i128) >> s) as i64
}

/// `⌊a·b / 2^64⌋` for a table value `a` that may be `2^63`.
#[inline(always)]
fn mul_t(a: u64, b: i64) -> i128 {
    (a as i128 * b as i128) >> 64
}

/// `(i, x - i·2^k)` with `i` the nearest multiple index of `x / 2^k`.
#[inline(always)]
fn split_nearest(x: u64, k: u32) -> (usize, i64) {
    let i = ((x as u128 + (1 << (k - 1))) >> k) as usize;
    (i, (x as i128 - ((i as i128) << k)) as i64)
}

// ---------------------------------------------------------------------------
// sin and cos of turns.

/// `(cos, sin)` of the angle `t` in `[0, 2^61]` u64 turn (at most 1/8
/// turn), in u63.
///
/// `t = i/1024 + d` with `|d| <= 2^53` u64 (1/2048 turn); `δ = 2π·d` is at
/// most 0.00307 rad. `sin θ = S + S·(cos δ - 1) + C·sin δ`,
/// `cos θ = C + C·(cos δ - 1) - S·sin δ` with the table's `S`, `C`.
/// Errors, u63: `S`, `C` 0.5 each; `δ` (u71) is off by at most 1.5 u71,
/// which moves `sin δ` by 1.5 u71 < 0.01; the powers and terms below are
/// each off by less than 2 u64 (`cos δ - 1`: four floors and the u64
/// rounding of `δ`: < 6 u64; `sin δ`: < 5 u64), so each product is off by
/// less than 3 u63 + 1 each; the series tails `δ^8/8!` and `δ^7/7!` are
/// below 2^-70. Total below 8 u63.
#[inline(always)]
fn sincos_octant(t: u64) -> (i128, i128) {
    let (i, d) = split_nearest(t, 54);
    // δ in u71: d·2^-64·2π·2^71 = d·(2π·2^61) / 2^54.
    let dl = ((d as i128 * TWO_PI_Q61 as i128) >> 54) as i64;
    let d64 = dl >> 7; // δ, u64
    let s2 = mul_shr(dl, dl, 78); // δ², u64
    let s4 = mul_shr(s2, s2, 64); // δ⁴, u64
    let s6 = mul_shr(s4, s2, 64); // δ⁶, u64
    let cm1 = -(s2 >> 1) + s4 / 24 - s6 / 720; // cos δ - 1, u64
    let s3 = mul_shr(dl, s2, 71); // δ³, u64
    let s5 = mul_shr(dl, s4, 71); // δ⁵, u64
    let sd = d64 - s3 / 6 + s5 / 120; // sin δ, u64
    let (s, c) = (SIN_1024[i], COS_1024[i]);
    let sin = s as i128 + mul_t(s, cm1) + mul_t(c, sd);
    let cos = c as i128 + mul_t(c, cm1) - mul_t(s, sd);
    (cos, sin)
}

/// Error bound of [`sincos_octant`] in u63, with room for an inexact
/// phase (a phase below 2^-64 turn moves the value by less than 3.2 u63).
const SINCOS_ERR: i128 = 16;
const SINCOS_ERR_LOST: i128 = 24;

/// `sin(2π x)` or `cos(2π x)` for a phase in u128 turn, or `None` if the
/// fast path does not decide it.
#[inline]
pub(crate) fn sincos_turns<D: Storage>(
    phase: u128,
    dst: Format,
    rnd: Rounding,
    want_sin: bool,
) -> Option<Fitted<D>> {
    if dst.frac_bits() > MAX_FRAC {
        return None;
    }
    let p = (phase >> 64) as u64;
    let lost = phase as u64 != 0;
    let octant = (p >> 61) as u32;
    let r = p & ((1 << 61) - 1);
    if r == 0 && !lost && octant & 1 == 0 {
        // A multiple of a quarter turn: the slow path returns it exactly.
        return None;
    }
    let t = if octant & 1 == 0 { r } else { (1 << 61) - r };
    let (c, s) = sincos_octant(t);
    let (sp, cp) = if octant & 1 == 0 { (s, c) } else { (c, s) };
    let (cos, sin) = match octant >> 1 {
        0 => (cp, sp),
        1 => (-sp, cp),
        2 => (-cp, -sp),
        _ => (sp, -cp),
    };
    let v = if want_sin { sin } else { cos };
    let err = if lost { SINCOS_ERR_LOST } else { SINCOS_ERR };
    decide(v, err, 63, dst, rnd)
}

// ---------------------------------------------------------------------------
// 2^x.

/// `2^f` for `f` in `[0, 1)` u64, in u62.
///
/// `f = i/128 + g` with `|g| <= 2^56` u64 (1/256); `u = g·ln 2`, at most
/// 0.0028. `2^f = E·(1 + (e^u - 1))` with the table's `E = 2^(i/128)`.
/// Errors, u62: `E` 0.5; `u` (u71) off by 1 u71 (moves `e^u` by < 0.01
/// u64); `e^u - 1` off by less than 6 u64 (five floors, one per power and
/// term, < 8 in all) plus the tail `u^7/7!` < 2^-66; the product
/// `E·(e^u - 1)` (`E <= 2`) is then off by < 16 u64 + 1 u62 = 5 u62.
/// Total below 6 u62; an inexact
/// `f` (below 1 u64) adds `2^f·ln2·2^-64` < 0.35 u62.
#[inline(always)]
fn exp2_unit(f: u64) -> i128 {
    let (i, g) = split_nearest(f, 57);
    let ul = ((g as i128 * LN2_Q64 as i128) >> 57) as i64; // u, u71
    let u1 = ul >> 7; // u, u64
    let u2 = mul_shr(ul, ul, 78);
    let u3 = mul_shr(ul, u2, 71);
    let u4 = mul_shr(u2, u2, 64);
    let u5 = mul_shr(ul, u4, 71);
    let u6 = mul_shr(u3, u3, 64);
    let em1 = u1 + (u2 >> 1) + u3 / 6 + u4 / 24 + u5 / 120 + u6 / 720; // e^u - 1, u64
    let e = EXP2_128[i];
    e as i128 + mul_t(e, em1)
}

const EXP2_ERR: i128 = 12;
const EXP2_ERR_LOST: i128 = 14;

/// `2^x` for a value `x` with at most 64 fraction bits and a small integer
/// part, or `None`.
#[inline]
pub(crate) fn exp2<D: Storage>(x: QValue, dst: Format, rnd: Rounding) -> Option<Fitted<D>> {
    let fa = x.format().frac_bits();
    let bits = x.bits();
    // The integer part e; only |e| <= 64 is handled here.
    let e = bits.shr_floor(fa).to_i128()?;
    if !(-64..=64).contains(&e) {
        return None;
    }
    let e = e as i32;
    // The result is below 2^(e+1); read with 62 - e fraction bits, it needs
    // at most 63 bits, and the output must stay 8 bits above its error.
    let frac = 62 - e;
    if dst.frac_bits() as i32 + 8 > frac || frac > 126 {
        return None;
    }
    let fbits = if fa == 0 {
        0
    } else {
        bits.low_bits() & (u128::MAX >> (128 - fa))
    };
    let (f, lost) = if fa <= 64 {
        ((fbits << (64 - fa)) as u64, false)
    } else {
        (
            (fbits >> (fa - 64)) as u64,
            fbits & ((1 << (fa - 64)) - 1) != 0,
        )
    };
    if f == 0 && !lost {
        // An exact power of two: the slow path returns it at once.
        return None;
    }
    let m = exp2_unit(f);
    let err = if lost { EXP2_ERR_LOST } else { EXP2_ERR };
    decide(m, err, frac as u32, dst, rnd)
}

// ---------------------------------------------------------------------------
// log2.

/// `log2 m` for a mantissa `m` in `[2^63, 2^64)` (u63, so `[1, 2)`), in
/// u64.
///
/// `m·R = 1 + z` with the table's short reciprocal `R` (exact product),
/// `|z| <= 0.0040`; `log2 m = -log2 R + ln(1 + z)·log2 e`.
/// Errors, u64: `-log2 R` 0.5; `z` (u70, one floor) moves `ln(1+z)` by
/// < 0.01; the seven series terms are off by < 1 u64 each (< 7), the tail
/// `z^8/8` < 0.06: < 9 in all; times `log2 e` (< 1.45, table 0.5 u62) and
/// one floor: < 14 u64. Total below 15 u64; a mantissa cut below 2^-63
/// adds < 3 u64.
#[inline(always)]
fn log2_mantissa(m: u64) -> i128 {
    let i = ((m >> 56) & 127) as usize;
    let p = m as u128 * RCP_128[i] as u128; // u79, exact
    let zl = (((p as i128) - (1i128 << 79)) >> 9) as i64; // z, u70
    let z1 = zl >> 6;
    let z2 = mul_shr(zl, zl, 76);
    let z3 = mul_shr(zl, z2, 70);
    let z4 = mul_shr(z2, z2, 64);
    let z5 = mul_shr(zl, z4, 70);
    let z6 = mul_shr(z3, z3, 64);
    let z7 = mul_shr(zl, z6, 70);
    let ln = z1 - (z2 >> 1) + z3 / 3 - (z4 >> 2) + z5 / 5 - z6 / 6 + z7 / 7; // u64
    let l = mul_shr(ln, LOG2_E_Q62 as i64, 62);
    NEG_LOG2_RCP_128[i] as i128 + l as i128
}

const LOG2_ERR: i128 = 30;
const LOG2_ERR_LOST: i128 = 36;

/// `log2 x` for a positive `x`, or `None`.
#[inline]
pub(crate) fn log2<D: Storage>(x: QValue, dst: Format, rnd: Rounding) -> Option<Fitted<D>> {
    if dst.frac_bits() > MAX_FRAC {
        return None;
    }
    let (neg, m) = super::sign_magnitude(x.bits());
    if neg || m == 0 {
        return None;
    }
    let len = 128 - m.leading_zeros();
    let e = len as i128 - 1 - x.format().frac_bits() as i128;
    let (mant, lost) = if len <= 64 {
        ((m << (64 - len)) as u64, false)
    } else {
        let s = len - 64;
        ((m >> s) as u64, m & ((1 << s) - 1) != 0)
    };
    if mant == 1 << 63 && !lost {
        // An exact power of two.
        return None;
    }
    let a = (e << 64) + log2_mantissa(mant);
    let err = if lost { LOG2_ERR_LOST } else { LOG2_ERR };
    decide(a, err, 64, dst, rnd)
}

// ---------------------------------------------------------------------------
// atan2 in turns.

/// `atan(b/a)` in u64 turn for `0 < b < a`, `a` in `[2^63, 2^64)`.
///
/// `t = b/a` (u64, one division) `= i/128 + h`, `|h| <= 2^-8`.
/// `atan t = atan(i/128) + atan(s)` with `s = h / (1 + t·i/128)
/// = h·c / (1 + h·c·i/128)`, `c = 1/(1 + (i/128)²)` from the table, and
/// `1/(1 + q)` by seven terms of its series (`|q| <= 2^-9`, tail < 2^-72).
/// Errors, u64 rad before the conversion to turns: `t` off by 1 (floor);
/// `p = h·c`, `q` off by 1 each (and 0.5 u63 of `c` times `|h|` < 0.01);
/// the series of `1/(1+q)` off by < 8 u64 relative, times `|p| <= 2^-8`:
/// < 1; `s` < 3 in all; `atan s` (four terms, three products) < 4 more;
/// turns (times `1/2π` < 0.16, one floor): < 2; the table 0.5. Total
/// below 3 u64 turn, plus `t`'s own error carried through `atan`
/// (slope <= 1) and `1/2π`: < 1.
#[inline(always)]
fn atan_turns(a: u64, b: u64) -> i128 {
    let t = (((b as u128) << 64) / a as u128) as u64;
    let (i, h) = split_nearest(t, 57);
    let p = ((h as i128 * ATAN_C1_128[i] as i128) >> 63) as i64; // h·c, u64
    let q = ((h as i128 * ATAN_TC1_128[i] as i128) >> 63) as i64; // h·c·i/128, u64
    let mut r: i128 = 1 << 64; // 1/(1 + q), u64
    for _ in 0..7 {
        r = (1 << 64) - ((q as i128 * r) >> 64);
    }
    let s = ((p as i128 * r) >> 64) as i64; // u64
    let s2 = mul_shr(s, s, 64);
    let s3 = mul_shr(s, s2, 64);
    let s5 = mul_shr(s3, s2, 64);
    let s7 = mul_shr(s5, s2, 64);
    let at = s - s3 / 3 + s5 / 5 - s7 / 7; // atan s, u64 rad
    let turns = mul_shr(at, INV_TWO_PI_Q64 as i64, 64);
    ATAN_128[i] as i128 + turns as i128
}

const ATAN_ERR: i128 = 8;
/// With inputs cut to 64 significant bits: `t` is off by up to 2^-62
/// relative, i.e. 4 u64 rad, < 1 u64 turn more; doubled.
const ATAN_ERR_LOST: i128 = 12;

/// `atan2(y, x)` in turns, or `None`.
#[inline]
pub(crate) fn atan2_turns<D: Storage>(
    y: QValue,
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Option<Fitted<D>> {
    if dst.frac_bits() > MAX_FRAC {
        return None;
    }
    let (yneg, my) = super::sign_magnitude(y.bits());
    let (xneg, mx) = super::sign_magnitude(x.bits());
    if my == 0 || mx == 0 {
        return None;
    }
    // Both magnitudes on one scale, exactly (else the slow path).
    let (fy, fx) = (y.format().frac_bits(), x.format().frac_bits());
    let fm = fy.max(fx);
    let (sy, sx) = (fm - fy, fm - fx);
    if my.leading_zeros() <= sy || mx.leading_zeros() <= sx {
        return None;
    }
    let (ys, xs) = (my << sy, mx << sx);
    if ys == xs {
        return None; // a diagonal: exact in the slow path
    }
    let swapped = ys > xs;
    let (big, small) = if swapped { (ys, xs) } else { (xs, ys) };
    let len = 128 - big.leading_zeros();
    let (a, b, lost) = if len <= 64 {
        (
            (big << (64 - len)) as u64,
            (small << (64 - len)) as u64,
            false,
        )
    } else {
        let s = len - 64;
        let mask = (1u128 << s) - 1;
        (
            (big >> s) as u64,
            (small >> s) as u64,
            big & mask != 0 || small & mask != 0,
        )
    };
    if b == 0 {
        return None;
    }
    let z = atan_turns(a, b);
    // Unfold from the first octant (u64 turn): the angle from the y axis,
    // then the quadrant.
    const QUARTER: i128 = 1 << 62;
    const HALF: i128 = 1 << 63;
    let z = if swapped { QUARTER - z } else { z };
    let z = match (xneg, yneg) {
        (false, false) => z,
        (true, false) => HALF - z,
        (true, true) => z - HALF,
        (false, true) => -z,
    };
    let err = if lost { ATAN_ERR_LOST } else { ATAN_ERR };
    decide(z, err, 64, dst, rnd)
}
