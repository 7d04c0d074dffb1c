//! Conversions to and from integers and floats, text, const literals,
//! num-traits and the policy wrappers, checked against `rug` (GMP/MPFR).
//!
//! References named beside the checks:
//! - rounding directions: IEEE 754-2019 clause 4.3 (roundTiesToEven,
//!   roundTowardPositive, roundTowardNegative, roundTowardZero,
//!   roundTiesToAway); the others are defined in `Rounding`'s docs and
//!   re-derived here from the exact rational value;
//! - float results: MPFR's correctly rounded conversion (`rug::Float`
//!   `to_f64`/`to_f32`, round to nearest), and Rust's `as` casts from
//!   integers, which the Rust reference defines as round to nearest, ties
//!   to even.

use proptest::prelude::*;
use qbound::{
    FloatError, Format, Overflow, ParseErrorKind, Q, QValue, Rounding, Saturated, Side, UQ, Wide,
    Wrapped, qconst,
};
use rug::ops::Pow;
use rug::{Integer, Rational};

// ---------------------------------------------------------------------------
// Local helpers (kept here so this module does not depend on others).
// ---------------------------------------------------------------------------

fn exact(v: QValue) -> Rational {
    Rational::from((
        to_integer(v.bits()),
        Integer::from(1) << v.format().frac_bits(),
    ))
}

fn to_integer(w: Wide) -> Integer {
    let lo = Integer::from(w.low_bits());
    if w.is_negative() {
        lo - (Integer::from(1) << 128)
    } else {
        lo
    }
}

fn to_wide(i: &Integer) -> Wide {
    if *i < 0 {
        Wide::from_i128(i.to_i128().expect("in range"))
    } else {
        Wide::from_u128(i.to_u128().expect("in range"))
    }
}

fn range(f: Format) -> (Integer, Integer) {
    (to_integer(f.min_bits()), to_integer(f.max_bits()))
}

/// Round a rational to an integer with `mode`, from the definitions.
fn round_ref(x: &Rational, mode: Rounding) -> Integer {
    let (fract, floor) = x.clone().fract_floor(Integer::new());
    if fract == 0 {
        return floor;
    }
    let half = Rational::from((1, 2));
    let neg = *x < 0;
    let odd = floor.is_odd();
    let up = match mode {
        Rounding::Floor => false,
        Rounding::Ceil => true,
        Rounding::TowardZero => neg,
        Rounding::AwayFromZero => !neg,
        Rounding::NearestTiesUp => fract >= half,
        Rounding::NearestTiesAway => fract > half || (fract == half && !neg),
        Rounding::NearestTiesEven => fract > half || (fract == half && odd),
        Rounding::ToOdd => !odd,
        Rounding::Stochastic(r) => {
            let frac64 = (fract << 64u32).floor();
            frac64 > r
        }
    };
    if up { floor + 1 } else { floor }
}

/// Apply an overflow mode to a rounded stored integer; `None` for Panic
/// when it does not fit.
fn overflow_ref(i: Integer, f: Format, ovf: Overflow) -> Option<Integer> {
    let (lo, hi) = range(f);
    let sym_lo = if f.is_signed() {
        lo.clone() + 1
    } else {
        lo.clone()
    };
    match ovf {
        _ if i >= lo && i <= hi && !matches!(ovf, Overflow::SaturateSymmetric) => Some(i),
        Overflow::Wrap => {
            let m = Integer::from(1) << f.width();
            let mut r = (i - &lo) % &m;
            if r < 0 {
                r += &m;
            }
            Some(r + lo)
        }
        Overflow::Saturate => Some(if i < lo { lo } else { hi }),
        Overflow::SaturateSymmetric => Some(if i < sym_lo {
            sym_lo
        } else if i > hi {
            hi
        } else {
            i
        }),
        Overflow::Panic => None,
    }
}

fn value_of(f: Format, i: &Integer) -> QValue {
    QValue::new(f, to_wide(i)).expect("in range")
}

/// The expected value of the exact rational `x` in `f`.
fn expect_in(x: &Rational, f: Format, mode: Rounding, ovf: Overflow) -> Option<QValue> {
    let scaled = x.clone() << f.frac_bits();
    overflow_ref(round_ref(&scaled, mode), f, ovf).map(|i| value_of(f, &i))
}

const GRID: &[(bool, u32, u32)] = &[
    (true, 0, 0),
    (true, 0, 1),
    (true, 1, 0),
    (true, 0, 7),
    (true, 7, 0),
    (true, 3, 4),
    (true, 7, 8),
    (true, 0, 15),
    (true, 5, 6),
    (true, 8, 9),
    (true, 12, 11),
    (true, 20, 19),
    (true, 0, 63),
    (true, 31, 32),
    (true, 63, 0),
    (true, 0, 127),
    (true, 127, 0),
    (true, 60, 67),
    (false, 1, 0),
    (false, 0, 1),
    (false, 8, 0),
    (false, 0, 8),
    (false, 4, 4),
    (false, 6, 7),
    (false, 0, 64),
    (false, 64, 64),
    (false, 0, 128),
    (false, 128, 0),
    (false, 1, 127),
    (false, 33, 0),
];

