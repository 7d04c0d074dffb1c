//! Error forms: the error of a node as an affine form in the error sources,
//!
//! ```text
//! e = Σ_s  g_s · ε_s  +  r
//! ```
//!
//! (public: [`Source`], [`Term`], [`Affine`]), and the working form of the
//! analysis ([`Form`], crate-private), which holds the same content in a
//! representation that keeps the cost of every node independent of how
//! many sources reach it:
//!
//! - A lazy factor `scale` ([`super::scale`]) multiplies everything in the
//!   form, so a shift, a negation, a product with a constant or with a
//!   signal's range touches one number, not every term. A merge whose
//!   factor between the two scales is not exact either pushes a small
//!   form's scale into its terms, or multiplies the smaller form's terms by
//!   an outward-rounded enclosure of the factor, so an unrolled recursion
//!   `y = c·y + x` costs the same at every step.
//! - The interval of the form (`Σ coef·ε + rem`, before `scale`) is kept as
//!   a running sum: a merge adds and subtracts the end points of the terms
//!   it touches (interval sums are sums of end points). Each update rounds
//!   the lower sum down and the upper sum up when the exact value would
//!   pass the analysis' precision, so the running sum always encloses the
//!   exact one.
//! - A form whose node has no later use is moved into its consumer, not
//!   copied; a merge inserts the smaller form into the larger one.
//! - `owners[s]` counts the working forms that hold a term of source `s`.
//!   Terms that no other form holds can be replaced by one internal source
//!   `η` ranging over the sum of their intervals (coefficient 1): the sum of
//!   independent terms ranges over exactly that interval, and `η` is
//!   tracked like any source afterwards (copies of the form that meet again
//!   still cancel it), so no bound changes. This is done for negligible
//!   terms (below `2^-TINY_BITS` of the form's total, so that the
//!   per-source attribution only loses what it would show as 0 %) when the
//!   form has doubled since its last scan, and for all of them when a form
//!   with more than `MATERIALIZE_KEEP` terms is multiplied by a signal's
//!   range. At the outputs internal sources are reported as part of the
//!   remainder.
//! - Copies (a node with several consumers) and multiplications by a signal
//!   of a form with more than `max_terms` terms first fold its smallest
//!   terms into one internal source (sound; looser only if a folded source
//!   also reaches the node along another path), so no single node costs
//!   more than `O(max_terms)` term operations.

use super::scale::{Factor, Scale};
use super::terms::TermMap;
use crate::arith::{Direction, Interval, Num, decimal_text};
use crate::model::{Datapath, InputKind, NodeId, Op};

/// The kind of an error source.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum SourceKind {
    /// The rounding of a rescale.
    Rounding,
    /// A constant's quantization (a known number).
    Constant,
    /// A real input's quantization.
    InputQuantization,
    /// Saturation at a node (clamping).
    Saturation,
    /// Wrap-around at a node.
    Wrap,
}

/// One error source: where an error enters the datapath.
#[derive(Clone, Debug)]
pub struct Source {
    /// The node where it enters.
    pub node: NodeId,
    /// Its kind.
    pub kind: SourceKind,
    /// An interval holding every error it can add.
    pub eps: Interval,
    /// Mean (noise model).
    pub mean: f64,
    /// Variance (noise model).
    pub var: f64,
}

impl Source {
    /// A label for people (`rounding at acc (nearest-even, 15 bits
    /// dropped)`), made from the node where the source enters.
    #[must_use]
    pub fn label(&self, path: &Datapath) -> String {
        let nd = path.node(self.node);
        let name = path.label(self.node);
        let f = nd.format;
        match (&nd.op, self.kind) {
            (
                Op::Input {
                    kind: InputKind::Quantized(m),
                    ..
                },
                SourceKind::InputQuantization,
            ) => {
                format!("quantization of input {name} ({} into {f})", m.name())
            }
            (Op::Input { .. }, _) => format!("saturation of input {name}"),
            (Op::Const { value, .. }, _) => {
                format!("constant {name} = {} in {f}", decimal_text(value))
            }
            (
                Op::Rescale {
                    src,
                    rounding,
                    overflow,
                },
                kind,
            ) => match kind {
                SourceKind::Rounding => format!(
                    "rounding at {name} ({}, {} bits dropped)",
                    rounding.name(),
                    path.node(*src)
                        .format
                        .frac_bits()
                        .saturating_sub(f.frac_bits())
                ),
                SourceKind::Wrap => format!("wrap-around at {name} ({})", overflow.name()),
                _ => format!("saturation at {name} ({})", overflow.name()),
            },
            _ => format!("error at {name}"),
        }
    }
}

