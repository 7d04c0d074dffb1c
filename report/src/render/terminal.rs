//! The terminal report: a table per node, a summary per output with where
//! its error comes from, and the findings. ANSI colour only when the
//! context asks for it (the binary sets it for a terminal, never for a
//! pipe or a file).

use std::io::{self, Write};

use super::{Context, NodeRow, SAFETY_CAUTION, num};
use crate::verdict::{Report, Severity};

/// ANSI styling that can be switched off.
#[derive(Clone, Copy)]
struct Paint(bool);

impl Paint {
    fn wrap(self, code: &str, s: &str) -> String {
        if self.0 {
            format!("\x1b[{code}m{s}\x1b[0m")
        } else {
            s.to_owned()
        }
    }
    fn bold(self, s: &str) -> String {
        self.wrap("1", s)
    }
    fn dim(self, s: &str) -> String {
        self.wrap("2", s)
    }
    fn red(self, s: &str) -> String {
        self.wrap("1;31", s)
    }
    fn yellow(self, s: &str) -> String {
        self.wrap("33", s)
    }
    fn green(self, s: &str) -> String {
        self.wrap("32", s)
    }
}

/// One table cell: text and an optional colour applied after padding.
struct Cell {
    text: String,
    color: Option<fn(Paint, &str) -> String>,
    right: bool,
}

fn cell(text: impl Into<String>) -> Cell {
    Cell {
        text: text.into(),
        color: None,
        right: false,
    }
}

fn rcell(text: impl Into<String>) -> Cell {
    Cell {
        text: text.into(),
        color: None,
        right: true,
    }
}

fn table(out: &mut dyn Write, p: Paint, head: &[&str], rows: &[Vec<Cell>]) -> io::Result<()> {
    let mut w: Vec<usize> = head.iter().map(|h| h.chars().count()).collect();
    for r in rows {
        for (i, c) in r.iter().enumerate() {
            w[i] = w[i].max(c.text.chars().count());
        }
    }
    let line: Vec<String> = head
        .iter()
        .enumerate()
        .map(|(i, h)| format!("{h:<width$}", width = w[i]))
        .collect();
    writeln!(out, "  {}", p.bold(line.join("  ").trim_end()))?;
    for r in rows {
        let cells: Vec<String> = r
            .iter()
            .enumerate()
            .map(|(i, c)| {
                let padded = if c.right {
                    format!("{:>width$}", c.text, width = w[i])
                } else {
                    format!("{:<width$}", c.text, width = w[i])
                };
                match c.color {
                    Some(f) => f(p, &padded),
                    None => padded,
                }
            })
            .collect();
        writeln!(out, "  {}", cells.join("  ").trim_end())?;
    }
    Ok(())
}

/// Render the terminal report.
///
/// # Errors
/// Whatever writing to `out` returns.
pub fn render(report: &Report, ctx: &Context, out: &mut dyn Write) -> io::Result<()> {
    let p = Paint(ctx.color);
    writeln!(out, "{} {}", p.bold("qbound audit:"), ctx.title)?;
    let sentence = super::simulation_sentence(report.simulation.as_ref());
    if report.simulation.as_ref().is_some_and(|s| s.interrupted) {
        writeln!(out, "{}", p.red(&sentence))?;
    } else {
        writeln!(out, "{}", p.dim(&sentence))?;
    }
    writeln!(out)?;
    writeln!(out, "{}", p.bold("Nodes"))?;
    let mut rows = Vec::new();
    for n in &report.nodes {
        let r = NodeRow::new(n);
        let color: Option<fn(Paint, &str) -> String> = match r.verdict {
            "WRAPS" | "PANICS" | "OVERFLOWS" => Some(Paint::red),
            "SATURATES" => Some(Paint::yellow),
            "no" => Some(Paint::green),
            _ => None,
        };
        rows.push(vec![
            cell(r.label),
            cell(r.format),
            cell(r.range),
            rcell(r.headroom),
            Cell {
                text: r.verdict.to_owned(),
                color,
                right: false,
            },
            rcell(r.bound),
            rcell(r.ulps),
            rcell(r.measured),
            cell(if r.line.is_empty() {
                r.line
            } else {
                format!("line {}", r.line)
            }),
        ]);
    }
    table(
        out,
        p,
        &[
            "node", "format", "range", "headroom", "overflow", "bound", "ulps", "measured", "at",
        ],
        &rows,
    )?;
    writeln!(
        out,
        "{}",
        p.dim("  range: of the fixed-point value; headroom: bits between the range and the format's limits; bound: sound worst-case |error| against exact arithmetic; measured: largest |error| simulated")
    )?;
    for o in &report.outputs {
        writeln!(out)?;
        writeln!(
            out,
            "{} {} ({})",
            p.bold("Output"),
            p.bold(&o.name),
            o.format
        )?;
        writeln!(
            out,
            "  worst-case error  [{}, {}]  = {} ulp",
            num(o.error.lo.approx),
            num(o.error.hi.approx),
            num(o.error.ulps.approx)
        )?;
        let measured = o.measured.as_ref().map_or(String::new(), |m| {
            format!(
                "   measured: max {}, mean {}, std dev {}",
                num(m.max_abs.approx),
                num(m.mean),
                num(m.std_dev)
            )
        });
        writeln!(
            out,
            "  noise model       mean {}, std dev {}{measured}",
            num(o.stats.mean),
            num(o.stats.std_dev)
        )?;
        let sqnr = |x: Option<f64>| x.map_or("-".to_owned(), |d| format!("{d:.1} dB"));
        writeln!(
            out,
            "  SQNR              predicted {}, measured {}",
            sqnr(o.sqnr_db),
            sqnr(o.measured_sqnr_db)
        )?;
        if let Some(b) = &o.budget {
            let verdict = if b.met_by_bound {
                p.green("met (guaranteed by the sound bound)")
            } else if b.met_by_simulation == Some(true) {
                p.red("NOT guaranteed (the bound exceeds it; the simulation stayed within)")
            } else {
                p.red("EXCEEDED")
            };
            writeln!(
                out,
                "  budget            {} (= {}): {verdict}",
                b.written,
                num(b.absolute.approx)
            )?;
        }
        if !o.contributions.is_empty() {
            writeln!(out, "  error sources (share of the bound):")?;
            for c in o.contributions.iter().take(8) {
                let bar_len = (c.share_of_bound * 30.0).round() as usize;
                writeln!(
                    out,
                    "    {:>5.1}%  {:<30}  {}  ±{}",
                    c.share_of_bound * 100.0,
                    "#".repeat(bar_len.min(30)),
                    c.label,
                    num(c.max_abs.approx)
                )?;
            }
            if o.contributions.len() > 8 {
                writeln!(
                    out,
                    "    ... and {} smaller sources",
                    o.contributions.len() - 8
                )?;
            }
        }
    }
    writeln!(out)?;
    if report.diagnostics.is_empty() {
        writeln!(out, "{} {}", p.bold("Findings:"), p.green("none"))?;
    } else {
        writeln!(out, "{}", p.bold("Findings"))?;
        for d in &report.diagnostics {
            let sev = match d.severity {
                Severity::Error => p.red("error  "),
                Severity::Warning => p.yellow("warning"),
                Severity::Note => p.dim("note   "),
                Severity::None => p.dim("       "),
            };
            let at = d
                .span
                .map(|s| format!("line {}: ", s.line))
                .unwrap_or_default();
            writeln!(out, "  {sev}  {at}{}", d.message)?;
        }
    }
    writeln!(out)?;
    writeln!(out, "{}", p.dim(&format!("Caution: {SAFETY_CAUTION}")))?;
    Ok(())
}
