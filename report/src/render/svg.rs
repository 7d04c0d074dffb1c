//! Hand-made SVG plots for the HTML report. Each function returns one
//! `<svg>` element as text: well-formed XML (every text escaped), sized by
//! a `viewBox` so it scales with the page.

use std::fmt::Write as _;

use super::{format_limits, headroom_text, num, value_range};
use crate::simulate::ErrorHistogram;
use crate::verdict::{NodeReport, OutputReport, SourceKind};

/// Escape text for XML content and attribute values.
///
/// ```
/// assert_eq!(qbound_report::render::svg::escape("a<b & \"c\""), "a&lt;b &amp; &quot;c&quot;");
/// ```
#[must_use]
pub fn escape(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '<' => o.push_str("&lt;"),
            '>' => o.push_str("&gt;"),
            '&' => o.push_str("&amp;"),
            '"' => o.push_str("&quot;"),
            '\'' => o.push_str("&apos;"),
            c => o.push(c),
        }
    }
    o
}

const BAR: &str = "#4c78a8";
const BOUND: &str = "#c0392b";
const MODEL: &str = "#e67e22";
const GRID: &str = "#d0d4da";
const TEXT: &str = "#2b2f36";

fn open(w: f64, h: f64, title: &str) -> String {
    format!(
        "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {w} {h}\" width=\"{w}\" height=\"{h}\" role=\"img\" font-family=\"system-ui, sans-serif\" font-size=\"11\"><title>{}</title>",
        escape(title)
    )
}

fn text(s: &mut String, x: f64, y: f64, anchor: &str, body: &str) {
    let _ = write!(
        s,
        "<text x=\"{x:.1}\" y=\"{y:.1}\" text-anchor=\"{anchor}\" fill=\"{TEXT}\">{}</text>",
        escape(body)
    );
}