/// One term `g · ε_s` of an affine form.
#[derive(Clone, Debug)]
pub struct Term {
    /// Source index.
    pub src: usize,
    /// Coefficient interval.
    pub coef: Interval,
    /// Mean of the coefficient (noise model).
    pub gm: f64,
    /// Variance of the coefficient (noise model).
    pub gv: f64,
}

/// An error as an affine form in the sources plus a remainder interval.
#[derive(Clone, Debug)]
pub struct Affine {
    /// Terms, sorted by source index.
    pub terms: Vec<Term>,
    /// Remainder interval.
    pub rem: Interval,
    /// Remainder mean (noise model).
    pub rem_mean: f64,
    /// Remainder variance (noise model).
    pub rem_var: f64,
}

impl Affine {
    /// An interval holding every value of the form.
    #[must_use]
    pub fn interval(&self, sources: &[Source]) -> Interval {
        let mut acc = self.rem.clone();
        for t in &self.terms {
            acc = acc.add(&term_interval(t, sources));
        }
        acc
    }

    /// Predicted mean and variance of the form.
    #[must_use]
    pub fn moments(&self, sources: &[Source]) -> (f64, f64) {
        let mut mean = self.rem_mean;
        let mut var = self.rem_var;
        for t in &self.terms {
            let (m, v) = moments(t.gm, t.gv, &sources[t.src]);
            mean += m;
            var += v;
        }
        (mean, var)
    }
}

/// The interval `coef × ε_s` of one term.
#[must_use]
pub fn term_interval(t: &Term, sources: &[Source]) -> Interval {
    t.coef.mul(&sources[t.src].eps)
}

/// Terms below `2^-TINY_BITS` of the form's total are folded when their
/// source cannot come back (lossless for the bound).
const TINY_BITS: i64 = 24;
/// A product with a signal folds every term that cannot come back when the
/// form holds more than this many terms.
const MATERIALIZE_KEEP: usize = 32;
/// A form with at most this many terms pushes its scale into the terms
/// rather than merge with an inexact factor.
pub(crate) const SMALL_FORM: usize = 16;

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

