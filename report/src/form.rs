//! The working affine form of the analysis: the same content as the public
//! [`Affine`], in a representation that keeps the cost of every node
//! independent of how many sources reach it.
//!
//! - A lazy point factor `scale` multiplies everything in the form, so a
//!   shift or a negation is one multiplication, not one per term.
//! - The exact interval of the form (`Σ coef·ε + rem`, before `scale`) is
//!   kept as a running sum: a merge adds and subtracts the end points of the
//!   terms it touches (interval sums are sums of end points, so this is
//!   exact).
//! - A form whose node has no later use is moved into its consumer, not
//!   copied; a merge inserts the smaller form into the larger one.
//! - `owners[s]` counts the working forms that hold a term of source `s`.
//!   Terms that no other form holds can be replaced by one internal source
//!   `η` ranging over the exact sum of their intervals (coefficient 1):
//!   the sum of independent terms ranges over exactly that interval, and
//!   `η` is tracked like any source afterwards (copies of the form that
//!   meet again still cancel it), so no bound changes. This is done for
//!   negligible terms (below `2^-TINY_BITS` of the form's total, so that
//!   the per-source attribution only loses what it would show as 0 %) when
//!   the form has doubled since its last scan, and for all of them when a
//!   form with more than `MATERIALIZE_KEEP` terms is multiplied by a
//!   signal's range. At the outputs internal sources are reported as part
//!   of the remainder.
//! - Copies (a node with several consumers) and multiplications by a signal
//!   of a form with more than `max_terms` terms first fold its smallest
//!   terms into one internal source (sound; looser only if a folded source
//!   also reaches the node along another path), so no single node costs
//!   more than `O(max_terms)` term operations.

use std::collections::BTreeMap;

use rug::Rational;

use crate::analysis::{Affine, Source, Term};
use crate::exact::Interval;

/// Terms below `2^-TINY_BITS` of the form's total are folded when their
/// source cannot come back (lossless for the bound).
const TINY_BITS: u32 = 24;
/// A product with a signal folds every term that cannot come back when the
/// form holds more than this many terms.
const MATERIALIZE_KEEP: usize = 32;
/// The lazy scale is pushed into the terms once its numerator or
/// denominator grows beyond this many bits (keeps the f64 moments finite).
const SCALE_BITS: u32 = 60;

#[derive(Clone, Debug)]
struct WTerm {
    /// Coefficient, before `scale`.
    coef: Interval,
    /// `coef × ε_s`, before `scale`.
    iv: Interval,
    gm: f64,
    gv: f64,
    /// Mean and variance of the term, before `scale`.
    m: f64,
    v: f64,
}

impl WTerm {
    fn new(coef: Interval, gm: f64, gv: f64, (eps, mean, var): (&Interval, f64, f64)) -> WTerm {
        let iv = coef.mul(eps);
        let (m, v) = moments_of(gm, gv, mean, var);
        WTerm {
            coef,
            iv,
            gm,
            gv,
            m,
            v,
        }
    }
}

/// Mean and variance of `g·ε` for independent `g` and `ε`.
pub(crate) fn moments(gm: f64, gv: f64, s: &Source) -> (f64, f64) {
    moments_of(gm, gv, s.mean, s.var)
}

fn moments_of(gm: f64, gv: f64, mean: f64, var: f64) -> (f64, f64) {
    let m = gm * mean;
    let v = (gv + gm * gm) * (var + mean * mean) - m * m;
    (m, v.max(0.0))
}

/// The ids of internal sources (made by folding) have this bit set; the
/// others are indices into the analysis' sources.
const SYNTH: usize = 1 << (usize::BITS - 1);

/// Bookkeeping shared by all working forms of one analysis: how many live
/// forms hold each source, and the internal sources made by folding.
pub(crate) struct Owners {
    count: Vec<u32>,
    /// Range, mean, variance and owner count of each internal source.
    synth: Vec<(Interval, f64, f64, u32)>,
}

impl Owners {
    pub(crate) fn new() -> Owners {
        Owners {
            count: Vec::new(),
            synth: Vec::new(),
        }
    }

    /// Register a new source (no form holds it yet).
    pub(crate) fn push(&mut self) {
        self.count.push(0);
    }

    fn count(&self, id: usize) -> u32 {
        if id & SYNTH == 0 {
            self.count[id]
        } else {
            self.synth[id & !SYNTH].3
        }
    }

    fn count_mut(&mut self, id: usize) -> &mut u32 {
        if id & SYNTH == 0 {
            &mut self.count[id]
        } else {
            &mut self.synth[id & !SYNTH].3
        }
    }

