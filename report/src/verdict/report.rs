//! The audit's results as plain, serde-serialisable data: what the
//! renderers (terminal, Markdown, JSON, HTML) read.
//!
//! Every exact quantity is an [`Exact`]: the exact rational as text
//! (`"-3/65536"`, `"1/3"`, `"0"`) beside an `f64` approximation for display.
//! Statistics (means, standard deviations, SQNR) are `f64`: they are
//! estimates, not bounds.
//!
//! JSON shape (field names as in the structs, `snake_case`):
//!
//! ```text
//! Report { nodes: [NodeReport], sources: [SourceReport], outputs: [OutputReport],
//!          simulation: SimulationSummary | null, diagnostics: [Diagnostic] }
//! ```

use serde::{Deserialize, Serialize};

pub use crate::analysis::SourceKind;
pub use crate::arith::Exact;
use crate::model::Span;
pub use crate::simulate::{ErrorHistogram, Measured, SimulationSummary};

/// A closed range `[lo, hi]`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RangeReport {
    /// Lower end.
    pub lo: Exact,
    /// Upper end.
    pub hi: Exact,
}

/// How serious a finding is.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Severity {
    /// Nothing to report.
    None,
    /// Informational.
    Note,
    /// Works as designed but worth a look (saturation can happen, a budget
    /// is close).
    Warning,
    /// Wrong results possible (wrap-around, panic, budget exceeded).
    Error,
}

/// Whether a node can overflow and what happens there.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct OverflowReport {
    /// Whether some input in the ranges makes the value leave the format.
    pub can_overflow: bool,
    /// The overflow mode at the node (`wrap`, `saturate`, ...) or `None`
    /// for exact operators (they cannot overflow) and for exact inputs.
    pub mode: Option<String>,
    /// `error` for wrap and panic, `warning` for saturation, `none`.
    pub severity: Severity,
    /// For saturating nodes that can saturate: the largest amount by which
    /// the value can be clamped (the saturation error, exact).
    pub largest_saturation_error: Option<Exact>,
    /// The range the value would take before the overflow mode acts.
    pub unclamped_range: Option<RangeReport>,
    /// A sentence for people.
    pub detail: String,
}

/// A sound worst-case error bound: for every input in the ranges, the
/// node's actual value minus its ideal value lies in `[lo, hi]`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct ErrorBound {
    /// Smallest possible error.
    pub lo: Exact,
    /// Largest possible error.
    pub hi: Exact,
    /// `max(|lo|, |hi|)`.
    pub max_abs: Exact,
    /// `max_abs` in ulps of the node's format.
    pub ulps: Exact,
}

/// The quantization-noise model's estimate of the error (inputs uniform
/// over their ranges, each rounding an independent source uniform over its
/// discrete residues).
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct ErrorStats {
    /// Predicted mean error.
    pub mean: f64,
    /// Predicted standard deviation of the error.
    pub std_dev: f64,
}

/// One node's analysis.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct NodeReport {
    /// Index in the datapath.
    pub id: usize,
    /// Name, or `#id (op)`.
    pub label: String,
    /// Operation kind: `input`, `const`, `add`, `sub`, `neg`, `mul`,
    /// `shift`, `rescale`.
    pub op: String,
    /// A one-line description (`mul #3 #4`, `rescale #7 nearest-even saturate`).
    pub detail: String,
    /// Operand indices.
    pub operands: Vec<usize>,
    /// Where it was written in the audit text.
    pub span: Option<Span>,
    /// Its format (`Q1.15`).
    pub format: String,
    /// Word length in bits.
    pub width: u32,
    /// The format's step.
    pub ulp: Exact,
    /// Range of the ideal (exact real) value.
    pub ideal_range: RangeReport,
    /// Range of the actual (fixed-point) value.
    pub actual_range: RangeReport,
    /// Overflow verdict.
    pub overflow: OverflowReport,
    /// Sound worst-case error bound.
    pub error: ErrorBound,
    /// Statistical estimate of the error.
    pub stats: ErrorStats,
    /// Simulation results, if a simulation ran.
    pub measured: Option<Measured>,
}

