//! Division and elementary functions with a stated accuracy: division,
//! reciprocal, square root, sine and cosine (of turns or radians), atan2,
//! `2^x` and `log2`. Integer arithmetic only (no floating point anywhere),
//! `no_std`, no allocation.
//!
//! Every function takes its output format (as a type parameter, like
//! [`Sq::rescale`](crate::Sq::rescale), or as a [`Format`] for
//! [`QValue`]) and a [`Rounding`] mode; the forms with an [`Overflow`] mode
//! apply it to a result outside the output format, the `try_` forms return
//! a [`FunctionError`].
//!
//! # Accuracy contract
//!
//! - **Division, reciprocal, square root: correctly rounded** in every
//!   rounding mode, for every format up to 128 bits. The kernels compute
//!   the exact integer quotient (or root) and the exact class of the
//!   remainder, so the rounding sees the exact value — also the stochastic
//!   mode, which compares its random word with the first 64 bits of the
//!   exact discarded fraction.
//! - **sin, cos, atan2, exp2, log2: the requested rounding of a value
//!   within 2^-112 of the exact one** (relative to the result for exp2).
//!   So they are correctly rounded in every mode unless the exact value
//!   lies within 2^-112 of a rounding boundary of the output format, and
//!   the error is always below one ulp plus 2^-112. The kernels compute an
//!   approximation together with a proven bound on its error (the method
//!   of Ziv): when every value inside the bound rounds to the same result,
//!   that result is the correctly rounded one. A first attempt uses as many
//!   iterations as the output format needs plus 12 guard bits; the rare
//!   ambiguous case (about one in 2^10) is redone at the kernels' full
//!   precision of about 116 bits, and if that is still ambiguous the
//!   approximation is rounded as it is. The values of these functions at
//!   fixed-point arguments are irrational except at a few exact points
//!   (sin and cos at multiples of a quarter turn, atan2 on the axes and
//!   diagonals, `2^n`, `log2(2^n)`), which the kernels return exactly. For
//!   output formats with up to about 100 fraction bits an argument whose
//!   value lies within 2^-112 of a boundary is too rare to have been met in
//!   any test; for wider outputs the 2^-112 term dominates.
//!   `docs/accuracy.md` lists the measured worst errors.
//!
//! What the 2^-112 allowance means in practice:
//!
//! - Where a function approaches a dyadic point (`cos x` near 1 and
//!   `1 - x²/2`, `sin x` near `x`, `atan(r)` near `r`, `2^f` near 1 and 2,
//!   `log2 m` near 0 and 1), the kernels carry strict mathematical bounds
//!   (`cos x < 1` for `x != 0`), so a result never lands on the wrong side
//!   of that point itself: Floor of a cosine just below 1 is below 1 at
//!   any precision. A boundary *next to* that point (the midpoint between
//!   it and its neighbour, for the nearest modes) is an ordinary boundary:
//!   `log2` of `UQ1.127::MAX` (`1 - 0.72·2^-127`) rounds to nearest as 1,
//!   not as `1 - 2^-127`, because the two are closer than 2^-112.
//! - Stochastic rounding follows its rule (up exactly when the random word
//!   is below the first 64 bits of the discarded fraction) for a value
//!   within 2^-112 of the exact one. Its boundaries lie 2^-64 of a step
//!   apart, so for outputs with more than about 48 fraction bits the rule
//!   acts on the approximation: the probability of rounding up differs from
//!   the exact discarded fraction by at most `2^(F-112)` of a step (`F`
//!   the output's fraction bits). In particular a result just above a
//!   representable value (by less than 2^-64 of a step) may still round up
//!   for a few small random words.
//! - With [`Overflow::Wrap`] an out-of-range result is that rounded value
//!   reduced modulo `2^width`: exact while the value times `2^F` is below
//!   about 2^100 (the allowance is then below a step), otherwise its low
//!   bits come from the approximation. `2^122.75` into `UQ16.0` (toward
//!   zero) wraps to 27131, where the exact value wraps to 27134.
//!
//! The radian forms carry one more rounding inside (the argument times
//! `1/(2π)`, or the turns times `2π`), which the error bound includes, so
//! the same contract holds for them.
//!
//! # Why these algorithms
//!
//! Division and square root use the exact integer algorithms (hardware
//! division on native integers, restoring division and the digit-by-digit
//! root on a 640-bit integer for the widest formats): correct rounding
//! needs the exact remainder anyway.
//!
//! The transcendental functions use shift-and-add iterations: CORDIC
//! (rotation mode for sin/cos, vectoring mode for atan2) and the
//! multiplicative normalisation with factors `1 + 2^-k` for `2^x` and
//! `log2`. Each iteration gains about one bit, so the work scales with the
//! precision the output format asks for, the error bound follows from the
//! run-time residual (the angle or exponent left over after the last
//! iteration), and the tables are the same few integer constants for every
//! format. They need no multiplier, which is also why firmware and FPGA
//! designs use them: the integer model here is close to what such a target
//! runs. A minimax polynomial would be faster on a CPU with a fast
//! multiplier, but needs a separate coefficient set per precision and a
//! multiplication error analysis per format.
//!
//! With the feature `function-tables` (default), `sin_turns`, `cos_turns`,
//! `atan2_turns`, `exp2` and `log2` first try a fast path on 64-bit
//! integers (tables and short polynomials, `fast.rs`) for outputs with up
//! to 52 fraction bits. It returns a result only when its proven error
//! bound shows it is the correctly rounded one, so the results are the
//! same with and without the feature; see `docs/functions.md`.

