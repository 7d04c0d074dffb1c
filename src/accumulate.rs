//! Sums of products with guard bits: the multiply-accumulate loop of every
//! FIR filter, correlator and matrix product, with the no-overflow argument
//! made once instead of at every step.
//!
//! An accumulator with `g` more integer bits than the product format (its
//! *guard bits*) holds the exact sum of up to `2^g` products: each product
//! lies in `[-2^Ip, 2^Ip)`, so `n <= 2^g` of them sum into
//! `[-2^(Ip+g), 2^(Ip+g))`. Every partial sum is bounded the same way, so
//! the loop can add in the accumulator's native integer with no per-step
//! overflow check or wrap, exactly as hand-written firmware does, and the
//! compiler is free to vectorise it. The one check (the number of terms
//! against the guard bits) happens once, before the loop; for arrays it
//! happens at compile time.

use core::fmt;
use core::ops::Mul;

use crate::format::Format;
use crate::rounding::Rounding;
use crate::storage::Storage;
use crate::typed::{QType, WidensTo};

/// Why a sum of products was refused.
///
/// ```
/// use qbound::{AccumulateError, Q};
/// let xs = [Q::<0, 15>::MAX; 3];
/// let hs = [Q::<0, 15>::MAX; 2];
/// let r = Q::<2, 30>::sum_of_products(&xs, &hs);
/// assert_eq!(r, Err(AccumulateError::LengthMismatch { left: 3, right: 2 }));
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
#[non_exhaustive]
pub enum AccumulateError {
    /// The two slices have different lengths.
    LengthMismatch {
        /// Length of the first slice.
        left: usize,
        /// Length of the second slice.
        right: usize,
    },
    /// More terms than the accumulator's guard bits allow.
    TooManyTerms {
        /// Terms given.
        terms: usize,
        /// The most terms the guard bits allow (`2^g`).
        max: u128,
        /// Guard bits: accumulator integer bits minus product integer bits.
        guard_bits: u32,
    },
}

impl fmt::Display for AccumulateError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            AccumulateError::LengthMismatch { left, right } => {
                write!(
                    f,
                    "sum of products over slices of different lengths ({left} and {right})"
                )
            }
            AccumulateError::TooManyTerms {
                terms,
                max,
                guard_bits,
            } => write!(
                f,
                "{terms} terms may overflow an accumulator with {guard_bits} guard bits (at most {max} terms); \
                 use an accumulator with more integer bits"
            ),
        }
    }
}

impl core::error::Error for AccumulateError {}

/// Guard bits of accumulator format `acc` over product format `p` (the
/// accumulator must hold every product).
const fn guard_bits(acc: Format, p: Format) -> u32 {
    acc.int_bits() - p.int_bits()
}

/// The most terms `g` guard bits allow.
const fn max_terms(g: u32) -> u128 {
    if g >= 128 { u128::MAX } else { 1u128 << g }
}

/// Sum of `x[i] * h[i]` in the accumulator's native integer (the caller
/// has checked the term count against the guard bits).
#[inline(always)]
fn accumulate<X, H, P, A>(xs: &[X], hs: &[H]) -> A
where
    X: QType + Mul<H, Output = P>,
    H: QType,
    P: QType + WidensTo<A>,
    A: QType,
{
    let shift = A::FORMAT.frac_bits() - P::FORMAT.frac_bits();
    let mut acc = <A::Storage as Storage>::ZERO;
    for (x, h) in xs.iter().zip(hs) {
        let p = (*x * *h).to_bits();
        acc = acc.wrapping_add(p.cast::<A::Storage>().shl(shift));
    }
    A::wrapping_from_bits(acc)
}

