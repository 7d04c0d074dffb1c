//! Exact `+ - ×` and negation, `mul_rescale` and cross-format comparison of
//! `QValue` against the rug reference over the format grid.

use proptest::prelude::*;
use qbound::{Format, FormatError, Overflow, QValue};
use rug::Integer;

use crate::common::*;

/// The stored integers of `a` and `b` brought to the common fraction bits
/// `f`.
fn aligned(v: QValue, f: u32) -> Integer {
    wide_to_integer(v.bits()) << (f - v.format().frac_bits())
}

/// Checks an exact binary operation: the result format is the table's and
/// the value is the exact one (or the format error when too wide).
pub fn check_exact(op: char, a: QValue, b: QValue) {
    let (fa, fb) = (a.format(), b.format());
    let got = match op {
        '+' => a.exact_add(b),
        '-' => a.exact_sub(b),
        '*' => a.exact_mul(b),
        'n' => a.exact_neg(),
        _ => unreachable!(),
    };
    let Some(rf) = table_format(op, fa, fb) else {
        assert!(
            matches!(got, Err(FormatError::TooWide { .. })),
            "{fa} {op} {fb}: {got:?}"
        );
        return;
    };
    let r = got.unwrap_or_else(|e| panic!("{fa} {op} {fb}: {e}"));
    assert_eq!(r.format(), rf, "{fa} {op} {fb}");
    let expect = match op {
        '+' => aligned(a, rf.frac_bits()) + aligned(b, rf.frac_bits()),
        '-' => aligned(a, rf.frac_bits()) - aligned(b, rf.frac_bits()),
        '*' => wide_to_integer(a.bits()) * wide_to_integer(b.bits()),
        _ => -wide_to_integer(a.bits()),
    };
    assert!(
        fits(&expect, rf),
        "{fa} {op} {fb}: the exact result {expect} does not fit {rf}"
    );
    assert_eq!(
        wide_to_integer(r.bits()),
        expect,
        "{fa} {op} {fb} bits {:?} {:?}",
        a.bits(),
        b.bits()
    );
}

/// Checks `mul_rescale` / `try_mul_rescale` into `dst` with every rounding
/// (stochastic at its threshold too) and overflow mode.
pub fn check_mul_rescale(a: QValue, b: QValue, dst: Format) {
    let p = wide_to_integer(a.bits()) * wide_to_integer(b.bits());
    let pf = a.format().frac_bits() + b.format().frac_bits();
    for rnd in roundings_for(&p, pf, dst.frac_bits()) {
        let n = round_to(&p, pf, dst.frac_bits(), rnd);
        for ovf in Overflow::ALL {
            let expect = overflow_ref(&n, dst, ovf);
            let got = catch(|| a.mul_rescale(b, dst, rnd, ovf));
            let ctx = || format!("{:?} × {:?} -> {dst} {rnd:?} {ovf:?}", a, b);
            assert_outcome(&expect, got, dst, ctx);
        }
        let t = a.try_mul_rescale(b, dst, rnd);
        assert_eq!(t.is_ok(), fits(&n, dst));
        if let Ok(g) = t {
            assert_eq!(wide_to_integer(g.bits()), n);
        }
    }
}

/// Checks the exact comparison of two values of any formats.
pub fn check_cmp(a: QValue, b: QValue) {
    let expect = exact(a).cmp(&exact(b));
    assert_eq!(a.cmp(&b), expect, "{a:?} vs {b:?}");
    assert_eq!(a == b, expect.is_eq());
    assert_eq!(a < b, expect.is_lt());
}

/// Products whose exact width passes 128 bits (the 257-bit path).
fn wide_pairs() -> Vec<(Format, Format)> {
    vec![
        (q(63, 64), q(63, 64)),
        (q(0, 127), q(0, 127)),
        (uq(128, 0), q(127, 0)),
        (uq(0, 128), uq(0, 128)),
        (uq(64, 64), q(63, 64)),
        (q(9, 30), uq(50, 51)),
    ]
}

proptest! {
    #[test]
    fn exact_ops_match_rug(fa in arb_format(), fb in arb_format(), x in any::<(u128, u8, u128, u8)>()) {
        let a = value_of(fa, &pick_bits(fa, x.0, x.1));
        let b = value_of(fb, &pick_bits(fb, x.2, x.3));
        for op in ['+', '-', '*', 'n'] {
            check_exact(op, a, b);
        }
        check_cmp(a, b);
        check_cmp(a, a);
    }

    #[test]
    fn mul_rescale_matches_rug(fa in arb_format(), fb in arb_format(), x in any::<(u128, u8, u128, u8)>()) {
        let a = value_of(fa, &pick_bits(fa, x.0, x.1));
        let b = value_of(fb, &pick_bits(fb, x.2, x.3));
        for dst in grid() {
            check_mul_rescale(a, b, dst);
        }
    }

    #[test]
    fn mul_rescale_past_128_bits(
        pair in proptest::sample::select(wide_pairs()),
        x in any::<(u128, u8, u128, u8)>(),
    ) {
        let (fa, fb) = pair;
        assert!(Format::product(fa, fb).is_err());
        let a = value_of(fa, &pick_bits(fa, x.0, x.1));
        let b = value_of(fb, &pick_bits(fb, x.2, x.3));
        for dst in grid() {
            check_mul_rescale(a, b, dst);
        }
    }
}