mod divide;
mod explog;
#[cfg(feature = "function-tables")]
mod fast;
#[cfg(feature = "function-tables")]
#[rustfmt::skip]
mod fast_tables;
mod nat;
mod root;
mod tables;
mod trig;
mod typed;
#[doc(hidden)]
pub use paths as __paths;
pub use typed::QFunctions;

use core::cmp::Ordering;
use core::fmt;

use crate::format::Format;
use crate::kernel::{self, Fitted};
use crate::overflow::{Overflow, RangeError, Side};
use crate::rounding::Rounding;
use crate::storage::{Storage, Wide};
use crate::value::QValue;

/// Why a function has no result in the output format.
///
/// ```
/// use qbound::{FunctionError, Q, Rounding};
/// let x = Q::<7, 8>::from_bits(256);
/// let e = x.try_div::<Q<7, 8>>(Q::<7, 8>::ZERO, Rounding::Floor).unwrap_err();
/// assert_eq!(e, FunctionError::DivisionByZero);
/// assert_eq!(e.to_string(), "division by zero");
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub enum FunctionError {
    /// The divisor (or the argument of a reciprocal) is zero.
    DivisionByZero,
    /// The argument of a square root is negative.
    NegativeSquareRoot,
    /// The argument of a logarithm is zero or negative.
    LogOfNonPositive,
    /// The rounded result lies outside the output format.
    Range(RangeError),
}

impl fmt::Display for FunctionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FunctionError::DivisionByZero => f.write_str("division by zero"),
            FunctionError::NegativeSquareRoot => f.write_str("square root of a negative number"),
            FunctionError::LogOfNonPositive => {
                f.write_str("logarithm of zero or a negative number")
            }
            FunctionError::Range(e) => e.fmt(f),
        }
    }
}

impl core::error::Error for FunctionError {}

impl From<RangeError> for FunctionError {
    fn from(e: RangeError) -> FunctionError {
        FunctionError::Range(e)
    }
}

#[cold]
#[inline(never)]
#[track_caller]
fn domain_panic(e: FunctionError) -> ! {
    panic!("qbound: {e}")
}

/// Sign and magnitude of a value's bits (every format's magnitude fits
/// `u128`).
#[inline]
pub(crate) fn sign_magnitude(w: Wide) -> (bool, u128) {
    if w.is_negative() {
        (true, w.low_bits().wrapping_neg())
    } else {
        (false, w.low_bits())
    }
}

/// The magnitude of an exact result in units of the output step: its
/// integer part `q` (low 128 bits; `big` when it has more) and the exact
/// class of the fraction `rho` in `[0, 1)` that the rounding discards.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Mag {
    pub q: u128,
    pub big: bool,
    /// `rho == 0`.
    pub exact: bool,
    /// `rho` against 1/2.
    pub vs_half: Ordering,
    /// `floor(rho * 2^64)` (only filled for stochastic rounding).
    pub frac64: u64,
    /// `rho * 2^64` is an integer (only meaningful for stochastic rounding).
    pub frac_exact: bool,
}

