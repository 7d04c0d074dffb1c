//! The typed forms on [`Sq`] and [`Uq`]: the output format is a type
//! parameter, the kernels are the run-time ones of this module, called with
//! the formats as constants.

use typenum::Unsigned;

use super::{FunctionError, divide, domain_panic, explog, root, trig};
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::overflow::Overflow;
use crate::rounding::Rounding;
use crate::typed::{QType, Sq, Uq};

/// The one list of the functions (with the inherent methods' docs): calls
/// `$cb!` with the given leading tokens and the list.
macro_rules! function_list {
    ($cb:ident $($lead:tt)*) => {
        $cb! { $($lead)*
            /// `self / rhs` correctly rounded into the format of `T` (any
            /// operand formats).
            ///
            /// # Panics
            /// If `rhs` is zero, or with [`Overflow::Panic`] if the quotient
            /// does not fit.
            ///
            /// ```
            /// use qbound::{Q, Rounding, Overflow};
            /// let x = Q::<7, 8>::from_bits(256);  // 1.0
            /// let y = Q::<7, 8>::from_bits(768);  // 3.0
            /// let q: Q<0, 15> = x.div(y, Rounding::NearestTiesEven, Overflow::Saturate);
            /// assert_eq!(q.to_bits(), 10923);     // 1/3, correctly rounded
            /// ```
            fn div / try_div (rhs) => divide::div;
            /// `1 / self` correctly rounded into the format of `T`.
            ///
            /// # Panics
            /// If `self` is zero, or with [`Overflow::Panic`] if the result
            /// does not fit.
            ///
            /// ```
            /// use qbound::{UQ, Rounding, Overflow};
            /// let x = UQ::<4, 4>::from_bits(48);  // 3.0
            /// let r: UQ<0, 8> = x.recip(Rounding::Ceil, Overflow::Panic);
            /// assert_eq!(r.to_bits(), 86);        // ceil(256 / 3)
            /// ```
            fn recip / try_recip () => divide::recip;
            /// The square root, correctly rounded into the format of `T`.
            ///
            /// # Panics
            /// If `self` is negative, or with [`Overflow::Panic`] if the root
            /// does not fit.
            ///
            /// ```
            /// use qbound::{UQ, Rounding, Overflow};
            /// let x = UQ::<2, 0>::from_bits(2);
            /// let r: UQ<1, 15> = x.sqrt(Rounding::Floor, Overflow::Panic);
            /// assert_eq!(r.to_bits(), 46340);     // floor(sqrt(2) * 2^15)
            /// ```
            fn sqrt / try_sqrt () => root::sqrt;
            /// `sin(2π·self)`: the sine of an angle in turns, so a wrapping
            /// phase accumulator of any width feeds it directly.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{UQ, Q, Rounding, Overflow};
            /// let phase = UQ::<0, 32>::from_bits(1 << 29);  // 1/8 turn
            /// let s: Q<0, 15> = phase.sin_turns(Rounding::NearestTiesEven, Overflow::Saturate);
            /// assert_eq!(s.to_bits(), 23170);              // sqrt(2)/2
            /// ```
            fn sin_turns / try_sin_turns () => trig::sin_turns;
            /// `cos(2π·self)`: the cosine of an angle in turns.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{UQ, Q, Rounding, Overflow};
            /// let phase = UQ::<0, 16>::from_bits(0x8000);  // 1/2 turn
            /// let c: Q<0, 15> = phase.cos_turns(Rounding::Floor, Overflow::Saturate);
            /// assert_eq!(c, Q::<0, 15>::MIN);              // exactly -1
            /// ```
            fn cos_turns / try_cos_turns () => trig::cos_turns;
            /// The sine of an angle in radians.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{Q, Rounding, Overflow};
            /// let x = Q::<3, 12>::from_bits(4096);  // 1 rad
            /// let s: Q<0, 15> = x.sin(Rounding::NearestTiesEven, Overflow::Panic);
            /// assert_eq!(s.to_bits(), 27573);      // sin(1) * 2^15 = 27573.32
            /// ```
            fn sin / try_sin () => trig::sin_radians;
            /// The cosine of an angle in radians.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{Q, Rounding, Overflow};
            /// let x = Q::<3, 12>::from_bits(4096);  // 1 rad
            /// let c: Q<0, 15> = x.cos(Rounding::NearestTiesEven, Overflow::Panic);
            /// assert_eq!(c.to_bits(), 17705);      // cos(1) * 2^15 = 17704.63
            /// ```
            fn cos / try_cos () => trig::cos_radians;
            /// `atan2(self, x)` in turns, in `(-1/2, 1/2]`: the angle of the
            /// point `(x, self)`; `atan2(0, 0)` is 0.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{Q, Rounding, Overflow};
            /// let y = Q::<1, 14>::from_bits(-16384);  // -1
            /// let x = Q::<1, 14>::from_bits(-16384);  // -1
            /// let a: Q<0, 15> = y.atan2_turns(x, Rounding::Floor, Overflow::Panic);
            /// assert_eq!(a.to_bits(), -12288);       // exactly -3/8 turn
            /// ```
            fn atan2_turns / try_atan2_turns (x) => trig::atan2_turns;
            /// `atan2(self, x)` in radians, in `(-π, π]`.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{Q, Rounding, Overflow};
            /// let one = Q::<1, 6>::from_bits(64);
            /// let a: Q<2, 13> = one.atan2(one, Rounding::NearestTiesEven, Overflow::Panic);
            /// assert_eq!(a.to_bits(), 6434);         // pi/4 * 2^13 = 6433.98
            /// ```
            fn atan2 / try_atan2 (x) => trig::atan2_radians;
            /// `2^self`.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the result does not fit.
            ///
            /// ```
            /// use qbound::{Q, UQ, Rounding, Overflow};
            /// let x = Q::<3, 4>::from_bits(-24);     // -1.5
            /// let r: UQ<0, 16> = x.exp2(Rounding::NearestTiesEven, Overflow::Panic);
            /// assert_eq!(r.to_bits(), 23170);       // 2^-1.5 * 2^16 = 23170.48
            /// ```
            fn exp2 / try_exp2 () => explog::exp2;
            /// `log2(self)`.
            ///
            /// # Panics
            /// If `self` is zero or negative, or with [`Overflow::Panic`] if
            /// the result does not fit.
            ///
            /// ```
            /// use qbound::{UQ, Q, Rounding, Overflow};
            /// let x = UQ::<8, 8>::from_bits(3 << 8);  // 3.0
            /// let r: Q<3, 12> = x.log2(Rounding::NearestTiesEven, Overflow::Panic);
            /// assert_eq!(r.to_bits(), 6492);         // log2(3) * 2^12 = 6492.01
            /// ```
            fn log2 / try_log2 () => explog::log2;
        }
    };
}

