//! Dependency-aware ranges: the value of every node is an affine form in
//! the inputs, so expressions that use a signal twice get the range of
//! what they compute, not of two independent copies.

use crate::common::{ExactExt, audit, q, rat};
use qbound_report::{analyze, parse};
use rug::Rational;

fn node<'a>(r: &'a qbound_report::Report, label: &str) -> &'a qbound_report::verdict::NodeReport {
    r.nodes.iter().find(|n| n.label == label).unwrap()
}

fn range(n: &qbound_report::verdict::NodeReport) -> (Rational, Rational) {
    (
        n.actual_range.lo.rational().unwrap(),
        n.actual_range.hi.rational().unwrap(),
    )
}

#[test]
fn a_signal_minus_itself_is_zero() {
    let (_, r) = audit("input x : Q3.4 in [-5, 6]\nlet d = x - x\noutput d", 200);
    assert_eq!(range(node(&r, "d")), (q(0, 1), q(0, 1)));
    // With a scale in between: 2x - (x + x) and (x << 1) - 2·x.
    let (_, r) = audit(
        "input x : Q3.4 in [-5, 6]\nconst two = 2 : Q3.0\nlet a = (x << 1) - two * x\nlet b = x + x - (x << 1)\noutput a\noutput b",
        200,
    );
    assert_eq!(range(node(&r, "a")), (q(0, 1), q(0, 1)));
    assert_eq!(range(node(&r, "b")), (q(0, 1), q(0, 1)));
}

#[test]
fn a_square_is_not_negative() {
    let (_, r) = audit("input x : Q0.7 in [-1, 0.5]\nlet s = x * x\noutput s", 200);
    assert_eq!(range(node(&r, "s")), (q(0, 1), q(1, 1)));
}

#[test]
fn the_residue_of_a_rescale_has_the_range_of_a_rounding_error() {
    // x - floor(x to Q0.7) is the discarded part: [0, 2^-7 - 2^-15]. With
    // independent copies it would be [-1.99, 1.99] and the second rescale
    // (into Q0.7) would be reported as saturating.
    let text = "\
input x : Q0.15 in [-1, 0.99]
let r = rescale(x, Q0.7, floor, saturate)
let d = x - r
let e = rescale(d, Q0.7, nearest-even, saturate)
output e";
    let (_, rep) = audit(text, 3000);
    assert_eq!(range(node(&rep, "d")), (q(0, 1), q(255, 32768)));
    assert!(rep.diagnostics.is_empty(), "{:?}", rep.diagnostics);
    let out = &rep.outputs[0];
    let t = out.measured.as_ref().unwrap().tightness.unwrap();
    assert!(t <= 1.01, "bound/measured {t}");
}

#[test]
fn butterfly_sums_recombine() {
    // (a + b) + (a - b) = 2a and (a + b) - (a - b) = 2b: the recombined
    // ranges are those of 2a and 2b, not twice as wide.
    let text = "\
input a : Q0.15 in [-0.5, 0.5]
input b : Q0.15 in [-0.25, 0.25]
let s = a + b
let d = a - b
let two_a = s + d
let two_b = s - d
output two_a
output two_b";
    let path = parse(text).unwrap();
    let an = analyze(&path);
    let two_a = &an.nodes[path.outputs()[0].node.0].actual;
    let two_b = &an.nodes[path.outputs()[1].node.0].actual;
    assert_eq!((rat(&two_a.lo), rat(&two_a.hi)), (q(-1, 1), q(1, 1)));
    assert_eq!((rat(&two_b.lo), rat(&two_b.hi)), (q(-1, 2), q(1, 2)));
}