impl Mag {
    /// From `qx = floor(value * 2^64)` and whether anything below was
    /// discarded.
    pub fn from_extended(qx: &nat::Nat, sticky: bool) -> Mag {
        let frac64 = qx.low_u128() as u64;
        let int = qx.shr(64);
        let vs_half = match frac64.cmp(&(1 << 63)) {
            Ordering::Equal if sticky => Ordering::Greater,
            o => o,
        };
        Mag {
            q: int.low_u128(),
            big: int.bit_len() > 128,
            exact: frac64 == 0 && !sticky,
            vs_half,
            frac64,
            frac_exact: !sticky,
        }
    }

    /// From the exact integer part `q` and the fraction `r / d`
    /// (`r < d`); `frac64` is computed only when `stochastic`.
    pub fn from_remainder(q: u128, r: u128, d: u128, stochastic: bool) -> Mag {
        let (frac64, frac_exact) = if stochastic {
            frac64_of(r, d)
        } else {
            (0, true)
        };
        Mag {
            q,
            big: false,
            exact: r == 0,
            vs_half: r.cmp(&(d - r)),
            frac64,
            frac_exact,
        }
    }
}

/// `(floor(r * 2^64 / d), whether that division is exact)` for `r < d`.
fn frac64_of(mut r: u128, d: u128) -> (u64, bool) {
    let mut q: u128 = 0;
    let mut left = 64u32;
    while left > 0 {
        let k = r.leading_zeros().min(left);
        if k == 0 {
            // r >= 2^127 and r < d: 2r >= d, so the next bit is one and
            // 2r - d < d (computed modulo 2^128).
            r = r.wrapping_shl(1).wrapping_sub(d);
            q = (q << 1) | 1;
            left -= 1;
        } else {
            let n = r << k;
            q = (q << k) | (n / d);
            r = n % d;
            left -= k;
        }
    }
    (q as u64, r == 0)
}

/// Round a signed exact result given as sign and [`Mag`] into `dst`: the
/// same decision as [`crate::rounding::shr_round`], taken on the exact
/// residue class.
pub(crate) fn fit_mag<D: Storage>(neg: bool, m: Mag, dst: Format, rnd: Rounding) -> Fitted<D> {
    let (mag, big) = if !neg || m.exact {
        let up = !neg && rnd.rounds_up(m.exact, m.vs_half, m.frac64, m.q & 1 == 1, false);
        let (s, c) = m.q.overflowing_add(up as u128);
        (s, m.big || c)
    } else {
        // The signed floor quotient is -q - 1 with residue 1 - rho.
        let vs = m.vs_half.reverse();
        let frac = 0u64
            .wrapping_sub(m.frac64)
            .wrapping_sub(!m.frac_exact as u64);
        let up = rnd.rounds_up(false, vs, frac, m.q & 1 == 0, true);
        let (s, c) = m.q.overflowing_add(!up as u128);
        (s, m.big || c)
    };
    let neg = neg && (mag != 0 || big);
    let side = if big {
        Some(if neg { Side::Below } else { Side::Above })
    } else {
        let w = if neg {
            Wide::from_parts(true, mag.wrapping_neg())
        } else {
            Wide::from_u128(mag)
        };
        if w > dst.max_bits() {
            Some(Side::Above)
        } else if w < dst.min_bits() {
            Some(Side::Below)
        } else {
            None
        }
    };
    let low = if neg { mag.wrapping_neg() } else { mag };
    Fitted {
        wrapped: D::from_u128_bits(low).extend_from(dst.width()),
        side,
    }
}

/// An approximation `a * 2^-frac` of a real value with an error of at most
/// `err * 2^-frac`, and strict bounds known from mathematics: the value
/// lies in the open interval `(lo * 2^-frac, hi * 2^-frac)` (e.g. a cosine
/// of a nonzero angle is below 1). The bounds settle the cases where the
/// value is closer to an exact boundary than the error bound.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Approx {
    pub a: i128,
    pub err: i128,
    pub frac: u32,
    pub lo: i128,
    pub hi: i128,
}

