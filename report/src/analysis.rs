//! The static analysis: ranges, overflow verdicts, sound worst-case error
//! bounds (exact rationals, affine forms) and the quantization-noise model
//! (f64 statistics), for every node of a [`Datapath`].
//!
//! # Error model
//!
//! For node `n` with ideal value `v` (exact real arithmetic on the exact
//! inputs and the exact decimal constants) and actual value `ṽ` (bit-exact
//! fixed point), the error is `e = ṽ - v`. It is kept as an *affine form*
//!
//! ```text
//! e = Σ_s  g_s · ε_s  +  r
//! ```
//!
//! where each `ε_s` is the error one source adds where it enters (a
//! rounding, a constant's quantization, an input's quantization, a
//! saturation), known to lie in an exact interval, `g_s` is the
//! coefficient with which it reaches `n` (an exact interval: a point for
//! linear datapaths, the operand's range after a multiply), and `r` an
//! interval for what does not fit the form (products of two errors, folded
//! small terms). Keeping each source apart makes a sum of many terms tight:
//! every source is bounded once, by its own worst case, instead of being
//! widened at every node it passes.
//!
//! Propagation: `a ± b` adds the forms; `-a` and `a·2^k` scale by a
//! point; `a·b` gives `e = v_a·e_b + v_b·e_a + e_a·e_b`: the terms of `e_b`
//! are scaled by the interval of `v_a` (and the other way round), and
//! `e_a·e_b` is bounded by the product of the two error intervals into `r`.
//! A rescale adds its rounding source; a node that can saturate adds a
//! saturation source `σ = clamp(u) - u`; a node that can wrap adds a wrap
//! source.
//!
//! The forms are built in the private `form` module's representation (lazy constant
//! factor, running exact sums, moved rather than copied, negligible terms
//! of sources that no other form holds folded into the remainder), so that
//! every node costs the same however many sources reach it.
//!
//! The reported bound of a node is the intersection of three sound
//! intervals: the affine form evaluated, `actual range - ideal range`, and
//! (after saturation) `[min(E.lo, max - v.hi), max(E.hi, min - v.lo)]`.
//!
//! # Noise model
//!
//! Each source is an independent random variable with the mean and
//! variance derived in [`rounding_moments`]; inputs are independent and
//! uniform over their ranges; coefficient and signal moments propagate
//! with the same rules, assuming independent operands. Saturation and wrap
//! are outside the model (their moments are taken as 0).

use std::collections::HashMap;
use std::rc::Rc;

use qbound::{Format, Overflow, Rounding};
use rug::Rational;

use crate::exact::{Interval, ceil_to_grid, floor_to_grid, format_range, pow2, round_to_grid, ulp};
use crate::form::{Form, Owners};
use crate::model::{Datapath, InputKind, NodeId, Op};
use crate::result::SourceKind;

/// Knobs of the analysis.
#[derive(Clone, Debug)]
pub struct AnalysisOptions {
    /// The most terms a form may hold when it has to be copied (a node
    /// with several consumers) or multiplied term by term by a signal's
    /// range; beyond that its smallest terms are folded into one internal
    /// source, reported as remainder (still sound, possibly looser). Forms
    /// that are only moved, added and scaled by constants are never capped:
    /// a long accumulation keeps every source. This keeps the cost of every
    /// node bounded, so the analysis is linear in the number of nodes.
    pub max_terms: usize,
}

impl Default for AnalysisOptions {
    fn default() -> AnalysisOptions {
        AnalysisOptions { max_terms: 256 }
    }
}

/// One error source: where an error enters the datapath.
#[derive(Clone, Debug)]
pub struct Source {
    /// The node where it enters.
    pub node: NodeId,
    /// Its kind.
    pub kind: SourceKind,
    /// The exact interval of the error it adds.
    pub eps: Interval,
    /// Mean (noise model).
    pub mean: f64,
    /// Variance (noise model).
    pub var: f64,
    /// A label for people.
    pub label: String,
}

/// One term `g · ε_s` of an affine form.
#[derive(Clone, Debug)]
pub struct Term {
    /// Source index.
    pub src: usize,
    /// Exact coefficient interval.
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
    /// The exact interval of the form.
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
            let (m, v) = term_moments(t, &sources[t.src]);
            mean += m;
            var += v;
        }
        (mean, var)
    }
}

