//! [`QValue`]: a fixed-point value whose format is known at run time (read
//! from a configuration, chosen by the audit), computed with the same
//! kernels as the typed values.

use core::cmp::Ordering;

use crate::format::{Format, FormatError};
use crate::kernel::{self, Fitted};
use crate::overflow::{Overflow, RangeError, Side};
use crate::rounding::Rounding;
use crate::storage::{Storage, Wide};

/// A fixed-point value with a run-time [`Format`].
///
/// Equality and ordering compare the exact values, whatever the formats.
///
/// ```
/// use qbound::{Format, QValue, Rounding, Overflow};
/// let q15 = Format::signed(0, 15)?;
/// let x = QValue::from_i128_bits(q15, 0x4000)?;  // 0.5
/// let p = x.exact_mul(x)?;                       // 0.25 in Q1.30
/// assert_eq!(p.format(), Format::signed(1, 30)?);
/// let r = p.rescale(q15, Rounding::NearestTiesEven, Overflow::Saturate);
/// assert_eq!(r.to_i128_bits(), Some(0x2000));
/// assert_eq!(r, p);
/// # Ok::<(), Box<dyn core::error::Error>>(())
/// ```
#[derive(Clone, Copy)]
pub struct QValue {
    format: Format,
    bits: Wide,
}

/// Run `$body` with `$x` bound to the value's bits in its native 128-bit
/// storage (`i128` for signed formats, `u128` for unsigned).
macro_rules! with_bits {
    ($v:expr, |$x:ident| $body:expr) => {
        if $v.format.is_signed() {
            let $x: i128 = $v.bits.low_bits() as i128;
            $body
        } else {
            let $x: u128 = $v.bits.low_bits();
            $body
        }
    };
}

/// Run `$body` with `$D` naming the 128-bit storage of format `$f`.
macro_rules! with_storage {
    ($f:expr, $D:ident => $body:expr) => {
        if $f.is_signed() {
            type $D = i128;
            $body
        } else {
            type $D = u128;
            $body
        }
    };
}
pub(crate) use with_storage;

impl QValue {
    pub(crate) const fn from_wide_unchecked(format: Format, bits: Wide) -> QValue {
        QValue { format, bits }
    }