impl Approx {
    pub const fn exact(a: i128, frac: u32) -> Approx {
        Approx {
            a,
            err: 0,
            frac,
            lo: i128::MIN,
            hi: i128::MAX,
        }
    }

    /// An approximation with an error bound and no strict bounds.
    pub const fn new(a: i128, err: i128, frac: u32) -> Approx {
        Approx {
            a,
            err,
            frac,
            lo: i128::MIN,
            hi: i128::MAX,
        }
    }

    /// With the value known to lie strictly between `lo` and `hi`.
    pub const fn within(self, lo: i128, hi: i128) -> Approx {
        Approx { lo, hi, ..self }
    }

    /// `c + s * self` for `s = 1` or `-1`.
    pub const fn affine(self, c: i128, negate: bool) -> Approx {
        if negate {
            Approx {
                a: c - self.a,
                err: self.err,
                frac: self.frac,
                lo: c.saturating_sub(self.hi),
                hi: c.saturating_sub(self.lo),
            }
        } else {
            Approx {
                a: c + self.a,
                err: self.err,
                frac: self.frac,
                lo: c.saturating_add(self.lo),
                hi: c.saturating_add(self.hi),
            }
        }
    }

    pub const fn neg(self) -> Approx {
        self.affine(0, true)
    }

    /// The rounding of the point `v` clamped into the strict bounds (a
    /// point at or beyond a bound stands for the values just inside it).
    fn round_point<D: Storage>(&self, v: i128, dst: Format, rnd: Rounding) -> Fitted<D> {
        if v <= self.lo {
            nudged::<D>(self.lo, self.frac, true, dst, rnd)
        } else if v >= self.hi {
            nudged::<D>(self.hi, self.frac, false, dst, rnd)
        } else {
            rescale_jam::<D>(v, self.frac, dst, rnd)
        }
    }

    /// [`Approx::round`] for kernels outside this module.
    pub(crate) fn round_exact<D: Storage>(self, dst: Format, rnd: Rounding) -> Option<Fitted<D>> {
        self.round(dst, rnd)
    }

    /// The rounded result if every value within the error bound rounds to
    /// it (the rounding modes are monotone), else `None`.
    fn round<D: Storage>(self, dst: Format, rnd: Rounding) -> Option<Fitted<D>> {
        if self.err == 0 {
            return Some(rescale_jam::<D>(self.a, self.frac, dst, rnd));
        }
        let (lo, hi) = (
            self.round_point(self.a - self.err, dst, rnd),
            self.round_point(self.a + self.err, dst, rnd),
        );
        (lo.wrapped == hi.wrapped && lo.side == hi.side).then_some(lo)
    }
}

/// The rounding of `b * 2^-frac` plus (`up`) or minus an infinitesimal:
/// what every value strictly beside `b` and closer than 2^-(F+66) rounds
/// to.
fn nudged<D: Storage>(b: i128, frac: u32, up: bool, dst: Format, rnd: Rounding) -> Fitted<D> {
    let neg = b < 0 || (b == 0 && !up);
    // Whether the magnitude grows by the infinitesimal.
    let grows = b == 0 || (b > 0) == up;
    let mb = b.unsigned_abs();
    let fd = dst.frac_bits();
    // The magnitude in output steps: q + r / 2^k.
    let (q, big, r, k) = if fd >= frac {
        let s = fd - frac;
        let big = s >= 128 || (mb != 0 && mb.leading_zeros() < s);
        (if s >= 128 { 0 } else { mb << s }, big, 0u128, 0u32)
    } else {
        let k = frac - fd;
        if k >= 128 {
            (0, false, mb, k)
        } else {
            (mb >> k, false, mb & ((1 << k) - 1), k)
        }
    };
    // r / 2^k against 1/2, and floor(r * 2^64 / 2^k) with its exactness.
    let (vs_half, f64_, f_exact) = if k == 0 {
        (core::cmp::Ordering::Less, 0u64, true)
    } else {
        let half_cmp = if k > 128 {
            core::cmp::Ordering::Less
        } else {
            r.cmp(&(1u128 << (k - 1)))
        };
        if k <= 64 {
            ((half_cmp), (r << (64 - k)) as u64, true)
        } else {
            let sh = k - 64;
            let (f, ex) = if sh >= 128 {
                (0, r == 0)
            } else {
                ((r >> sh) as u64, r & ((1 << sh) - 1) == 0)
            };
            (half_cmp, f, ex)
        }
    };
    let m = if grows {
        Mag {
            q,
            big,
            exact: false,
            vs_half: if vs_half == core::cmp::Ordering::Equal {
                core::cmp::Ordering::Greater
            } else {
                vs_half
            },
            frac64: f64_,
            frac_exact: false,
        }
    } else if r == 0 {
        // b steps exactly: the value just below it is (q - 1) steps and a
        // fraction. It is beyond 2^128 steps unless b is exactly 2^128
        // steps (q has wrapped to zero then, so test the exact value).
        let exactly_2_128 = big && mb.is_power_of_two() && mb.trailing_zeros() + (fd - frac) == 128;
        Mag {
            q: q.wrapping_sub(1),
            big: big && !exactly_2_128,
            exact: false,
            vs_half: core::cmp::Ordering::Greater,
            frac64: u64::MAX,
            frac_exact: false,
        }
    } else {
        Mag {
            q,
            big,
            exact: false,
            vs_half: if vs_half == core::cmp::Ordering::Equal {
                core::cmp::Ordering::Less
            } else {
                vs_half
            },
            frac64: if f_exact { f64_.wrapping_sub(1) } else { f64_ },
            frac_exact: false,
        }
    };
    fit_mag(neg, m, dst, rnd)
}

