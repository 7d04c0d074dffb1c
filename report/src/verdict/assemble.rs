//! Turn an [`Analysis`] (and, if it ran, the simulation's measurements)
//! into the plain-data [`Report`].

use qbound::Overflow;

use super::report::{
    BudgetReport, Contribution, Diagnostic, ErrorBound, ErrorStats, Exact, NodeReport,
    OutputReport, OverflowReport, RangeReport, Report, Severity, SourceReport,
};
use crate::analysis::{Analysis, NodeAnalysis, term_interval};
use crate::arith::{Interval, decimal_text, ulp};
use crate::model::{Budget, Datapath, NodeId, Op};
use crate::simulate::Simulation;

fn range(r: &Interval) -> RangeReport {
    RangeReport {
        lo: Exact::new(&r.lo),
        hi: Exact::new(&r.hi),
    }
}

fn bound(e: &Interval, f: qbound::Format) -> ErrorBound {
    let m = e.max_abs();
    ErrorBound {
        lo: Exact::new(&e.lo),
        hi: Exact::new(&e.hi),
        ulps: Exact::new(&m.mul_pow2(i64::from(f.frac_bits()))),
        max_abs: Exact::new(&m),
    }
}

fn detail(path: &Datapath, id: usize) -> String {
    let n = &path.nodes()[id];
    match &n.op {
        Op::Input { lo, hi, kind } => match kind {
            crate::model::InputKind::Exact => {
                format!("input in [{}, {}]", decimal_text(lo), decimal_text(hi))
            }
            crate::model::InputKind::Quantized(r) => format!(
                "input in [{}, {}] quantized {}",
                decimal_text(lo),
                decimal_text(hi),
                r.name()
            ),
        },
        Op::Const { value, rounding } => {
            format!("const {} ({})", decimal_text(value), rounding.name())
        }
        Op::Add(a, b) => format!("{} + {}", path.label(*a), path.label(*b)),
        Op::Sub(a, b) => format!("{} - {}", path.label(*a), path.label(*b)),
        Op::Mul(a, b) => format!("{} * {}", path.label(*a), path.label(*b)),
        Op::Neg(a) => format!("-{}", path.label(*a)),
        Op::Shift(a, k) => format!("{} * 2^{k}", path.label(*a)),
        Op::Rescale {
            src,
            rounding,
            overflow,
        } => format!(
            "rescale {} {} {}",
            path.label(*src),
            rounding.name(),
            overflow.name()
        ),
    }
}

fn overflow_report(n: &NodeAnalysis) -> OverflowReport {
    let Some(o) = n.overflow.as_deref() else {
        return OverflowReport {
            can_overflow: false,
            mode: None,
            severity: Severity::None,
            largest_saturation_error: None,
            unclamped_range: None,
            detail: "exact operation: cannot overflow".to_owned(),
        };
    };
    let severity = match (o.can_overflow, o.mode) {
        (false, _) => Severity::None,
        (true, Overflow::Wrap | Overflow::Panic) => Severity::Error,
        (true, Overflow::Saturate | Overflow::SaturateSymmetric) => Severity::Warning,
    };
    let detail = match (o.can_overflow, o.mode) {
        (false, _) => "the value always fits".to_owned(),
        (true, Overflow::Wrap) => {
            "can overflow and wrap around: the result is then far from the ideal value".to_owned()
        }
        (true, Overflow::Panic) => {
            "can overflow: the rescale panics for some inputs in the ranges".to_owned()
        }
        (true, _) => format!(
            "can saturate; the largest saturation error is {}",
            o.saturation_error
                .as_ref()
                .map_or_else(String::new, |s| format!("{:.6e}", s.to_f64()))
        ),
    };
    OverflowReport {
        can_overflow: o.can_overflow,
        mode: Some(o.mode.name().to_owned()),
        severity,
        largest_saturation_error: o.saturation_error.as_ref().map(Exact::new),
        unclamped_range: o.unclamped.as_ref().map(range),
        detail,
    }
}

