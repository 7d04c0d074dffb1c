//! Simulation: evaluate the datapath on input vectors bit-exactly (with
//! `qbound`'s [`QValue`] kernels) and exactly (with `rug` rationals), measure
//! every node's error, and check it against the analysis' bound.
//!
//! Vectors: seeded random vectors (inputs uniform over their ranges: exact
//! inputs uniform over their grid points, real inputs uniform over the real
//! range at a resolution 24 bits finer than the format's step), every corner of the input
//! box (or a random sample of corners when there are too many), and a
//! search for the worst error at each output: coordinate ascent over the
//! corners from the worst corner found, then a walk that moves one input at
//! a time a few ulps inward, which steers the residues that the roundings
//! discard toward their worst case.
//!
//! A measured error outside its bound is a bug in the analysis: the run
//! stops with [`SimulationError::BoundViolation`].

use qbound::{Format, Overflow, QValue, Rounding, Wide};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use rug::{Integer, Rational};

use crate::analysis::Analysis;
use crate::assemble::assemble;
use crate::exact::{
    ceil_to_grid, floor_to_grid, format_range, pow2, qvalue_to_rational, rational_to_qvalue,
    round_to_grid, ulp, wide_to_integer,
};
use crate::model::{Datapath, InputKind, NodeId, Op};
use crate::result::{Exact, Measured, Report, SimulationSummary};

/// Knobs of the simulation.
#[derive(Clone, Debug)]
pub struct SimulationOptions {
    /// Seed of the random vectors (the run is reproducible).
    pub seed: u64,
    /// Number of random vectors.
    pub random_vectors: u64,
    /// Evaluate every corner of the input box when there are at most this
    /// many, else this many random corners.
    pub max_corners: u64,
    /// Run the worst-case search at each output.
    pub search: bool,
    /// How many ulps inward the residue walk moves each input.
    pub search_steps: u32,
}

impl Default for SimulationOptions {
    fn default() -> SimulationOptions {
        SimulationOptions {
            seed: 0x05ee_d0fa_0d17,
            random_vectors: 10_000,
            max_corners: 4096,
            search: true,
            search_steps: 16,
        }
    }
}

/// Why a simulation failed.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum SimulationError {
    /// A measured error passed the analysis' bound: a bug in the analysis.
    #[error(
        "BUG: at node {label} the measured error {measured} lies outside the bound [{lo}, {hi}] (inputs: {inputs})"
    )]
    BoundViolation {
        /// Node index.
        node: usize,
        /// Node label.
        label: String,
        /// The measured error (exact).
        measured: String,
        /// Bound, lower end.
        lo: String,
        /// Bound, upper end.
        hi: String,
        /// The input vector, as exact values.
        inputs: String,
    },
}

/// One input value: the ideal (real) value and the fixed-point value that
/// enters the datapath.
#[derive(Clone, Debug)]
pub struct InputValue {
    /// The ideal value.
    pub ideal: Rational,
    /// The quantized value.
    pub actual: QValue,
}

/// A prepared evaluator for one datapath.
#[derive(Debug)]
pub struct Simulator<'a> {
    path: &'a Datapath,
    consts: Vec<Option<QValue>>,
    inputs: Vec<NodeId>,
}