fn format_strategy() -> impl Strategy<Value = Format> {
    prop_oneof![
        proptest::sample::select(GRID).prop_map(|(s, i, f)| Format::new(s, i, f).unwrap()),
        (any::<bool>(), 0u32..=128, 0u32..=128)
            .prop_filter_map("width", |(s, i, f)| Format::new(s, i, f).ok()),
    ]
}

fn value_in(f: Format, raw: u128, pick: u8) -> QValue {
    match pick % 8 {
        0 => QValue::min(f),
        1 => QValue::max(f),
        2 => QValue::zero(f),
        _ => {
            let w = f.width();
            let low = if w == 128 {
                raw
            } else {
                raw & ((1u128 << w) - 1)
            };
            let bits = if f.is_signed() && w < 128 && (low >> (w - 1)) & 1 == 1 {
                Wide::from_i128((low | !((1u128 << w) - 1)) as i128)
            } else if f.is_signed() {
                Wide::from_i128(low as i128)
            } else {
                Wide::from_u128(low)
            };
            QValue::new(f, bits).unwrap()
        }
    }
}

fn value_strategy() -> impl Strategy<Value = QValue> {
    (format_strategy(), any::<u128>(), any::<u8>())
        .prop_map(|(f, raw, pick)| value_in(f, raw, pick))
}

fn rounding_strategy() -> impl Strategy<Value = Rounding> {
    prop_oneof![
        proptest::sample::select(&Rounding::ALL[..8]),
        any::<u64>().prop_map(Rounding::Stochastic),
    ]
}

fn overflow_strategy() -> impl Strategy<Value = Overflow> {
    proptest::sample::select(
        &[
            Overflow::Wrap,
            Overflow::Saturate,
            Overflow::SaturateSymmetric,
        ][..],
    )
}

/// Floats of every kind: any bit pattern, and values near a format's scale.
fn f64_strategy() -> impl Strategy<Value = f64> {
    prop_oneof![
        any::<u64>().prop_map(f64::from_bits),
        (any::<i64>(), -200i32..200).prop_map(|(m, e)| m as f64 * 2f64.powi(e)),
        (any::<i32>(), 0u32..12).prop_map(|(m, k)| m as f64 / f64::from(1u32 << k)),
    ]
}

fn f32_strategy() -> impl Strategy<Value = f32> {
    prop_oneof![
        any::<u32>().prop_map(f32::from_bits),
        (any::<i32>(), -160i32..140).prop_map(|(m, e)| m as f32 * 2f32.powi(e)),
    ]
}

// ---------------------------------------------------------------------------
// Floats.
// ---------------------------------------------------------------------------