/// The exact interval `coef × ε_s` of one term.
#[must_use]
pub fn term_interval(t: &Term, sources: &[Source]) -> Interval {
    t.coef.mul(&sources[t.src].eps)
}

/// Mean and variance of `g·ε` for independent `g` and `ε`:
/// `E[gε] = E[g]E[ε]`, `Var = E[g²]E[ε²] - (E[g]E[ε])²`.
fn term_moments(t: &Term, s: &Source) -> (f64, f64) {
    crate::form::moments(t.gm, t.gv, s)
}

/// The sign of the values being rounded, when the range tells it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Sign {
    /// All values `>= 0`.
    NonNegative,
    /// All values `<= 0`.
    NonPositive,
    /// Either.
    Both,
}

impl Sign {
    fn of(r: &Interval) -> Sign {
        if !r.lo.is_negative() {
            Sign::NonNegative
        } else if !r.hi.is_positive() {
            Sign::NonPositive
        } else {
            Sign::Both
        }
    }
}

/// The exact interval of the error `round(x) - x` when `x` lies on a grid of
/// step `q0` (use `q0 = 0` for a real-valued `x`) and is rounded to a grid
/// of step `q = 2^k·q0`, `k >= 1`.
///
/// The discarded residue `r = x - floor(x)` takes the values
/// `0, q0, …, q - q0`. Per mode (the derivation is the case analysis of
/// `Rounding::rounds_up` over those residues):
/// - floor: `-r`, so `[-(q - q0), 0]`; ceil: `q - r` or 0, so `[0, q - q0]`;
/// - toward zero / away from zero: floor for one sign, ceil for the other;
/// - nearest, ties up: `-r` for `r < q/2`, `q - r` for `r >= q/2`:
///   `[-(q/2 - q0), q/2]`; ties away: the same for `x >= 0`, mirrored for
///   `x <= 0`; ties to even: `[-q/2, q/2]` (a tie can go either way);
/// - to odd and stochastic: either neighbour, so `[-(q - q0), q - q0]`.
#[must_use]
pub fn rounding_interval(mode: Rounding, q0: &Rational, q: &Rational, sign: Sign) -> Interval {
    let full = Rational::from(q - q0);
    let half = Rational::from(q / 2u32);
    let half_in = Rational::from(&half - q0);
    let zero = Rational::new();
    let down = || Interval::new(Rational::from(-&full), zero.clone());
    let up = || Interval::new(zero.clone(), full.clone());
    let both = || Interval::new(Rational::from(-&full), full.clone());
    match (mode, sign) {
        (Rounding::Floor, _)
        | (Rounding::TowardZero, Sign::NonNegative)
        | (Rounding::AwayFromZero, Sign::NonPositive) => down(),
        (Rounding::Ceil, _)
        | (Rounding::TowardZero, Sign::NonPositive)
        | (Rounding::AwayFromZero, Sign::NonNegative) => up(),
        (
            Rounding::TowardZero
            | Rounding::AwayFromZero
            | Rounding::ToOdd
            | Rounding::Stochastic(_),
            _,
        ) => both(),
        (Rounding::NearestTiesUp, _) | (Rounding::NearestTiesAway, Sign::NonNegative) => {
            Interval::new(Rational::from(-&half_in), half)
        }
        (Rounding::NearestTiesAway, Sign::NonPositive) => {
            Interval::new(Rational::from(-&half), half_in)
        }
        (Rounding::NearestTiesAway | Rounding::NearestTiesEven, _) => {
            Interval::new(Rational::from(-&half), half)
        }
    }
}

