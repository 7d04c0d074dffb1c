#![allow(dead_code)]
//! A FIR filter written once for any sample, coefficient and accumulator
//! format, through the [`QType`] trait. Shared by the `generic_fir` and
//! `mode_costs` examples.

use qbound::{FloatError, Overflow, QType, Rounding};

/// An `N`-tap FIR: samples `S`, coefficients `C`, accumulator `A`.
///
/// Each product is formed exactly and rounded into `A` with `Floor`
/// (exact when `A` has at least the fraction bits of `S` plus those of
/// `C`); the sum wraps in `A` (the designer gives `A` enough guard bits);
/// the output is rounded back into `S` with the caller's modes: the one
/// place the filter loses information.
pub struct Fir<S, C, A, const N: usize> {
    taps: [C; N],
    history: [S; N],
    acc: core::marker::PhantomData<A>,
}

impl<S: QType, C: QType, A: QType, const N: usize> Fir<S, C, A, N> {
    /// Quantize real coefficients into `C` (to nearest, ties to even,
    /// saturating).
    pub fn new(coefficients: &[f64; N]) -> Result<Self, FloatError> {
        let mut taps = [C::ZERO; N];
        for (t, c) in taps.iter_mut().zip(coefficients) {
            *t = C::from_f64(*c, Rounding::NearestTiesEven, Overflow::Saturate)?;
        }
        Ok(Fir {
            taps,
            history: [S::ZERO; N],
            acc: core::marker::PhantomData,
        })
    }

    /// The quantized coefficients.
    pub fn taps(&self) -> &[C; N] {
        &self.taps
    }

    /// Push one sample; return the output rounded into `S`.
    #[inline]
    pub fn push(&mut self, x: S, rounding: Rounding, overflow: Overflow) -> S {
        self.history.rotate_right(1);
        self.history[0] = x;
        let mut acc = A::ZERO;
        for (x, h) in self.history.iter().zip(&self.taps) {
            let p: A = x.mul_rescale(*h, Rounding::Floor, Overflow::Wrap);
            acc = acc.wrapping_add(p);
        }
        acc.rescale(rounding, overflow)
    }
}

/// The taps of an invented 8-tap symmetric low-pass (sum 1.0).
pub const LOW_PASS: [f64; 8] = [0.019, 0.068, 0.165, 0.248, 0.248, 0.165, 0.068, 0.019];

/// Invented input: a hum, a knock, and a clipped spike, in full-scale
/// units.
pub const INPUT: [f64; 16] = [
    0.024, 0.058, 0.079, 0.070, 0.034, -0.009, -0.049, -0.073, -0.067, 0.427, 1.0, 1.0, 0.931,
    -0.153, -1.0, -0.027,
];
