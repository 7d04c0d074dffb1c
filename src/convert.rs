//! Conversions between fixed-point values and Rust's primitive numbers.
//!
//! # Choosing a conversion
//!
//! Every conversion is one of three kinds, and the name says which:
//!
//! - **Exact**: the result holds every value of the source, so nothing can
//!   be lost. These are `From` impls (an `i8` into any `Q<I, F>` with
//!   `I >= 7`) and plain methods ([`Sq::to_f64`] for formats of at most 53
//!   significant bits is exact; see its docs). Use them freely.
//! - **Rounded**: the source has more precision or more range than the
//!   target. These take a [`Rounding`] mode for the fraction bits and an
//!   [`Overflow`] mode for the integer bits, and never fail except on NaN
//!   and infinities: [`Sq::from_int`], [`Sq::to_int`], [`Sq::from_f64`],
//!   [`Sq::from_f32`]. Pick the modes the firmware uses, so the model is
//!   bit-exact.
//! - **Checked**: the same rounding, but a value that does not fit is an
//!   error ([`RangeError`], [`FloatError`]) instead of being wrapped or
//!   clamped: [`Sq::try_from_int`], [`Sq::checked_from_int`],
//!   [`Sq::try_to_int`], [`Sq::try_from_f64`]. Use them at trust
//!   boundaries: configuration files, host-side tools, test vectors.
//!
//! Float to fixed is *exact, then rounded*: the float's bits are decomposed
//! into an integer times a power of two, and that exact value is rounded
//! once into the format, with integer operations only. Fixed to float is
//! correctly rounded (IEEE 754 roundTiesToEven); a value beyond `f32::MAX`
//! becomes infinity, as IEEE 754 overflow under that rounding prescribes.
//!
//! The same kernels serve the typed values ([`Sq`], [`Uq`]) and the
//! run-time [`QValue`].

use core::fmt;

use typenum::Unsigned;

use crate::format::Format;
use crate::kernel::{self, Fitted};
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::overflow::{Overflow, RangeError, Side};
use crate::rounding::Rounding;
use crate::storage::{Storage, Wide};
use crate::typed::{QType, Sq, Uq};
use crate::value::{QValue, with_storage};

// ---------------------------------------------------------------------------
// The exact-then-round kernel shared by float conversion, parsing and the
// const constructors. Everything here is `const fn`.
// ---------------------------------------------------------------------------

/// An exact real value scaled to a target's step (`|x| * 2^F`), split into
/// its integer part and what lies below, before rounding.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Scaled {
    /// The value is below zero.
    pub neg: bool,
    /// `floor(|x| * 2^F)` modulo `2^128`.
    pub mag: u128,
    /// `floor(|x| * 2^F) >= 2^128`.
    pub over: bool,
    /// The 64 bits below the step: `floor(frac * 2^64)` of the fraction of
    /// a step that `mag` drops.
    pub frac64: u64,
    /// Something nonzero lies below those 64 bits.
    pub sticky: bool,
}

impl Scaled {
    pub(crate) const ZERO: Scaled = Scaled {
        neg: false,
        mag: 0,
        over: false,
        frac64: 0,
        sticky: false,
    };

    /// `|x| = m * 2^e` (`m` an integer), scaled by `2^frac`.
    pub(crate) const fn from_dyadic(neg: bool, m: u128, e: i64, frac: u32) -> Scaled {
        let mut s = Scaled::ZERO;
        s.neg = neg;
        if m == 0 {
            return s;
        }
        let shift = e + frac as i64;
        if shift >= 0 {
            if shift >= 128 {
                s.over = true;
            } else {
                let k = shift as u32;
                s.mag = m << k;
                s.over = k > 0 && (m >> (128 - k)) != 0;
            }
        } else {
            // Discard the low k bits of m.
            let k = if shift < -1000 { 1000 } else { (-shift) as u32 };
            s.mag = if k >= 128 { 0 } else { m >> k };
            // The discarded bits r = m mod 2^k as a fraction r / 2^k.
            let r = if k >= 128 { m } else { m & ((1u128 << k) - 1) };
            if k <= 64 {
                s.frac64 = (r << (64 - k)) as u64;
            } else {
                let d = k - 64; // bits of r below the 64-bit window
                s.frac64 = if d >= 128 { 0 } else { (r >> d) as u64 };
                s.sticky = if d >= 128 {
                    r != 0
                } else {
                    r & ((1u128 << d) - 1) != 0
                };
            }
        }
        s
    }
}

