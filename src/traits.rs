//! The `num-traits` traits, and the policy wrappers [`Wrapped`] and
//! [`Saturated`] for generic numeric code.
//!
//! # Why the bare types implement so few arithmetic traits
//!
//! `Sq` and `Uq` keep exact widening operators: `Q<0, 15> * Q<0, 15>` is a
//! `Q<1, 30>`, never a rounded `Q<0, 15>`. Traits such as `Zero`, `One`,
//! `Num`, `CheckedAdd` or `Sum` demand `Add<Output = Self>` or
//! `Mul<Output = Self>`, that is, an operator that silently rounds or
//! overflows. The bare types therefore implement only the traits whose
//! meaning is exact or explicit:
//!
//! | trait | meaning |
//! |---|---|
//! | `Bounded` | `MIN`, `MAX` |
//! | `FromPrimitive` | integers exactly (`None` if out of range), floats rounded to nearest, ties to even (`None` for NaN, ±∞, out of range) |
//! | `ToPrimitive` | to integers rounded toward zero as `f64::to_i32` does (`None` if out of range); to floats correctly rounded |
//! | `NumCast` | through the source's `ToPrimitive`: exact for integers and for values an `f64` holds |
//! | `Saturating`, `CheckedNeg`, `WrappingNeg` | the same-format methods of the same names |
//!
//! # Policy wrappers
//!
//! Generic code that needs `Num`, `Zero`, `One`, `Sum` or `Product` runs on
//! [`Wrapped<T>`] or [`Saturated<T>`]: every operator stays in `T`'s
//! format. `+` and `-` are exact unless they overflow; `*` and `/` round to
//! nearest with ties to even (the unbiased mode), and then wrap or clamp.
//! `%` is exact. `One` exists only for formats that hold 1 (at least one
//! integer bit).
//!
//! ```
//! use qbound::{Q, Saturated};
//! use num_traits::Zero;
//! // Readings of an invented strain gauge, summed by a generic helper.
//! fn total<T: Zero + Copy + core::iter::Sum>(xs: &[T]) -> T { xs.iter().copied().sum() }
//! let xs: Vec<Saturated<Q<1, 14>>> = ["0.75", "0.5", "-0.125"].iter().map(|s| s.parse().unwrap()).collect();
//! assert_eq!(total(&xs).0.to_string(), "1.125");
//! let big = [Saturated(Q::<1, 14>::MAX); 3];
//! assert_eq!(total(&big).0, Q::<1, 14>::MAX); // clamps instead of wrapping
//! ```

use core::fmt;
use core::iter::{Product, Sum};
use core::ops::{
    Add, AddAssign, Div, DivAssign, Mul, MulAssign, Neg, Rem, RemAssign, Sub, SubAssign,
};
use core::str::FromStr;

use num_traits::{
    Bounded, CheckedNeg, FromPrimitive, Num, NumCast, One, ToPrimitive, WrappingNeg, Zero,
};
use typenum::{B1, IsGreaterOrEqual, U1, Unsigned};

use crate::convert::{BINARY64, Scaled};
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::overflow::Overflow;
use crate::rounding::Rounding;
use crate::storage::{Storage, Wide};
use crate::text::{ParseError, push_bit};
use crate::typed::{QType, Sq, Uq};

/// Whether an `f64` is an integer (its exact value has no fraction bits).
fn f64_is_integer(x: f64) -> bool {
    match BINARY64.decompose(x.to_bits()) {
        Ok((_, m, e)) => e >= 0 || m.trailing_zeros() as i64 >= -e,
        Err(_) => false,
    }
}

