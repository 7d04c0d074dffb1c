//! # qbound — fixed-point arithmetic with the format in the type
//!
//! qbound turns a real-valued design into integer arithmetic you can trust.
//! Every value carries its binary-point format — sign, integer bits `I`,
//! fraction bits `F` — in its type:
//!
//! - `Q<I, F>` ([`Sq`]): signed, word length `1 + I + F`, range
//!   `[-2^I, 2^I - 2^-F]`. `Q<7, 8>` is the trade's Q7.8: 16 bits,
//!   −128 to 127.99609375 in steps of 1/256.
//! - `UQ<I, F>` ([`Uq`]): unsigned, word length `I + F`.
//!
//! Any word length from 1 to 128 bits works; the bits live in the smallest
//! native integer that holds them.
//!
//! ## Exact operators, explicit narrowing
//!
//! `+`, `-`, `*` and unary `-` never round and never overflow: the result
//! type is wide enough for every possible result (`Q1.15 × Q1.15` is
//! `Q3.30`). Information is lost only where the code says so, in
//! [`Sq::rescale`] with a [`Rounding`] mode and an [`Overflow`] mode, or in
//! the std-named same-format families (`wrapping_add`, `saturating_add`,
//! `checked_add`, `overflowing_add`, and likewise for sub, neg, abs and
//! mul). [`Sq::widen`] converts into any format that holds every value,
//! checked at compile time.
//!
//! ```
//! use qbound::{Q, Rounding, Overflow};
//!
//! let sample = Q::<0, 15>::from_bits(0x6000);      // 0.75
//! let coeff = Q::<0, 15>::from_bits(-0x2000);      // -0.25
//! let product = sample * coeff;                    // Q1.30, exact
//! let mut acc = Q::<9, 30>::ZERO;                  // 40-bit accumulator
//! acc += product;                                  // widens losslessly
//! let out: Q<0, 15> = acc.rescale(Rounding::NearestTiesEven, Overflow::Saturate);
//! assert_eq!(out.to_bits(), -0x1800);              // -0.1875
//! ```
//!
//! A product wider than 128 bits does not compile; neither does a lossy
//! `widen`. Both errors say what to do instead.
//!
//! ## Run-time formats
//!
//! [`Format`] is the format as a value (`"Q7.8".parse()`), with the format
//! algebra ([`Format::sum`], [`Format::product`], …) as the single
//! definition of result formats. [`QValue`] is a value with a run-time
//! format that runs the same kernels as the typed values; the audit tool
//! uses it.
//!
//! ## Division and functions
//!
//! Division, reciprocal, square root, sine and cosine of an angle in turns
//! (a wrapping phase accumulator feeds them directly) or radians, `atan2`,
//! `exp2` and `log2` take the output format as a type parameter, a
//! [`Rounding`] mode and an [`Overflow`] mode, and compute with integers
//! only. Division, reciprocal and square root are correctly rounded in every
//! mode; the others are correctly rounded unless the exact value lies within
//! 2^-112 of a rounding boundary, and always within one ulp. `try_` forms
//! return a [`FunctionError`] for a zero divisor, a negative root or a
//! logarithm of a non-positive number.
//!
//! ```
//! use qbound::{Q, UQ, Rounding, Overflow};
//! let phase = UQ::<0, 16>::from_bits(0x2000);                 // 1/8 turn
//! let s: Q<1, 14> = phase.sin_turns(Rounding::NearestTiesEven, Overflow::Saturate);
//! assert_eq!(s.to_bits(), 11585);                            // √2/2 ≈ 0.70709
//! let x = UQ::<8, 8>::from_bits(2 << 8);                     // 2.0
//! let r: UQ<1, 15> = x.sqrt(Rounding::NearestTiesEven, Overflow::Saturate);
//! assert_eq!(r.to_bits(), 46341);                            // √2 ≈ 1.41422
//! ```
//!
//! ## Conversions: exact, rounded or checked
//!
//! Every conversion is one of three kinds, and its name says which:
//!
//! - **Exact**: nothing can be lost. `From` impls exist only where the
//!   format holds every value of the source (`i8` into any `Q<I, F>` with
//!   `I >= 7`, `bool` into an unsigned format with an integer bit);
//!   [`Sq::to_f64`] is exact for formats of at most 53 bits.
//! - **Rounded**: [`Sq::from_int`], [`Sq::to_int`], [`Sq::from_f64`],
//!   [`Sq::from_f32`], [`Sq::parse`] take a [`Rounding`] mode for the
//!   fraction bits and an [`Overflow`] mode for the integer bits. Pick the
//!   modes the firmware uses, and the model stays bit-exact. NaN and the
//!   infinities are always errors ([`FloatError`]).
//! - **Checked**: `try_from_int`, `try_to_int`, `try_from_f64`,
//!   `try_parse` and the `checked_` forms round the same way but report a
//!   value that does not fit instead of wrapping or clamping it. Use them
//!   at trust boundaries: configuration files, host tools, test vectors.
//!
//! Float to fixed point is *exact, then rounded*: the float's bits are
//! decomposed into an integer times a power of two and rounded once, with
//! integer operations only. Fixed point to float is correctly rounded
//! (IEEE 754 roundTiesToEven; beyond `f32::MAX` it is infinity).
//!
//! ```
//! use qbound::{Q, Rounding, Overflow};
//! type Coeff = Q<1, 14>;
//! let c = Coeff::from_f64(0.1, Rounding::NearestTiesEven, Overflow::Saturate)?;
//! assert_eq!(c.to_bits(), 1638);
//! assert!(Coeff::try_from_f64(2.0, Rounding::NearestTiesEven).is_err());
//! assert_eq!(Coeff::from_f64(2.0, Rounding::NearestTiesEven, Overflow::Saturate)?, Coeff::MAX);
//! # Ok::<(), qbound::FloatError>(())
//! ```
//!
//! Constants can be written as decimal text and are checked by the
//! compiler: [`qconst!`] rounds to nearest (ties to even) at compile time,
//! and a malformed or out-of-range literal fails the build.
//!
//! ## Text
//!
//! `{}` prints the exact decimal value (a binary fraction always has a
//! finite decimal expansion); `{:.N}` rounds to `N` places, ties to even,
//! without floats; width, fill, alignment, `+` and `0` work as for the
//! primitive numbers; a negative value rounded to zero keeps its sign
//! (`-0.00`), as `f64` does. `{:x}`, `{:X}`, `{:o}`, `{:b}` print the stored
//! bits with every digit of the word; the alternate form (`{:#x}`) adds
//! the prefix and marks the binary point (`0x01.80` is 1.5 in Q7.8).
//! `{:?}` shows format and value: `Q7.8(1.5)`.
//!
//! Parsing ([`Sq::parse`], [`Sq::try_parse`], `FromStr`, [`QValue::parse`])
//! accepts an optional sign, then decimal digits with at most one `.` and
//! an optional exponent (`-12.5e-3`, `.5`, `5.`), or `0x`, `0o`, `0b`
//! digits with at most one `.` and an optional binary exponent `p`
//! (`0x1.8p3` is 12). Any number of digits is read; the exact value is
//! rounded once (correct rounding). A huge exponent is a value, not a
//! syntax error: `1e-999999` rounds like any tiny value. `FromStr` rounds
//! to nearest with ties to even and reports a value out of range as an
//! error. Errors ([`ParseError`]) give the kind and the byte position.
//!
//! ## Generic numeric code
//!
//! The bare types keep exact widening operators, so they implement only
//! the `num-traits` traits whose meaning stays exact or explicit:
//! `Bounded`, `FromPrimitive` (floats rounded to nearest, ties to even;
//! `None` for NaN, ±∞ and out of range), `ToPrimitive` (to integers toward
//! zero, as `f64::to_i32`; to floats correctly rounded), `NumCast`,
//! `Saturating`, `CheckedNeg`, `WrappingNeg`. Traits such as `Zero`,
//! `One`, `Num`, `Sum` need `Add<Output = Self>`, an operator that would
//! round or overflow silently; for them wrap a value in [`Wrapped`] or
//! [`Saturated`], whose `+ - * / %` stay in the format (`*` and `/` round
//! to nearest, ties to even).
//!
//! ## Code generic over formats
//!
//! [`QType`] (bits, format, rescale, conversions, text, the same-format
//! families) and [`QFunctions`] (division and the functions) are
//! implemented by every typed format, so a filter or a test sweep is
//! written once: `fn step<S: QType, A: QType>(x: S) -> A`. The concrete
//! types keep the same methods as inherent methods.
//!
//! ## Cargo features
//!
//! - `const-generics` (default): the `Q<I, F>` / `UQ<I, F>` aliases with
//!   `usize` parameters. Without it, name the types as `Sq<U7, U8>`.
//! - `function-tables` (default): 64-bit fast paths of `sin_turns`,
//!   `cos_turns`, `atan2_turns`, `exp2` and `log2` with their lookup
//!   tables (about 7.7 KB). Without it (`default-features = false`, for
//!   flash-constrained targets) the same functions give the same results
//!   from the shift-and-add kernels, 4 to 8 times slower.
//! - `serde`: for the typed values, [`QValue`] and [`Format`]; human-readable formats carry the exact decimal text
//!   (`"1.5"`), binary formats the stored integer; a value that does not
//!   fit is an error when read, never wrapped or clamped.
//! - `defmt`: values, [`QValue`] and [`Format`] log through `defmt` as
//!   `Q7.8(1.5)`, rendered into a stack buffer (no allocation).
//!
//! ## Safety-related use
//!
//! qbound gives exact, reproducible arithmetic and its audit gives bounds,
//! but neither replaces the verification that safety-related firmware
//! (control loops, protection functions) needs under its applicable
//! standard and local practice.
#![no_std]
#![forbid(unsafe_code)]
#![deny(missing_docs)]
#![deny(unconditional_recursion)]

