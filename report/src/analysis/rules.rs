//! One transfer rule per operation: from the operands' ranges, value forms
//! and error forms to the node's, plus the overflow step shared by
//! rescales and quantized inputs. [`Work::finish`] turns a rule's [`Step`]
//! into the node's [`NodeAnalysis`] the same way for every operation.

use std::collections::HashMap;
use std::rc::Rc;

use qbound::{Format, Overflow, Rounding};

use super::form::{Form, Owners, Source, SourceKind};
use super::rounding::{Sign, rounding_interval, rounding_moments};
use super::value::{Symbol, ValForm};
use super::{Analysis, AnalysisOptions, NodeAnalysis, OverflowInfo};
use crate::arith::{Interval, Num, ceil_to_grid, floor_to_grid, format_range, round_to_grid, ulp};
use crate::model::{Datapath, InputKind, NodeId, Op};

/// The working state of one analysis: the forms of nodes that still have
/// consumers, and how many consumers each has left.
pub(super) struct Work {
    forms: Vec<Option<Box<Form>>>,
    vforms: Vec<Option<Box<ValForm>>>,
    /// Range and step of each format met so far.
    formats: HashMap<Format, Rc<(Interval, Num)>>,
    remaining: Vec<u32>,
    owners: Owners,
    /// The input symbols of the value forms, in input order.
    syms: Vec<Symbol>,
    max_terms: usize,
    prec: u32,
}

/// What a rule computed for one node, before the common finishing.
pub(super) struct Step {
    /// Range of the ideal value by interval arithmetic.
    ideal: Interval,
    /// Range of the actual value by interval arithmetic (before the
    /// format's range is applied).
    actual: Interval,
    form: Form,
    vform: ValForm,
    overflow: Option<Box<OverflowInfo>>,
    rounding_source: Option<usize>,
    /// A further sound interval for the error (after saturation).
    collapse: Option<Interval>,
}

impl Step {
    fn plain(ideal: Interval, actual: Interval, form: Form, vform: ValForm) -> Step {
        Step {
            ideal,
            actual,
            form,
            vform,
            overflow: None,
            rounding_source: None,
            collapse: None,
        }
    }
}

impl Work {
    pub(super) fn new(path: &Datapath, opts: &AnalysisOptions) -> Work {
        let n = path.nodes().len();
        let mut remaining = vec![0u32; n];
        for nd in path.nodes() {
            for x in nd.op.operands() {
                remaining[x.0] += 1;
            }
        }
        Work {
            forms: (0..n).map(|_| None).collect(),
            vforms: (0..n).map(|_| None).collect(),
            formats: HashMap::new(),
            remaining,
            owners: Owners::new(opts.precision),
            syms: Vec::new(),
            max_terms: opts.max_terms.max(2),
            prec: opts.precision,
        }
    }

    /// `format_range(f)` and `ulp(f)`, computed once per format.
    fn format(&mut self, f: Format) -> Rc<(Interval, Num)> {
        Rc::clone(
            self.formats
                .entry(f)
                .or_insert_with(|| Rc::new((format_range(f), ulp(f)))),
        )
    }

    /// The forms of operand `x` for one consumer: moved out at its last
    /// use, copied before.
    fn operand(&mut self, x: NodeId) -> (Form, ValForm) {
        self.remaining[x.0] -= 1;
        if self.remaining[x.0] == 0 {
            (
                *self.forms[x.0].take().expect("form of a used node"),
                *self.vforms[x.0].take().expect("value form of a used node"),
            )
        } else {
            let f = self.forms[x.0].as_mut().expect("form of a used node");
            let v = self.vforms[x.0]
                .as_mut()
                .expect("value form of a used node");
            (
                f.copy(self.max_terms, &mut self.owners),
                v.copy(self.max_terms, &self.syms),
            )
        }
    }

    /// `fx ± fy` for two owned error forms, merging the smaller into the
    /// larger.
    fn merge(&mut self, fx: Form, fy: Form, negate: bool, sources: &[Source]) -> Form {
        if fy.len() > fx.len() {
            let mut big = fy;
            if negate {
                big.scale_exact(&Num::from(-1), &mut self.owners);
            }
            big.merge(&fx, false, true, sources, &mut self.owners);
            big
        } else {
            let mut big = fx;
            big.merge(&fy, negate, true, sources, &mut self.owners);
            big
        }
    }

