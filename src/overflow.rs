//! Overflow modes and the error type for values that do not fit.

use core::fmt;

use crate::format::Format;

/// What happens when a result does not fit its format.
///
/// ```
/// use qbound::{Overflow, Rounding, Q};
/// let big = Q::<7, 8>::from_bits(0x7fff); // 127.99609375
/// let sat: Q<3, 8> = big.rescale(Rounding::Floor, Overflow::Saturate);
/// assert_eq!(sat, Q::<3, 8>::MAX);
/// let wrapped: Q<3, 8> = big.rescale(Rounding::Floor, Overflow::Wrap);
/// assert_eq!(wrapped.to_bits(), -1); // the low 12 bits of 0x7fff
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub enum Overflow {
    /// Keep the low bits (two's complement wrap-around, as C integer
    /// arithmetic on a register of the format's width does).
    Wrap,
    /// Clamp to the format's minimum or maximum.
    Saturate,
    /// Clamp to `[-MAX, MAX]`: the result is never the most negative value,
    /// so negating it cannot overflow. For unsigned formats the same as
    /// [`Overflow::Saturate`].
    SaturateSymmetric,
    /// Panic with a message that names the target format.
    Panic,
}

impl Overflow {
    /// Every mode.
    ///
    /// ```
    /// assert_eq!(qbound::Overflow::ALL.len(), 4);
    /// ```
    pub const ALL: [Overflow; 4] = [
        Overflow::Wrap,
        Overflow::Saturate,
        Overflow::SaturateSymmetric,
        Overflow::Panic,
    ];

    /// A short lowercase name: `wrap`, `saturate`, `saturate-symmetric`,
    /// `panic`.
    ///
    /// ```
    /// assert_eq!(qbound::Overflow::Saturate.name(), "saturate");
    /// ```
    #[must_use]
    pub const fn name(self) -> &'static str {
        match self {
            Overflow::Wrap => "wrap",
            Overflow::Saturate => "saturate",
            Overflow::SaturateSymmetric => "saturate-symmetric",
            Overflow::Panic => "panic",
        }
    }

    /// The mode named by [`Overflow::name`].
    ///
    /// ```
    /// assert_eq!(qbound::Overflow::from_name("wrap"), Some(qbound::Overflow::Wrap));
    /// ```
    #[must_use]
    pub fn from_name(name: &str) -> Option<Overflow> {
        Overflow::ALL.into_iter().find(|o| o.name() == name)
    }
}

/// Which side of the format's range a value fell on.
///
/// ```
/// use qbound::{Q, RangeError, Side, Rounding};
/// let x = Q::<7, 8>::from_bits(-0x8000);
/// let r: Result<Q<3, 8>, RangeError> = x.try_rescale(Rounding::Floor);
/// assert_eq!(r.unwrap_err().side(), Side::Below);
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub enum Side {
    /// Below the format's minimum.
    Below,
    /// Above the format's maximum.
    Above,
}

/// A value did not fit its target format.
///
/// ```
/// use qbound::{Q, Rounding};
/// let e = Q::<7, 8>::MAX.try_rescale::<Q<0, 8>>(Rounding::Floor).unwrap_err();
/// assert_eq!(e.to_string(), "value above the largest value of Q0.8");
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub struct RangeError {
    format: Format,
    side: Side,
}

impl RangeError {
    pub(crate) const fn new(format: Format, side: Side) -> RangeError {
        RangeError { format, side }
    }

    /// The format the value did not fit.
    ///
    /// ```
    /// use qbound::{Q, Rounding, QType};
    /// let e = Q::<7, 8>::MAX.try_rescale::<Q<0, 8>>(Rounding::Floor).unwrap_err();
    /// assert_eq!(e.format(), Q::<0, 8>::FORMAT);
    /// ```
    #[must_use]
    pub const fn format(&self) -> Format {
        self.format
    }

    /// Whether the value was above or below the range.
    ///
    /// ```
    /// use qbound::{Q, Rounding, Side};
    /// let e = Q::<7, 8>::MAX.try_rescale::<Q<0, 8>>(Rounding::Floor).unwrap_err();
    /// assert_eq!(e.side(), Side::Above);
    /// ```
    #[must_use]
    pub const fn side(&self) -> Side {
        self.side
    }
}

impl fmt::Display for RangeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.side {
            Side::Above => write!(f, "value above the largest value of {}", self.format),
            Side::Below => write!(f, "value below the smallest value of {}", self.format),
        }
    }
}

impl core::error::Error for RangeError {}
