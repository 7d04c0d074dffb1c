//! Helpers shared by the test modules: reference arithmetic with `rug`.
#![allow(dead_code)]

use qbound::{Format, QValue, Wide};
use rug::{Integer, Rational};

/// The exact value of a run-time fixed-point value as a rational.
pub fn exact(v: QValue) -> Rational {
    Rational::from((
        wide_to_integer(v.bits()),
        Integer::from(1) << v.format().frac_bits(),
    ))
}

/// A 129-bit integer as a `rug::Integer`.
pub fn wide_to_integer(w: Wide) -> Integer {
    let lo = Integer::from(w.low_bits());
    if w.is_negative() {
        lo - (Integer::from(1) << 128)
    } else {
        lo
    }
}

/// The smallest and largest stored integers of a format.
pub fn bit_range(f: Format) -> (Integer, Integer) {
    (wide_to_integer(f.min_bits()), wide_to_integer(f.max_bits()))
}
