//! Value forms: the ideal value of a node as an affine form in its inputs,
//!
//! ```text
//! v = c + Σ_k a_k · ε_k + r · δ,      ε_k, δ ∈ [-1, 1]
//! ```
//!
//! where input `k` is `mid_k + rad_k · ε_k`. Tracking the inputs by name
//! makes ranges dependency-aware: `x - x` is exactly 0, a butterfly's sum
//! and difference recombine without growing, and `y - rescale(y)` has the
//! range of a rounding error, not twice the range of `y`. Products keep
//! the linear part (`c_a·B + c_b·A`) and move the rest into the radius
//! `r` (`|c_a|·r_b + |c_b|·r_a + R_a·R_b`, with `R` the whole radius of a
//! form): the classic affine-arithmetic product. The analysis intersects
//! the form's range with plain interval arithmetic, so a node's range is
//! never wider than interval arithmetic gives.
//!
//! The representation follows the error forms (`form.rs`): a lazy unit
//! factor, a running sum of `|a_k|`, forms moved into their last consumer
//! and the smaller form inserted into the larger. A form copied for a
//! second consumer or multiplied by another signal keeps at most
//! `max_terms` terms; the smallest go into `r` (sound: the dependency on
//! those inputs is forgotten, never the range).
//!
//! Statistics (the signal's mean and variance for the noise model's SQNR)
//! come with the form: each `ε_k` has the mean and variance of input `k`
//! (uniform over its range or its grid points), so correlated paths are
//! accounted for in linear parts. The products' nonlinear parts use the
//! independent-operand approximation.

use std::collections::BTreeMap;

use crate::analysis::form::tame;
use crate::arith::{Direction, Interval, Num};

/// Statistics of one input symbol `ε` (in units of the input's radius).
#[derive(Clone, Copy, Debug)]
pub(crate) struct Symbol {
    pub(crate) mean: f64,
    pub(crate) var: f64,
}

/// The lazy scale is pushed into the terms once it costs more than this
/// many bits.
const SCALE_BITS: u64 = 60;

/// A value form (see the module docs).
#[derive(Clone, Debug)]
pub(crate) struct ValForm {
    /// A unit (`±2^a·5^b`) or 1 multiplying the center and the terms; its
    /// absolute value multiplies the radii.
    scale: Num,
    center: Num,
    terms: BTreeMap<usize, Num>,
    /// `Σ |a_k|` (kept as an upper bound).
    rad: Num,
    /// The extra radius `r >= 0` (an upper bound).
    rem: Num,
    /// `Σ a_k·E[ε_k]`, `Σ a_k²·Var[ε_k]` (before the scale).
    mean: f64,
    var: f64,
    /// Mean and variance of `r·δ`.
    rem_mean: f64,
    rem_var: f64,
}

fn term_moments(a: &Num, s: Symbol) -> (f64, f64) {
    let af = a.to_f64();
    (af * s.mean, af * af * s.var)
}

impl ValForm {
    /// The constant `c`.
    pub(crate) fn constant(c: Num) -> ValForm {
        ValForm {
            scale: Num::ONE,
            center: c,
            terms: BTreeMap::new(),
            rad: Num::ZERO,
            rem: Num::ZERO,
            mean: 0.0,
            var: 0.0,
            rem_mean: 0.0,
            rem_var: 0.0,
        }
    }

    /// Input symbol `k` ranging over `r` (its midpoint plus its radius
    /// times `ε_k`).
    pub(crate) fn symbol(k: usize, r: &Interval, syms: &[Symbol]) -> ValForm {
        let mid = (&r.lo + &r.hi).mul_pow2(-1);
        let radius = (&r.hi - &r.lo).mul_pow2(-1);
        let mut f = ValForm::constant(mid);
        if !radius.is_zero() {
            let (m, v) = term_moments(&radius, syms[k]);
            f.mean = m;
            f.var = v;
            f.rad = radius.clone();
            f.terms.insert(k, radius);
        }
        f
    }

    pub(crate) fn len(&self) -> usize {
        self.terms.len()
    }

    /// Whether the value is a known number (no terms, no radius).
    pub(crate) fn is_point(&self) -> bool {
        self.terms.is_empty() && self.rem.is_zero()
    }

