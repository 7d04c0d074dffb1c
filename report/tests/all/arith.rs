//! The engine's exact numbers ([`Num`]) against `rug` (GMP rationals): every
//! operation exact where it claims to be, every rounding directed and as
//! tight as its precision allows, over mantissas on both sides of the
//! 128-bit fast path and exponents of 2 and 5 far apart.

use proptest::prelude::*;
use qbound::{Format, Rounding};
use qbound_report::arith::{
    Direction, Num, ceil_to_grid, floor_to_grid, num_to_qvalue, parse_decimal, qvalue_to_num,
    round_to_grid,
};
use rug::{Integer, Rational};

use crate::common::rat;

/// `m · 2^e2 · 10^e10` as a `Num` and as a `rug` rational, built
/// independently.
fn pair(m: &Integer, e2: i32, e10: i32) -> (Num, Rational) {
    let n: Num = m.to_string().parse().unwrap();
    let n = n.mul_pow2(i64::from(e2)) * Num::decimal(1, e10);
    let mut r = Rational::from(m.clone());
    r = if e2 >= 0 {
        r << e2.unsigned_abs()
    } else {
        r >> e2.unsigned_abs()
    };
    let p10 = Rational::from(Integer::from(Integer::u_pow_u(10, e10.unsigned_abs())));
    if e10 >= 0 {
        r *= p10
    } else {
        r /= p10
    }
    (n, r)
}

/// Mantissas: small, around the `i128` edge, and large.
fn mantissa() -> impl Strategy<Value = Integer> {
    prop_oneof![
        any::<i64>().prop_map(Integer::from),
        any::<i128>().prop_map(Integer::from),
        (any::<i128>(), any::<u128>(), 0u32..3)
            .prop_map(|(h, l, k)| { (Integer::from(h) << (128 * k)) + l }),
        Just(Integer::from(i128::MIN)),
        Just(Integer::from(i128::MAX)),
        Just(Integer::from(0)),
    ]
}

fn num() -> impl Strategy<Value = (Num, Rational)> {
    (mantissa(), -300i32..300, -40i32..10).prop_map(|(m, e2, e10)| pair(&m, e2, e10))
}

/// The position of the top bit of `|x|` (`x = 2^msb · [1, 2)`).
fn msb(x: &Rational) -> i64 {
    let a = Rational::from(x.abs_ref());
    let mut e = i64::from(a.numer().significant_bits()) - i64::from(a.denom().significant_bits());
    // Adjust so that 2^e <= a < 2^(e+1).
    let pow = |e: i64| {
        if e >= 0 {
            Rational::from(Integer::from(1) << u32::try_from(e).unwrap())
        } else {
            Rational::from((
                Integer::from(1),
                Integer::from(1) << u32::try_from(-e).unwrap(),
            ))
        }
    };
    while pow(e) > a {
        e -= 1;
    }
    while pow(e + 1) <= a {
        e += 1;
    }
    e
}

/// `r` is the rounding of `x` toward `dir` to `prec` bits: on the right
/// side, dyadic with at most `prec` bits, and closer than one unit in the
/// last of them (so no representable value lies strictly between).
fn directed(x: &Rational, r: &Num, prec: u32, dir: Direction) -> Result<(), TestCaseError> {
    let rr = rat(r);
    match dir {
        Direction::Down => prop_assert!(rr <= *x, "{rr} > {x}"),
        Direction::Up => prop_assert!(rr >= *x, "{rr} < {x}"),
    }
    prop_assert!(r.is_dyadic() || rr == *x);
    if rr == *x {
        return Ok(());
    }
    prop_assert!(
        r.mantissa_bits() <= u64::from(prec),
        "{} bits",
        r.mantissa_bits()
    );
    // |x - r| < 2^(msb(x) - prec + 2): within a unit of the last place
    // (one place of slack for a carry into a new top bit).
    let gap = Rational::from(&rr - x).abs();
    let e = msb(x) - i64::from(prec) + 2;
    let unit = if e >= 0 {
        Rational::from(Integer::from(1) << u32::try_from(e).unwrap())
    } else {
        Rational::from((
            Integer::from(1),
            Integer::from(1) << u32::try_from(-e).unwrap(),
        ))
    };
    prop_assert!(gap < unit, "rounding error {gap} not below {unit}");
    Ok(())
}

