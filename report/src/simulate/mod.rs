//! Simulation: evaluate the datapath on input vectors bit-exactly (with
//! `qbound`'s [`qbound::QValue`] kernels) and exactly (with [`Num`]),
//! measure every node's error, and check it against the analysis' bound.
//!
//! Vectors: seeded random vectors (see [`sample`]), every corner of the
//! input box (or a random sample of corners when there are too many), and
//! a search for the worst error at each output: coordinate ascent over the
//! corners from the worst corner found, then a walk that moves one input at
//! a time a few ulps inward, which steers the residues that the roundings
//! discard toward their worst case.
//!
//! Random vectors run in parallel chunks of 256, each chunk its own
//! ChaCha8 stream from the seed, in batches: memory stays bounded however
//! many vectors are asked for, a progress callback hears after every
//! batch, and a stop flag ends the run cleanly between batches (the
//! measurements so far are kept and the summary says it was interrupted).
//!
//! A measured error outside its bound is a bug in the analysis: the run
//! stops with [`SimulationError::BoundViolation`].

mod eval;
pub mod sample;
mod search;
pub mod vectors;

use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};

pub use eval::{InputValue, Simulator};
pub use sample::Sampler;

use crate::analysis::Analysis;
use crate::arith::{Exact, Num, qvalue_to_num};
use crate::model::{Datapath, NodeId};

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
    /// Bins of each output's error histogram (over its sound bound).
    pub histogram_bins: usize,
}

impl Default for SimulationOptions {
    fn default() -> SimulationOptions {
        SimulationOptions {
            seed: 0x05ee_d0fa_0d17,
            random_vectors: 10_000,
            max_corners: 4096,
            search: true,
            search_steps: 16,
            histogram_bins: 41,
        }
    }
}

/// Progress reports and a stop flag for a long run.
#[derive(Clone, Copy, Default)]
pub struct Control<'a> {
    /// Called with (random vectors done, random vectors asked for) after
    /// every batch.
    pub progress: Option<&'a (dyn Fn(u64, u64) + Sync)>,
    /// When set, the run stops after the current batch, skips the corners
    /// and the search, and reports what it measured.
    pub stop: Option<&'a AtomicBool>,
}

impl std::fmt::Debug for Control<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Control")
            .field("progress", &self.progress.is_some())
            .field("stop", &self.stop)
            .finish()
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

/// What the simulation measured at a node.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Measured {
    /// Number of vectors evaluated (random + corners + search).
    pub samples: u64,
    /// Largest |error| seen over all vectors (exact).
    pub max_abs: Exact,
    /// Mean error over the random vectors.
    pub mean: f64,
    /// Root-mean-square error over the random vectors.
    pub rms: f64,
    /// Standard deviation of the error over the random vectors.
    pub std_dev: f64,
    /// Mean square of the ideal value over the random vectors.
    pub signal_power: f64,
    /// Bound / measured max error (`None` when the measured max is 0).
    pub tightness: Option<f64>,
    /// Times the overflow mode acted (saturated, wrapped or would have
    /// panicked) over all vectors.
    pub overflow_events: u64,
}

/// The error of one output over the random vectors, binned over its sound
/// bound.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ErrorHistogram {
    /// Left edge of the first bin (the sound bound's lower end).
    pub lo: f64,
    /// Right edge of the last bin (the sound bound's upper end).
    pub hi: f64,
    /// Counts per bin, equal widths over `[lo, hi]`.
    pub counts: Vec<u64>,
    /// Number of vectors.
    pub samples: u64,
    /// Smallest and largest error seen.
    pub seen: (f64, f64),
}

/// What the simulation did.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SimulationSummary {
    /// The seed of the random vectors.
    pub seed: u64,
    /// Random vectors evaluated (inputs uniform over their ranges).
    pub random_vectors: u64,
    /// Random vectors asked for (more than evaluated if interrupted).
    pub random_vectors_requested: u64,
    /// Corner vectors (every input at an end of its range).
    pub corner_vectors: u64,
    /// Whether the corners were all of them or a sample.
    pub all_corners: bool,
    /// Vectors evaluated by the worst-case search.
    pub search_vectors: u64,
    /// Node evaluations (fixed-point side; the exact side did as many).
    pub node_evaluations: u64,
    /// Whether any measured error passed its bound (never, unless the
    /// analysis has a bug: the run fails with an error in that case).
    pub bound_violations: u64,
    /// Whether the run was stopped before it finished (Ctrl-C).
    pub interrupted: bool,
}