/// Whether rounding the magnitude `mag + frac` (the value's sign is `neg`)
/// goes up to `mag + 1`, decided by [`Rounding::rounds_up`] on the value
/// itself. For a positive value the floor is `mag` and the residue `frac`.
/// For a negative inexact value `-(mag + frac)` the floor is `-(mag + 1)`
/// (parity opposite to `mag`'s), the residue is `1 - frac` (so its order
/// against one half is reversed, and its top 64 bits are
/// `2^64 - frac64 - [sticky]`), and rounding the value up keeps the
/// magnitude at `mag`.
const fn magnitude_rounds_up(
    mode: Rounding,
    neg: bool,
    mag_odd: bool,
    frac64: u64,
    sticky: bool,
) -> bool {
    use core::cmp::Ordering;
    const HALF: u64 = 1 << 63;
    if frac64 == 0 && !sticky {
        return false;
    }
    let vs_half = if frac64 > HALF || (frac64 == HALF && sticky) {
        Ordering::Greater
    } else if frac64 == HALF {
        Ordering::Equal
    } else {
        Ordering::Less
    };
    if !neg {
        return mode.rounds_up(false, vs_half, frac64, mag_odd, false);
    }
    // Inexact here, so 1 <= 2^64 - frac64 - [sticky] <= 2^64 - 1.
    let value_frac64 = ((1u128 << 64) - frac64 as u128 - sticky as u128) as u64;
    !mode.rounds_up(false, vs_half.reverse(), value_frac64, !mag_odd, true)
}

/// Round a scaled value into `f`: the result's low 128 bits (already
/// reduced modulo `2^width` and sign- or zero-extended, which is what
/// wrap-around gives) and, if the rounded value lies outside the format,
/// on which side.
pub(crate) const fn fit(s: Scaled, mode: Rounding, f: Format) -> (u128, Option<Side>) {
    let up = magnitude_rounds_up(mode, s.neg, s.mag & 1 == 1, s.frac64, s.sticky);
    let (m, carry) = s.mag.overflowing_add(up as u128);
    let over = s.over || carry;
    let width = f.width();
    let side = if m == 0 && !over {
        None
    } else if !s.neg {
        if over || m > f.max_bits().low_bits() {
            Some(Side::Above)
        } else {
            None
        }
    } else if !f.is_signed() || over || m > (1u128 << (width - 1)) {
        Some(Side::Below)
    } else {
        None
    };
    let low = if s.neg { m.wrapping_neg() } else { m };
    let sh = 128 - width;
    let wrapped = if sh == 0 {
        low
    } else if f.is_signed() {
        (((low << sh) as i128) >> sh) as u128
    } else {
        (low << sh) >> sh
    };
    (wrapped, side)
}

/// [`fit`] as the kernels' [`Fitted`], ready for an overflow mode.
#[inline]
pub(crate) fn fitted<D: Storage>(s: Scaled, mode: Rounding, f: Format) -> Fitted<D> {
    let (wrapped, side) = fit(s, mode, f);
    Fitted {
        wrapped: D::from_u128_bits(wrapped),
        side,
    }
}

/// The exact value of wrapped low bits in format `f`.
pub(crate) const fn wide_of(low: u128, f: Format) -> Wide {
    if f.is_signed() {
        Wide::from_i128(low as i128)
    } else {
        Wide::from_u128(low)
    }
}

// ---------------------------------------------------------------------------
// Floats: decomposition (float -> exact dyadic) and correctly rounded
// composition (exact dyadic -> float), on the IEEE 754 bit patterns.
// ---------------------------------------------------------------------------

/// A float that has no fixed-point value, or a value that does not fit.
///
/// ```
/// use qbound::{FloatError, Q, Rounding, Overflow};
/// let e = Q::<7, 8>::from_f64(f64::NAN, Rounding::NearestTiesEven, Overflow::Saturate);
/// assert_eq!(e, Err(FloatError::NaN));
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum FloatError {
    /// The float is NaN.
    NaN,
    /// The float is +∞ or −∞ (the flag says which: `true` for −∞).
    Infinite {
        /// The infinity is −∞.
        negative: bool,
    },
    /// The rounded value lies outside the format (checked conversions
    /// only).
    OutOfRange(RangeError),
}

