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
//! The representation follows the error forms (`form.rs`): a lazy constant
//! factor, a running sum of `|a_k|`, forms moved into their last consumer
//! and the smaller form inserted into the larger. A form copied for a
//! second consumer or multiplied by another signal keeps at most
//! `max_terms` terms; the smallest go into `r` (sound: the dependency on
//! those inputs is forgotten, never the range), and so do negligible terms
//! (below `2^-24` of the radius) when the form has doubled since its last
//! scan. Where a coefficient must be rounded (an inexact ratio of scales,
//! a costly product), the rounded coefficient stays and what rounding
//! moved goes into `r`.
//!
//! Statistics (the signal's mean and variance for the noise model's SQNR)
//! come with the form: each `ε_k` has the mean and variance of input `k`
//! (uniform over its range or its grid points), so correlated paths are
//! accounted for in linear parts. The products' nonlinear parts use the
//! independent-operand approximation.

use super::form::{SMALL_FORM, tame};
use super::scale::{Factor, Scale};
use super::terms::TermMap;
use crate::arith::{Direction, Interval, Num};

/// Statistics of one input symbol `ε` (in units of the input's radius).
#[derive(Clone, Copy, Debug)]
pub(crate) struct Symbol {
    pub(crate) mean: f64,
    pub(crate) var: f64,
}

/// Terms below `2^-TINY_BITS` of the form's radius move into `r` when the
/// form has doubled since its last scan (their dependency no longer
/// matters; the range does not change).
const TINY_BITS: i64 = 24;

/// A value form (see the module docs).
#[derive(Clone, Debug)]
pub(crate) struct ValForm {
    /// A nonzero factor multiplying the center and the terms (1 when none
    /// is pending); its magnitude multiplies the radii.
    scale: Scale,
    center: Num,
    terms: TermMap<Num>,
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
    /// Term count at which the next scan for negligible terms happens.
    next_scan: usize,
}

fn term_moments(a: &Num, s: Symbol) -> (f64, f64) {
    let af = a.to_f64();
    (af * s.mean, af * af * s.var)
}