/// [`kernel::rescale`] for any number of discarded bits: beyond 128 the
/// value is first shifted with the lost bits jammed into its lowest bit,
/// which keeps every rounding decision unchanged.
fn rescale_jam<D: Storage>(a: i128, frac: u32, dst: Format, rnd: Rounding) -> Fitted<D> {
    let fd = dst.frac_bits();
    if frac > fd + 120 {
        let j = frac - fd - 120;
        let (q, lost) = if j >= 127 {
            (if a < 0 { -1 } else { 0 }, a != 0 && a != -1)
        } else {
            (a >> j, a & ((1 << j) - 1) != 0)
        };
        kernel::rescale::<i128, D>(q | lost as i128, fd + 120, dst, rnd)
    } else {
        kernel::rescale::<i128, D>(a, frac, dst, rnd)
    }
}

/// The iterations of the shift-and-add kernels: the most they run, and the
/// guard bits of a first attempt.
pub(crate) const MAX_ITERS: u32 = 124;
const GUARD: u32 = 12;

/// Iterations for a first attempt that must resolve `bits` bits below the
/// binary point of the kernel's result (stochastic rounding looks 64 bits
/// further).
fn first_iters(bits: i64, rnd: Rounding) -> u32 {
    let extra = if matches!(rnd, Rounding::Stochastic(_)) {
        64
    } else {
        0
    };
    (bits + (GUARD + extra) as i64).clamp(1, MAX_ITERS as i64) as u32
}

/// Ziv's strategy: round a first approximation; if its error bound
/// straddles a rounding boundary, redo it with the most iterations; if that
/// still straddles one, round the approximation itself (faithful).
fn ziv<D: Storage>(
    dst: Format,
    rnd: Rounding,
    first: u32,
    mut compute: impl FnMut(u32) -> Approx,
) -> Fitted<D> {
    let a = compute(first);
    if let Some(f) = a.round(dst, rnd) {
        return f;
    }
    if first < MAX_ITERS {
        let a = compute(MAX_ITERS);
        if let Some(f) = a.round(dst, rnd) {
            return f;
        }
        return a.round_point(a.a, dst, rnd);
    }
    a.round_point(a.a, dst, rnd)
}

use crate::value::with_storage;

/// Test access to the two kernels of the functions that have a fast path,
/// so the tests can check each against MPFR on its own. Not a public API.
#[doc(hidden)]
pub mod paths {
    use super::{FunctionError, explog, trig};
    use crate::format::Format;
    use crate::rounding::Rounding;
    use crate::value::{QValue, with_storage};

