//! The HTML report: one self-contained file (inline style, inline SVG, no
//! script, nothing fetched from the network).

use std::io::{self, Write};

use super::svg::{self, escape};
use super::{Context, NodeRow, SAFETY_CAUTION, num};
use crate::verdict::{Report, Severity};

const STYLE: &str = "
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;color:#2b2f36;margin:0;background:#f4f5f7}
main{max-width:1180px;margin:0 auto;padding:24px 32px 48px;background:#fff}
h1{font-size:22px;margin:0 0 4px} h2{font-size:18px;margin:32px 0 10px;border-bottom:1px solid #d0d4da;padding-bottom:4px}
h3{font-size:15px;margin:22px 0 8px}
.sub{color:#5d6673;margin:0 0 14px}
.caution{border-left:4px solid #e67e22;background:#fff6ec;padding:8px 12px;margin:14px 0;font-size:14px}
.cards{display:flex;flex-wrap:wrap;gap:10px;margin:6px 0 10px}
.card{border:1px solid #d0d4da;border-radius:6px;padding:6px 12px;min-width:120px}
.card b{display:block;font-size:16px} .card span{font-size:12px;color:#5d6673}
.ok{color:#1e8449} .bad{color:#c0392b} .warn{color:#b9770e}
table{border-collapse:collapse;font-size:13px;width:100%}
th,td{border-bottom:1px solid #e4e7eb;padding:4px 8px;text-align:left;vertical-align:top}
th{background:#f4f5f7} td.n{text-align:right;font-variant-numeric:tabular-nums}
.plots{display:flex;flex-wrap:wrap;gap:12px;align-items:flex-start}
.plots svg{flex:1 1 520px;width:100%;height:auto}
svg{max-width:100%;height:auto}
pre{background:#f4f5f7;padding:10px;overflow-x:auto;font-size:12px;line-height:1.45}
pre .ln{color:#8a919c;user-select:none}
";

/// Render the HTML report.
///
/// # Errors
/// Whatever writing to `out` returns.
pub fn render(report: &Report, ctx: &Context, out: &mut dyn Write) -> io::Result<()> {
    let title = escape(&ctx.title);
    writeln!(out, "<!DOCTYPE html>")?;
    writeln!(
        out,
        "<html lang=\"en\"><head><meta charset=\"utf-8\"><title>qbound audit: {title}</title><style>{STYLE}</style></head><body><main>"
    )?;
    writeln!(out, "<h1>qbound audit: {title}</h1>")?;
    let sub = super::simulation_sentence(report.simulation.as_ref());
    writeln!(out, "<p class=\"sub\">{}</p>", escape(&sub))?;
    writeln!(
        out,
        "<div class=\"caution\"><b>Caution.</b> {}</div>",
        escape(SAFETY_CAUTION)
    )?;
    findings(report, out)?;
    writeln!(out, "<h2>Outputs</h2>")?;
    for o in &report.outputs {
        writeln!(
            out,
            "<h3>{} <span class=\"sub\">{}</span></h3>",
            escape(&o.name),
            escape(&o.format)
        )?;
        writeln!(out, "<div class=\"cards\">")?;
        card(
            out,
            &format!("[{}, {}]", num(o.error.lo.approx), num(o.error.hi.approx)),
            "sound worst-case error",
            "",
        )?;
        card(out, &num(o.error.ulps.approx), "ulps", "")?;
        if let Some(m) = &o.measured {
            card(out, &num(m.max_abs.approx), "measured max |error|", "")?;
            card(out, &num(m.std_dev), "measured std dev", "")?;
        }
        card(out, &num(o.stats.std_dev), "predicted std dev", "")?;
        let sq = |x: Option<f64>| x.map_or("-".to_owned(), |d| format!("{d:.1} dB"));
        card(
            out,
            &format!("{} / {}", sq(o.sqnr_db), sq(o.measured_sqnr_db)),
            "SQNR predicted / measured",
            "",
        )?;
        if let Some(b) = &o.budget {
            let (v, class) = if b.met_by_bound {
                ("met, guaranteed", "ok")
            } else {
                ("NOT met", "bad")
            };
            card(out, v, &format!("budget {}", b.written), class)?;
        }
        writeln!(out, "</div>")?;
        writeln!(out, "<div class=\"plots\">")?;
        if let Some(h) = &o.histogram {
            writeln!(out, "{}", svg::histogram(h, o))?;
        }
        writeln!(out, "{}", svg::contributions(o))?;
        writeln!(out, "</div>")?;
    }
    writeln!(out, "<h2>Ranges</h2>")?;
    writeln!(out, "{}", svg::ranges(&report.nodes))?;
    writeln!(out, "<h2>Nodes</h2>")?;
    writeln!(
        out,
        "<table><tr><th>node</th><th>operation</th><th>format</th><th>range</th><th>headroom (bits)</th><th>overflow</th><th>bound</th><th>ulps</th><th>measured</th><th>line</th></tr>"
    )?;
    for n in &report.nodes {
        let r = NodeRow::new(n);
        let class = match r.verdict {
            "WRAPS" | "PANICS" | "OVERFLOWS" => "bad",
            "SATURATES" => "warn",
            "no" => "ok",
            _ => "",
        };
        writeln!(
            out,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td><td class=\"n\">{}</td><td class=\"{class}\" title=\"{}\">{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td></tr>",
            escape(&r.label),
            escape(&r.detail),
            escape(&r.format),
            escape(&r.range),
            r.headroom,
            escape(&n.overflow.detail),
            r.verdict,
            r.bound,
            r.ulps,
            r.measured,
            r.line,
        )?;
    }
    writeln!(out, "</table>")?;
    if let Some(src) = &ctx.source {
        writeln!(out, "<h2>Datapath</h2><pre>")?;
        for (i, l) in src.lines().enumerate() {
            writeln!(out, "<span class=\"ln\">{:>3}  </span>{}", i + 1, escape(l))?;
        }
        writeln!(out, "</pre>")?;
    }
    writeln!(
        out,
        "<p class=\"sub\">Written by qbound {}. Bounds are exact rationals (shown rounded); the JSON report (<code>--format json</code>) carries them exactly.</p>",
        env!("CARGO_PKG_VERSION")
    )?;
    writeln!(out, "</main></body></html>")?;
    Ok(())
}

fn card(out: &mut dyn Write, value: &str, label: &str, class: &str) -> io::Result<()> {
    writeln!(
        out,
        "<div class=\"card\"><b class=\"{class}\">{}</b><span>{}</span></div>",
        escape(value),
        escape(label)
    )
}

fn findings(report: &Report, out: &mut dyn Write) -> io::Result<()> {
    writeln!(out, "<h2>Findings</h2>")?;
    if report.diagnostics.is_empty() {
        return writeln!(out, "<p class=\"ok\">None.</p>");
    }
    writeln!(out, "<ul>")?;
    for d in &report.diagnostics {
        let (sev, class) = match d.severity {
            Severity::Error => ("error", "bad"),
            Severity::Warning => ("warning", "warn"),
            Severity::Note => ("note", ""),
            Severity::None => ("info", ""),
        };
        let at = d
            .span
            .map(|s| format!("line {}: ", s.line))
            .unwrap_or_default();
        writeln!(
            out,
            "<li><b class=\"{class}\">{sev}</b> {}{}</li>",
            escape(&at),
            escape(&d.message)
        )?;
    }
    writeln!(out, "</ul>")
}