macro_rules! bare_traits {
    ($name:ident, $layout:ident) => {
        impl<I: $layout<F>, F: Unsigned> Bounded for $name<I, F> {
            fn min_value() -> Self {
                Self::MIN
            }
            fn max_value() -> Self {
                Self::MAX
            }
        }

        impl<I: $layout<F>, F: Unsigned> FromPrimitive for $name<I, F> {
            fn from_i64(n: i64) -> Option<Self> {
                Self::checked_from_int(n)
            }
            fn from_u64(n: u64) -> Option<Self> {
                Self::checked_from_int(n)
            }
            fn from_i128(n: i128) -> Option<Self> {
                Self::checked_from_int(n)
            }
            fn from_u128(n: u128) -> Option<Self> {
                Self::checked_from_int(n)
            }
            fn from_f64(x: f64) -> Option<Self> {
                Self::try_from_f64(x, Rounding::NearestTiesEven).ok()
            }
            fn from_f32(x: f32) -> Option<Self> {
                Self::try_from_f32(x, Rounding::NearestTiesEven).ok()
            }
        }

        impl<I: $layout<F>, F: Unsigned> ToPrimitive for $name<I, F> {
            fn to_i64(&self) -> Option<i64> {
                self.checked_to_int(Rounding::TowardZero)
            }
            fn to_u64(&self) -> Option<u64> {
                self.checked_to_int(Rounding::TowardZero)
            }
            fn to_i128(&self) -> Option<i128> {
                self.checked_to_int(Rounding::TowardZero)
            }
            fn to_u128(&self) -> Option<u128> {
                self.checked_to_int(Rounding::TowardZero)
            }
            fn to_f64(&self) -> Option<f64> {
                Some($name::to_f64(*self))
            }
            fn to_f32(&self) -> Option<f32> {
                Some($name::to_f32(*self))
            }
        }

        impl<I: $layout<F>, F: Unsigned> NumCast for $name<I, F> {
            /// Through the source's `ToPrimitive`: a non-integer `f64` value
            /// is rounded to nearest (ties to even); integers are exact.
            fn from<T: ToPrimitive>(n: T) -> Option<Self> {
                match n.to_f64() {
                    Some(x) if !f64_is_integer(x) => {
                        Self::try_from_f64(x, Rounding::NearestTiesEven).ok()
                    }
                    float => {
                        if let Some(i) = n.to_i128() {
                            Self::checked_from_int(i)
                        } else if let Some(u) = n.to_u128() {
                            Self::checked_from_int(u)
                        } else {
                            float
                                .and_then(|x| Self::try_from_f64(x, Rounding::NearestTiesEven).ok())
                        }
                    }
                }
            }
        }

        impl<I: $layout<F>, F: Unsigned> num_traits::Saturating for $name<I, F> {
            fn saturating_add(self, v: Self) -> Self {
                $name::saturating_add(self, v)
            }
            fn saturating_sub(self, v: Self) -> Self {
                $name::saturating_sub(self, v)
            }
        }

        impl<I: $layout<F>, F: Unsigned> CheckedNeg for $name<I, F> {
            fn checked_neg(&self) -> Option<Self> {
                $name::checked_neg(*self)
            }
        }

        impl<I: $layout<F>, F: Unsigned> WrappingNeg for $name<I, F> {
            fn wrapping_neg(&self) -> Self {
                $name::wrapping_neg(*self)
            }
        }
    };
}

bare_traits!(Sq, SignedLayout);
bare_traits!(Uq, UnsignedLayout);

/// `a / b` for values with the same fraction bits, as an exact scaled
/// quotient (`|a / b| * 2^frac`), by binary long division.
pub(crate) fn divide(a: Wide, b: Wide, frac: u32) -> Scaled {
    let (na, ma) = crate::convert::sign_magnitude(a);
    let (nb, mb) = crate::convert::sign_magnitude(b);
    debug_assert!(mb != 0);
    let mut out = Scaled::ZERO;
    out.neg = na != nb && ma != 0;
    let mut r: u128 = 0;
    // Quotient bits from weight 2^127 down to 2^-(frac + 64).
    let mut p: i64 = 127;
    let last = -(frac as i64) - 64;
    while p >= last {
        let bit = if p >= 0 { (ma >> p) & 1 } else { 0 };
        let top = r >> 127;
        r = (r << 1) | bit;
        if top == 1 || r >= mb {
            r = r.wrapping_sub(mb);
            push_bit(&mut out, p + frac as i64);
        }
        p -= 1;
    }
    out.sticky |= r != 0;
    out
}

