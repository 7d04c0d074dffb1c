//! [`Interval`]: a closed interval `[lo, hi]` of exact numbers.
//!
//! The operations are exact. Where exactness would cost too much (a long
//! recursion whose exact ends need more bits at every step), the analysis
//! calls [`Interval::round_out`], which moves each end outward to a dyadic
//! with a bounded number of significant bits: the interval only grows, so
//! every enclosure stays an enclosure.

use super::num::{Direction, Num};

use Direction::{Down, Up};

/// A closed interval `[lo, hi]` of exact numbers.
///
/// ```
/// use qbound_report::arith::{Interval, Num};
/// let x = Interval::new(Num::from(-1), Num::from(2));
/// let y = x.mul(&x);                  // no dependency tracking here: [-2, 4]
/// assert_eq!(y, Interval::new(Num::from(-2), Num::from(4)));
/// assert_eq!(x.square(), Interval::new(Num::ZERO, Num::from(4)));
/// ```
#[derive(Clone, Debug, PartialEq, Eq, Hash, Default)]
pub struct Interval {
    /// Lower end.
    pub lo: Num,
    /// Upper end.
    pub hi: Num,
}

impl Interval {
    /// `[lo, hi]`; the caller guarantees `lo <= hi`.
    #[must_use]
    pub fn new(lo: Num, hi: Num) -> Interval {
        debug_assert!(lo <= hi, "empty interval [{lo}, {hi}]");
        Interval { lo, hi }
    }

    /// The one-point interval `[x, x]`.
    #[must_use]
    pub fn point(x: Num) -> Interval {
        Interval {
            lo: x.clone(),
            hi: x,
        }
    }

    /// `[0, 0]`.
    #[must_use]
    pub fn zero() -> Interval {
        Interval::point(Num::ZERO)
    }

    /// Whether this is `[0, 0]`.
    #[must_use]
    pub fn is_zero(&self) -> bool {
        self.lo.is_zero() && self.hi.is_zero()
    }

    /// Whether `lo == hi`.
    #[must_use]
    pub fn is_point(&self) -> bool {
        self.lo == self.hi
    }

    /// Sum of intervals.
    #[must_use]
    pub fn add(&self, o: &Interval) -> Interval {
        Interval {
            lo: &self.lo + &o.lo,
            hi: &self.hi + &o.hi,
        }
    }

    /// Difference of intervals.
    #[must_use]
    pub fn sub(&self, o: &Interval) -> Interval {
        Interval {
            lo: &self.lo - &o.hi,
            hi: &self.hi - &o.lo,
        }
    }

    /// Negation.
    #[must_use]
    pub fn neg(&self) -> Interval {
        Interval {
            lo: -&self.hi,
            hi: -&self.lo,
        }
    }

    /// Product: the hull of the four corner products, found from the signs
    /// of the ends (two multiplications unless both intervals hold 0).
    #[must_use]
    pub fn mul(&self, o: &Interval) -> Interval {
        if self.is_point() && o.is_point() {
            return Interval::point(&self.lo * &o.lo);
        }
        let p = |x: &Num, y: &Num| x * y;
        let (a, b) = (self, o);
        let (lo, hi) = if !a.lo.is_negative() {
            if !b.lo.is_negative() {
                (p(&a.lo, &b.lo), p(&a.hi, &b.hi))
            } else if !b.hi.is_positive() {
                (p(&a.hi, &b.lo), p(&a.lo, &b.hi))
            } else {
                (p(&a.hi, &b.lo), p(&a.hi, &b.hi))
            }
        } else if !a.hi.is_positive() {
            if !b.lo.is_negative() {
                (p(&a.lo, &b.hi), p(&a.hi, &b.lo))
            } else if !b.hi.is_positive() {
                (p(&a.hi, &b.hi), p(&a.lo, &b.lo))
            } else {
                (p(&a.lo, &b.hi), p(&a.lo, &b.lo))
            }
        } else if !b.lo.is_negative() {
            (p(&a.lo, &b.hi), p(&a.hi, &b.hi))
        } else if !b.hi.is_positive() {
            (p(&a.hi, &b.lo), p(&a.lo, &b.lo))
        } else {
            (
                p(&a.lo, &b.hi).min(p(&a.hi, &b.lo)),
                p(&a.lo, &b.lo).max(p(&a.hi, &b.hi)),
            )
        };
        Interval { lo, hi }
    }

