//! # qbound-report: the audit engine
//!
//! Takes a fixed-point datapath (inputs with ranges, constants, exact
//! operators, explicit rescales, named outputs with error budgets) and
//! reports, for every node: its format, the exact range of its ideal and
//! actual value, whether it can overflow and what happens then, a sound
//! worst-case error bound against exact real arithmetic, the
//! quantization-noise model's mean and standard deviation of the error,
//! and, for each output, the SQNR and a breakdown of the error by source.
//! A simulation evaluates random and corner input vectors bit-exactly with
//! `qbound`'s kernels and exactly with `rug` rationals, and fails loudly if
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
//! The audit supports but does not replace the verification that the
//! applicable safety standard and local practice require for control loops
//! and safety-related firmware.

#![forbid(unsafe_code)]
#![deny(missing_docs)]
// The bound-violation error carries the whole input vector as text on purpose:
// it is the bug report. It is returned once per run, never in a hot path.
#![allow(clippy::result_large_err)]

pub mod analysis;
mod assemble;
pub mod exact;
mod form;
pub mod model;
pub mod parse;
pub mod result;
pub mod simulate;

// The `qbound` tool's layers: renderers, the CI gate, test vectors and
// format descriptions (src/bin/qbound.rs is the command line).
pub mod describe;
pub mod gate;
pub mod render;
pub mod vectors;

pub use analysis::{Analysis, AnalysisOptions, analyze, analyze_with};
pub use exact::{Interval, parse_decimal};
pub use model::{Budget, Builder, Datapath, InputKind, ModelError, Node, NodeId, Op, Output, Span};
pub use parse::{ParseError, parse};
pub use result::Report;
pub use simulate::{InputValue, SimulationError, SimulationOptions, Simulator, simulate};