    /// Range, mean and variance of source `id`.
    fn source<'a>(&'a self, id: usize, sources: &'a [Source]) -> (&'a Interval, f64, f64) {
        if id & SYNTH == 0 {
            let s = &sources[id];
            (&s.eps, s.mean, s.var)
        } else {
            let (eps, m, v, _) = &self.synth[id & !SYNTH];
            (eps, *m, *v)
        }
    }
}

/// The working affine form (see the module docs).
#[derive(Debug)]
pub(crate) struct Form {
    scale: Rational,
    terms: BTreeMap<usize, WTerm>,
    rem: Interval,
    /// `Σ iv + rem`, before `scale`; ends kept apart because the running
    /// sum passes through values that are not ordered intervals.
    sum_lo: Rational,
    sum_hi: Rational,
    /// `Σ m`, `Σ v` of the terms, before `scale`.
    mean: f64,
    var: f64,
    rem_mean: f64,
    rem_var: f64,
    /// Term count at which the next scan for negligible terms happens.
    next_scan: usize,
}

impl Form {
    pub(crate) fn zero() -> Form {
        Form {
            scale: Rational::from(1),
            terms: BTreeMap::new(),
            rem: Interval::zero(),
            sum_lo: Rational::new(),
            sum_hi: Rational::new(),
            mean: 0.0,
            var: 0.0,
            rem_mean: 0.0,
            rem_var: 0.0,
            next_scan: 64,
        }
    }

    /// The form `1·ε_src`.
    pub(crate) fn source(src: usize, sources: &[Source], owners: &mut Owners) -> Form {
        let mut f = Form::zero();
        f.insert(
            src,
            Interval::point(Rational::from(1)),
            1.0,
            0.0,
            sources,
            owners,
        );
        owners.count[src] += 1;
        f
    }

    pub(crate) fn len(&self) -> usize {
        self.terms.len()
    }

    pub(crate) fn is_zero(&self) -> bool {
        self.terms.is_empty() && self.rem.is_zero()
    }

    fn insert(
        &mut self,
        src: usize,
        coef: Interval,
        gm: f64,
        gv: f64,
        sources: &[Source],
        owners: &Owners,
    ) {
        let t = WTerm::new(coef, gm, gv, owners.source(src, sources));
        self.add_term_sums(&t, true);
        self.terms.insert(src, t);
    }

    fn add_term_sums(&mut self, t: &WTerm, add: bool) {
        if add {
            self.sum_lo += &t.iv.lo;
            self.sum_hi += &t.iv.hi;
            self.mean += t.m;
            self.var += t.v;
        } else {
            self.sum_lo -= &t.iv.lo;
            self.sum_hi -= &t.iv.hi;
            self.mean -= t.m;
            self.var -= t.v;
        }
    }

    /// The exact interval of the form.
    pub(crate) fn interval(&self) -> Interval {
        if self.scale == 1 {
            return Interval::new(self.sum_lo.clone(), self.sum_hi.clone());
        }
        let a = Rational::from(&self.sum_lo * &self.scale);
        let b = Rational::from(&self.sum_hi * &self.scale);
        if self.scale.is_negative() {
            Interval::new(b, a)
        } else {
            Interval::new(a, b)
        }
    }

    /// Predicted mean and variance of the form.
    pub(crate) fn moments(&self) -> (f64, f64) {
        let k = self.scale.to_f64();
        (
            (self.mean + self.rem_mean) * k,
            ((self.var + self.rem_var) * k * k).max(0.0),
        )
    }

    /// Add `iv` (an interval holding whatever it stands for, already in this
    /// form's scaled units) with moments `(m, v)` to the remainder.
    pub(crate) fn add_rem(&mut self, iv: &Interval, m: f64, v: f64) {
        let inv = Rational::from(self.scale.recip_ref());
        let iv = if inv == 1 { iv.clone() } else { iv.scale(&inv) };
        let kf = inv.to_f64();
        self.sum_lo += &iv.lo;
        self.sum_hi += &iv.hi;
        self.rem = self.rem.add(&iv);
        self.rem_mean += m * kf;
        self.rem_var += v * kf * kf;
    }

    /// Push the lazy scale into the terms.
    fn materialize(&mut self) {
        if self.scale == 1 {
            return;
        }
        let k = std::mem::replace(&mut self.scale, Rational::from(1));
        let kf = k.to_f64();
        for t in self.terms.values_mut() {
            t.coef = t.coef.scale(&k);
            t.iv = t.iv.scale(&k);
            t.gm *= kf;
            t.gv *= kf * kf;
            t.m *= kf;
            t.v *= kf * kf;
        }
        self.rem = self.rem.scale(&k);
        let (lo, hi) = (
            Rational::from(&self.sum_lo * &k),
            Rational::from(&self.sum_hi * &k),
        );
        (self.sum_lo, self.sum_hi) = if k.is_negative() { (hi, lo) } else { (lo, hi) };
        self.mean *= kf;
        self.var *= kf * kf;
        self.rem_mean *= kf;
        self.rem_var *= kf * kf;
    }

