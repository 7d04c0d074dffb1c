//! The lazy factor of a form ([`Scale`]) and the factor that brings one
//! form's terms into another's units ([`Factor`]).
//!
//! A shift, a negation or a product with a constant multiplies a whole form;
//! instead of touching every term, the form keeps the factor aside. It is
//! exact while it is cheap (a power of two, a short decimal, a product of a
//! few of them); once it would cost more than [`SCALE_BITS`] bits it
//! becomes an outward-rounded dyadic enclosure, so an unrolled recursion
//! `y = c·y + x` (whose factor `c^k` needs more bits at every step) keeps a
//! constant cost per step: its factor's enclosure widens by about
//! `2^-precision` per step, relative, and no term is touched.

use crate::arith::{Direction, Interval, Num};

/// A lazy factor costs at most this many bits while it is exact.
pub(crate) const SCALE_BITS: u64 = 60;

/// A nonzero factor: exact (a point) or an outward-rounded dyadic
/// enclosure that does not contain 0.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct Scale(Interval);

impl Scale {
    pub(crate) fn one() -> Scale {
        Scale(Interval::point(Num::ONE))
    }

    pub(crate) fn is_one(&self) -> bool {
        self.0.is_point() && self.0.lo == Num::ONE
    }

    /// The exact factor, if it is one.
    pub(crate) fn point(&self) -> Option<&Num> {
        self.0.is_point().then_some(&self.0.lo)
    }

    /// An approximation for the noise model.
    pub(crate) fn to_f64(&self) -> f64 {
        (self.0.lo.to_f64() + self.0.hi.to_f64()) / 2.0
    }

    /// The largest magnitude of the factor.
    pub(crate) fn max_abs(&self) -> Num {
        self.0.max_abs()
    }

    /// Multiply by the nonzero `k`.
    pub(crate) fn times(&mut self, k: &Num, prec: u32) {
        if let Some(p) = self.point() {
            let q = p * k;
            if q.cost_bits() <= SCALE_BITS || prec == u32::MAX {
                self.0 = Interval::point(q);
                return;
            }
        }
        let kv = dyadic_enclosure(k, prec);
        let mut iv = self.0.mul_round(&kv, prec);
        iv.round_out_mut(prec);
        self.0 = iv;
    }

    /// Multiply by another factor.
    pub(crate) fn times_scale(&mut self, o: &Scale, prec: u32) {
        match o.point() {
            Some(k) => self.times(k, prec),
            None => {
                let mut iv = self.0.mul_round(&o.0, prec);
                iv.round_out_mut(prec);
                self.0 = iv;
            }
        }
    }

    /// `x · self`, outward.
    pub(crate) fn apply(&self, x: &Interval, prec: u32) -> Interval {
        match self.point() {
            Some(k) if *k == Num::ONE => x.clone(),
            Some(k) => x.scale_round(k, prec),
            None => x.mul_round(&self.0, prec),
        }
    }

    /// `x / self`, outward.
    pub(crate) fn unapply(&self, x: &Interval, prec: u32) -> Interval {
        match self.point() {
            Some(k) if *k == Num::ONE => x.clone(),
            Some(k) => x.div_round(k, prec),
            None => x.mul_round(&recip(&self.0, prec), prec),
        }
    }
}

/// An outward-rounded enclosure of `1/x` for an interval without 0.
fn recip(x: &Interval, prec: u32) -> Interval {
    Interval::new(
        Num::ONE.div_round(&x.hi, prec, Direction::Down),
        Num::ONE.div_round(&x.lo, prec, Direction::Up),
    )
}

/// `k` itself when it is dyadic, else its outward-rounded dyadic enclosure.
fn dyadic_enclosure(k: &Num, prec: u32) -> Interval {
    let mut iv = Interval::point(k.clone());
    if !k.is_dyadic() {
        iv.round_out_mut(prec);
    }
    iv
}

/// The factor that brings one form's terms into another's units.
pub(crate) enum Factor {
    /// The same scale.
    One,
    /// An exact ratio.
    Exact(Num),
    /// An outward-rounded enclosure of an inexact ratio.
    Enclosed(Interval),
}

impl Factor {
    /// `from / to`.
    pub(crate) fn between(from: &Scale, to: &Scale, prec: u32) -> Factor {
        if from == to && from.point().is_some() {
            return Factor::One;
        }
        if let (Some(f), Some(t)) = (from.point(), to.point()) {
            if let Some(k) = f.div_unit(t) {
                return if k == Num::ONE {
                    Factor::One
                } else {
                    Factor::Exact(k)
                };
            }
        }
        if prec == u32::MAX {
            // Exact mode: the caller takes the scale into the terms first.
            return Factor::Enclosed(Interval::point(Num::ONE));
        }
        Factor::Enclosed(to.unapply(&from.0, prec))
    }

    pub(crate) fn neg(self) -> Factor {
        match self {
            Factor::One => Factor::Exact(Num::from(-1)),
            Factor::Exact(k) => {
                let n = -k;
                if n == Num::ONE {
                    Factor::One
                } else {
                    Factor::Exact(n)
                }
            }
            Factor::Enclosed(iv) => Factor::Enclosed(iv.neg()),
        }
    }

    pub(crate) fn to_f64(&self) -> f64 {
        match self {
            Factor::One => 1.0,
            Factor::Exact(k) => k.to_f64(),
            Factor::Enclosed(iv) => (iv.lo.to_f64() + iv.hi.to_f64()) / 2.0,
        }
    }

    /// The largest magnitude of the factor.
    pub(crate) fn max_abs(&self) -> Num {
        match self {
            Factor::One => Num::ONE,
            Factor::Exact(k) => k.abs(),
            Factor::Enclosed(iv) => iv.max_abs(),
        }
    }

    /// `x` times the factor, outward.
    pub(crate) fn apply(&self, x: &Interval, prec: u32) -> Interval {
        match self {
            Factor::One => x.clone(),
            Factor::Exact(k) => x.scale_round(k, prec),
            Factor::Enclosed(kv) => x.mul_round(kv, prec),
        }
    }
}