/// Mean and variance of the rounding error under the noise model: the
/// residue `r` uniform over its `N = q/q0` values `0, q0, …, q - q0`
/// (continuous uniform on `[0, q)` when `q0 = 0`), independent of
/// everything else; `p_neg` is the probability that the value is negative
/// (for the sign-dependent modes).
///
/// Derivations (sums over `r = j·q0`, `j = 0..N-1`; `M = N/2`):
/// - floor: `e = -r`, mean `-(q - q0)/2`, `E[e²] = q0²(N-1)(2N-1)/6 =
///   (q - q0)(2q - q0)/6`, variance `(q² - q0²)/12`.
/// - ceil: `e = q - r` for `r > 0`, 0 for `r = 0`: the same set of
///   magnitudes, mean `+(q - q0)/2`, variance `(q² - q0²)/12`.
/// - toward zero / away from zero: floor or ceil by sign: mean
///   `±(1 - 2 p_neg)(q - q0)/2`, `E[e²] = (q - q0)(2q - q0)/6`.
/// - nearest, ties up: errors `-j·q0` for `j < M`, `(N - j)·q0` for
///   `j >= M`, i.e. the integers `-(M-1)..=M` times `q0`: mean `q0/2`,
///   `E[e²] = q0²(2M² + 1)/6 = q²/12 + q0²/6`, variance `(q² - q0²)/12`.
/// - nearest, ties to even: as ties up but the tie `±q/2` is split evenly:
///   mean 0, variance `q²/12 + q0²/6`.
/// - nearest, ties away: the tie goes up for positive, down for negative
///   values: mean `(1 - 2 p_neg)·q0/2`, `E[e²] = q²/12 + q0²/6`.
/// - to odd: `r = 0` gives 0; otherwise `-r` or `q - r` by the parity of
///   the quotient (each half the time): mean 0, `E[e²] = (1/N)Σ_{j>=1}
///   (j²q0²) = (q - q0)(2q - q0)/6`.
/// - stochastic: up with probability `r/q`: `E[e | r] = 0`,
///   `E[e² | r] = r(q - r)`; over `r`: `q·E[r] - E[r²] = (q² - q0²)/6`.
#[must_use]
pub fn rounding_moments(mode: Rounding, q0: f64, q: f64, p_neg: f64) -> (f64, f64) {
    let floor_var = (q * q - q0 * q0) / 12.0;
    let one_sided_e2 = (q - q0) * (2.0 * q - q0) / 6.0;
    let nearest_e2 = q * q / 12.0 + q0 * q0 / 6.0;
    let sym = 1.0 - 2.0 * p_neg;
    let with_mean = |mean: f64, e2: f64| (mean, (e2 - mean * mean).max(0.0));
    match mode {
        Rounding::Floor => (-(q - q0) / 2.0, floor_var),
        Rounding::Ceil => ((q - q0) / 2.0, floor_var),
        Rounding::TowardZero => with_mean(-sym * (q - q0) / 2.0, one_sided_e2),
        Rounding::AwayFromZero => with_mean(sym * (q - q0) / 2.0, one_sided_e2),
        Rounding::NearestTiesUp => (q0 / 2.0, floor_var),
        Rounding::NearestTiesEven => (0.0, nearest_e2),
        Rounding::NearestTiesAway => with_mean(sym * q0 / 2.0, nearest_e2),
        Rounding::ToOdd => (0.0, one_sided_e2),
        Rounding::Stochastic(_) => (0.0, (q * q - q0 * q0) / 6.0),
    }
}

/// What the analysis found about overflow at a node.
#[derive(Clone, Debug, Default)]
pub struct OverflowInfo {
    /// The overflow mode acting at the node, if any.
    pub mode: Option<Overflow>,
    /// Whether the value can leave the format.
    pub can_overflow: bool,
    /// The range before the overflow mode acts.
    pub unclamped: Option<Interval>,
    /// The largest saturation error, if it can saturate.
    pub saturation_error: Option<Rational>,
}

/// The analysis of one node.
#[derive(Clone, Debug)]
pub struct NodeAnalysis {
    /// Range of the ideal value.
    pub ideal: Interval,
    /// Range of the actual value.
    pub actual: Interval,
    /// Sound bound: the error lies in this interval.
    pub error: Interval,
    /// The error's affine form. Complete at outputs and at nodes nobody
    /// reads; at other nodes the terms moved on to the consumers and this
    /// holds the bound as a remainder only (`terms` empty, `rem = error`).
    pub form: Affine,
    /// Predicted mean of the ideal value.
    pub signal_mean: f64,
    /// Predicted variance of the ideal value.
    pub signal_var: f64,
    /// Predicted mean of the error.
    pub err_mean: f64,
    /// Predicted variance of the error.
    pub err_var: f64,
    /// Overflow verdict.
    pub overflow: OverflowInfo,
    /// The rounding source this node added, if any.
    pub rounding_source: Option<usize>,
}

