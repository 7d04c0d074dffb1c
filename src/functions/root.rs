//! Square root, correctly rounded: the exact integer root and remainder
//! (native `isqrt` where the radicand fits 128 bits, else digit by digit on
//! a 640-bit integer), then one rounding that sees the remainder's class.

use core::cmp::Ordering;

use super::nat::{self, Nat};
use super::{FunctionError, Mag, fit_mag};
use crate::format::Format;
use crate::kernel::Fitted;
use crate::rounding::Rounding;
use crate::storage::Storage;
use crate::value::QValue;

/// `sqrt(x)` rounded into `dst`.
#[inline]
pub(crate) fn sqrt<D: Storage>(
    x: QValue,
    dst: Format,
    rnd: Rounding,
) -> Result<Fitted<D>, FunctionError> {
    if x.is_negative() {
        return Err(FunctionError::NegativeSquareRoot);
    }
    // sqrt(a * 2^-Fa) * 2^F = sqrt(a * 2^e).
    let e = 2 * dst.frac_bits() as i32 - x.format().frac_bits() as i32;
    let m = sqrt_mag(
        x.bits().low_bits(),
        e,
        matches!(rnd, Rounding::Stochastic(_)),
    );
    Ok(fit_mag(false, m, dst, rnd))
}

/// The exact root `sqrt(a * 2^e)` (`e >= -128`) as integer part and
/// remainder class.
pub(crate) fn sqrt_mag(a: u128, e: i32, stochastic: bool) -> Mag {
    if !stochastic {
        if e >= 0 && (e == 0 || (e < 128 && a.leading_zeros() >= e as u32)) {
            // Integer radicand n: sqrt(n) against r + 1/2 is rem against
            // r + 1/4, never a tie.
            let n = a << e;
            let r = n.isqrt();
            let rem = n - r * r;
            let vs_half = if rem > r {
                Ordering::Greater
            } else {
                Ordering::Less
            };
            return Mag {
                q: r,
                big: false,
                exact: rem == 0,
                vs_half,
                frac64: 0,
                frac_exact: true,
            };
        }
        if e < 0 {
            // Radicand n + lost / 2^t: compare rem + lost / 2^t with r + 1/4.
            let t = e.unsigned_abs();
            let (n, lost) = if t >= 128 {
                (0, a)
            } else {
                (a >> t, a & ((1 << t) - 1))
            };
            let r = n.isqrt();
            let rem = n - r * r;
            let vs_half = match rem.cmp(&r) {
                Ordering::Equal => {
                    // lost / 2^t against 1/4 (t <= 128).
                    if t >= 2 {
                        lost.cmp(&(1u128 << (t - 2)))
                    } else if lost == 0 {
                        Ordering::Less
                    } else {
                        Ordering::Greater
                    }
                }
                o => o,
            };
            return Mag {
                q: r,
                big: false,
                exact: rem == 0 && lost == 0,
                vs_half,
                frac64: 0,
                frac_exact: true,
            };
        }
    }
    // floor(sqrt(a * 2^(e+128))) = floor(sqrt(a * 2^e) * 2^64).
    let n = Nat::from_u128(a).shl((e + 128) as u32);
    let (r, rem) = nat::isqrt_rem(&n);
    Mag::from_extended(&r, !rem.is_zero())
}