proptest! {
    #[test]
    fn from_f64_is_exact_then_rounded(f in format_strategy(), x in f64_strategy(), mode in rounding_strategy(), ovf in overflow_strategy()) {
        match Rational::from_f64(x) {
            None => {
                prop_assert!(QValue::from_f64(f, x, mode, ovf).is_err());
                prop_assert!(QValue::try_from_f64(f, x, mode).is_err());
            }
            Some(r) => {
                let want = expect_in(&r, f, mode, ovf).unwrap();
                let got = QValue::from_f64(f, x, mode, ovf).unwrap();
                prop_assert_eq!(got.bits(), want.bits(), "{} {:?} {:?} {:?}", x, f, mode, ovf);
                let checked = expect_in(&r, f, mode, Overflow::Panic);
                match (QValue::try_from_f64(f, x, mode), checked) {
                    (Ok(g), Some(w)) => prop_assert_eq!(g.bits(), w.bits()),
                    (Err(FloatError::OutOfRange(_)), None) => {}
                    (g, w) => prop_assert!(false, "{:?} vs {:?}", g, w),
                }
            }
        }
    }

    #[test]
    fn from_f32_is_exact_then_rounded(f in format_strategy(), x in f32_strategy(), mode in rounding_strategy(), ovf in overflow_strategy()) {
        match Rational::from_f32(x) {
            None => prop_assert!(QValue::from_f32(f, x, mode, ovf).is_err()),
            Some(r) => {
                let want = expect_in(&r, f, mode, ovf).unwrap();
                prop_assert_eq!(QValue::from_f32(f, x, mode, ovf).unwrap().bits(), want.bits());
            }
        }
    }

    /// MPFR's conversion from an exact 300-bit float is correctly rounded
    /// to nearest, ties to even (IEEE 754 roundTiesToEven), including
    /// subnormal results and overflow to infinity.
    #[test]
    fn to_float_is_correctly_rounded(v in value_strategy()) {
        let exact_float = rug::Float::with_val(300, exact(v));
        prop_assert_eq!(v.to_f64().to_bits(), exact_float.to_f64().to_bits(), "{:?}", v);
        prop_assert_eq!(v.to_f32().to_bits(), exact_float.to_f32().to_bits(), "{:?}", v);
        // Rust's integer-to-float casts round to nearest, ties to even; for
        // integer formats they are a second reference.
        if v.format().frac_bits() == 0 {
            let i = to_integer(v.bits());
            if let Some(x) = i.to_i128() {
                prop_assert_eq!(v.to_f64(), x as f64);
                prop_assert_eq!(v.to_f32(), x as f32);
            } else {
                prop_assert_eq!(v.to_f32(), i.to_u128().unwrap() as f32);
            }
        }
    }

    #[test]
    fn integers_in_and_out(f in format_strategy(), n in any::<i128>(), u in any::<u128>(), m in any::<i16>(), mode in rounding_strategy(), ovf in overflow_strategy()) {
        for x in [Integer::from(n), Integer::from(u), Integer::from(m)] {
            let r = Rational::from(x.clone());
            let want = expect_in(&r, f, Rounding::Floor, ovf).unwrap();
            let got = if let Some(i) = x.to_i128() { QValue::from_int(f, i, ovf) } else { QValue::from_int(f, x.to_u128().unwrap(), ovf) };
            prop_assert_eq!(got.bits(), want.bits());
        }
        let got = QValue::from_int(f, m, ovf);
        prop_assert_eq!(got.bits(), expect_in(&Rational::from(m), f, Rounding::Floor, ovf).unwrap().bits());
        let checked = QValue::try_from_int(f, n);
        prop_assert_eq!(checked.is_ok(), expect_in(&Rational::from(n), f, Rounding::Floor, Overflow::Panic).is_some());
        // Out to integers of several widths.
        let v = value_in(f, u, m as u8);
        let x = exact(v);
        let r = round_ref(&x, mode);
        let int_fmt = |bits: u32, signed: bool| Format::new(signed, bits - signed as u32, 0).unwrap();
        let want16 = overflow_ref(r.clone(), int_fmt(16, true), ovf).unwrap();
        prop_assert_eq!(Integer::from(v.to_int::<i16>(mode, ovf)), want16);
        let want8 = overflow_ref(r.clone(), int_fmt(8, false), ovf).unwrap();
        prop_assert_eq!(Integer::from(v.to_int::<u8>(mode, ovf)), want8);
        let want128 = overflow_ref(r.clone(), int_fmt(128, true), ovf).unwrap();
        prop_assert_eq!(Integer::from(v.to_int::<i128>(mode, ovf)), want128);
        let want_u128 = overflow_ref(r.clone(), int_fmt(128, false), Overflow::Panic);
        prop_assert_eq!(v.try_to_int::<u128>(mode).ok().map(Integer::from), want_u128);
    }
}

// ---------------------------------------------------------------------------
// Text.
// ---------------------------------------------------------------------------

/// The exact decimal text of a value: bits * 5^F has the digits, with the
/// point F places from the right.
fn decimal_ref(v: QValue) -> String {
    let f = v.format().frac_bits();
    let i = to_integer(v.bits());
    let neg = i < 0;
    let digits = (i.abs() * Integer::from(5).pow(f)).to_string();
    let digits = format!("{:0>width$}", digits, width = f as usize + 1);
    let (int, frac) = digits.split_at(digits.len() - f as usize);
    let frac = frac.trim_end_matches('0');
    let sign = if neg { "-" } else { "" };
    if frac.is_empty() {
        format!("{sign}{int}")
    } else {
        format!("{sign}{int}.{frac}")
    }
}

/// `{:.n}` from the exact rational, ties to even.
fn fixed_places_ref(v: QValue, n: usize) -> String {
    let x = exact(v);
    let neg = x < 0;
    let scaled = x.abs() * Rational::from(Integer::from(10).pow(n as u32));
    let r = round_ref(&scaled, Rounding::NearestTiesEven).to_string();
    let r = format!("{:0>width$}", r, width = n + 1);
    let (int, frac) = r.split_at(r.len() - n);
    let sign = if neg { "-" } else { "" };
    if n == 0 {
        format!("{sign}{int}")
    } else {
        format!("{sign}{int}.{frac}")
    }
}

