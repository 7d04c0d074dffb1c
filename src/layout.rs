//! Type-level layout: from the integer and fraction bit counts of a typed
//! format to its word length and native storage.
//!
//! These traits appear in the bounds of [`crate::Sq`] and [`crate::Uq`] but
//! are implemented once, for every valid pair, by blanket impls; users never
//! implement them. A format wider than 128 bits (or an unsigned format with
//! no bits) has no [`Width`] and so fails to compile with a message that
//! says why.

use core::ops::Add;
use typenum::{Add1, B1, Sum, Unsigned};

use crate::storage::Storage;

/// A word length from 1 to 128 bits, with the native integers that store
/// it. Implemented for `typenum::U1 ..= U128` only.
///
/// ```
/// use qbound::layout::Width;
/// assert_eq!(<typenum::U12 as Width>::SIGNED_MAX, 2047i16);
/// assert_eq!(<typenum::U12 as Width>::UNSIGNED_MAX, 4095u16);
/// ```
#[diagnostic::on_unimplemented(
    message = "this fixed-point format needs a word length outside 1..=128 bits",
    label = "no native integer stores this format",
    note = "qbound stores formats of 1 to 128 bits; an exact product's word length is the sum of its operands' (Q x Q: W1 + W2)",
    note = "to multiply wide formats, rescale an operand to fewer bits first, or use a rounding multiply such as `mul_rescale`, `saturating_mul` or `wrapping_mul`"
)]
pub trait Width: Unsigned {
    /// Signed storage for this word length.
    type Signed: Storage;
    /// Unsigned storage for this word length.
    type Unsigned: Storage;
    /// `-2^(W-1)` in the signed storage.
    const SIGNED_MIN: Self::Signed;
    /// `2^(W-1) - 1` in the signed storage.
    const SIGNED_MAX: Self::Signed;
    /// `2^W - 1` in the unsigned storage.
    const UNSIGNED_MAX: Self::Unsigned;
}

/// The layout of the signed format `Q(Self, F)`: word length `1 + I + F`.
///
/// ```
/// use qbound::layout::SignedLayout;
/// use typenum::{U7, U8};
/// assert_eq!(<U7 as SignedLayout<U8>>::WIDTH, 16);
/// ```
pub trait SignedLayout<F>: Unsigned {
    /// The native integer that stores the format.
    type Storage: Storage;
    /// Word length.
    const WIDTH: u32;
    /// Smallest stored integer.
    const MIN_BITS: Self::Storage;
    /// Largest stored integer.
    const MAX_BITS: Self::Storage;
}

impl<I, F> SignedLayout<F> for I
where
    I: Unsigned + Add<F>,
    F: Unsigned,
    Sum<I, F>: Add<B1>,
    Add1<Sum<I, F>>: Width,
{
    type Storage = <Add1<Sum<I, F>> as Width>::Signed;
    const WIDTH: u32 = <Add1<Sum<I, F>> as Unsigned>::U32;
    const MIN_BITS: Self::Storage = <Add1<Sum<I, F>> as Width>::SIGNED_MIN;
    const MAX_BITS: Self::Storage = <Add1<Sum<I, F>> as Width>::SIGNED_MAX;
}

/// The layout of the unsigned format `UQ(Self, F)`: word length `I + F`.
///
/// ```
/// use qbound::layout::UnsignedLayout;
/// use typenum::{U8, U0};
/// assert_eq!(<U8 as UnsignedLayout<U0>>::WIDTH, 8);
/// ```
pub trait UnsignedLayout<F>: Unsigned {
    /// The native integer that stores the format.
    type Storage: Storage;
    /// Word length.
    const WIDTH: u32;
    /// Largest stored integer.
    const MAX_BITS: Self::Storage;
}

impl<I, F> UnsignedLayout<F> for I
where
    I: Unsigned + Add<F>,
    F: Unsigned,
    Sum<I, F>: Width,
{
    type Storage = <Sum<I, F> as Width>::Unsigned;
    const WIDTH: u32 = <Sum<I, F> as Unsigned>::U32;
    const MAX_BITS: Self::Storage = <Sum<I, F> as Width>::UNSIGNED_MAX;
}
