//! Sine and cosine of turns and radians, atan2: CORDIC on 128-bit
//! integers.
//!
//! Angles are held in units of 2^-126 turn, values (sines, cosines, vector
//! components) in units of 2^-125. A phase in turns reduces exactly to the
//! first octant `[0, 1/8]` by its top three bits and the symmetries of sine
//! and cosine; CORDIC in rotation mode then turns the vector `(1/G, 0)`
//! (`G` the CORDIC gain) by the octant angle, one table angle
//! `atan(2^-i)` per iteration. atan2 folds the point into the first octant
//! (signs and a swap of the coordinates) and runs CORDIC in vectoring mode,
//! summing the table angles that rotate it onto the x axis.
//!
//! Error bounds, in the units above, for `n` iterations: the angle left
//! over (`|z|`, known exactly at run time) and the table roundings (`n/2`)
//! move the result by at most `π(|z| + n/2)`; each iteration's truncated
//! shifts add less than `√2` per vector, amplified at most by the gain 1.65
//! (`2.4n`); the rounded start value adds 0.83. The kernels use
//! `4|z| + 5n + 4`. In vectoring mode the angle left over is
//! `atan(y/x) <= |y|·2^-123` radians, i.e. below `1.3|y|` units.

use super::nat::Nat;
use super::tables::{ATAN_TURNS, GAIN_INV, INV_TWO_PI_384, TWO_PI};
use super::{Approx, FunctionError, first_iters, sign_magnitude, ziv};
use crate::format::Format;
use crate::kernel::Fitted;
use crate::rounding::Rounding;
use crate::storage::{Storage, mul_u128};
use crate::value::QValue;

/// Fraction bits of angles (turns).
const Z: u32 = 126;
/// Fraction bits of values.
const V: u32 = 125;

/// `(cos θ, sin θ)` for `θ` in `[0, 1/8]` turn (units 2^-126), whose own
/// error is at most `extra` units.
fn rotate(theta: i128, extra: i128, n: u32) -> (Approx, Approx) {
    if theta == 0 && extra == 0 {
        return (Approx::exact(1 << V, V), Approx::exact(0, V));
    }
    let mut x = GAIN_INV[n as usize] as i128;
    let mut y = 0i128;
    let mut z = theta;
    for i in 0..n {
        let (dx, dy) = (y >> i, x >> i);
        let t = ATAN_TURNS[i as usize] as i128;
        if z >= 0 {
            x -= dx;
            y += dy;
            z -= t;
        } else {
            x += dx;
            y -= dy;
            z += t;
        }
    }
    let err = 4 * (z.abs() + extra) + 5 * n as i128 + 4;
    let (c, s) = (Approx::new(x, err, V), Approx::new(y, err, V));
    if extra == 0 {
        // An exact angle in (0, 1/8] turn: both strictly in (0, 1).
        (c.within(0, 1 << V), s.within(0, 1 << V))
    } else {
        // A nonzero number of radians: never an exact +-1.
        (c.within(-(1 << V), 1 << V), s.within(-(1 << V), 1 << V))
    }
}

/// `(cos, sin)` of a phase in units of 2^-128 turn (the whole `u128` is
/// one turn), whose own error is at most `extra` units of 2^-126 turn.
fn sincos(phase: u128, extra: i128, n: u32) -> (Approx, Approx) {
    let octant = (phase >> 125) as u32;
    let r = phase & ((1 << 125) - 1);
    // Angle into the octant, measured from the nearer axis.
    let t = if octant & 1 == 0 { r } else { (1 << 125) - r };
    let (c, s) = rotate((t >> 2) as i128, extra + (t & 3 != 0) as i128, n);
    let (sp, cp) = if octant & 1 == 0 { (s, c) } else { (c, s) };
    match octant >> 1 {
        0 => (cp, sp),
        1 => (sp.neg(), cp),
        2 => (cp.neg(), sp.neg()),
        _ => (sp, cp.neg()),
    }
}

/// The fraction of a turn of a value read as turns, in units of 2^-128.
pub(crate) fn phase_of_turns(x: QValue) -> u128 {
    let fa = x.format().frac_bits();
    if fa == 0 {
        0
    } else {
        x.bits().low_bits() << (128 - fa)
    }
}

/// The fraction of a turn of a value read as radians, in units of 2^-128
/// turn, rounded down (error below one unit, i.e. below one unit of
/// 2^-126 turn), or `None` for zero.
fn phase_of_radians(x: QValue) -> Option<u128> {
    let (neg, m) = sign_magnitude(x.bits());
    if m == 0 {
        return None;
    }
    // m * 2^-Fa / (2π) * 2^128 = m * floor(2^384 / 2π) / 2^(256 + Fa), mod 2^128.
    let p = Nat::from_limbs(&INV_TWO_PI_384).mul_u128(m);
    let phase = p.shr(256 + x.format().frac_bits()).low_u128();
    Some(if neg { phase.wrapping_neg() } else { phase })
}

