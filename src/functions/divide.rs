//! Division and reciprocal, correctly rounded: the exact integer quotient
//! and remainder, then one rounding that sees the remainder's exact class.

use super::nat::{self, Nat};
use super::{FunctionError, Mag, fit_mag, sign_magnitude};
use crate::format::Format;
use crate::kernel::Fitted;
use crate::rounding::Rounding;
use crate::storage::Storage;
use crate::value::QValue;

/// `a / b` rounded into `dst`.
#[inline]
pub(crate) fn div<D: Storage>(
    a: QValue,
    b: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    let (an, am) = sign_magnitude(a.bits());
    let (bn, bm) = sign_magnitude(b.bits());
    if bm == 0 {
        return Err(FunctionError::DivisionByZero);
    }
    // a / b * 2^F = am * 2^s / bm.
    let s = dst.frac_bits() as i32 - a.format().frac_bits() as i32 + b.format().frac_bits() as i32;
    let m = div_mag(am, s, bm, matches!(rnd, Rounding::Stochastic(_)));
    Ok(fit_mag(an != bn && am != 0, m, dst, rnd))
}

/// `1 / x` rounded into `dst`.
#[inline]
pub(crate) fn recip<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    let (neg, m) = sign_magnitude(x.bits());
    if m == 0 {
        return Err(FunctionError::DivisionByZero);
    }
    let s = dst.frac_bits() as i32 + x.format().frac_bits() as i32;
    Ok(fit_mag(
        neg,
        div_mag(1, s, m, matches!(rnd, Rounding::Stochastic(_))),
        dst,
        rnd,
    ))
}

/// The exact quotient `am * 2^s / bm` (`bm != 0`) as integer part and
/// remainder class.
pub(crate) fn div_mag(am: u128, s: i32, bm: u128, stochastic: bool) -> Mag {
    if s >= 0 {
        let s = s as u32;
        if s == 0 || (s < 128 && am.leading_zeros() >= s) {
            let n = am << s;
            return Mag::from_remainder(n / bm, n % bm, bm, stochastic);
        }
    } else {
        let t = s.unsigned_abs();
        if t < bm.leading_zeros() {
            let d = bm << t;
            return Mag::from_remainder(am / d, am % d, d, stochastic);
        }
    }
    // Wide operands: floor(am * 2^(s+64) / bm) on 640-bit integers.
    let e = s + 64;
    let (n, d) = if e >= 0 {
        (Nat::from_u128(am).shl(e as u32), Nat::from_u128(bm))
    } else {
        (Nat::from_u128(am), Nat::from_u128(bm).shl(e.unsigned_abs()))
    };
    let (q, r) = nat::div_rem(&n, &d);
    Mag::from_extended(&q, !r.is_zero())
}
