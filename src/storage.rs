//! Native integer storage and the exact 129-bit [`Wide`] integer.
//!
//! Every fixed-point value is stored in the smallest native integer that
//! holds its word length. The arithmetic kernels in [`crate::kernel`] are
//! written once, generically over the sealed [`Storage`] trait, and the
//! compiler instantiates them at the native width, so a Q1.15 rescale runs
//! on `i16`/`i32` instructions, not on 128-bit ones.
//!
//! [`Wide`] is a 129-bit two's-complement integer: wide enough to hold every
//! value of every signed and unsigned format up to 128 bits, so format
//! bounds and range checks are exact for all of them.

use core::cmp::Ordering;
use core::fmt::Debug;
use core::hash::Hash;

mod sealed {
    pub trait Sealed {}
}

/// A 129-bit two's-complement integer: `lo` holds the low 128 bits, `neg`
/// the sign (value = `lo - 2^128` when `neg`).
///
/// It holds every value of every format up to 128 bits, signed or unsigned,
/// and is what format bounds are expressed in.
///
/// ```
/// use qbound::Wide;
/// let a = Wide::from_i128(-5);
/// let b = Wide::from_u128(u128::MAX);
/// assert!(a < b);
/// assert_eq!(a.to_i128(), Some(-5));
/// assert_eq!(b.to_i128(), None);
/// assert_eq!(b.to_u128(), Some(u128::MAX));
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub struct Wide {
    neg: bool,
    lo: u128,
}

impl Wide {
    /// Zero.
    pub const ZERO: Wide = Wide { neg: false, lo: 0 };

    /// From a signed 128-bit integer.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert!(Wide::from_i128(-1).is_negative());
    /// ```
    #[must_use]
    #[inline]
    pub const fn from_i128(v: i128) -> Wide {
        Wide {
            neg: v < 0,
            lo: v as u128,
        }
    }

    /// From an unsigned 128-bit integer.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert!(!Wide::from_u128(7).is_negative());
    /// ```
    #[must_use]
    #[inline]
    pub const fn from_u128(v: u128) -> Wide {
        Wide { neg: false, lo: v }
    }

