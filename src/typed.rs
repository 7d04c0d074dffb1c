//! The typed values [`Sq`] and [`Uq`]: the format is part of the type.
//!
//! Their methods are defined once in [`typed_common!`] for both, and every
//! computation calls a kernel of [`crate::kernel`] with the formats as
//! constants.

use core::cmp::Ordering;
use core::fmt;
use core::hash::{Hash, Hasher};
use core::marker::PhantomData;

use typenum::Unsigned;

use crate::convert::{self, FloatError, PrimitiveInt};
use crate::format::Format;
use crate::kernel;
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::overflow::{Overflow, RangeError};
use crate::rounding::Rounding;
use crate::storage::{Storage, WorkInt};
use crate::text::ParseError;
use crate::value::QValue;

mod sealed {
    pub trait Sealed {}
}

/// A fixed-point value whose format is fixed by its type: [`Sq`] and [`Uq`].
///
/// This is the bound for code written once for any format: a filter
/// generic over its sample type, a test sweep over formats, generated code
/// that needs `T::FORMAT`. It carries the format constants, bit access,
/// the rescale family, conversions to and from integers, floats and text,
/// and the same-format `wrapping_` / `saturating_` / `checked_` /
/// `overflowing_` families; [`QFunctions`](crate::QFunctions) adds
/// division and the elementary functions. The concrete types have the same
/// methods as inherent methods (with examples in their docs), so a call on
/// a concrete type needs no import.
///
/// Sealed: implemented by [`Sq`] and [`Uq`] only.
///
/// ```
/// use qbound::{QType, Q, UQ, Format, Rounding, Overflow};
/// fn describe<T: QType>() -> Format { T::FORMAT }
/// assert_eq!(describe::<Q<7, 8>>().to_string(), "Q7.8");
/// assert_eq!(describe::<UQ<8, 8>>().to_string(), "UQ8.8");
///
/// // One gain stage for any sample format: multiply by a coefficient,
/// // round back into the sample format, saturate.
/// fn gain<T: QType, C: QType>(x: T, c: C) -> T {
///     x.mul_rescale(c, Rounding::NearestTiesEven, Overflow::Saturate)
/// }
/// let c = UQ::<1, 15>::from_f64(1.5, Rounding::NearestTiesEven, Overflow::Saturate)?;
/// assert_eq!(gain(Q::<0, 15>::from_bits(0x2000), c).to_bits(), 0x3000);
/// assert_eq!(gain(Q::<3, 12>::from_bits(-0x1000), c).to_bits(), -0x1800);
/// assert_eq!(gain(Q::<0, 15>::from_bits(0x7000), c), Q::<0, 15>::MAX);
/// # Ok::<(), qbound::FloatError>(())
/// ```
pub trait QType:
    Copy
    + Default
    + Eq
    + Ord
    + Hash
    + fmt::Debug
    + fmt::Display
    + core::str::FromStr<Err = crate::text::ParseError>
    + sealed::Sealed
{
    /// The native integer the bits live in.
    type Storage: Storage;
    /// The format.
    const FORMAT: Format;
    /// The smallest value.
    const MIN: Self;
    /// The largest value.
    const MAX: Self;
    /// Zero.
    const ZERO: Self;
    /// The step between neighbouring values: one ulp, `2^-F`.
    const STEP: Self;

    /// The stored integer: the value times `2^F`.
    fn to_bits(self) -> Self::Storage;

    /// The value with these bits, or `None` if the bits are outside the
    /// format's range (the bits above the word length must repeat the sign
    /// bit, or be zero for unsigned formats).
    fn checked_from_bits(bits: Self::Storage) -> Option<Self>;

    /// The value whose bits are the low word-length bits of `bits`.
    fn wrapping_from_bits(bits: Self::Storage) -> Self;

    /// The value as a run-time [`QValue`].
    fn to_value(self) -> QValue;

    /// Bits known to be in range (the sealed implementations skip the
    /// check).
    #[doc(hidden)]
    fn from_bits_in_range(bits: Self::Storage) -> Self;

    /// The value whose stored integer is `bits`; see [`Sq::from_bits`].
    ///
    /// # Panics
    /// If `bits` lies outside the format's range.
    #[inline]
    #[track_caller]
    fn from_bits(bits: Self::Storage) -> Self {
        match Self::checked_from_bits(bits) {
            Some(v) => v,
            None => bits_out_of_range(&bits, Self::FORMAT),
        }
    }

    /// The value of a [`QValue`] of exactly this format, or `None` if the
    /// formats differ; see [`Sq::from_value`].
    #[inline]
    fn from_value(v: QValue) -> Option<Self> {
        if v.format() != Self::FORMAT {
            return None;
        }
        Some(Self::from_bits_in_range(Self::Storage::from_u128_bits(
            v.bits().low_bits(),
        )))
    }

    /// Round into the format of `T`; see [`Sq::rescale`].
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit.
    #[inline(always)]
    #[track_caller]
    fn rescale<T: QType>(self, rounding: Rounding, overflow: Overflow) -> T {
        rescale_into(self, rounding, overflow)
    }

    /// Round into the format of `T`, or an error if it does not fit; see
    /// [`Sq::try_rescale`].
    #[inline(always)]
    fn try_rescale<T: QType>(self, rounding: Rounding) -> Result<T, RangeError> {
        fit_into::<_, T>(self, rounding)
            .checked(T::FORMAT)
            .map(T::from_bits_in_range)
    }

    /// Round into the format of `T`, or `None` if it does not fit.
    #[inline(always)]
    fn checked_rescale<T: QType>(self, rounding: Rounding) -> Option<T> {
        self.try_rescale(rounding).ok()
    }

    /// Convert into a format that holds every value of this one; see
    /// [`Sq::widen`].
    #[inline(always)]
    fn widen<T: QType>(self) -> T
    where
        Self: WidensTo<T>,
    {
        widen_into(self)
    }

    /// The product rounded into the format of `T`; see [`Sq::mul_rescale`].
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded product does not fit.
    #[inline(always)]
    #[track_caller]
    fn mul_rescale<R: QType, T: QType>(self, rhs: R, rounding: Rounding, overflow: Overflow) -> T {
        T::from_bits_in_range(
            mul_fit::<Self, R, T>(self, rhs, rounding).resolve(T::FORMAT, overflow),
        )
    }

    /// The product rounded into the format of `T`, or an error if it does
    /// not fit.
    #[inline(always)]
    fn try_mul_rescale<R: QType, T: QType>(
        self,
        rhs: R,
        rounding: Rounding,
    ) -> Result<T, RangeError> {
        mul_fit::<Self, R, T>(self, rhs, rounding)
            .checked(T::FORMAT)
            .map(T::from_bits_in_range)
    }

    /// The integer `n` in this format; see [`Sq::from_int`].
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if `n` does not fit.
    #[inline]
    #[track_caller]
    fn from_int<N: PrimitiveInt>(n: N, overflow: Overflow) -> Self {
        Self::from_bits_in_range(convert::int_into(n, Self::FORMAT).resolve(Self::FORMAT, overflow))
    }

    /// The integer `n` in this format, or an error if it does not fit.
    #[inline]
    fn try_from_int<N: PrimitiveInt>(n: N) -> Result<Self, RangeError> {
        convert::int_into(n, Self::FORMAT)
            .checked(Self::FORMAT)
            .map(Self::from_bits_in_range)
    }

    /// The integer `n` in this format, or `None` if it does not fit.
    #[inline]
    fn checked_from_int<N: PrimitiveInt>(n: N) -> Option<Self> {
        Self::try_from_int(n).ok()
    }

    /// The value rounded to an integer of type `N`; see [`Sq::to_int`].
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit `N`.
    #[inline]
    #[track_caller]
    fn to_int<N: PrimitiveInt>(self, rounding: Rounding, overflow: Overflow) -> N {
        N::from_store(
            convert::int_from::<_, N>(self.to_bits(), Self::FORMAT.frac_bits(), rounding)
                .resolve(N::FORMAT, overflow),
        )
    }

    /// The value rounded to an integer of type `N`, or an error if it does
    /// not fit `N`.
    #[inline]
    fn try_to_int<N: PrimitiveInt>(self, rounding: Rounding) -> Result<N, RangeError> {
        convert::int_from::<_, N>(self.to_bits(), Self::FORMAT.frac_bits(), rounding)
            .checked(N::FORMAT)
            .map(N::from_store)
    }

    /// The value rounded to an integer of type `N`, or `None` if it does
    /// not fit `N`.
    #[inline]
    fn checked_to_int<N: PrimitiveInt>(self, rounding: Rounding) -> Option<N> {
        self.try_to_int(rounding).ok()
    }

    /// The float's exact value rounded into this format; see
    /// [`Sq::from_f64`].
    #[inline]
    #[track_caller]
    fn from_f64(x: f64, rounding: Rounding, overflow: Overflow) -> Result<Self, FloatError> {
        Ok(Self::from_bits_in_range(
            convert::float_fit::<Self::Storage>(
                convert::BINARY64,
                x.to_bits(),
                Self::FORMAT,
                rounding,
            )?
            .resolve(Self::FORMAT, overflow),
        ))
    }

    /// The float's exact value rounded into this format; an error for NaN,
    /// infinities and values that do not fit.
    #[inline]
    fn try_from_f64(x: f64, rounding: Rounding) -> Result<Self, FloatError> {
        let f = convert::float_fit::<Self::Storage>(
            convert::BINARY64,
            x.to_bits(),
            Self::FORMAT,
            rounding,
        )?;
        Ok(f.checked(Self::FORMAT).map(Self::from_bits_in_range)?)
    }

    /// Like [`QType::from_f64`] for an `f32`.
    #[inline]
    #[track_caller]
    fn from_f32(x: f32, rounding: Rounding, overflow: Overflow) -> Result<Self, FloatError> {
        Ok(Self::from_bits_in_range(
            convert::float_fit::<Self::Storage>(
                convert::BINARY32,
                x.to_bits() as u64,
                Self::FORMAT,
                rounding,
            )?
            .resolve(Self::FORMAT, overflow),
        ))
    }

    /// Like [`QType::try_from_f64`] for an `f32`.
    #[inline]
    fn try_from_f32(x: f32, rounding: Rounding) -> Result<Self, FloatError> {
        let f = convert::float_fit::<Self::Storage>(
            convert::BINARY32,
            x.to_bits() as u64,
            Self::FORMAT,
            rounding,
        )?;
        Ok(f.checked(Self::FORMAT).map(Self::from_bits_in_range)?)
    }

    /// The value correctly rounded to `f64` (ties to even).
    #[inline]
    fn to_f64(self) -> f64 {
        convert::wide_to_f64(self.to_bits().to_wide(), Self::FORMAT.frac_bits())
    }

    /// The value correctly rounded to `f32` (ties to even).
    #[inline]
    fn to_f32(self) -> f32 {
        convert::wide_to_f32(self.to_bits().to_wide(), Self::FORMAT.frac_bits())
    }

    /// Parse a number, rounded once into this format; see [`Sq::parse`].
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit.
    #[track_caller]
    fn parse(s: &str, rounding: Rounding, overflow: Overflow) -> Result<Self, ParseError> {
        let f = crate::text::parse_fit::<Self::Storage>(s, None, Self::FORMAT, rounding)?;
        Ok(Self::from_bits_in_range(f.resolve(Self::FORMAT, overflow)))
    }

    /// Parse like [`QType::parse`]; a value outside the range is an error.
    fn try_parse(s: &str, rounding: Rounding) -> Result<Self, ParseError> {
        crate::text::parse_checked::<Self>(s, None, rounding)
    }

    /// `self + rhs` in this format, wrapping around on overflow.
    #[inline(always)]
    fn wrapping_add(self, rhs: Self) -> Self {
        same(
            kernel::add_same(self.to_bits(), rhs.to_bits(), Self::FORMAT),
            Overflow::Wrap,
        )
    }
    /// `self + rhs` in this format, clamped to the range.
    #[inline(always)]
    fn saturating_add(self, rhs: Self) -> Self {
        same(
            kernel::add_same(self.to_bits(), rhs.to_bits(), Self::FORMAT),
            Overflow::Saturate,
        )
    }
    /// `self + rhs` in this format, or `None` on overflow.
    #[inline(always)]
    fn checked_add(self, rhs: Self) -> Option<Self> {
        same_checked(kernel::add_same(
            self.to_bits(),
            rhs.to_bits(),
            Self::FORMAT,
        ))
    }
    /// `self + rhs` wrapped, and whether it overflowed.
    #[inline(always)]
    fn overflowing_add(self, rhs: Self) -> (Self, bool) {
        same_overflowing(kernel::add_same(
            self.to_bits(),
            rhs.to_bits(),
            Self::FORMAT,
        ))
    }
    /// `self - rhs` in this format, wrapping around on overflow.
    #[inline(always)]
    fn wrapping_sub(self, rhs: Self) -> Self {
        same(
            kernel::sub_same(self.to_bits(), rhs.to_bits(), Self::FORMAT),
            Overflow::Wrap,
        )
    }
    /// `self - rhs` in this format, clamped to the range.
    #[inline(always)]
    fn saturating_sub(self, rhs: Self) -> Self {
        same(
            kernel::sub_same(self.to_bits(), rhs.to_bits(), Self::FORMAT),
            Overflow::Saturate,
        )
    }
    /// `self - rhs` in this format, or `None` on overflow.
    #[inline(always)]
    fn checked_sub(self, rhs: Self) -> Option<Self> {
        same_checked(kernel::sub_same(
            self.to_bits(),
            rhs.to_bits(),
            Self::FORMAT,
        ))
    }
    /// `self - rhs` wrapped, and whether it overflowed.
    #[inline(always)]
    fn overflowing_sub(self, rhs: Self) -> (Self, bool) {
        same_overflowing(kernel::sub_same(
            self.to_bits(),
            rhs.to_bits(),
            Self::FORMAT,
        ))
    }
    /// `-self` in this format, wrapping around on overflow.
    #[inline(always)]
    fn wrapping_neg(self) -> Self {
        same(
            kernel::neg_same(self.to_bits(), Self::FORMAT),
            Overflow::Wrap,
        )
    }
    /// `-self` in this format, clamped to the range.
    #[inline(always)]
    fn saturating_neg(self) -> Self {
        same(
            kernel::neg_same(self.to_bits(), Self::FORMAT),
            Overflow::Saturate,
        )
    }
    /// `-self` in this format, or `None` on overflow.
    #[inline(always)]
    fn checked_neg(self) -> Option<Self> {
        same_checked(kernel::neg_same(self.to_bits(), Self::FORMAT))
    }
    /// `-self` wrapped, and whether it overflowed.
    #[inline(always)]
    fn overflowing_neg(self) -> (Self, bool) {
        same_overflowing(kernel::neg_same(self.to_bits(), Self::FORMAT))
    }
    /// `|self|` in this format, wrapping around on overflow.
    #[inline(always)]
    fn wrapping_abs(self) -> Self {
        same(
            kernel::abs_same(self.to_bits(), Self::FORMAT),
            Overflow::Wrap,
        )
    }
    /// `|self|` in this format, clamped to the range.
    #[inline(always)]
    fn saturating_abs(self) -> Self {
        same(
            kernel::abs_same(self.to_bits(), Self::FORMAT),
            Overflow::Saturate,
        )
    }
    /// `|self|` in this format, or `None` on overflow.
    #[inline(always)]
    fn checked_abs(self) -> Option<Self> {
        same_checked(kernel::abs_same(self.to_bits(), Self::FORMAT))
    }
    /// `|self|` wrapped, and whether it overflowed.
    #[inline(always)]
    fn overflowing_abs(self) -> (Self, bool) {
        same_overflowing(kernel::abs_same(self.to_bits(), Self::FORMAT))
    }
    /// `self × rhs` rounded into this format, wrapping around on overflow.
    #[inline(always)]
    fn wrapping_mul(self, rhs: Self, rounding: Rounding) -> Self {
        self.mul_rescale(rhs, rounding, Overflow::Wrap)
    }
    /// `self × rhs` rounded into this format, clamped to the range.
    #[inline(always)]
    fn saturating_mul(self, rhs: Self, rounding: Rounding) -> Self {
        self.mul_rescale(rhs, rounding, Overflow::Saturate)
    }
    /// `self × rhs` rounded into this format, or `None` if it does not fit.
    #[inline(always)]
    fn checked_mul(self, rhs: Self, rounding: Rounding) -> Option<Self> {
        self.try_mul_rescale(rhs, rounding).ok()
    }
    /// `self × rhs` rounded and wrapped, and whether it overflowed.
    #[inline(always)]
    fn overflowing_mul(self, rhs: Self, rounding: Rounding) -> (Self, bool) {
        same_overflowing(mul_fit::<Self, Self, Self>(self, rhs, rounding))
    }
}