fn sincos_fitted<D: Storage>(
    phase: Option<u128>,
    dst: Format,
    rnd: Rounding,
    want_sin: bool,
) -> Fitted<D> {
    let first = first_iters(dst.frac_bits() as i64, rnd);
    ziv(dst, rnd, first, |n| {
        let (c, s) = match phase {
            Some(p) => sincos(p, 1, n),
            None => sincos(0, 0, n),
        };
        if want_sin { s } else { c }
    })
}

/// `sin(2π x)` or `cos(2π x)` rounded into `dst`.
fn turns_fitted<D: Storage>(x: QValue, dst: Format, rnd: Rounding, want_sin: bool) -> Fitted<D> {
    let p = phase_of_turns(x);
    #[cfg(feature = "function-tables")]
    if let Some(f) = super::fast::sincos_turns(p, dst, rnd, want_sin) {
        return f;
    }
    turns_slow(p, dst, rnd, want_sin)
}

/// The 128-bit kernel of [`turns_fitted`].
pub(crate) fn turns_slow<D: Storage>(
    p: u128,
    dst: Format,
    rnd: Rounding,
    want_sin: bool,
) -> Fitted<D> {
    let first = first_iters(dst.frac_bits() as i64, rnd);
    ziv(dst, rnd, first, |n| {
        let (c, s) = sincos(p, 0, n);
        if want_sin { s } else { c }
    })
}

/// `sin(2π x)` rounded into `dst`.
pub(crate) fn sin_turns<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    Ok(turns_fitted(x, dst, rnd, true))
}

/// `cos(2π x)` rounded into `dst`.
pub(crate) fn cos_turns<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    Ok(turns_fitted(x, dst, rnd, false))
}

/// `sin(x)` (radians) rounded into `dst`.
pub(crate) fn sin_radians<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    // A small dyadic x lies just above sin(x), which may be closer to x
    // than any fixed precision resolves: use x - x^3/6 < sin(x) < x.
    let fa = x.format().frac_bits();
    let (neg, m) = sign_magnitude(x.bits());
    if m != 0 && fa <= V && m.leading_zeros() >= V - fa && (m << (V - fa)) < 1 << 109 {
        let big = (m << (V - fa)) as i128; // |x| in units of 2^-125, below 2^-16
        let u = (big >> 83) + 1; // |x| < u * 2^-42
        let err = u * u * u / 8 + 1; // x^3/6 < u^3 * 2^-126 / 6
        let ap = Approx::new(big, err, V).within(big - err - 1, big);
        let ap = if neg { ap.neg() } else { ap };
        if let Some(f) = ap.round_exact(dst, rnd) {
            return Ok(f);
        }
    }
    Ok(sincos_fitted(phase_of_radians(x), dst, rnd, true))
}

/// `cos(x)` (radians) rounded into `dst`.
pub(crate) fn cos_radians<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    // For a small x, cos(x) lies just above 1 - x^2/2, which may be
    // dyadic: use 1 - x^2/2 < cos(x) < 1 - x^2/2 + x^4/24 when that point
    // is exact at 2^-125.
    let fa = x.format().frac_bits();
    let (_, m) = sign_magnitude(x.bits());
    if m != 0 && fa <= V && m.leading_zeros() >= V - fa && (m << (V - fa)) < 1 << 98 {
        let big = m << (V - fa); // |x| in units of 2^-125, below 2^-27
        let (hi, lo) = mul_u128(big, big);
        if lo & ((1 << 126) - 1) == 0 {
            let half_sq = ((hi << 2) | (lo >> 126)) as i128; // x^2/2, exact
            let u = (half_sq >> 60) + 1;
            let err = u * u / 64 + 1; // x^4/24 < u^2 / 192
            let a = (1 << V) - half_sq;
            let ap = Approx::new(a, err, V).within(a, a + err + 1);
            if let Some(f) = ap.round_exact(dst, rnd) {
                return Ok(f);
            }
        }
    }
    Ok(sincos_fitted(phase_of_radians(x), dst, rnd, false))
}

/// The point of an atan2, folded into the first octant.
enum Folded {
    /// The angle is exact (units of 2^-126 turn).
    Exact(i128),
    /// `a >= b > 0`, the larger in `[2^123, 2^124)`; the angle is
    /// `atan(b/a)`, unfolded by `swapped` (angle from the y axis) and the
    /// signs.
    Octant {
        a: i128,
        b: i128,
        swapped: bool,
        xneg: bool,
        yneg: bool,
    },
}

const QUARTER: i128 = 1 << (Z - 2);
const HALF: i128 = 1 << (Z - 1);

fn unfold(phi: Approx, swapped: bool, xneg: bool, yneg: bool) -> Approx {
    let phi = if swapped {
        phi.affine(QUARTER, true)
    } else {
        phi
    };
    match (xneg, yneg) {
        (false, false) => phi,
        (true, false) => phi.affine(HALF, true),
        (true, true) => phi.affine(-HALF, false),
        (false, true) => phi.neg(),
    }
}

