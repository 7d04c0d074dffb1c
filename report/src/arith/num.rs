//! [`Num`]: an exact number `N · 2^a · 5^b` (integers `N`, `a`, `b`).
//!
//! Every number the audit meets has this shape: fixed-point values and
//! format ranges are dyadic (`b = 0`), and the decimals people write
//! (input ranges, constants, budgets) are `N · 10^k = N · 2^k · 5^k`. Sums,
//! differences and products stay in the set, so the analysis and the exact
//! reference of the simulation never need a general rational, a division or
//! a greatest common divisor.
//!
//! The mantissa lives in an `i128` while it fits (the fast path: most
//! fixed-point values and their products are below 128 bits) and in a
//! [`dashu_int::IBig`] beyond. The representation is canonical, so equal
//! numbers are equal structurally:
//! - zero is `0 · 2^0 · 5^0`;
//! - otherwise `N` is odd (trailing binary zeros move into `a`);
//! - `b <= 0`, and `5 ∤ N` when `b < 0` (positive powers of 5 move into `N`);
//! - `N` is in the `i128` form exactly when it fits.
//!
//! [`Num::round_out`] rounds to a dyadic with a bounded number of
//! significant bits, toward −∞ or +∞: the sound outward rounding that
//! keeps long recursions affordable (see `report/AUDIT.md`).

use std::cmp::Ordering;
use std::fmt;
use std::ops::{Add, AddAssign, Mul, MulAssign, Neg, Sub, SubAssign};

use dashu_int::IBig;
use dashu_int::ops::{BitTest, DivRemEuclid};

/// An exact number `N · 2^a · 5^b` (see the module docs).
///
/// ```
/// use qbound_report::arith::Num;
/// let a: Num = "0.1".parse()?;
/// let b: Num = "0.2".parse()?;
/// assert_eq!(&a + &b, "0.3".parse()?);          // exact: no binary rounding
/// assert_eq!((&a * &b).to_string(), "1/50");
/// # Ok::<(), qbound_report::arith::NumParseError>(())
/// ```
#[derive(Clone, PartialEq, Eq, Hash)]
pub struct Num(Repr);

#[derive(Clone, PartialEq, Eq, Hash)]
enum Repr {
    Small { m: i128, e2: i64, e5: i32 },
    Big(Box<BigRepr>),
}

#[derive(Clone, PartialEq, Eq, Hash)]
struct BigRepr {
    m: IBig,
    e2: i64,
    e5: i32,
}

/// The direction of a rounding of a [`Num`] to fewer bits.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Direction {
    /// Toward −∞ (a lower bound stays a lower bound).
    Down,
    /// Toward +∞ (an upper bound stays an upper bound).
    Up,
}

/// Powers of 5 that fit an `i128` (5^0 .. 5^54).
const POW5: [i128; 55] = {
    let mut t = [1i128; 55];
    let mut i = 1;
    while i < 55 {
        t[i] = t[i - 1] * 5;
        i += 1;
    }
    t
};

fn pow5_big(k: u32) -> IBig {
    if (k as usize) < POW5.len() {
        IBig::from(POW5[k as usize])
    } else {
        IBig::from(5u8).pow(k as usize)
    }
}

/// `x mod 5` for a `u128`, with 64-bit operations (2^64 ≡ 1 mod 5).
fn mod5(x: u128) -> u32 {
    let hi = (x >> 64) as u64;
    let lo = x as u64;
    ((hi % 5 + lo % 5) % 5) as u32
}

fn bits_i128(m: i128) -> u32 {
    128 - m.unsigned_abs().leading_zeros()
}

/// A mantissa during a computation: native while it fits.
enum M {
    S(i128),
    B(IBig),
}

impl M {
    fn big(self) -> IBig {
        match self {
            M::S(x) => IBig::from(x),
            M::B(x) => x,
        }
    }
}

impl Num {
    /// Zero.
    pub const ZERO: Num = Num(Repr::Small { m: 0, e2: 0, e5: 0 });
    /// One.
    pub const ONE: Num = Num(Repr::Small { m: 1, e2: 0, e5: 0 });

    fn parts(&self) -> (M, i64, i32) {
        match &self.0 {
            Repr::Small { m, e2, e5 } => (M::S(*m), *e2, *e5),
            Repr::Big(b) => (M::B(b.m.clone()), b.e2, b.e5),
        }
    }

    /// Build the canonical form of `m · 2^e2 · 5^e5` from a native mantissa.
    fn from_small(mut m: i128, mut e2: i64, mut e5: i32) -> Num {
        if m == 0 {
            return Num::ZERO;
        }
        if e5 > 0 {
            return Num::from_big(IBig::from(m), e2, e5);
        }
        let tz = m.trailing_zeros();
        m >>= tz;
        e2 += i64::from(tz);
        while e5 < 0 && mod5(m.unsigned_abs()) == 0 {
            m /= 5;
            e5 += 1;
        }
        Num(Repr::Small { m, e2, e5 })
    }