    /// Multiply by an exact number.
    pub(crate) fn scale_exact(&mut self, k: &Rational, owners: &mut Owners) {
        if k.is_zero() {
            self.release(owners);
            *self = Form::zero();
            return;
        }
        self.scale *= k;
        if self.scale.numer().significant_bits() > SCALE_BITS
            || self.scale.denom().significant_bits() > SCALE_BITS
        {
            self.materialize();
        }
    }

    /// Multiply by a signal with range `v` and moments `(vm, vv)`: every
    /// coefficient is multiplied by the interval.
    pub(crate) fn scale_signal(
        &mut self,
        v: &Interval,
        vm: f64,
        vv: f64,
        max_terms: usize,
        sources: &[Source],
        owners: &mut Owners,
    ) {
        if v.lo == v.hi {
            self.scale_exact(&v.lo, owners);
            return;
        }
        if self.terms.len() > MATERIALIZE_KEEP {
            self.fold_where(owners, |_| true);
        }
        self.cap(max_terms, owners);
        self.materialize();
        let e2 = vv + vm * vm;
        let mom = |gm: f64, gv: f64| -> (f64, f64) {
            let m = vm * gm;
            (m, (e2 * (gv + gm * gm) - m * m).max(0.0))
        };
        let old = std::mem::take(&mut self.terms);
        let rem = self.rem.mul(v);
        let rem_mean = vm * self.rem_mean;
        let rem_var =
            (e2 * (self.rem_var + self.rem_mean * self.rem_mean) - rem_mean * rem_mean).max(0.0);
        let next_scan = self.next_scan;
        *self = Form::zero();
        self.next_scan = next_scan;
        self.rem = rem.clone();
        self.sum_lo = rem.lo;
        self.sum_hi = rem.hi;
        self.rem_mean = rem_mean;
        self.rem_var = rem_var;
        for (s, t) in old {
            let (gm, gv) = mom(t.gm, t.gv);
            self.insert(s, t.coef.mul(v), gm, gv, sources, owners);
        }
    }

    /// `self + (negate ? -1 : 1)·other`. `consumed` says whether `other`
    /// is dropped afterwards (its node has no later use) or stays alive.
    pub(crate) fn merge(
        &mut self,
        other: &Form,
        negate: bool,
        consumed: bool,
        sources: &[Source],
        owners: &mut Owners,
    ) {
        let mut factor = if other.scale == self.scale {
            Rational::from(1)
        } else {
            Rational::from(&other.scale / &self.scale)
        };
        if negate {
            factor = -factor;
        }
        let ff = factor.to_f64();
        for (&s, t) in &other.terms {
            let unit = factor == 1;
            let coef = if unit {
                t.coef.clone()
            } else {
                t.coef.scale(&factor)
            };
            let (gm, gv) = (t.gm * ff, t.gv * ff * ff);
            if let Some(old) = self.terms.remove(&s) {
                self.add_term_sums(&old, false);
                self.insert(
                    s,
                    old.coef.add(&coef),
                    old.gm + gm,
                    old.gv + gv,
                    sources,
                    owners,
                );
                if consumed {
                    *owners.count_mut(s) -= 1;
                }
            } else {
                // A point factor scales `coef × ε` exactly: no new product.
                let nt = WTerm {
                    coef,
                    iv: if unit {
                        t.iv.clone()
                    } else {
                        t.iv.scale(&factor)
                    },
                    gm,
                    gv,
                    m: t.m * ff,
                    v: t.v * ff * ff,
                };
                self.add_term_sums(&nt, true);
                self.terms.insert(s, nt);
                if !consumed {
                    *owners.count_mut(s) += 1;
                }
            }
        }
        if !other.rem.is_zero() {
            let r = other.rem.scale(&factor);
            self.sum_lo += &r.lo;
            self.sum_hi += &r.hi;
            self.rem = self.rem.add(&r);
        }
        self.rem_mean += other.rem_mean * ff;
        self.rem_var += other.rem_var * ff * ff;
        self.scan(owners);
    }

