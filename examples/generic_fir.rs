//! One FIR filter, written once, run at three word lengths.
//!
//! Invented scenario (not real data): a bearing-vibration monitor smooths
//! its accelerometer samples with an 8-tap low-pass before peak detection.
//! The team has not settled the word length yet: 16-bit samples on the
//! current microcontroller, 12-bit samples from a cheaper ADC, or 32-bit
//! samples on a DSP. The filter below is generic over the sample,
//! coefficient and accumulator formats (the [`qbound::QType`] trait), so
//! one source serves all three bit-exact models, and a sweep compares
//! their error against the same filter in `f64`.
//!
//! Run: `cargo run --release -p qbound --example generic_fir`

#[path = "shared/fir.rs"]
mod fir;

use fir::{Fir, INPUT, LOW_PASS};
use qbound::{Overflow, Q, QType, Rounding};

/// Run the filter in formats `S`/`C`/`A`; return the worst error against
/// the `f64` filter (on the quantized input), in ulps of `S`.
fn sweep<S: QType, C: QType, A: QType>() -> f64 {
    let mut f = Fir::<S, C, A, 8>::new(&LOW_PASS).expect("finite coefficients");
    let taps: Vec<f64> = f.taps().iter().map(|t| t.to_f64()).collect();
    let mut history = [0.0f64; 8];
    let mut worst = 0.0f64;
    println!(
        "samples {}, coefficients {}, accumulator {}",
        S::FORMAT,
        C::FORMAT,
        A::FORMAT
    );
    for x in INPUT {
        let xs = S::from_f64(x, Rounding::NearestTiesEven, Overflow::Saturate).expect("finite");
        let y = f.push(xs, Rounding::NearestTiesEven, Overflow::Saturate);
        history.rotate_right(1);
        history[0] = xs.to_f64();
        let exact: f64 = history.iter().zip(&taps).map(|(a, b)| a * b).sum();
        let ulp = S::STEP.to_f64();
        let clipped = exact.clamp(S::MIN.to_f64(), S::MAX.to_f64());
        let err = (y.to_f64() - clipped).abs() / ulp;
        worst = worst.max(err);
        println!("  in {xs:>12.6}  out {y:>12.6}  f64 {exact:>12.6}  error {err:.3} ulp");
    }
    worst
}

fn main() {
    let w16 = sweep::<Q<0, 15>, Q<0, 15>, Q<9, 30>>();
    let w12 = sweep::<Q<0, 11>, Q<0, 11>, Q<5, 22>>();
    let w32 = sweep::<Q<0, 31>, Q<0, 31>, Q<9, 62>>();
    println!("worst error: 16-bit {w16:.3} ulp, 12-bit {w12:.3} ulp, 32-bit {w32:.3} ulp");
    // Rounding to nearest after an exact accumulation: within half an ulp
    // of the f64 filter (up to f64's own rounding on the 32-bit run).
    assert!(w16 <= 0.5 + 1e-9 && w12 <= 0.5 + 1e-9 && w32 <= 0.5 + 1e-3);
}
