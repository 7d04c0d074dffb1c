//! Bounds checked by hand on small expressions; each derivation is in the
//! comment beside its check.

use crate::common::{ExactExt, audit, bound, q, rat};
use qbound_report::verdict::Severity;

#[test]
fn floor_rescale_drops_two_bits() {
    // Q3.4 -> Q3.2 with floor: step q0 = 1/16 to q = 1/4; the discarded
    // residue is one of 0, 1/16, 2/16, 3/16, so the error is in [-3/16, 0].
    let (_, r) = audit(
        "input x : Q3.4 in [-2, 2]\nlet y = rescale(x, Q3.2, floor, wrap)\noutput y",
        500,
    );
    assert_eq!(bound(&r, "y"), (q(-3, 16), q(0, 1)));
    // The simulation reaches the bound (x = 3/16 floors to 0).
    assert_eq!(
        r.outputs[0].measured.as_ref().unwrap().max_abs.exact,
        "3/16"
    );
    assert!(r.diagnostics.is_empty(), "{:?}", r.diagnostics);
}

#[test]
fn nearest_modes_discrete_intervals() {
    // Q0.5 -> Q0.2: q0 = 1/32, q = 1/4. Ties up: residues j/32, j = 0..7;
    // j < 4 rounds down (error -j/32, down to -3/32 = -(q/2 - q0)), j >= 4
    // rounds up (error (8 - j)/32, up to 4/32 = q/2). Ties to even: a tie can
    // go either way, [-q/2, q/2] = [-1/8, 1/8].
    let text = "input x : Q0.5 in [-0.5, 0.5]\n\
                let u = rescale(x, Q0.2, nearest-up, saturate)\n\
                let e = rescale(x, Q0.2, nearest-even, saturate)\n\
                output u\noutput e";
    let (_, r) = audit(text, 500);
    assert_eq!(bound(&r, "u"), (q(-3, 32), q(1, 8)));
    assert_eq!(bound(&r, "e"), (q(-1, 8), q(1, 8)));
}

#[test]
fn constant_times_input_then_rounding() {
    // c = 0.1 in Q0.7, nearest-even: 0.1·128 = 12.8 -> 13, so c~ = 13/128 and
    // the known error d = 13/128 - 1/10 = 1/640. x in [-1, 1/2] (exact Q0.7).
    // Product error x·d in [-1/640, 1/1280]. The rescale Q1.14 -> Q0.7
    // (nearest-even) adds [-1/256, 1/256]. Total: [-2/1280 - 5/1280,
    // 1/1280 + 5/1280] = [-7/1280, 3/640].
    let text = "input x : Q0.7 in [-1, 0.5]\nconst c = 0.1 : Q0.7\nlet y = rescale(c * x, Q0.7, nearest-even, saturate)\noutput y";
    let (_, r) = audit(text, 2000);
    assert_eq!(bound(&r, "c"), (q(1, 640), q(1, 640)));
    assert_eq!(bound(&r, "y"), (q(-7, 1280), q(3, 640)));
    let out = &r.outputs[0];
    // The breakdown names both sources.
    assert_eq!(out.contributions.len(), 2);
    assert!(
        out.contributions
            .iter()
            .any(|c| c.label.contains("constant c"))
    );
}

#[test]
fn saturation_reports_largest_error() {
    // Q3.4 [-8, 7.9375] into Q1.4 (range [-2, 1.9375]) with saturation: the
    // value is clamped by up to 7.9375 - 1.9375 = 6 above and -2 - (-8) = 6
    // below; no rounding, so the error is in [1.9375 - 7.9375, -2 + 8].
    let (_, r) = audit(
        "input x : Q3.4 in [-8, 7.9375]\nlet y = rescale(x, Q1.4, floor, saturate)\noutput y",
        500,
    );
    assert_eq!(bound(&r, "y"), (q(-6, 1), q(6, 1)));
    let y = r.nodes.iter().find(|n| n.label == "y").unwrap();
    assert!(y.overflow.can_overflow);
    assert_eq!(y.overflow.severity, Severity::Warning);
    assert_eq!(
        y.overflow.largest_saturation_error.as_ref().unwrap().exact,
        "6"
    );
    assert_eq!(r.outputs[0].measured.as_ref().unwrap().max_abs.exact, "6");
}

#[test]
fn wrap_and_panic_are_errors() {
    let (_, r) = audit(
        "input x : Q3.0 in [0, 7]\nlet y = rescale(x, UQ2.0, floor, wrap)\nlet z = rescale(x, Q2.0, floor, panic)\noutput y\noutput z",
        200,
    );
    assert_eq!(r.worst_severity(), Severity::Error);
    assert_eq!(
        r.diagnostics
            .iter()
            .filter(|d| d.severity == Severity::Error)
            .count(),
        2
    );
    // Wrap: the wrapped value is in [0, 3], the ideal one in [0, 7]: the error
    // is in [0 - 7, 3 - 0].
    assert_eq!(bound(&r, "y"), (q(-7, 1), q(3, 1)));
}