    /// Build the canonical form of `m · 2^e2 · 5^e5`.
    fn from_big(mut m: IBig, mut e2: i64, mut e5: i32) -> Num {
        if m.is_zero() {
            return Num::ZERO;
        }
        if let Ok(s) = i128::try_from(&m) {
            if e5 <= 0 {
                return Num::from_small(s, e2, e5);
            }
        }
        if e5 > 0 {
            m *= pow5_big(e5.unsigned_abs());
            e5 = 0;
        }
        let tz = m.trailing_zeros().unwrap_or(0);
        if tz > 0 {
            m >>= tz;
            e2 += tz as i64;
        }
        while e5 < 0 {
            let (q, r) = (&m).div_rem_euclid(IBig::from(5u8));
            if !r.is_zero() {
                break;
            }
            m = q;
            e5 += 1;
        }
        match i128::try_from(&m) {
            Ok(s) => Num(Repr::Small { m: s, e2, e5 }),
            Err(_) => Num(Repr::Big(Box::new(BigRepr { m, e2, e5 }))),
        }
    }

    fn build(m: M, e2: i64, e5: i32) -> Num {
        match m {
            M::S(s) => Num::from_small(s, e2, e5),
            M::B(b) => Num::from_big(b, e2, e5),
        }
    }

    /// The integer `n`.
    #[must_use]
    pub fn from_i128(n: i128) -> Num {
        Num::from_small(n, 0, 0)
    }

    /// The integer `n`.
    #[must_use]
    pub fn from_u128(n: u128) -> Num {
        match i128::try_from(n) {
            Ok(s) => Num::from_small(s, 0, 0),
            Err(_) => Num::from_big(IBig::from(n), 0, 0),
        }
    }

    /// `n · 2^e`.
    #[must_use]
    pub fn dyadic(n: i128, e: i64) -> Num {
        Num::from_small(n, e, 0)
    }

    /// `2^e`.
    #[must_use]
    pub fn pow2(e: i64) -> Num {
        Num(Repr::Small { m: 1, e2: e, e5: 0 })
    }

    /// `n · 10^k` (exact).
    #[must_use]
    pub fn decimal(n: i128, k: i32) -> Num {
        Num::from_small(n, i64::from(k), k)
    }

    /// Whether this is 0.
    #[must_use]
    pub fn is_zero(&self) -> bool {
        matches!(self.0, Repr::Small { m: 0, .. })
    }

    /// Whether this is below 0.
    #[must_use]
    pub fn is_negative(&self) -> bool {
        match &self.0 {
            Repr::Small { m, .. } => *m < 0,
            Repr::Big(b) => b.m < IBig::ZERO,
        }
    }

    /// Whether this is above 0.
    #[must_use]
    pub fn is_positive(&self) -> bool {
        match &self.0 {
            Repr::Small { m, .. } => *m > 0,
            Repr::Big(b) => b.m > IBig::ZERO,
        }
    }

    /// -1, 0 or 1.
    #[must_use]
    pub fn signum(&self) -> i32 {
        if self.is_negative() {
            -1
        } else if self.is_zero() {
            0
        } else {
            1
        }
    }

    /// Whether the number is dyadic (`b = 0`): a value a fixed-point format
    /// with enough fraction bits can hold.
    #[must_use]
    pub fn is_dyadic(&self) -> bool {
        match &self.0 {
            Repr::Small { e5, .. } => *e5 == 0,
            Repr::Big(b) => b.e5 == 0,
        }
    }

    /// The exponent of 2 in the canonical form.
    fn e2(&self) -> i64 {
        match &self.0 {
            Repr::Small { e2, .. } => *e2,
            Repr::Big(b) => b.e2,
        }
    }

    fn e5(&self) -> i32 {
        match &self.0 {
            Repr::Small { e5, .. } => *e5,
            Repr::Big(b) => b.e5,
        }
    }

    /// Significant bits of the mantissa `N`.
    #[must_use]
    pub fn mantissa_bits(&self) -> u64 {
        match &self.0 {
            Repr::Small { m, .. } => u64::from(bits_i128(*m)),
            Repr::Big(b) => b.m.bit_len() as u64,
        }
    }

    /// The cost of the number in bits: the mantissa's bits plus those of
    /// the power of 5 in the denominator (about 2.32 bits per factor).
    #[must_use]
    pub fn cost_bits(&self) -> u64 {
        self.mantissa_bits() + u64::from(self.e5().unsigned_abs()) * 7 / 3
    }

    /// `|self|`.
    #[must_use]
    pub fn abs(&self) -> Num {
        if self.is_negative() {
            -self
        } else {
            self.clone()
        }
    }

    /// `self · 2^k` (exact).
    #[must_use]
    pub fn mul_pow2(&self, k: i64) -> Num {
        let mut r = self.clone();
        if !r.is_zero() {
            match &mut r.0 {
                Repr::Small { e2, .. } => *e2 += k,
                Repr::Big(b) => b.e2 += k,
            }
        }
        r
    }

    /// The larger of two numbers.
    #[must_use]
    pub fn max(self, o: Num) -> Num {
        if o > self { o } else { self }
    }

    /// The smaller of two numbers.
    #[must_use]
    pub fn min(self, o: Num) -> Num {
        if o < self { o } else { self }
    }

