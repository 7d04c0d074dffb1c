//! Renderers of a [`Report`]: a terminal table, Markdown, JSON and a
//! self-contained HTML page with SVG plots. Each writes to any
//! [`std::io::Write`], so a test can render into a `Vec<u8>`.
//!
//! ```
//! use qbound_report::render::{self, Context, Style};
//! let path = qbound_report::parse("input x : Q0.15 in [-1, 0.5]\nlet y = rescale(x, Q0.7, nearest-even, saturate)\noutput y budget 1 ulp")?;
//! let report = qbound_report::analyze(&path).report(&path);
//! let mut out = Vec::new();
//! render::render(&report, &Context::new("example.qbdp"), Style::Markdown, &mut out)?;
//! assert!(String::from_utf8(out)?.contains("| y |"));
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use std::io::{self, Write};

use crate::verdict::{NodeReport, RangeReport, Report};

pub mod html;
pub mod markdown;
pub mod source;
pub mod svg;
pub mod terminal;

/// The caution printed in every report that is read by people.
pub const SAFETY_CAUTION: &str = "The audit supports but does not replace the verification that \
safety-related firmware (control loops, protective functions) needs under its applicable safety \
standard and local practice: review, testing on the target, and the analyses that standard requires.";

/// Which renderer.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Style {
    /// A table for a terminal (ANSI colour only when [`Context::color`] is set).
    Terminal,
    /// GitHub-flavoured Markdown.
    Markdown,
    /// The engine's [`Report`] serialised as JSON, unchanged.
    Json,
    /// One self-contained HTML file with SVG plots.
    Html,
}

impl Style {
    /// The style for a file name's extension (`.md`, `.json`, `.html`/`.htm`),
    /// if it names one.
    ///
    /// ```
    /// use qbound_report::render::Style;
    /// assert_eq!(Style::from_extension("out/audit.html"), Some(Style::Html));
    /// assert_eq!(Style::from_extension("audit.txt"), None);
    /// ```
    #[must_use]
    pub fn from_extension(file: &str) -> Option<Style> {
        let ext = std::path::Path::new(file).extension()?.to_str()?;
        match ext.to_ascii_lowercase().as_str() {
            "md" | "markdown" => Some(Style::Markdown),
            "json" => Some(Style::Json),
            "html" | "htm" => Some(Style::Html),
            _ => None,
        }
    }
}

/// What a renderer needs beside the report.
#[derive(Clone, Debug, Default)]
pub struct Context {
    /// The audited file's name, shown in titles.
    pub title: String,
    /// The audit text, listed in the HTML report.
    pub source: Option<String>,
    /// Colour the terminal output with ANSI escapes.
    pub color: bool,
}

impl Context {
    /// A context with a title and nothing else.
    ///
    /// ```
    /// let c = qbound_report::render::Context::new("fir.qbdp");
    /// assert!(!c.color);
    /// ```
    #[must_use]
    pub fn new(title: &str) -> Context {
        Context {
            title: title.to_owned(),
            ..Context::default()
        }
    }
}

/// Render `report` in `style` to `out`.
///
/// # Errors
/// Whatever writing to `out` returns.
pub fn render(report: &Report, ctx: &Context, style: Style, out: &mut dyn Write) -> io::Result<()> {
    match style {
        Style::Terminal => terminal::render(report, ctx, out),
        Style::Markdown => markdown::render(report, ctx, out),
        Style::Json => {
            report.write_json(out)?;
            writeln!(out)
        }
        Style::Html => html::render(report, ctx, out),
    }
}

pub use crate::arith::{num, num_sig};

/// One sentence on what confirmed the analysis, for every renderer.
///
/// ```
/// let s = qbound_report::render::simulation_sentence(None);
/// assert_eq!(s, "Sound analysis only (no simulation).");
/// ```
#[must_use]
pub fn simulation_sentence(sim: Option<&crate::simulate::SimulationSummary>) -> String {
    let Some(s) = sim else {
        return "Sound analysis only (no simulation).".to_owned();
    };
    let mut t = format!(
        "Sound analysis, confirmed by a bit-exact simulation against exact arithmetic: {} random, {} corner ({}) and {} search vectors (seed {}); no measured error passed its bound.",
        s.random_vectors,
        s.corner_vectors,
        if s.all_corners { "all" } else { "sampled" },
        s.search_vectors,
        s.seed
    );
    if s.interrupted {
        t.push_str(&format!(
            " INTERRUPTED after {} of {} random vectors (no corners, no search): the measurements are partial.",
            s.random_vectors, s.random_vectors_requested
        ));
    }
    t
}

/// `[lo, hi]` with six significant digits (so `0.999969` does not read
/// as `1`).
#[must_use]
pub fn range_text(r: &RangeReport) -> String {
    format!("[{}, {}]", num_sig(r.lo.approx, 6), num_sig(r.hi.approx, 6))
}