    /// [`Interval::add`] with each end rounded outward to `prec` bits where
    /// the exact sum would cost more (see [`Num::add_round`]).
    #[must_use]
    pub fn add_round(&self, o: &Interval, prec: u32) -> Interval {
        Interval {
            lo: self.lo.add_round(&o.lo, prec, Down),
            hi: self.hi.add_round(&o.hi, prec, Up),
        }
    }

    /// [`Interval::mul`] with each end rounded outward to `prec` bits
    /// where the exact product would cost more (see [`Num::mul_round`]).
    ///
    /// ```
    /// use qbound_report::arith::{Interval, Num};
    /// let x = Interval::new(Num::dyadic(-3, -1), Num::dyadic(5, -2));
    /// assert_eq!(x.mul_round(&x, 120), x.mul(&x));
    /// ```
    #[must_use]
    pub fn mul_round(&self, o: &Interval, prec: u32) -> Interval {
        if prec == u32::MAX {
            return self.mul(o);
        }
        let (a, b) = (self, o);
        let p = |x: &Num, y: &Num, d: Direction| x.mul_round(y, prec, d);
        if a.is_point() && b.is_point() {
            return Interval::new(p(&a.lo, &b.lo, Down), p(&a.lo, &b.lo, Up));
        }
        let (lo, hi) = if !a.lo.is_negative() {
            if !b.lo.is_negative() {
                (p(&a.lo, &b.lo, Down), p(&a.hi, &b.hi, Up))
            } else if !b.hi.is_positive() {
                (p(&a.hi, &b.lo, Down), p(&a.lo, &b.hi, Up))
            } else {
                (p(&a.hi, &b.lo, Down), p(&a.hi, &b.hi, Up))
            }
        } else if !a.hi.is_positive() {
            if !b.lo.is_negative() {
                (p(&a.lo, &b.hi, Down), p(&a.hi, &b.lo, Up))
            } else if !b.hi.is_positive() {
                (p(&a.hi, &b.hi, Down), p(&a.lo, &b.lo, Up))
            } else {
                (p(&a.lo, &b.hi, Down), p(&a.lo, &b.lo, Up))
            }
        } else if !b.lo.is_negative() {
            (p(&a.lo, &b.hi, Down), p(&a.hi, &b.hi, Up))
        } else if !b.hi.is_positive() {
            (p(&a.hi, &b.lo, Down), p(&a.lo, &b.lo, Up))
        } else {
            (
                p(&a.lo, &b.hi, Down).min(p(&a.hi, &b.lo, Down)),
                p(&a.lo, &b.lo, Up).max(p(&a.hi, &b.hi, Up)),
            )
        };
        Interval { lo, hi }
    }

    /// [`Interval::scale`] with each end rounded outward to `prec` bits
    /// where the exact product would cost more.
    #[must_use]
    pub fn scale_round(&self, k: &Num, prec: u32) -> Interval {
        if k.is_negative() {
            Interval {
                lo: self.hi.mul_round(k, prec, Down),
                hi: self.lo.mul_round(k, prec, Up),
            }
        } else {
            Interval {
                lo: self.lo.mul_round(k, prec, Down),
                hi: self.hi.mul_round(k, prec, Up),
            }
        }
    }

    /// `self / k` rounded outward to `prec` bits (exact when `k` is a unit).
    ///
    /// # Panics
    /// If `k` is zero.
    #[must_use]
    pub fn div_round(&self, k: &Num, prec: u32) -> Interval {
        if k.is_negative() {
            Interval {
                lo: self.hi.div_round(k, prec, Down),
                hi: self.lo.div_round(k, prec, Up),
            }
        } else {
            Interval {
                lo: self.lo.div_round(k, prec, Down),
                hi: self.hi.div_round(k, prec, Up),
            }
        }
    }

    /// `{x² : x in self}` (tighter than `self.mul(self)` when the interval
    /// holds 0).
    #[must_use]
    pub fn square(&self) -> Interval {
        let a = &self.lo * &self.lo;
        let b = &self.hi * &self.hi;
        if !self.lo.is_negative() {
            Interval::new(a, b)
        } else if !self.hi.is_positive() {
            Interval::new(b, a)
        } else {
            Interval::new(Num::ZERO, a.max(b))
        }
    }