    /// `2^n` for `n < 128`, or `None` from 128 on (a `Wide` holds
    /// `[-2^128, 2^128)`, so `2^128` itself is out of range while
    /// [`Wide::neg_pow2`]`(128)` is not).
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::pow2(3), Some(Wide::from_i128(8)));
    /// assert_eq!(Wide::pow2(127), Some(Wide::from_u128(1 << 127)));
    /// assert!(Wide::pow2(128).is_none());
    /// ```
    #[must_use]
    #[inline]
    pub const fn pow2(n: u32) -> Option<Wide> {
        if n < 128 {
            Some(Wide::from_u128(1u128 << n))
        } else {
            None
        }
    }

    /// `-2^n` for `n <= 128`, or `None` above.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::neg_pow2(128).unwrap().to_i128(), None);
    /// assert_eq!(Wide::neg_pow2(127).unwrap().to_i128(), Some(i128::MIN));
    /// ```
    #[must_use]
    #[inline]
    pub const fn neg_pow2(n: u32) -> Option<Wide> {
        if n < 128 {
            Some(Wide {
                neg: true,
                lo: (1u128 << n).wrapping_neg(),
            })
        } else if n == 128 {
            Some(Wide { neg: true, lo: 0 })
        } else {
            None
        }
    }

    /// Whether the value is below zero.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert!(!Wide::ZERO.is_negative());
    /// ```
    #[must_use]
    #[inline]
    pub const fn is_negative(self) -> bool {
        self.neg
    }

    /// The value as `i128`, if it fits.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::from_u128(1 << 127).to_i128(), None);
    /// ```
    #[must_use]
    #[inline]
    pub const fn to_i128(self) -> Option<i128> {
        let v = self.lo as i128;
        if (v < 0) == self.neg { Some(v) } else { None }
    }

    /// The value as `u128`, if it fits.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::from_i128(-1).to_u128(), None);
    /// ```
    #[must_use]
    #[inline]
    pub const fn to_u128(self) -> Option<u128> {
        if self.neg { None } else { Some(self.lo) }
    }

    /// The low 128 bits in two's complement (the value modulo 2^128).
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::from_i128(-1).low_bits(), u128::MAX);
    /// ```
    #[must_use]
    #[inline]
    pub const fn low_bits(self) -> u128 {
        self.lo
    }

    /// Builds a value from its sign word and low 128 bits.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::from_parts(true, u128::MAX), Wide::from_i128(-1));
    /// ```
    #[must_use]
    #[inline]
    pub const fn from_parts(neg: bool, lo: u128) -> Wide {
        Wide { neg, lo }
    }

    /// Exact floor division by `2^k` (an arithmetic shift of the 129-bit
    /// value).
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::from_i128(-5).shr_floor(1), Wide::from_i128(-3));
    /// assert_eq!(Wide::from_u128(u128::MAX).shr_floor(200), Wide::ZERO);
    /// ```
    #[must_use]
    #[inline]
    pub const fn shr_floor(self, k: u32) -> Wide {
        if k == 0 {
            self
        } else if k >= 128 {
            if self.neg {
                Wide {
                    neg: true,
                    lo: u128::MAX,
                }
            } else {
                Wide::ZERO
            }
        } else {
            let fill = if self.neg { u128::MAX << (128 - k) } else { 0 };
            Wide {
                neg: self.neg,
                lo: (self.lo >> k) | fill,
            }
        }
    }

    /// Exact ceiling division by `2^k`.
    ///
    /// ```
    /// # use qbound::Wide;
    /// assert_eq!(Wide::from_i128(-5).shr_ceil(1), Wide::from_i128(-2));
    /// assert_eq!(Wide::from_i128(5).shr_ceil(1), Wide::from_i128(3));
    /// ```
    #[must_use]
    #[inline]
    pub const fn shr_ceil(self, k: u32) -> Wide {
        let q = self.shr_floor(k);
        // Residue is zero exactly when q * 2^k == self.
        let exact = if k >= 128 {
            // q is 0 or -1; self is exactly q*2^k only when self == 0.
            self.lo == 0 && !self.neg
        } else {
            let mask = (1u128 << k) - 1;
            self.lo & mask == 0
        };
        if exact { q } else { q.add_one() }
    }

    /// `self + 1` (must not exceed the 129-bit range).
    const fn add_one(self) -> Wide {
        let lo = self.lo.wrapping_add(1);
        let neg = if lo == 0 { !self.neg } else { self.neg };
        Wide { neg, lo }
    }

    /// Three-way comparison, usable in `const` contexts.
    ///
    /// ```
    /// # use qbound::Wide;
    /// # use core::cmp::Ordering;
    /// assert_eq!(Wide::from_i128(-1).const_cmp(Wide::ZERO), Ordering::Less);
    /// ```
    #[must_use]
    #[inline]
    pub const fn const_cmp(self, other: Wide) -> Ordering {
        if self.neg != other.neg {
            if self.neg {
                Ordering::Less
            } else {
                Ordering::Greater
            }
        } else if self.lo < other.lo {
            Ordering::Less
        } else if self.lo > other.lo {
            Ordering::Greater
        } else {
            Ordering::Equal
        }
    }
}

