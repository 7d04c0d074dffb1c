//! The format table of DESIGN.md, checked exhaustively: for every pair of
//! formats of up to 6 bits and every pair of their values, the exact sum,
//! difference, product and negation computed by `QValue` is the rug value
//! and lies in the table's result format. The test also finds, for each
//! pair, the narrowest format of the same signedness that holds every
//! result, and lists the pairs where it is narrower than the table's.
//!
//! What it finds (widths 1..=6): 454 of the 2 352 rows (2 304 pairs × 3
//! operations and 48 negations) could use one integer bit less. All of
//! them involve an unsigned operand, and each follows one of the rules in
//! `NARROWER_RULES` (the test checks that the rules predict exactly the
//! pairs found): products with UQ1.0 or UQ0.1, sums of an integer-only
//! format and a UQ0.F, Q0.0 or Q0.F plus an unsigned integer, Q0.F minus an
//! unsigned integer, UQ0.F − UQ1.0, and −UQ1.0. The table keeps the simple
//! rule; these results merely carry one spare integer bit.

use std::collections::BTreeSet;

use qbound::{Format, QValue};
use rug::{Integer, Rational};

use crate::arith::check_exact;
use crate::common::*;

/// The narrowest format of the given signedness that holds every value in
/// `[lo, hi]` with a step of `2^-f`.
fn narrowest(signed: bool, lo: &Rational, hi: &Rational, f: u32) -> Format {
    for i in 0..=64 {
        if u32::from(signed) + i + f == 0 {
            continue;
        }
        let fmt = Format::new(signed, i, f).unwrap();
        let (bl, bh) = def_range(fmt);
        let min = Rational::from((bl, Integer::from(1) << f));
        let max = Rational::from((bh, Integer::from(1) << f));
        if *lo >= min && *hi <= max {
            return fmt;
        }
    }
    unreachable!()
}

/// Fraction bits needed by the exact value `x`.
fn frac_needed(x: &Rational) -> u32 {
    x.denom().significant_bits() - 1
}

/// Tracks the range and step of the results of one operation on one pair.
struct Results {
    lo: Rational,
    hi: Rational,
    f: u32,
}

impl Results {
    fn new() -> Results {
        Results {
            lo: Rational::from(i32::MAX),
            hi: Rational::from(i32::MIN),
            f: 0,
        }
    }
    fn add(&mut self, x: Rational) {
        self.f = self.f.max(frac_needed(&x));
        if x < self.lo {
            self.lo = x.clone();
        }
        if x > self.hi {
            self.hi = x;
        }
    }
}