/// The inherent methods on `Sq` / `Uq`, forwarding to [`QFunctions`].
macro_rules! typed_fns {
    ($name:ident, $layout:ident, $(
        $(#[$doc:meta])*
        fn $f:ident / $try_f:ident ( $($arg:ident)? ) => $m:ident :: $k:ident;
    )*) => {
        impl<I: $layout<F>, F: Unsigned> $name<I, F> {$(
            $(#[$doc])*
            #[inline]
            #[track_caller]
            #[must_use]
            pub fn $f<T: QType>(self, $($arg: impl QType,)? rounding: Rounding, overflow: Overflow) -> T {
                <Self as QFunctions>::$f::<T>(self, $($arg,)? rounding, overflow)
            }

            /// Like the form without `try_`, with a [`FunctionError`]
            /// instead of a panic or an overflow mode.
            ///
            /// ```
            /// use qbound::{FunctionError, Q, Rounding};
            /// let zero = Q::<3, 4>::ZERO;
            /// assert_eq!(zero.try_log2::<Q<3, 4>>(Rounding::Floor), Err(FunctionError::LogOfNonPositive));
            /// ```
            #[inline]
            pub fn $try_f<T: QType>(self, $($arg: impl QType,)? rounding: Rounding) -> Result<T, FunctionError> {
                <Self as QFunctions>::$try_f::<T>(self, $($arg,)? rounding)
            }
        )*}
    };
}

function_list!(typed_fns Sq, SignedLayout,);
function_list!(typed_fns Uq, UnsignedLayout,);

/// The typed function body: the run-time kernel with the formats as
/// constants.
macro_rules! trait_fns {
    ($(
        $(#[$doc:meta])*
        fn $f:ident / $try_f:ident ( $($arg:ident)? ) => $m:ident :: $k:ident;
    )*) => {
        /// Division and the elementary functions for code generic over
        /// formats: every [`QType`] has them (see [`Sq::div`](crate::Sq::div)
        /// and the following methods for each one's contract and examples).
        ///
        /// ```
        /// use qbound::{QFunctions, QType, Q, UQ, Rounding, Overflow};
        /// // A sine table for any phase and output format.
        /// fn table<P: QType, T: QType, const N: usize>(step: P) -> [T; N] {
        ///     let mut phase = P::ZERO;
        ///     core::array::from_fn(|_| {
        ///         let s = phase.sin_turns(Rounding::NearestTiesEven, Overflow::Saturate);
        ///         phase = phase.wrapping_add(step);
        ///         s
        ///     })
        /// }
        /// let t: [Q<0, 15>; 4] = table(UQ::<0, 8>::from_bits(64)); // quarter turns
        /// assert_eq!(t.map(|s| s.to_bits()), [0, 32767, 0, -32768]);
        /// ```
        pub trait QFunctions: QType {$(
            /// See the method of the same name on [`Sq`](crate::Sq).
            ///
            /// # Panics
            /// On a domain error, or with [`Overflow::Panic`] if the result
            /// does not fit.
            #[inline]
            #[track_caller]
            fn $f<T: QType>(self, $($arg: impl QType,)? rounding: Rounding, overflow: Overflow) -> T {
                match $m::$k::<T::Storage>(self.to_value(), $($arg.to_value(),)? T::FORMAT, rounding) {
                    Ok(f) => T::from_bits_in_range(f.resolve(T::FORMAT, overflow)),
                    Err(e) => domain_panic(e),
                }
            }

            /// Like the form without `try_`, with a [`FunctionError`]
            /// instead of a panic or an overflow mode.
            #[inline]
            fn $try_f<T: QType>(self, $($arg: impl QType,)? rounding: Rounding) -> Result<T, FunctionError> {
                let f = $m::$k::<T::Storage>(self.to_value(), $($arg.to_value(),)? T::FORMAT, rounding)?;
                Ok(T::from_bits_in_range(f.checked(T::FORMAT)?))
            }
        )*}
    };
}

function_list!(trait_fns);

impl<T: QType> QFunctions for T {}