proptest! {
    #[test]
    fn add_sub_mul_are_exact((a, ra) in num(), (b, rb) in num()) {
        prop_assert_eq!(rat(&(&a + &b)), Rational::from(&ra + &rb));
        prop_assert_eq!(rat(&(&a - &b)), Rational::from(&ra - &rb));
        prop_assert_eq!(rat(&(&a * &b)), Rational::from(&ra * &rb));
        prop_assert_eq!(rat(&-&a), Rational::from(-&ra));
        prop_assert_eq!(rat(&a.abs()), Rational::from(ra.abs_ref()));
        prop_assert_eq!(a.cmp(&b), ra.cmp(&rb));
        prop_assert_eq!(a == b, ra == rb);
        // Canonical: equal values are equal structurally.
        let c = &(&a + &b) - &b;
        prop_assert_eq!(&c, &a);
    }

    #[test]
    fn text_round_trips((a, ra) in num()) {
        let back: Num = a.to_string().parse().unwrap();
        prop_assert_eq!(&back, &a);
        prop_assert_eq!(a.to_string().parse::<Rational>().unwrap(), ra.clone());
        let dec = a.decimal_text();
        prop_assert_eq!(parse_decimal(&dec).map(|x| rat(&x)), Some(ra.clone()));
        let f = a.to_f64();
        let g = ra.to_f64();
        prop_assert!(f == g || ((f - g) / g).abs() < 1e-14, "{f} vs {g}");
    }

    #[test]
    fn floor_and_ceil((a, ra) in num()) {
        prop_assert_eq!(rat(&a.floor()), Rational::from(ra.floor_ref()));
        prop_assert_eq!(rat(&a.ceil()), Rational::from(ra.ceil_ref()));
        prop_assert_eq!(a.is_integer(), *ra.denom() == 1);
    }

    #[test]
    fn round_out_is_directed_and_tight((a, ra) in num(), prec in 1u32..200) {
        for dir in [Direction::Down, Direction::Up] {
            directed(&ra, &a.round_out(prec, dir), prec, dir)?;
        }
    }

    #[test]
    fn rounded_operations_are_directed_and_tight(
        (a, ra) in num(), (b, rb) in num(), prec in 1u32..160
    ) {
        for dir in [Direction::Down, Direction::Up] {
            let p = Rational::from(&ra * &rb);
            let s = Rational::from(&ra + &rb);
            directed(&p, &a.mul_round(&b, prec, dir), prec, dir)?;
            directed(&s, &a.add_round(&b, prec, dir), prec, dir)?;
            if !b.is_zero() {
                let q = Rational::from(&ra / &rb);
                directed(&q, &a.div_round(&b, prec, dir), prec, dir)?;
            }
        }
    }

    #[test]
    fn decimals_parse_exactly(
        neg in any::<bool>(),
        int in "[0-9]{0,30}",
        frac in "[0-9]{0,30}",
        exp in prop::option::of(-999i32..999),
    ) {
        prop_assume!(!(int.is_empty() && frac.is_empty()));
        let mut text = String::new();
        if neg { text.push('-'); }
        text.push_str(&int);
        if !frac.is_empty() { text.push('.'); text.push_str(&frac); }
        if let Some(e) = exp { text.push_str(&format!("e{e}")); }
        let n = parse_decimal(&text).expect("a decimal");
        // Reference: digits / 10^len(frac) · 10^exp.
        let digits = Integer::from_str_radix(&format!("{int}{frac}0"), 10).unwrap() / 10;
        let mut r = Rational::from(digits);
        let e = exp.unwrap_or(0) - frac.len() as i32;
        let p = Rational::from(Integer::from(Integer::u_pow_u(10, e.unsigned_abs())));
        if e >= 0 { r *= p } else { r /= p }
        if neg { r = -r; }
        prop_assert_eq!(rat(&n), r);
    }
}