/// The analysis of a datapath.
#[derive(Clone, Debug)]
pub struct Analysis {
    /// Per node, in order.
    pub nodes: Vec<NodeAnalysis>,
    /// The error sources.
    pub sources: Vec<Source>,
}

/// Analyse `path` with default options.
///
/// ```
/// let path = qbound_report::parse("input x : Q3.4 in [-2, 2]\nlet y = rescale(x, Q3.2, floor, wrap)\noutput y")?;
/// let a = qbound_report::analyze(&path);
/// // Floor from step 1/16 to step 1/4: error in [-(1/4 - 1/16), 0].
/// assert_eq!(a.nodes[1].error.lo, rug::Rational::from((-3, 16)));
/// # Ok::<(), qbound_report::ParseError>(())
/// ```
#[must_use]
pub fn analyze(path: &Datapath) -> Analysis {
    analyze_with(path, &AnalysisOptions::default())
}

/// Analyse `path`.
#[must_use]
pub fn analyze_with(path: &Datapath, opts: &AnalysisOptions) -> Analysis {
    let n = path.nodes().len();
    let mut a = Analysis {
        nodes: Vec::with_capacity(n),
        sources: Vec::new(),
    };
    let mut remaining = vec![0u32; n];
    for nd in path.nodes() {
        for x in nd.op.operands() {
            remaining[x.0] += 1;
        }
    }
    let mut is_output = vec![false; n];
    for o in path.outputs() {
        is_output[o.node.0] = true;
    }
    let mut w = Work {
        forms: (0..n).map(|_| None).collect(),
        formats: HashMap::new(),
        remaining,
        owners: Owners::new(),
        max_terms: opts.max_terms.max(2),
    };
    for (i, out) in is_output.iter().enumerate() {
        let (mut na, form) = node(path, &mut a, &mut w, i);
        if *out || w.remaining[i] == 0 {
            na.form = form.to_affine();
        }
        if w.remaining[i] > 0 {
            w.forms[i] = Some(form);
        } else {
            form.release(&mut w.owners);
        }
        a.nodes.push(na);
    }
    a
}

/// The working state of one analysis: the forms of nodes that still have
/// consumers, and how many consumers each has left.
struct Work {
    forms: Vec<Option<Form>>,
    /// Range and step of each format met so far.
    formats: HashMap<Format, Rc<(Interval, Rational)>>,
    remaining: Vec<u32>,
    owners: Owners,
    max_terms: usize,
}

impl Work {
    /// `format_range(f)` and `ulp(f)`, computed once per format.
    fn format(&mut self, f: Format) -> Rc<(Interval, Rational)> {
        Rc::clone(
            self.formats
                .entry(f)
                .or_insert_with(|| Rc::new((format_range(f), ulp(f)))),
        )
    }

    /// The form of operand `x` for one consumer: moved out at its last use,
    /// copied before. Returns the form and whether it was moved.
    fn operand(&mut self, x: NodeId) -> (Form, bool) {
        self.remaining[x.0] -= 1;
        if self.remaining[x.0] == 0 {
            (self.forms[x.0].take().expect("form of a used node"), true)
        } else {
            let f = self.forms[x.0].as_mut().expect("form of a used node");
            (f.copy(self.max_terms, &mut self.owners), false)
        }
    }

    /// `x ± y`, merging the smaller form into the larger.
    fn sum(&mut self, x: NodeId, y: NodeId, negate: bool, sources: &[Source]) -> Form {
        let (fx, _) = self.operand(x);
        let (fy, _) = self.operand(y);
        self.merge(fx, fy, negate, sources)
    }

    /// `fx ± fy` for two owned forms.
    fn merge(&mut self, fx: Form, fy: Form, negate: bool, sources: &[Source]) -> Form {
        if fy.len() > fx.len() {
            let mut big = fy;
            if negate {
                big.scale_exact(&Rational::from(-1), &mut self.owners);
            }
            big.merge(&fx, false, true, sources, &mut self.owners);
            big
        } else {
            let mut big = fx;
            big.merge(&fy, negate, true, sources, &mut self.owners);
            big
        }
    }
}

