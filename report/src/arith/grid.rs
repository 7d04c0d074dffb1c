//! Formats as sets of numbers: their ranges and steps, rounding a number to
//! a format's grid exactly as the library's kernel rounds, and conversions
//! between [`QValue`] and [`Num`].

use qbound::{Format, QValue, Rounding, Wide};

use super::interval::Interval;
use super::num::Num;

/// `2^e` for any integer `e`.
#[must_use]
pub fn pow2(e: i64) -> Num {
    Num::pow2(e)
}

/// The step (ulp) of a format, `2^-F`.
///
/// ```
/// let f = qbound::Format::signed(7, 8)?;
/// assert_eq!(qbound_report::arith::ulp(f).to_string(), "1/256");
/// # Ok::<(), qbound::FormatError>(())
/// ```
#[must_use]
pub fn ulp(f: Format) -> Num {
    pow2(-i64::from(f.frac_bits()))
}

/// The exact range of a format, `[min, max]`.
///
/// ```
/// // Q7.8: -128 ..= 127.99609375 (common practice: the 16-bit Q7.8 range).
/// let r = qbound_report::arith::format_range(qbound::Format::signed(7, 8)?);
/// assert_eq!((r.lo.decimal_text(), r.hi.decimal_text()), ("-128".into(), "127.99609375".into()));
/// # Ok::<(), qbound::FormatError>(())
/// ```
#[must_use]
pub fn format_range(f: Format) -> Interval {
    Interval::new(
        wide_value(f.min_bits(), f.frac_bits()),
        wide_value(f.max_bits(), f.frac_bits()),
    )
}

/// A [`Wide`] integer as a [`Num`].
#[must_use]
pub fn wide_to_num(w: Wide) -> Num {
    if let Some(i) = w.to_i128() {
        Num::from_i128(i)
    } else if let Some(u) = w.to_u128() {
        Num::from_u128(u)
    } else {
        // Below i128::MIN: low bits minus 2^128.
        Num::from_u128(w.low_bits()) - Num::pow2(128)
    }
}

/// `bits × 2^-frac` exactly.
#[must_use]
pub fn wide_value(bits: Wide, frac: u32) -> Num {
    wide_to_num(bits).mul_pow2(-i64::from(frac))
}

/// The exact value of a [`QValue`].
#[must_use]
pub fn qvalue_to_num(v: QValue) -> Num {
    wide_value(v.bits(), v.format().frac_bits())
}

/// The [`QValue`] of `format` whose value is `x`, if `x` lies on the
/// format's grid and in its range.
#[must_use]
pub fn num_to_qvalue(x: &Num, format: Format) -> Option<QValue> {
    let scaled = x.mul_pow2(i64::from(format.frac_bits()));
    let n = scaled.to_ibig()?;
    let bits = if format.is_signed() {
        Wide::from_i128(i128::try_from(&n).ok()?)
    } else {
        Wide::from_u128(u128::try_from(&n).ok()?)
    };
    QValue::new(format, bits).ok()
}

/// Round `x` to a multiple of `2^-frac` with a deterministic rounding mode,
/// exactly as the library's kernel rounds a value with more fraction bits.
/// The stochastic mode rounds down here; callers that need both neighbours
/// use [`floor_to_grid`] and [`ceil_to_grid`].
///
/// ```
/// use qbound::Rounding;
/// use qbound_report::arith::{Num, round_to_grid};
/// let x: Num = "0.375".parse()?;                 // 3/8, a tie between 1/4 and 1/2
/// assert_eq!(round_to_grid(&x, 2, Rounding::NearestTiesEven).to_string(), "1/2");
/// assert_eq!(round_to_grid(&x, 2, Rounding::Floor).to_string(), "1/4");
/// # Ok::<(), qbound_report::arith::NumParseError>(())
/// ```
#[must_use]
pub fn round_to_grid(x: &Num, frac: u32, mode: Rounding) -> Num {
    let scaled = x.mul_pow2(i64::from(frac));
    if scaled.is_integer() {
        return x.clone();
    }
    let fl = scaled.floor();
    let r = &scaled - &fl; // in (0, 1)
    let half = r.mul_pow2(1).cmp(&Num::ONE);
    let neg = x.is_negative();
    let odd = fl.is_odd_integer();
    let up = match mode {
        Rounding::Floor | Rounding::Stochastic(_) => false,
        Rounding::Ceil => true,
        Rounding::TowardZero => neg,
        Rounding::AwayFromZero => !neg,
        Rounding::NearestTiesUp => half.is_ge(),
        Rounding::NearestTiesAway => half.is_gt() || (half.is_eq() && !neg),
        Rounding::NearestTiesEven => half.is_gt() || (half.is_eq() && odd),
        Rounding::ToOdd => !odd,
    };
    let q = if up { fl + Num::ONE } else { fl };
    q.mul_pow2(-i64::from(frac))
}

/// The largest multiple of `2^-frac` that is `<= x`.
#[must_use]
pub fn floor_to_grid(x: &Num, frac: u32) -> Num {
    round_to_grid(x, frac, Rounding::Floor)
}

/// The smallest multiple of `2^-frac` that is `>= x`.
#[must_use]
pub fn ceil_to_grid(x: &Num, frac: u32) -> Num {
    round_to_grid(x, frac, Rounding::Ceil)
}