/// The largest and smallest values of a format, from its name (`Q1.15`,
/// `UQ8.8`).
#[must_use]
pub fn format_limits(format: &str) -> Option<(f64, f64)> {
    let f: qbound::Format = format.parse().ok()?;
    let r = crate::arith::format_range(f);
    Some((r.lo.to_f64(), r.hi.to_f64()))
}

/// Headroom of a node in bits: how far the range it takes (before any
/// overflow mode acts) stays inside its format, `log2(format limit / range
/// end)` on the tighter side. Negative when the value can overflow;
/// `None` when the value is always 0.
#[must_use]
pub fn headroom_bits(n: &NodeReport) -> Option<f64> {
    let (fmin, fmax) = format_limits(&n.format)?;
    let (lo, hi) = value_range(n);
    if hi <= 0.0 && lo >= 0.0 {
        return None;
    }
    let mut h = f64::INFINITY;
    if hi > 0.0 {
        h = h.min((fmax.max(f64::MIN_POSITIVE) / hi).log2());
    }
    if lo < 0.0 {
        h = if fmin < 0.0 {
            h.min((fmin / lo).log2())
        } else {
            f64::NEG_INFINITY
        };
    }
    Some(h)
}

/// Headroom as text: `2.0`, `-0.6`, `-` for a value that is always 0.
#[must_use]
pub fn headroom_text(n: &NodeReport) -> String {
    match headroom_bits(n) {
        Some(h) if h.is_finite() => format!("{:.1}", (h * 10.0).floor() / 10.0),
        Some(_) => "-inf".to_owned(),
        None => "-".to_owned(),
    }
}

/// The overflow verdict in a few words: `no`, `exact`, `SATURATES`,
/// `WRAPS`, `PANICS`.
#[must_use]
pub fn overflow_verdict(n: &NodeReport) -> &'static str {
    let o = &n.overflow;
    match (o.can_overflow, o.mode.as_deref()) {
        (false, None) => "exact",
        (false, Some(_)) => "no",
        (true, Some("wrap")) => "WRAPS",
        (true, Some("panic")) => "PANICS",
        (true, Some(_)) => "SATURATES",
        (true, None) => "OVERFLOWS",
    }
}

/// `line 7` or an empty string.
#[must_use]
pub fn line_of(span: Option<crate::model::Span>) -> String {
    span.map(|s| format!("line {}", s.line)).unwrap_or_default()
}

/// The range a node's value takes before any overflow mode acts (the
/// actual range for nodes that cannot overflow), as `f64` ends.
#[must_use]
pub fn value_range(n: &NodeReport) -> (f64, f64) {
    let r = n
        .overflow
        .unclamped_range
        .as_ref()
        .unwrap_or(&n.actual_range);
    (r.lo.approx, r.hi.approx)
}

/// One node's row as the tables show it, every cell as text.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct NodeRow {
    /// Name or `#id (op)`.
    pub label: String,
    /// The operation in a few words.
    pub detail: String,
    /// The format.
    pub format: String,
    /// The fixed-point value's range.
    pub range: String,
    /// Headroom in bits ([`headroom_text`]).
    pub headroom: String,
    /// [`overflow_verdict`].
    pub verdict: &'static str,
    /// Sound worst-case |error|.
    pub bound: String,
    /// The bound in ulps.
    pub ulps: String,
    /// Largest |error| measured, `-` without a simulation.
    pub measured: String,
    /// The line in the audit text, or empty.
    pub line: String,
}

impl NodeRow {
    /// The row of `n`.
    ///
    /// ```
    /// let path = qbound_report::parse("input x : Q0.15 in [-1, 0.5]\nlet y = rescale(x, Q0.7, floor, wrap)\noutput y")?;
    /// let report = qbound_report::analyze(&path).report(&path);
    /// let row = qbound_report::render::NodeRow::new(&report.nodes[1]);
    /// assert_eq!((row.label.as_str(), row.verdict, row.line.as_str()), ("y", "no", "2"));
    /// # Ok::<(), qbound_report::ParseError>(())
    /// ```
    #[must_use]
    pub fn new(n: &NodeReport) -> NodeRow {
        NodeRow {
            label: n.label.clone(),
            detail: n.detail.clone(),
            format: n.format.clone(),
            range: range_text(&n.actual_range),
            headroom: headroom_text(n),
            verdict: overflow_verdict(n),
            bound: num(n.error.max_abs.approx),
            ulps: num(n.error.ulps.approx),
            measured: n
                .measured
                .as_ref()
                .map_or("-".to_owned(), |m| num(m.max_abs.approx)),
            line: n.span.map_or(String::new(), |s| s.line.to_string()),
        }
    }
}