/// Build the report of an analysis and, if it ran, a simulation.
#[must_use]
pub fn assemble(path: &Datapath, a: &Analysis, sim: Option<&Simulation>) -> Report {
    let measured = sim.map(|s| s.measured.as_slice());
    let mut diagnostics = Vec::new();
    let nodes: Vec<NodeReport> = a
        .nodes
        .iter()
        .enumerate()
        .map(|(i, n)| {
            let nd = &path.nodes()[i];
            let ov = overflow_report(n);
            if ov.severity > Severity::None {
                diagnostics.push(Diagnostic {
                    severity: ov.severity,
                    node: Some(i),
                    span: nd.span,
                    message: format!("{}: {}", path.label(NodeId(i)), ov.detail),
                });
            }
            NodeReport {
                id: i,
                label: path.label(NodeId(i)),
                op: nd.op.kind_name().to_owned(),
                detail: detail(path, i),
                operands: nd.op.operands().iter().map(|x| x.0).collect(),
                span: nd.span,
                format: nd.format.to_string(),
                width: nd.format.width(),
                ulp: Exact::new(&ulp(nd.format)),
                ideal_range: range(&n.ideal),
                actual_range: range(&n.actual),
                overflow: ov,
                error: bound(&n.error, nd.format),
                stats: ErrorStats {
                    mean: n.err_mean,
                    std_dev: n.err_var.sqrt(),
                },
                measured: measured.map(|m| m[i].clone()),
            }
        })
        .collect();
    let sources = a
        .sources
        .iter()
        .enumerate()
        .map(|(i, s)| SourceReport {
            id: i,
            node: s.node.0,
            kind: s.kind,
            label: s.label(path),
            interval: range(&s.eps),
            mean: s.mean,
            std_dev: s.var.sqrt(),
        })
        .collect();
    let outputs = path
        .outputs()
        .iter()
        .enumerate()
        .map(|(oi, o)| {
            let n = &a.nodes[o.node.0];
            let f = path.node(o.node).format;
            let m = measured.map(|m| m[o.node.0].clone());
            let noise = n.err_var + n.err_mean * n.err_mean;
            let signal = n.signal_var + n.signal_mean * n.signal_mean;
            let sqnr = |s: f64, e: f64| (e > 0.0 && s > 0.0).then(|| 10.0 * (s / e).log10());
            let budget = o.budget.as_ref().map(|b| {
                let abs = b.absolute(f);
                let written = match b {
                    Budget::Absolute(x) => decimal_text(x),
                    Budget::Ulps(x) => format!("{} ulp", decimal_text(x)),
                };
                let met_by_bound = n.error.max_abs() <= abs;
                let met_by_simulation = m.as_ref().and_then(|m| m.max_abs.num()).map(|x| x <= abs);
                if !met_by_bound {
                    let sev = if met_by_simulation == Some(false) { Severity::Error } else { Severity::Warning };
                    diagnostics.push(Diagnostic {
                        severity: sev,
                        node: Some(o.node.0),
                        span: path.node(o.node).span,
                        message: format!(
                            "output {}: the worst-case error bound {:.6e} exceeds the budget {written}{}",
                            o.name,
                            n.error.max_abs().to_f64(),
                            if sev == Severity::Error { " (the simulation found an input that exceeds it)" } else { "" }
                        ),
                    });
                }
                BudgetReport {
                    written,
                    absolute: Exact::new(&abs),
                    met_by_bound,
                    met_by_simulation,
                }
            });
            OutputReport {
                name: o.name.clone(),
                node: o.node.0,
                format: f.to_string(),
                error: bound(&n.error, f),
                stats: ErrorStats {
                    mean: n.err_mean,
                    std_dev: n.err_var.sqrt(),
                },
                signal_power: signal,
                sqnr_db: sqnr(signal, noise),
                measured_sqnr_db: m.as_ref().and_then(|m| sqnr(m.signal_power, m.rms * m.rms)),
                budget,
                contributions: contributions(path, a, n),
                measured: m,
                histogram: sim.map(|s| s.histograms[oi].clone()),
            }
        })
        .collect();
    diagnostics.sort_by_key(|d| std::cmp::Reverse(d.severity));
    Report {
        nodes,
        sources,
        outputs,
        simulation: sim.map(|s| s.summary.clone()),
        diagnostics,
    }
}

fn contributions(path: &Datapath, a: &Analysis, n: &NodeAnalysis) -> Vec<Contribution> {
    let Some(form) = &n.form else {
        return Vec::new();
    };
    let mut parts: Vec<(Option<usize>, Interval, f64)> = form
        .terms
        .iter()
        .map(|t| {
            let s = &a.sources[t.src];
            let m = t.gm * s.mean;
            let v = ((t.gv + t.gm * t.gm) * (s.var + s.mean * s.mean) - m * m).max(0.0);
            (Some(t.src), term_interval(t, &a.sources), v)
        })
        .collect();
    if !form.rem.is_zero() {
        parts.push((None, form.rem.clone(), form.rem_var));
    }
    let total_abs: f64 = parts.iter().map(|p| p.1.max_abs().to_f64()).sum();
    let total_var: f64 = parts.iter().map(|p| p.2).sum();
    let mut out: Vec<Contribution> = parts
        .into_iter()
        .map(|(src, iv, var)| {
            let m = iv.max_abs();
            Contribution {
                source: src,
                label: src.map_or_else(
                    || "remainder (products of errors, folded small terms)".to_owned(),
                    |s| a.sources[s].label(path),
                ),
                kind: src.map(|s| a.sources[s].kind),
                share_of_bound: if total_abs > 0.0 {
                    m.to_f64() / total_abs
                } else {
                    0.0
                },
                share_of_variance: if total_var > 0.0 {
                    var / total_var
                } else {
                    0.0
                },
                interval: range(&iv),
                max_abs: Exact::new(&m),
            }
        })
        .collect();
    out.sort_by(|x, y| y.share_of_bound.total_cmp(&x.share_of_bound));
    out
}

impl Analysis {
    /// The report of the analysis alone (no simulation).
    ///
    /// ```
    /// let path = qbound_report::parse("input x : Q0.7 in [-1, 0.5]\nlet y = rescale(x, Q0.3, floor, saturate)\noutput y")?;
    /// let r = qbound_report::analyze(&path).report(&path);
    /// assert_eq!(r.outputs[0].error.ulps.exact, "15/16");
    /// # Ok::<(), qbound_report::ParseError>(())
    /// ```
    #[must_use]
    pub fn report(&self, path: &Datapath) -> Report {
        assemble(path, self, None)
    }
}