fn parse_rational(s: &str) -> Rational {
    // Decimal with optional exponent, as generated below.
    let (mant, exp) = match s.find(['e', 'E']) {
        Some(k) => (&s[..k], s[k + 1..].parse::<i32>().unwrap()),
        None => (s, 0),
    };
    let neg = mant.starts_with('-');
    let mant = mant.trim_start_matches(['-', '+']);
    let (int, frac) = mant.split_once('.').unwrap_or((mant, ""));
    let digits: String = format!("{int}{frac}");
    let n = Integer::from_str_radix(if digits.is_empty() { "0" } else { &digits }, 10).unwrap();
    let e = exp - frac.len() as i32;
    let mut r = Rational::from(n);
    if e >= 0 {
        r *= Integer::from(10).pow(e as u32);
    } else {
        r /= Integer::from(10).pow((-e) as u32);
    }
    if neg { -r } else { r }
}

fn decimal_text() -> impl Strategy<Value = String> {
    (
        any::<bool>(),
        "[0-9]{0,45}",
        proptest::option::of("[0-9]{0,60}"),
        proptest::option::of(-60i32..60),
    )
        .prop_filter_map("digits", |(neg, int, frac, exp)| {
            if int.is_empty() && frac.as_deref().is_none_or(str::is_empty) {
                return None;
            }
            let mut s = String::new();
            if neg {
                s.push('-');
            }
            s.push_str(&int);
            if let Some(fr) = frac {
                s.push('.');
                s.push_str(&fr);
            }
            if let Some(e) = exp {
                s.push_str(&format!("e{e}"));
            }
            Some(s)
        })
}

proptest! {
    #[test]
    fn display_is_the_exact_decimal(v in value_strategy()) {
        prop_assert_eq!(v.to_string(), decimal_ref(v));
    }

    #[test]
    fn display_parse_round_trip(v in value_strategy()) {
        let back = QValue::try_parse(v.format(), &v.to_string(), Rounding::Floor).unwrap();
        prop_assert_eq!(back.bits(), v.bits());
        // The alternate hex form, read as a radix-point literal, gives the
        // stored bits as an unsigned pattern.
        let hex = format!("{v:#x}");
        let f = v.format();
        let pattern = QValue::try_parse(Format::unsigned(f.width() - f.frac_bits(), f.frac_bits()).unwrap(), &hex, Rounding::Floor).unwrap();
        let w = f.width();
        let low = if w == 128 { v.bits().low_bits() } else { v.bits().low_bits() & ((1u128 << w) - 1) };
        prop_assert_eq!(pattern.bits(), Wide::from_u128(low), "{}", hex);
    }

    #[test]
    fn fixed_places_round_ties_to_even(v in value_strategy(), n in 0usize..40) {
        prop_assert_eq!(format!("{v:.n$}"), fixed_places_ref(v, n));
    }

    #[test]
    fn parse_decimal_is_correctly_rounded(f in format_strategy(), s in decimal_text(), mode in rounding_strategy(), ovf in overflow_strategy()) {
        let r = parse_rational(&s);
        let want = expect_in(&r, f, mode, ovf).unwrap();
        let got = QValue::parse(f, &s, mode, ovf).unwrap();
        prop_assert_eq!(got.bits(), want.bits(), "{} into {}", s, f);
        let checked = QValue::try_parse(f, &s, mode);
        match expect_in(&r, f, mode, Overflow::Panic) {
            Some(w) => prop_assert_eq!(checked.unwrap().bits(), w.bits()),
            None => prop_assert!(matches!(checked.unwrap_err().kind(), ParseErrorKind::OutOfRange(_))),
        }
    }

    #[test]
    fn parse_hex_and_binary(f in format_strategy(), neg in any::<bool>(), int in "[0-9a-fA-F]{0,34}", frac in "[0-9a-f]{1,34}", p in -140i32..140, mode in rounding_strategy()) {
        let s = format!("{}0x{int}.{frac}p{p}", if neg { "-" } else { "" });
        let n = Integer::from_str_radix(&format!("{int}{frac}"), 16).unwrap();
        let mut r = Rational::from(n);
        let e = p - 4 * frac.len() as i32;
        if e >= 0 { r <<= e as u32 } else { r >>= (-e) as u32 }
        if neg { r = -r; }
        let want = expect_in(&r, f, mode, Overflow::Wrap).unwrap();
        prop_assert_eq!(QValue::parse(f, &s, mode, Overflow::Wrap).unwrap().bits(), want.bits(), "{}", s);
        // The same digits in binary.
        let bin: String = format!("{int}{frac}").chars().map(|c| format!("{:04b}", c.to_digit(16).unwrap())).collect();
        let s2 = format!("{}0b{}p{}", if neg { "-" } else { "" }, bin, e);
        prop_assert_eq!(QValue::parse(f, &s2, mode, Overflow::Wrap).unwrap().bits(), want.bits(), "{}", s2);
    }
}