    fn add_impl(a: &Num, b: &Num, negate_b: bool) -> Num {
        if b.is_zero() {
            return a.clone();
        }
        if a.is_zero() {
            return if negate_b { -b } else { b.clone() };
        }
        if let (
            Repr::Small {
                m: ma,
                e2: a2,
                e5: a5,
            },
            Repr::Small {
                m: mb,
                e2: b2,
                e5: b5,
            },
        ) = (&a.0, &b.0)
        {
            let mb = if negate_b {
                mb.checked_neg()
            } else {
                Some(*mb)
            };
            if let Some(mb) = mb {
                if let Some(r) = add_small(*ma, *a2, *a5, mb, *b2, *b5) {
                    return r;
                }
            }
        }
        let (ma, a2, a5) = a.parts();
        let (mb, b2, b5) = b.parts();
        let mut mb = mb.big();
        if negate_b {
            mb = -mb;
        }
        let (ma, mb, e2, e5) = align_big(ma.big(), a2, a5, mb, b2, b5);
        Num::from_big(ma + mb, e2, e5)
    }

    fn mul_impl(a: &Num, b: &Num) -> Num {
        if a.is_zero() || b.is_zero() {
            return Num::ZERO;
        }
        if let (
            Repr::Small {
                m: ma,
                e2: a2,
                e5: a5,
            },
            Repr::Small {
                m: mb,
                e2: b2,
                e5: b5,
            },
        ) = (&a.0, &b.0)
        {
            if let Some(m) = ma.checked_mul(*mb) {
                // odd × odd is odd: only the factor 5 may need a look.
                let e5 = a5 + b5;
                return if e5 < 0 && (*a5 == 0 || *b5 == 0) {
                    Num::from_small(m, a2 + b2, e5)
                } else {
                    Num(Repr::Small { m, e2: a2 + b2, e5 })
                };
            }
        }
        let (ma, a2, a5) = a.parts();
        let (mb, b2, b5) = b.parts();
        Num::from_big(ma.big() * mb.big(), a2 + b2, a5 + b5)
    }

    /// `floor(self)` as an integer [`Num`].
    #[must_use]
    pub fn floor(&self) -> Num {
        self.floor_int().0
    }

    /// `ceil(self)` as an integer [`Num`].
    #[must_use]
    pub fn ceil(&self) -> Num {
        -(-self).floor()
    }

    /// `(floor(self), self - floor(self) == 0)`.
    fn floor_int(&self) -> (Num, bool) {
        let (m, e2, e5) = self.parts();
        if e5 == 0 && e2 >= 0 {
            return (self.clone(), true);
        }
        if e5 == 0 {
            let s = e2.unsigned_abs();
            return match m {
                M::S(x) => {
                    if s >= 127 {
                        (Num::from_i128(if x < 0 { -1 } else { 0 }), false)
                    } else {
                        (Num::from_i128(x >> s), false)
                    }
                }
                M::B(x) => (Num::from_big(x >> (s as usize), 0, 0), false),
            };
        }
        // m · 2^e2 / 5^k with k > 0 and 5 ∤ m: never an integer.
        let den = pow5_big(e5.unsigned_abs());
        let (num, den) = if e2 >= 0 {
            (m.big() << (e2 as usize), den)
        } else {
            (m.big(), den << (e2.unsigned_abs() as usize))
        };
        let (q, _) = num.div_rem_euclid(den);
        (Num::from_big(q, 0, 0), false)
    }

    /// Whether this is an odd integer.
    #[must_use]
    pub fn is_odd_integer(&self) -> bool {
        match &self.0 {
            Repr::Small { m, e2, e5 } => *m != 0 && *e2 == 0 && *e5 == 0,
            Repr::Big(b) => b.e2 == 0 && b.e5 == 0,
        }
    }

    /// Whether this is `±2^a·5^b` (a mantissa of ±1): a number by which
    /// every [`Num`] divides exactly.
    #[must_use]
    pub fn is_unit(&self) -> bool {
        matches!(self.0, Repr::Small { m: 1 | -1, .. })
    }

    /// `self / u` for a unit `u` (see [`Num::is_unit`]), exactly; `None`
    /// if `u` is not a unit.
    #[must_use]
    pub fn div_unit(&self, u: &Num) -> Option<Num> {
        let Repr::Small {
            m: um,
            e2: u2,
            e5: u5,
        } = u.0
        else {
            return None;
        };
        if um != 1 && um != -1 {
            return None;
        }
        // x / (±2^a 5^b) = ±x · 2^-a · 5^-b, and 5^-b = 5^|b| is an integer.
        let inv = Num::from_small(um, -u2, 0) * Num::from_big(pow5_big(u5.unsigned_abs()), 0, 0);
        Some(self * &inv)
    }

    /// Whether this is an integer.
    #[must_use]
    pub fn is_integer(&self) -> bool {
        self.e5() == 0 && (self.e2() >= 0 || self.is_zero())
    }

    /// The value as an `i128`, if it is an integer that fits.
    #[must_use]
    pub fn to_i128(&self) -> Option<i128> {
        if !self.is_integer() {
            return None;
        }
        match &self.0 {
            Repr::Small { m, e2, .. } => {
                if *e2 >= 127 {
                    return None;
                }
                let s = *e2 as u32;
                let r = m.checked_shl(s)?;
                (r >> s == *m).then_some(r)
            }
            Repr::Big(b) => i128::try_from(&(b.m.clone() << (b.e2 as usize))).ok(),
        }
    }

