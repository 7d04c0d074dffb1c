//! The static analysis: ranges, overflow verdicts, sound worst-case error
//! bounds and the quantization-noise model, for every node of a
//! [`Datapath`].
//!
//! # Error model
//!
//! For node `n` with ideal value `v` (exact real arithmetic on the exact
//! inputs and the exact decimal constants) and actual value `ṽ` (bit-exact
//! fixed point), the error is `e = ṽ - v`. It is kept as an affine form
//! in the error sources ([`form`]):
//!
//! ```text
//! e = Σ_s  g_s · ε_s  +  r
//! ```
//!
//! where each `ε_s` is the error one source adds where it enters (a
//! rounding, a constant's quantization, an input's quantization, a
//! saturation), known to lie in an interval, `g_s` is the coefficient with
//! which it reaches `n` (an interval: a point for linear datapaths, the
//! operand's range after a multiply), and `r` an interval for what does not
//! fit the form (products of two errors, folded small terms). Keeping each
//! source apart makes a sum of many terms tight: every source is bounded
//! once, by its own worst case, instead of being widened at every node it
//! passes.
//!
//! Propagation: `a ± b` adds the forms; `-a` and `a·2^k` scale by a
//! point; `a·b` gives `e = v_a·e_b + v_b·e_a + e_a·e_b`: the terms of `e_b`
//! are scaled by the range of `v_a` (and the other way round), and
//! `e_a·e_b` is bounded by the product of the two error intervals into `r`.
//! A rescale adds its rounding source; a node that can saturate adds a
//! saturation source `σ = clamp(u) - u`; a node that can wrap adds a wrap
//! source.
//!
//! # Ranges
//!
//! The ideal value of every node is an affine form in the inputs
//! (`value.rs`), so ranges know which operands are the same signal:
//! `x - x` is 0 and `y - rescale(y, ..)` ranges over a rounding error. The
//! form's range is intersected with plain interval arithmetic. The actual
//! value's range is the interval-arithmetic range intersected with the
//! format and with `ideal + error`.
//!
//! The reported bound of a node is the intersection of the affine error
//! form evaluated, `actual range - ideal range`, and (after saturation)
//! `[min(E.lo, max - v.hi), max(E.hi, min - v.lo)]`.
//!
//! # Precision
//!
//! Every interval is a guaranteed enclosure. Ends are exact numbers
//! ([`crate::arith::Num`]) while they cost at most
//! [`AnalysisOptions::precision`] bits; beyond, they are rounded outward
//! (lower ends down, upper ends up) to that many significant bits. Inputs,
//! constants, budgets and format ranges are exact; so is every bound of a
//! datapath whose numbers stay short (all demos).
//!
//! # Noise model
//!
//! Each source is an independent random variable with the mean and
//! variance derived in [`rounding_moments`]; inputs are independent and
//! uniform over their ranges; signal moments come from the value forms
//! (linear parts exact, products as for independent operands). Saturation
//! and wrap are outside the model (their moments are taken as 0).

pub mod form;
mod rounding;
mod rules;
mod scale;
mod terms;
mod value;

use qbound::Overflow;

use crate::arith::{Interval, Num};
use crate::model::{Datapath, NodeId};

pub use form::{Affine, Source, SourceKind, Term, term_interval};
pub use rounding::{Sign, rounding_interval, rounding_moments};

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
    /// Significant bits kept at an interval end whose exact value would
    /// cost more (a long recursion's exact range needs more bits at every
    /// step); such ends are rounded outward, so every bound stays sound.
    /// The default, 120, keeps a rounded end within the 128-bit fast path
    /// and its relative change below 10^-36. `u32::MAX` never rounds
    /// (exact, for tests; cost can then grow with depth).
    pub precision: u32,
}

impl Default for AnalysisOptions {
    fn default() -> AnalysisOptions {
        AnalysisOptions {
            max_terms: 256,
            precision: 120,
        }
    }
}

/// What the analysis found about overflow at a node where an overflow mode
/// acts (a rescale or a quantized input).
#[derive(Clone, Debug)]
pub struct OverflowInfo {
    /// The overflow mode acting at the node.
    pub mode: Overflow,
    /// Whether the value can leave the format.
    pub can_overflow: bool,
    /// The range before the overflow mode acts.
    pub unclamped: Option<Interval>,
    /// The largest saturation error, if it can saturate.
    pub saturation_error: Option<Num>,
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
    /// The error's affine form, at outputs and at nodes nobody reads (at
    /// other nodes the terms moved on to the consumers).
    pub form: Option<Box<Affine>>,
    /// Predicted mean of the ideal value.
    pub signal_mean: f64,
    /// Predicted variance of the ideal value.
    pub signal_var: f64,
    /// Predicted mean of the error.
    pub err_mean: f64,
    /// Predicted variance of the error.
    pub err_var: f64,
    /// Overflow verdict, at nodes where an overflow mode acts (`None` for
    /// exact operations, which cannot overflow).
    pub overflow: Option<Box<OverflowInfo>>,
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
/// assert_eq!(a.nodes[1].error.lo.to_string(), "-3/16");
/// # Ok::<(), qbound_report::ParseError>(())
/// ```
#[must_use]
pub fn analyze(path: &Datapath) -> Analysis {
    analyze_with(path, &AnalysisOptions::default())
}

/// Analyse `path`.
///
/// ```
/// // Ranges know that both operands are the same signal.
/// let path = qbound_report::parse("\
/// input x : Q0.15 in [-1, 0.5]
/// let d = x - rescale(x, Q0.7, floor, saturate)
/// output d")?;
/// let a = qbound_report::analyze(&path);
/// let d = &a.nodes[2];
/// assert_eq!((d.actual.lo.to_string(), d.actual.hi.to_string()), ("0".into(), "255/32768".into()));
/// # Ok::<(), qbound_report::ParseError>(())
/// ```
#[must_use]
pub fn analyze_with(path: &Datapath, opts: &AnalysisOptions) -> Analysis {
    let mut w = rules::Work::new(path, opts);
    let mut a = Analysis {
        nodes: Vec::with_capacity(path.nodes().len()),
        sources: Vec::new(),
    };
    let mut is_output = vec![false; path.nodes().len()];
    for o in path.outputs() {
        is_output[o.node.0] = true;
    }
    for (i, out) in is_output.iter().enumerate() {
        let step = rules::node(path, &mut a, &mut w, NodeId(i));
        let na = w.finish(path, NodeId(i), step, *out);
        a.nodes.push(na);
    }
    a
}