/// Every value of every format of at most 12 bits: display and parse, the
/// alternate hex form, floats and integers, against the references.
#[test]
fn exhaustive_small_formats() {
    let mut formats = Vec::new();
    for w in 1..=12u32 {
        for fb in 0..w {
            formats.push(Format::signed(w - 1 - fb, fb).unwrap());
        }
        for fb in 0..=w {
            formats.push(Format::unsigned(w - fb, fb).unwrap());
        }
    }
    for f in formats {
        let (lo, hi) = range(f);
        let (lo, hi) = (lo.to_i128().unwrap(), hi.to_i128().unwrap());
        for b in lo..=hi {
            let v = QValue::from_i128_bits(f, b).unwrap();
            let text = v.to_string();
            assert_eq!(text, decimal_ref(v), "{f} {b}");
            assert_eq!(
                QValue::try_parse(f, &text, Rounding::NearestTiesEven)
                    .unwrap()
                    .bits(),
                v.bits()
            );
            // 12 bits fit a float exactly both ways.
            let x = v.to_f64();
            assert_eq!(Rational::from_f64(x).unwrap(), exact(v));
            assert_eq!(
                QValue::try_from_f64(f, x, Rounding::Floor).unwrap().bits(),
                v.bits()
            );
            assert_eq!(
                QValue::try_from_f32(f, v.to_f32(), Rounding::Ceil)
                    .unwrap()
                    .bits(),
                v.bits()
            );
            for places in [0usize, 1, 3] {
                assert_eq!(
                    format!("{v:.places$}"),
                    fixed_places_ref(v, places),
                    "{f} {b}"
                );
            }
            let t = v.to_int::<i32>(Rounding::NearestTiesEven, Overflow::Panic);
            assert_eq!(
                Integer::from(t),
                round_ref(&exact(v), Rounding::NearestTiesEven)
            );
        }
    }
}

// ---------------------------------------------------------------------------
// Bad input: an error, never a panic.
// ---------------------------------------------------------------------------

#[test]
fn bad_text_is_an_error_with_a_position() {
    let f = Format::signed(7, 8).unwrap();
    let cases: &[(&str, ParseErrorKind, usize)] = &[
        ("", ParseErrorKind::Empty, 0),
        ("-", ParseErrorKind::NoDigits, 1),
        ("+", ParseErrorKind::NoDigits, 1),
        (".", ParseErrorKind::NoDigits, 1),
        ("-.", ParseErrorKind::NoDigits, 2),
        ("0x", ParseErrorKind::NoDigits, 2),
        ("0x.p1", ParseErrorKind::NoDigits, 3),
        ("1.2.3", ParseErrorKind::SecondPoint, 3),
        ("..1", ParseErrorKind::SecondPoint, 1),
        ("12a", ParseErrorKind::InvalidDigit, 2),
        ("0b102", ParseErrorKind::InvalidDigit, 4),
        ("0o78", ParseErrorKind::InvalidDigit, 3),
        ("0x1g", ParseErrorKind::InvalidDigit, 3),
        ("0x1e5", ParseErrorKind::Empty, 0), // out of range: kind checked below
        ("1e", ParseErrorKind::NoExponentDigits, 2),
        ("1e+", ParseErrorKind::NoExponentDigits, 3),
        ("1e5x", ParseErrorKind::InvalidDigit, 3),
        ("1p3", ParseErrorKind::InvalidDigit, 1),
        (" 1", ParseErrorKind::NoDigits, 0),
        ("1 ", ParseErrorKind::InvalidDigit, 1),
        ("NaN", ParseErrorKind::NoDigits, 0),
        ("inf", ParseErrorKind::NoDigits, 0),
        ("-infinity", ParseErrorKind::NoDigits, 1),
        ("1_000", ParseErrorKind::InvalidDigit, 1),
        ("--1", ParseErrorKind::NoDigits, 1),
        ("½", ParseErrorKind::NoDigits, 0),
    ];
    for (text, kind, pos) in cases {
        let e = QValue::try_parse(f, text, Rounding::NearestTiesEven).unwrap_err();
        if *text == "0x1e5" {
            assert!(
                matches!(e.kind(), ParseErrorKind::OutOfRange(r) if r.side() == Side::Above),
                "{text:?}"
            );
        } else {
            assert_eq!((e.kind(), e.position()), (*kind, *pos), "{text:?}");
        }
        assert!(!e.to_string().is_empty());
        // The typed FromStr agrees.
        assert_eq!(
            "x".parse::<Q<7, 8>>().unwrap_err().kind(),
            ParseErrorKind::NoDigits
        );
    }
}