    /// The value as a [`dashu_int::IBig`], if it is an integer.
    #[must_use]
    pub fn to_ibig(&self) -> Option<IBig> {
        if !self.is_integer() {
            return None;
        }
        let (m, e2, _) = self.parts();
        Some(m.big() << (e2.max(0) as usize))
    }

    /// An integer [`dashu_int::IBig`] as a number.
    #[must_use]
    pub fn from_ibig(n: IBig) -> Num {
        Num::from_big(n, 0, 0)
    }

    /// Round to a dyadic with at most `prec` significant bits, in the
    /// direction `dir`. Numbers that already are dyadic with at most `prec`
    /// bits come back unchanged; `prec = u32::MAX` never rounds.
    ///
    /// ```
    /// use qbound_report::arith::{Direction, Num};
    /// let third_ish: Num = "0.3".parse()?;
    /// let lo = third_ish.round_out(8, Direction::Down);
    /// let hi = third_ish.round_out(8, Direction::Up);
    /// assert!(lo < third_ish && third_ish < hi);
    /// assert_eq!(lo.to_string(), "153/512");
    /// # Ok::<(), qbound_report::arith::NumParseError>(())
    /// ```
    #[must_use]
    pub fn round_out(&self, prec: u32, dir: Direction) -> Num {
        let prec = prec.max(1);
        if self.e5() == 0 && self.mantissa_bits() <= u64::from(prec) {
            return self.clone();
        }
        let (m, e2, e5) = self.parts();
        if e5 == 0 {
            let bits = self.mantissa_bits();
            let s = bits - u64::from(prec);
            return Num::build(shr_dir(m, s, dir), e2 + s as i64, 0);
        }
        // q = round(m · 2^s / 5^k) with about prec + 2 bits, then shift.
        let k = e5.unsigned_abs();
        if let (M::S(x), true) = (&m, k < 28 && prec <= 124) {
            if let Some(r) = round_out_small(*x, e2, k, prec, dir) {
                return r;
            }
        }
        let den = pow5_big(k);
        let s = i64::from(prec) + 2 + den.bit_len() as i64 - self.mantissa_bits() as i64;
        let (num, den) = if s >= 0 {
            (m.big() << (s as usize), den)
        } else {
            (m.big(), den << (s.unsigned_abs() as usize))
        };
        let (mut q, r) = num.div_rem_euclid(den);
        if dir == Direction::Up && !r.is_zero() {
            q += IBig::ONE;
        }
        Num::from_big(q, e2 - s, 0).round_out(prec, dir)
    }

    /// `self · o` rounded toward `dir` to at most `prec` significant bits
    /// when the exact product would cost more than `prec` bits (exact
    /// otherwise). Dyadic factors on the fast path multiply in 256 bits
    /// without allocating.
    ///
    /// ```
    /// use qbound_report::arith::{Direction, Num};
    /// let a = Num::dyadic((1 << 100) + 1, 0);
    /// let up = a.mul_round(&a, 64, Direction::Up);
    /// let down = a.mul_round(&a, 64, Direction::Down);
    /// let exact = &a * &a;
    /// assert!(down < exact && exact < up);
    /// assert_eq!(Num::from(3).mul_round(&Num::from(5), 64, Direction::Up), Num::from(15));
    /// ```
    #[must_use]
    pub fn mul_round(&self, o: &Num, prec: u32, dir: Direction) -> Num {
        // A unit (±2^a·5^b: a shift, a negation, a power of ten) adds no
        // significant bits: its product is kept exact.
        if prec == u32::MAX || self.is_unit() || o.is_unit() {
            return self * o;
        }
        if let (
            Repr::Small {
                m: ma,
                e2: a2,
                e5: 0,
            },
            Repr::Small {
                m: mb,
                e2: b2,
                e5: 0,
            },
        ) = (&self.0, &o.0)
        {
            if *ma == 0 || *mb == 0 {
                return Num::ZERO;
            }
            let neg = (*ma < 0) != (*mb < 0);
            let (hi, lo) = mul_u128(ma.unsigned_abs(), mb.unsigned_abs());
            let bits = if hi == 0 {
                128 - lo.leading_zeros()
            } else {
                256 - hi.leading_zeros()
            };
            let prec = prec.clamp(1, 126);
            if bits <= prec {
                let m = lo as i128;
                return Num::from_small(if neg { -m } else { m }, a2 + b2, 0);
            }
            let s = bits - prec;
            let (q, inexact) = shr_u256(hi, lo, s);
            // Round the magnitude up when the signed result must go away
            // from zero: up for positive toward +∞, down-magnitude else.
            let away = matches!((neg, dir), (false, Direction::Up) | (true, Direction::Down));
            let q = if inexact && away { q + 1 } else { q };
            let m = q as i128;
            return Num::from_small(if neg { -m } else { m }, a2 + b2 + i64::from(s), 0);
        }
        let p = self * o;
        if p.cost_bits() > u64::from(prec) {
            p.round_out(prec, dir)
        } else {
            p
        }
    }