/// `a % b` (truncated, sign of `a`) of stored bits with the same fraction
/// bits: exact in the same format.
fn remainder<S: Storage>(a: S, b: S) -> S {
    if S::SIGNED {
        let (x, y) = (a.to_u128_bits() as i128, b.to_u128_bits() as i128);
        S::from_u128_bits(x.wrapping_rem(y) as u128)
    } else {
        S::from_u128_bits(a.to_u128_bits() % b.to_u128_bits())
    }
}

/// A fixed-point value whose arithmetic stays in its format and wraps
/// around on overflow (two's complement, as C and HDL do).
///
/// `*` and `/` round to nearest with ties to even before wrapping; `/` and
/// `%` by zero panic, as for `core::num::Wrapping`.
///
/// ```
/// use qbound::{Q, Wrapped};
/// let a = Wrapped("1.5".parse::<Q<1, 6>>()?);
/// assert_eq!((a + a).0.to_string(), "-1");   // 3 wraps around in Q1.6
/// assert_eq!((a * a).0.to_string(), "-1.75"); // 2.25 wraps
/// # Ok::<(), qbound::ParseError>(())
/// ```
#[derive(Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Default)]
#[repr(transparent)]
pub struct Wrapped<T>(pub T);

/// A fixed-point value whose arithmetic stays in its format and clamps to
/// its range on overflow.
///
/// `*` and `/` round to nearest with ties to even before clamping. `x / 0`
/// clamps toward the sign of `x` (`0 / 0` is 0); `%` by zero panics.
///
/// ```
/// use qbound::{Q, Saturated, QType};
/// let a = Saturated("1.5".parse::<Q<1, 6>>()?);
/// assert_eq!((a + a).0, Q::<1, 6>::MAX);
/// assert_eq!((a / Saturated(Q::<1, 6>::ZERO)).0, Q::<1, 6>::MAX);
/// # Ok::<(), qbound::ParseError>(())
/// ```
#[derive(Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Default)]
#[repr(transparent)]
pub struct Saturated<T>(pub T);

macro_rules! wrapper_fmt {
    ($w:ident: $($tr:ident),*) => {$(
        impl<T: fmt::$tr> fmt::$tr for $w<T> {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                fmt::$tr::fmt(&self.0, f)
            }
        }
    )*};
}
wrapper_fmt!(Wrapped: Display, Debug, LowerHex, UpperHex, Octal, Binary);
wrapper_fmt!(Saturated: Display, Debug, LowerHex, UpperHex, Octal, Binary);

macro_rules! wrapper_conversions {
    ($($w:ident),*) => {$(
        impl<T: FromPrimitive> FromPrimitive for $w<T> {
            fn from_i64(n: i64) -> Option<Self> {
                T::from_i64(n).map($w)
            }
            fn from_u64(n: u64) -> Option<Self> {
                T::from_u64(n).map($w)
            }
            fn from_i128(n: i128) -> Option<Self> {
                T::from_i128(n).map($w)
            }
            fn from_u128(n: u128) -> Option<Self> {
                T::from_u128(n).map($w)
            }
            fn from_f64(x: f64) -> Option<Self> {
                T::from_f64(x).map($w)
            }
            fn from_f32(x: f32) -> Option<Self> {
                T::from_f32(x).map($w)
            }
        }
        impl<T: ToPrimitive> ToPrimitive for $w<T> {
            fn to_i64(&self) -> Option<i64> {
                self.0.to_i64()
            }
            fn to_u64(&self) -> Option<u64> {
                self.0.to_u64()
            }
            fn to_i128(&self) -> Option<i128> {
                self.0.to_i128()
            }
            fn to_u128(&self) -> Option<u128> {
                self.0.to_u128()
            }
            fn to_f64(&self) -> Option<f64> {
                self.0.to_f64()
            }
            fn to_f32(&self) -> Option<f32> {
                self.0.to_f32()
            }
        }
        impl<T: NumCast> NumCast for $w<T> {
            fn from<N: ToPrimitive>(n: N) -> Option<Self> {
                <T as NumCast>::from(n).map($w)
            }
        }
    )*};
}
wrapper_conversions!(Wrapped, Saturated);

