//! Rounding modes and the one kernel that applies them: a right shift that
//! rounds.
//!
//! Names follow the IEEE 754 rounding directions and general mathematics.
//! Every mode is defined on the exact value: rounding `x` to a step `q`
//! picks one of the two multiples of `q` around `x` (or `x` itself when it
//! is a multiple).

use core::cmp::Ordering;

use crate::storage::WorkInt;

/// How a value that falls between two representable values is rounded.
///
/// ```
/// use qbound::{Overflow, Rounding, Q};
/// // 2.5 and -2.5 in Q7.1, rounded to integers (Q7.0).
/// let a = Q::<7, 1>::from_bits(5);
/// let b = Q::<7, 1>::from_bits(-5);
/// let even = |x: Q<7, 1>| x.rescale::<Q<7, 0>>(Rounding::NearestTiesEven, Overflow::Panic).to_bits();
/// assert_eq!((even(a), even(b)), (2, -2));
/// let floor = |x: Q<7, 1>| x.rescale::<Q<7, 0>>(Rounding::Floor, Overflow::Panic).to_bits();
/// assert_eq!((floor(a), floor(b)), (2, -3));
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub enum Rounding {
    /// Toward −∞ (IEEE 754 roundTowardNegative). On two's-complement bits
    /// this is the plain arithmetic right shift: the cheapest mode.
    Floor,
    /// Toward +∞ (IEEE 754 roundTowardPositive).
    Ceil,
    /// Toward zero (IEEE 754 roundTowardZero): truncation of the magnitude.
    TowardZero,
    /// Away from zero.
    AwayFromZero,
    /// To nearest; a tie goes toward +∞ (add half a step, then floor).
    NearestTiesUp,
    /// To nearest; a tie goes away from zero (IEEE 754
    /// roundTiesToAway).
    NearestTiesAway,
    /// To nearest; a tie goes to the even neighbour (IEEE 754
    /// roundTiesToEven): no bias on ties.
    NearestTiesEven,
    /// Round to odd ("sticky" rounding): an inexact result takes the odd
    /// neighbour. Rounding to odd with at least two extra bits and then
    /// rounding again to nearest gives the same result as one rounding.
    ToOdd,
    /// Stochastic rounding: up with probability equal to the discarded
    /// fraction, driven by the caller's random word. The result is
    /// deterministic given the word: rounding up happens exactly when
    /// `random < frac64`, where `frac64` is the discarded fraction of a
    /// step scaled by 2^64 and rounded down. With a uniformly random word
    /// the expected result equals the exact value (unbiased) when at most
    /// 64 bits are discarded; beyond 64 bits the bias is below 2^-64 step.
    /// The transcendental functions (sin, cos, atan2, exp2, log2) apply
    /// this rule to a value within 2^-112 of the exact one (see their
    /// accuracy contract).
    Stochastic(u64),
}

impl Rounding {
    /// Every mode, with a zero random word for the stochastic one.
    ///
    /// ```
    /// assert_eq!(qbound::Rounding::ALL.len(), 9);
    /// ```
    pub const ALL: [Rounding; 9] = [
        Rounding::Floor,
        Rounding::Ceil,
        Rounding::TowardZero,
        Rounding::AwayFromZero,
        Rounding::NearestTiesUp,
        Rounding::NearestTiesAway,
        Rounding::NearestTiesEven,
        Rounding::ToOdd,
        Rounding::Stochastic(0),
    ];

    /// A short lowercase name: `floor`, `ceil`, `toward-zero`,
    /// `away-from-zero`, `nearest-up`, `nearest-away`, `nearest-even`,
    /// `odd`, `stochastic`.
    ///
    /// ```
    /// assert_eq!(qbound::Rounding::NearestTiesEven.name(), "nearest-even");
    /// ```
    #[must_use]
    pub const fn name(self) -> &'static str {
        match self {
            Rounding::Floor => "floor",
            Rounding::Ceil => "ceil",
            Rounding::TowardZero => "toward-zero",
            Rounding::AwayFromZero => "away-from-zero",
            Rounding::NearestTiesUp => "nearest-up",
            Rounding::NearestTiesAway => "nearest-away",
            Rounding::NearestTiesEven => "nearest-even",
            Rounding::ToOdd => "odd",
            Rounding::Stochastic(_) => "stochastic",
        }
    }

    /// The mode named by [`Rounding::name`] (the stochastic mode gets a zero
    /// random word).
    ///
    /// ```
    /// use qbound::Rounding;
    /// assert_eq!(Rounding::from_name("floor"), Some(Rounding::Floor));
    /// assert_eq!(Rounding::from_name("banker"), None);
    /// ```
    #[must_use]
    pub fn from_name(name: &str) -> Option<Rounding> {
        Rounding::ALL.into_iter().find(|r| r.name() == name)
    }

    /// Whether the mode rounds to the nearest value (its error is at most
    /// half a step).
    ///
    /// ```
    /// assert!(qbound::Rounding::NearestTiesEven.is_nearest());
    /// assert!(!qbound::Rounding::Floor.is_nearest());
    /// ```
    #[must_use]
    pub const fn is_nearest(self) -> bool {
        matches!(
            self,
            Rounding::NearestTiesUp | Rounding::NearestTiesAway | Rounding::NearestTiesEven
        )
    }

    /// Whether to step the floor quotient up by one, given the class of the
    /// discarded part, the quotient's parity and the sign of the exact value.
    ///
    /// This is the one definition of the modes; it is a `const fn` so that
    /// the compile-time conversions (`qconst!`, `from_literal`) use it too.
    #[inline(always)]
    pub(crate) const fn rounds_up(
        self,
        exact: bool,
        vs_half: Ordering,
        frac64: u64,
        q_odd: bool,
        neg: bool,
    ) -> bool {
        // Written with non-short-circuit `&` / `|` so that the compiler can
        // keep the decision branch-free. The nearest modes need no `exact`
        // test: a residue at or above one half is never zero.
        let inexact = !exact;
        let above = matches!(vs_half, Ordering::Greater);
        let tie = matches!(vs_half, Ordering::Equal);
        match self {
            Rounding::Floor => false,
            Rounding::Ceil => inexact,
            Rounding::TowardZero => inexact & neg,
            Rounding::AwayFromZero => inexact & !neg,
            Rounding::NearestTiesUp => above | tie,
            Rounding::NearestTiesAway => above | (tie & !neg),
            Rounding::NearestTiesEven => above | (tie & q_odd),
            Rounding::ToOdd => inexact & !q_odd,
            // frac64 is zero when the shift is exact, so this never rounds
            // an exact value.
            Rounding::Stochastic(random) => random < frac64,
        }
    }
}

/// `x / 2^k` rounded by `mode`, for `k >= 0`. The result has the same type;
/// for `k >= 1` it always fits (rounding up never passes the type's range).
#[inline(always)]
pub(crate) fn shr_round<T: WorkInt>(x: T, k: u32, mode: Rounding) -> T {
    if k == 0 {
        return x;
    }
    let (q, r) = x.split(k);
    if mode.rounds_up(r.exact, r.vs_half, r.frac64, q.is_odd(), x.is_negative()) {
        q.add_one()
    } else {
        q
    }
}
