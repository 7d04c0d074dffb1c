//! Exact arithmetic helpers: intervals of rationals, exact decimal text,
//! rounding of a rational to a format's grid, and conversions between
//! [`QValue`] and [`Rational`].
//!
//! Every bound in the audit is computed here, with `rug` rationals: no
//! floating point touches a bound. `f64` appears only in display and
//! statistics fields.

use qbound::{Format, QValue, Rounding, Wide};
use rug::{Integer, Rational};

/// A closed interval `[lo, hi]` of exact rationals.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Interval {
    /// Lower end.
    pub lo: Rational,
    /// Upper end.
    pub hi: Rational,
}

impl Interval {
    /// `[lo, hi]`; the caller guarantees `lo <= hi`.
    #[must_use]
    pub fn new(lo: Rational, hi: Rational) -> Interval {
        debug_assert!(lo <= hi);
        Interval { lo, hi }
    }

    /// The one-point interval `[x, x]`.
    #[must_use]
    pub fn point(x: Rational) -> Interval {
        Interval {
            lo: x.clone(),
            hi: x,
        }
    }

    /// `[0, 0]`.
    #[must_use]
    pub fn zero() -> Interval {
        Interval::point(Rational::new())
    }

    /// Whether this is `[0, 0]`.
    #[must_use]
    pub fn is_zero(&self) -> bool {
        self.lo.is_zero() && self.hi.is_zero()
    }

    /// Sum of intervals.
    #[must_use]
    pub fn add(&self, o: &Interval) -> Interval {
        Interval {
            lo: Rational::from(&self.lo + &o.lo),
            hi: Rational::from(&self.hi + &o.hi),
        }
    }

    /// Difference of intervals.
    #[must_use]
    pub fn sub(&self, o: &Interval) -> Interval {
        Interval {
            lo: Rational::from(&self.lo - &o.hi),
            hi: Rational::from(&self.hi - &o.lo),
        }
    }

    /// Negation.
    #[must_use]
    pub fn neg(&self) -> Interval {
        Interval {
            lo: Rational::from(-&self.hi),
            hi: Rational::from(-&self.lo),
        }
    }

    /// Product: the hull of the four corner products, found from the signs
    /// of the ends (two multiplications unless both intervals hold 0).
    #[must_use]
    pub fn mul(&self, o: &Interval) -> Interval {
        if self.lo == self.hi && o.lo == o.hi {
            return Interval::point(Rational::from(&self.lo * &o.lo));
        }
        let p = |x: &Rational, y: &Rational| Rational::from(x * y);
        let (a, b) = (self, o);
        let (lo, hi) = if !a.lo.is_negative() {
            if !b.lo.is_negative() {
                (p(&a.lo, &b.lo), p(&a.hi, &b.hi))
            } else if !b.hi.is_positive() {
                (p(&a.hi, &b.lo), p(&a.lo, &b.hi))
            } else {
                (p(&a.hi, &b.lo), p(&a.hi, &b.hi))
            }
        } else if !a.hi.is_positive() {
            if !b.lo.is_negative() {
                (p(&a.lo, &b.hi), p(&a.hi, &b.lo))
            } else if !b.hi.is_positive() {
                (p(&a.hi, &b.hi), p(&a.lo, &b.lo))
            } else {
                (p(&a.lo, &b.hi), p(&a.lo, &b.lo))
            }
        } else if !b.lo.is_negative() {
            (p(&a.lo, &b.hi), p(&a.hi, &b.hi))
        } else if !b.hi.is_positive() {
            (p(&a.hi, &b.lo), p(&a.lo, &b.lo))
        } else {
            (
                p(&a.lo, &b.hi).min(p(&a.hi, &b.lo)),
                p(&a.lo, &b.lo).max(p(&a.hi, &b.hi)),
            )
        };
        Interval { lo, hi }
    }

    /// Product with an exact number.
    #[must_use]
    pub fn scale(&self, k: &Rational) -> Interval {
        let a = Rational::from(&self.lo * k);
        let b = Rational::from(&self.hi * k);
        if k.is_negative() {
            Interval { lo: b, hi: a }
        } else {
            Interval { lo: a, hi: b }
        }
    }

    /// The smallest interval holding both.
    #[must_use]
    pub fn hull(&self, o: &Interval) -> Interval {
        Interval {
            lo: if self.lo <= o.lo {
                self.lo.clone()
            } else {
                o.lo.clone()
            },
            hi: if self.hi >= o.hi {
                self.hi.clone()
            } else {
                o.hi.clone()
            },
        }
    }

    /// The intersection, or `None` if empty.
    #[must_use]
    pub fn intersect(&self, o: &Interval) -> Option<Interval> {
        let lo = if self.lo >= o.lo { &self.lo } else { &o.lo };
        let hi = if self.hi <= o.hi { &self.hi } else { &o.hi };
        (lo <= hi).then(|| Interval::new(lo.clone(), hi.clone()))
    }

    /// `max(|lo|, |hi|)`.
    #[must_use]
    pub fn max_abs(&self) -> Rational {
        let a = Rational::from(self.lo.abs_ref());
        let b = Rational::from(self.hi.abs_ref());
        if a >= b { a } else { b }
    }

    /// Whether `x` lies in the interval.
    #[must_use]
    pub fn contains(&self, x: &Rational) -> bool {
        self.lo <= *x && *x <= self.hi
    }
}

/// `2^e` for any integer `e`.
#[must_use]
pub fn pow2(e: i64) -> Rational {
    let one = Integer::from(1);
    if e >= 0 {
        Rational::from(one << u32::try_from(e).expect("exponent fits u32"))
    } else {
        Rational::from((
            one,
            Integer::from(1) << u32::try_from(-e).expect("exponent fits u32"),
        ))
    }
}