impl ValForm {
    /// The constant `c`.
    pub(crate) fn constant(c: Num) -> ValForm {
        ValForm {
            scale: Scale::one(),
            center: c,
            terms: TermMap::default(),
            rad: Num::ZERO,
            rem: Num::ZERO,
            mean: 0.0,
            var: 0.0,
            rem_mean: 0.0,
            rem_var: 0.0,
            next_scan: 64,
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

    /// The value, if it is a known number (no terms, no radius, an exact
    /// factor).
    pub(crate) fn point(&self) -> Option<Num> {
        (self.terms.is_empty() && self.rem.is_zero())
            .then(|| self.scale.point().map(|k| &self.center * k))
            .flatten()
    }

    /// An interval holding every value of the form.
    pub(crate) fn interval(&self, prec: u32) -> Interval {
        let r = self.rad.add_round(&self.rem, prec, Direction::Up);
        let inner = Interval::new(
            self.center.add_round(&-&r, prec, Direction::Down),
            self.center.add_round(&r, prec, Direction::Up),
        );
        let mut iv = self.scale.apply(&inner, prec);
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

    /// Replace the center by the low end of `p` (an enclosure of the new
    /// center), moving the width into the radius.
    fn set_center(&mut self, p: Interval, prec: u32) {
        let mut c = p.lo.clone();
        let mut w = p.width();
        if prec != u32::MAX && c.cost_bits() > u64::from(prec) {
            let r = c.round_out(prec, Direction::Down);
            w += &c - &r;
            c = r;
        }
        self.center = c;
        if !w.is_zero() {
            self.rem = self.rem.add_round(&w, prec, Direction::Up);
        }
    }

    /// Add `p` (an enclosure of a coefficient of symbol `k`) to the term of
    /// `k`, keeping the rounded low end and moving the rest into the
    /// radius.
    fn add_term(&mut self, k: usize, p: Interval, syms: &[Symbol], prec: u32) {
        let old = self.terms.remove(&k);
        if let Some(a) = self.combine(k, old, p, syms, prec) {
            self.terms.insert(k, a);
        }
    }

    /// The coefficient of symbol `k` after adding `p` (an enclosure) to
    /// `old` (already taken out of the map), `None` when it is zero; keeps
    /// the running sums and moves what rounding changed into the radius.
    fn combine(
        &mut self,
        k: usize,
        old: Option<Num>,
        p: Interval,
        syms: &[Symbol],
        prec: u32,
    ) -> Option<Num> {
        let mut a = p.lo.clone();
        let mut w = p.width();
        if let Some(o) = &old {
            let (m, v) = term_moments(o, syms[k]);
            self.mean -= m;
            self.var -= v;
            self.rad = self.rad.add_round(&-o.abs(), prec, Direction::Up);
            a += o;
        }
        if prec != u32::MAX && a.cost_bits() > u64::from(prec) {
            let r = a.round_out(prec, Direction::Down);
            w += &a - &r;
            a = r;
        }
        if !a.is_zero() {
            let (m, v) = term_moments(&a, syms[k]);
            self.mean += m;
            self.var += v;
            self.rad = self.rad.add_round(&a.abs(), prec, Direction::Up);
        }
        if !w.is_zero() {
            self.rem = self.rem.add_round(&w, prec, Direction::Up);
        }
        (!a.is_zero()).then_some(a)
    }

    /// Push the lazy scale into the center and the terms.
    fn materialize(&mut self, syms: &[Symbol], prec: u32) {
        if self.scale.is_one() {
            return;
        }
        let k = std::mem::replace(&mut self.scale, Scale::one());
        let kf = k.to_f64();
        let times = |x: &Num| k.apply(&Interval::point(x.clone()), prec);
        let old = std::mem::take(&mut self.terms);
        let c = times(&self.center);
        self.rad = Num::ZERO;
        self.rem = self.rem.mul_round(&k.max_abs(), prec, Direction::Up);
        self.mean = 0.0;
        self.var = 0.0;
        self.rem_mean *= kf;
        self.rem_var *= kf * kf;
        self.set_center(c, prec);
        for (s, a) in old {
            self.add_term(s, times(&a), syms, prec);
        }
    }

    /// Multiply by an exact number.
    pub(crate) fn scale_exact(&mut self, k: &Num, prec: u32) {
        if k.is_zero() {
            *self = ValForm::constant(Num::ZERO);
        } else if *k != Num::ONE {
            self.scale.times(k, prec);
        }
    }

    /// `self + (negate ? -1 : 1)·other`.
    pub(crate) fn merge(&mut self, other: &ValForm, negate: bool, syms: &[Symbol], prec: u32) {
        let mut factor = Factor::between(&other.scale, &self.scale, prec);
        if matches!(factor, Factor::Enclosed(_))
            && (self.terms.len() <= SMALL_FORM || prec == u32::MAX)
        {
            self.materialize(syms, prec);
            factor = Factor::between(&other.scale, &self.scale, prec);
        }
        if negate {
            factor = factor.neg();
        }
        let ff = factor.to_f64();
        let point = |x: &Num| factor.apply(&Interval::point(x.clone()), prec);
        let c = point(&other.center);
        let c = Interval::new(&c.lo + &self.center, &c.hi + &self.center);
        self.set_center(c, prec);
        if other.terms.len() > 32 && other.terms.len() * 4 >= self.terms.len() {
            // Similar sizes: one linear merge and a bulk rebuild.
            let old = std::mem::take(&mut self.terms);
            let mut out: Vec<(usize, Num)> = Vec::with_capacity(old.len() + other.terms.len());
            let mut mine = old.into_sorted().peekable();
            for (&k, b) in &other.terms {
                while let Some((j, _)) = mine.peek() {
                    if *j >= k {
                        break;
                    }
                    out.push(mine.next().expect("peeked"));
                }
                let prev = match mine.peek() {
                    Some((j, _)) if *j == k => mine.next().map(|(_, a)| a),
                    _ => None,
                };
                if let Some(a) = self.combine(k, prev, point(b), syms, prec) {
                    out.push((k, a));
                }
            }
            out.extend(mine);
            self.terms = TermMap::from_sorted(out);
        } else {
            for (&k, b) in &other.terms {
                self.add_term(k, point(b), syms, prec);
            }
        }
        if !other.rem.is_zero() {
            let r = other.rem.mul_round(&factor.max_abs(), prec, Direction::Up);
            self.rem = self.rem.add_round(&r, prec, Direction::Up);
        }
        self.rem_mean += other.rem_mean * ff;
        self.rem_var += other.rem_var * ff * ff;
        // Cancellation can leave the running moments slightly negative.
        self.var = self.var.max(0.0);
        self.scan(syms);
    }

    /// Move negligible terms into the radius when the form has doubled
    /// since the last scan (amortised `O(1)` per term).
    fn scan(&mut self, syms: &[Symbol]) {
        if self.terms.len() < self.next_scan {
            return;
        }
        let limit = (&self.rad + &self.rem).mul_pow2(-TINY_BITS);
        let gone: Vec<usize> = self
            .terms
            .iter()
            .filter(|(_, a)| a.abs() < limit)
            .map(|(k, _)| *k)
            .collect();
        self.fold(gone, syms);
        self.next_scan = (2 * self.terms.len()).max(64);
    }

    /// Move the terms `ids` into the radius.
    fn fold(&mut self, ids: Vec<usize>, syms: &[Symbol]) {
        for k in ids {
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

    /// Keep at most `max` terms: the smallest go into the radius.
    pub(crate) fn cap(&mut self, max: usize, syms: &[Symbol]) {
        if self.terms.len() <= max {
            return;
        }
        let mut keyed: Vec<(Num, usize)> = self.terms.iter().map(|(k, a)| (a.abs(), *k)).collect();
        keyed.sort_by(|a, b| b.0.cmp(&a.0));
        let gone = keyed.drain(max.div_ceil(2)..).map(|(_, k)| k).collect();
        self.fold(gone, syms);
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
        if let Some(k) = a.point() {
            b.scale_exact(&k, prec);
            return b;
        }
        if let Some(k) = b.point() {
            a.scale_exact(&k, prec);
            return a;
        }
        a.cap(max_terms, syms);
        b.cap(max_terms, syms);
        // (S_a·A)(S_b·B) = S_a·S_b·(A·B): the factors stay lazy.
        let mut scale = std::mem::replace(&mut a.scale, Scale::one());
        scale.times_scale(&b.scale, prec);
        let (ma, va) = (a.mean + a.rem_mean, a.var + a.rem_var);
        let (mb, vb) = (b.mean + b.rem_mean, b.var + b.rem_var);
        let (ca, cb) = (a.center.clone(), b.center.clone());
        let times = |x: &Num, k: &Num| Interval::point(x.clone()).scale_round(k, prec);
        let mut out = ValForm::constant(Num::ZERO);
        out.set_center(times(&ca, &cb), prec);
        // Linear part: c_a·B + c_b·A, merged over the sorted symbols.
        let mut shared_mean = 0.0;
        let mut ia = a.terms.iter().peekable();
        let mut ib = b.terms.iter().peekable();
        loop {
            let (k, p) = match (ia.peek(), ib.peek()) {
                (None, None) => break,
                (Some((ka, x)), Some((kb, y))) if ka == kb => {
                    let (k, x, y) = (**ka, *x, *y);
                    shared_mean += x.to_f64() * y.to_f64() * syms[k].var;
                    ia.next();
                    ib.next();
                    (k, times(x, &cb).add(&times(y, &ca)))
                }
                (Some((ka, x)), Some((kb, _))) if ka < kb => {
                    let (k, x) = (**ka, *x);
                    ia.next();
                    (k, times(x, &cb))
                }
                (Some((ka, x)), None) => {
                    let (k, x) = (**ka, *x);
                    ia.next();
                    (k, times(x, &cb))
                }
                (_, Some((kb, y))) => {
                    let (k, y) = (**kb, *y);
                    ib.next();
                    (k, times(y, &ca))
                }
            };
            out.add_term(k, p, syms, prec);
        }
        // The nonlinear part (A + r_a δ)(B + r_b δ) and the centers times
        // the other radius: |c_a|·r_b + |c_b|·r_a + R_a·R_b.
        let up = |x: &Num, y: &Num| x.mul_round(y, prec, Direction::Up);
        let ra = &a.rad + &a.rem;
        let rb = &b.rad + &b.rem;
        out.rem += up(&ca.abs(), &b.rem) + up(&cb.abs(), &a.rem) + up(&ra, &rb);
        tame(&mut out.rem, prec, Direction::Up);
        // E[AB] = E[A]E[B] plus the shared symbols' variances; the variance
        // as for independent parts.
        out.rem_mean = ma * mb + shared_mean;
        out.rem_var = va * vb + va * mb * mb + vb * ma * ma;
        out.scale = scale;
        out
    }
}