#[cold]
#[inline(never)]
#[track_caller]
fn bits_out_of_range(bits: &dyn fmt::Debug, f: Format) -> ! {
    panic!("qbound: bits {bits:?} lie outside the range of {f}")
}

/// A same-format result with an overflow mode.
#[inline(always)]
#[track_caller]
fn same<T: QType>(f: kernel::Fitted<T::Storage>, overflow: Overflow) -> T {
    T::from_bits_in_range(f.resolve(T::FORMAT, overflow))
}

#[inline(always)]
fn same_checked<T: QType>(f: kernel::Fitted<T::Storage>) -> Option<T> {
    f.checked(T::FORMAT).ok().map(T::from_bits_in_range)
}

#[inline(always)]
fn same_overflowing<T: QType>(f: kernel::Fitted<T::Storage>) -> (T, bool) {
    (T::from_bits_in_range(f.wrapped), f.side.is_some())
}

/// `a × b` rounded into the format of `T`, before the overflow mode.
#[inline(always)]
fn mul_fit<A: QType, B: QType, T: QType>(
    a: A,
    b: B,
    rounding: Rounding,
) -> kernel::Fitted<T::Storage> {
    kernel::mul_rescale::<_, _, T::Storage>(
        a.to_bits(),
        A::FORMAT,
        b.to_bits(),
        B::FORMAT,
        T::FORMAT,
        rounding,
    )
}

