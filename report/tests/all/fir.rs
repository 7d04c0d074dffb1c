//! The 64-tap FIR (report/examples/fir64.qbdp): quantized coefficients, exact
//! 40-bit accumulation, one final rounding. The bound must be within 1% of
//! the worst error the simulation finds.

use crate::common::{ExactExt, audit};

#[test]
fn fir64_bound_within_one_percent_of_worst_simulated() {
    let text = include_str!("../../examples/fir64.qbdp");
    let (_, r) = audit(text, 2000);
    let out = &r.outputs[0];
    let m = out.measured.as_ref().unwrap();
    let bound = out.error.max_abs.rational().unwrap();
    let worst = m.max_abs.rational().unwrap();
    let ratio = m.tightness.unwrap();
    println!(
        "fir64: bound {:.6e} ({} ulp), worst simulated {:.6e}, bound/measured = {ratio:.5}; predicted std {:.4e}, measured {:.4e}",
        bound.to_f64(),
        out.error.ulps.approx,
        worst.to_f64(),
        out.stats.std_dev,
        m.std_dev
    );
    assert!(worst <= bound);
    assert!(ratio <= 1.01, "bound/measured = {ratio}");
    // Nothing overflows: the accumulator holds every partial sum, the
    // output holds sum |h| < 1.
    assert!(r.diagnostics.is_empty(), "{:?}", r.diagnostics);
    // 64 constants and one rounding reach the output, each its own term.
    assert_eq!(out.contributions.len(), 65);
}