    /// `vx ± vy` for two owned value forms, merging the smaller into the
    /// larger.
    fn vmerge(&self, vx: ValForm, vy: ValForm, negate: bool) -> ValForm {
        if vy.len() > vx.len() {
            let mut big = vy;
            if negate {
                big.scale_exact(&Num::from(-1), self.prec);
            }
            big.merge(&vx, false, &self.syms, self.prec);
            big
        } else {
            let mut big = vx;
            big.merge(&vy, negate, &self.syms, self.prec);
            big
        }
    }

    /// Register an error source entering at `node`.
    fn add_source(a: &mut Analysis, w: &mut Work, node: NodeId, src: NewSource) -> usize {
        a.sources.push(Source {
            node,
            kind: src.kind,
            eps: src.eps,
            mean: src.mean,
            var: src.var,
        });
        w.owners.push();
        a.sources.len() - 1
    }

    /// The common end of every rule: intersect the ranges, bound the error,
    /// keep the forms for the consumers.
    pub(super) fn finish(
        &mut self,
        path: &Datapath,
        id: NodeId,
        step: Step,
        is_output: bool,
    ) -> NodeAnalysis {
        let i = id.0;
        let fq = self.format(path.node(id).format);
        let prec = self.prec;
        let Step {
            mut ideal,
            mut actual,
            form,
            vform,
            mut overflow,
            rounding_source,
            collapse,
        } = step;
        ideal.narrow(&vform.interval(prec));
        ideal.round_costly(prec);
        let mut error = form.interval(prec);
        if let Some(c) = collapse {
            error.narrow(&c);
        }
        if !actual.narrow(&fq.0) {
            actual = fq.0.clone();
        }
        let mut through = ideal.add(&error);
        through.round_costly(prec);
        actual.narrow(&through);
        actual.round_costly(prec);
        let mut diff = actual.sub(&ideal);
        diff.round_costly(prec);
        error.narrow(&diff);
        error.round_costly(prec);
        if let Some(u) = overflow.as_mut().and_then(|o| o.unclamped.as_mut()) {
            u.round_costly(prec);
        }
        let (err_mean, err_var) = form.moments();
        let (signal_mean, signal_var) = vform.moments();
        let keep_all = is_output || self.remaining[i] == 0;
        let summary = keep_all.then(|| Box::new(form.to_affine(prec)));
        if self.remaining[i] > 0 {
            self.forms[i] = Some(Box::new(form));
            self.vforms[i] = Some(Box::new(vform));
        } else {
            form.release(&mut self.owners);
        }
        NodeAnalysis {
            ideal,
            actual,
            error,
            form: summary,
            signal_mean,
            signal_var,
            err_mean,
            err_var,
            overflow,
            rounding_source,
        }
    }
}

/// A source about to be registered.
struct NewSource {
    kind: SourceKind,
    eps: Interval,
    mean: f64,
    var: f64,
}

/// The rule for node `id`.
pub(super) fn node(path: &Datapath, a: &mut Analysis, w: &mut Work, id: NodeId) -> Step {
    let nd = path.node(id);
    match &nd.op {
        Op::Input { lo, hi, kind } => match kind {
            InputKind::Exact => input_exact(path, w, id, lo, hi),
            InputKind::Quantized(mode) => input_quantized(path, a, w, id, lo, hi, *mode),
        },
        Op::Const { value, rounding } => constant(path, a, w, id, value, *rounding),
        Op::Add(x, y) => add_sub(a, w, *x, *y, false),
        Op::Sub(x, y) => add_sub(a, w, *x, *y, true),
        Op::Neg(x) => scale(a, w, *x, &Num::from(-1)),
        Op::Shift(x, k) => scale(a, w, *x, &Num::pow2(i64::from(*k))),
        Op::Mul(x, y) => mul(a, w, *x, *y),
        Op::Rescale {
            src,
            rounding,
            overflow,
        } => rescale(path, a, w, id, *src, *rounding, *overflow),
    }
}

/// Exact fixed-point data: the grid points of the format in `[lo, hi]`.
fn input_exact(path: &Datapath, w: &mut Work, id: NodeId, lo: &Num, hi: &Num) -> Step {
    let f = path.node(id).format;
    let r = Interval::new(
        ceil_to_grid(lo, f.frac_bits()),
        floor_to_grid(hi, f.frac_bits()),
    );
    // ε uniform over the N grid points of [-1, 1]: variance (N+1)/(3(N-1)).
    let q = ulp(f);
    let n = ((&r.hi - &r.lo) * Num::pow2(i64::from(f.frac_bits()))).to_f64() + 1.0;
    let var = if n > 1.0 {
        (n + 1.0) / (3.0 * (n - 1.0))
    } else {
        0.0
    };
    let _ = q;
    w.syms.push(Symbol { mean: 0.0, var });
    let vform = ValForm::symbol(w.syms.len() - 1, &r, &w.syms);
    Step::plain(r.clone(), r, Form::zero(), vform)
}