macro_rules! typed_common {
    ($name:ident, $layout:ident, $signed:expr) => {
        impl<I: $layout<F>, F: Unsigned> sealed::Sealed for $name<I, F> {}

        impl<I: $layout<F>, F: Unsigned> Clone for $name<I, F> {
            #[inline(always)]
            fn clone(&self) -> Self {
                *self
            }
        }
        impl<I: $layout<F>, F: Unsigned> Copy for $name<I, F> {}

        impl<I: $layout<F>, F: Unsigned> Default for $name<I, F> {
            /// Zero.
            #[inline(always)]
            fn default() -> Self {
                Self::ZERO
            }
        }

        impl<I: $layout<F>, F: Unsigned> Eq for $name<I, F> {}

        impl<I: $layout<F>, F: Unsigned> Ord for $name<I, F> {
            #[inline(always)]
            fn cmp(&self, other: &Self) -> Ordering {
                self.bits.cmp(&other.bits)
            }
        }

        impl<I: $layout<F>, F: Unsigned> Hash for $name<I, F> {
            fn hash<H: Hasher>(&self, state: &mut H) {
                self.bits.hash(state)
            }
        }

        impl<I: $layout<F>, F: Unsigned> QType for $name<I, F> {
            type Storage = <I as $layout<F>>::Storage;
            const FORMAT: Format = Format::new_const($signed, I::U32, F::U32);
            const MIN: Self = Self::from_bits_unchecked(Self::MIN_BITS);
            const MAX: Self = Self::from_bits_unchecked(<I as $layout<F>>::MAX_BITS);
            const ZERO: Self = Self::from_bits_unchecked(<Self::Storage as Storage>::ZERO);
            const STEP: Self = Self::from_bits_unchecked(<Self::Storage as Storage>::ONE);

            #[inline(always)]
            fn to_bits(self) -> Self::Storage {
                self.bits
            }

            #[inline(always)]
            fn checked_from_bits(bits: Self::Storage) -> Option<Self> {
                if bits.extend_from(<I as $layout<F>>::WIDTH) == bits {
                    Some(Self::from_bits_unchecked(bits))
                } else {
                    None
                }
            }

            #[inline(always)]
            fn wrapping_from_bits(bits: Self::Storage) -> Self {
                Self::from_bits_unchecked(bits.extend_from(<I as $layout<F>>::WIDTH))
            }

            #[inline]
            fn to_value(self) -> QValue {
                QValue::from_wide_unchecked(Self::FORMAT, self.bits.to_wide())
            }

            #[inline(always)]
            fn from_bits_in_range(bits: Self::Storage) -> Self {
                Self::from_bits_unchecked(bits)
            }
        }

        impl<I: $layout<F>, F: Unsigned> $name<I, F> {
            /// The format (also [`QType::FORMAT`]).
            pub const FORMAT: Format = <Self as QType>::FORMAT;
            /// The smallest value.
            pub const MIN: Self = <Self as QType>::MIN;
            /// The largest value.
            pub const MAX: Self = <Self as QType>::MAX;
            /// Zero.
            pub const ZERO: Self = <Self as QType>::ZERO;
            /// One step (ulp): the smallest positive value, `2^-F`.
            pub const STEP: Self = <Self as QType>::STEP;

            #[inline(always)]
            pub(crate) const fn from_bits_unchecked(bits: <I as $layout<F>>::Storage) -> Self {
                Self {
                    bits,
                    _frac: PhantomData,
                }
            }

            /// The value whose stored integer is `bits` (value = bits × 2^-F).
            ///
            /// # Panics
            /// If `bits` lies outside the format's range; see
            /// [`Self::checked_from_bits`] and [`Self::wrapping_from_bits`]
            /// for the forms that do not panic.
            #[inline]
            #[track_caller]
            pub fn from_bits(bits: <I as $layout<F>>::Storage) -> Self {
                <Self as QType>::from_bits(bits)
            }

            /// The value whose stored integer is `bits`, or `None` if the bits
            /// are outside the format's range.
            #[inline]
            pub fn checked_from_bits(bits: <I as $layout<F>>::Storage) -> Option<Self> {
                <Self as QType>::checked_from_bits(bits)
            }

            /// The value whose stored integer is the low word-length bits of
            /// `bits`, sign- or zero-extended.
            #[inline]
            pub fn wrapping_from_bits(bits: <I as $layout<F>>::Storage) -> Self {
                <Self as QType>::wrapping_from_bits(bits)
            }

            /// The stored integer: the value times `2^F`.
            #[inline(always)]
            #[must_use]
            pub const fn to_bits(self) -> <I as $layout<F>>::Storage {
                self.bits
            }

            /// The value as a run-time [`QValue`].
            #[inline]
            #[must_use]
            pub fn to_value(self) -> QValue {
                <Self as QType>::to_value(self)
            }

            /// The value of a [`QValue`] of exactly this format, or `None` if
            /// the formats differ.
            #[inline]
            #[must_use]
            pub fn from_value(v: QValue) -> Option<Self> {
                <Self as QType>::from_value(v)
            }

            /// Round into the format of `T`, with a rounding mode and an
            /// overflow mode. This is the one place a value loses
            /// information: fraction bits with `rounding`, integer bits with
            /// `overflow`.
            ///
            /// With literal modes the choice is folded away at compile time.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the rounded value does not fit.
            #[inline(always)]
            #[track_caller]
            pub fn rescale<T: QType>(self, rounding: Rounding, overflow: Overflow) -> T {
                <Self as QType>::rescale::<T>(self, rounding, overflow)
            }

            /// Round into the format of `T`; `None` if the rounded value does
            /// not fit.
            #[inline(always)]
            pub fn checked_rescale<T: QType>(self, rounding: Rounding) -> Option<T> {
                <Self as QType>::checked_rescale::<T>(self, rounding)
            }

            /// Round into the format of `T`; an error that says on which side
            /// of the range the rounded value fell if it does not fit.
            #[inline(always)]
            pub fn try_rescale<T: QType>(self, rounding: Rounding) -> Result<T, RangeError> {
                <Self as QType>::try_rescale::<T>(self, rounding)
            }

            /// Convert into a format that holds every value of this one: no
            /// rounding, no overflow, checked at compile time.
            #[inline(always)]
            pub fn widen<T: QType>(self) -> T
            where
                Self: WidensTo<T>,
            {
                <Self as QType>::widen::<T>(self)
            }

            /// The product rounded into the format of `T`, for any operand
            /// formats: the exact product is formed in as many bits as it
            /// needs (up to 257), then rounded once. Use it where the exact
            /// product type would pass 128 bits.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the rounded product does not fit.
            #[inline(always)]
            #[track_caller]
            pub fn mul_rescale<R: QType, T: QType>(
                self,
                rhs: R,
                rounding: Rounding,
                overflow: Overflow,
            ) -> T {
                <Self as QType>::mul_rescale::<R, T>(self, rhs, rounding, overflow)
            }

            /// The product rounded into the format of `T`, or an error if it
            /// does not fit.
            #[inline(always)]
            pub fn try_mul_rescale<R: QType, T: QType>(
                self,
                rhs: R,
                rounding: Rounding,
            ) -> Result<T, RangeError> {
                <Self as QType>::try_mul_rescale::<R, T>(self, rhs, rounding)
            }

            /// `self + rhs` in this format, wrapping around on overflow.
            #[inline(always)]
            #[must_use]
            pub fn wrapping_add(self, rhs: Self) -> Self {
                <Self as QType>::wrapping_add(self, rhs)
            }
            /// `self + rhs` in this format, clamped to the range.
            #[inline(always)]
            #[must_use]
            pub fn saturating_add(self, rhs: Self) -> Self {
                <Self as QType>::saturating_add(self, rhs)
            }
            /// `self + rhs` in this format, or `None` on overflow.
            #[inline(always)]
            #[must_use]
            pub fn checked_add(self, rhs: Self) -> Option<Self> {
                <Self as QType>::checked_add(self, rhs)
            }
            /// `self + rhs` wrapped, and whether it overflowed.
            #[inline(always)]
            #[must_use]
            pub fn overflowing_add(self, rhs: Self) -> (Self, bool) {
                <Self as QType>::overflowing_add(self, rhs)
            }

            /// `self - rhs` in this format, wrapping around on overflow.
            #[inline(always)]
            #[must_use]
            pub fn wrapping_sub(self, rhs: Self) -> Self {
                <Self as QType>::wrapping_sub(self, rhs)
            }
            /// `self - rhs` in this format, clamped to the range.
            #[inline(always)]
            #[must_use]
            pub fn saturating_sub(self, rhs: Self) -> Self {
                <Self as QType>::saturating_sub(self, rhs)
            }
            /// `self - rhs` in this format, or `None` on overflow.
            #[inline(always)]
            #[must_use]
            pub fn checked_sub(self, rhs: Self) -> Option<Self> {
                <Self as QType>::checked_sub(self, rhs)
            }
            /// `self - rhs` wrapped, and whether it overflowed.
            #[inline(always)]
            #[must_use]
            pub fn overflowing_sub(self, rhs: Self) -> (Self, bool) {
                <Self as QType>::overflowing_sub(self, rhs)
            }

            /// `-self` in this format, wrapping around on overflow (`-MIN`
            /// is `MIN` for signed formats; any nonzero unsigned value wraps).
            #[inline(always)]
            #[must_use]
            pub fn wrapping_neg(self) -> Self {
                <Self as QType>::wrapping_neg(self)
            }
            /// `-self` in this format, clamped to the range.
            #[inline(always)]
            #[must_use]
            pub fn saturating_neg(self) -> Self {
                <Self as QType>::saturating_neg(self)
            }
            /// `-self` in this format, or `None` on overflow.
            #[inline(always)]
            #[must_use]
            pub fn checked_neg(self) -> Option<Self> {
                <Self as QType>::checked_neg(self)
            }
            /// `-self` wrapped, and whether it overflowed.
            #[inline(always)]
            #[must_use]
            pub fn overflowing_neg(self) -> (Self, bool) {
                <Self as QType>::overflowing_neg(self)
            }

            /// `|self|` in this format, wrapping around on overflow (`|MIN|`
            /// is `MIN` for signed formats).
            #[inline(always)]
            #[must_use]
            pub fn wrapping_abs(self) -> Self {
                <Self as QType>::wrapping_abs(self)
            }
            /// `|self|` in this format, clamped to the range.
            #[inline(always)]
            #[must_use]
            pub fn saturating_abs(self) -> Self {
                <Self as QType>::saturating_abs(self)
            }
            /// `|self|` in this format, or `None` on overflow.
            #[inline(always)]
            #[must_use]
            pub fn checked_abs(self) -> Option<Self> {
                <Self as QType>::checked_abs(self)
            }
            /// `|self|` wrapped, and whether it overflowed.
            #[inline(always)]
            #[must_use]
            pub fn overflowing_abs(self) -> (Self, bool) {
                <Self as QType>::overflowing_abs(self)
            }

            /// `self × rhs` rounded into this format, wrapping around on
            /// overflow. Works for every format, also where the exact product
            /// would pass 128 bits.
            #[inline(always)]
            #[must_use]
            pub fn wrapping_mul(self, rhs: Self, rounding: Rounding) -> Self {
                <Self as QType>::wrapping_mul(self, rhs, rounding)
            }
            /// `self × rhs` rounded into this format, clamped to the range.
            #[inline(always)]
            #[must_use]
            pub fn saturating_mul(self, rhs: Self, rounding: Rounding) -> Self {
                <Self as QType>::saturating_mul(self, rhs, rounding)
            }
            /// `self × rhs` rounded into this format, or `None` if the
            /// rounded product does not fit.
            #[inline(always)]
            #[must_use]
            pub fn checked_mul(self, rhs: Self, rounding: Rounding) -> Option<Self> {
                <Self as QType>::checked_mul(self, rhs, rounding)
            }
            /// `self × rhs` rounded and wrapped, and whether it overflowed.
            #[inline(always)]
            #[must_use]
            pub fn overflowing_mul(self, rhs: Self, rounding: Rounding) -> (Self, bool) {
                <Self as QType>::overflowing_mul(self, rhs, rounding)
            }
        }
    };
}