#[test]
fn huge_and_long_inputs() {
    let f = Format::signed(7, 8).unwrap();
    let near = Rounding::NearestTiesEven;
    // Huge exponents are values, not syntax errors.
    assert!(QValue::try_parse(f, "1e999999999999999999999", near).is_err());
    assert!(
        QValue::try_parse(f, "0e999999999999999999999", near)
            .unwrap()
            .is_zero()
    );
    assert!(
        QValue::try_parse(f, "1e-999999999999999999999", near)
            .unwrap()
            .is_zero()
    );
    assert_eq!(
        QValue::try_parse(f, "1e-999999999999999999999", Rounding::Ceil)
            .unwrap()
            .to_i128_bits(),
        Some(1)
    );
    assert_eq!(
        QValue::parse(f, "-1e99999", near, Overflow::Saturate).unwrap(),
        QValue::min(f)
    );
    assert!(
        QValue::parse(f, "1e99999", near, Overflow::Wrap)
            .unwrap()
            .is_zero()
    ); // 10^99999 * 2^8 = 0 mod 2^16
    // 10,000 digits: a tie broken by the very last digit.
    let mut s = String::from("0.001953125"); // exactly half a step
    s.push_str(&"0".repeat(10_000));
    assert_eq!(
        QValue::try_parse(f, &s, near).unwrap().to_i128_bits(),
        Some(0)
    ); // a tie: to even
    s.push('1');
    assert_eq!(
        QValue::try_parse(f, &s, near).unwrap().to_i128_bits(),
        Some(1)
    ); // just above
    let long_int = "9".repeat(10_000);
    assert!(QValue::try_parse(f, &long_int, near).is_err());
    assert_eq!(
        QValue::parse(f, &long_int, near, Overflow::Saturate).unwrap(),
        QValue::max(f)
    );
    let zeros = format!("{}1.5", "0".repeat(10_000));
    assert_eq!(
        QValue::try_parse(f, &zeros, near).unwrap().to_i128_bits(),
        Some(384)
    );
    let hex = format!("0x0.{}1p40004", "0".repeat(10_000));
    assert_eq!(
        QValue::try_parse(f, &hex, near).unwrap().to_i128_bits(),
        Some(256) // 16^-10001 * 2^40004 = 1
    );
}

#[test]
fn non_finite_floats_and_out_of_range_in_every_mode() {
    let f = Format::signed(3, 4).unwrap();
    for mode in Rounding::ALL {
        for ovf in Overflow::ALL {
            assert_eq!(
                QValue::from_f64(f, f64::NAN, mode, ovf),
                Err(FloatError::NaN)
            );
            assert_eq!(
                QValue::from_f64(f, f64::INFINITY, mode, ovf),
                Err(FloatError::Infinite { negative: false })
            );
            assert_eq!(
                QValue::from_f32(f, f32::NEG_INFINITY, mode, ovf),
                Err(FloatError::Infinite { negative: true })
            );
            assert_eq!(
                Q::<3, 4>::from_f64(-f64::NAN, mode, ovf),
                Err(FloatError::NaN)
            );
        }
        for x in [8.0, 1e300, f64::MAX] {
            let e = QValue::try_from_f64(f, x, mode).unwrap_err();
            assert!(matches!(e, FloatError::OutOfRange(r) if r.side() == Side::Above));
            assert!(QValue::try_from_f64(f, -x - 1.0, mode).is_err());
        }
        assert!(QValue::try_from_int(f, 8u8).is_err());
        assert!(QValue::try_from_int(Format::unsigned(4, 0).unwrap(), -1i8).is_err());
        assert!(QValue::try_parse(f, "8", mode).is_err());
        assert!(
            QValue::try_parse(f, "-8.0625", mode).is_err()
                || matches!(
                    mode,
                    Rounding::Ceil
                        | Rounding::TowardZero
                        | Rounding::NearestTiesEven
                        | Rounding::NearestTiesUp
                        | Rounding::NearestTiesAway
                        | Rounding::Stochastic(_)
                        | Rounding::ToOdd
                )
        );
    }
    let r =
        std::panic::catch_unwind(|| QValue::from_f64(f, 100.0, Rounding::Floor, Overflow::Panic));
    assert!(
        r.is_err(),
        "Overflow::Panic is the one mode that panics, by request"
    );
}

// ---------------------------------------------------------------------------
// Typed API, literals, traits.
// ---------------------------------------------------------------------------

#[test]
fn typed_conversions_match_the_run_time_ones() {
    type T = Q<3, 12>;
    for x in [0.1, -3.99, 7.9999, -8.0, 1e-9, 12.5] {
        for mode in Rounding::ALL {
            for ovf in [
                Overflow::Wrap,
                Overflow::Saturate,
                Overflow::SaturateSymmetric,
            ] {
                let typed = T::from_f64(x, mode, ovf).unwrap();
                let rt = QValue::from_f64(T::FORMAT, x, mode, ovf).unwrap();
                assert_eq!(typed.to_value(), rt);
                assert_eq!(typed.to_string(), rt.to_string());
                assert_eq!(format!("{typed:#x}"), format!("{rt:#x}"));
                assert_eq!(typed.to_int::<i8>(mode, ovf), rt.to_int::<i8>(mode, ovf));
            }
        }
    }
    let u = UQ::<4, 4>::from_int(3u8, Overflow::Panic);
    assert_eq!(u.to_f64(), 3.0);
    assert_eq!(format!("{u:?}"), "UQ4.4(3)");
    let lossless: Q<15, 0> = 300i16.into();
    assert_eq!(lossless.to_bits(), 300);
    let from_bool: UQ<1, 3> = true.into();
    assert_eq!(from_bool.to_string(), "1");
}