impl fmt::Display for FloatError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FloatError::NaN => f.write_str("NaN has no fixed-point value"),
            FloatError::Infinite { negative: false } => {
                f.write_str("+infinity has no fixed-point value")
            }
            FloatError::Infinite { negative: true } => {
                f.write_str("-infinity has no fixed-point value")
            }
            FloatError::OutOfRange(e) => fmt::Display::fmt(e, f),
        }
    }
}

impl core::error::Error for FloatError {}

impl From<RangeError> for FloatError {
    fn from(e: RangeError) -> FloatError {
        FloatError::OutOfRange(e)
    }
}

/// The shape of an IEEE 754 binary format.
#[derive(Clone, Copy)]
pub(crate) struct FloatShape {
    /// Significand bits including the hidden bit.
    precision: u32,
    /// Exponent field bits.
    exp_bits: u32,
}

pub(crate) const BINARY32: FloatShape = FloatShape {
    precision: 24,
    exp_bits: 8,
};
pub(crate) const BINARY64: FloatShape = FloatShape {
    precision: 53,
    exp_bits: 11,
};

impl FloatShape {
    const fn bias(self) -> i64 {
        (1 << (self.exp_bits - 1)) - 1
    }

    /// The exact value of a float's bit pattern: `(negative, m, e)` with
    /// value `±m * 2^e`, or the reason it has none.
    pub(crate) const fn decompose(self, bits: u64) -> Result<(bool, u128, i64), FloatError> {
        let frac_bits = self.precision - 1;
        let neg = (bits >> (frac_bits + self.exp_bits)) & 1 == 1;
        let exp_field = ((bits >> frac_bits) & ((1 << self.exp_bits) - 1)) as i64;
        let fraction = (bits & ((1 << frac_bits) - 1)) as u128;
        let max_field = (1 << self.exp_bits) - 1;
        if exp_field == max_field {
            return if fraction == 0 {
                Err(FloatError::Infinite { negative: neg })
            } else {
                Err(FloatError::NaN)
            };
        }
        let min_exp = 1 - self.bias() - frac_bits as i64;
        if exp_field == 0 {
            Ok((neg, fraction, min_exp))
        } else {
            Ok((neg, fraction | (1 << frac_bits), exp_field - 1 + min_exp))
        }
    }

    /// The bit pattern of `±mag * 2^-frac` correctly rounded (ties to
    /// even); overflow gives infinity; zero is `+0.0`.
    pub(crate) const fn compose(self, neg: bool, mag: u128, frac: u32) -> u64 {
        if mag == 0 {
            return 0;
        }
        let p = self.precision as i64;
        let bias = self.bias();
        let sign = (neg as u64) << (self.precision - 1 + self.exp_bits);
        let len = 128 - mag.leading_zeros() as i64;
        let top = len - 1 - frac as i64; // exponent of the leading bit
        let min_normal = 1 - bias;
        // Exponent of the last kept bit (the target's ulp).
        let mut ulp = top - (p - 1);
        if ulp < min_normal - (p - 1) {
            ulp = min_normal - (p - 1);
        }
        let shift = ulp + frac as i64; // low bits of mag to drop
        let mut sig: u128;
        if shift <= 0 {
            sig = mag << (-shift) as u32;
        } else {
            let k = shift as u32;
            sig = if k >= 128 { 0 } else { mag >> k };
            let rem = if k >= 128 {
                mag
            } else {
                mag & ((1u128 << k) - 1)
            };
            let half = if k > 128 { 0 } else { 1u128 << (k - 1) };
            let up = if k > 128 {
                false
            } else {
                rem > half || (rem == half && sig & 1 == 1)
            };
            if up {
                sig += 1;
            }
        }
        if sig >> p != 0 {
            sig >>= 1;
            ulp += 1;
        }
        let hidden = 1u128 << (p - 1);
        if sig < hidden {
            // Subnormal: exponent field zero.
            return sign | sig as u64;
        }
        let field = ulp + (p - 1) + bias;
        if field >= (1 << self.exp_bits) - 1 {
            return sign | (((1u64 << self.exp_bits) - 1) << (p - 1));
        }
        sign | ((field as u64) << (p - 1)) | ((sig - hidden) as u64)
    }
}

/// The exact value of a float scaled to `frac` fraction bits.
pub(crate) const fn scaled_from_float(
    shape: FloatShape,
    bits: u64,
    frac: u32,
) -> Result<Scaled, FloatError> {
    match shape.decompose(bits) {
        Ok((neg, m, e)) => Ok(Scaled::from_dyadic(neg, m, e, frac)),
        Err(e) => Err(e),
    }
}

