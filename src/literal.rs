//! Compile-time constants from decimal text and from `f64`.
//!
//! The parser and the rounding kernel are `const fn`, so a coefficient can
//! be written as the decimal number from the design and checked by the
//! compiler: a malformed or out-of-range literal stops the build.
//!
//! ```
//! use qbound::{qconst, Q, UQ};
//! // Filter coefficients of an invented 2nd-order section, rounded to
//! // nearest (ties to even) at compile time.
//! const B0: Q<1, 14> = qconst!(Q<1, 14>, "0.2928932188134524");
//! const A1: Q<1, 14> = qconst!(Q<1, 14>, "-1.0e-1");
//! const GAIN: UQ<4, 12> = qconst!(UQ<4, 12>, f64 1.5);
//! assert_eq!(B0.to_bits(), 4799);
//! assert_eq!(A1.to_bits(), -1638);
//! assert_eq!(GAIN.to_bits(), 6144);
//! ```

use typenum::Unsigned;

use crate::convert::{BINARY64, FloatError, fit, scaled_from_float, wide_of};
use crate::format::Format;
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::rounding::Rounding;
use crate::text::parse_scaled;
use crate::typed::{Sq, Uq};
use crate::value::QValue;

impl QValue {
    /// The value of a decimal (or `0x`/`0o`/`0b`) literal in `format`,
    /// rounded to nearest with ties to even, in a `const` context.
    ///
    /// # Panics
    /// If the text is not a number or the rounded value does not fit. In a
    /// constant that is a compile error; at run time, prefer
    /// [`QValue::try_parse`].
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// const F: Format = Format::new_const(true, 0, 15);
    /// const HALF: QValue = QValue::from_literal(F, "0.5");
    /// assert_eq!(HALF.to_i128_bits(), Some(16384));
    /// ```
    #[must_use]
    #[track_caller]
    pub const fn from_literal(format: Format, text: &str) -> QValue {
        let sc = match parse_scaled(text.as_bytes(), None, format.frac_bits()) {
            Ok(sc) => sc,
            Err(e) => panic!("{}", e.describe()),
        };
        let (low, side) = fit(sc, Rounding::NearestTiesEven, format);
        if side.is_some() {
            panic!("qbound: literal out of range of the format");
        }
        QValue::from_wide_unchecked(format, wide_of(low, format))
    }

    /// The value of `x` in `format`, rounded to nearest with ties to even,
    /// in a `const` context (the float's bits are decomposed exactly; no
    /// float arithmetic is done).
    ///
    /// # Panics
    /// If `x` is NaN or infinite, or the rounded value does not fit; in a
    /// constant that is a compile error.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// const F: Format = Format::new_const(false, 0, 8);
    /// const V: QValue = QValue::from_f64_const(F, 0.1);
    /// assert_eq!(V.to_i128_bits(), Some(26)); // 25.6 steps
    /// ```
    #[must_use]
    #[track_caller]
    pub const fn from_f64_const(format: Format, x: f64) -> QValue {
        let sc = match scaled_from_float(BINARY64, x.to_bits(), format.frac_bits()) {
            Ok(sc) => sc,
            Err(FloatError::NaN) => panic!("qbound: NaN has no fixed-point value"),
            Err(_) => panic!("qbound: an infinity has no fixed-point value"),
        };
        let (low, side) = fit(sc, Rounding::NearestTiesEven, format);
        if side.is_some() {
            panic!("qbound: value out of range of the format");
        }
        QValue::from_wide_unchecked(format, wide_of(low, format))
    }
}

macro_rules! literal_bits {
    ($name:ident, $layout:ident) => {
        impl<I: $layout<F>, F: Unsigned> $name<I, F> {
            /// Used by [`qconst!`](crate::qconst) only: the bits of a value
            /// that [`QValue::from_literal`] has already range-checked.
            #[doc(hidden)]
            #[must_use]
            pub const fn __from_literal_bits(bits: <I as $layout<F>>::Storage) -> Self {
                Self::from_bits_unchecked(bits)
            }
        }
    };
}

literal_bits!(Sq, SignedLayout);
literal_bits!(Uq, UnsignedLayout);

/// A typed constant from a decimal (or `0x`/`0o`/`0b`) literal, or from an
/// `f64` with `f64 <expr>`, rounded to nearest (ties to even) at compile
/// time. A malformed literal, NaN, an infinity or a value out of range is
/// a compile error.
///
/// ```
/// use qbound::{qconst, Q};
/// const PI: Q<2, 13> = qconst!(Q<2, 13>, "3.14159265358979323846");
/// assert_eq!(PI.to_bits(), 25736);
/// const E: Q<2, 13> = qconst!(Q<2, 13>, f64 core::f64::consts::E);
/// assert_eq!(E.to_string(), "2.71826171875");
/// # assert_eq!(E.to_bits(), 22268);
/// ```
///
/// ```compile_fail
/// use qbound::{qconst, Q};
/// const TOO_BIG: Q<3, 4> = qconst!(Q<3, 4>, "8.0"); // Q3.4 ends below 8
/// ```
#[macro_export]
macro_rules! qconst {
    ($t:ty, f64 $x:expr) => {
        const {
            let v = $crate::QValue::from_f64_const(<$t>::FORMAT, $x);
            <$t>::__from_literal_bits(v.bits().low_bits() as _)
        }
    };
    ($t:ty, $text:expr) => {
        const {
            let v = $crate::QValue::from_literal(<$t>::FORMAT, $text);
            <$t>::__from_literal_bits(v.bits().low_bits() as _)
        }
    };
}