#[test]
fn const_literals() {
    const A: Q<1, 14> = qconst!(Q<1, 14>, "-1.9999");
    const B: UQ<0, 128> = qconst!(UQ<0, 128>, "0.5");
    const C: Q<127, 0> = qconst!(Q<127, 0>, "-170141183460469231731687303715884105728");
    const D: Q<0, 7> = qconst!(Q<0, 7>, f64 - 0.25);
    assert_eq!(
        A.to_value(),
        QValue::try_parse(Q::<1, 14>::FORMAT, "-1.9999", Rounding::NearestTiesEven).unwrap()
    );
    assert_eq!(B.to_bits(), 1 << 127);
    assert_eq!(C.to_bits(), i128::MIN);
    assert_eq!(D.to_bits(), -32);
}

#[test]
fn num_traits_on_the_bare_types() {
    use num_traits::{Bounded, FromPrimitive, NumCast, ToPrimitive};
    type T = Q<7, 8>;
    assert_eq!(T::max_value(), T::MAX);
    assert_eq!(<T as FromPrimitive>::from_f64(1.5).unwrap().to_bits(), 384);
    assert_eq!(<T as FromPrimitive>::from_f64(f64::NAN), None);
    assert_eq!(T::from_i64(128), None);
    assert_eq!(T::from_u64(127).unwrap().to_bits(), 127 << 8);
    let x: T = "-2.75".parse().unwrap();
    assert_eq!(x.to_i32(), Some(-2)); // toward zero, as f64::to_i32
    assert_eq!(x.to_u32(), None);
    assert_eq!(ToPrimitive::to_f64(&x), Some(-2.75));
    assert_eq!(<T as NumCast>::from(2.5f32).unwrap().to_bits(), 640);
    assert_eq!(<T as NumCast>::from(100u128).unwrap().to_bits(), 100 << 8);
    assert_eq!(<T as NumCast>::from(1000i64), None);
    assert_eq!(<T as NumCast>::from(x), Some(x));
}

/// Generic code written against num-traits, run on the wrappers.
fn mean<T: num_traits::Num + Copy + core::iter::Sum + num_traits::FromPrimitive>(xs: &[T]) -> T {
    xs.iter().copied().sum::<T>() / T::from_usize(xs.len()).unwrap()
}

proptest! {
    #[test]
    fn wrapper_division_is_rounded_to_nearest(f in 0u32..20, a in any::<i32>(), b in any::<i32>()) {
        // Q11.20 via the run-time reference.
        let _ = f;
        type T = Q<11, 20>;
        let (x, y) = (T::from_bits(a), T::from_bits(b));
        let fmt = T::FORMAT;
        if b != 0 {
            let q = exact(x.to_value()) / exact(y.to_value());
            let want_w = expect_in(&q, fmt, Rounding::NearestTiesEven, Overflow::Wrap).unwrap();
            let want_s = expect_in(&q, fmt, Rounding::NearestTiesEven, Overflow::Saturate).unwrap();
            prop_assert_eq!((Wrapped(x) / Wrapped(y)).0.to_value(), want_w);
            prop_assert_eq!((Saturated(x) / Saturated(y)).0.to_value(), want_s);
            let rem = (Wrapped(x) % Wrapped(y)).0;
            prop_assert_eq!(rem.to_bits(), a.wrapping_rem(b));
        }
        let p = exact(x.to_value()) * exact(y.to_value());
        prop_assert_eq!((Saturated(x) * Saturated(y)).0.to_value(), expect_in(&p, fmt, Rounding::NearestTiesEven, Overflow::Saturate).unwrap());
    }
}

#[test]
fn wrappers_run_generic_code() {
    let xs: Vec<Saturated<Q<7, 8>>> = ["1.5", "2.25", "-0.5"]
        .iter()
        .map(|s| s.parse().unwrap())
        .collect();
    assert_eq!(mean(&xs).0.to_string(), "1.08203125"); // 3.25 / 3 rounded to 1/256
    let big = vec![Saturated(Q::<7, 8>::MAX); 4];
    assert_eq!(mean(&big).0.to_string(), "32"); // the sum clamps to MAX first, then / 4 rounds
    let w: Vec<Wrapped<Q<7, 8>>> = vec![Wrapped(Q::<7, 8>::MAX); 2];
    assert_eq!(w.iter().sum::<Wrapped<Q<7, 8>>>().0.to_bits(), -2);
    use num_traits::{Num, One, Zero};
    assert!(Wrapped::<Q<7, 8>>::zero().is_zero());
    assert_eq!(Saturated::<UQ<1, 7>>::one().0.to_string(), "1");
    assert_eq!(
        Saturated::<Q<7, 8>>::from_str_radix("-1.8", 16)
            .unwrap()
            .0
            .to_string(),
        "-1.5"
    );
    assert_eq!(
        Saturated::<Q<7, 8>>::from_str_radix("1", 7)
            .unwrap_err()
            .kind(),
        ParseErrorKind::InvalidRadix
    );
    let z = Saturated(Q::<7, 8>::ZERO);
    assert_eq!((Saturated(Q::<7, 8>::MIN) / z).0, Q::<7, 8>::MIN);
    assert!(
        std::panic::catch_unwind(|| Wrapped(Q::<7, 8>::MAX) / Wrapped(Q::<7, 8>::ZERO)).is_err()
    );
}

