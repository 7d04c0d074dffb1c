//! What each rounding and overflow mode costs in the library's FIR (the
//! generic 8-tap low-pass of `examples/generic_fir.rs`, Q0.15 samples and
//! coefficients, Q9.30 accumulator): one filter step per iteration, the
//! modes applied to the output rescale.
//!
//! Run: `cargo run --release -p qbound-bench --example fir_modes`
//! (criterion options follow `--`, e.g. `-- --quick`).

#[path = "../../examples/shared/fir.rs"]
mod fir;

use std::hint::black_box;

use fir::{Fir, LOW_PASS};
use qbound::Q;
use qbound_bench::{ModeCosts, mode_costs};

type Sample = Q<0, 15>;

fn main() {
    let mut fir = Fir::<Sample, Sample, Q<9, 30>, 8>::new(&LOW_PASS).expect("finite taps");
    let x = Sample::from_bits(12_345);
    let mut costs = ModeCosts::new("fir8");
    mode_costs!(&mut costs, |rounding, overflow| {
        black_box(fir.push(black_box(x), rounding, overflow))
    });
    println!("\n{}", costs.table());
}