    /// Fold the negligible terms whose source no other form holds, when the
    /// form has doubled since the last scan (amortised `O(1)` per term).
    fn scan(&mut self, owners: &mut Owners) {
        if self.terms.len() < self.next_scan {
            return;
        }
        let total =
            Rational::from(self.sum_lo.abs_ref()).max(Rational::from(self.sum_hi.abs_ref()));
        let limit = total >> TINY_BITS;
        self.fold_where(owners, |t| t.iv.max_abs() < limit);
        self.next_scan = (2 * self.terms.len()).max(64);
    }

    /// Fold every term whose source no other form holds and that `pick`
    /// selects.
    fn fold_where(&mut self, owners: &mut Owners, pick: impl Fn(&WTerm) -> bool) {
        let gone: Vec<usize> = self
            .terms
            .iter()
            .filter(|(s, t)| owners.count(**s) == 1 && pick(t))
            .map(|(s, _)| *s)
            .collect();
        self.fold(gone, owners);
    }

    /// Replace the terms `ids` by one internal source `η` with coefficient
    /// 1, ranging over the exact sum of their intervals: the running sums
    /// and moments do not change, and `η` is tracked like any source, so a
    /// copy of this form that meets another one later still cancels it.
    /// Exact for terms no other form holds (the sum of independent terms
    /// ranges over exactly the sum of their intervals); for the others it
    /// forgets their correlation with those forms (sound, possibly looser).
    fn fold(&mut self, ids: Vec<usize>, owners: &mut Owners) {
        if ids.len() < 2 {
            return;
        }
        let (mut lo, mut hi, mut m, mut v) = (Rational::new(), Rational::new(), 0.0, 0.0);
        for id in ids {
            let t = self.terms.remove(&id).expect("term present");
            lo += &t.iv.lo;
            hi += &t.iv.hi;
            m += t.m;
            v += t.v;
            *owners.count_mut(id) -= 1;
        }
        let iv = Interval::new(lo, hi);
        let id = SYNTH | owners.synth.len();
        owners.synth.push((iv.clone(), m, v, 1));
        self.terms.insert(
            id,
            WTerm {
                coef: Interval::point(Rational::from(1)),
                iv,
                gm: 1.0,
                gv: 0.0,
                m,
                v,
            },
        );
    }

    /// Keep at most `max` terms: fold the smallest into one internal source
    /// (sound; looser if a folded source reaches a node again along another
    /// path).
    pub(crate) fn cap(&mut self, max: usize, owners: &mut Owners) {
        if self.terms.len() <= max {
            return;
        }
        let mut keyed: Vec<(Rational, usize)> = self
            .terms
            .iter()
            .map(|(s, t)| (t.iv.max_abs(), *s))
            .collect();
        keyed.sort_by(|a, b| b.0.cmp(&a.0));
        let gone = keyed.drain(max.div_ceil(2)..).map(|(_, s)| s).collect();
        self.fold(gone, owners);
    }

    /// A copy for a second consumer: every source it holds gains an owner.
    pub(crate) fn copy(&mut self, max: usize, owners: &mut Owners) -> Form {
        self.cap(max, owners);
        for s in self.terms.keys() {
            *owners.count_mut(*s) += 1;
        }
        Form {
            scale: self.scale.clone(),
            terms: self.terms.clone(),
            rem: self.rem.clone(),
            sum_lo: self.sum_lo.clone(),
            sum_hi: self.sum_hi.clone(),
            mean: self.mean,
            var: self.var,
            rem_mean: self.rem_mean,
            rem_var: self.rem_var,
            next_scan: self.next_scan,
        }
    }

    /// The form is dropped: its sources lose an owner.
    pub(crate) fn release(&self, owners: &mut Owners) {
        for s in self.terms.keys() {
            *owners.count_mut(*s) -= 1;
        }
    }

    /// The public form (coefficients with the scale applied; internal
    /// sources go to the remainder).
    pub(crate) fn to_affine(&self) -> Affine {
        let k = &self.scale;
        let kf = k.to_f64();
        let mut rem = self.rem.clone();
        let (mut rem_mean, mut rem_var) = (self.rem_mean, self.rem_var);
        let mut terms = Vec::new();
        for (s, t) in &self.terms {
            if s & SYNTH == 0 {
                terms.push(Term {
                    src: *s,
                    coef: t.coef.scale(k),
                    gm: t.gm * kf,
                    gv: t.gv * kf * kf,
                });
            } else {
                rem = rem.add(&t.iv);
                rem_mean += t.m;
                rem_var += t.v;
            }
        }
        Affine {
            terms,
            rem: rem.scale(k),
            rem_mean: rem_mean * kf,
            rem_var: rem_var * kf * kf,
        }
    }
}