#[test]
fn no_overflow_when_range_fits() {
    // x in [-1, 0.75] times 0.5 fits Q0.15 after rounding: no finding.
    let (_, r) = audit(
        "input x : Q0.15 in [-1, 0.75]\nconst h = 0.5 : Q0.15\nlet y = rescale(h * x, Q0.15, nearest-even, saturate)\noutput y budget 0.5 ulp",
        500,
    );
    assert!(r.diagnostics.is_empty(), "{:?}", r.diagnostics);
    let b = r.outputs[0].budget.as_ref().unwrap();
    assert!(b.met_by_bound);
    // h·x has 16 fraction bits at most: dropping 15 bits of a Q1.30 product
    // whose last 14 bits are zero. The bound still covers [-q/2, q/2].
    assert_eq!(bound(&r, "y"), (q(-1, 65536), q(1, 65536)));
}

#[test]
fn product_of_two_rounded_values() {
    // a = floor(x), b = floor(y) from Q0.4 to Q0.2: e_a, e_b in [-3/16, 0];
    // ideal x, y in [0, 1/2]. a·b error = x·e_b + y·e_a + e_a·e_b:
    // [0, 1/2]·[-3/16, 0] twice gives [-3/32, 0] each, and e_a·e_b in
    // [0, 9/256]. Total [-3/16, 9/256].
    let text = "input x : Q0.4 in [0, 0.5]\ninput y : Q0.4 in [0, 0.5]\n\
                let a = rescale(x, Q0.2, floor, wrap)\nlet b = rescale(y, Q0.2, floor, wrap)\nlet p = a * b\noutput p";
    let (_, r) = audit(text, 500);
    assert_eq!(bound(&r, "p"), (q(-3, 16), q(9, 256)));
}

#[test]
fn quantized_input_continuous_interval() {
    // A real t in [-3, 3] rounded to nearest-even into Q3.2 (q = 1/4): the
    // error of a real value is in [-1/8, 1/8]; toward zero: [-1/4, 1/4]
    // (either sign), and for a non-negative range [0, 2.9]: [-1/4, 0].
    let (_, r) = audit(
        "input t : Q3.2 in [-3, 3] quantize nearest-even\noutput t",
        2000,
    );
    assert_eq!(bound(&r, "t"), (q(-1, 8), q(1, 8)));
    let (_, r) = audit(
        "input t : Q3.2 in [0, 2.9] quantize toward-zero\noutput t",
        2000,
    );
    assert_eq!(bound(&r, "t"), (q(-1, 4), q(0, 1)));
    // 2.9 truncates to 2.75; the worst error is approached, never passed.
    let m = r.outputs[0]
        .measured
        .as_ref()
        .unwrap()
        .max_abs
        .rational()
        .unwrap();
    assert!(m > q(24, 100) && m < q(1, 4), "{m}");
}

#[test]
fn shift_is_exact_and_moves_the_point() {
    // (x << 3) >> 5 is x / 4, exactly; Q0.15 << 3 is Q3.12.
    let (p, r) = audit(
        "input x : Q0.15 in [-1, 0.5]\nlet y = (x << 3) >> 5\noutput y",
        300,
    );
    let y = p.outputs()[0].node;
    assert_eq!(p.node(y).format.to_string(), "Q0.17");
    assert_eq!(bound(&r, "y"), (q(0, 1), q(0, 1)));
    assert_eq!(r.nodes[1].format, "Q3.12");
}

#[test]
fn affine_form_cancels_correlated_errors() {
    // d = a - a' where both read the same rounding: the error cancels
    // exactly in the affine form (interval arithmetic would give twice the
    // rounding interval).
    let (_, r) = audit(
        "input x : Q0.8 in [-1, 0.9]\nlet a = rescale(x, Q0.4, floor, wrap)\nlet d = a - a\noutput d",
        200,
    );
    assert_eq!(bound(&r, "d"), (q(0, 1), q(0, 1)));
}

#[test]
fn folded_terms_still_cancel_where_paths_meet() {
    // y = x0 + … + x9, each input a real signal rounded to nearest into
    // Q3.4 (q = 1/16): e_y = Σ ε_k with ε_k in [-1/32, 1/32], so y's bound
    // is [-10/32, 10/32]. With at most 4 terms per copied form, the copies
    // of y fold its smallest terms into one internal source η. Then
    // w = (y + y) - y has the error (2 - 1)·e_y: the bound of w must equal
    // the bound of y. Had the folded part become an anonymous remainder r,
    // w would get 2r - r, three times r's width.
    let mut text = String::new();
    for k in 0..10 {
        text.push_str(&format!(
            "input x{k} : Q3.4 in [-2, 2] quantize nearest-even\n"
        ));
    }
    let sum: Vec<String> = (0..10).map(|k| format!("x{k}")).collect();
    text.push_str(&format!("let y = {}\n", sum.join(" + ")));
    text.push_str("let w = (y + y) - y\noutput y\noutput w\n");
    let path = qbound_report::parse(&text).unwrap();
    let a = qbound_report::analyze_with(
        &path,
        &qbound_report::AnalysisOptions {
            max_terms: 4,
            ..Default::default()
        },
    );
    let y = &a.nodes[path.outputs()[0].node.0].error;
    let w = &a.nodes[path.outputs()[1].node.0].error;
    assert_eq!((rat(&y.lo), rat(&y.hi)), (q(-10, 32), q(10, 32)));
    assert_eq!(y, w);
}