/// The magnitude and sign of a value's bits.
pub(crate) const fn sign_magnitude(bits: Wide) -> (bool, u128) {
    if bits.is_negative() {
        (true, bits.low_bits().wrapping_neg())
    } else {
        (false, bits.low_bits())
    }
}

/// A value correctly rounded to `f64`.
pub(crate) const fn wide_to_f64(bits: Wide, frac: u32) -> f64 {
    let (neg, mag) = sign_magnitude(bits);
    f64::from_bits(BINARY64.compose(neg, mag, frac))
}

/// A value correctly rounded to `f32`.
pub(crate) const fn wide_to_f32(bits: Wide, frac: u32) -> f32 {
    let (neg, mag) = sign_magnitude(bits);
    f32::from_bits(BINARY32.compose(neg, mag, frac) as u32)
}

// ---------------------------------------------------------------------------
// Primitive integers.
// ---------------------------------------------------------------------------

mod sealed {
    pub trait Sealed {}
}

/// A primitive integer type (`i8`..`i128`, `isize`, `u8`..`u128`, `usize`)
/// that converts to and from fixed-point values. Sealed.
///
/// It is an integer-only fixed-point format: [`PrimitiveInt::FORMAT`] is
/// `Q(bits - 1, 0)` or `UQ(bits, 0)`.
///
/// ```
/// use qbound::{PrimitiveInt, Format};
/// assert_eq!(<i16 as PrimitiveInt>::FORMAT, Format::signed(15, 0)?);
/// assert_eq!(<u8 as PrimitiveInt>::FORMAT, Format::unsigned(8, 0)?);
/// # Ok::<(), qbound::FormatError>(())
/// ```
pub trait PrimitiveInt: Copy + sealed::Sealed {
    /// The integer type as a fixed-point format with no fraction bits.
    const FORMAT: Format;
    #[doc(hidden)]
    type Store: Storage;
    #[doc(hidden)]
    fn to_store(self) -> Self::Store;
    #[doc(hidden)]
    fn from_store(s: Self::Store) -> Self;
}

macro_rules! primitive_int {
    ($($t:ty => $store:ty, $signed:expr);* $(;)?) => {$(
        impl sealed::Sealed for $t {}
        impl PrimitiveInt for $t {
            const FORMAT: Format = Format::new_const($signed, <$t>::BITS - $signed as u32, 0);
            type Store = $store;
            #[inline(always)]
            fn to_store(self) -> $store {
                self as $store
            }
            #[inline(always)]
            fn from_store(s: $store) -> $t {
                s as $t
            }
        }
    )*};
}

primitive_int! {
    i8 => i8, true; i16 => i16, true; i32 => i32, true; i64 => i64, true; i128 => i128, true;
    isize => i128, true;
    u8 => u8, false; u16 => u16, false; u32 => u32, false; u64 => u64, false; u128 => u128, false;
    usize => u128, false;
}

/// `n` into format `f` in storage `D` (exact scaling; only overflow can
/// happen).
#[inline(always)]
pub(crate) fn int_into<N: PrimitiveInt, D: Storage>(n: N, f: Format) -> Fitted<D> {
    kernel::rescale::<N::Store, D>(n.to_store(), 0, f, Rounding::Floor)
}

/// Bits `x` with `frac` fraction bits, rounded to an integer of type `N`.
#[inline(always)]
pub(crate) fn int_from<W: crate::storage::WorkInt, N: PrimitiveInt>(
    x: W,
    frac: u32,
    rounding: Rounding,
) -> Fitted<N::Store> {
    kernel::rescale::<W, N::Store>(x, frac, N::FORMAT, rounding)
}

/// A float's exact value rounded into `f` (NaN and infinities are errors).
#[inline]
pub(crate) fn float_fit<D: Storage>(
    shape: FloatShape,
    bits: u64,
    f: Format,
    rounding: Rounding,
) -> Result<Fitted<D>, FloatError> {
    let s = scaled_from_float(shape, bits, f.frac_bits())?;
    Ok(fitted(s, rounding, f))
}

// ---------------------------------------------------------------------------
// The typed API.
// ---------------------------------------------------------------------------