#[cfg(test)]
extern crate std;

mod accumulate;
mod convert;
#[cfg(feature = "defmt")]
mod defmt_impls;
mod format;
mod functions;
mod kernel;
pub mod layout;
mod literal;
mod ops;
mod overflow;
mod rounding;
#[cfg(feature = "serde")]
mod serde_impls;
mod storage;
mod text;
mod traits;
mod typed;
mod value;
mod width;

pub use accumulate::{AccumulateError, rescale_slice};
pub use convert::{FloatError, PrimitiveInt};
pub use format::{Format, FormatError, MAX_WIDTH};
#[doc(hidden)]
pub use functions::__paths;
pub use functions::{FunctionError, QFunctions};
pub use overflow::{Overflow, RangeError, Side};
pub use rounding::Rounding;
pub use storage::{Storage, Wide};
pub use text::{ParseError, ParseErrorKind};
pub use traits::{Saturated, Wrapped};
pub use typed::{QType, Sq, Uq, WidensTo};
pub use value::QValue;

#[doc(hidden)]
pub use storage::{Residue, WorkInt};
#[doc(hidden)]
pub use typed::{HoldsFractionBits, HoldsIntegerBits, SignedIntoUnsigned};

/// The signed format `Q(I, F)` with `usize` parameters: `Q<7, 8>` is
/// [`Sq<U7, U8>`](Sq).
///
/// ```
/// use qbound::Q;
/// assert_eq!(Q::<7, 8>::FORMAT.width(), 16);
/// ```
#[cfg(feature = "const-generics")]
pub type Q<const I: usize, const F: usize> = Sq<typenum::U<I>, typenum::U<F>>;

/// The unsigned format `UQ(I, F)` with `usize` parameters: `UQ<8, 8>` is
/// [`Uq<U8, U8>`](Uq).
///
/// ```
/// use qbound::UQ;
/// assert_eq!(UQ::<8, 8>::FORMAT.width(), 16);
/// ```
#[cfg(feature = "const-generics")]
pub type UQ<const I: usize, const F: usize> = Uq<typenum::U<I>, typenum::U<F>>;

/// The README's code blocks, compiled and run as doctests.
#[cfg(doctest)]
#[doc = include_str!("../README.md")]
pub struct ReadmeDoctests;