    /// A function with a fast path.
    #[derive(Clone, Copy, Debug, PartialEq, Eq)]
    pub enum Kernel {
        /// `sin_turns`.
        SinTurns,
        /// `cos_turns`.
        CosTurns,
        /// `atan2_turns` (`a` the ordinate, `b` the abscissa).
        Atan2Turns,
        /// `exp2`.
        Exp2,
        /// `log2`.
        Log2,
    }

    /// The fast path's result, or `None` where it leaves the call to the
    /// 128-bit kernel (always `None` without the `function-tables`
    /// feature).
    pub fn fast(k: Kernel, a: QValue, b: QValue, dst: Format, rnd: Rounding) -> Option<QValue> {
        #[cfg(feature = "function-tables")]
        {
            use super::fast;
            with_storage!(dst, D => {
                let f = match k {
                    Kernel::SinTurns => fast::sincos_turns::<D>(trig::phase_of_turns(a), dst, rnd, true),
                    Kernel::CosTurns => fast::sincos_turns::<D>(trig::phase_of_turns(a), dst, rnd, false),
                    Kernel::Atan2Turns => fast::atan2_turns::<D>(a, b, dst, rnd),
                    Kernel::Exp2 => fast::exp2::<D>(a, dst, rnd),
                    Kernel::Log2 => fast::log2::<D>(a, dst, rnd),
                };
                f.map(|f| QValue::finish::<D>(f, dst, crate::Overflow::Wrap))
            })
        }
        #[cfg(not(feature = "function-tables"))]
        {
            let _ = (k, a, b, dst, rnd);
            None
        }
    }

    /// The 128-bit kernel's result (with wrap-around on overflow).
    pub fn slow(
        k: Kernel,
        a: QValue,
        b: QValue,
        dst: Format,
        rnd: Rounding,
    ) -> Result<QValue, FunctionError> {
        with_storage!(dst, D => {
            let f = match k {
                Kernel::SinTurns => Ok(trig::turns_slow::<D>(trig::phase_of_turns(a), dst, rnd, true)),
                Kernel::CosTurns => Ok(trig::turns_slow::<D>(trig::phase_of_turns(a), dst, rnd, false)),
                Kernel::Atan2Turns => trig::atan2_turns_slow::<D>(a, b, dst, rnd),
                Kernel::Exp2 => explog::exp2_slow::<D>(a, dst, rnd),
                Kernel::Log2 => explog::log2_slow::<D>(a, dst, rnd),
            };
            f.map(|f| QValue::finish::<D>(f, dst, crate::Overflow::Wrap))
        })
    }
}

