//! The CI gate (`qbound check`): turns a [`Report`] into pass or fail with
//! one line per reason.
//!
//! A datapath fails when
//! - an output's sound worst-case error bound exceeds its budget (the
//!   bound is a guarantee; a budget met only by the simulation is not);
//! - a node can overflow where its mode wraps (or panics): the result is
//!   then far from the ideal value;
//! - a node can saturate and saturation is not allowed there. Saturation
//!   is a designed behaviour at a controller's output or a converter, and
//!   a sign that guard bits are missing elsewhere, so the gate asks the
//!   designer to say where it is expected (`--allow-saturation NAME`, or
//!   `*` for everywhere).
//!
//! ```
//! use qbound_report::gate::{check, SaturationPolicy};
//! let path = qbound_report::parse("input x : Q3.4 in [-8, 7.9375]\nlet y = rescale(x, Q1.4, floor, saturate)\noutput y")?;
//! let report = qbound_report::analyze(&path).report(&path);
//! assert_eq!(check(&report, &SaturationPolicy::Nowhere).len(), 1);
//! assert!(check(&report, &SaturationPolicy::Only(vec!["y".into()])).is_empty());
//! # Ok::<(), qbound_report::ParseError>(())
//! ```

use super::report::{NodeReport, Report};
use crate::arith::num;

/// Where saturation is allowed.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SaturationPolicy {
    /// Nowhere: every node that can saturate fails the gate.
    Nowhere,
    /// At the nodes with these names.
    Only(Vec<String>),
    /// Everywhere.
    Everywhere,
}

impl SaturationPolicy {
    /// From the command line's list of names (`*` means everywhere).
    #[must_use]
    pub fn from_names(names: &[String]) -> SaturationPolicy {
        if names.iter().any(|n| n == "*") {
            SaturationPolicy::Everywhere
        } else if names.is_empty() {
            SaturationPolicy::Nowhere
        } else {
            SaturationPolicy::Only(names.to_vec())
        }
    }

    fn allows(&self, label: &str) -> bool {
        match self {
            SaturationPolicy::Nowhere => false,
            SaturationPolicy::Everywhere => true,
            SaturationPolicy::Only(v) => v.iter().any(|n| n == label),
        }
    }

    /// The allowed names that are not nodes of `report` (likely typos).
    #[must_use]
    pub fn unknown_names(&self, report: &Report) -> Vec<String> {
        match self {
            SaturationPolicy::Only(v) => v
                .iter()
                .filter(|n| !report.nodes.iter().any(|x| &x.label == *n))
                .cloned()
                .collect(),
            _ => Vec::new(),
        }
    }
}

/// One reason the gate fails.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Failure {
    /// The line of the audit file, if known.
    pub line: Option<usize>,
    /// One line for people.
    pub reason: String,
}

fn at(n: &NodeReport) -> Option<usize> {
    n.span.map(|s| s.line)
}

/// Every reason `report` fails the gate, in node order then output order;
/// empty when it passes.
#[must_use]
pub fn check(report: &Report, saturation: &SaturationPolicy) -> Vec<Failure> {
    let mut out = Vec::new();
    for n in &report.nodes {
        let o = &n.overflow;
        if !o.can_overflow {
            continue;
        }
        let u = o
            .unclamped_range
            .as_ref()
            .map(|r| format!("[{}, {}]", num(r.lo.approx), num(r.hi.approx)))
            .unwrap_or_default();
        match o.mode.as_deref() {
            Some("wrap") => out.push(Failure {
                line: at(n),
                reason: format!(
                    "{} can overflow {} and wraps: its range {u} passes the format",
                    n.label, n.format
                ),
            }),
            Some("panic") => out.push(Failure {
                line: at(n),
                reason: format!(
                    "{} can overflow {} and panics: its range {u} passes the format",
                    n.label, n.format
                ),
            }),
            Some(mode) if mode.starts_with("saturate") => {
                if !saturation.allows(&n.label) {
                    let by = o
                        .largest_saturation_error
                        .as_ref()
                        .map(|e| format!(" by up to {}", num(e.approx)))
                        .unwrap_or_default();
                    out.push(Failure {
                        line: at(n),
                        reason: format!(
                            "{} can saturate{by} (range {u} passes {}); if intended, allow it with --allow-saturation {}",
                            n.label, n.format, n.label
                        ),
                    });
                }
            }
            _ => out.push(Failure {
                line: at(n),
                reason: format!("{} can overflow {}: {}", n.label, n.format, o.detail),
            }),
        }
    }
    for o in &report.outputs {
        if let Some(b) = &o.budget {
            if !b.met_by_bound {
                let line = report.nodes.get(o.node).and_then(at);
                out.push(Failure {
                    line,
                    reason: format!(
                        "output {}: worst-case error {} ({} ulp of {}) exceeds the budget {} (= {})",
                        o.name,
                        num(o.error.max_abs.approx),
                        num(o.error.ulps.approx),
                        o.format,
                        b.written,
                        num(b.absolute.approx)
                    ),
                });
            }
        }
    }
    out
}
