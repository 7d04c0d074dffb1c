//! Reference values of the functions with MPFR (`rug`), correct rounding
//! of a reference into a format in every mode (written from the mode
//! definitions: IEEE 754 rounding directions, ties rules, round to odd, and
//! the crate's stochastic rule), and the error in ulps. Shared by the tests
//! and the `ulp_table` example.
#![allow(dead_code)]

use std::cmp::Ordering;

use qbound::{Format, QValue, Rounding, Wide};
use rug::float::Constant;
use rug::{Float, Integer, Rational};

// Also built into the `ulp_table` example, which has no other way to
// reach the shared helpers.
#[allow(clippy::duplicate_mod)]
#[path = "common.rs"]
pub mod common;
pub use common::{exact, wide_to_integer};

/// Working precision of the references: far beyond any format's needs.
pub const PREC: u32 = 400;

/// The functions under test.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Func {
    Div,
    Recip,
    Sqrt,
    SinTurns,
    CosTurns,
    Sin,
    Cos,
    Atan2Turns,
    Atan2,
    Exp2,
    Log2,
}

impl Func {
    pub const ALL: [Func; 11] = [
        Func::Div,
        Func::Recip,
        Func::Sqrt,
        Func::SinTurns,
        Func::CosTurns,
        Func::Sin,
        Func::Cos,
        Func::Atan2Turns,
        Func::Atan2,
        Func::Exp2,
        Func::Log2,
    ];

    pub fn name(self) -> &'static str {
        match self {
            Func::Div => "div",
            Func::Recip => "recip",
            Func::Sqrt => "sqrt",
            Func::SinTurns => "sin_turns",
            Func::CosTurns => "cos_turns",
            Func::Sin => "sin",
            Func::Cos => "cos",
            Func::Atan2Turns => "atan2_turns",
            Func::Atan2 => "atan2",
            Func::Exp2 => "exp2",
            Func::Log2 => "log2",
        }
    }

    pub fn binary(self) -> bool {
        matches!(self, Func::Div | Func::Atan2Turns | Func::Atan2)
    }

    /// The library's result, through the run-time API.
    pub fn eval(
        self,
        a: QValue,
        b: QValue,
        dst: Format,
        rnd: Rounding,
    ) -> Result<QValue, qbound::FunctionError> {
        match self {
            Func::Div => a.try_div(b, dst, rnd),
            Func::Recip => a.try_recip(dst, rnd),
            Func::Sqrt => a.try_sqrt(dst, rnd),
            Func::SinTurns => a.try_sin_turns(dst, rnd),
            Func::CosTurns => a.try_cos_turns(dst, rnd),
            Func::Sin => a.try_sin(dst, rnd),
            Func::Cos => a.try_cos(dst, rnd),
            Func::Atan2Turns => a.try_atan2_turns(b, dst, rnd),
            Func::Atan2 => a.try_atan2(b, dst, rnd),
            Func::Exp2 => a.try_exp2(dst, rnd),
            Func::Log2 => a.try_log2(dst, rnd),
        }
    }

    /// The exact value (as a high-precision float; exact where the value is
    /// dyadic), or `None` outside the domain.
    pub fn reference(self, a: QValue, b: QValue) -> Option<Float> {
        let x = Float::with_val(PREC, exact(a));
        let y = Float::with_val(PREC, exact(b));
        let two_pi = || Float::with_val(PREC, Constant::Pi) * 2u32;
        Some(match self {
            Func::Div => {
                if b.is_zero() {
                    return None;
                }
                // Exact quotient of dyadics, rounded at PREC bits: only a
                // dyadic quotient can sit on a rounding boundary, and that
                // one is exact here.
                Float::with_val(PREC, exact(a) / exact(b))
            }
            Func::Recip => {
                if a.is_zero() {
                    return None;
                }
                Float::with_val(PREC, exact(a).recip())
            }
            Func::Sqrt => {
                if a.is_negative() {
                    return None;
                }
                x.sqrt()
            }
            Func::SinTurns | Func::CosTurns => {
                // sin and cos of a dyadic number of turns are rational only
                // at multiples of a quarter turn (Niven's theorem).
                let t = exact(a);
                let four_t = Rational::from(&t * 4u32);
                if four_t.denom() == &1u32 {
                    let k = (four_t.numer().clone() % 4u32 + 4u32) % 4u32;
                    let k = k.to_u32().unwrap();
                    let (s, c) = [(0, 1), (1, 0), (0, -1), (-1, 0)][k as usize];
                    Float::with_val(PREC, if self == Func::SinTurns { s } else { c })
                } else {
                    let ang = Float::with_val(PREC * 2, &t)
                        * Float::with_val(PREC * 2, Constant::Pi)
                        * 2u32;
                    Float::with_val(
                        PREC,
                        if self == Func::SinTurns {
                            ang.sin()
                        } else {
                            ang.cos()
                        },
                    )
                }
            }
            Func::Sin => x.sin(),
            Func::Cos => x.cos(),
            Func::Atan2Turns | Func::Atan2 => {
                // Rational angles in turns only on the axes and diagonals.
                let (ya, xa) = (exact(a), exact(b));
                let turns = if ya == 0 {
                    Some(if xa < 0 {
                        Rational::from((1, 2))
                    } else {
                        Rational::new()
                    })
                } else if xa == 0 {
                    Some(if ya < 0 {
                        Rational::from((-1, 4))
                    } else {
                        Rational::from((1, 4))
                    })
                } else if ya.clone().abs() == xa.clone().abs() {
                    let q = match (xa < 0, ya < 0) {
                        (false, false) => (1, 8),
                        (true, false) => (3, 8),
                        (true, true) => (-3, 8),
                        (false, true) => (-1, 8),
                    };
                    Some(Rational::from(q))
                } else {
                    None
                };
                match (self, turns) {
                    (Func::Atan2Turns, Some(t)) => Float::with_val(PREC, t),
                    (Func::Atan2, Some(t)) => Float::with_val(PREC, t) * two_pi(),
                    // rug's `a.atan2(b)` is atan2(a, b): a the ordinate.
                    (Func::Atan2Turns, None) => x.atan2(&y) / two_pi(),
                    _ => x.atan2(&y),
                }
            }
            Func::Exp2 => {
                // Beyond +-2^20 every format sees the same thing (an
                // overflow, or a value far below 2^-200): clamp, so MPFR's
                // exponent range is not left.
                let lim = Float::with_val(PREC, 1u32 << 20);
                if x > lim {
                    lim.exp2()
                } else if x < -lim.clone() {
                    (-lim).exp2()
                } else {
                    x.exp2()
                }
            }
            Func::Log2 => {
                if a.is_negative() || a.is_zero() {
                    return None;
                }
                x.log2()
            }
        })
    }
}