    /// `self + o` rounded toward `dir` to at most `prec` significant bits
    /// when the exact sum would cost more than `prec` bits (exact
    /// otherwise). Dyadic operands on the fast path add in 256 bits without
    /// allocating.
    ///
    /// ```
    /// use qbound_report::arith::{Direction, Num};
    /// let big = Num::pow2(100);
    /// let tiny = Num::pow2(-100);
    /// let up = big.add_round(&tiny, 64, Direction::Up);
    /// let down = big.add_round(&tiny, 64, Direction::Down);
    /// assert_eq!(down, big);
    /// assert!(up > &big + &tiny);
    /// ```
    #[must_use]
    pub fn add_round(&self, o: &Num, prec: u32, dir: Direction) -> Num {
        if prec == u32::MAX {
            return self + o;
        }
        if let (
            Repr::Small {
                m: ma,
                e2: a2,
                e5: 0,
            },
            Repr::Small {
                m: mb,
                e2: b2,
                e5: 0,
            },
        ) = (&self.0, &o.0)
        {
            if let Some(r) = add_round_small(*ma, *a2, *mb, *b2, prec, dir) {
                return r;
            }
        }
        let r = self + o;
        if r.cost_bits() > u64::from(prec) {
            r.round_out(prec, dir)
        } else {
            r
        }
    }

    /// `self / d` rounded toward `dir` to at most `prec` significant bits
    /// (exact when `d` is a unit, see [`Num::is_unit`]).
    ///
    /// # Panics
    /// If `d` is zero.
    ///
    /// ```
    /// use qbound_report::arith::{Direction, Num};
    /// let third_lo = Num::ONE.div_round(&Num::from(3), 20, Direction::Down);
    /// let third_hi = Num::ONE.div_round(&Num::from(3), 20, Direction::Up);
    /// assert!(&third_lo * &Num::from(3) < Num::ONE && Num::ONE < &third_hi * &Num::from(3));
    /// assert_eq!(Num::ONE.div_round(&"0.5".parse().unwrap(), 20, Direction::Up), Num::from(2));
    /// ```
    #[must_use]
    pub fn div_round(&self, d: &Num, prec: u32, dir: Direction) -> Num {
        assert!(!d.is_zero(), "division by zero");
        if let Some(q) = self.div_unit(d) {
            return q;
        }
        if self.is_zero() {
            return Num::ZERO;
        }
        let prec = prec.clamp(1, u32::MAX - 8);
        // value = (ma·5^p)/(mb·5^q) · 2^(a2 - b2).
        let (ma, a2, a5) = self.parts();
        let (mb, b2, b5) = d.parts();
        let neg = (self.is_negative()) != (d.is_negative());
        let mut n = ma.big();
        let mut dd = mb.big();
        if n < IBig::ZERO {
            n = -n;
        }
        if dd < IBig::ZERO {
            dd = -dd;
        }
        if a5 > b5 {
            n *= pow5_big((a5 - b5).unsigned_abs());
        } else if b5 > a5 {
            dd *= pow5_big((b5 - a5).unsigned_abs());
        }
        let s = i64::from(prec) + 2 + dd.bit_len() as i64 - n.bit_len() as i64;
        let (n, dd) = if s >= 0 {
            (n << (s as usize), dd)
        } else {
            (n, dd << (s.unsigned_abs() as usize))
        };
        let (mut q, r) = n.div_rem_euclid(dd);
        // Magnitude rounding: away from zero when the signed result must
        // move that way.
        let away = matches!((neg, dir), (false, Direction::Up) | (true, Direction::Down));
        if away && !r.is_zero() {
            q += IBig::ONE;
        }
        let q = if neg { -q } else { q };
        Num::from_big(q, a2 - b2 - s, 0).round_out(prec, dir)
    }

    /// An approximation as `f64` (for display and statistics only).
    #[must_use]
    pub fn to_f64(&self) -> f64 {
        let (m, e2, e5) = self.parts();
        let (mf, shift) = match m {
            M::S(x) => (x as f64, 0i64),
            M::B(x) => {
                let bl = x.bit_len();
                let s = bl.saturating_sub(64);
                let top = &x >> s;
                (
                    i128::try_from(&top).map_or(f64::NAN, |t| t as f64),
                    s as i64,
                )
            }
        };
        if e5 == 0 {
            return scale2(mf, e2 + shift);
        }
        // 5^e5 as a power of two: split the exponent into an integer part
        // (applied exactly) and a fraction (accurate to about 1e-15).
        let l = f64::from(e5) * 5f64.log2();
        let n = l.floor();
        scale2(mf * (l - n).exp2(), e2 + shift + n as i64)
    }

    /// The exact value as `p/q` in lowest terms (or an integer): the form
    /// the JSON report uses.
    #[must_use]
    pub fn ratio_text(&self) -> String {
        let (num, den) = self.numer_denom();
        if den == IBig::ONE {
            num.to_string()
        } else {
            format!("{num}/{den}")
        }
    }

    /// Numerator and (positive) denominator in lowest terms.
    #[must_use]
    pub fn numer_denom(&self) -> (IBig, IBig) {
        let (m, e2, e5) = self.parts();
        let mut num = m.big();
        let mut den = IBig::ONE;
        if e2 >= 0 {
            num <<= e2 as usize;
        } else {
            den <<= e2.unsigned_abs() as usize;
        }
        if e5 < 0 {
            den *= pow5_big(e5.unsigned_abs());
        }
        (num, den)
    }