    /// The value `bits × 2^-F` of `format`, or an error if the bits lie
    /// outside the format's range.
    ///
    /// ```
    /// use qbound::{Format, QValue, Wide};
    /// let f = Format::unsigned(128, 0)?;
    /// assert!(QValue::new(f, Wide::from_u128(u128::MAX)).is_ok());
    /// assert!(QValue::new(f, Wide::from_i128(-1)).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn new(format: Format, bits: Wide) -> Result<QValue, RangeError> {
        if bits > format.max_bits() {
            Err(RangeError::new(format, Side::Above))
        } else if bits < format.min_bits() {
            Err(RangeError::new(format, Side::Below))
        } else {
            Ok(QValue { format, bits })
        }
    }

    /// Like [`QValue::new`] with the bits as `i128`.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let f = Format::signed(3, 4)?;
    /// assert!(QValue::from_i128_bits(f, 127).is_ok());
    /// assert!(QValue::from_i128_bits(f, 128).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn from_i128_bits(format: Format, bits: i128) -> Result<QValue, RangeError> {
        QValue::new(format, Wide::from_i128(bits))
    }

    /// Zero in `format`.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert!(QValue::zero(Format::signed(3, 4)?).is_zero());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn zero(format: Format) -> QValue {
        QValue {
            format,
            bits: Wide::ZERO,
        }
    }

    /// The smallest value of `format`.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert_eq!(QValue::min(Format::signed(7, 8)?).to_i128_bits(), Some(-32768));
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn min(format: Format) -> QValue {
        QValue {
            format,
            bits: format.min_bits(),
        }
    }

    /// The largest value of `format`.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert_eq!(QValue::max(Format::signed(7, 8)?).to_i128_bits(), Some(32767));
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn max(format: Format) -> QValue {
        QValue {
            format,
            bits: format.max_bits(),
        }
    }

    /// The format.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let f = Format::signed(3, 4)?;
    /// assert_eq!(QValue::zero(f).format(), f);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn format(self) -> Format {
        self.format
    }

    /// The stored integer, exactly.
    ///
    /// ```
    /// use qbound::{Format, QValue, Wide};
    /// let v = QValue::max(Format::unsigned(128, 0)?);
    /// assert_eq!(v.bits(), Wide::from_u128(u128::MAX));
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn bits(self) -> Wide {
        self.bits
    }

    /// The stored integer as `i128`, if it fits.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert_eq!(QValue::max(Format::unsigned(128, 0)?).to_i128_bits(), None);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn to_i128_bits(self) -> Option<i128> {
        self.bits.to_i128()
    }

    /// Whether the value is zero.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert!(!QValue::max(Format::signed(0, 0)?).is_zero() || true);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub fn is_zero(self) -> bool {
        self.bits == Wide::ZERO
    }

    /// Whether the value is below zero.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert!(QValue::min(Format::signed(0, 0)?).is_negative());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn is_negative(self) -> bool {
        self.bits.is_negative()
    }

    /// A kernel's result in `dst`, with an overflow mode applied.
    pub(crate) fn finish<D: Storage>(f: Fitted<D>, dst: Format, overflow: Overflow) -> QValue {
        QValue {
            format: dst,
            bits: f.resolve(dst, overflow).to_wide(),
        }
    }

    /// A kernel's result in `dst`, or the side it fell on if it does not fit.
    pub(crate) fn finish_checked<D: Storage>(
        f: Fitted<D>,
        dst: Format,
    ) -> Result<QValue, RangeError> {
        f.checked(dst).map(|b| QValue {
            format: dst,
            bits: b.to_wide(),
        })
    }

    /// Round into `dst` with a rounding mode and an overflow mode (the same
    /// kernel as the typed `rescale`).
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let x = QValue::from_i128_bits(Format::signed(7, 1)?, 5)?; // 2.5
    /// let y = x.rescale(Format::signed(7, 0)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(y.to_i128_bits(), Some(2));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    #[track_caller]
    #[must_use]
    pub fn rescale(self, dst: Format, rounding: Rounding, overflow: Overflow) -> QValue {
        with_bits!(self, |x| with_storage!(dst, D => {
            Self::finish(kernel::rescale::<_, D>(x, self.format.frac_bits(), dst, rounding), dst, overflow)
        }))
    }

    /// Round into `dst`; an error if the rounded value does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding};
    /// let x = QValue::max(Format::signed(7, 8)?);
    /// assert!(x.try_rescale(Format::signed(3, 8)?, Rounding::Floor).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_rescale(self, dst: Format, rounding: Rounding) -> Result<QValue, RangeError> {
        with_bits!(self, |x| with_storage!(dst, D => {
            Self::finish_checked(kernel::rescale::<_, D>(x, self.format.frac_bits(), dst, rounding), dst)
        }))
    }

    /// The exact sum, in the format [`Format::sum`] gives; an error if that
    /// format would pass 128 bits.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let a = QValue::max(Format::unsigned(4, 0)?);
    /// let s = a.exact_add(a)?;
    /// assert_eq!(s.format(), Format::unsigned(5, 0)?);
    /// assert_eq!(s.to_i128_bits(), Some(30));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    pub fn exact_add(self, rhs: QValue) -> Result<QValue, FormatError> {
        let dst = Format::sum(self.format, rhs.format)?;
        let (fa, fb) = (self.format.frac_bits(), rhs.format.frac_bits());
        Ok(with_bits!(self, |a| with_bits!(
            rhs,
            |b| with_storage!(dst, D => {
                QValue { format: dst, bits: kernel::add::<_, _, D>(a, fa, b, fb, dst).to_wide() }
            })
        )))
    }

    /// The exact difference, in the format [`Format::difference`] gives.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let a = QValue::zero(Format::unsigned(4, 0)?);
    /// let b = QValue::max(Format::unsigned(4, 0)?);
    /// assert_eq!(a.exact_sub(b)?.to_i128_bits(), Some(-15));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    pub fn exact_sub(self, rhs: QValue) -> Result<QValue, FormatError> {
        let dst = Format::difference(self.format, rhs.format)?;
        let (fa, fb) = (self.format.frac_bits(), rhs.format.frac_bits());
        Ok(with_bits!(self, |a| with_bits!(
            rhs,
            |b| with_storage!(dst, D => {
                QValue { format: dst, bits: kernel::sub::<_, _, D>(a, fa, b, fb, dst).to_wide() }
            })
        )))
    }

    /// The exact product, in the format [`Format::product`] gives.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let a = QValue::min(Format::signed(0, 7)?); // -1
    /// assert_eq!(a.exact_mul(a)?.to_i128_bits(), Some(1 << 14)); // 1.0 in Q1.14
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    pub fn exact_mul(self, rhs: QValue) -> Result<QValue, FormatError> {
        let dst = Format::product(self.format, rhs.format)?;
        Ok(with_bits!(self, |a| with_bits!(
            rhs,
            |b| with_storage!(dst, D => {
                QValue { format: dst, bits: kernel::mul::<_, _, D>(a, b).to_wide() }
            })
        )))
    }

    /// The exact negation, in the format [`Format::negation`] gives.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let a = QValue::min(Format::signed(3, 0)?);
    /// assert_eq!(a.exact_neg()?.to_i128_bits(), Some(8));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    pub fn exact_neg(self) -> Result<QValue, FormatError> {
        let dst = Format::negation(self.format)?;
        Ok(with_bits!(self, |a| with_storage!(dst, D => {
            QValue { format: dst, bits: kernel::neg::<_, D>(a).to_wide() }
        })))
    }

    /// The product rounded into `dst`, for any operand formats (the exact
    /// product may use up to 257 bits).
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded product does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let f = Format::signed(0, 127)?;
    /// let half = QValue::from_i128_bits(f, 1 << 126)?;
    /// let q = half.mul_rescale(half, f, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(q.to_i128_bits(), Some(1 << 125));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    #[track_caller]
    #[must_use]
    pub fn mul_rescale(
        self,
        rhs: QValue,
        dst: Format,
        rounding: Rounding,
        overflow: Overflow,
    ) -> QValue {
        let (fa, fb) = (self.format, rhs.format);
        with_bits!(self, |a| with_bits!(rhs, |b| with_storage!(dst, D => {
            Self::finish(kernel::mul_rescale::<_, _, D>(a, fa, b, fb, dst, rounding), dst, overflow)
        })))
    }

    /// The product rounded into `dst`, or an error if it does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding};
    /// let f = Format::signed(0, 15)?;
    /// let m = QValue::min(f);
    /// assert!(m.try_mul_rescale(m, f, Rounding::Floor).is_err()); // (-1)² = 1 does not fit
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_mul_rescale(
        self,
        rhs: QValue,
        dst: Format,
        rounding: Rounding,
    ) -> Result<QValue, RangeError> {
        let (fa, fb) = (self.format, rhs.format);
        with_bits!(self, |a| with_bits!(rhs, |b| with_storage!(dst, D => {
            Self::finish_checked(kernel::mul_rescale::<_, _, D>(a, fa, b, fb, dst, rounding), dst)
        })))
    }
}

impl PartialEq for QValue {
    /// Equal values, whatever the formats.
    fn eq(&self, other: &QValue) -> bool {
        self.cmp(other) == Ordering::Equal
    }
}

impl Eq for QValue {}

impl PartialOrd for QValue {
    fn partial_cmp(&self, other: &QValue) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for QValue {
    /// Orders by exact value, whatever the formats.
    fn cmp(&self, other: &QValue) -> Ordering {
        let (fa, fb) = (self.format.frac_bits(), other.format.frac_bits());
        with_bits!(self, |a| with_bits!(other, |b| kernel::cmp(a, fa, b, fb)))
    }
}