/// The measurements of one simulation run.
#[derive(Clone, Debug)]
pub struct Simulation {
    /// Per node, in order.
    pub measured: Vec<Measured>,
    /// Per output, in order.
    pub histograms: Vec<ErrorHistogram>,
    /// The run.
    pub summary: SimulationSummary,
}

/// Per-node accumulators of one chunk of vectors.
#[derive(Clone, Debug)]
struct Acc {
    max_abs: Vec<Num>,
    sum: Vec<f64>,
    sumsq: Vec<f64>,
    sig: Vec<f64>,
    random: u64,
    samples: u64,
    overflow: Vec<u64>,
    /// Per output: bin counts, min and max error seen.
    hist: Vec<(Vec<u64>, f64, f64)>,
}

impl Acc {
    fn new(n: usize, outs: usize, bins: usize) -> Acc {
        Acc {
            max_abs: vec![Num::ZERO; n],
            sum: vec![0.0; n],
            sumsq: vec![0.0; n],
            sig: vec![0.0; n],
            random: 0,
            samples: 0,
            overflow: vec![0; n],
            hist: vec![(vec![0; bins], f64::INFINITY, f64::NEG_INFINITY); outs],
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
        for (h, g) in self.hist.iter_mut().zip(o.hist) {
            for (a, b) in h.0.iter_mut().zip(g.0) {
                *a += b;
            }
            h.1 = h.1.min(g.1);
            h.2 = h.2.max(g.2);
        }
        self.random += o.random;
        self.samples += o.samples;
        self
    }
}

/// Evaluates vectors and records them against the analysis.
struct Run<'a> {
    sampler: Sampler<'a>,
    analysis: &'a Analysis,
    /// Output nodes and their histogram ranges (the bounds, as f64).
    outs: Vec<(usize, f64, f64)>,
    bins: usize,
}

/// Reused buffers of one worker.
#[derive(Default)]
struct Scratch {
    fixed: Vec<qbound::QValue>,
    ovf: Vec<bool>,
    exact: Vec<Num>,
    errs: Vec<Num>,
}