/// Rounding to a grid, every mode, against a reference written from the
/// definitions (IEEE 754-2019 §4.3 for the directed and ties-to-even
/// modes; ties up/away and round-to-odd as defined in `qbound::Rounding`).
#[test]
fn grid_rounding_matches_the_definitions() {
    let modes = [
        Rounding::Floor,
        Rounding::Ceil,
        Rounding::TowardZero,
        Rounding::AwayFromZero,
        Rounding::NearestTiesUp,
        Rounding::NearestTiesAway,
        Rounding::NearestTiesEven,
        Rounding::ToOdd,
    ];
    let reference = |x: &Rational, frac: u32, mode: Rounding| -> Rational {
        let scaled = Rational::from(x << frac);
        let fl = Integer::from(scaled.floor_ref());
        let r = Rational::from(&scaled - &fl);
        let half = Rational::from((1, 2));
        let exact = r == 0;
        let q = if exact {
            fl
        } else {
            let up = match mode {
                Rounding::Floor => false,
                Rounding::Ceil => true,
                Rounding::TowardZero => *x < 0,
                Rounding::AwayFromZero => *x > 0,
                Rounding::NearestTiesUp => r >= half,
                Rounding::NearestTiesAway => r > half || (r == half && *x > 0),
                Rounding::NearestTiesEven => r > half || (r == half && fl.is_odd()),
                Rounding::ToOdd => fl.is_even(),
                Rounding::Stochastic(_) => unreachable!(),
            };
            if up { fl + 1 } else { fl }
        };
        Rational::from(q) >> frac
    };
    // Decimals, ties and dyadics with more fraction bits, both signs.
    let mut values: Vec<(Num, Rational)> = Vec::new();
    for p in -40i64..=40 {
        for (m, e2, e10) in [
            (p, -3, 0),
            (p, -2, 0),
            (p, 0, -1),
            (p, 0, -2),
            (p * 3, -5, -1),
        ] {
            values.push(pair(&Integer::from(m), e2, e10));
        }
    }
    for (x, rx) in &values {
        for frac in 0..4 {
            for mode in modes {
                assert_eq!(
                    rat(&round_to_grid(x, frac, mode)),
                    reference(rx, frac, mode),
                    "{rx} to 2^-{frac} {mode:?}"
                );
            }
            assert_eq!(
                rat(&floor_to_grid(x, frac)),
                reference(rx, frac, Rounding::Floor)
            );
            assert_eq!(
                rat(&ceil_to_grid(x, frac)),
                reference(rx, frac, Rounding::Ceil)
            );
        }
    }
    // IEEE 754-2019 §4.3.1 example of ties-to-even: 2.5 -> 2, 3.5 -> 4, -2.5 -> -2.
    for (v, want) in [("2.5", 2), ("3.5", 4), ("-2.5", -2)] {
        let x = parse_decimal(v).unwrap();
        assert_eq!(
            round_to_grid(&x, 0, Rounding::NearestTiesEven),
            Num::from(want)
        );
    }
}

/// Every value of small formats converts to a `Num` and back unchanged.
#[test]
fn qvalues_round_trip_exhaustively() {
    for (signed, int, frac) in [
        (true, 0, 0),
        (false, 1, 0),
        (true, 3, 4),
        (false, 0, 7),
        (true, 0, 7),
    ] {
        let f = Format::new(signed, int, frac).unwrap();
        let (lo, hi) = (
            f.min_bits().to_i128().unwrap(),
            f.max_bits().to_i128().unwrap(),
        );
        for b in lo..=hi {
            let v = qbound::QValue::from_i128_bits(f, b).unwrap();
            let n = qvalue_to_num(v);
            assert_eq!(rat(&n), Rational::from(b) >> frac);
            assert_eq!(num_to_qvalue(&n, f), Some(v));
        }
    }
    // 128-bit extremes.
    for f in [
        Format::signed(0, 127).unwrap(),
        Format::unsigned(128, 0).unwrap(),
        Format::unsigned(0, 128).unwrap(),
    ] {
        for v in [qbound::QValue::min(f), qbound::QValue::max(f)] {
            assert_eq!(num_to_qvalue(&qvalue_to_num(v), f), Some(v));
        }
    }
}
