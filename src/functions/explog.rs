//! `2^x` and `log2(x)` by multiplicative normalisation with the factors
//! `1 + 2^-k`: a shift and an add per iteration, and a table of
//! `log2(1 + 2^-k)`.
//!
//! `2^x`: split `x = e + f` with `e` an integer and `f` in `[0, 1)`; for
//! `k = 1, 2, ...` subtract `log2(1 + 2^-k)` from `f` whenever it fits and
//! multiply the mantissa (starting at 1) by `1 + 2^-k`. The exponent left
//! over after `n` steps is below `log2(1 + 2^-n)` and known exactly, so it
//! gives the error bound. `log2`: normalise `x = m·2^e` with `m` in
//! `[1, 2)`, multiply `m` by `1 + 2^-k` whenever the product stays at most
//! 2, and sum the logarithms of the factors: `log2 m = 1 - Σ`, up to
//! `log2(2 / m_n)`, which the run-time value bounds.
//!
//! Exponents are held in units of 2^-126, mantissas in units of 2^-125.

use super::tables::LOG2_1P;
use super::{Approx, FunctionError, first_iters, sign_magnitude, ziv};
use crate::format::Format;
use crate::kernel::Fitted;
use crate::overflow::Side;
use crate::rounding::Rounding;
use crate::storage::{Storage, Wide};
use crate::value::QValue;

/// Fraction bits of exponents.
const L: u32 = 126;
/// Fraction bits of mantissas.
const M: u32 = 125;
/// Fraction bits of the `log2` result.
const R: u32 = 118;

/// `2^f` for `f` in `[0, 1)` (units 2^-126) with its own error `extra`.
fn exp2_mantissa(f: i128, extra: i128, n: u32) -> (i128, i128) {
    let mut f = f;
    let mut y: i128 = 1 << M;
    for k in 1..=n {
        let t = LOG2_1P[k as usize - 1] as i128;
        if f >= t {
            f -= t;
            y += y >> k;
        }
    }
    // y·(2^t - 1) <= 2t for the exponent t = f·2^-126 left over, i.e. f
    // units of 2^-125; roundings 2.4n; table n/8; input error 0.7 per unit.
    (y, f + extra + 3 * n as i128 + 4)
}

/// `2^x` rounded into `dst`.
pub(crate) fn exp2<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    #[cfg(feature = "function-tables")]
    if let Some(f) = super::fast::exp2(x, dst, rnd) {
        return Ok(f);
    }
    exp2_slow(x, dst, rnd)
}

/// The 128-bit kernel of [`exp2`].
pub(crate) fn exp2_slow<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    let fa = x.format().frac_bits();
    let e = x
        .bits()
        .shr_floor(fa)
        .to_i128()
        .unwrap_or(i128::MAX)
        .clamp(-100_000, 100_000) as i64;
    if e >= 128 {
        // 2^x >= 2^128: above every format.
        return Ok(Fitted {
            wrapped: D::ZERO,
            side: Some(Side::Above),
        });
    }
    let fbits = if fa == 0 {
        0
    } else {
        x.bits().low_bits() & (u128::MAX >> (128 - fa))
    };
    let (f, lost) = if fa <= L {
        (fbits << (L - fa), false)
    } else {
        (fbits >> (fa - L), fbits & ((1 << (fa - L)) - 1) != 0)
    };
    // The mantissa times 2^e, read with M - e fraction bits (for e > M,
    // shifted right to zero fraction bits).
    let scaled = |a: i128, err: i128| {
        // 2^f lies strictly inside (1, 2) for 0 < f < 1.
        let (lo, hi) = if err == 0 {
            (i128::MIN, i128::MAX)
        } else {
            (1 << M, 1 << (M + 1))
        };
        Approx::new(a, err, (M as i64 - e) as u32).within(lo, hi)
    };
    if e > M as i64 {
        // 2^x >= 2^126 in a format with at least 127 integer bits (so at
        // most one fraction bit): beyond the kernel's relative precision,
        // the approximation itself is the result (error below 2^-112
        // relative, as the contract states).
        let (a, _) = exp2_mantissa(f as i128, lost as i128, super::MAX_ITERS);
        let k = (e - M as i64) as u32 + dst.frac_bits();
        let v = (a as u128).checked_shl(k).filter(|v| v >> k == a as u128);
        let side = match v {
            Some(v) if Wide::from_u128(v) <= dst.max_bits() => None,
            _ => Some(Side::Above),
        };
        let wrapped = D::from_u128_bits((a as u128).wrapping_shl(k)).extend_from(dst.width());
        return Ok(Fitted { wrapped, side });
    }
    if f == 0 && !lost {
        return Ok(ziv(dst, rnd, 1, |_| scaled(1 << M, 0)));
    }
    let first = first_iters(dst.frac_bits() as i64 + e, rnd);
    Ok(ziv(dst, rnd, first, |n| {
        let (a, err) = exp2_mantissa(f as i128, lost as i128, n);
        scaled(a, err)
    }))
}

/// `log2(x)` rounded into `dst`.
pub(crate) fn log2<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    #[cfg(feature = "function-tables")]
    if let Some(f) = super::fast::log2(x, dst, rnd) {
        return Ok(f);
    }
    log2_slow(x, dst, rnd)
}

/// The 128-bit kernel of [`log2`].
pub(crate) fn log2_slow<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    let (neg, m) = sign_magnitude(x.bits());
    if neg || m == 0 {
        return Err(FunctionError::LogOfNonPositive);
    }
    let len = 128 - m.leading_zeros();
    let e = len as i128 - 1 - x.format().frac_bits() as i128;
    // The mantissa in [2^125, 2^126).
    let (mant, lost) = if len <= M + 1 {
        (m << (M + 1 - len), false)
    } else {
        let s = len - (M + 1);
        (m >> s, m & ((1 << s) - 1) != 0)
    };
    if mant == 1 << M && !lost {
        return Ok(ziv(dst, rnd, 1, |_| Approx::exact(e << R, R)));
    }
    let first = first_iters(dst.frac_bits() as i64, rnd);
    Ok(ziv(dst, rnd, first, |n| {
        let two: i128 = 1 << (M + 1);
        let mut y = mant as i128;
        let mut acc: i128 = 0;
        for k in 1..=n {
            let t = y + (y >> k);
            if t <= two {
                y = t;
                acc += LOG2_1P[k as usize - 1] as i128;
            }
        }
        // log2(2 / y) <= 2.9 (2 - y) units; the truncated shifts make y
        // smaller than the exact product by at most 2.4n (7.2n units);
        // table n/2; input rounding 3.
        let err126 = 3 * (two - y) + 8 * n as i128 + 3 + 3 * lost as i128;
        let a126 = (1i128 << L) - acc;
        // log2 of a mantissa strictly inside (1, 2) lies inside (0, 1).
        Approx::new((e << R) + (a126 >> (L - R)), (err126 >> (L - R)) + 2, R)
            .within(e << R, (e + 1) << R)
    }))
}