macro_rules! convert_common {
    ($name:ident, $layout:ident, $ex:literal) => {
        impl<I: $layout<F>, F: Unsigned> $name<I, F> {
            /// The integer `n` in this format. Integers need no rounding;
            /// `overflow` says what happens when `n` lies outside the range.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if `n` does not fit.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Overflow};")]
            #[doc = concat!("type T = ", $ex, "<4, 3>;")]
            /// assert_eq!(T::from_int(3u8, Overflow::Panic).to_bits(), 24);
            /// assert_eq!(T::from_int(1000i32, Overflow::Saturate), T::MAX);
            /// ```
            #[inline]
            #[track_caller]
            #[must_use]
            pub fn from_int<N: PrimitiveInt>(n: N, overflow: Overflow) -> Self {
                <Self as QType>::from_int::<N>(n, overflow)
            }

            /// The integer `n` in this format, or an error that says on which
            /// side of the range it lies.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("type T = ", $ex, "<4, 3>;")]
            /// assert_eq!(T::try_from_int(15u64)?.to_bits(), 120);
            /// assert!(T::try_from_int(16u64).is_err());
            /// # Ok::<(), qbound::RangeError>(())
            /// ```
            #[inline]
            pub fn try_from_int<N: PrimitiveInt>(n: N) -> Result<Self, RangeError> {
                <Self as QType>::try_from_int::<N>(n)
            }

            /// The integer `n` in this format, or `None` if it does not fit.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("assert!(", $ex, "::<4, 3>::checked_from_int(16i8).is_none());")]
            /// ```
            #[inline]
            #[must_use]
            pub fn checked_from_int<N: PrimitiveInt>(n: N) -> Option<Self> {
                <Self as QType>::checked_from_int::<N>(n)
            }

            /// The value rounded to an integer of type `N`, with a rounding
            /// mode for the fraction bits and an overflow mode for the range
            /// of `N`.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the rounded value does not fit `N`.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, Overflow};")]
            #[doc = concat!("let x = ", $ex, "::<8, 2>::from_bits(10); // 2.5")]
            /// assert_eq!(x.to_int::<i32>(Rounding::NearestTiesEven, Overflow::Panic), 2);
            /// assert_eq!(x.to_int::<i32>(Rounding::Ceil, Overflow::Panic), 3);
            /// assert_eq!(x.to_int::<u8>(Rounding::Floor, Overflow::Panic), 2);
            /// ```
            #[inline]
            #[track_caller]
            #[must_use]
            pub fn to_int<N: PrimitiveInt>(self, rounding: Rounding, overflow: Overflow) -> N {
                <Self as QType>::to_int::<N>(self, rounding, overflow)
            }

            /// The value rounded to an integer of type `N`, or an error if it
            /// does not fit `N`.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, QType};")]
            #[doc = concat!("let x = ", $ex, "::<9, 0>::MAX; // 511")]
            /// assert!(x.try_to_int::<u8>(Rounding::Floor).is_err());
            /// assert_eq!(x.try_to_int::<u16>(Rounding::Floor)?, 511);
            /// # Ok::<(), qbound::RangeError>(())
            /// ```
            #[inline]
            pub fn try_to_int<N: PrimitiveInt>(self, rounding: Rounding) -> Result<N, RangeError> {
                <Self as QType>::try_to_int::<N>(self, rounding)
            }

            /// The value rounded to an integer of type `N`, or `None` if it
            /// does not fit `N`.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding};")]
            #[doc = concat!("let x = ", $ex, "::<8, 2>::from_bits(3); // 0.75")]
            /// assert_eq!(x.checked_to_int::<u8>(Rounding::TowardZero), Some(0));
            /// ```
            #[inline]
            #[must_use]
            pub fn checked_to_int<N: PrimitiveInt>(self, rounding: Rounding) -> Option<N> {
                <Self as QType>::checked_to_int::<N>(self, rounding)
            }

            /// The float's exact value rounded into this format. NaN and the
            /// infinities are errors in every mode; finite values never are
            /// (except that [`Overflow::Panic`] panics when the value does
            /// not fit).
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, Overflow};")]
            #[doc = concat!("type T = ", $ex, "<1, 14>;")]
            /// let x = T::from_f64(0.1, Rounding::NearestTiesEven, Overflow::Saturate)?;
            /// assert_eq!(x.to_bits(), 1638); // 0.1 * 2^14 = 1638.4
            /// assert_eq!(T::from_f64(9.0, Rounding::Floor, Overflow::Saturate)?, T::MAX);
            /// assert!(T::from_f64(f64::INFINITY, Rounding::Floor, Overflow::Saturate).is_err());
            /// # Ok::<(), qbound::FloatError>(())
            /// ```
            #[inline]
            #[track_caller]
            pub fn from_f64(x: f64, rounding: Rounding, overflow: Overflow) -> Result<Self, FloatError> {
                <Self as QType>::from_f64(x, rounding, overflow)
            }

            /// The float's exact value rounded into this format; an error
            /// for NaN, infinities and values that do not fit.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, FloatError};")]
            #[doc = concat!("type T = ", $ex, "<1, 14>;")]
            /// assert!(matches!(T::try_from_f64(2.0, Rounding::Floor), Err(FloatError::OutOfRange(_))));
            /// assert_eq!(T::try_from_f64(0.5, Rounding::Floor)?.to_bits(), 8192);
            /// # Ok::<(), FloatError>(())
            /// ```
            #[inline]
            pub fn try_from_f64(x: f64, rounding: Rounding) -> Result<Self, FloatError> {
                <Self as QType>::try_from_f64(x, rounding)
            }

            /// Like [`Self::from_f64`] for an `f32`.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, Overflow};")]
            #[doc = concat!("let x = ", $ex, "::<3, 4>::from_f32(1.03125, Rounding::NearestTiesEven, Overflow::Wrap)?;")]
            /// assert_eq!(x.to_bits(), 16); // 16.5 steps, tie to even
            /// # Ok::<(), qbound::FloatError>(())
            /// ```
            #[inline]
            #[track_caller]
            pub fn from_f32(x: f32, rounding: Rounding, overflow: Overflow) -> Result<Self, FloatError> {
                <Self as QType>::from_f32(x, rounding, overflow)
            }

            /// Like [`Self::try_from_f64`] for an `f32`.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding};")]
            #[doc = concat!("assert!(", $ex, "::<3, 4>::try_from_f32(f32::NAN, Rounding::Floor).is_err());")]
            /// ```
            #[inline]
            pub fn try_from_f32(x: f32, rounding: Rounding) -> Result<Self, FloatError> {
                <Self as QType>::try_from_f32(x, rounding)
            }

            /// The value correctly rounded to `f64` (ties to even). Exact
            /// when the value has at most 53 significant bits, so for every
            /// format of at most 53 bits.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("assert_eq!(", $ex, "::<7, 8>::from_bits(384).to_f64(), 1.5);")]
            /// ```
            #[inline]
            #[must_use]
            pub fn to_f64(self) -> f64 {
                <Self as QType>::to_f64(self)
            }

            /// The value correctly rounded to `f32` (ties to even); exact for
            /// formats of at most 24 bits. Values beyond `f32::MAX` (only
            /// 128-bit integer formats reach them) give infinity.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("assert_eq!(", $ex, "::<7, 8>::from_bits(384).to_f32(), 1.5);")]
            /// ```
            #[inline]
            #[must_use]
            pub fn to_f32(self) -> f32 {
                <Self as QType>::to_f32(self)
            }
        }
    };
}