/// The error histogram of one output: bars of the simulated errors, the
/// sound bound as two red lines, the noise model's prediction (a normal
/// density with the predicted mean and standard deviation, scaled to the
/// sample count) as an orange curve, and the predicted mean.
#[must_use]
pub fn histogram(h: &ErrorHistogram, o: &OutputReport) -> String {
    let (w, ht) = (660.0, 304.0);
    let (ml, mr, mt, mb) = (56.0, 16.0, 34.0, 84.0);
    let pw = w - ml - mr;
    let ph = ht - mt - mb;
    let mut s = open(w, ht, &format!("error histogram of {}", o.name));
    let (blo, bhi) = (o.error.lo.approx, o.error.hi.approx);
    let span = (h.hi - h.lo).abs();
    let pad = if span > 0.0 {
        span * 0.08
    } else {
        blo.abs().max(1e-12) * 0.5
    };
    let (x0, x1) = (h.lo.min(blo) - pad, h.hi.max(bhi) + pad);
    let sx = |x: f64| ml + (x - x0) / (x1 - x0) * pw;
    let nb = h.counts.len().max(1);
    let bw = if span > 0.0 { span / nb as f64 } else { 0.0 };
    // The model's prediction, in counts per bin.
    let (mu, sd) = (o.stats.mean, o.stats.std_dev);
    let model: Vec<(f64, f64)> = match predicted_density(o) {
        Some((start, dx, mass)) if bw > 0.0 => {
            let per = h.samples as f64 * bw / dx;
            mass.iter()
                .enumerate()
                .map(|(k, m)| (start + (k as f64 + 0.5) * dx, m * per))
                .collect()
        }
        _ => Vec::new(),
    };
    let model_peak = model.iter().fold(0.0f64, |a, p| a.max(p.1));
    let cmax = h.counts.iter().copied().max().unwrap_or(0) as f64;
    // A peaked distribution with tails (saturation, a few large errors)
    // would show as one spike: count on a log scale then.
    let mut nonzero: Vec<u64> = h.counts.iter().copied().filter(|&c| c > 0).collect();
    nonzero.sort_unstable();
    let median = nonzero.get(nonzero.len() / 2).copied().unwrap_or(0) as f64;
    let log = nonzero.len() >= 3 && cmax > 20.0 * median;
    let ymax = cmax.max(model_peak.min(h.samples as f64)).max(1.0) * 1.1;
    let scale = |c: f64| {
        if log {
            (1.0 + c).log10() / (1.0 + ymax).log10()
        } else {
            c / ymax
        }
    };
    let sy = |c: f64| mt + ph - scale(c) * ph;
    // Frame and grid.
    let _ = write!(
        s,
        "<rect x=\"{ml}\" y=\"{mt}\" width=\"{pw}\" height=\"{ph}\" fill=\"#fbfbfc\" stroke=\"{GRID}\"/>"
    );
    for x in nice_ticks(x0, x1) {
        let px = sx(x);
        let _ = write!(
            s,
            "<line x1=\"{px:.1}\" y1=\"{mt}\" x2=\"{px:.1}\" y2=\"{:.1}\" stroke=\"{GRID}\" stroke-dasharray=\"2 3\"/>",
            mt + ph
        );
        text(&mut s, px, mt + ph + 14.0, "middle", &num(x));
    }
    if cmax > 0.0 {
        let y = sy(cmax);
        let _ = write!(
            s,
            "<line x1=\"{ml}\" y1=\"{y:.1}\" x2=\"{:.1}\" y2=\"{y:.1}\" stroke=\"{GRID}\" stroke-dasharray=\"2 3\"/>",
            ml + pw
        );
        text(&mut s, ml - 4.0, y + 4.0, "end", &format!("{cmax}"));
    }
    text(&mut s, ml - 4.0, mt + ph, "end", "0");
    if log {
        for c in [10.0, 100.0, 1000.0, 10000.0, 100_000.0] {
            if c < cmax * 0.5 {
                let y = sy(c);
                let _ = write!(
                    s,
                    "<line x1=\"{ml}\" y1=\"{y:.1}\" x2=\"{:.1}\" y2=\"{y:.1}\" stroke=\"{GRID}\" stroke-dasharray=\"2 3\"/>",
                    ml + pw
                );
                text(&mut s, ml - 4.0, y + 4.0, "end", &format!("{c}"));
            }
        }
    }
    // Bars.
    if span > 0.0 {
        for (i, &c) in h.counts.iter().enumerate() {
            if c == 0 {
                continue;
            }
            let a = sx(h.lo + bw * i as f64);
            let b = sx(h.lo + bw * (i + 1) as f64);
            let y = sy(c as f64);
            let _ = write!(
                s,
                "<rect x=\"{a:.2}\" y=\"{y:.2}\" width=\"{:.2}\" height=\"{:.2}\" fill=\"{BAR}\"/>",
                (b - a).max(0.6),
                mt + ph - y
            );
        }
    } else if h.samples > 0 {
        let px = sx(h.lo);
        let _ = write!(
            s,
            "<rect x=\"{:.2}\" y=\"{:.2}\" width=\"4\" height=\"{:.2}\" fill=\"{BAR}\"/>",
            px - 2.0,
            sy(h.samples as f64),
            ph - (sy(h.samples as f64) - mt)
        );
    }
    // The model's curve: zero outside its support.
    if model_peak > 0.0 {
        let mut d = String::new();
        let first = model.first().map_or(x0, |p| p.0);
        let last = model.last().map_or(x1, |p| p.0);
        let _ = write!(d, "M{:.1} {:.1}", sx(x0.min(first)), sy(0.0));
        let _ = write!(d, " L{:.1} {:.1}", sx(first), sy(0.0));
        for &(x, c) in &model {
            let _ = write!(d, " L{:.1} {:.1}", sx(x), sy(c.min(ymax)));
        }
        let _ = write!(d, " L{:.1} {:.1}", sx(last), sy(0.0));
        let _ = write!(d, " L{:.1} {:.1}", sx(x1.max(last)), sy(0.0));
        let _ = write!(
            s,
            "<path d=\"{d}\" fill=\"none\" stroke=\"{MODEL}\" stroke-width=\"2\"/>"
        );
        let pm = sx(mu);
        let _ = write!(
            s,
            "<line x1=\"{pm:.1}\" y1=\"{mt}\" x2=\"{pm:.1}\" y2=\"{:.1}\" stroke=\"{MODEL}\" stroke-dasharray=\"5 3\"/>",
            mt + ph
        );
    }
    // The sound bound.
    for (x, label) in [(blo, "bound lo"), (bhi, "bound hi")] {
        let px = sx(x);
        let _ = write!(
            s,
            "<line x1=\"{px:.1}\" y1=\"{:.1}\" x2=\"{px:.1}\" y2=\"{:.1}\" stroke=\"{BOUND}\" stroke-width=\"2\"><title>{}</title></line>",
            mt - 6.0,
            mt + ph,
            escape(&format!("{label}: {}", num(x)))
        );
    }
    // Title and legend.
    text(
        &mut s,
        ml,
        16.0,
        "start",
        &format!(
            "error of {} over {} random vectors{}",
            o.name,
            h.samples,
            if log { " (counts on a log scale)" } else { "" }
        ),
    );
    let ly = ht - 36.0;
    let _ = write!(
        s,
        "<rect x=\"{ml}\" y=\"{:.1}\" width=\"12\" height=\"9\" fill=\"{BAR}\"/>",
        ly - 8.0
    );
    text(&mut s, ml + 16.0, ly, "start", "simulated");
    let _ = write!(
        s,
        "<line x1=\"{:.1}\" y1=\"{:.1}\" x2=\"{:.1}\" y2=\"{:.1}\" stroke=\"{BOUND}\" stroke-width=\"2\"/>",
        ml + 90.0,
        ly - 4.0,
        ml + 104.0,
        ly - 4.0
    );
    text(
        &mut s,
        ml + 108.0,
        ly,
        "start",
        &format!("sound worst-case bound [{}, {}]", num(blo), num(bhi)),
    );
    let ly = ly + 15.0;
    let _ = write!(
        s,
        "<line x1=\"{ml}\" y1=\"{:.1}\" x2=\"{:.1}\" y2=\"{:.1}\" stroke=\"{MODEL}\" stroke-width=\"2\"/>",
        ly - 4.0,
        ml + 12.0,
        ly - 4.0
    );
    text(
        &mut s,
        ml + 16.0,
        ly,
        "start",
        &format!(
            "noise model: sum of independent uniform source errors; mean {}, std dev {} (dashed: mean)",
            num(mu),
            num(sd),
        ),
    );
    text(
        &mut s,
        ml + pw - 4.0,
        mt + ph + 28.0,
        "end",
        "error (actual - exact)",
    );
    if o.contributions
        .iter()
        .any(|c| matches!(c.kind, Some(SourceKind::Saturation | SourceKind::Wrap)))
    {
        text(
            &mut s,
            ml + 16.0,
            ly + 15.0,
            "start",
            "(the model covers roundings and quantization; saturation and wrap are outside it)",
        );
    }
    s.push_str("</svg>");
    s
}