macro_rules! wrapper_ops {
    ($w:ident, $name:ident, $layout:ident, $ovf:expr, $add:ident, $sub:ident, $mul:ident, $neg:ident) => {
        impl<I: $layout<F>, F: Unsigned> Add for $w<$name<I, F>> {
            type Output = Self;
            #[inline]
            fn add(self, rhs: Self) -> Self {
                $w(self.0.$add(rhs.0))
            }
        }
        impl<I: $layout<F>, F: Unsigned> Sub for $w<$name<I, F>> {
            type Output = Self;
            #[inline]
            fn sub(self, rhs: Self) -> Self {
                $w(self.0.$sub(rhs.0))
            }
        }
        impl<I: $layout<F>, F: Unsigned> Mul for $w<$name<I, F>> {
            type Output = Self;
            /// The product rounded to nearest, ties to even.
            #[inline]
            fn mul(self, rhs: Self) -> Self {
                $w(self.0.$mul(rhs.0, Rounding::NearestTiesEven))
            }
        }
        impl<I: $layout<F>, F: Unsigned> Div for $w<$name<I, F>> {
            type Output = Self;
            /// The quotient rounded to nearest, ties to even.
            #[track_caller]
            fn div(self, rhs: Self) -> Self {
                type T<I, F> = $name<I, F>;
                let (a, b) = (self.0.to_bits(), rhs.0.to_bits());
                if b == <<T<I, F> as QType>::Storage as Storage>::ZERO {
                    return $w(divide_by_zero::<T<I, F>>(self.0, $ovf));
                }
                let q = divide(a.to_wide(), b.to_wide(), F::U32);
                let f = crate::convert::fitted(q, Rounding::NearestTiesEven, T::<I, F>::FORMAT);
                $w(T::<I, F>::from_bits_unchecked(
                    f.resolve(T::<I, F>::FORMAT, $ovf),
                ))
            }
        }
        impl<I: $layout<F>, F: Unsigned> Rem for $w<$name<I, F>> {
            type Output = Self;
            /// The exact remainder of truncated division (sign of `self`).
            ///
            /// # Panics
            /// If `rhs` is zero.
            #[track_caller]
            fn rem(self, rhs: Self) -> Self {
                if rhs.0 == <$name<I, F>>::ZERO {
                    panic!("qbound: remainder by zero");
                }
                $w(<$name<I, F>>::from_bits_unchecked(remainder(
                    self.0.to_bits(),
                    rhs.0.to_bits(),
                )))
            }
        }
        impl<I: $layout<F>, F: Unsigned> Neg for $w<$name<I, F>> {
            type Output = Self;
            #[inline]
            fn neg(self) -> Self {
                $w(self.0.$neg())
            }
        }
        impl<I: $layout<F>, F: Unsigned> AddAssign for $w<$name<I, F>> {
            #[inline]
            fn add_assign(&mut self, rhs: Self) {
                *self = *self + rhs;
            }
        }
        impl<I: $layout<F>, F: Unsigned> SubAssign for $w<$name<I, F>> {
            #[inline]
            fn sub_assign(&mut self, rhs: Self) {
                *self = *self - rhs;
            }
        }
        impl<I: $layout<F>, F: Unsigned> MulAssign for $w<$name<I, F>> {
            #[inline]
            fn mul_assign(&mut self, rhs: Self) {
                *self = *self * rhs;
            }
        }
        impl<I: $layout<F>, F: Unsigned> DivAssign for $w<$name<I, F>> {
            #[track_caller]
            fn div_assign(&mut self, rhs: Self) {
                *self = *self / rhs;
            }
        }
        impl<I: $layout<F>, F: Unsigned> RemAssign for $w<$name<I, F>> {
            #[track_caller]
            fn rem_assign(&mut self, rhs: Self) {
                *self = *self % rhs;
            }
        }
        impl<I: $layout<F>, F: Unsigned> Zero for $w<$name<I, F>> {
            fn zero() -> Self {
                $w(<$name<I, F>>::ZERO)
            }
            fn is_zero(&self) -> bool {
                self.0 == <$name<I, F>>::ZERO
            }
        }
        impl<I, F> One for $w<$name<I, F>>
        where
            I: $layout<F> + IsGreaterOrEqual<U1, Output = B1>,
            F: Unsigned,
        {
            fn one() -> Self {
                $w(<$name<I, F>>::from_int(1u8, Overflow::Wrap))
            }
        }
        impl<I, F> Num for $w<$name<I, F>>
        where
            I: $layout<F> + IsGreaterOrEqual<U1, Output = B1>,
            F: Unsigned,
        {
            type FromStrRadixErr = ParseError;
            /// Radix 2, 8, 10 or 16, with an optional radix point (and an
            /// exponent), rounded to nearest with ties to even; out of
            /// range is an error.
            fn from_str_radix(s: &str, radix: u32) -> Result<Self, ParseError> {
                crate::text::parse_checked::<$name<I, F>>(s, Some(radix), Rounding::NearestTiesEven)
                    .map($w)
            }
        }
        impl<I: $layout<F>, F: Unsigned> Bounded for $w<$name<I, F>> {
            fn min_value() -> Self {
                $w(<$name<I, F>>::MIN)
            }
            fn max_value() -> Self {
                $w(<$name<I, F>>::MAX)
            }
        }
        impl<I: $layout<F>, F: Unsigned> Sum for $w<$name<I, F>> {
            fn sum<It: Iterator<Item = Self>>(iter: It) -> Self {
                iter.fold(<Self as Zero>::zero(), |a, b| a + b)
            }
        }
        impl<'a, I: $layout<F>, F: Unsigned> Sum<&'a Self> for $w<$name<I, F>> {
            fn sum<It: Iterator<Item = &'a Self>>(iter: It) -> Self {
                iter.fold(<Self as Zero>::zero(), |a, b| a + *b)
            }
        }
        impl<I, F> Product for $w<$name<I, F>>
        where
            I: $layout<F> + IsGreaterOrEqual<U1, Output = B1>,
            F: Unsigned,
        {
            fn product<It: Iterator<Item = Self>>(iter: It) -> Self {
                iter.fold(<Self as One>::one(), |a, b| a * b)
            }
        }
        impl<I: $layout<F>, F: Unsigned> FromStr for $w<$name<I, F>> {
            type Err = ParseError;
            fn from_str(s: &str) -> Result<Self, ParseError> {
                s.parse().map($w)
            }
        }
        impl<I: $layout<F>, F: Unsigned> From<$name<I, F>> for $w<$name<I, F>> {
            fn from(x: $name<I, F>) -> Self {
                $w(x)
            }
        }
    };
}