impl PartialOrd for Wide {
    #[inline]
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Wide {
    #[inline]
    fn cmp(&self, other: &Self) -> Ordering {
        self.const_cmp(*other)
    }
}

/// Where the discarded part of a right shift lies, in units of the step
/// being rounded to: the information every rounding mode needs.
#[doc(hidden)]
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Residue {
    /// The discarded bits are all zero (the shift is exact).
    pub exact: bool,
    /// How the discarded part compares with one half.
    pub vs_half: Ordering,
    /// The discarded part as a fraction of one step, scaled by 2^64 and
    /// rounded down: what stochastic rounding compares its random word with.
    pub frac64: u64,
}

impl Residue {
    /// Classify the low `k` bits (`k` in 1..=128) of a value whose two's
    /// complement low 128 bits are `low`.
    #[inline]
    pub(crate) fn of_low_bits(low: u128, k: u32) -> Residue {
        debug_assert!((1..=128).contains(&k));
        let r = if k == 128 {
            low
        } else {
            low & ((1u128 << k) - 1)
        };
        let half = 1u128 << (k - 1);
        let frac64 = if k <= 64 {
            (r << (64 - k)) as u64
        } else {
            (r >> (k - 64)) as u64
        };
        Residue {
            exact: r == 0,
            vs_half: r.cmp(&half),
            frac64,
        }
    }
}

/// An integer the kernels can round and range-check: the native storage
/// integers, and internally a 256-bit product.
#[doc(hidden)]
pub trait WorkInt: Copy + Debug {
    /// The number is below zero.
    fn is_negative(self) -> bool;
    /// The lowest bit is set.
    fn is_odd(self) -> bool;
    /// Floor division by `2^k` and the class of what was discarded
    /// (`k >= 1`).
    fn split(self, k: u32) -> (Self, Residue);
    /// `self + 1`; never overflows where the kernels use it.
    fn add_one(self) -> Self;
    /// Exact comparison with a 129-bit integer.
    fn cmp_wide(self, w: Wide) -> Ordering;
    /// The low 128 bits in two's complement.
    fn low_u128(self) -> u128;
}

/// A native integer that stores a fixed-point value: `i8`..`i128` and
/// `u8`..`u128`. Sealed; its methods are the kernels' building blocks.
///
/// ```
/// use qbound::Storage;
/// assert_eq!(<i16 as Storage>::BITS, 16);
/// assert!(<i16 as Storage>::SIGNED);
/// ```
pub trait Storage:
    WorkInt + Copy + Eq + Ord + Hash + Default + Debug + Send + Sync + 'static + sealed::Sealed
{
    /// Bits in the native integer.
    const BITS: u32;
    /// Whether the native integer is signed.
    const SIGNED: bool;
    /// The value zero.
    const ZERO: Self;
    /// The value one.
    const ONE: Self;

    /// Sign- or zero-extend into 128 bits (the value modulo 2^128).
    fn to_u128_bits(self) -> u128;
    /// Keep the low bits of a 128-bit pattern.
    fn from_u128_bits(bits: u128) -> Self;
    /// Wrapping addition.
    fn wrapping_add(self, o: Self) -> Self;
    /// Wrapping subtraction.
    fn wrapping_sub(self, o: Self) -> Self;
    /// Wrapping multiplication.
    fn wrapping_mul(self, o: Self) -> Self;
    /// Addition with the native overflow flag.
    fn overflowing_add(self, o: Self) -> (Self, bool);
    /// Subtraction with the native overflow flag.
    fn overflowing_sub(self, o: Self) -> (Self, bool);
    /// Left shift; shifts of `BITS` or more give zero.
    fn shl(self, k: u32) -> Self;
    /// Floor division by `2^k`; shifts of `BITS` or more give 0 or -1.
    fn shr_floor(self, k: u32) -> Self;
    /// Keep the low `width` bits and sign-extend (signed) or zero-extend
    /// (unsigned) the rest: reduction modulo `2^width` into the format's
    /// range.
    fn extend_from(self, width: u32) -> Self;

    /// Exact value as a 129-bit integer.
    #[inline]
    fn to_wide(self) -> Wide {
        Wide::from_parts(self.is_negative(), self.to_u128_bits())
    }
    /// Truncating conversion between storage types (modulo `2^T::BITS`).
    #[inline]
    fn cast<T: Storage>(self) -> T {
        T::from_u128_bits(self.to_u128_bits())
    }
}

macro_rules! impl_storage {
    ($($t:ty, $signed:expr);* $(;)?) => {$(
        impl sealed::Sealed for $t {}

        impl WorkInt for $t {
            #[inline]
            #[allow(unused_comparisons)]
            fn is_negative(self) -> bool {
                self < 0
            }
            #[inline]
            fn is_odd(self) -> bool {
                self & 1 != 0
            }
            #[inline]
            fn split(self, k: u32) -> (Self, Residue) {
                (
                    <$t as Storage>::shr_floor(self, k),
                    Residue::of_low_bits(self.to_u128_bits(), k.min(128)),
                )
            }
            #[inline]
            fn add_one(self) -> Self {
                self.wrapping_add(1)
            }
            #[inline]
            fn cmp_wide(self, w: Wide) -> Ordering {
                self.to_wide().cmp(&w)
            }
            #[inline]
            fn low_u128(self) -> u128 {
                self.to_u128_bits()
            }
        }

        impl Storage for $t {
            const BITS: u32 = <$t>::BITS;
            const SIGNED: bool = $signed;
            const ZERO: Self = 0;
            const ONE: Self = 1;

            #[inline]
            fn to_u128_bits(self) -> u128 {
                // Sign extension for signed types, zero extension otherwise.
                self as i128 as u128
            }
            #[inline]
            fn from_u128_bits(bits: u128) -> Self {
                bits as $t
            }
            #[inline]
            fn wrapping_add(self, o: Self) -> Self {
                <$t>::wrapping_add(self, o)
            }
            #[inline]
            fn wrapping_sub(self, o: Self) -> Self {
                <$t>::wrapping_sub(self, o)
            }
            #[inline]
            fn wrapping_mul(self, o: Self) -> Self {
                <$t>::wrapping_mul(self, o)
            }
            #[inline]
            fn overflowing_add(self, o: Self) -> (Self, bool) {
                <$t>::overflowing_add(self, o)
            }
            #[inline]
            fn overflowing_sub(self, o: Self) -> (Self, bool) {
                <$t>::overflowing_sub(self, o)
            }
            #[inline]
            fn shl(self, k: u32) -> Self {
                if k >= <$t>::BITS { 0 } else { self << k }
            }
            #[inline]
            #[allow(unused_comparisons)]
            fn shr_floor(self, k: u32) -> Self {
                if k >= <$t>::BITS {
                    if self < 0 { (0 as $t).wrapping_sub(1) } else { 0 }
                } else {
                    self >> k
                }
            }
            #[inline]
            fn extend_from(self, width: u32) -> Self {
                debug_assert!((1..=<$t>::BITS).contains(&width));
                let s = <$t>::BITS - width;
                if s == 0 { self } else { (self << s) >> s }
            }
        }
    )*};
}

impl_storage! {
    i8, true; i16, true; i32, true; i64, true; i128, true;
    u8, false; u16, false; u32, false; u64, false; u128, false;
}

/// A 257-bit two's-complement integer: the exact product of any two values
/// of formats up to 128 bits. Only the kernels that multiply and then round
/// use it, when the exact product passes 128 bits.
#[doc(hidden)]
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Product256 {
    /// Sign (the 257th bit).
    neg: bool,
    hi: u128,
    lo: u128,
}

impl Product256 {
    /// Exact product of two 129-bit integers whose product fits 257 bits
    /// (true for any two values of formats up to 128 bits).
    pub(crate) fn mul(a: Wide, b: Wide) -> Product256 {
        let (an, am) = magnitude(a);
        let (bn, bm) = magnitude(b);
        let (hi, lo) = mul_u128(am, bm);
        let p = Product256 { neg: false, hi, lo };
        if an != bn { p.negate() } else { p }
    }