/// A real signal in `[lo, hi]` rounded into the format (a converter): a
/// quantization source, and saturation if rounding can leave the format.
fn input_quantized(
    path: &Datapath,
    a: &mut Analysis,
    w: &mut Work,
    id: NodeId,
    lo: &Num,
    hi: &Num,
    mode: Rounding,
) -> Step {
    let f = path.node(id).format;
    let fq = w.format(f);
    let ideal = Interval::new(lo.clone(), hi.clone());
    let u = rounded_range(&ideal, f.frac_bits(), mode);
    let eps = rounding_interval(mode, &Num::ZERO, &fq.1, Sign::of(&ideal));
    let (m, v) = rounding_moments(mode, 0.0, fq.1.to_f64(), fraction_negative(&ideal));
    let s = Work::add_source(
        a,
        w,
        id,
        NewSource {
            kind: SourceKind::InputQuantization,
            eps,
            mean: m,
            var: v,
        },
    );
    let mut form = Form::source(s, &a.sources, &mut w.owners);
    let pre_err = form.interval(w.prec);
    let c = clamp_step(f, &fq.0, Overflow::Saturate, &u, &ideal, &pre_err);
    form = clamp_source(a, w, id, &c, form);
    w.syms.push(Symbol {
        mean: 0.0,
        var: 1.0 / 3.0,
    });
    let vform = ValForm::symbol(w.syms.len() - 1, &ideal, &w.syms);
    Step {
        ideal,
        actual: c.actual,
        form,
        vform,
        overflow: Some(Box::new(c.info)),
        rounding_source: Some(s),
        collapse: c.collapse,
    }
}

/// A constant: its quantization error is a known number.
fn constant(
    path: &Datapath,
    a: &mut Analysis,
    w: &mut Work,
    id: NodeId,
    value: &Num,
    rounding: Rounding,
) -> Step {
    let f = path.node(id).format;
    let q = round_to_grid(value, f.frac_bits(), rounding);
    let d = &q - value;
    let form = if d.is_zero() {
        Form::zero()
    } else {
        let s = Work::add_source(
            a,
            w,
            id,
            NewSource {
                kind: SourceKind::Constant,
                eps: Interval::point(d.clone()),
                mean: d.to_f64(),
                var: 0.0,
            },
        );
        Form::source(s, &a.sources, &mut w.owners)
    };
    Step::plain(
        Interval::point(value.clone()),
        Interval::point(q),
        form,
        ValForm::constant(value.clone()),
    )
}

/// `x ± y`: forms add.
fn add_sub(a: &Analysis, w: &mut Work, x: NodeId, y: NodeId, sub: bool) -> Step {
    let (fx, vx) = w.operand(x);
    let (fy, vy) = w.operand(y);
    let form = w.merge(fx, fy, sub, &a.sources);
    let vform = w.vmerge(vx, vy, sub);
    let (nx, ny) = (&a.nodes[x.0], &a.nodes[y.0]);
    let (ideal, actual) = if sub {
        (nx.ideal.sub(&ny.ideal), nx.actual.sub(&ny.actual))
    } else {
        (nx.ideal.add(&ny.ideal), nx.actual.add(&ny.actual))
    };
    Step::plain(ideal, actual, form, vform)
}

/// `k·x` for an exact `k` (negation, shift): forms scale.
fn scale(a: &Analysis, w: &mut Work, x: NodeId, k: &Num) -> Step {
    let (mut form, mut vform) = w.operand(x);
    form.scale_exact(k, &mut w.owners);
    vform.scale_exact(k, w.prec);
    let nx = &a.nodes[x.0];
    Step::plain(nx.ideal.scale(k), nx.actual.scale(k), form, vform)
}

/// `x·y`: `e = v_x·e_y + v_y·e_x + e_x·e_y`.
fn mul(a: &Analysis, w: &mut Work, x: NodeId, y: NodeId) -> Step {
    let (mut fx, vx) = w.operand(x);
    let (mut fy, vy) = w.operand(y);
    let vform = ValForm::mul(vx, vy, w.max_terms, &w.syms, w.prec);
    let (nx, ny) = (&a.nodes[x.0], &a.nodes[y.0]);
    let (ideal, actual) = if x == y {
        (nx.ideal.square(), nx.actual.square())
    } else {
        (nx.ideal.mul(&ny.ideal), nx.actual.mul(&ny.actual))
    };
    let both = !fx.is_zero() && !fy.is_zero();
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
        form.add_rem(&nx.error.mul(&ny.error), m, (e2 - m * m).max(0.0), w.prec);
    }
    Step::plain(ideal, actual, form, vform)
}