/// Where an output's error comes from: one horizontal bar per source,
/// its share of the worst-case bound (solid) and of the predicted
/// variance (outline).
#[must_use]
pub fn contributions(o: &OutputReport) -> String {
    let rows = o.contributions.len().max(1);
    let (w, row) = (660.0, 24.0);
    let (label_w, mt) = (300.0, 30.0);
    let ht = mt + row * rows as f64 + 34.0;
    let pw = w - label_w - 120.0;
    let mut s = open(w, ht, &format!("error sources of {}", o.name));
    text(
        &mut s,
        8.0,
        16.0,
        "start",
        &format!("where the error of {} comes from", o.name),
    );
    if o.contributions.is_empty() {
        text(
            &mut s,
            8.0,
            mt + 14.0,
            "start",
            "no error source reaches this output: it is exact",
        );
    }
    for (i, c) in o.contributions.iter().enumerate() {
        let y = mt + row * i as f64;
        let mut label = c.label.clone();
        if label.chars().count() > 46 {
            label = label.chars().take(45).collect::<String>() + "…";
        }
        let _ = write!(
            s,
            "<text x=\"{:.1}\" y=\"{:.1}\" text-anchor=\"end\" fill=\"{TEXT}\"><title>{}</title>{}</text>",
            label_w - 8.0,
            y + 14.0,
            escape(&c.label),
            escape(&label)
        );
        let bw = (c.share_of_bound * pw).max(0.0);
        let vw = (c.share_of_variance * pw).max(0.0);
        let _ = write!(
            s,
            "<rect x=\"{label_w}\" y=\"{:.1}\" width=\"{bw:.1}\" height=\"9\" fill=\"{BAR}\"/>",
            y + 3.0
        );
        let _ = write!(
            s,
            "<rect x=\"{label_w}\" y=\"{:.1}\" width=\"{vw:.1}\" height=\"7\" fill=\"none\" stroke=\"{MODEL}\" stroke-width=\"1.5\"/>",
            y + 13.0
        );
        text(
            &mut s,
            label_w + bw.max(vw) + 6.0,
            y + 14.0,
            "start",
            &format!(
                "{:.0}%  ±{}",
                c.share_of_bound * 100.0,
                num(c.max_abs.approx)
            ),
        );
    }
    let ly = ht - 10.0;
    let _ = write!(
        s,
        "<rect x=\"{label_w}\" y=\"{:.1}\" width=\"12\" height=\"9\" fill=\"{BAR}\"/>",
        ly - 8.0
    );
    text(
        &mut s,
        label_w + 16.0,
        ly,
        "start",
        "share of the worst-case bound",
    );
    let _ = write!(
        s,
        "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"12\" height=\"7\" fill=\"none\" stroke=\"{MODEL}\" stroke-width=\"1.5\"/>",
        label_w + 190.0,
        ly - 7.0
    );
    text(
        &mut s,
        label_w + 206.0,
        ly,
        "start",
        "share of the variance",
    );
    s.push_str("</svg>");
    s
}