impl<'a> Simulator<'a> {
    /// Prepare `path` for evaluation.
    ///
    /// # Panics
    /// If a constant does not fit its format (the builder prevents that).
    #[must_use]
    pub fn new(path: &'a Datapath) -> Simulator<'a> {
        let consts = path
            .nodes()
            .iter()
            .map(|n| match &n.op {
                Op::Const { value, rounding } => Some(
                    rational_to_qvalue(
                        &round_to_grid(value, n.format.frac_bits(), *rounding),
                        n.format,
                    )
                    .expect("checked by the builder"),
                ),
                _ => None,
            })
            .collect();
        Simulator {
            path,
            consts,
            inputs: path.inputs(),
        }
    }

    /// The input nodes, in the order vectors list them.
    #[must_use]
    pub fn inputs(&self) -> &[NodeId] {
        &self.inputs
    }

    /// The input value for the ideal value `x` of input `k` (quantized if
    /// the input is a quantized real signal; `word` drives stochastic
    /// rounding).
    ///
    /// # Panics
    /// If an exact input's value is not on its grid or outside its format.
    #[must_use]
    pub fn input_value(&self, k: usize, x: Rational, word: u64) -> InputValue {
        let n = self.path.node(self.inputs[k]);
        let f = n.format;
        let q = match &n.op {
            Op::Input {
                kind: InputKind::Quantized(mode),
                ..
            } => {
                let r = match mode {
                    Rounding::Stochastic(_) => stochastic_round(&x, f.frac_bits(), word),
                    m => round_to_grid(&x, f.frac_bits(), *m),
                };
                let fr = format_range(f);
                if r > fr.hi {
                    fr.hi
                } else if r < fr.lo {
                    fr.lo
                } else {
                    r
                }
            }
            _ => x.clone(),
        };
        InputValue {
            actual: rational_to_qvalue(&q, f).expect("input value on the grid and in range"),
            ideal: x,
        }
    }

    /// Evaluate the fixed-point side: every node's actual value, and for
    /// each node whether its overflow mode acted. `words` feeds stochastic
    /// roundings (one word per node, reused if short).
    #[must_use]
    pub fn eval_fixed(&self, inputs: &[InputValue], words: &[u64]) -> (Vec<QValue>, Vec<bool>) {
        let nodes = self.path.nodes();
        let mut v: Vec<QValue> = Vec::with_capacity(nodes.len());
        let mut ovf = vec![false; nodes.len()];
        let mut k = 0;
        for (i, n) in nodes.iter().enumerate() {
            let x = match &n.op {
                Op::Input { .. } => {
                    k += 1;
                    inputs[k - 1].actual
                }
                Op::Const { .. } => self.consts[i].expect("constant"),
                Op::Add(a, b) => v[a.0].exact_add(v[b.0]).expect("format checked"),
                Op::Sub(a, b) => v[a.0].exact_sub(v[b.0]).expect("format checked"),
                Op::Mul(a, b) => v[a.0].exact_mul(v[b.0]).expect("format checked"),
                Op::Neg(a) => v[a.0].exact_neg().expect("format checked"),
                Op::Shift(a, s) => shift_value(v[a.0], *s, n.format),
                Op::Rescale {
                    src,
                    rounding,
                    overflow,
                } => {
                    let rnd = match rounding {
                        Rounding::Stochastic(_) => Rounding::Stochastic(
                            words.get(i % words.len().max(1)).copied().unwrap_or(0),
                        ),
                        r => *r,
                    };
                    let mode = if *overflow == Overflow::Panic {
                        Overflow::Saturate
                    } else {
                        *overflow
                    };
                    let r = v[src.0].rescale(n.format, rnd, mode);
                    ovf[i] = match v[src.0].try_rescale(n.format, rnd) {
                        Ok(t) => t.bits() != r.bits(),
                        Err(_) => true,
                    };
                    r
                }
            };
            v.push(x);
        }
        (v, ovf)
    }

    /// Evaluate the exact side: every node's ideal value.
    #[must_use]
    pub fn eval_exact(&self, inputs: &[InputValue]) -> Vec<Rational> {
        let nodes = self.path.nodes();
        let mut v: Vec<Rational> = Vec::with_capacity(nodes.len());
        let mut k = 0;
        for n in nodes {
            let x = match &n.op {
                Op::Input { .. } => {
                    k += 1;
                    inputs[k - 1].ideal.clone()
                }
                Op::Const { value, .. } => value.clone(),
                Op::Add(a, b) => Rational::from(&v[a.0] + &v[b.0]),
                Op::Sub(a, b) => Rational::from(&v[a.0] - &v[b.0]),
                Op::Mul(a, b) => Rational::from(&v[a.0] * &v[b.0]),
                Op::Neg(a) => Rational::from(-&v[a.0]),
                Op::Shift(a, s) => &v[a.0] * pow2(i64::from(*s)),
                Op::Rescale { src, .. } => v[src.0].clone(),
            };
            v.push(x);
        }
        v
    }
}

fn stochastic_round(x: &Rational, frac: u32, word: u64) -> Rational {
    let fl = floor_to_grid(x, frac);
    if fl == *x {
        return fl;
    }
    let f64scaled = Rational::from(x - &fl) * pow2(64 + i64::from(frac));
    let frac64 = f64scaled.floor().numer().to_u64().unwrap_or(u64::MAX);
    if word < frac64 {
        ceil_to_grid(x, frac)
    } else {
        fl
    }
}

/// `v × 2^s` in `f` (the format [`crate::model::shift_format`] gives): the
/// bits move left by `max(0, s - F)`, otherwise only the format changes.
fn shift_value(v: QValue, s: i32, f: Format) -> QValue {
    let src_f = i64::from(v.format().frac_bits());
    let left = (i64::from(s) - src_f + i64::from(f.frac_bits())).max(0);
    let bits = if left == 0 {
        v.bits()
    } else {
        let b = wide_to_integer(v.bits()) << u32::try_from(left).expect("shift fits");
        if f.is_signed() {
            Wide::from_i128(b.to_i128().expect("fits by format"))
        } else {
            Wide::from_u128(b.to_u128().expect("fits by format"))
        }
    };
    QValue::new(f, bits).expect("shift is exact")
}

#[derive(Clone, Debug, Default)]
struct Acc {
    max_abs: Vec<Rational>,
    sum: Vec<f64>,
    sumsq: Vec<f64>,
    sig: Vec<f64>,
    random: u64,
    samples: u64,
    overflow: Vec<u64>,
}

impl Acc {
    fn new(n: usize) -> Acc {
        Acc {
            max_abs: vec![Rational::new(); n],
            sum: vec![0.0; n],
            sumsq: vec![0.0; n],
            sig: vec![0.0; n],
            random: 0,
            samples: 0,
            overflow: vec![0; n],
        }
    }