fn fraction_negative(r: &Interval) -> f64 {
    if !r.lo.is_negative() {
        0.0
    } else if !r.hi.is_positive() {
        1.0
    } else {
        let lo = r.lo.to_f64();
        let hi = r.hi.to_f64();
        (-lo / (hi - lo)).clamp(0.0, 1.0)
    }
}

/// Intersect `x` with `o` in place; if the intersection is empty, leave
/// `x` unchanged and return false.
fn narrow(x: &mut Interval, o: &Interval) -> bool {
    let lo = if o.lo > x.lo { &o.lo } else { &x.lo };
    let hi = if o.hi < x.hi { &o.hi } else { &x.hi };
    if lo > hi {
        return false;
    }
    if o.lo > x.lo {
        x.lo.clone_from(&o.lo);
    }
    if o.hi < x.hi {
        x.hi.clone_from(&o.hi);
    }
    true
}

fn range_hull(ideal: &Interval, actual: &Interval) -> Interval {
    actual.sub(ideal)
}

/// The overflow step of a rescale (or a quantized input): `u` is the
/// range of the rounded value before the overflow mode acts.
struct Clamp {
    actual: Interval,
    source: Option<(SourceKind, Interval)>,
    /// The sound interval of the error after clamping, from the error
    /// before it: `[min(E.lo, max - v.hi), max(E.hi, min - v.lo)]`.
    collapse: Option<Interval>,
    info: OverflowInfo,
}

fn clamp_step(
    f: Format,
    fr: &Interval,
    mode: Overflow,
    u: &Interval,
    ideal: &Interval,
    pre_err: &Interval,
) -> Clamp {
    let fr = fr.clone();
    let lo_lim = if mode == Overflow::SaturateSymmetric && f.is_signed() {
        Rational::from(-&fr.hi)
    } else {
        fr.lo.clone()
    };
    let limits = Interval::new(lo_lim, fr.hi.clone());
    let above = u.hi > limits.hi;
    let below = u.lo < limits.lo;
    // Symmetric saturation can also act on a value that fits the format
    // (the most negative one): `below` covers it since limits.lo = -max.
    if !above && !below {
        return Clamp {
            actual: u.clone(),
            source: None,
            collapse: None,
            info: OverflowInfo {
                mode: Some(mode),
                can_overflow: false,
                unclamped: Some(u.clone()),
                saturation_error: None,
            },
        };
    }
    let zero = Rational::new();
    let info = |sat: Option<Rational>| OverflowInfo {
        mode: Some(mode),
        can_overflow: true,
        unclamped: Some(u.clone()),
        saturation_error: sat,
    };
    if mode == Overflow::Wrap {
        // The wrapped value lies in the format, the unwrapped one in u:
        // their difference (a multiple of 2^W ulp) is in [min - u.hi, max - u.lo].
        let w = Interval::new(
            Rational::from(&fr.lo - &u.hi),
            Rational::from(&fr.hi - &u.lo),
        );
        return Clamp {
            actual: fr,
            source: Some((SourceKind::Wrap, w)),
            collapse: None,
            info: info(None),
        };
    }
    // Saturate, symmetric saturate, and panic (analysed as saturating: the
    // run that would panic is reported as an error, the others are bounded).
    // σ = clamp(u) - u: in [max - u.hi, 0] above, [0, min - u.lo] below.
    let s_lo = if above {
        Rational::from(&limits.hi - &u.hi)
    } else {
        zero.clone()
    };
    let s_hi = if below {
        Rational::from(&limits.lo - &u.lo)
    } else {
        zero.clone()
    };
    let sat = if s_hi > Rational::from(-&s_lo) {
        s_hi.clone()
    } else {
        Rational::from(-&s_lo)
    };
    let mut c_lo = pre_err.lo.clone();
    let mut c_hi = pre_err.hi.clone();
    if above {
        let m = Rational::from(&limits.hi - &ideal.hi);
        if m < c_lo {
            c_lo = m;
        }
    }
    if below {
        let m = Rational::from(&limits.lo - &ideal.lo);
        if m > c_hi {
            c_hi = m;
        }
    }
    let actual = u.intersect(&limits).unwrap_or_else(|| {
        if u.lo > limits.hi {
            Interval::point(limits.hi.clone())
        } else {
            Interval::point(limits.lo.clone())
        }
    });
    Clamp {
        actual,
        source: Some((SourceKind::Saturation, Interval::new(s_lo, s_hi))),
        collapse: Some(Interval::new(c_lo, c_hi)),
        info: info(Some(sat)),
    }
}