/// Any stored integer of `f`, from a random 128-bit word (its low
/// word-length bits, sign-extended).
pub fn value_from_word(f: Format, raw: u128) -> QValue {
    let w = f.width();
    let low = if w == 128 {
        raw
    } else {
        raw & ((1u128 << w) - 1)
    };
    let bits = if f.is_signed() && w < 128 && low >> (w - 1) & 1 == 1 {
        low | !((1u128 << w) - 1)
    } else {
        low
    };
    let wide = if f.is_signed() {
        Wide::from_i128(bits as i128)
    } else {
        Wide::from_u128(bits)
    };
    QValue::new(f, wide).unwrap()
}

/// `value * 2^F` rounded to an integer by `rnd`, from the definitions.
pub fn round_ref(value: &Float, frac_bits: u32, rnd: Rounding) -> Integer {
    let s = Float::with_val(value.prec() + 200, value) << frac_bits;
    let fl = s.clone().floor().to_integer().unwrap();
    let rho = Float::with_val(s.prec(), &s - &fl);
    let inexact = rho != 0;
    let half = rho.partial_cmp(&0.5).unwrap();
    let odd = fl.is_odd();
    let pos = s >= 0;
    let up = match rnd {
        Rounding::Floor => false,
        Rounding::Ceil => inexact,
        Rounding::TowardZero => inexact && !pos,
        Rounding::AwayFromZero => inexact && pos,
        Rounding::NearestTiesUp => half != Ordering::Less,
        Rounding::NearestTiesAway => half == Ordering::Greater || (half == Ordering::Equal && pos),
        Rounding::NearestTiesEven => half == Ordering::Greater || (half == Ordering::Equal && odd),
        Rounding::ToOdd => inexact && !odd,
        Rounding::Stochastic(r) => {
            let frac64 = (rho << 64u32).floor().to_integer().unwrap();
            frac64 > r
        }
    };
    fl + up as u32
}

/// The error of a result in ulps of the output format, as `f64`.
pub fn ulp_error(result: QValue, value: &Float) -> f64 {
    let f = result.format().frac_bits();
    let r = Float::with_val(PREC, wide_to_integer(result.bits()));
    let s = Float::with_val(PREC, value) << f;
    (r - s).abs().to_f64()
}

/// A format from the text form.
pub fn fmt(s: &str) -> Format {
    s.parse().unwrap()
}