/// One error source.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SourceReport {
    /// Index among the sources.
    pub id: usize,
    /// The node where the error enters.
    pub node: usize,
    /// What kind of source.
    pub kind: SourceKind,
    /// For people: `rounding at acc (nearest-even, 15 bits dropped)`.
    pub label: String,
    /// The exact interval of the error it adds.
    pub interval: RangeReport,
    /// Mean of the error it adds (noise model).
    pub mean: f64,
    /// Standard deviation of the error it adds (noise model).
    pub std_dev: f64,
}

/// How much of an output's error comes from one source.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Contribution {
    /// The source index (into [`Report::sources`]), or `None` for the
    /// combined remainder (products of errors, folded small terms).
    pub source: Option<usize>,
    /// The source's label.
    pub label: String,
    /// The kind, or `None` for the remainder.
    pub kind: Option<SourceKind>,
    /// The exact interval this source adds to the output error.
    pub interval: RangeReport,
    /// `max |contribution|` (exact).
    pub max_abs: Exact,
    /// Share of the sum of all contributions' `max_abs` (0..1).
    pub share_of_bound: f64,
    /// Share of the predicted error variance (0..1).
    pub share_of_variance: f64,
}

/// An output's budget check.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct BudgetReport {
    /// The budget as written (`3e-5` or `2 ulp`).
    pub written: String,
    /// The budget as an absolute error.
    pub absolute: Exact,
    /// Whether the sound bound is within the budget (a guarantee).
    pub met_by_bound: bool,
    /// Whether the simulated max error is within the budget.
    pub met_by_simulation: Option<bool>,
}

/// One output's summary.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct OutputReport {
    /// Output name.
    pub name: String,
    /// The node it reads.
    pub node: usize,
    /// Its format.
    pub format: String,
    /// Sound worst-case error bound.
    pub error: ErrorBound,
    /// Statistical estimate.
    pub stats: ErrorStats,
    /// Predicted mean square of the ideal output (inputs uniform over
    /// their ranges).
    pub signal_power: f64,
    /// Predicted SQNR in dB: signal power over predicted error power
    /// (mean² + variance). `None` if the predicted error power is 0.
    pub sqnr_db: Option<f64>,
    /// SQNR measured by the simulation, if it ran.
    pub measured_sqnr_db: Option<f64>,
    /// Budget check, if a budget was given.
    pub budget: Option<BudgetReport>,
    /// The error broken down by source, largest first.
    pub contributions: Vec<Contribution>,
    /// Simulation results for the output node.
    pub measured: Option<Measured>,
    /// The error over the random vectors, binned over the sound bound, if
    /// the simulation ran.
    pub histogram: Option<ErrorHistogram>,
}

/// A finding for people (overflow, budget, rounding that adds nothing...).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Diagnostic {
    /// Severity.
    pub severity: Severity,
    /// The node concerned, if any.
    pub node: Option<usize>,
    /// Where it was written, if known.
    pub span: Option<Span>,
    /// The message.
    pub message: String,
}

/// The audit of one datapath.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Report {
    /// Every node, in evaluation order.
    pub nodes: Vec<NodeReport>,
    /// Every error source.
    pub sources: Vec<SourceReport>,
    /// Every output.
    pub outputs: Vec<OutputReport>,
    /// The simulation, if it ran.
    pub simulation: Option<SimulationSummary>,
    /// Findings, most severe first.
    pub diagnostics: Vec<Diagnostic>,
}

impl Report {
    /// The most severe finding (`Severity::None` if there is none).
    #[must_use]
    pub fn worst_severity(&self) -> Severity {
        self.diagnostics
            .iter()
            .map(|d| d.severity)
            .max()
            .unwrap_or(Severity::None)
    }

    /// The report as pretty-printed JSON.
    ///
    /// # Panics
    /// Never: every field serialises.
    #[must_use]
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).expect("plain data serialises")
    }

    /// Write the report as pretty-printed JSON to `w` as it serialises (no
    /// copy of the text is held: a million-node report streams out).
    ///
    /// # Errors
    /// Whatever writing to `w` returns.
    pub fn write_json(&self, w: &mut dyn std::io::Write) -> std::io::Result<()> {
        let mut w = std::io::BufWriter::with_capacity(1 << 16, w);
        serde_json::to_writer_pretty(&mut w, self).map_err(std::io::Error::other)?;
        std::io::Write::flush(&mut w)
    }
}