/// `x` rounded into the format of `T`, before the overflow mode: the one
/// path from a typed value into another typed format.
#[inline(always)]
pub(crate) fn fit_into<S: QType, T: QType>(x: S, rounding: Rounding) -> kernel::Fitted<T::Storage> {
    kernel::rescale::<_, T::Storage>(x.to_bits(), S::FORMAT.frac_bits(), T::FORMAT, rounding)
}

/// `x` rounded into the format of `T` with an overflow mode.
#[inline(always)]
#[track_caller]
pub(crate) fn rescale_into<S: QType, T: QType>(x: S, rounding: Rounding, overflow: Overflow) -> T {
    T::wrapping_from_bits(fit_into::<S, T>(x, rounding).resolve(T::FORMAT, overflow))
}

/// `x` in a format that holds every one of its values (exact: the rounding
/// mode never acts and nothing overflows).
#[inline(always)]
pub(crate) fn widen_into<S: WidensTo<T>, T: QType>(x: S) -> T {
    T::wrapping_from_bits(fit_into::<S, T>(x, Rounding::Floor).wrapped)
}

/// A signed fixed-point value of format `Q(I, F)`: one sign bit, `I`
/// integer bits, `F` fraction bits (typenum unsigned integers). Most code
/// names it through the alias [`crate::Q`]: `Q<7, 8>` is `Sq<U7, U8>`.
///
/// The bits live in the smallest native integer holding `1 + I + F` bits;
/// the bits above the word length always repeat the sign bit.
///
/// ```
/// use qbound::{Q, Rounding, Overflow};
/// let x = Q::<0, 15>::from_bits(0x4000);  // 0.5
/// let y = Q::<0, 15>::from_bits(-0x2000); // -0.25
/// let p = x * y;                          // exact: Q1.30
/// assert_eq!(p.to_bits(), -(1 << 27));    // -0.125
/// let r: Q<0, 15> = p.rescale(Rounding::NearestTiesEven, Overflow::Saturate);
/// assert_eq!(r.to_bits(), -0x1000);
/// ```
pub struct Sq<I: SignedLayout<F>, F: Unsigned> {
    bits: <I as SignedLayout<F>>::Storage,
    _frac: PhantomData<F>,
}

