//! Values from outside the project, each with its source.

use qbound::{Format, Overflow, Q, QValue, Rounding};
use rug::Rational;

use crate::common::*;

/// A value given in quarters (±2.5, ±2.75, ... are exact in binary),
/// rounded to an integer by `mode` through `QValue::rescale`.
fn round_int(quarters: i128, mode: Rounding) -> i128 {
    let src = Format::signed(7, 2).unwrap();
    let v = QValue::from_i128_bits(src, quarters).unwrap();
    v.rescale(Format::signed(7, 0).unwrap(), mode, Overflow::Panic)
        .to_i128_bits()
        .unwrap()
}

/// Source: IEEE 754-2019, clause 4.3 (rounding-direction attributes):
/// roundTiesToEven, roundTiesToAway, roundTowardPositive,
/// roundTowardNegative and roundTowardZero, applied to values that are
/// exact in binary. The well-known cases (ties to even: 2.5 -> 2,
/// 3.5 -> 4, -2.5 -> -2; ties to away: 2.5 -> 3, -2.5 -> -3) and the
/// directed roundings of ±2.25, ±2.5, ±2.75 and ±3.5 follow from the
/// clause's definitions.
#[test]
fn ieee754_rounding_directions() {
    use Rounding::*;
    // (value in quarters, ties-to-even, ties-to-away, toward +inf, toward -inf, toward zero)
    let table: &[(i128, [i128; 5])] = &[
        (10, [2, 3, 3, 2, 2]),       //  2.5
        (14, [4, 4, 4, 3, 3]),       //  3.5
        (-10, [-2, -3, -2, -3, -2]), // -2.5
        (-14, [-4, -4, -3, -4, -3]), // -3.5
        (11, [3, 3, 3, 2, 2]),       //  2.75
        (-11, [-3, -3, -2, -3, -2]), // -2.75
        (9, [2, 2, 3, 2, 2]),        //  2.25
        (-9, [-2, -2, -2, -3, -2]),  // -2.25
        (8, [2, 2, 2, 2, 2]),        //  2.0 exact
    ];
    for &(x, [even, away, up, down, zero]) in table {
        assert_eq!(round_int(x, NearestTiesEven), even, "roundTiesToEven {x}/4");
        assert_eq!(round_int(x, NearestTiesAway), away, "roundTiesToAway {x}/4");
        assert_eq!(round_int(x, Ceil), up, "roundTowardPositive {x}/4");
        assert_eq!(round_int(x, Floor), down, "roundTowardNegative {x}/4");
        assert_eq!(round_int(x, TowardZero), zero, "roundTowardZero {x}/4");
    }
    // Not IEEE 754 directions, from the definitions of the modes (common
    // practice): ties up goes to +inf on ties; away from zero; to odd.
    assert_eq!(round_int(-10, NearestTiesUp), -2);
    assert_eq!(round_int(10, NearestTiesUp), 3);
    assert_eq!(round_int(-9, AwayFromZero), -3);
    assert_eq!(round_int(10, ToOdd), 3);
    assert_eq!(round_int(14, ToOdd), 3);
    assert_eq!(round_int(8, ToOdd), 2); // exact values are kept
}

/// Common practice (the Qm.n reading in which m excludes the sign bit):
/// Q7.8 is a 16-bit word spanning -128 to 127.99609375 in steps of 1/256.
#[test]
fn q7_8_range_and_step() {
    type T = Q<7, 8>;
    assert_eq!(T::FORMAT.width(), 16);
    assert_eq!(exact(T::MIN.to_value()), Rational::from(-128));
    assert_eq!(
        exact(T::MAX.to_value()),
        Rational::from((12799609375i64, 100000000i64))
    );
    assert_eq!(exact(T::STEP.to_value()), Rational::from((1, 256)));
    let f: Format = "Q7.8".parse().unwrap();
    assert_eq!(f, T::FORMAT);
    let (lo, hi) = bit_range(f);
    assert_eq!(Rational::from((lo, 256)), -128);
    assert_eq!(
        Rational::from((hi, 256)),
        Rational::from((12799609375i64, 100000000i64))
    );
}

/// Common practice: the bits 0x19 (binary 110.01) with two fraction bits
/// read 6.25.
#[test]
fn bits_0x19_with_two_fraction_bits_read_6_25() {
    let v = Q::<5, 2>::from_bits(0x19);
    assert_eq!(exact(v.to_value()), Rational::from((625, 100)));
    let u = QValue::from_i128_bits(Format::unsigned(3, 2).unwrap(), 0x19).unwrap();
    assert_eq!(exact(u), Rational::from((25, 4)));
}

/// Common practice: Q0.15 (Q15, the 16-bit audio and DSP sample format)
/// spans -1 to 0.999969482421875 = 1 - 2^-15.
#[test]
fn q0_15_range() {
    let f: Format = "Q0.15".parse().unwrap();
    assert_eq!(f.width(), 16);
    assert_eq!(exact(QValue::min(f)), Rational::from(-1));
    assert_eq!(
        exact(QValue::max(f)),
        Rational::from((999969482421875i64, 1000000000000000i64))
    );
    assert_eq!(exact(Q::<0, 15>::MAX.to_value()), exact(QValue::max(f)));
}