/// Each node's range against what its format holds: the format's range is
/// the grey track (each row at its own scale, zero marked), the values the
/// node takes are the bar on it (red where it passes the format).
#[must_use]
pub fn ranges(nodes: &[NodeReport]) -> String {
    let rows = nodes.len().max(1);
    let (w, row) = (900.0, 20.0);
    let (label_w, mt) = (150.0, 30.0);
    let track_w = w - label_w - 170.0;
    let ht = mt + row * rows as f64 + 10.0;
    let mut s = open(w, ht, "node ranges against their formats");
    text(
        &mut s,
        8.0,
        16.0,
        "start",
        "each node's range (bar) inside its format's range (track); right: format, headroom bits",
    );
    for (i, n) in nodes.iter().enumerate() {
        let y = mt + row * i as f64;
        let Some((fmin, fmax)) = format_limits(&n.format) else {
            continue;
        };
        let (lo, hi) = value_range(n);
        // Scale: the union of the format's range and the value range.
        let (a, b) = (fmin.min(lo), fmax.max(hi));
        let sx = |x: f64| label_w + (x - a) / (b - a).max(f64::MIN_POSITIVE) * track_w;
        let mut label = n.label.clone();
        if label.chars().count() > 22 {
            label = label.chars().take(21).collect::<String>() + "…";
        }
        text(&mut s, label_w - 8.0, y + 13.0, "end", &label);
        let _ = write!(
            s,
            "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"12\" fill=\"#e4e7eb\"/>",
            sx(fmin),
            y + 3.0,
            sx(fmax) - sx(fmin)
        );
        if a < 0.0 && b > 0.0 {
            let z = sx(0.0);
            let _ = write!(
                s,
                "<line x1=\"{z:.1}\" y1=\"{:.1}\" x2=\"{z:.1}\" y2=\"{:.1}\" stroke=\"#8a919c\"/>",
                y + 1.0,
                y + 17.0
            );
        }
        let tip = escape(&format!(
            "{}: [{}, {}] in {} [{}, {}]",
            n.label,
            num(lo),
            num(hi),
            n.format,
            num(fmin),
            num(fmax)
        ));
        // The part the format holds in blue, what passes it in red.
        let inside = (lo.max(fmin), hi.min(fmax));
        let mut pieces = vec![(inside.0, inside.1, BAR)];
        if lo < fmin {
            pieces.push((lo, fmin, BOUND));
        }
        if hi > fmax {
            pieces.push((fmax, hi, BOUND));
        }
        for (a, b, color) in pieces {
            if b < a {
                continue;
            }
            let _ = write!(
                s,
                "<rect x=\"{:.1}\" y=\"{:.1}\" width=\"{:.1}\" height=\"6\" fill=\"{color}\"><title>{tip}</title></rect>",
                sx(a),
                y + 6.0,
                (sx(b) - sx(a)).max(1.5),
            );
        }
        text(
            &mut s,
            label_w + track_w + 10.0,
            y + 13.0,
            "start",
            &format!("{}  {}", n.format, headroom_text(n)),
        );
    }
    s.push_str("</svg>");
    s
}