convert_common!(Sq, SignedLayout, "Q");
convert_common!(Uq, UnsignedLayout, "UQ");

// Lossless `From` for primitive integers: only where the format holds every
// value of the integer type.
macro_rules! from_int_lossless {
    ($($t:ty: signed $sbits:ident, unsigned $ubits:ident);* $(;)?) => {$(
        impl<I, F> From<$t> for Sq<I, F>
        where
            I: SignedLayout<F> + typenum::IsGreaterOrEqual<typenum::$sbits, Output = typenum::B1>,
            F: Unsigned,
        {
            /// Exact: the format has at least as many integer bits as the
            /// integer type.
            #[inline]
            fn from(n: $t) -> Self {
                Self::from_int(n, Overflow::Wrap)
            }
        }
    )*};
}

macro_rules! from_uint_lossless {
    ($($t:ty: $bits:ident);* $(;)?) => {$(
        impl<I, F> From<$t> for Sq<I, F>
        where
            I: SignedLayout<F> + typenum::IsGreaterOrEqual<typenum::$bits, Output = typenum::B1>,
            F: Unsigned,
        {
            /// Exact: the format has at least as many integer bits as the
            /// integer type.
            #[inline]
            fn from(n: $t) -> Self {
                Self::from_int(n, Overflow::Wrap)
            }
        }
        impl<I, F> From<$t> for Uq<I, F>
        where
            I: UnsignedLayout<F> + typenum::IsGreaterOrEqual<typenum::$bits, Output = typenum::B1>,
            F: Unsigned,
        {
            /// Exact: the format has at least as many integer bits as the
            /// integer type.
            #[inline]
            fn from(n: $t) -> Self {
                Self::from_int(n, Overflow::Wrap)
            }
        }
    )*};
}