    fn merge(mut self, o: Acc) -> Acc {
        for i in 0..self.sum.len() {
            if o.max_abs[i] > self.max_abs[i] {
                self.max_abs[i].clone_from(&o.max_abs[i]);
            }
            self.sum[i] += o.sum[i];
            self.sumsq[i] += o.sumsq[i];
            self.sig[i] += o.sig[i];
            self.overflow[i] += o.overflow[i];
        }
        self.random += o.random;
        self.samples += o.samples;
        self
    }
}

struct Run<'a> {
    sim: Simulator<'a>,
    analysis: &'a Analysis,
    /// Per input: the grid (exact) or real (quantized) range ends.
    ends: Vec<(Rational, Rational)>,
    steps: Vec<Rational>,
}

impl Run<'_> {
    /// Evaluate one vector, record it, check the bounds; returns the error
    /// of every node.
    fn record(
        &self,
        acc: &mut Acc,
        inputs: &[InputValue],
        words: &[u64],
        random: bool,
    ) -> Result<Vec<Rational>, SimulationError> {
        let (fixed, ovf) = self.sim.eval_fixed(inputs, words);
        let exact = self.sim.eval_exact(inputs);
        let mut errs = Vec::with_capacity(fixed.len());
        for i in 0..fixed.len() {
            let e = Rational::from(&qvalue_to_rational(fixed[i]) - &exact[i]);
            let b = &self.analysis.nodes[i].error;
            if !b.contains(&e) {
                return Err(SimulationError::BoundViolation {
                    node: i,
                    label: self.sim.path.label(NodeId(i)),
                    measured: e.to_string(),
                    lo: b.lo.to_string(),
                    hi: b.hi.to_string(),
                    inputs: inputs
                        .iter()
                        .map(|x| x.ideal.to_string())
                        .collect::<Vec<_>>()
                        .join(", "),
                });
            }
            let a = Rational::from(e.abs_ref());
            if a > acc.max_abs[i] {
                acc.max_abs[i].clone_from(&a);
            }
            if random {
                let ef = e.to_f64();
                let vf = exact[i].to_f64();
                acc.sum[i] += ef;
                acc.sumsq[i] += ef * ef;
                acc.sig[i] += vf * vf;
            }
            if ovf[i] {
                acc.overflow[i] += 1;
            }
            errs.push(e);
        }
        if random {
            acc.random += 1;
        }
        acc.samples += 1;
        Ok(errs)
    }

    fn random_vector(&self, rng: &mut ChaCha8Rng) -> Vec<InputValue> {
        (0..self.ends.len())
            .map(|k| {
                let (lo, hi) = &self.ends[k];
                let x = if self.is_exact(k) {
                    // Uniform over the grid points lo, lo + q, ..., hi.
                    let n =
                        Integer::from((Rational::from(hi - lo) / &self.steps[k]).numer()) + 1u32;
                    let r = Integer::from(rng.random::<u128>()) % n;
                    lo + Rational::from(r) * &self.steps[k]
                } else {
                    // A real value: lo + (hi - lo)·u/2^m with u uniform in
                    // [0, 2^m], m at least 24 bits finer than the format's
                    // step over the whole range, so rounding residues are
                    // uniform too.
                    let f = self.sim.path.node(self.sim.inputs[k]).format;
                    let m = (f.width() + 24).max(48);
                    let mut u = Integer::new();
                    for _ in 0..m.div_ceil(64) {
                        u = (u << 64u32) + rng.random::<u64>();
                    }
                    u.keep_bits_mut(m);
                    lo + Rational::from(hi - lo) * Rational::from(u) * pow2(-i64::from(m))
                };
                self.sim.input_value(k, x, rng.random())
            })
            .collect()
    }

    fn is_exact(&self, k: usize) -> bool {
        matches!(
            self.sim.path.node(self.sim.inputs[k]).op,
            Op::Input {
                kind: InputKind::Exact,
                ..
            }
        )
    }

    fn corner(&self, bits: &[bool]) -> Vec<InputValue> {
        bits.iter()
            .enumerate()
            .map(|(k, &up)| {
                let x = if up {
                    self.ends[k].1.clone()
                } else {
                    self.ends[k].0.clone()
                };
                self.sim.input_value(k, x, u64::MAX / 2)
            })
            .collect()
    }
}