    /// Product with an exact number.
    #[must_use]
    pub fn scale(&self, k: &Num) -> Interval {
        let a = &self.lo * k;
        let b = &self.hi * k;
        if k.is_negative() {
            Interval { lo: b, hi: a }
        } else {
            Interval { lo: a, hi: b }
        }
    }

    /// Product with `2^k` (exact, cheap).
    #[must_use]
    pub fn mul_pow2(&self, k: i64) -> Interval {
        Interval {
            lo: self.lo.mul_pow2(k),
            hi: self.hi.mul_pow2(k),
        }
    }

    /// The smallest interval holding both.
    #[must_use]
    pub fn hull(&self, o: &Interval) -> Interval {
        Interval {
            lo: if self.lo <= o.lo {
                self.lo.clone()
            } else {
                o.lo.clone()
            },
            hi: if self.hi >= o.hi {
                self.hi.clone()
            } else {
                o.hi.clone()
            },
        }
    }

    /// The intersection, or `None` if empty.
    #[must_use]
    pub fn intersect(&self, o: &Interval) -> Option<Interval> {
        let lo = if self.lo >= o.lo { &self.lo } else { &o.lo };
        let hi = if self.hi <= o.hi { &self.hi } else { &o.hi };
        (lo <= hi).then(|| Interval::new(lo.clone(), hi.clone()))
    }

    /// Shrink `self` to its intersection with `o`, if that is not empty
    /// (returns whether it was not).
    pub fn narrow(&mut self, o: &Interval) -> bool {
        if self.lo > o.hi || o.lo > self.hi {
            return false;
        }
        if o.lo > self.lo {
            self.lo.clone_from(&o.lo);
        }
        if o.hi < self.hi {
            self.hi.clone_from(&o.hi);
        }
        true
    }

    /// `max(|lo|, |hi|)`.
    #[must_use]
    pub fn max_abs(&self) -> Num {
        let a = self.lo.abs();
        let b = self.hi.abs();
        if a >= b { a } else { b }
    }

    /// Whether `x` lies in the interval.
    #[must_use]
    pub fn contains(&self, x: &Num) -> bool {
        self.lo <= *x && *x <= self.hi
    }

    /// Whether `o` lies inside this interval.
    #[must_use]
    pub fn encloses(&self, o: &Interval) -> bool {
        self.lo <= o.lo && o.hi <= self.hi
    }

    /// `hi - lo`.
    #[must_use]
    pub fn width(&self) -> Num {
        &self.hi - &self.lo
    }

    /// Move each end outward to at most `prec` significant bits, if it
    /// costs more (see [`Num::cost_bits`]): `lo` toward −∞, `hi` toward
    /// +∞. The result encloses `self`.
    ///
    /// ```
    /// use qbound_report::arith::{Interval, Num};
    /// let tenth: Num = "0.1".parse().unwrap();
    /// let x = Interval::point(tenth.clone());
    /// let r = x.round_out(16);
    /// assert!(r.lo < tenth && tenth < r.hi);
    /// assert_eq!(x.round_out(u32::MAX), x);   // never rounds
    /// ```
    #[must_use]
    pub fn round_out(&self, prec: u32) -> Interval {
        let mut r = self.clone();
        r.round_out_mut(prec);
        r
    }

    /// [`Interval::round_out`] in place.
    pub fn round_out_mut(&mut self, prec: u32) {
        if prec == u32::MAX {
            return;
        }
        let p = u64::from(prec);
        if !self.lo.is_dyadic() || self.lo.mantissa_bits() > p {
            self.lo = self.lo.round_out(prec, Direction::Down);
        }
        if !self.hi.is_dyadic() || self.hi.mantissa_bits() > p {
            self.hi = self.hi.round_out(prec, Direction::Up);
        }
    }

    /// [`Interval::round_out`], but only for ends whose cost passes `prec`
    /// (a decimal constant like 0.3 stays exact).
    pub fn round_costly(&mut self, prec: u32) {
        if prec == u32::MAX {
            return;
        }
        let p = u64::from(prec);
        if self.lo.cost_bits() > p {
            self.lo = self.lo.round_out(prec, Direction::Down);
        }
        if self.hi.cost_bits() > p {
            self.hi = self.hi.round_out(prec, Direction::Up);
        }
    }
}