#[allow(clippy::too_many_arguments)]
fn add_source(
    a: &mut Analysis,
    w: &mut Work,
    node: usize,
    kind: SourceKind,
    eps: Interval,
    mean: f64,
    var: f64,
    label: String,
) -> usize {
    a.sources.push(Source {
        node: NodeId(node),
        kind,
        eps,
        mean,
        var,
        label,
    });
    w.owners.push();
    a.sources.len() - 1
}

/// The remainder-only public form of a node whose terms moved on to its
/// consumers: `e ∈ error`.
fn summary_form(error: &Interval, mean: f64, var: f64) -> Affine {
    Affine {
        terms: Vec::new(),
        rem: error.clone(),
        rem_mean: mean,
        rem_var: var,
    }
}

#[allow(clippy::too_many_lines)]
fn node(path: &Datapath, a: &mut Analysis, w: &mut Work, i: usize) -> (NodeAnalysis, Form) {
    let nd = &path.nodes()[i];
    let f = nd.format;
    // Only nodes that add a source need their label.
    let label = || path.label(NodeId(i));
    let fq = w.format(f);
    let (fr, q_f) = (&fq.0, &fq.1);
    let mut overflow = OverflowInfo::default();
    let mut rounding_source = None;
    let mut collapse: Option<Interval> = None;
    let (ideal, actual, form, sm, sv) = match &nd.op {
        Op::Input { lo, hi, kind } => match kind {
            InputKind::Exact => {
                let r = Interval::new(
                    ceil_to_grid(lo, f.frac_bits()),
                    floor_to_grid(hi, f.frac_bits()),
                );
                // Discrete uniform over the N grid points: variance (N² - 1)q²/12.
                let q = q_f.to_f64();
                let n = (Rational::from(&r.hi - &r.lo) / q_f).to_f64() + 1.0;
                let mean = (r.lo.to_f64() + r.hi.to_f64()) / 2.0;
                (
                    r.clone(),
                    r,
                    Form::zero(),
                    mean,
                    (n * n - 1.0) * q * q / 12.0,
                )
            }
            InputKind::Quantized(mode) => {
                let ideal = Interval::new(lo.clone(), hi.clone());
                let (ulo, uhi) = rounded_range(&ideal, f.frac_bits(), *mode);
                let u = Interval::new(ulo, uhi);
                let q = q_f.clone();
                let eps = rounding_interval(*mode, &Rational::new(), &q, Sign::of(&ideal));
                let (m, v) = rounding_moments(*mode, 0.0, q.to_f64(), fraction_negative(&ideal));
                let s = add_source(
                    a,
                    w,
                    i,
                    SourceKind::InputQuantization,
                    eps,
                    m,
                    v,
                    format!(
                        "quantization of input {} ({} into {f})",
                        label(),
                        mode.name()
                    ),
                );
                rounding_source = Some(s);
                let mut form = Form::source(s, &a.sources, &mut w.owners);
                let pre_err = form.interval();
                let c = clamp_step(f, fr, Overflow::Saturate, &u, &ideal, &pre_err);
                if let Some((kind, eps)) = c.source {
                    let s2 = add_source(
                        a,
                        w,
                        i,
                        kind,
                        eps,
                        0.0,
                        0.0,
                        format!("saturation of input {}", label()),
                    );
                    let f2 = Form::source(s2, &a.sources, &mut w.owners);
                    form = w.merge(form, f2, false, &a.sources);
                }
                overflow = c.info;
                collapse = c.collapse;
                let mean = (lo.to_f64() + hi.to_f64()) / 2.0;
                let wd = (hi.to_f64() - lo.to_f64()).abs();
                (ideal, c.actual, form, mean, wd * wd / 12.0)
            }
        },
        Op::Const { value, rounding } => {
            let q = round_to_grid(value, f.frac_bits(), *rounding);
            let d = Rational::from(&q - value);
            let form = if d.is_zero() {
                Form::zero()
            } else {
                let df = d.to_f64();
                let s = add_source(
                    a,
                    w,
                    i,
                    SourceKind::Constant,
                    Interval::point(d.clone()),
                    df,
                    0.0,
                    format!("constant {} = {} in {f}", label(), decimal_text(value)),
                );
                Form::source(s, &a.sources, &mut w.owners)
            };
            (
                Interval::point(value.clone()),
                Interval::point(q),
                form,
                value.to_f64(),
                0.0,
            )
        }
        Op::Add(x, y) | Op::Sub(x, y) => {
            let sub = matches!(nd.op, Op::Sub(..));
            let form = w.sum(*x, *y, sub, &a.sources);
            let (nx, ny) = (&a.nodes[x.0], &a.nodes[y.0]);
            let (ideal, actual) = if sub {
                (nx.ideal.sub(&ny.ideal), nx.actual.sub(&ny.actual))
            } else {
                (nx.ideal.add(&ny.ideal), nx.actual.add(&ny.actual))
            };
            let m = if sub {
                nx.signal_mean - ny.signal_mean
            } else {
                nx.signal_mean + ny.signal_mean
            };
            (ideal, actual, form, m, nx.signal_var + ny.signal_var)
        }
        Op::Neg(x) => {
            let (mut form, _) = w.operand(*x);
            form.scale_exact(&Rational::from(-1), &mut w.owners);
            let nx = &a.nodes[x.0];
            (
                nx.ideal.neg(),
                nx.actual.neg(),
                form,
                -nx.signal_mean,
                nx.signal_var,
            )
        }
        Op::Shift(x, k) => {
            let (mut form, _) = w.operand(*x);
            let p = pow2(i64::from(*k));
            form.scale_exact(&p, &mut w.owners);
            let nx = &a.nodes[x.0];
            let pf = p.to_f64();
            (
                nx.ideal.scale(&p),
                nx.actual.scale(&p),
                form,
                nx.signal_mean * pf,
                nx.signal_var * pf * pf,
            )
        }
        Op::Mul(x, y) => {
            let (mut fx, _) = w.operand(*x);
            let (mut fy, _) = w.operand(*y);
            let (nx, ny) = (&a.nodes[x.0], &a.nodes[y.0]);
            let (ideal, actual) = if x == y {
                (square(&nx.ideal), square(&nx.actual))
            } else {
                (nx.ideal.mul(&ny.ideal), nx.actual.mul(&ny.actual))
            };
            let both = !fx.is_zero() && !fy.is_zero();
            // e = v_x·e_y + v_y·e_x + e_x·e_y
            fy.scale_signal(
                &nx.ideal,
                nx.signal_mean,
                nx.signal_var,
                w.max_terms,
                &a.sources,
                &mut w.owners,
            );
            fx.scale_signal(
                &ny.ideal,
                ny.signal_mean,
                ny.signal_var,
                w.max_terms,
                &a.sources,
                &mut w.owners,
            );
            let mut form = w.merge(fy, fx, false, &a.sources);
            if both {
                let m = nx.err_mean * ny.err_mean;
                let e2 = (nx.err_var + nx.err_mean.powi(2)) * (ny.err_var + ny.err_mean.powi(2));
                form.add_rem(&nx.error.mul(&ny.error), m, (e2 - m * m).max(0.0));
            }
            let ex2 = nx.signal_var + nx.signal_mean.powi(2);
            let ey2 = ny.signal_var + ny.signal_mean.powi(2);
            let m = nx.signal_mean * ny.signal_mean;
            (ideal, actual, form, m, (ex2 * ey2 - m * m).max(0.0))
        }
        Op::Rescale {
            src,
            rounding,
            overflow: mode,
        } => {
            let (mut form, _) = w.operand(*src);
            let nx = &a.nodes[src.0];
            let sf = path.node(*src).format;
            let (ulo, uhi) = if sf.frac_bits() > f.frac_bits() {
                rounded_range(&nx.actual, f.frac_bits(), *rounding)
            } else {
                (nx.actual.lo.clone(), nx.actual.hi.clone())
            };
            let u = Interval::new(ulo, uhi);
            if sf.frac_bits() > f.frac_bits() {
                let q0 = w.format(sf).1.clone();
                let q = q_f.clone();
                let eps = rounding_interval(*rounding, &q0, &q, Sign::of(&nx.actual));
                let (m, v) = rounding_moments(
                    *rounding,
                    q0.to_f64(),
                    q.to_f64(),
                    fraction_negative(&nx.actual),
                );
                let s = add_source(
                    a,
                    w,
                    i,
                    SourceKind::Rounding,
                    eps,
                    m,
                    v,
                    format!(
                        "rounding at {} ({}, {} bits dropped)",
                        label(),
                        rounding.name(),
                        sf.frac_bits() - f.frac_bits()
                    ),
                );
                rounding_source = Some(s);
                let fs = Form::source(s, &a.sources, &mut w.owners);
                form = w.merge(form, fs, false, &a.sources);
            }
            let nx = &a.nodes[src.0];
            let fi = form.interval();
            let pre_err = fi.intersect(&u.sub(&nx.ideal)).unwrap_or(fi);
            let c = clamp_step(f, fr, *mode, &u, &nx.ideal, &pre_err);
            if let Some((kind, eps)) = c.source {
                let what = if kind == SourceKind::Wrap {
                    "wrap-around"
                } else {
                    "saturation"
                };
                let s2 = add_source(
                    a,
                    w,
                    i,
                    kind,
                    eps,
                    0.0,
                    0.0,
                    format!("{what} at {} ({})", label(), mode.name()),
                );
                let fs = Form::source(s2, &a.sources, &mut w.owners);
                form = w.merge(form, fs, false, &a.sources);
            }
            overflow = c.info;
            collapse = c.collapse;
            let nx = &a.nodes[src.0];
            (
                nx.ideal.clone(),
                c.actual,
                form,
                nx.signal_mean,
                nx.signal_var,
            )
        }
    };
    let mut actual = actual;
    if !narrow(&mut actual, fr) {
        actual = fr.clone();
    }
    let mut error = form.interval();
    narrow(&mut error, &range_hull(&ideal, &actual));
    if let Some(c) = collapse {
        narrow(&mut error, &c);
    }
    let (err_mean, err_var) = form.moments();
    let na = NodeAnalysis {
        form: summary_form(&error, err_mean, err_var),
        ideal,
        actual,
        error,
        signal_mean: sm,
        signal_var: sv,
        err_mean,
        err_var,
        overflow,
        rounding_source,
    };
    (na, form)
}