    /// The number of decimal digits after the point of the exact decimal
    /// expansion (every `Num` has a finite one).
    #[must_use]
    pub fn decimal_digits(&self) -> u64 {
        if self.is_zero() {
            return 0;
        }
        (-self.e2()).max(-i64::from(self.e5())).max(0) as u64
    }

    /// The exact decimal expansion (`-0.0625`, `3`, `1.2`).
    #[must_use]
    pub fn decimal_text(&self) -> String {
        let d = self.decimal_digits();
        // value · 10^d = m · 2^(e2 + d) · 5^(e5 + d), both exponents >= 0.
        let (m, e2, e5) = self.parts();
        let mut n = m.big() << ((e2 + d as i64) as usize);
        let p5 = i64::from(e5) + d as i64;
        if p5 > 0 {
            n *= IBig::from(5u8).pow(p5 as usize);
        }
        let neg = n < IBig::ZERO;
        let s = if neg { (-n).to_string() } else { n.to_string() };
        let d = d as usize;
        let body = if d == 0 {
            s
        } else if s.len() > d {
            format!("{}.{}", &s[..s.len() - d], &s[s.len() - d..])
        } else {
            format!("0.{}{}", "0".repeat(d - s.len()), s)
        };
        if neg { format!("-{body}") } else { body }
    }
}

/// `m >> s` rounded toward −∞ (`Down`) or +∞ (`Up`).
fn shr_dir(m: M, s: u64, dir: Direction) -> M {
    if s == 0 {
        return m;
    }
    match m {
        M::S(x) if s < 127 => {
            let q = x >> s;
            let exact = (q << s) == x;
            M::S(if dir == Direction::Up && !exact {
                q + 1
            } else {
                q
            })
        }
        m => {
            let x = m.big();
            let q = &x >> (s as usize);
            let exact = (&q << (s as usize)) == x;
            M::B(if dir == Direction::Up && !exact {
                q + IBig::ONE
            } else {
                q
            })
        }
    }
}

/// The 256-bit product of two `u128`, as (high, low) halves.
fn mul_u128(a: u128, b: u128) -> (u128, u128) {
    let (a1, a0) = (a >> 64, a & u128::from(u64::MAX));
    let (b1, b0) = (b >> 64, b & u128::from(u64::MAX));
    let p00 = a0 * b0;
    let p01 = a0 * b1;
    let p10 = a1 * b0;
    let p11 = a1 * b1;
    let mid = (p00 >> 64) + (p01 & u128::from(u64::MAX)) + (p10 & u128::from(u64::MAX));
    let lo = (p00 & u128::from(u64::MAX)) | (mid << 64);
    let hi = p11 + (p01 >> 64) + (p10 >> 64) + (mid >> 64);
    (hi, lo)
}

/// `m·2^e2 / 5^k` rounded toward `dir` to `prec` bits (`5^k < 2^64`,
/// `prec <= 124`), dividing a 256-bit numerator by a word; `None` when the
/// numerator would not fit.
fn round_out_small(m: i128, e2: i64, k: u32, prec: u32, dir: Direction) -> Option<Num> {
    let d = POW5[k as usize] as u64;
    let dbits = 64 - d.leading_zeros();
    let mbits = bits_i128(m);
    let neg = m < 0;
    let mag = m.unsigned_abs();
    // Shift so that the quotient has prec + 2 bits.
    let s = i64::from(prec) + 2 + i64::from(dbits) - i64::from(mbits);
    let (hi, lo, lost) = if s >= 0 {
        if i64::from(mbits) + s > 255 {
            return None;
        }
        let s = s as u32;
        let (hi, lo) = if s == 0 {
            (0, mag)
        } else if s >= 128 {
            (mag << (s - 128), 0)
        } else {
            (mag >> (128 - s), mag << s)
        };
        (hi, lo, false)
    } else {
        let t = s.unsigned_abs() as u32;
        if t >= 128 {
            return None;
        }
        (0, mag >> t, mag & ((1u128 << t) - 1) != 0)
    };
    // Long division by the word d, 64 bits at a time.
    let limbs = [(hi >> 64) as u64, hi as u64, (lo >> 64) as u64, lo as u64];
    let mut rem: u128 = 0;
    let mut q: [u64; 4] = [0; 4];
    for (i, &l) in limbs.iter().enumerate() {
        let cur = (rem << 64) | u128::from(l);
        q[i] = (cur / u128::from(d)) as u64;
        rem = cur % u128::from(d);
    }
    if q[0] != 0 || q[1] != 0 {
        return None;
    }
    let mut qv = (u128::from(q[2]) << 64) | u128::from(q[3]);
    let inexact = lost || rem != 0;
    let away = matches!((neg, dir), (false, Direction::Up) | (true, Direction::Down));
    if inexact && away {
        qv += 1;
    }
    let qi = i128::try_from(qv).ok()?;
    Some(Num::from_small(if neg { -qi } else { qi }, e2 - s, 0).round_out(prec, dir))
}