/// Simulate `path`, check every measured error against the analysis, and
/// return the full report with the measurements.
///
/// # Errors
/// [`SimulationError::BoundViolation`] if a measured error passes its bound
/// (a bug in the analysis, reported loudly).
pub fn simulate(
    path: &Datapath,
    analysis: &Analysis,
    opts: &SimulationOptions,
) -> Result<Report, SimulationError> {
    let sim = Simulator::new(path);
    let ends: Vec<(Rational, Rational)> = sim
        .inputs
        .iter()
        .map(|&id| {
            let n = path.node(id);
            let Op::Input { lo, hi, kind } = &n.op else {
                unreachable!()
            };
            match kind {
                InputKind::Exact => (
                    ceil_to_grid(lo, n.format.frac_bits()),
                    floor_to_grid(hi, n.format.frac_bits()),
                ),
                InputKind::Quantized(_) => (lo.clone(), hi.clone()),
            }
        })
        .collect();
    let steps = sim
        .inputs
        .iter()
        .map(|&id| ulp(path.node(id).format))
        .collect();
    let run = Run {
        sim,
        analysis,
        ends,
        steps,
    };
    let n = path.nodes().len();
    let n_in = run.ends.len();
    // Random vectors, in parallel chunks with their own seeded streams.
    const CHUNK: u64 = 256;
    let chunks = opts.random_vectors.div_ceil(CHUNK);
    let acc = (0..chunks)
        .into_par_iter()
        .map(|c| -> Result<Acc, SimulationError> {
            let mut rng = ChaCha8Rng::seed_from_u64(opts.seed);
            rng.set_stream(c);
            let mut acc = Acc::new(n);
            let count = CHUNK.min(opts.random_vectors - c * CHUNK);
            let mut words = vec![0u64; n];
            for _ in 0..count {
                let v = run.random_vector(&mut rng);
                for w in &mut words {
                    *w = rng.random();
                }
                run.record(&mut acc, &v, &words, true)?;
            }
            Ok(acc)
        })
        .try_reduce(|| Acc::new(n), |a, b| Ok(a.merge(b)))?;
    // Corners.
    let all_corners = n_in < 63 && (1u64 << n_in) <= opts.max_corners;
    let corner_count = if n_in == 0 {
        0
    } else if all_corners {
        1u64 << n_in
    } else {
        opts.max_corners
    };
    let corner_words = vec![u64::MAX / 2; n];
    let mut rng = ChaCha8Rng::seed_from_u64(opts.seed ^ 0xc0_12e2);
    let corners: Vec<Vec<bool>> = (0..corner_count)
        .map(|c| {
            (0..n_in)
                .map(|k| {
                    if all_corners {
                        (c >> k) & 1 == 1
                    } else {
                        rng.random::<bool>()
                    }
                })
                .collect()
        })
        .collect();
    let outs: Vec<usize> = path.outputs().iter().map(|o| o.node.0).collect();
    // Per output and direction (max, min): the best corner so far.
    let corner_results = corners
        .par_iter()
        .map(|bits| -> Result<(Acc, Vec<Rational>), SimulationError> {
            let mut a = Acc::new(n);
            let v = run.corner(bits);
            let errs = run.record(&mut a, &v, &corner_words, false)?;
            Ok((a, outs.iter().map(|&o| errs[o].clone()).collect()))
        })
        .collect::<Result<Vec<_>, _>>()?;
    let mut acc = acc;
    let mut best: Vec<[(Rational, usize); 2]> =
        vec![[(Rational::new(), usize::MAX), (Rational::new(), usize::MAX)]; outs.len()];
    for (ci, (a, errs)) in corner_results.into_iter().enumerate() {
        acc = acc.merge(a);
        for (oi, e) in errs.iter().enumerate() {
            if best[oi][0].1 == usize::MAX || *e > best[oi][0].0 {
                best[oi][0] = (e.clone(), ci);
            }
            if best[oi][1].1 == usize::MAX || *e < best[oi][1].0 {
                best[oi][1] = (e.clone(), ci);
            }
        }
    }
    // Worst-case search per output and direction.
    let mut search_vectors = 0u64;
    if opts.search && n_in > 0 && !corners.is_empty() {
        let jobs: Vec<(usize, usize)> = (0..outs.len()).flat_map(|o| [(o, 0), (o, 1)]).collect();
        let results = jobs
            .par_iter()
            .map(|&(oi, dir)| {
                search(
                    &run,
                    &corners[best[oi][dir].1],
                    outs[oi],
                    dir == 0,
                    opts.search_steps,
                    n,
                )
            })
            .collect::<Result<Vec<_>, _>>()?;
        for a in results {
            search_vectors += a.samples;
            acc = acc.merge(a);
        }
    }
    let measured: Vec<Measured> = (0..n)
        .map(|i| {
            let r = acc.random.max(1) as f64;
            let mean = acc.sum[i] / r;
            let ms = acc.sumsq[i] / r;
            let bound = analysis.nodes[i].error.max_abs();
            Measured {
                samples: acc.samples,
                max_abs: Exact::new(&acc.max_abs[i]),
                mean,
                rms: ms.sqrt(),
                std_dev: (ms - mean * mean).max(0.0).sqrt(),
                signal_power: acc.sig[i] / r,
                tightness: (!acc.max_abs[i].is_zero())
                    .then(|| Rational::from(&bound / &acc.max_abs[i]).to_f64()),
                overflow_events: acc.overflow[i],
            }
        })
        .collect();
    let summary = SimulationSummary {
        seed: opts.seed,
        random_vectors: opts.random_vectors,
        corner_vectors: corner_count,
        all_corners,
        search_vectors,
        node_evaluations: acc.samples * n as u64,
        bound_violations: 0,
    };
    Ok(assemble(path, analysis, Some(&measured), Some(summary)))
}