/// An unsigned fixed-point value of format `UQ(I, F)`: `I` integer bits and
/// `F` fraction bits, no sign bit. Most code names it through the alias
/// [`crate::UQ`]: `UQ<8, 8>` is `Uq<U8, U8>`.
///
/// ```
/// use qbound::UQ;
/// let gain = UQ::<1, 7>::from_bits(0xC0); // 1.5
/// assert_eq!((gain * gain).to_bits(), 0x9000); // 2.25 in UQ2.14
/// ```
pub struct Uq<I: UnsignedLayout<F>, F: Unsigned> {
    bits: <I as UnsignedLayout<F>>::Storage,
    _frac: PhantomData<F>,
}

impl<I: SignedLayout<F>, F: Unsigned> Sq<I, F> {
    const MIN_BITS: <I as SignedLayout<F>>::Storage = <I as SignedLayout<F>>::MIN_BITS;

    /// Whether the value is below zero.
    ///
    /// ```
    /// assert!(qbound::Q::<3, 4>::MIN.is_negative());
    /// ```
    #[inline(always)]
    #[must_use]
    pub fn is_negative(self) -> bool {
        self.bits.is_negative()
    }
}

impl<I: UnsignedLayout<F>, F: Unsigned> Uq<I, F> {
    const MIN_BITS: <I as UnsignedLayout<F>>::Storage =
        <<I as UnsignedLayout<F>>::Storage as Storage>::ZERO;
}