/// `ma·2^a2 + mb·2^b2` rounded toward `dir` to `prec` bits, in 256-bit
/// arithmetic; `None` when the exponents are too far apart for that.
fn add_round_small(ma: i128, a2: i64, mb: i128, b2: i64, prec: u32, dir: Direction) -> Option<Num> {
    if ma == 0 || mb == 0 {
        let (m, e) = if ma == 0 { (mb, b2) } else { (ma, a2) };
        return Some(Num::from_small(m, e, 0).round_out(prec, dir));
    }
    let e = a2.min(b2);
    let (da, db) = (a2 - e, b2 - e);
    let (ba, bb) = (i64::from(bits_i128(ma)), i64::from(bits_i128(mb)));
    if ba + da > 254 || bb + db > 254 {
        return None;
    }
    let shl = |m: u128, d: i64| -> (u128, u128) {
        let d = d as u32;
        if d == 0 {
            (0, m)
        } else if d >= 128 {
            (m << (d - 128), 0)
        } else {
            (m >> (128 - d), m << d)
        }
    };
    let (xa, ya) = shl(ma.unsigned_abs(), da);
    let (xb, yb) = shl(mb.unsigned_abs(), db);
    let (neg, hi, lo) = if (ma < 0) == (mb < 0) {
        let (lo, c) = ya.overflowing_add(yb);
        (ma < 0, xa + xb + u128::from(c), lo)
    } else if (xa, ya) >= (xb, yb) {
        let (lo, b) = ya.overflowing_sub(yb);
        (ma < 0, xa - xb - u128::from(b), lo)
    } else {
        let (lo, b) = yb.overflowing_sub(ya);
        (mb < 0, xb - xa - u128::from(b), lo)
    };
    if hi == 0 && lo == 0 {
        return Some(Num::ZERO);
    }
    let bits = if hi == 0 {
        128 - lo.leading_zeros()
    } else {
        256 - hi.leading_zeros()
    };
    let prec = prec.clamp(1, 126);
    if bits <= prec {
        let m = lo as i128;
        return Some(Num::from_small(if neg { -m } else { m }, e, 0));
    }
    let s = bits - prec;
    let (q, inexact) = shr_u256(hi, lo, s);
    let away = matches!((neg, dir), (false, Direction::Up) | (true, Direction::Down));
    let q = if inexact && away { q + 1 } else { q };
    let m = q as i128;
    Some(Num::from_small(
        if neg { -m } else { m },
        e + i64::from(s),
        0,
    ))
}

/// `(hi, lo) >> s` for `0 < s < 256` whose result fits a `u128`, and
/// whether any bit shifted out was set.
fn shr_u256(hi: u128, lo: u128, s: u32) -> (u128, bool) {
    if s >= 128 {
        let t = s - 128;
        let q = if t == 0 { hi } else { hi >> t };
        let lost = lo != 0 || (t > 0 && hi & ((1u128 << t) - 1) != 0);
        (q, lost)
    } else {
        let q = (lo >> s) | (hi << (128 - s));
        let lost = lo & ((1u128 << s) - 1) != 0;
        (q, lost)
    }
}

/// `x · 2^e` in `f64`, scaling in steps so no intermediate overflows or
/// underflows early.
fn scale2(mut x: f64, mut e: i64) -> f64 {
    while e > 1000 {
        x *= 2f64.powi(1000);
        e -= 1000;
        if x.is_infinite() {
            return x;
        }
    }
    while e < -1000 {
        x *= 2f64.powi(-1000);
        e += 1000;
        if x == 0.0 {
            return x;
        }
    }
    x * 2f64.powi(e as i32)
}

/// `a + b` on native mantissas, if nothing overflows.
fn add_small(ma: i128, a2: i64, a5: i32, mb: i128, b2: i64, b5: i32) -> Option<Num> {
    // Bring both to the smaller power of 5 (the larger denominator).
    let (mut ma, mut mb) = (ma, mb);
    let e5 = a5.min(b5);
    if a5 > e5 {
        ma = ma.checked_mul(*POW5.get((a5 - e5) as usize)?)?;
    }
    if b5 > e5 {
        mb = mb.checked_mul(*POW5.get((b5 - e5) as usize)?)?;
    }
    let e2 = a2.min(b2);
    ma = shl_checked(ma, a2 - e2)?;
    mb = shl_checked(mb, b2 - e2)?;
    Some(Num::from_small(ma.checked_add(mb)?, e2, e5))
}

fn shl_checked(m: i128, s: i64) -> Option<i128> {
    if s == 0 {
        return Some(m);
    }
    if s >= 126 || i64::from(bits_i128(m)) + s > 126 {
        return None;
    }
    Some(m << s)
}

/// Bring two mantissas to a common `2^e2 · 5^e5`.
fn align_big(
    mut ma: IBig,
    a2: i64,
    a5: i32,
    mut mb: IBig,
    b2: i64,
    b5: i32,
) -> (IBig, IBig, i64, i32) {
    let e5 = a5.min(b5);
    if a5 > e5 {
        ma *= pow5_big((a5 - e5).unsigned_abs());
    }
    if b5 > e5 {
        mb *= pow5_big((b5 - e5).unsigned_abs());
    }
    let e2 = a2.min(b2);
    if a2 > e2 {
        ma <<= (a2 - e2) as usize;
    }
    if b2 > e2 {
        mb <<= (b2 - e2) as usize;
    }
    (ma, mb, e2, e5)
}