from_int_lossless! {
    i8: signed U7, unsigned U8;
    i16: signed U15, unsigned U16;
    i32: signed U31, unsigned U32;
    i64: signed U63, unsigned U64;
}
from_uint_lossless! {
    u8: U8;
    u16: U16;
    u32: U32;
    u64: U64;
}

// `bool` is the 1-bit unsigned integer.
impl<I, F> From<bool> for Uq<I, F>
where
    I: UnsignedLayout<F> + typenum::IsGreaterOrEqual<typenum::U1, Output = typenum::B1>,
    F: Unsigned,
{
    /// `false` is 0, `true` is 1.
    #[inline]
    fn from(b: bool) -> Self {
        Self::from_int(b as u8, Overflow::Wrap)
    }
}

// ---------------------------------------------------------------------------
// The run-time API.
// ---------------------------------------------------------------------------

/// Run `$body` with `$x` bound to a [`QValue`]'s bits in its 128-bit
/// storage.
macro_rules! value_bits {
    ($v:expr, |$x:ident| $body:expr) => {
        if $v.format().is_signed() {
            let $x: i128 = $v.bits().low_bits() as i128;
            $body
        } else {
            let $x: u128 = $v.bits().low_bits();
            $body
        }
    };
}

impl QValue {
    #[track_caller]
    fn from_fitted<D: Storage>(f: Fitted<D>, format: Format, overflow: Overflow) -> QValue {
        QValue::from_wide_unchecked(format, f.resolve(format, overflow).to_wide())
    }

    fn from_fitted_checked<D: Storage>(f: Fitted<D>, format: Format) -> Result<QValue, RangeError> {
        f.checked(format)
            .map(|b| QValue::from_wide_unchecked(format, b.to_wide()))
    }

    /// A scaled exact value rounded into `format`.
    #[track_caller]
    pub(crate) fn from_scaled(
        s: Scaled,
        format: Format,
        rounding: Rounding,
        overflow: Overflow,
    ) -> QValue {
        with_storage!(format, D => QValue::from_fitted(fitted::<D>(s, rounding, format), format, overflow))
    }

    /// A scaled exact value rounded into `format`, or where it fell.
    pub(crate) fn try_from_scaled(
        s: Scaled,
        format: Format,
        rounding: Rounding,
    ) -> Result<QValue, RangeError> {
        with_storage!(format, D => QValue::from_fitted_checked(fitted::<D>(s, rounding, format), format))
    }

    /// The integer `n` in `format`, with an overflow mode.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if `n` does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Overflow};
    /// let v = QValue::from_int(Format::signed(3, 4)?, -3i32, Overflow::Panic);
    /// assert_eq!(v.to_i128_bits(), Some(-48));
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[track_caller]
    #[must_use]
    pub fn from_int<N: PrimitiveInt>(format: Format, n: N, overflow: Overflow) -> QValue {
        with_storage!(format, D => QValue::from_fitted(int_into::<N, D>(n, format), format, overflow))
    }

