//! The arithmetic kernels, written once and shared by the typed values
//! ([`crate::Sq`], [`crate::Uq`]) and the run-time [`crate::QValue`].
//!
//! Each kernel is generic over the native storage types, so after
//! monomorphisation with constant formats the compiler folds the format
//! arithmetic away and runs the native-width instructions.

use core::cmp::Ordering;

use crate::format::Format;
use crate::overflow::{Overflow, RangeError, Side};
use crate::rounding::{Rounding, shr_round};
use crate::storage::{Product256, Storage, WorkInt};

/// A rounded result before the overflow mode is applied: its bits reduced
/// modulo 2^width into the format (what wrap-around gives) and, when the
/// exact rounded value lies outside the format, on which side.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Fitted<D> {
    pub wrapped: D,
    pub side: Option<Side>,
}

impl<D: Storage> Fitted<D> {
    /// Apply an overflow mode.
    #[inline(always)]
    #[track_caller]
    pub fn resolve(self, dst: Format, ovf: Overflow) -> D {
        match (self.side, ovf) {
            (None, Overflow::SaturateSymmetric) => {
                let min = min_of::<D>(dst);
                if dst.is_signed() && self.wrapped == min {
                    min.wrapping_add(one::<D>())
                } else {
                    self.wrapped
                }
            }
            (None, _) | (Some(_), Overflow::Wrap) => self.wrapped,
            (Some(Side::Above), Overflow::Saturate | Overflow::SaturateSymmetric) => {
                max_of::<D>(dst)
            }
            (Some(Side::Below), Overflow::Saturate) => min_of::<D>(dst),
            (Some(Side::Below), Overflow::SaturateSymmetric) => {
                if dst.is_signed() {
                    min_of::<D>(dst).wrapping_add(one::<D>())
                } else {
                    min_of::<D>(dst)
                }
            }
            (Some(side), Overflow::Panic) => overflow_panic(dst, side),
        }
    }

    /// The value if it fits, else which side it fell on.
    #[inline(always)]
    pub fn checked(self, dst: Format) -> Result<D, RangeError> {
        match self.side {
            None => Ok(self.wrapped),
            Some(side) => Err(RangeError::new(dst, side)),
        }
    }
}

#[cold]
#[inline(never)]
#[track_caller]
fn overflow_panic(dst: Format, side: Side) -> ! {
    match side {
        Side::Above => panic!("qbound: overflow: value above the largest value of {dst}"),
        Side::Below => panic!("qbound: overflow: value below the smallest value of {dst}"),
    }
}

#[inline(always)]
fn one<D: Storage>() -> D {
    D::from_u128_bits(1)
}

/// The format's largest stored integer in its storage type.
#[inline(always)]
pub(crate) fn max_of<D: Storage>(f: Format) -> D {
    D::from_u128_bits(f.max_bits().low_bits())
}

/// The format's smallest stored integer in its storage type.
#[inline(always)]
pub(crate) fn min_of<D: Storage>(f: Format) -> D {
    D::from_u128_bits(f.min_bits().low_bits())
}

/// Where an integer lies against a format's range of stored integers.
#[inline(always)]
fn side_of<W: WorkInt>(x: W, dst: Format) -> Option<Side> {
    if x.cmp_wide(dst.max_bits()) == Ordering::Greater {
        Some(Side::Above)
    } else if x.cmp_wide(dst.min_bits()) == Ordering::Less {
        Some(Side::Below)
    } else {
        None
    }
}

/// Rescale the integer `x`, read with `src_frac` fraction bits, into `dst`
/// with rounding `rnd`.
#[inline(always)]
pub(crate) fn rescale<W: WorkInt, D: Storage>(
    x: W,
    src_frac: u32,
    dst: Format,
    rnd: Rounding,
) -> Fitted<D> {
    let fd = dst.frac_bits();
    if fd <= src_frac {
        let q = shr_round(x, src_frac - fd, rnd);
        Fitted {
            wrapped: D::from_u128_bits(q.low_u128()).extend_from(dst.width()),
            side: side_of(q, dst),
        }
    } else {
        // Left shift by s: x * 2^s fits exactly when
        // ceil(min / 2^s) <= x <= floor(max / 2^s).
        let s = fd - src_frac;
        let side = if x.cmp_wide(dst.max_bits().shr_floor(s)) == Ordering::Greater {
            Some(Side::Above)
        } else if x.cmp_wide(dst.min_bits().shr_ceil(s)) == Ordering::Less {
            Some(Side::Below)
        } else {
            None
        };
        // (x * 2^s) mod 2^width only needs the low bits of x.
        let wrapped = D::from_u128_bits(x.low_u128())
            .shl(s)
            .extend_from(dst.width());
        Fitted { wrapped, side }
    }
}

/// Exact `a + b` into `dst` (which must hold the exact sum).
#[inline(always)]
pub(crate) fn add<A: Storage, B: Storage, D: Storage>(
    a: A,
    fa: u32,
    b: B,
    fb: u32,
    dst: Format,
) -> D {
    let f = dst.frac_bits();
    a.cast::<D>()
        .shl(f - fa)
        .wrapping_add(b.cast::<D>().shl(f - fb))
}