impl Ord for Num {
    fn cmp(&self, o: &Num) -> Ordering {
        let (sa, sb) = (self.signum(), o.signum());
        if sa != sb {
            return sa.cmp(&sb);
        }
        if sa == 0 {
            return Ordering::Equal;
        }
        if let (
            Repr::Small {
                m: ma,
                e2: a2,
                e5: 0,
            },
            Repr::Small {
                m: mb,
                e2: b2,
                e5: 0,
            },
        ) = (&self.0, &o.0)
        {
            // Same sign, dyadic: compare the positions of the top bits first.
            let ta = i64::from(bits_i128(*ma)) + a2;
            let tb = i64::from(bits_i128(*mb)) + b2;
            if ta != tb {
                let mag = ta.cmp(&tb);
                return if sa > 0 { mag } else { mag.reverse() };
            }
            // Same top bit: aligning cannot overflow.
            let e2 = (*a2).min(*b2);
            let x = ma << (a2 - e2);
            let y = mb << (b2 - e2);
            return x.cmp(&y);
        }
        Num::add_impl(self, o, true).signum().cmp(&0)
    }
}

impl PartialOrd for Num {
    fn partial_cmp(&self, o: &Num) -> Option<Ordering> {
        Some(self.cmp(o))
    }
}

impl Default for Num {
    fn default() -> Num {
        Num::ZERO
    }
}

macro_rules! from_int {
    ($($t:ty)*) => {$(
        impl From<$t> for Num {
            fn from(n: $t) -> Num {
                Num::from_i128(i128::from(n))
            }
        }
    )*};
}

from_int!(i32 i64 u32 u64 i128);

impl From<u128> for Num {
    fn from(n: u128) -> Num {
        Num::from_u128(n)
    }
}

impl From<IBig> for Num {
    fn from(n: IBig) -> Num {
        Num::from_big(n, 0, 0)
    }
}

impl Neg for &Num {
    type Output = Num;
    fn neg(self) -> Num {
        match &self.0 {
            Repr::Small { m, e2, e5 } => match m.checked_neg() {
                Some(n) => Num(Repr::Small {
                    m: n,
                    e2: *e2,
                    e5: *e5,
                }),
                None => Num::from_big(-IBig::from(*m), *e2, *e5),
            },
            Repr::Big(b) => Num::from_big(-b.m.clone(), b.e2, b.e5),
        }
    }
}

impl Neg for Num {
    type Output = Num;
    fn neg(self) -> Num {
        -&self
    }
}

macro_rules! binop {
    ($tr:ident, $f:ident, $asg:ident, $af:ident, $body:expr) => {
        impl $tr<&Num> for &Num {
            type Output = Num;
            fn $f(self, o: &Num) -> Num {
                $body(self, o)
            }
        }
        impl $tr<Num> for Num {
            type Output = Num;
            fn $f(self, o: Num) -> Num {
                $body(&self, &o)
            }
        }
        impl $tr<&Num> for Num {
            type Output = Num;
            fn $f(self, o: &Num) -> Num {
                $body(&self, o)
            }
        }
        impl $tr<Num> for &Num {
            type Output = Num;
            fn $f(self, o: Num) -> Num {
                $body(self, &o)
            }
        }
        impl $asg<&Num> for Num {
            fn $af(&mut self, o: &Num) {
                *self = $body(&*self, o);
            }
        }
        impl $asg<Num> for Num {
            fn $af(&mut self, o: Num) {
                *self = $body(&*self, &o);
            }
        }
    };
}

binop!(Add, add, AddAssign, add_assign, |a, b| Num::add_impl(
    a, b, false
));
binop!(Sub, sub, SubAssign, sub_assign, |a, b| Num::add_impl(
    a, b, true
));
binop!(Mul, mul, MulAssign, mul_assign, Num::mul_impl);

impl fmt::Display for Num {
    /// The exact value as `p/q` in lowest terms, or an integer.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.ratio_text())
    }
}

impl fmt::Debug for Num {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Num({})", self.ratio_text())
    }
}

/// Text that is not an exact decimal (or `p/q` with a denominator made of
/// 2s and 5s).
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("not an exact decimal or dyadic fraction: `{0}`")]
pub struct NumParseError(pub String);

impl std::str::FromStr for Num {
    type Err = NumParseError;

    /// An exact decimal (`-1.25`, `0.1`, `3e-4`, `.5`), or `p/q` whose
    /// denominator has no prime factor other than 2 and 5 (the form
    /// [`Num`]'s `Display` writes).
    fn from_str(s: &str) -> Result<Num, NumParseError> {
        let err = || NumParseError(s.to_owned());
        if let Some((p, q)) = s.split_once('/') {
            let p: IBig = p.parse().map_err(|_| err())?;
            let mut q: IBig = q.parse().map_err(|_| err())?;
            if q <= IBig::ZERO {
                return Err(err());
            }
            let tz = q.trailing_zeros().unwrap_or(0);
            q >>= tz;
            let mut k = 0i32;
            while q != IBig::ONE {
                let (d, r) = (&q).div_rem_euclid(IBig::from(5u8));
                if !r.is_zero() {
                    return Err(err());
                }
                q = d;
                k += 1;
            }
            return Ok(Num::from_big(p, -(tz as i64), -k));
        }
        crate::arith::parse_decimal(s).ok_or_else(err)
    }
}