    /// The integer `n` in `format`, or an error if it does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert!(QValue::try_from_int(Format::unsigned(4, 0)?, 16u8).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_from_int<N: PrimitiveInt>(format: Format, n: N) -> Result<QValue, RangeError> {
        with_storage!(format, D => QValue::from_fitted_checked(int_into::<N, D>(n, format), format))
    }

    /// The value rounded to an integer of type `N`.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit `N`.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let v = QValue::from_i128_bits(Format::signed(7, 1)?, -5)?; // -2.5
    /// assert_eq!(v.to_int::<i8>(Rounding::NearestTiesAway, Overflow::Panic), -3);
    /// assert_eq!(v.to_int::<u8>(Rounding::Floor, Overflow::Saturate), 0);
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    #[track_caller]
    #[must_use]
    pub fn to_int<N: PrimitiveInt>(self, rounding: Rounding, overflow: Overflow) -> N {
        let frac = self.format().frac_bits();
        value_bits!(self, |x| N::from_store(
            int_from::<_, N>(x, frac, rounding).resolve(N::FORMAT, overflow)
        ))
    }

    /// The value rounded to an integer of type `N`, or an error if it does
    /// not fit `N`.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding};
    /// let v = QValue::max(Format::unsigned(9, 0)?);
    /// assert!(v.try_to_int::<u8>(Rounding::Floor).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_to_int<N: PrimitiveInt>(self, rounding: Rounding) -> Result<N, RangeError> {
        let frac = self.format().frac_bits();
        value_bits!(self, |x| int_from::<_, N>(x, frac, rounding)
            .checked(N::FORMAT)
            .map(N::from_store))
    }

    /// The float's exact value rounded into `format`; NaN and infinities
    /// are errors.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let v = QValue::from_f64(Format::signed(0, 15)?, -0.5, Rounding::Floor, Overflow::Panic)?;
    /// assert_eq!(v.to_i128_bits(), Some(-16384));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    #[track_caller]
    pub fn from_f64(
        format: Format,
        x: f64,
        rounding: Rounding,
        overflow: Overflow,
    ) -> Result<QValue, FloatError> {
        let s = scaled_from_float(BINARY64, x.to_bits(), format.frac_bits())?;
        Ok(QValue::from_scaled(s, format, rounding, overflow))
    }

    /// The float's exact value rounded into `format`; an error for NaN,
    /// infinities and values that do not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding};
    /// assert!(QValue::try_from_f64(Format::signed(0, 15)?, 1.0, Rounding::Floor).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_from_f64(format: Format, x: f64, rounding: Rounding) -> Result<QValue, FloatError> {
        let s = scaled_from_float(BINARY64, x.to_bits(), format.frac_bits())?;
        Ok(QValue::try_from_scaled(s, format, rounding)?)
    }

    /// Like [`QValue::from_f64`] for an `f32`.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let v = QValue::from_f32(Format::unsigned(0, 8)?, 0.25, Rounding::Floor, Overflow::Panic)?;
    /// assert_eq!(v.to_i128_bits(), Some(64));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    #[track_caller]
    pub fn from_f32(
        format: Format,
        x: f32,
        rounding: Rounding,
        overflow: Overflow,
    ) -> Result<QValue, FloatError> {
        let s = scaled_from_float(BINARY32, x.to_bits() as u64, format.frac_bits())?;
        Ok(QValue::from_scaled(s, format, rounding, overflow))
    }

    /// Like [`QValue::try_from_f64`] for an `f32`.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding};
    /// assert!(QValue::try_from_f32(Format::unsigned(0, 8)?, -0.25, Rounding::Floor).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_from_f32(format: Format, x: f32, rounding: Rounding) -> Result<QValue, FloatError> {
        let s = scaled_from_float(BINARY32, x.to_bits() as u64, format.frac_bits())?;
        Ok(QValue::try_from_scaled(s, format, rounding)?)
    }

    /// The value correctly rounded to `f64` (ties to even).
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let v = QValue::min(Format::signed(0, 15)?);
    /// assert_eq!(v.to_f64(), -1.0);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn to_f64(self) -> f64 {
        wide_to_f64(self.bits(), self.format().frac_bits())
    }

    /// The value correctly rounded to `f32` (ties to even); beyond
    /// `f32::MAX` it is infinity.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert_eq!(QValue::max(Format::unsigned(128, 0)?).to_f32(), f32::INFINITY);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn to_f32(self) -> f32 {
        wide_to_f32(self.bits(), self.format().frac_bits())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dyadic_scaling_edges() {
        // 1.5 into 1 fraction bit: exactly 3 steps.
        let s = Scaled::from_dyadic(false, 3, -1, 1);
        assert_eq!((s.mag, s.frac64, s.sticky, s.over), (3, 0, false, false));
        // 2^-200 into 0 fraction bits: all sticky.
        let s = Scaled::from_dyadic(false, 1, -200, 0);
        assert_eq!((s.mag, s.frac64, s.sticky), (0, 0, true));
        // 2^130: over.
        assert!(Scaled::from_dyadic(false, 1, 130, 0).over);
        // half a step exactly.
        let s = Scaled::from_dyadic(true, 1, -1, 0);
        assert_eq!((s.mag, s.frac64, s.sticky), (0, 1 << 63, false));
    }

    #[test]
    fn compose_matches_casts() {
        for &m in &[1u128, 3, (1 << 53) + 1, (1 << 54) + 3, u128::MAX, 1 << 127] {
            assert_eq!(f64::from_bits(BINARY64.compose(false, m, 0)), m as f64);
            assert_eq!(
                f32::from_bits(BINARY32.compose(false, m, 0) as u32),
                m as f32
            );
        }
    }
}