/// Coordinate ascent over the corners, then a residue walk: move one input
/// at a time up to `steps` ulps inward, keeping any move that pushes the
/// output's error further in the wanted direction.
fn search(
    run: &Run<'_>,
    start: &[bool],
    out: usize,
    maximize: bool,
    steps: u32,
    n: usize,
) -> Result<Acc, SimulationError> {
    let mut acc = Acc::new(n);
    let words = vec![u64::MAX / 2; n];
    let better = |a: &Rational, b: &Rational| if maximize { a > b } else { a < b };
    let mut bits = start.to_vec();
    let mut cur = run.record(&mut acc, &run.corner(&bits), &words, false)?[out].clone();
    for _ in 0..4 {
        let mut changed = false;
        for k in 0..bits.len() {
            bits[k] = !bits[k];
            let e = run.record(&mut acc, &run.corner(&bits), &words, false)?[out].clone();
            if better(&e, &cur) {
                cur = e;
                changed = true;
            } else {
                bits[k] = !bits[k];
            }
        }
        if !changed {
            break;
        }
    }
    let mut xs: Vec<Rational> = bits
        .iter()
        .enumerate()
        .map(|(k, &up)| {
            if up {
                run.ends[k].1.clone()
            } else {
                run.ends[k].0.clone()
            }
        })
        .collect();
    let vector = |xs: &[Rational]| -> Vec<InputValue> {
        xs.iter()
            .enumerate()
            .map(|(k, x)| run.sim.input_value(k, x.clone(), u64::MAX / 2))
            .collect()
    };
    for _ in 0..2 {
        let mut changed = false;
        for k in 0..xs.len() {
            let (lo, hi) = &run.ends[k];
            let inward = if xs[k] == *hi { -1 } else { 1 };
            let mut best_x = xs[k].clone();
            for d in 1..=steps {
                let x = &xs[k] + Rational::from(inward * i64::from(d)) * &run.steps[k];
                if x < *lo || x > *hi {
                    break;
                }
                let old = std::mem::replace(&mut xs[k], x);
                let e = run.record(&mut acc, &vector(&xs), &words, false)?[out].clone();
                if better(&e, &cur) {
                    cur = e;
                    best_x.clone_from(&xs[k]);
                    changed = true;
                }
                xs[k] = old;
            }
            xs[k] = best_x;
        }
        if !changed {
            break;
        }
    }
    Ok(acc)
}
