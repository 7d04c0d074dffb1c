//! The error a rounding adds: its exact interval (for the sound bounds) and
//! its mean and variance under the quantization-noise model.

use qbound::Rounding;

use crate::arith::{Interval, Num};

/// The sign of the values being rounded, when the range tells it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Sign {
    /// All values `>= 0`.
    NonNegative,
    /// All values `<= 0`.
    NonPositive,
    /// Either.
    Both,
}

impl Sign {
    /// The sign of the values in `r`.
    #[must_use]
    pub fn of(r: &Interval) -> Sign {
        if !r.lo.is_negative() {
            Sign::NonNegative
        } else if !r.hi.is_positive() {
            Sign::NonPositive
        } else {
            Sign::Both
        }
    }
}

/// The exact interval of the error `round(x) - x` when `x` lies on a grid of
/// step `q0` (use `q0 = 0` for a real-valued `x`) and is rounded to a grid
/// of step `q = 2^k·q0`, `k >= 1`.
///
/// The discarded residue `r = x - floor(x)` takes the values
/// `0, q0, …, q - q0`. Per mode (the derivation is the case analysis of
/// `Rounding::rounds_up` over those residues):
/// - floor: `-r`, so `[-(q - q0), 0]`; ceil: `q - r` or 0, so `[0, q - q0]`;
/// - toward zero / away from zero: floor for one sign, ceil for the other;
/// - nearest, ties up: `-r` for `r < q/2`, `q - r` for `r >= q/2`:
///   `[-(q/2 - q0), q/2]`; ties away: the same for `x >= 0`, mirrored for
///   `x <= 0`; ties to even: `[-q/2, q/2]` (a tie can go either way);
/// - to odd and stochastic: either neighbour, so `[-(q - q0), q - q0]`.
#[must_use]
pub fn rounding_interval(mode: Rounding, q0: &Num, q: &Num, sign: Sign) -> Interval {
    let full = q - q0;
    let half = q.mul_pow2(-1);
    let half_in = &half - q0;
    let zero = Num::ZERO;
    let down = || Interval::new(-&full, zero.clone());
    let up = || Interval::new(zero.clone(), full.clone());
    let both = || Interval::new(-&full, full.clone());
    match (mode, sign) {
        (Rounding::Floor, _)
        | (Rounding::TowardZero, Sign::NonNegative)
        | (Rounding::AwayFromZero, Sign::NonPositive) => down(),
        (Rounding::Ceil, _)
        | (Rounding::TowardZero, Sign::NonPositive)
        | (Rounding::AwayFromZero, Sign::NonNegative) => up(),
        (
            Rounding::TowardZero
            | Rounding::AwayFromZero
            | Rounding::ToOdd
            | Rounding::Stochastic(_),
            _,
        ) => both(),
        (Rounding::NearestTiesUp, _) | (Rounding::NearestTiesAway, Sign::NonNegative) => {
            Interval::new(-&half_in, half)
        }
        (Rounding::NearestTiesAway, Sign::NonPositive) => Interval::new(-&half, half_in),
        (Rounding::NearestTiesAway | Rounding::NearestTiesEven, _) => Interval::new(-&half, half),
    }
}

/// Mean and variance of the rounding error under the noise model: the
/// residue `r` uniform over its `N = q/q0` values `0, q0, …, q - q0`
/// (continuous uniform on `[0, q)` when `q0 = 0`), independent of
/// everything else; `p_neg` is the probability that the value is negative
/// (for the sign-dependent modes).
///
/// Derivations (sums over `r = j·q0`, `j = 0..N-1`; `M = N/2`):
/// - floor: `e = -r`, mean `-(q - q0)/2`, `E[e²] = q0²(N-1)(2N-1)/6 =
///   (q - q0)(2q - q0)/6`, variance `(q² - q0²)/12`.
/// - ceil: `e = q - r` for `r > 0`, 0 for `r = 0`: the same set of
///   magnitudes, mean `+(q - q0)/2`, variance `(q² - q0²)/12`.
/// - toward zero / away from zero: floor or ceil by sign: mean
///   `±(1 - 2 p_neg)(q - q0)/2`, `E[e²] = (q - q0)(2q - q0)/6`.
/// - nearest, ties up: errors `-j·q0` for `j < M`, `(N - j)·q0` for
///   `j >= M`, i.e. the integers `-(M-1)..=M` times `q0`: mean `q0/2`,
///   `E[e²] = q0²(2M² + 1)/6 = q²/12 + q0²/6`, variance `(q² - q0²)/12`.
/// - nearest, ties to even: as ties up but the tie `±q/2` is split evenly:
///   mean 0, variance `q²/12 + q0²/6`.
/// - nearest, ties away: the tie goes up for positive, down for negative
///   values: mean `(1 - 2 p_neg)·q0/2`, `E[e²] = q²/12 + q0²/6`.
/// - to odd: `r = 0` gives 0; otherwise `-r` or `q - r` by the parity of
///   the quotient (each half the time): mean 0, `E[e²] = (1/N)Σ_{j>=1}
///   (j²q0²) = (q - q0)(2q - q0)/6`.
/// - stochastic: up with probability `r/q`: `E[e | r] = 0`,
///   `E[e² | r] = r(q - r)`; over `r`: `q·E[r] - E[r²] = (q² - q0²)/6`.
#[must_use]
pub fn rounding_moments(mode: Rounding, q0: f64, q: f64, p_neg: f64) -> (f64, f64) {
    let floor_var = (q * q - q0 * q0) / 12.0;
    let one_sided_e2 = (q - q0) * (2.0 * q - q0) / 6.0;
    let nearest_e2 = q * q / 12.0 + q0 * q0 / 6.0;
    let sym = 1.0 - 2.0 * p_neg;
    let with_mean = |mean: f64, e2: f64| (mean, (e2 - mean * mean).max(0.0));
    match mode {
        Rounding::Floor => (-(q - q0) / 2.0, floor_var),
        Rounding::Ceil => ((q - q0) / 2.0, floor_var),
        Rounding::TowardZero => with_mean(-sym * (q - q0) / 2.0, one_sided_e2),
        Rounding::AwayFromZero => with_mean(sym * (q - q0) / 2.0, one_sided_e2),
        Rounding::NearestTiesUp => (q0 / 2.0, floor_var),
        Rounding::NearestTiesEven => (0.0, nearest_e2),
        Rounding::NearestTiesAway => with_mean(sym * q0 / 2.0, nearest_e2),
        Rounding::ToOdd => (0.0, one_sided_e2),
        Rounding::Stochastic(_) => (0.0, (q * q - q0 * q0) / 6.0),
    }
}