/// Mean and variance of `g·ε` for independent `g` and `ε`:
/// `E[gε] = E[g]E[ε]`, `Var = E[g²]E[ε²] - (E[g]E[ε])²`.
#[must_use]
pub fn moments(gm: f64, gv: f64, s: &Source) -> (f64, f64) {
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
/// forms hold each source, the internal sources made by folding, and the
/// precision of the interval ends.
pub(crate) struct Owners {
    count: Vec<u32>,
    /// Range, mean, variance and owner count of each internal source.
    synth: Vec<(Interval, f64, f64, u32)>,
    /// Significant bits kept at an interval end that costs more.
    pub(crate) prec: u32,
}

impl Owners {
    pub(crate) fn new(prec: u32) -> Owners {
        Owners {
            count: Vec::new(),
            synth: Vec::new(),
            prec,
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

/// Round `x` toward `dir` if it costs more than `prec` bits.
pub(crate) fn tame(x: &mut Num, prec: u32, dir: Direction) {
    if prec != u32::MAX && x.cost_bits() > u64::from(prec) {
        *x = x.round_out(prec, dir);
    }
}

/// The working affine form (see the module docs).
#[derive(Debug)]
pub(crate) struct Form {
    /// A nonzero factor multiplying everything (1 when none is pending).
    scale: Scale,
    terms: TermMap<WTerm>,
    rem: Interval,
    /// `Σ iv + rem`, before `scale`; ends kept apart because the running
    /// sum passes through values that are not ordered intervals.
    sum_lo: Num,
    sum_hi: Num,
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
            scale: Scale::one(),
            terms: TermMap::default(),
            rem: Interval::zero(),
            sum_lo: Num::ZERO,
            sum_hi: Num::ZERO,
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
        f.insert(src, Interval::point(Num::ONE), 1.0, 0.0, sources, owners);
        owners.count[src] += 1;
        f
    }

    pub(crate) fn len(&self) -> usize {
        self.terms.len()
    }

    pub(crate) fn is_zero(&self) -> bool {
        self.terms.is_empty() && self.rem.is_zero()
    }

    fn new_term(
        coef: Interval,
        gm: f64,
        gv: f64,
        (eps, mean, var): (&Interval, f64, f64),
        prec: u32,
    ) -> WTerm {
        let mut iv = coef.mul_round(eps, prec);
        iv.round_costly(prec);
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

    fn insert(
        &mut self,
        src: usize,
        coef: Interval,
        gm: f64,
        gv: f64,
        sources: &[Source],
        owners: &Owners,
    ) {
        let t = Form::new_term(coef, gm, gv, owners.source(src, sources), owners.prec);
        self.add_term_sums(&t, true, owners.prec);
        self.terms.insert(src, t);
    }

    fn add_sums(&mut self, lo: &Num, hi: &Num, add: bool, prec: u32) {
        if add {
            self.sum_lo = self.sum_lo.add_round(lo, prec, Direction::Down);
            self.sum_hi = self.sum_hi.add_round(hi, prec, Direction::Up);
        } else {
            self.sum_lo = self.sum_lo.add_round(&-lo, prec, Direction::Down);
            self.sum_hi = self.sum_hi.add_round(&-hi, prec, Direction::Up);
        }
    }

    fn add_term_sums(&mut self, t: &WTerm, add: bool, prec: u32) {
        self.add_sums(&t.iv.lo, &t.iv.hi, add, prec);
        if add {
            self.mean += t.m;
            self.var += t.v;
        } else {
            self.mean -= t.m;
            self.var -= t.v;
        }
    }

    /// Recompute the running sums from the stored terms, rounding each
    /// partial sum outward: the sums then enclose exactly what removing a
    /// stored term later subtracts.
    fn resum(&mut self, prec: u32) {
        let (mut lo, mut hi) = (self.rem.lo.clone(), self.rem.hi.clone());
        for (_, t) in self.terms.iter() {
            lo = lo.add_round(&t.iv.lo, prec, Direction::Down);
            hi = hi.add_round(&t.iv.hi, prec, Direction::Up);
        }
        (self.sum_lo, self.sum_hi) = (lo, hi);
    }

    /// An interval holding every value of the form.
    pub(crate) fn interval(&self, prec: u32) -> Interval {
        let sums = Interval::new(self.sum_lo.clone(), self.sum_hi.clone());
        let mut r = self.scale.apply(&sums, prec);
        r.round_costly(prec);
        r
    }

    /// Predicted mean and variance of the form.
    pub(crate) fn moments(&self) -> (f64, f64) {
        let k = self.scale.to_f64();
        (
            (self.mean + self.rem_mean) * k,
            ((self.var + self.rem_var) * k * k).max(0.0),
        )
    }

    /// Add `iv` (an interval holding whatever it stands for, in this form's
    /// scaled units) with moments `(m, v)` to the remainder.
    pub(crate) fn add_rem(&mut self, iv: &Interval, m: f64, v: f64, prec: u32) {
        let mut iv = self.scale.unapply(iv, prec);
        iv.round_costly(prec);
        let kf = 1.0 / self.scale.to_f64();
        self.add_sums(&iv.lo, &iv.hi, true, prec);
        self.rem = self.rem.add_round(&iv, prec);
        self.rem_mean += m * kf;
        self.rem_var += v * kf * kf;
    }

    /// Push the lazy scale into the terms.
    fn materialize(&mut self, prec: u32) {
        if self.scale.is_one() {
            return;
        }
        let k = std::mem::replace(&mut self.scale, Scale::one());
        let kf = k.to_f64();
        self.terms.for_each_mut(|t| {
            t.coef = k.apply(&t.coef, prec);
            t.iv = k.apply(&t.iv, prec);
            t.gm *= kf;
            t.gv *= kf * kf;
            t.m *= kf;
            t.v *= kf * kf;
        });
        self.rem = k.apply(&self.rem, prec);
        self.resum(prec);
        self.mean *= kf;
        self.var *= kf * kf;
        self.rem_mean *= kf;
        self.rem_var *= kf * kf;
    }

    /// Multiply by an exact number.
    pub(crate) fn scale_exact(&mut self, k: &Num, owners: &mut Owners) {
        if k.is_zero() {
            self.release(owners);
            *self = Form::zero();
            return;
        }
        if *k != Num::ONE {
            self.scale.times(k, owners.prec);
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
        if v.is_point() {
            self.scale_exact(&v.lo, owners);
            return;
        }
        if self.terms.len() > MATERIALIZE_KEEP {
            self.fold_where(owners, |_| true);
        }
        self.cap(max_terms, owners);
        // The lazy scale stays: scale·(coef·v) = (scale·coef)·v.
        let prec = owners.prec;
        let e2 = vv + vm * vm;
        let mom = |gm: f64, gv: f64| -> (f64, f64) {
            let m = vm * gm;
            (m, (e2 * (gv + gm * gm) - m * m).max(0.0))
        };
        let old = std::mem::take(&mut self.terms);
        let mut rem = self.rem.mul_round(v, prec);
        rem.round_costly(prec);
        let rem_mean = vm * self.rem_mean;
        let rem_var =
            (e2 * (self.rem_var + self.rem_mean * self.rem_mean) - rem_mean * rem_mean).max(0.0);
        let next_scan = self.next_scan;
        let scale = std::mem::replace(&mut self.scale, Scale::one());
        *self = Form::zero();
        self.next_scan = next_scan;
        self.scale = scale;
        self.rem = rem.clone();
        self.sum_lo = rem.lo;
        self.sum_hi = rem.hi;
        self.rem_mean = rem_mean;
        self.rem_var = rem_var;
        for (s, t) in old {
            let (gm, gv) = mom(t.gm, t.gv);
            let mut c = t.coef.mul_round(v, prec);
            c.round_costly(prec);
            self.insert(s, c, gm, gv, sources, owners);
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
        let prec = owners.prec;
        // other's terms in self's units: exact when the ratio of the
        // scales is, else a small self takes its scale into its terms, and
        // a large one takes other's terms times an enclosure of the ratio.
        let mut factor = Factor::between(&other.scale, &self.scale, prec);
        if matches!(factor, Factor::Enclosed(_))
            && (self.terms.len() <= SMALL_FORM || prec == u32::MAX)
        {
            self.materialize(prec);
            factor = Factor::between(&other.scale, &self.scale, prec);
        }
        if negate {
            factor = factor.neg();
        }
        let ff = factor.to_f64();
        if other.terms.len() > 32 && other.terms.len() * 4 >= self.terms.len() {
            // Similar sizes: one linear merge of the two sorted term lists
            // and a bulk rebuild, instead of one tree insertion per term.
            let old = std::mem::take(&mut self.terms);
            let mut out: Vec<(usize, WTerm)> = Vec::with_capacity(old.len() + other.terms.len());
            let mut mine = old.into_sorted().peekable();
            for (&s, t) in &other.terms {
                while let Some((k, _)) = mine.peek() {
                    if *k >= s {
                        break;
                    }
                    out.push(mine.next().expect("peeked"));
                }
                let prev = match mine.peek() {
                    Some((k, _)) if *k == s => mine.next().map(|(_, w)| w),
                    _ => None,
                };
                let nt = self.combine(s, prev, t, &factor, ff, consumed, sources, owners);
                out.push((s, nt));
            }
            out.extend(mine);
            self.terms = TermMap::from_sorted(out);
        } else {
            for (&s, t) in &other.terms {
                let prev = self.terms.remove(&s);
                let nt = self.combine(s, prev, t, &factor, ff, consumed, sources, owners);
                self.terms.insert(s, nt);
            }
        }
        if !other.rem.is_zero() {
            let r = factor.apply(&other.rem, prec);
            self.add_sums(&r.lo, &r.hi, true, prec);
            self.rem = self.rem.add_round(&r, prec);
        }
        self.rem_mean += other.rem_mean * ff;
        self.rem_var += other.rem_var * ff * ff;
        self.scan(owners);
    }

    /// The term of source `s` after adding `t` (a term of another form,
    /// brought into this form's units by `factor`) to `prev` (this form's
    /// term of `s`, already taken out of the map); keeps the running sums
    /// and the owner counts.
    #[allow(clippy::too_many_arguments)]
    fn combine(
        &mut self,
        s: usize,
        prev: Option<WTerm>,
        t: &WTerm,
        factor: &Factor,
        ff: f64,
        consumed: bool,
        sources: &[Source],
        owners: &mut Owners,
    ) -> WTerm {
        let prec = owners.prec;
        let coef = factor.apply(&t.coef, prec);
        let (gm, gv) = (t.gm * ff, t.gv * ff * ff);
        if let Some(old) = prev {
            self.add_term_sums(&old, false, prec);
            let c = old.coef.add_round(&coef, prec);
            let nt = Form::new_term(c, old.gm + gm, old.gv + gv, owners.source(s, sources), prec);
            self.add_term_sums(&nt, true, prec);
            if consumed {
                *owners.count_mut(s) -= 1;
            }
            nt
        } else {
            let iv = match factor {
                // A point factor scales `coef × ε` exactly: no new product.
                Factor::One | Factor::Exact(_) => factor.apply(&t.iv, prec),
                Factor::Enclosed(_) => coef.mul_round(owners.source(s, sources).0, prec),
            };
            let nt = WTerm {
                coef,
                iv,
                gm,
                gv,
                m: t.m * ff,
                v: t.v * ff * ff,
            };
            self.add_term_sums(&nt, true, prec);
            if !consumed {
                *owners.count_mut(s) += 1;
            }
            nt
        }
    }

    /// Fold the negligible terms whose source no other form holds, when the
    /// form has doubled since the last scan (amortised `O(1)` per term).
    fn scan(&mut self, owners: &mut Owners) {
        if self.terms.len() < self.next_scan {
            return;
        }
        let total = self.sum_lo.abs().max(self.sum_hi.abs());
        let limit = total.mul_pow2(-TINY_BITS);
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
    /// 1, ranging over the sum of their intervals: the running sums and
    /// moments do not change, and `η` is tracked like any source, so a copy
    /// of this form that meets another one later still cancels it. Exact
    /// for terms no other form holds (the sum of independent terms ranges
    /// over exactly the sum of their intervals); for the others it forgets
    /// their correlation with those forms (sound, possibly looser).
    fn fold(&mut self, ids: Vec<usize>, owners: &mut Owners) {
        if ids.len() < 2 {
            return;
        }
        let prec = owners.prec;
        let (mut lo, mut hi, mut m, mut v) = (Num::ZERO, Num::ZERO, 0.0, 0.0);
        for id in ids {
            let t = self.terms.remove(&id).expect("term present");
            lo = lo.add_round(&t.iv.lo, prec, Direction::Down);
            hi = hi.add_round(&t.iv.hi, prec, Direction::Up);
            m += t.m;
            v += t.v;
            *owners.count_mut(id) -= 1;
        }
        let iv = Interval::new(lo, hi);
        let id = SYNTH | owners.synth.len();
        let rounded = prec != u32::MAX;
        owners.synth.push((iv.clone(), m, v, 1));
        self.terms.insert(
            id,
            WTerm {
                coef: Interval::point(Num::ONE),
                iv,
                gm: 1.0,
                gv: 0.0,
                m,
                v,
            },
        );
        if rounded {
            self.resum(prec);
        }
    }

    /// Keep at most `max` terms: fold the smallest into one internal source
    /// (sound; looser if a folded source reaches a node again along another
    /// path).
    pub(crate) fn cap(&mut self, max: usize, owners: &mut Owners) {
        if self.terms.len() <= max {
            return;
        }
        let mut keyed: Vec<(Num, usize)> = self
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
    pub(crate) fn to_affine(&self, prec: u32) -> Affine {
        let k = &self.scale;
        let kf = k.to_f64();
        let mut rem = self.rem.clone();
        let (mut rem_mean, mut rem_var) = (self.rem_mean, self.rem_var);
        let mut terms = Vec::new();
        for (s, t) in &self.terms {
            if s & SYNTH == 0 {
                terms.push(Term {
                    src: *s,
                    coef: k.apply(&t.coef, prec),
                    gm: t.gm * kf,
                    gv: t.gv * kf * kf,
                });
            } else {
                rem = rem.add(&t.iv);
                rem.round_costly(prec);
                rem_mean += t.m;
                rem_var += t.v;
            }
        }
        Affine {
            terms,
            rem: k.apply(&rem, prec),
            rem_mean: rem_mean * kf,
            rem_var: rem_var * kf * kf,
        }
    }
}
