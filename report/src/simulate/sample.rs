//! Input vectors: seeded random vectors and the corners of the input box.
//!
//! Random vectors: exact inputs uniform over their grid points; real
//! (quantized) inputs uniform over their range at a resolution at least 24
//! bits finer than the format's step (so that the residues the converter
//! discards are uniform too), then quantized by the input's converter. The
//! same seed and stream give the same vectors on every machine (ChaCha8,
//! no platform-dependent floating point in the choice of inputs).

use rand::Rng;
use rand_chacha::ChaCha8Rng;

use super::eval::{InputValue, Simulator};
use crate::arith::{Num, ceil_to_grid, floor_to_grid, ulp};
use crate::model::{Datapath, InputKind, Op};

/// How one input is drawn.
#[derive(Clone, Debug)]
struct Draw {
    lo: Num,
    hi: Num,
    step: Num,
    /// Exact data: the number of grid points in `[lo, hi]`, or `None` when
    /// it is 2^128 (every value of a 128-bit format).
    points: Option<Option<u128>>,
    /// Quantized: bits of resolution over the range.
    bits: u32,
}

/// Draws input vectors for one datapath.
#[derive(Debug)]
pub struct Sampler<'a> {
    sim: Simulator<'a>,
    draws: Vec<Draw>,
}

impl<'a> Sampler<'a> {
    /// Prepare `path`.
    #[must_use]
    pub fn new(path: &'a Datapath) -> Sampler<'a> {
        let sim = Simulator::new(path);
        let draws = sim
            .inputs()
            .iter()
            .map(|&id| {
                let n = path.node(id);
                let Op::Input { lo, hi, kind } = &n.op else {
                    unreachable!("inputs are inputs")
                };
                let f = n.format;
                let step = ulp(f);
                match kind {
                    InputKind::Exact => {
                        let (lo, hi) = (
                            ceil_to_grid(lo, f.frac_bits()),
                            floor_to_grid(hi, f.frac_bits()),
                        );
                        let span = (&hi - &lo).mul_pow2(i64::from(f.frac_bits()));
                        let points = span
                            .to_ibig()
                            .and_then(|s| u128::try_from(&s).ok())
                            .and_then(|s| s.checked_add(1));
                        Draw {
                            lo,
                            hi,
                            step,
                            points: Some(points),
                            bits: 0,
                        }
                    }
                    InputKind::Quantized(_) => Draw {
                        lo: lo.clone(),
                        hi: hi.clone(),
                        step,
                        points: None,
                        bits: (f.width() + 24).max(48),
                    },
                }
            })
            .collect();
        Sampler { sim, draws }
    }

    /// The engine's evaluator.
    #[must_use]
    pub fn simulator(&self) -> &Simulator<'a> {
        &self.sim
    }

    /// Number of inputs.
    #[must_use]
    pub fn input_count(&self) -> usize {
        self.draws.len()
    }

    /// The lower and upper end of input `k` (grid ends for exact data, the
    /// real range for a quantized input).
    #[must_use]
    pub fn ends(&self, k: usize) -> (&Num, &Num) {
        (&self.draws[k].lo, &self.draws[k].hi)
    }

    /// The step of input `k`'s format.
    #[must_use]
    pub fn step(&self, k: usize) -> &Num {
        &self.draws[k].step
    }

    /// The ideal value of input `k` for a random draw.
    fn random_value(&self, k: usize, rng: &mut ChaCha8Rng) -> Num {
        let d = &self.draws[k];
        match d.points {
            Some(points) => {
                let r = rng.random::<u128>();
                let r = match points {
                    Some(n) => r % n,
                    None => r,
                };
                &d.lo + Num::from_u128(r) * &d.step
            }
            None => {
                // lo + (hi - lo)·u/2^m, u uniform in [0, 2^m].
                let mut u = Num::ZERO;
                let mut left = d.bits;
                while left > 0 {
                    let take = left.min(64);
                    let word = rng.random::<u64>() >> (64 - take);
                    u = u.mul_pow2(i64::from(take)) + Num::from(word);
                    left -= take;
                }
                &d.lo + (&d.hi - &d.lo) * u.mul_pow2(-i64::from(d.bits))
            }
        }
    }

    /// A random vector.
    pub fn random(&self, rng: &mut ChaCha8Rng) -> Vec<InputValue> {
        (0..self.draws.len())
            .map(|k| {
                let x = self.random_value(k, rng);
                self.sim.input_value(k, x, rng.random())
            })
            .collect()
    }

    /// The corner whose input `k` is at the upper end of its range when
    /// `up(k)`, else at the lower end.
    #[must_use]
    pub fn corner(&self, up: impl Fn(usize) -> bool) -> Vec<InputValue> {
        (0..self.draws.len())
            .map(|k| {
                let d = &self.draws[k];
                let x = if up(k) { &d.hi } else { &d.lo };
                self.sim.input_value(k, x.clone(), u64::MAX / 2)
            })
            .collect()
    }

    /// The vector with the ideal input values `xs`.
    #[must_use]
    pub fn at(&self, xs: &[Num]) -> Vec<InputValue> {
        xs.iter()
            .enumerate()
            .map(|(k, x)| self.sim.input_value(k, x.clone(), u64::MAX / 2))
            .collect()
    }
}