fn square(r: &Interval) -> Interval {
    let a = Rational::from(&r.lo * &r.lo);
    let b = Rational::from(&r.hi * &r.hi);
    if !r.lo.is_negative() {
        Interval::new(a, b)
    } else if !r.hi.is_positive() {
        Interval::new(b, a)
    } else {
        Interval::new(Rational::new(), if a > b { a } else { b })
    }
}

/// The range of `round(x)` for `x` in `r`: rounding is monotone, so the ends
/// round to the ends (the stochastic mode may go either way: floor the low
/// end, ceil the high end).
fn rounded_range(r: &Interval, frac: u32, mode: Rounding) -> (Rational, Rational) {
    match mode {
        Rounding::Stochastic(_) => (floor_to_grid(&r.lo, frac), ceil_to_grid(&r.hi, frac)),
        m => (round_to_grid(&r.lo, frac, m), round_to_grid(&r.hi, frac, m)),
    }
}

/// A rational as a short decimal if it has one (terminating, up to 40
/// digits), else as `p/q`.
#[must_use]
pub fn decimal_text(x: &Rational) -> String {
    let den = x.denom().clone();
    let mut d = den.clone();
    let (mut twos, mut fives) = (0u32, 0u32);
    while d.is_divisible_u(2) {
        d /= 2u32;
        twos += 1;
    }
    while d.is_divisible_u(5) {
        d /= 5u32;
        fives += 1;
    }
    let digits = twos.max(fives);
    if d != 1 || digits > 40 {
        return x.to_string();
    }
    let scaled = Rational::from(x * rug::Integer::from(rug::Integer::u_pow_u(10, digits)));
    let n = scaled.numer().clone();
    let neg = n.is_negative();
    let s = n.abs().to_string();
    let digits = digits as usize;
    let body = if digits == 0 {
        s
    } else if s.len() > digits {
        format!("{}.{}", &s[..s.len() - digits], &s[s.len() - digits..])
    } else {
        format!("0.{}{}", "0".repeat(digits - s.len()), s)
    };
    if neg { format!("-{body}") } else { body }
}