    /// An interval holding every value of the form.
    pub(crate) fn interval(&self, prec: u32) -> Interval {
        let k = &self.scale;
        let c = &self.center * k;
        let r = (&self.rad + &self.rem) * k.abs();
        let mut iv = Interval::new(&c - &r, &c + &r);
        iv.round_costly(prec);
        iv
    }

    /// Predicted mean and variance of the value.
    pub(crate) fn moments(&self) -> (f64, f64) {
        let k = self.scale.to_f64();
        (
            (self.center.to_f64() + self.mean + self.rem_mean) * k,
            ((self.var + self.rem_var) * k * k).max(0.0),
        )
    }

    /// Round the center and the coefficients that cost more than `prec`
    /// bits, moving what rounding changed into the radius.
    fn tame_all(&mut self, prec: u32) {
        if prec == u32::MAX {
            return;
        }
        let p = u64::from(prec);
        if self.center.cost_bits() > p {
            let c = self.center.round_out(prec, Direction::Down);
            self.rem += (&self.center - &c).abs();
            self.center = c;
        }
        for a in self.terms.values_mut() {
            if a.cost_bits() > p {
                let b = a.round_out(prec, Direction::Down);
                let d = (&*a - &b).abs();
                self.rad -= a.abs();
                self.rad += b.abs();
                self.rem += d;
                *a = b;
            }
        }
        tame(&mut self.rad, prec, Direction::Up);
        tame(&mut self.rem, prec, Direction::Up);
    }

    /// Push the lazy scale into the center and the terms.
    fn materialize(&mut self, prec: u32) {
        if self.scale == Num::ONE {
            return;
        }
        let k = std::mem::replace(&mut self.scale, Num::ONE);
        self.multiply(&k, prec);
    }

    /// Multiply everything by `k` (no lazy scale pending).
    fn multiply(&mut self, k: &Num, prec: u32) {
        let ka = k.abs();
        let kf = k.to_f64();
        self.center *= k;
        for a in self.terms.values_mut() {
            *a *= k;
        }
        self.rad *= &ka;
        self.rem *= &ka;
        self.mean *= kf;
        self.var *= kf * kf;
        self.rem_mean *= kf;
        self.rem_var *= kf * kf;
        self.tame_all(prec);
    }

    /// Multiply by an exact number.
    pub(crate) fn scale_exact(&mut self, k: &Num, prec: u32) {
        if k.is_zero() {
            *self = ValForm::constant(Num::ZERO);
        } else if k.is_unit() {
            self.scale *= k;
            if self.scale.cost_bits() > SCALE_BITS {
                self.materialize(prec);
            }
        } else {
            self.materialize(prec);
            self.multiply(k, prec);
        }
    }

    /// `self + (negate ? -1 : 1)·other`.
    pub(crate) fn merge(&mut self, other: &ValForm, negate: bool, syms: &[Symbol], prec: u32) {
        let mut factor = if other.scale == self.scale {
            Num::ONE
        } else {
            other
                .scale
                .div_unit(&self.scale)
                .expect("scales are units")
        };
        if negate {
            factor = -factor;
        }
        let unit = factor == Num::ONE;
        let ff = factor.to_f64();
        let fa = factor.abs();
        self.center += &other.center * &factor;
        for (&k, b) in &other.terms {
            let b = if unit { b.clone() } else { b * &factor };
            match self.terms.remove(&k) {
                Some(a) => {
                    let (m, v) = term_moments(&a, syms[k]);
                    self.mean -= m;
                    self.var -= v;
                    self.rad -= a.abs();
                    let c = a + b;
                    if !c.is_zero() {
                        let (m, v) = term_moments(&c, syms[k]);
                        self.mean += m;
                        self.var += v;
                        self.rad += c.abs();
                        self.terms.insert(k, c);
                    }
                }
                None => {
                    let (m, v) = term_moments(&b, syms[k]);
                    self.mean += m;
                    self.var += v;
                    self.rad += b.abs();
                    self.terms.insert(k, b);
                }
            }
        }
        if !other.rem.is_zero() {
            self.rem += &other.rem * &fa;
        }
        self.rem_mean += other.rem_mean * ff;
        self.rem_var += other.rem_var * ff * ff;
        // Cancellation can leave the running moments slightly negative.
        self.var = self.var.max(0.0);
        self.tame_all(prec);
    }