impl Run<'_> {
    fn new_acc(&self) -> Acc {
        Acc::new(
            self.analysis.nodes.len(),
            self.outs.len(),
            if self.bins > 0 { self.bins } else { 1 },
        )
    }

    /// Evaluate one vector, record it, check the bounds; leaves the error
    /// of every node in `s.errs`.
    fn record(
        &self,
        acc: &mut Acc,
        s: &mut Scratch,
        inputs: &[InputValue],
        words: &[u64],
        random: bool,
    ) -> Result<(), SimulationError> {
        let sim = self.sampler.simulator();
        sim.eval_fixed_into(inputs, words, &mut s.fixed, &mut s.ovf);
        sim.eval_exact_into(inputs, &mut s.exact);
        s.errs.clear();
        for i in 0..s.fixed.len() {
            let e = qvalue_to_num(s.fixed[i]) - &s.exact[i];
            let b = &self.analysis.nodes[i].error;
            if !b.contains(&e) {
                return Err(SimulationError::BoundViolation {
                    node: i,
                    label: sim.path().label(NodeId(i)),
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
            let a = e.abs();
            if a > acc.max_abs[i] {
                acc.max_abs[i] = a;
            }
            if random {
                let ef = e.to_f64();
                let vf = s.exact[i].to_f64();
                acc.sum[i] += ef;
                acc.sumsq[i] += ef * ef;
                acc.sig[i] += vf * vf;
            }
            if s.ovf[i] {
                acc.overflow[i] += 1;
            }
            s.errs.push(e);
        }
        if random {
            for (k, &(o, lo, hi)) in self.outs.iter().enumerate() {
                let e = s.errs[o].to_f64();
                let h = &mut acc.hist[k];
                let width = hi - lo;
                let bins = h.0.len();
                let b = if width > 0.0 {
                    (((e - lo) / width) * bins as f64).floor().max(0.0) as usize
                } else {
                    0
                };
                h.0[b.min(bins - 1)] += 1;
                h.1 = h.1.min(e);
                h.2 = h.2.max(e);
            }
            acc.random += 1;
        }
        acc.samples += 1;
        Ok(())
    }

    /// Random vectors `[first, first + count)` of chunk `c`.
    fn chunk(&self, seed: u64, c: u64, count: u64) -> Result<Acc, SimulationError> {
        let mut rng = ChaCha8Rng::seed_from_u64(seed);
        rng.set_stream(c);
        let mut acc = self.new_acc();
        let mut s = Scratch::default();
        let mut words = vec![0u64; self.analysis.nodes.len()];
        for _ in 0..count {
            let v = self.sampler.random(&mut rng);
            for w in &mut words {
                *w = rng.random();
            }
            self.record(&mut acc, &mut s, &v, &words, true)?;
        }
        Ok(acc)
    }
}

/// Simulate `path` and check every measured error against the analysis.
///
/// # Errors
/// [`SimulationError::BoundViolation`] if a measured error passes its bound
/// (a bug in the analysis, reported loudly).
pub fn run(
    path: &Datapath,
    analysis: &Analysis,
    opts: &SimulationOptions,
    control: Control<'_>,
) -> Result<Simulation, SimulationError> {
    let outs = path
        .outputs()
        .iter()
        .map(|o| {
            let b = &analysis.nodes[o.node.0].error;
            (o.node.0, b.lo.to_f64(), b.hi.to_f64())
        })
        .collect();
    let run = Run {
        sampler: Sampler::new(path),
        analysis,
        outs,
        bins: opts.histogram_bins,
    };
    let n = path.nodes().len();
    let n_in = run.sampler.input_count();
    let stopped = || control.stop.is_some_and(|s| s.load(Ordering::Relaxed));

    // Random vectors, in batches of parallel chunks.
    const CHUNK: u64 = 256;
    let batch = (rayon::current_num_threads() as u64 * 4).max(4);
    let chunks = opts.random_vectors.div_ceil(CHUNK);
    let done = AtomicU64::new(0);
    let mut acc = run.new_acc();
    let mut c0 = 0;
    while c0 < chunks && !stopped() {
        let c1 = (c0 + batch).min(chunks);
        let part = (c0..c1)
            .into_par_iter()
            .map(|c| {
                let count = CHUNK.min(opts.random_vectors - c * CHUNK);
                let a = run.chunk(opts.seed, c, count)?;
                done.fetch_add(count, Ordering::Relaxed);
                Ok(a)
            })
            .try_reduce(|| run.new_acc(), |a, b| Ok(a.merge(b)))?;
        acc = acc.merge(part);
        if let Some(p) = control.progress {
            p(done.load(Ordering::Relaxed), opts.random_vectors);
        }
        c0 = c1;
    }
    let interrupted = stopped();

    // Corners.
    let all_corners = n_in < 63 && (1u64 << n_in) <= opts.max_corners;
    let corner_count = if n_in == 0 || interrupted {
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
    let outs: Vec<usize> = run.outs.iter().map(|o| o.0).collect();
    // Per output and direction (max, min): the best corner so far.
    let corner_results = corners
        .par_iter()
        .map_init(Scratch::default, |s, bits| {
            let mut a = run.new_acc();
            let v = run.sampler.corner(|k| bits[k]);
            run.record(&mut a, s, &v, &corner_words, false)?;
            Ok((a, outs.iter().map(|&o| s.errs[o].clone()).collect()))
        })
        .collect::<Result<Vec<(Acc, Vec<Num>)>, SimulationError>>()?;
    let mut best: Vec<[(Num, usize); 2]> =
        vec![[(Num::ZERO, usize::MAX), (Num::ZERO, usize::MAX)]; outs.len()];
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
    if opts.search && n_in > 0 && !corners.is_empty() && !interrupted {
        let jobs: Vec<(usize, usize)> = (0..outs.len()).flat_map(|o| [(o, 0), (o, 1)]).collect();
        let results = jobs
            .par_iter()
            .map(|&(oi, dir)| {
                search::search(
                    &run,
                    &corners[best[oi][dir].1],
                    outs[oi],
                    dir == 0,
                    opts.search_steps,
                )
            })
            .collect::<Result<Vec<_>, _>>()?;
        for a in results {
            search_vectors += a.samples;
            acc = acc.merge(a);
        }
    }
    let measured = (0..n)
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
                    .then(|| bound.to_f64() / acc.max_abs[i].to_f64()),
                overflow_events: acc.overflow[i],
            }
        })
        .collect();
    let histograms = run
        .outs
        .iter()
        .zip(acc.hist)
        .map(|(&(_, lo, hi), (counts, min, max))| ErrorHistogram {
            lo,
            hi,
            samples: counts.iter().sum(),
            counts,
            seen: if min <= max { (min, max) } else { (0.0, 0.0) },
        })
        .collect();
    Ok(Simulation {
        measured,
        histograms,
        summary: SimulationSummary {
            seed: opts.seed,
            random_vectors: acc.random,
            random_vectors_requested: opts.random_vectors,
            corner_vectors: corner_count,
            all_corners,
            search_vectors,
            node_evaluations: acc.samples * n as u64,
            bound_violations: 0,
            interrupted,
        },
    })
}