macro_rules! sum_of_products_impl {
    ($name:ident, $layout:ident) => {
        impl<I: crate::layout::$layout<F>, F: typenum::Unsigned> crate::typed::$name<I, F> {
            /// The exact sum of `xs[i] × hs[i]`, accumulated in this format.
            ///
            /// `Self` must hold every product (`widen` from the product
            /// format compiles), and its extra integer bits are the guard
            /// bits `g`: up to `2^g` terms are accepted, checked once before
            /// the loop. The loop itself adds native integers with no
            /// per-term check, as hand-written code does.
            ///
            /// ```
            /// use qbound::Q;
            /// // 64-tap FIR: Q0.15 samples and coefficients, products Q1.30,
            /// // a 40-bit Q9.30 accumulator (8 guard bits, up to 256 terms).
            /// let xs = [Q::<0, 15>::MIN; 64];
            /// let hs = [Q::<0, 15>::MIN; 64];
            /// let acc = Q::<9, 30>::sum_of_products(&xs, &hs)?;
            /// assert_eq!(acc.to_bits(), 64 << 30); // 64 × (−1)² = 64.0
            /// # Ok::<(), qbound::AccumulateError>(())
            /// ```
            pub fn sum_of_products<X, H, P>(xs: &[X], hs: &[H]) -> Result<Self, AccumulateError>
            where
                X: QType + Mul<H, Output = P>,
                H: QType,
                P: QType + WidensTo<Self>,
            {
                if xs.len() != hs.len() {
                    return Err(AccumulateError::LengthMismatch {
                        left: xs.len(),
                        right: hs.len(),
                    });
                }
                let g = guard_bits(Self::FORMAT, P::FORMAT);
                if xs.len() as u128 > max_terms(g) {
                    return Err(AccumulateError::TooManyTerms {
                        terms: xs.len(),
                        max: max_terms(g),
                        guard_bits: g,
                    });
                }
                Ok(accumulate::<X, H, P, Self>(xs, hs))
            }

            /// The exact sum of `xs[i] × hs[i]` over two arrays; the term
            /// count is checked against the guard bits at compile time.
            ///
            /// ```
            /// use qbound::{Q, Rounding, Overflow};
            /// let xs = [Q::<0, 15>::from_bits(0x4000); 4]; // 0.5
            /// let hs = [Q::<0, 15>::from_bits(0x2000); 4]; // 0.25
            /// let acc = Q::<3, 30>::dot(&xs, &hs);         // 2 guard bits: 4 terms
            /// let y: Q<0, 15> = acc.rescale(Rounding::NearestTiesEven, Overflow::Saturate);
            /// assert_eq!(y.to_bits(), 0x4000);             // 0.5
            /// ```
            pub fn dot<X, H, P, const N: usize>(xs: &[X; N], hs: &[H; N]) -> Self
            where
                X: QType + Mul<H, Output = P>,
                H: QType,
                P: QType + WidensTo<Self>,
            {
                const {
                    assert!(
                        N as u128 <= max_terms(guard_bits(Self::FORMAT, P::FORMAT)),
                        "qbound: more terms than the accumulator's guard bits allow; give the accumulator more integer bits"
                    )
                };
                accumulate::<X, H, P, Self>(xs, hs)
            }
        }
    };
}

sum_of_products_impl!(Sq, SignedLayout);
sum_of_products_impl!(Uq, UnsignedLayout);

/// Round a slice of values into another format, element by element; a
/// convenience for the end of a block-processing loop.
///
/// ```
/// use qbound::{rescale_slice, Q, Rounding, Overflow};
/// let acc = [Q::<9, 30>::from_bits(3 << 28), Q::<9, 30>::from_bits(-(1 << 38))];
/// let mut out = [Q::<0, 15>::ZERO; 2];
/// rescale_slice(&acc, &mut out, Rounding::NearestTiesEven, Overflow::Saturate);
/// assert_eq!(out[0].to_bits(), 0x6000); // 0.75
/// assert_eq!(out[1], Q::<0, 15>::MIN);  // saturated
/// ```
pub fn rescale_slice<S: QType, T: QType>(
    src: &[S],
    dst: &mut [T],
    rounding: Rounding,
    overflow: crate::Overflow,
) {
    for (d, s) in dst.iter_mut().zip(src) {
        *d = crate::typed::rescale_into(*s, rounding, overflow);
    }
}