    fn negate(self) -> Product256 {
        // Two's complement over 257 bits: invert and add one.
        let lo = !self.lo;
        let hi = !self.hi;
        let neg = !self.neg;
        let (lo, c) = lo.overflowing_add(1);
        let (hi, c2) = hi.overflowing_add(c as u128);
        let neg = if c2 { !neg } else { neg };
        Product256 { neg, hi, lo }
    }
}

/// Sign and magnitude of a 129-bit integer (magnitude fits u128 for every
/// value the kernels multiply: `|-2^127| = 2^127`, `2^128 - 1`).
fn magnitude(w: Wide) -> (bool, u128) {
    if w.is_negative() {
        (true, w.low_bits().wrapping_neg())
    } else {
        (false, w.low_bits())
    }
}

/// Full 128 x 128 -> 256-bit unsigned product as (high, low).
pub(crate) fn mul_u128(a: u128, b: u128) -> (u128, u128) {
    let (a1, a0) = (a >> 64, a & u64::MAX as u128);
    let (b1, b0) = (b >> 64, b & u64::MAX as u128);
    let p00 = a0 * b0;
    let p01 = a0 * b1;
    let p10 = a1 * b0;
    let p11 = a1 * b1;
    let mid = (p00 >> 64) + (p01 & u64::MAX as u128) + (p10 & u64::MAX as u128);
    let lo = (p00 & u64::MAX as u128) | (mid << 64);
    let hi = p11 + (p01 >> 64) + (p10 >> 64) + (mid >> 64);
    (hi, lo)
}

impl WorkInt for Product256 {
    fn is_negative(self) -> bool {
        self.neg
    }
    fn is_odd(self) -> bool {
        self.lo & 1 != 0
    }
    fn split(self, k: u32) -> (Self, Residue) {
        debug_assert!(k >= 1);
        // Residue: the low k bits, classified against 2^(k-1).
        let residue = if k <= 128 {
            Residue::of_low_bits(self.lo, k)
        } else {
            let kh = k - 128; // bits of `hi` that are discarded, 1..=129
            let r_hi = if kh >= 128 {
                self.hi
            } else {
                self.hi & ((1u128 << kh) - 1)
            };
            // Top bits of the 257-bit residue when k == 257 include the
            // sign word; k never exceeds 256 in the kernels.
            let half_hi = 1u128 << (kh - 1).min(127);
            let vs_half = if kh > 128 {
                // k == 257 (not used): compare with the sign too.
                Ordering::Less
            } else {
                match r_hi.cmp(&half_hi) {
                    Ordering::Equal => {
                        if self.lo == 0 {
                            Ordering::Equal
                        } else {
                            Ordering::Greater
                        }
                    }
                    o => o,
                }
            };
            // Top 64 bits of the residue r / 2^k scaled by 2^64.
            let frac64 = if kh >= 64 {
                (r_hi >> (kh - 64).min(127)) as u64
            } else {
                ((r_hi << (64 - kh)) | (self.lo >> (64 + kh))) as u64
            };
            Residue {
                exact: r_hi == 0 && self.lo == 0,
                vs_half,
                frac64,
            }
        };
        // Floor shift of the 257-bit value.
        let fill = if self.neg { u128::MAX } else { 0 };
        let (hi, lo) = if k >= 256 {
            (fill, fill)
        } else if k >= 128 {
            let s = k - 128;
            let lo = if s == 0 {
                self.hi
            } else {
                (self.hi >> s) | (fill << (128 - s))
            };
            (fill, lo)
        } else {
            let lo = (self.lo >> k) | (self.hi << (128 - k));
            let hi = (self.hi >> k) | (fill << (128 - k));
            (hi, lo)
        };
        (
            Product256 {
                neg: self.neg,
                hi,
                lo,
            },
            residue,
        )
    }
    fn add_one(self) -> Self {
        let (lo, c) = self.lo.overflowing_add(1);
        let (hi, c2) = self.hi.overflowing_add(c as u128);
        let neg = if c2 { !self.neg } else { self.neg };
        Product256 { neg, hi, lo }
    }
    fn cmp_wide(self, w: Wide) -> Ordering {
        // The value fits 129 bits when hi is the sign extension of the
        // 129-bit number (neg, lo): hi all ones if neg, zero if not.
        let fits = if self.neg {
            self.hi == u128::MAX
        } else {
            self.hi == 0
        };
        if fits {
            Wide::from_parts(self.neg, self.lo).cmp(&w)
        } else if self.neg {
            Ordering::Less
        } else {
            Ordering::Greater
        }
    }
    fn low_u128(self) -> u128 {
        self.lo
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mul_u128_edges() {
        assert_eq!(mul_u128(u128::MAX, u128::MAX), (u128::MAX - 1, 1));
        assert_eq!(mul_u128(1 << 64, 1 << 64), (1, 0));
        assert_eq!(mul_u128(3, 5), (0, 15));
    }

    #[test]
    fn product_sign() {
        let p = Product256::mul(Wide::from_i128(-3), Wide::from_i128(5));
        assert_eq!(p.cmp_wide(Wide::from_i128(-15)), Ordering::Equal);
        let p = Product256::mul(Wide::from_i128(i128::MIN), Wide::from_i128(i128::MIN));
        assert_eq!(p.cmp_wide(Wide::from_u128(u128::MAX)), Ordering::Greater);
        let (q, r) = p.split(254);
        assert_eq!(q.cmp_wide(Wide::from_i128(1)), Ordering::Equal);
        assert!(r.exact);
    }
}