/// The rules, found by this test over widths 1..=6, for the pairs where a
/// narrower format of the same signedness than the table's holds every
/// exact result. Each describes an operand whose range is so small next to
/// the other's that the carry the table provides for can never happen.
/// `(I, F)` are integer and fraction bits; every rule involves an unsigned
/// operand.
/// A rule: its description, and whether it applies to (operation, lhs, rhs).
type NarrowerRule = (&'static str, fn(char, Format, Format) -> bool);

const NARROWER_RULES: &[NarrowerRule] = &[
    (
        "x × UQ1.0 or UQ1.0 × x: the factor is only 0 or 1",
        |op, a, b| op == '*' && (is(a, false, 1, 0) || is(b, false, 1, 0)),
    ),
    (
        "x × UQ0.1 or UQ0.1 × x with x having I >= 1: the factor is only 0 or 1/2",
        |op, a, b| {
            op == '*'
                && ((is(a, false, 0, 1) && b.int_bits() >= 1)
                    || (is(b, false, 0, 1) && a.int_bits() >= 1))
        },
    ),
    (
        "x + UQ0.F or UQ0.F + x with x having F = 0: an integer plus less than one",
        |op, a, b| {
            op == '+' && ((is_uq0(a) && b.frac_bits() == 0) || (is_uq0(b) && a.frac_bits() == 0))
        },
    ),
    (
        "Q0.0 + UQ or UQ + Q0.0: adding 0 or -1 to an unsigned value",
        |op, a, b| {
            op == '+'
                && ((is(a, true, 0, 0) && !b.is_signed()) || (is(b, true, 0, 0) && !a.is_signed()))
        },
    ),
    (
        "Q0.F + UQI.0 or UQI.0 + Q0.F (I >= 1): less than one in magnitude plus an integer",
        |op, a, b| {
            let q0 = |f: Format| f.is_signed() && f.int_bits() == 0;
            let uint = |f: Format| !f.is_signed() && f.frac_bits() == 0;
            op == '+' && ((q0(a) && uint(b)) || (q0(b) && uint(a)))
        },
    ),
    (
        "Q0.F - UQI.0 (I >= 1): above -1 minus an integer",
        |op, a, b| {
            op == '-' && a.is_signed() && a.int_bits() == 0 && !b.is_signed() && b.frac_bits() == 0
        },
    ),
    (
        "UQ0.F - UQ1.0: the difference lies in (-1, 1)",
        |op, a, b| op == '-' && is_uq0(a) && is(b, false, 1, 0),
    ),
    ("-UQ1.0: the negation is 0 or -1", |op, a, _| {
        op == 'n' && is(a, false, 1, 0)
    }),
];

fn is(f: Format, signed: bool, i: u32, fr: u32) -> bool {
    f.is_signed() == signed && f.int_bits() == i && f.frac_bits() == fr
}

fn is_uq0(f: Format) -> bool {
    !f.is_signed() && f.int_bits() == 0
}

#[test]
fn format_table_holds_every_result_and_is_narrowest_but_listed_pairs() {
    let formats = all_formats(1, 6);
    let mut found = BTreeSet::new();
    let mut predicted = BTreeSet::new();
    let mut report = |op: char, a: Format, b: Format, rule: Format, r: &Results| {
        let n = narrowest(rule.is_signed(), &r.lo, &r.hi, r.f);
        assert!(n.width() <= rule.width());
        assert!(r.f <= rule.frac_bits());
        let what = if op == 'n' {
            format!("-{a}")
        } else {
            format!("{a} {op} {b}")
        };
        if n.width() < rule.width() {
            found.insert(format!("{what}: table {rule}, {n} would do"));
        }
        if let Some((why, _)) = NARROWER_RULES.iter().find(|(_, p)| p(op, a, b)) {
            predicted.insert(format!("{what}: table {rule}, {n} would do"));
            assert!(
                n.width() < rule.width(),
                "{what}: rule '{why}' predicts a narrower format, none found"
            );
        }
    };
    for &fa in &formats {
        let va: Vec<QValue> = all_bits(fa)
            .map(|x| QValue::from_i128_bits(fa, x).unwrap())
            .collect();
        let mut neg = Results::new();
        for &a in &va {
            check_exact('n', a, a);
            neg.add(-exact(a));
        }
        report('n', fa, fa, Format::negation(fa).unwrap(), &neg);
        for &fb in &formats {
            let vb: Vec<QValue> = all_bits(fb)
                .map(|x| QValue::from_i128_bits(fb, x).unwrap())
                .collect();
            let (mut sum, mut diff, mut prod) = (Results::new(), Results::new(), Results::new());
            for &a in &va {
                let ea = exact(a);
                for &b in &vb {
                    for op in ['+', '-', '*'] {
                        check_exact(op, a, b);
                    }
                    let eb = exact(b);
                    sum.add(Rational::from(&ea + &eb));
                    diff.add(Rational::from(&ea - &eb));
                    prod.add(Rational::from(&ea * &eb));
                }
            }
            report('+', fa, fb, Format::sum(fa, fb).unwrap(), &sum);
            report('-', fa, fb, Format::difference(fa, fb).unwrap(), &diff);
            report('*', fa, fb, Format::product(fa, fb).unwrap(), &prod);
        }
    }
    let found: Vec<String> = found.into_iter().collect();
    println!("{} pairs where a narrower format would do:", found.len());
    for line in &found {
        println!("  {line}");
    }
    let predicted: Vec<String> = predicted.into_iter().collect();
    let unexplained: Vec<&String> = found.iter().filter(|l| !predicted.contains(l)).collect();
    assert!(
        unexplained.is_empty(),
        "pairs with a narrower result format that no rule lists: {unexplained:#?}"
    );
    assert_eq!(found, predicted);
    // The count over widths 1..=6, as found when the rules were written.
    assert_eq!(found.len(), 454);
}