typed_common!(Sq, SignedLayout, true);
typed_common!(Uq, UnsignedLayout, false);

/// A typed format that holds every value of `Self`'s format, so
/// [`Sq::widen`] / [`Uq::widen`] into it is exact. Implemented when the
/// target has at least as many integer and fraction bits (and is signed if
/// the source is).
///
/// ```
/// use qbound::Q;
/// let x = Q::<3, 12>::from_bits(1234);
/// let y: Q<9, 30> = x.widen();
/// assert_eq!(y, x);
/// ```
#[diagnostic::on_unimplemented(
    message = "`widen` would lose information here: the target format does not hold every value of the source",
    label = "not a lossless widening",
    note = "`widen` needs a target with at least as many integer and fraction bits, and a signed target for a signed source",
    note = "to narrow, use `rescale` with a rounding mode and an overflow mode"
)]
pub trait WidensTo<T: QType>: QType {}

/// Marker: the target has enough integer bits (implemented for `B1` only).
#[doc(hidden)]
#[diagnostic::on_unimplemented(
    message = "`widen` would drop integer bits: the target format has fewer integer bits than the source",
    label = "not a lossless widening",
    note = "to narrow, use `rescale` with a rounding mode and an overflow mode"
)]
pub trait HoldsIntegerBits {}
impl HoldsIntegerBits for typenum::B1 {}