/// `rescale(x, F, rounding, overflow)`: a rounding source when fraction
/// bits are dropped, then the overflow step.
#[allow(clippy::too_many_arguments)]
fn rescale(
    path: &Datapath,
    a: &mut Analysis,
    w: &mut Work,
    id: NodeId,
    src: NodeId,
    rounding: Rounding,
    mode: Overflow,
) -> Step {
    let f = path.node(id).format;
    let sf = path.node(src).format;
    let (mut form, vform) = w.operand(src);
    let fq = w.format(f);
    let nx = &a.nodes[src.0];
    let drops = sf.frac_bits() > f.frac_bits();
    let u = if drops {
        rounded_range(&nx.actual, f.frac_bits(), rounding)
    } else {
        nx.actual.clone()
    };
    let mut rounding_source = None;
    if drops {
        let q0 = w.format(sf).1.clone();
        let eps = rounding_interval(rounding, &q0, &fq.1, Sign::of(&nx.actual));
        let (m, v) = rounding_moments(
            rounding,
            q0.to_f64(),
            fq.1.to_f64(),
            fraction_negative(&nx.actual),
        );
        let s = Work::add_source(
            a,
            w,
            id,
            NewSource {
                kind: SourceKind::Rounding,
                eps,
                mean: m,
                var: v,
            },
        );
        rounding_source = Some(s);
        let fs = Form::source(s, &a.sources, &mut w.owners);
        form = w.merge(form, fs, false, &a.sources);
    }
    let nx = &a.nodes[src.0];
    let fi = form.interval(w.prec);
    let pre_err = fi.intersect(&u.sub(&nx.ideal)).unwrap_or(fi);
    let c = clamp_step(f, &fq.0, mode, &u, &nx.ideal, &pre_err);
    form = clamp_source(a, w, id, &c, form);
    let nx = &a.nodes[src.0];
    Step {
        ideal: nx.ideal.clone(),
        actual: c.actual,
        form,
        vform,
        overflow: Some(Box::new(c.info)),
        rounding_source,
        collapse: c.collapse,
    }
}

/// Add the saturation or wrap source of an overflow step, if it has one.
fn clamp_source(a: &mut Analysis, w: &mut Work, id: NodeId, c: &Clamp, form: Form) -> Form {
    let Some((kind, eps)) = &c.source else {
        return form;
    };
    let s = Work::add_source(
        a,
        w,
        id,
        NewSource {
            kind: *kind,
            eps: eps.clone(),
            mean: 0.0,
            var: 0.0,
        },
    );
    let fs = Form::source(s, &a.sources, &mut w.owners);
    w.merge(form, fs, false, &a.sources)
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

/// The range of `round(x)` for `x` in `r`: rounding is monotone, so the ends
/// round to the ends (the stochastic mode may go either way: floor the low
/// end, ceil the high end).
fn rounded_range(r: &Interval, frac: u32, mode: Rounding) -> Interval {
    match mode {
        Rounding::Stochastic(_) => {
            Interval::new(floor_to_grid(&r.lo, frac), ceil_to_grid(&r.hi, frac))
        }
        m => Interval::new(round_to_grid(&r.lo, frac, m), round_to_grid(&r.hi, frac, m)),
    }
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
        -&fr.hi
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
                mode,
                can_overflow: false,
                unclamped: Some(u.clone()),
                saturation_error: None,
            },
        };
    }
    let info = |sat: Option<Num>| OverflowInfo {
        mode,
        can_overflow: true,
        unclamped: Some(u.clone()),
        saturation_error: sat,
    };
    if mode == Overflow::Wrap {
        // The wrapped value lies in the format, the unwrapped one in u:
        // their difference (a multiple of 2^W ulp) is in [min - u.hi, max - u.lo].
        let w = Interval::new(&fr.lo - &u.hi, &fr.hi - &u.lo);
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
    let s_lo = if above { &limits.hi - &u.hi } else { Num::ZERO };
    let s_hi = if below { &limits.lo - &u.lo } else { Num::ZERO };
    let sat = s_hi.clone().max(-&s_lo);
    let mut c_lo = pre_err.lo.clone();
    let mut c_hi = pre_err.hi.clone();
    if above {
        let m = &limits.hi - &ideal.hi;
        if m < c_lo {
            c_lo = m;
        }
    }
    if below {
        let m = &limits.lo - &ideal.lo;
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