wrapper_ops!(
    Wrapped,
    Sq,
    SignedLayout,
    Overflow::Wrap,
    wrapping_add,
    wrapping_sub,
    wrapping_mul,
    wrapping_neg
);
wrapper_ops!(
    Wrapped,
    Uq,
    UnsignedLayout,
    Overflow::Wrap,
    wrapping_add,
    wrapping_sub,
    wrapping_mul,
    wrapping_neg
);
wrapper_ops!(
    Saturated,
    Sq,
    SignedLayout,
    Overflow::Saturate,
    saturating_add,
    saturating_sub,
    saturating_mul,
    saturating_neg
);
wrapper_ops!(
    Saturated,
    Uq,
    UnsignedLayout,
    Overflow::Saturate,
    saturating_add,
    saturating_sub,
    saturating_mul,
    saturating_neg
);

/// Division by zero: a panic when wrapping, the bound toward the
/// dividend's sign when saturating.
#[track_caller]
fn divide_by_zero<T: QType>(x: T, overflow: Overflow) -> T {
    match overflow {
        Overflow::Saturate | Overflow::SaturateSymmetric => match x.cmp(&T::ZERO) {
            core::cmp::Ordering::Greater => T::MAX,
            core::cmp::Ordering::Less => T::MIN,
            core::cmp::Ordering::Equal => T::ZERO,
        },
        _ => panic!("qbound: division by zero"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integer_floats() {
        assert!(f64_is_integer(3.0));
        assert!(f64_is_integer(1e300));
        assert!(!f64_is_integer(0.5));
        assert!(!f64_is_integer(f64::NAN));
    }
}