/// The run-time forms: one macro arm per function shape.
macro_rules! value_fns {
    ($(
        $(#[$doc:meta])*
        fn $name:ident / $try_name:ident ( $($arg:ident : $ty:ty),* ) => $kernel:path;
    )*) => {
        impl QValue {$(
            $(#[$doc])*
            #[track_caller]
            #[must_use]
            pub fn $name(self, $($arg: $ty,)* dst: Format, rounding: Rounding, overflow: Overflow) -> QValue {
                with_storage!(dst, D => match $kernel(self, $($arg,)* dst, rounding) {
                    Ok(f) => QValue::finish::<D>(f, dst, overflow),
                    Err(e) => domain_panic(e),
                })
            }

            /// Like the form without `try_`, with an error instead of a
            /// panic or an overflow mode.
            pub fn $try_name(self, $($arg: $ty,)* dst: Format, rounding: Rounding) -> Result<QValue, FunctionError> {
                with_storage!(dst, D => Ok(QValue::finish_checked::<D>($kernel(self, $($arg,)* dst, rounding)?, dst)?))
            }
        )*}
    };
}

value_fns! {
    /// `self / rhs` correctly rounded into `dst`.
    ///
    /// # Panics
    /// If `rhs` is zero, or with [`Overflow::Panic`] if the quotient does
    /// not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let f = Format::signed(7, 8)?;
    /// let one = QValue::from_i128_bits(f, 256)?;
    /// let three = QValue::from_i128_bits(f, 768)?;
    /// let q = one.div(three, Format::signed(0, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(q.to_i128_bits(), Some(10923)); // 1/3 in Q0.15
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn div / try_div(rhs: QValue) => divide::div;
    /// `1 / self` correctly rounded into `dst`.
    ///
    /// # Panics
    /// If `self` is zero, or with [`Overflow::Panic`] if the result does not
    /// fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let x = QValue::from_i128_bits(Format::unsigned(4, 4)?, 48)?; // 3.0
    /// let r = x.recip(Format::unsigned(0, 8)?, Rounding::Floor, Overflow::Panic);
    /// assert_eq!(r.to_i128_bits(), Some(85)); // floor(256 / 3)
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn recip / try_recip() => divide::recip;
    /// The square root, correctly rounded into `dst`.
    ///
    /// # Panics
    /// If `self` is negative, or with [`Overflow::Panic`] if the root does
    /// not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let two = QValue::from_i128_bits(Format::unsigned(2, 0)?, 2)?;
    /// let r = two.sqrt(Format::unsigned(1, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(r.to_i128_bits(), Some(46341)); // sqrt(2) * 2^15 = 46340.95
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn sqrt / try_sqrt() => root::sqrt;
    /// `sin(2π·self)`: the sine of an angle in turns.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let eighth = QValue::from_i128_bits(Format::unsigned(0, 3)?, 1)?;
    /// let s = eighth.sin_turns(Format::signed(0, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(s.to_i128_bits(), Some(23170)); // sqrt(2)/2 * 2^15 = 23170.48
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn sin_turns / try_sin_turns() => trig::sin_turns;
    /// `cos(2π·self)`: the cosine of an angle in turns.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let zero = QValue::zero(Format::unsigned(0, 16)?);
    /// let c = zero.cos_turns(Format::signed(0, 15)?, Rounding::Floor, Overflow::Saturate);
    /// assert_eq!(c.to_i128_bits(), Some(32767)); // 1.0 saturates to the largest Q0.15
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn cos_turns / try_cos_turns() => trig::cos_turns;
    /// The sine of an angle in radians.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let x = QValue::from_i128_bits(Format::signed(3, 12)?, 4096)?; // 1 rad
    /// let s = x.sin(Format::signed(0, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(s.to_i128_bits(), Some(27573)); // sin(1) * 2^15 = 27573.32
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn sin / try_sin() => trig::sin_radians;
    /// The cosine of an angle in radians.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let x = QValue::from_i128_bits(Format::signed(3, 12)?, 4096)?; // 1 rad
    /// let c = x.cos(Format::signed(0, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(c.to_i128_bits(), Some(17705)); // cos(1) * 2^15 = 17704.63
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn cos / try_cos() => trig::cos_radians;
    /// `atan2(self, x)` in turns, in `(-1/2, 1/2]`: the angle of the point
    /// `(x, self)`. `atan2(0, 0)` is 0 (as IEEE 754 gives for +0, +0).
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let one = QValue::from_i128_bits(Format::signed(1, 6)?, 64)?;
    /// let a = one.atan2_turns(one, Format::signed(0, 15)?, Rounding::Floor, Overflow::Panic);
    /// assert_eq!(a.to_i128_bits(), Some(4096)); // exactly 1/8 turn
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn atan2_turns / try_atan2_turns(x: QValue) => trig::atan2_turns;
    /// `atan2(self, x)` in radians, in `(-π, π]`.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let one = QValue::from_i128_bits(Format::signed(1, 6)?, 64)?;
    /// let a = one.atan2(one, Format::signed(2, 13)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(a.to_i128_bits(), Some(6434)); // pi/4 * 2^13 = 6433.98
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn atan2 / try_atan2(x: QValue) => trig::atan2_radians;
    /// `2^self`.
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let half = QValue::from_i128_bits(Format::signed(3, 4)?, 8)?;
    /// let r = half.exp2(Format::unsigned(1, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(r.to_i128_bits(), Some(46341)); // sqrt(2) * 2^15
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn exp2 / try_exp2() => explog::exp2;
    /// `log2(self)`.
    ///
    /// # Panics
    /// If `self` is zero or negative, or with [`Overflow::Panic`] if the
    /// result does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let three = QValue::from_i128_bits(Format::unsigned(2, 0)?, 3)?;
    /// let r = three.log2(Format::unsigned(1, 15)?, Rounding::NearestTiesEven, Overflow::Panic);
    /// assert_eq!(r.to_i128_bits(), Some(51936)); // log2(3) * 2^15 = 51936.05
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn log2 / try_log2() => explog::log2;
}