    /// Keep at most `max` terms: the smallest go into the radius.
    pub(crate) fn cap(&mut self, max: usize, syms: &[Symbol]) {
        if self.terms.len() <= max {
            return;
        }
        let mut keyed: Vec<(Num, usize)> =
            self.terms.iter().map(|(k, a)| (a.abs(), *k)).collect();
        keyed.sort_by(|a, b| b.0.cmp(&a.0));
        for (_, k) in keyed.drain(max.div_ceil(2)..) {
            let a = self.terms.remove(&k).expect("term present");
            let (m, v) = term_moments(&a, syms[k]);
            self.mean -= m;
            self.var -= v;
            self.rem_mean += m;
            self.rem_var += v;
            // The radius sum already counts |a|: it moves to `rem`.
            let aa = a.abs();
            self.rad -= &aa;
            self.rem += aa;
        }
        self.var = self.var.max(0.0);
    }

    /// A copy for a second consumer (capped to `max` terms).
    pub(crate) fn copy(&mut self, max: usize, syms: &[Symbol]) -> ValForm {
        self.cap(max, syms);
        self.clone()
    }

    /// The product of two forms.
    pub(crate) fn mul(
        mut a: ValForm,
        mut b: ValForm,
        max_terms: usize,
        syms: &[Symbol],
        prec: u32,
    ) -> ValForm {
        if a.is_point() {
            let k = &a.center * &a.scale;
            b.scale_exact(&k, prec);
            return b;
        }
        if b.is_point() {
            let k = &b.center * &b.scale;
            a.scale_exact(&k, prec);
            return a;
        }
        a.cap(max_terms, syms);
        b.cap(max_terms, syms);
        a.materialize(prec);
        b.materialize(prec);
        let (ma, va) = (a.mean + a.rem_mean, a.var + a.rem_var);
        let (mb, vb) = (b.mean + b.rem_mean, b.var + b.rem_var);
        let (ca, cb) = (&a.center, &b.center);
        let mut out = ValForm::constant(ca * cb);
        // Linear part: c_a·B + c_b·A, merged over the sorted symbols.
        let mut shared_mean = 0.0;
        let mut ia = a.terms.iter().peekable();
        let mut ib = b.terms.iter().peekable();
        loop {
            let (k, c) = match (ia.peek(), ib.peek()) {
                (None, None) => break,
                (Some((ka, x)), Some((kb, y))) if ka == kb => {
                    let (k, x, y) = (**ka, *x, *y);
                    shared_mean += x.to_f64() * y.to_f64() * syms[k].var;
                    ia.next();
                    ib.next();
                    (k, cb * x + ca * y)
                }
                (Some((ka, x)), Some((kb, _))) if ka < kb => {
                    let (k, x) = (**ka, *x);
                    ia.next();
                    (k, cb * x)
                }
                (Some((ka, x)), None) => {
                    let (k, x) = (**ka, *x);
                    ia.next();
                    (k, cb * x)
                }
                (_, Some((kb, y))) => {
                    let (k, y) = (**kb, *y);
                    ib.next();
                    (k, ca * y)
                }
            };
            if !c.is_zero() {
                let (m, v) = term_moments(&c, syms[k]);
                out.mean += m;
                out.var += v;
                out.rad += c.abs();
                out.terms.insert(k, c);
            }
        }
        let ra = &a.rad + &a.rem;
        let rb = &b.rad + &b.rem;
        out.rem = ca.abs() * &b.rem + cb.abs() * &a.rem + &ra * &rb;
        // The nonlinear part (A + r_a δ)(B + r_b δ): E[AB] = E[A]E[B] plus
        // the shared symbols' variances; its variance as for independent
        // parts.
        out.rem_mean = ma * mb + shared_mean;
        out.rem_var = va * vb + va * mb * mb + vb * ma * ma;
        out.tame_all(prec);
        out
    }
}
