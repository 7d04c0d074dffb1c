//! The Markdown report (GitHub-flavoured tables), for a merge request or a
//! design note.

use std::io::{self, Write};

use super::{Context, NodeRow, SAFETY_CAUTION, line_of, num};
use crate::verdict::{Report, Severity};

/// Escape the characters that break a table cell.
fn md(s: &str) -> String {
    s.replace('|', "\\|")
        .replace('*', "\\*")
        .replace('_', "\\_")
}

/// Render the Markdown report.
///
/// # Errors
/// Whatever writing to `out` returns.
pub fn render(report: &Report, ctx: &Context, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "# qbound audit: {}", md(&ctx.title))?;
    writeln!(out)?;
    writeln!(
        out,
        "{}",
        super::simulation_sentence(report.simulation.as_ref())
    )?;
    writeln!(out)?;
    writeln!(out, "## Outputs")?;
    writeln!(out)?;
    writeln!(
        out,
        "| output | format | worst-case error | ulps | measured max | predicted std dev | SQNR predicted / measured | budget |"
    )?;
    writeln!(out, "|---|---|---|--:|--:|--:|--:|---|")?;
    for o in &report.outputs {
        let sq = |x: Option<f64>| x.map_or("-".to_owned(), |d| format!("{d:.1} dB"));
        let budget = o.budget.as_ref().map_or("-".to_owned(), |b| {
            let v = if b.met_by_bound {
                "met (guaranteed)"
            } else {
                "**not met**"
            };
            format!("{}: {v}", md(&b.written))
        });
        writeln!(
            out,
            "| {} | {} | [{}, {}] | {} | {} | {} | {} / {} | {budget} |",
            md(&o.name),
            o.format,
            num(o.error.lo.approx),
            num(o.error.hi.approx),
            num(o.error.ulps.approx),
            o.measured
                .as_ref()
                .map_or("-".to_owned(), |m| num(m.max_abs.approx)),
            num(o.stats.std_dev),
            sq(o.sqnr_db),
            sq(o.measured_sqnr_db),
        )?;
    }
    for o in &report.outputs {
        if o.contributions.is_empty() {
            continue;
        }
        writeln!(out)?;
        writeln!(out, "### Where the error of {} comes from", md(&o.name))?;
        writeln!(out)?;
        writeln!(
            out,
            "| source | contributes | share of bound | share of variance |"
        )?;
        writeln!(out, "|---|--:|--:|--:|")?;
        for c in &o.contributions {
            writeln!(
                out,
                "| {} | ±{} | {:.1}% | {:.1}% |",
                md(&c.label),
                num(c.max_abs.approx),
                c.share_of_bound * 100.0,
                c.share_of_variance * 100.0
            )?;
        }
    }
    writeln!(out)?;
    writeln!(out, "## Nodes")?;
    writeln!(out)?;
    writeln!(
        out,
        "| node | operation | format | range | headroom (bits) | overflow | bound | ulps | measured | line |"
    )?;
    writeln!(out, "|---|---|---|---|--:|---|--:|--:|--:|--:|")?;
    for n in &report.nodes {
        let r = NodeRow::new(n);
        writeln!(
            out,
            "| {} | {} | {} | {} | {} | {} | {} | {} | {} | {} |",
            md(&r.label),
            md(&r.detail),
            r.format,
            r.range,
            r.headroom,
            r.verdict,
            r.bound,
            r.ulps,
            r.measured,
            r.line
        )?;
    }
    writeln!(out)?;
    writeln!(out, "## Findings")?;
    writeln!(out)?;
    if report.diagnostics.is_empty() {
        writeln!(out, "None.")?;
    }
    for d in &report.diagnostics {
        let sev = match d.severity {
            Severity::Error => "**error**",
            Severity::Warning => "warning",
            Severity::Note => "note",
            Severity::None => "info",
        };
        let at = line_of(d.span);
        let at = if at.is_empty() { at } else { format!("{at}: ") };
        writeln!(out, "- {sev}: {at}{}", md(&d.message))?;
    }
    writeln!(out)?;
    writeln!(out, "> **Caution.** {SAFETY_CAUTION}")?;
    Ok(())
}