// ---------------------------------------------------------------------------
// serde: exact text in JSON, stored bits in postcard.
// ---------------------------------------------------------------------------

proptest! {
    #[test]
    fn serde_round_trips(a in any::<i16>(), b in any::<u128>(), c in any::<i64>()) {
        let x = Q::<7, 8>::from_bits(a);
        let y = UQ::<0, 128>::from_bits(b);
        let z = Q::<0, 63>::from_bits(c);
        let json = serde_json::to_string(&(x, y, z)).unwrap();
        prop_assert_eq!(&json, &format!("[\"{x}\",\"{y}\",\"{z}\"]"));
        let back: (Q<7, 8>, UQ<0, 128>, Q<0, 63>) = serde_json::from_str(&json).unwrap();
        prop_assert_eq!(back, (x, y, z));
        let bytes = postcard::to_allocvec(&(x, y, z)).unwrap();
        let back: (Q<7, 8>, UQ<0, 128>, Q<0, 63>) = postcard::from_bytes(&bytes).unwrap();
        prop_assert_eq!(back, (x, y, z));
    }
}

#[test]
fn serde_rejects_values_that_do_not_fit() {
    type T = Q<3, 4>;
    assert!(serde_json::from_str::<T>("\"8\"").is_err());
    assert!(serde_json::from_str::<T>("\"x\"").is_err());
    assert!(serde_json::from_str::<T>("8").is_err());
    assert!(serde_json::from_str::<T>("-9.5").is_err());
    assert_eq!(serde_json::from_str::<T>("7").unwrap().to_string(), "7");
    assert_eq!(
        serde_json::from_str::<T>("-0.5").unwrap().to_string(),
        "-0.5"
    );
    assert_eq!(
        serde_json::from_str::<T>("\"0.03125\"").unwrap().to_bits(),
        0
    ); // tie to even
    // Stored bits outside a 7-bit word (Q2.4 in an i8) are an error.
    let bytes = postcard::to_allocvec(&100i8).unwrap();
    assert!(postcard::from_bytes::<Q<2, 4>>(&bytes).is_err());
    let bytes = postcard::to_allocvec(&-64i8).unwrap();
    assert_eq!(
        postcard::from_bytes::<Q<2, 4>>(&bytes).unwrap().to_bits(),
        -64
    );
}

/// `Format` and `QValue` through serde_json (exact text) and postcard
/// (stored bits), at the edges of signed and unsigned 128-bit formats.
#[test]
fn serde_runtime_values_round_trip() {
    use qbound::{Format, QValue};
    let formats = [
        Format::signed(7, 8).unwrap(),
        Format::signed(127, 0).unwrap(),
        Format::unsigned(0, 128).unwrap(),
        Format::unsigned(128, 0).unwrap(),
        Format::signed(0, 0).unwrap(),
        Format::unsigned(5, 7).unwrap(),
    ];
    for f in formats {
        for v in [QValue::min(f), QValue::max(f), QValue::zero(f)] {
            let text = serde_json::to_string(&v).unwrap();
            let back: QValue = serde_json::from_str(&text).unwrap();
            assert_eq!((back, back.format()), (v, f), "{text}");
            let bytes = postcard::to_allocvec(&v).unwrap();
            let back: QValue = postcard::from_bytes(&bytes).unwrap();
            assert_eq!((back, back.format()), (v, f));
            let ft: Format = serde_json::from_str(&serde_json::to_string(&f).unwrap()).unwrap();
            assert_eq!(ft, f);
        }
    }
    // A value that does not fit its format is an error, never clamped.
    assert!(serde_json::from_str::<QValue>(r#"{"format":"UQ4.0","value":"-1"}"#).is_err());
    assert!(serde_json::from_str::<QValue>(r#"{"value":"1","format":"Q4.0"}"#).is_err());
    let bytes = postcard::to_allocvec(&(Format::signed(3, 0).unwrap(), 8i128)).unwrap();
    assert!(postcard::from_bytes::<QValue>(&bytes).is_err());
}
