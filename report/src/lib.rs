//! # qbound-report: the audit engine
//!
//! Takes a fixed-point datapath (inputs with ranges, constants, exact
//! operators, explicit rescales, named outputs with error budgets) and
//! reports, for every node: its format, the range of its ideal and actual
//! value, whether it can overflow and what happens then, a sound
//! worst-case error bound against exact real arithmetic, the
//! quantization-noise model's mean and standard deviation of the error,
//! and, for each output, the SQNR and a breakdown of the error by source.
//! A simulation evaluates random and corner input vectors bit-exactly with
//! `qbound`'s kernels and exactly with [`arith::Num`], and fails loudly if
//! any measured error passes its bound.
//!
//! ```
//! use qbound_report::{analyze, parse, simulate, SimulationOptions};
//! let path = parse("\
//! input x : Q0.15 in [-1, 0.999]
//! const c = 0.3 : Q0.15
//! let y = rescale(c * x, Q0.15, nearest-even, saturate)
//! output y budget 1 ulp
//! ")?;
//! let analysis = analyze(&path);
//! let report = simulate(&path, &analysis, &SimulationOptions { random_vectors: 200, ..Default::default() })?;
//! assert!(report.outputs[0].budget.as_ref().unwrap().met_by_bound);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! The engine is pure Rust (no C library): exact numbers are `N·2^a·5^b`
//! with a native 128-bit fast path and `dashu-int` behind it.
//!
//! The audit supports but does not replace the verification that the
//! applicable safety standard and local practice require for control loops
//! and safety-related firmware.
//!
//! ## Layout (arrows point down only)
//!
//! - [`arith`]: sound numbers (exact `N·2^a·5^b`, intervals with outward
//!   rounding, format grids, decimal text);
//! - [`model`]: the datapath graph, its builder, and [`model::parse`] for
//!   the text format;
//! - [`analysis`]: one transfer rule per operation (value forms for
//!   ranges, error forms for bounds, moments for the noise model);
//! - [`simulate`]: vectors, fixed-point vs exact evaluation, the
//!   worst-case search, test vectors;
//! - [`verdict`]: the plain-data report, its assembly, the CI gate;
//! - [`choose`]: format questions (desk answers today);
//! - [`render`]: terminal, Markdown, JSON, HTML with SVG;
//! - `src/bin/qbound.rs`: the thin command line.

#![forbid(unsafe_code)]
#![deny(missing_docs)]
// The bound-violation error carries the whole input vector as text on purpose:
// it is the bug report. It is returned once per run, never in a hot path.
#![allow(clippy::result_large_err)]

pub mod analysis;
pub mod arith;
pub mod choose;
pub mod model;
pub mod render;
pub mod simulate;
pub mod verdict;

pub use analysis::{Analysis, AnalysisOptions, analyze, analyze_with};
pub use arith::{Interval, Num, parse_decimal};
pub use choose::describe;
pub use model::parse::{ParseError, parse};
pub use model::{Budget, Builder, Datapath, InputKind, ModelError, Node, NodeId, Op, Output, Span};
pub use simulate::vectors;
pub use simulate::{InputValue, SimulationError, SimulationOptions, Simulator};
pub use verdict::{Report, gate};

/// Simulate `path` with `opts`, check every measured error against
/// `analysis`, and return the full report.
///
/// # Errors
/// [`SimulationError::BoundViolation`] if a measured error passes its bound
/// (a bug in the analysis, reported loudly).
pub fn simulate(
    path: &Datapath,
    analysis: &Analysis,
    opts: &SimulationOptions,
) -> Result<Report, SimulationError> {
    let sim = simulate::run(path, analysis, opts, simulate::Control::default())?;
    Ok(verdict::assemble(path, analysis, Some(&sim)))
}