/// Marker: the target has enough fraction bits (implemented for `B1` only).
#[doc(hidden)]
#[diagnostic::on_unimplemented(
    message = "`widen` would drop fraction bits: the target format has fewer fraction bits than the source",
    label = "not a lossless widening",
    note = "to round away fraction bits, use `rescale` with a rounding mode and an overflow mode"
)]
pub trait HoldsFractionBits {}
impl HoldsFractionBits for typenum::B1 {}

macro_rules! widens {
    ($src:ident, $sl:ident, $dst:ident, $dl:ident) => {
        impl<I1, F1, I2, F2> WidensTo<$dst<I2, F2>> for $src<I1, F1>
        where
            I1: $sl<F1>,
            F1: Unsigned,
            I2: $dl<F2> + typenum::IsGreaterOrEqual<I1>,
            F2: Unsigned + typenum::IsGreaterOrEqual<F1>,
            typenum::GrEq<I2, I1>: HoldsIntegerBits,
            typenum::GrEq<F2, F1>: HoldsFractionBits,
        {
        }
    };
}
widens!(Sq, SignedLayout, Sq, SignedLayout);
widens!(Uq, UnsignedLayout, Uq, UnsignedLayout);
widens!(Uq, UnsignedLayout, Sq, SignedLayout);

/// Marker that no valid format implements (its one impl has a negative
/// typenum integer as fraction bits): it makes `widen` from a signed into
/// an unsigned format fail with a message of its own. Without the
/// signed-to-unsigned `WidensTo` impl below the compiler would infer a
/// signed target and report mismatched types; the impl that exists keeps
/// the bound undecided until the target type is known.
#[doc(hidden)]
#[diagnostic::on_unimplemented(
    message = "`widen` cannot turn a signed format into an unsigned one: negative values have no unsigned representation",
    label = "signed source, unsigned target",
    note = "widen into a signed format with at least as many integer and fraction bits",
    note = "to clamp negative values to zero, use `rescale` with `Overflow::Saturate`"
)]
pub trait SignedIntoUnsigned<F> {}
impl SignedIntoUnsigned<typenum::Z0> for typenum::UTerm {}

impl<I1, F1, I2, F2> WidensTo<Uq<I2, F2>> for Sq<I1, F1>
where
    I1: SignedLayout<F1>,
    F1: Unsigned,
    I2: UnsignedLayout<F2> + SignedIntoUnsigned<F2>,
    F2: Unsigned,
{
}
