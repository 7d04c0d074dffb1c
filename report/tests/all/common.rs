//! Shared helpers.

use qbound_report::{Datapath, Report, SimulationOptions, analyze, parse, simulate};
use rug::Rational;

/// Parse, analyse and simulate; panics (failing the test) on any error,
/// including a measured error above its bound.
pub fn audit(text: &str, vectors: u64) -> (Datapath, Report) {
    let path = parse(text).unwrap_or_else(|e| panic!("{e}"));
    let a = analyze(&path);
    let opts = SimulationOptions {
        random_vectors: vectors,
        ..SimulationOptions::default()
    };
    let r = simulate(&path, &a, &opts).unwrap_or_else(|e| panic!("{e}"));
    (path, r)
}

/// `p/q` as a rational.
pub fn q(p: i64, d: i64) -> Rational {
    Rational::from((p, d))
}

/// The exact error bound of the named node.
pub fn bound(r: &Report, label: &str) -> (Rational, Rational) {
    let n = r
        .nodes
        .iter()
        .find(|n| n.label == label)
        .unwrap_or_else(|| panic!("no node {label}"));
    (
        n.error.lo.rational().unwrap(),
        n.error.hi.rational().unwrap(),
    )
}