/// Round tick positions (steps of 1, 2 or 5 times a power of ten) inside
/// `[a, b]`, zero included when it lies inside.
fn nice_ticks(a: f64, b: f64) -> Vec<f64> {
    let span = b - a;
    if span.is_nan() || span <= 0.0 || span.is_infinite() {
        return vec![a];
    }
    let raw = span / 5.0;
    let p = 10f64.powf(raw.log10().floor());
    let step = [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|m| m * p)
        .find(|s| span / s <= 6.0)
        .unwrap_or(10.0 * p);
    let mut t = (a / step).ceil() * step;
    let mut v = Vec::new();
    while t <= b + step * 1e-9 && v.len() < 12 {
        v.push(if t.abs() < step * 1e-9 { 0.0 } else { t });
        t += step;
    }
    v
}

/// The noise model's distribution of an output's error: the convolution of
/// each source's contribution, taken as uniform over its exact interval
/// (a constant's known error is a shift). Saturation and wrap sources are
/// outside the model. Returns the left edge of the first cell, the cell
/// width and the probability mass per cell; `None` when no source has a
/// spread.
fn predicted_density(o: &OutputReport) -> Option<(f64, f64, Vec<f64>)> {
    const CELLS: f64 = 1024.0;
    let boxes: Vec<(f64, f64)> = o
        .contributions
        .iter()
        .filter(|c| !matches!(c.kind, Some(SourceKind::Saturation | SourceKind::Wrap)))
        .map(|c| (c.interval.lo.approx, c.interval.hi.approx))
        .collect();
    let total: f64 = boxes.iter().map(|(lo, hi)| hi - lo).sum();
    if !(total.is_finite() && total > 0.0) {
        return None;
    }
    let dx = total / CELLS;
    let mut start = 0.0;
    let mut mass = vec![1.0];
    for (lo, hi) in boxes {
        let len = ((hi - lo) / dx).round() as usize;
        if len <= 1 {
            // Narrower than a cell (or a constant's known error): a shift.
            start += (lo + hi) / 2.0;
            continue;
        }
        start += lo;
        let mut next = vec![0.0; mass.len() + len - 1];
        // A moving sum over the box, with prefix sums.
        let mut prefix = vec![0.0; mass.len() + 1];
        for (i, m) in mass.iter().enumerate() {
            prefix[i + 1] = prefix[i] + m;
        }
        for (k, v) in next.iter_mut().enumerate() {
            let hi_i = (k + 1).min(mass.len());
            let lo_i = (k + 1).saturating_sub(len);
            *v = (prefix[hi_i] - prefix[lo_i]) / len as f64;
        }
        mass = next;
    }
    (mass.len() > 1).then_some((start, dx, mass))
}