/// Exact `a - b` into `dst` (which must hold the exact difference).
#[inline(always)]
pub(crate) fn sub<A: Storage, B: Storage, D: Storage>(
    a: A,
    fa: u32,
    b: B,
    fb: u32,
    dst: Format,
) -> D {
    let f = dst.frac_bits();
    a.cast::<D>()
        .shl(f - fa)
        .wrapping_sub(b.cast::<D>().shl(f - fb))
}

/// Exact `-a` into a storage that holds it.
#[inline(always)]
pub(crate) fn neg<A: Storage, D: Storage>(a: A) -> D {
    D::ZERO.wrapping_sub(a.cast::<D>())
}

/// Exact `a * b` into a storage that holds it (fraction bits add).
#[inline(always)]
pub(crate) fn mul<A: Storage, B: Storage, D: Storage>(a: A, b: B) -> D {
    a.cast::<D>().wrapping_mul(b.cast::<D>())
}

/// Exact comparison of `a * 2^-fa` with `b * 2^-fb`.
#[inline(always)]
pub(crate) fn cmp<A: Storage, B: Storage>(a: A, fa: u32, b: B, fb: u32) -> Ordering {
    match fa.cmp(&fb) {
        Ordering::Equal => a.to_wide().cmp(&b.to_wide()),
        Ordering::Less => {
            // Compare a with b / 2^d: floor first, then the discarded bits.
            let (bq, r) = b.split(fb - fa);
            match a.to_wide().cmp(&bq.to_wide()) {
                Ordering::Equal if !r.exact => Ordering::Less,
                o => o,
            }
        }
        Ordering::Greater => cmp(b, fb, a, fa).reverse(),
    }
}

/// `a * b` rounded into `dst`: the exact product is formed in the narrowest
/// integer that holds it (up to 257 bits), then rounded once.
#[inline(always)]
pub(crate) fn mul_rescale<A: Storage, B: Storage, D: Storage>(
    a: A,
    fa: Format,
    b: B,
    fb: Format,
    dst: Format,
    rnd: Rounding,
) -> Fitted<D> {
    let width = fa.width() + fb.width();
    let frac = fa.frac_bits() + fb.frac_bits();
    let signed = fa.is_signed() || fb.is_signed();
    macro_rules! via {
        ($w:ty) => {
            rescale::<$w, D>(mul::<A, B, $w>(a, b), frac, dst, rnd)
        };
    }
    if signed {
        if width <= 32 {
            via!(i32)
        } else if width <= 64 {
            via!(i64)
        } else if width <= 128 {
            via!(i128)
        } else {
            rescale::<Product256, D>(Product256::mul(a.to_wide(), b.to_wide()), frac, dst, rnd)
        }
    } else if width <= 32 {
        via!(u32)
    } else if width <= 64 {
        via!(u64)
    } else if width <= 128 {
        via!(u128)
    } else {
        rescale::<Product256, D>(Product256::mul(a.to_wide(), b.to_wide()), frac, dst, rnd)
    }
}

/// `a + b` in the operands' own format `f` (both stored in `S`).
#[inline(always)]
pub(crate) fn add_same<S: Storage>(a: S, b: S, f: Format) -> Fitted<S> {
    if f.width() < S::BITS {
        // The exact sum needs one more bit, which the storage has.
        let raw = a.wrapping_add(b);
        Fitted {
            wrapped: raw.extend_from(f.width()),
            side: side_of(raw, f),
        }
    } else {
        let (raw, over) = a.overflowing_add(b);
        let side = if !over {
            None
        } else if a.is_negative() {
            Some(Side::Below)
        } else {
            Some(Side::Above)
        };
        Fitted { wrapped: raw, side }
    }
}

/// `a - b` in the operands' own format `f`.
#[inline(always)]
pub(crate) fn sub_same<S: Storage>(a: S, b: S, f: Format) -> Fitted<S> {
    if f.width() < S::BITS && S::SIGNED {
        let raw = a.wrapping_sub(b);
        Fitted {
            wrapped: raw.extend_from(f.width()),
            side: side_of(raw, f),
        }
    } else {
        let (raw, over) = a.overflowing_sub(b);
        let side = if !over {
            None
        } else if !S::SIGNED || a.is_negative() {
            Some(Side::Below)
        } else {
            Some(Side::Above)
        };
        Fitted {
            wrapped: raw.extend_from(f.width()),
            side,
        }
    }
}

/// `-a` in `a`'s own format.
#[inline(always)]
pub(crate) fn neg_same<S: Storage>(a: S, f: Format) -> Fitted<S> {
    sub_same(S::ZERO, a, f)
}

/// `|a|` in `a`'s own format.
#[inline(always)]
pub(crate) fn abs_same<S: Storage>(a: S, f: Format) -> Fitted<S> {
    if a.is_negative() {
        neg_same(a, f)
    } else {
        Fitted {
            wrapped: a,
            side: None,
        }
    }
}
