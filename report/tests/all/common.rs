//! Shared helpers.

use qbound_report::arith::Exact;
use qbound_report::{Datapath, Num, Report, SimulationOptions, analyze, parse, simulate};
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
        ExactExt::rational(&n.error.lo).unwrap(),
        ExactExt::rational(&n.error.hi).unwrap(),
    )
}

/// A [`Num`] as a `rug` rational (the test oracle).
pub fn rat(n: &Num) -> Rational {
    n.to_string().parse().unwrap()
}

/// The exact text of a report field as a `rug` rational.
pub trait ExactExt {
    /// The rational, if the text is one.
    fn rational(&self) -> Option<Rational>;
}

impl ExactExt for Exact {
    fn rational(&self) -> Option<Rational> {
        self.exact.parse().ok()
    }
}

/// A proptest configuration with `default` cases, or `PROPTEST_CASES` when
/// set (for long runs).
pub fn cases(default: u32) -> proptest::test_runner::Config {
    let n = std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default);
    proptest::test_runner::Config::with_cases(n)
}