fn fold(y: QValue, x: QValue) -> Folded {
    let (yneg, my) = sign_magnitude(y.bits());
    let (xneg, mx) = sign_magnitude(x.bits());
    if my == 0 {
        return Folded::Exact(if xneg { HALF } else { 0 });
    }
    if mx == 0 {
        return Folded::Exact(if yneg { -QUARTER } else { QUARTER });
    }
    // Both magnitudes on one scale, exactly.
    let ys = Nat::from_u128(my).shl(x.format().frac_bits());
    let xs = Nat::from_u128(mx).shl(y.format().frac_bits());
    let swapped = ys > xs;
    if ys == xs {
        return Folded::Exact(unfold(Approx::exact(QUARTER / 2, Z), false, xneg, yneg).a);
    }
    let (big, small) = if swapped { (ys, xs) } else { (xs, ys) };
    let len = big.bit_len();
    let (big, small) = if len > 124 {
        (big.shr(len - 124), small.shr(len - 124))
    } else {
        (big.shl(124 - len), small.shl(124 - len))
    };
    Folded::Octant {
        a: big.low_u128() as i128,
        b: small.low_u128() as i128,
        swapped,
        xneg,
        yneg,
    }
}

/// The angle in turns (units 2^-126) after `n` vectoring iterations.
fn vector(f: &Folded, n: u32) -> Approx {
    match *f {
        Folded::Exact(t) => Approx::exact(t, Z),
        Folded::Octant {
            a,
            b,
            swapped,
            xneg,
            yneg,
        } => {
            let (mut x, mut y, mut z) = (a, b, 0i128);
            for i in 0..n {
                let (dx, dy) = (y >> i, x >> i);
                let t = ATAN_TURNS[i as usize] as i128;
                if y > 0 {
                    x += dx;
                    y -= dy;
                    z += t;
                } else {
                    x -= dx;
                    y += dy;
                    z -= t;
                }
            }
            // Left-over angle (2|y|), shift roundings (2n), table (n/2),
            // scaling of the inputs (3).
            let err = 2 * y.abs() + 3 * n as i128 + 8;
            // The angle lies strictly inside (0, 1/8) turn.
            unfold(
                Approx::new(z, err, Z).within(0, QUARTER / 2),
                swapped,
                xneg,
                yneg,
            )
        }
    }
}

/// `atan2(y, x)` in turns rounded into `dst`.
pub(crate) fn atan2_turns<D: Storage>(
    y: QValue,
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    #[cfg(feature = "function-tables")]
    if let Some(f) = super::fast::atan2_turns(y, x, dst, rnd) {
        return Ok(f);
    }
    atan2_turns_slow(y, x, dst, rnd)
}

/// The 128-bit kernel of [`atan2_turns`].
pub(crate) fn atan2_turns_slow<D: Storage>(
    y: QValue,
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    let f = fold(y, x);
    let first = first_iters(dst.frac_bits() as i64, rnd);
    Ok(ziv(dst, rnd, first, |n| vector(&f, n)))
}

/// `atan2(y, x)` in radians rounded into `dst`.
pub(crate) fn atan2_radians<D: Storage>(
    y: QValue,
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    // A small ratio r = |y/x| with x > 0 lies just above atan(r), which may
    // be closer to a dyadic r than any fixed precision resolves: use
    // r - r^3/3 < atan(r) < r when r is exact at 2^-123.
    let (yneg, my) = sign_magnitude(y.bits());
    let (xneg, mx) = sign_magnitude(x.bits());
    if my != 0 && mx != 0 && !xneg {
        let s = 123 + x.format().frac_bits() as i32 - y.format().frac_bits() as i32;
        let r = super::divide::div_mag(my, s, mx, false);
        if r.exact && !r.big && r.q < 1 << 107 {
            let q = r.q as i128;
            let u = (q >> 81) + 1; // r < u * 2^-42
            let err = u * u * u / 16 + 1; // r^3/3 < u^3 * 2^-126 / 3
            let ap = Approx::new(q, err, Z - 3).within(q - err - 1, q);
            let ap = if yneg { ap.neg() } else { ap };
            if let Some(f) = ap.round_exact(dst, rnd) {
                return Ok(f);
            }
        }
    }
    let f = fold(y, x);
    let first = first_iters(dst.frac_bits() as i64 + 3, rnd);
    Ok(ziv(dst, rnd, first, |n| {
        let t = vector(&f, n);
        if t.a == 0 && t.err == 0 {
            return Approx::exact(0, Z - 3);
        }
        // θ·2π: units 2^-126 times units 2^-125, taken at 2^-123.
        let (hi, _) = mul_u128(t.a.unsigned_abs(), TWO_PI);
        let a = hi as i128;
        // Keep only a strict bound at zero (it maps exactly).
        let keep = |b: i128, inf: i128| if b == 0 { 0 } else { inf };
        Approx::new(if t.a < 0 { -a } else { a }, t.err + 2, Z - 3)
            .within(keep(t.lo, i128::MIN), keep(t.hi, i128::MAX))
    }))
}
