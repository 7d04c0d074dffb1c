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
//! ## Cargo features
//!
//! - `const-generics` (default): the `Q<I, F>` / `UQ<I, F>` aliases with
//!   `usize` parameters. Without it, name the types as `Sq<U7, U8>`.
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

mod format;
mod functions;
mod kernel;
pub mod layout;
mod ops;
mod overflow;
mod rounding;
mod storage;
mod typed;
mod value;
mod width;

pub use format::{Format, FormatError, MAX_WIDTH};
pub use functions::FunctionError;
pub use overflow::{Overflow, RangeError, Side};
pub use rounding::Rounding;
pub use storage::{Storage, Wide};
pub use typed::{QType, Sq, Uq, WidensTo};
pub use value::QValue;

#[doc(hidden)]
pub use storage::{Residue, WorkInt};
#[doc(hidden)]
pub use typed::{HoldsFractionBits, HoldsIntegerBits};

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