/// The step (ulp) of a format, `2^-F`.
#[must_use]
pub fn ulp(f: Format) -> Rational {
    pow2(-i64::from(f.frac_bits()))
}

/// The exact range of a format, `[min, max]`.
#[must_use]
pub fn format_range(f: Format) -> Interval {
    Interval::new(
        wide_value(f.min_bits(), f.frac_bits()),
        wide_value(f.max_bits(), f.frac_bits()),
    )
}

/// A [`Wide`] integer as a `rug` integer.
#[must_use]
pub fn wide_to_integer(w: Wide) -> Integer {
    let lo = Integer::from(w.low_bits());
    if w.is_negative() {
        lo - (Integer::from(1) << 128u32)
    } else {
        lo
    }
}

/// `bits × 2^-frac` exactly.
#[must_use]
pub fn wide_value(bits: Wide, frac: u32) -> Rational {
    Rational::from(wide_to_integer(bits)) * pow2(-i64::from(frac))
}

/// The exact value of a [`QValue`].
#[must_use]
pub fn qvalue_to_rational(v: QValue) -> Rational {
    wide_value(v.bits(), v.format().frac_bits())
}

/// The [`QValue`] of `format` whose value is `x`, if `x` lies on the
/// format's grid and in its range.
#[must_use]
pub fn rational_to_qvalue(x: &Rational, format: Format) -> Option<QValue> {
    let scaled = x * pow2(i64::from(format.frac_bits()));
    if *scaled.denom() != 1 {
        return None;
    }
    let n = scaled.numer();
    let bits = if format.is_signed() {
        Wide::from_i128(n.to_i128()?)
    } else {
        Wide::from_u128(n.to_u128()?)
    };
    QValue::new(format, bits).ok()
}

/// Round the rational `x` to a multiple of `2^-frac` with a deterministic
/// rounding mode, exactly as the library's kernel would round a value with
/// more fraction bits. The stochastic mode rounds down here; callers that
/// need both neighbours use [`floor_to_grid`] and [`ceil_to_grid`].
#[must_use]
pub fn round_to_grid(x: &Rational, frac: u32, mode: Rounding) -> Rational {
    let scaled = Rational::from(x << frac);
    if *scaled.denom() == 1 {
        return x.clone();
    }
    let (r, fl) = scaled.fract_floor(Integer::new()); // r in (0, 1)
    let half = Rational::from((1, 2));
    let neg = x.is_negative();
    let odd = fl.is_odd();
    let up = match mode {
        Rounding::Floor | Rounding::Stochastic(_) => false,
        Rounding::Ceil => true,
        Rounding::TowardZero => neg,
        Rounding::AwayFromZero => !neg,
        Rounding::NearestTiesUp => r >= half,
        Rounding::NearestTiesAway => r > half || (r == half && !neg),
        Rounding::NearestTiesEven => r > half || (r == half && odd),
        Rounding::ToOdd => !odd,
    };
    let q = if up { fl + 1u32 } else { fl };
    Rational::from(q) >> frac
}

/// The largest multiple of `2^-frac` that is `<= x`.
#[must_use]
pub fn floor_to_grid(x: &Rational, frac: u32) -> Rational {
    round_to_grid(x, frac, Rounding::Floor)
}

/// The smallest multiple of `2^-frac` that is `>= x`.
#[must_use]
pub fn ceil_to_grid(x: &Rational, frac: u32) -> Rational {
    round_to_grid(x, frac, Rounding::Ceil)
}

/// Parse an exact decimal: optional sign, digits with an optional
/// fraction, optional exponent (`-1.25`, `0.1`, `3e-4`, `.5`). Returns
/// `None` for anything else.
#[must_use]
pub fn parse_decimal(s: &str) -> Option<Rational> {
    let b = s.as_bytes();
    let mut i = 0;
    let neg = match b.first() {
        Some(b'-') => {
            i = 1;
            true
        }
        Some(b'+') => {
            i = 1;
            false
        }
        _ => false,
    };
    let mut mant = Integer::new();
    let mut digits = 0usize;
    let mut scale: i64 = 0;
    while i < b.len() && b[i].is_ascii_digit() {
        mant = mant * 10u32 + u32::from(b[i] - b'0');
        digits += 1;
        i += 1;
    }
    if i < b.len() && b[i] == b'.' {
        i += 1;
        while i < b.len() && b[i].is_ascii_digit() {
            mant = mant * 10u32 + u32::from(b[i] - b'0');
            digits += 1;
            scale -= 1;
            i += 1;
        }
    }
    if digits == 0 {
        return None;
    }
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        i += 1;
        let (eneg, start) = match b.get(i) {
            Some(b'-') => (true, i + 1),
            Some(b'+') => (false, i + 1),
            _ => (false, i),
        };
        let digits = s.get(start..)?;
        if digits.is_empty() || digits.len() > 4 || !digits.bytes().all(|c| c.is_ascii_digit()) {
            return None;
        }
        let e: i64 = digits.parse().ok()?;
        scale += if eneg { -e } else { e };
        i = b.len();
    }
    if i != b.len() {
        return None;
    }
    let p = Integer::from(Integer::u_pow_u(
        10,
        u32::try_from(scale.unsigned_abs()).ok()?,
    ));
    let mut v = if scale >= 0 {
        Rational::from(mant * p)
    } else {
        Rational::from((mant, p))
    };
    if neg {
        v = -v;
    }
    Some(v)
}

/// A rational as `f64` (for display and statistics only).
#[must_use]
pub fn to_f64(x: &Rational) -> f64 {
    x.to_f64()
}
