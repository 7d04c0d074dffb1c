//! The std-named same-format families (`wrapping_`, `saturating_`,
//! `checked_`, `overflowing_` × add, sub, neg, abs, mul) on typed values,
//! against the rug reference: wrapping = the exact result modulo 2^W into
//! the range, saturating = clamped, checked = `None` exactly when it does
//! not fit, overflowing = the wrapped result and that flag (Rust std
//! integer semantics, common practice). Property tests at many widths,
//! exhaustive for formats of up to 8 bits.

use qbound::{Overflow, QType, QValue, Rounding, Storage};
use rug::Integer;

use crate::common::*;

/// The typed value of a run-time value of the same format.
pub fn typed<T: QType>(v: QValue) -> T {
    assert_eq!(v.format(), T::FORMAT);
    T::checked_from_bits(T::Storage::from_u128_bits(v.bits().low_bits())).expect("in range")
}

/// The stored integer of a typed value.
pub fn int_of<T: QType>(x: T) -> Integer {
    wide_to_integer(x.to_value().bits())
}

/// Checks the four forms of one operation against the exact result `n`.
pub fn check_forms<T: QType>(
    what: &str,
    n: &Integer,
    wrapping: T,
    saturating: T,
    checked: Option<T>,
    overflowing: (T, bool),
) {
    let f = T::FORMAT;
    let wrap = wrap_ref(n, f);
    let sat = overflow_ref(n, f, Overflow::Saturate).unwrap();
    let ok = fits(n, f);
    assert_eq!(int_of(wrapping), wrap, "wrapping {what} in {f} (exact {n})");
    assert_eq!(
        int_of(saturating),
        sat,
        "saturating {what} in {f} (exact {n})"
    );
    assert_eq!(
        checked.map(int_of),
        ok.then(|| n.clone()),
        "checked {what} in {f} (exact {n})"
    );
    assert_eq!(
        (int_of(overflowing.0), overflowing.1),
        (wrap, !ok),
        "overflowing {what} in {f} (exact {n})"
    );
}

/// Every family on one pair of values of type `$T`, with the given
/// rounding modes for the multiply.
macro_rules! check_families {
    ($T:ty, $va:expr, $vb:expr, $rnds:expr) => {{
        let (va, vb): (QValue, QValue) = ($va, $vb);
        let (a, b): ($T, $T) = (typed(va), typed(vb));
        let (ia, ib) = (int_of(a), int_of(b));
        let sum = Integer::from(&ia + &ib);
        check_forms(
            "add",
            &sum,
            a.wrapping_add(b),
            a.saturating_add(b),
            a.checked_add(b),
            a.overflowing_add(b),
        );
        let diff = Integer::from(&ia - &ib);
        check_forms(
            "sub",
            &diff,
            a.wrapping_sub(b),
            a.saturating_sub(b),
            a.checked_sub(b),
            a.overflowing_sub(b),
        );
        let neg = Integer::from(-&ia);
        check_forms(
            "neg",
            &neg,
            a.wrapping_neg(),
            a.saturating_neg(),
            a.checked_neg(),
            a.overflowing_neg(),
        );
        let abs = Integer::from(ia.abs_ref());
        check_forms(
            "abs",
            &abs,
            a.wrapping_abs(),
            a.saturating_abs(),
            a.checked_abs(),
            a.overflowing_abs(),
        );
        let p = Integer::from(&ia * &ib);
        let fr = <$T as QType>::FORMAT.frac_bits();
        let rnds: Vec<Rounding> = $rnds(&p, 2 * fr, fr);
        for rnd in rnds {
            let n = round_to(&p, 2 * fr, fr, rnd);
            check_forms(
                &format!("mul {rnd:?}"),
                &n,
                a.wrapping_mul(b, rnd),
                a.saturating_mul(b, rnd),
                a.checked_mul(b, rnd),
                a.overflowing_mul(b, rnd),
            );
        }
    }};
}

/// A property test per type: random values (edges favoured), every
/// rounding mode for the multiply.
macro_rules! families_prop {
    ($($name:ident: $T:ty;)*) => {$(
        proptest::proptest! {
            #[test]
            fn $name(x in proptest::prelude::any::<(u128, u8, u128, u8)>()) {
                let f = <$T as QType>::FORMAT;
                let va = value_of(f, &pick_bits(f, x.0, x.1));
                let vb = value_of(f, &pick_bits(f, x.2, x.3));
                check_families!($T, va, vb, roundings_for);
            }
        }
    )*};
}

families_prop! {
    families_q0_0: qbound::Q<0, 0>;
    families_uq1_0: qbound::UQ<1, 0>;
    families_uq0_1: qbound::UQ<0, 1>;
    families_q7_0: qbound::Q<7, 0>;
    families_q0_7: qbound::Q<0, 7>;
    families_uq8_0: qbound::UQ<8, 0>;
    families_q3_8: qbound::Q<3, 8>;
    families_uq5_7: qbound::UQ<5, 7>;
    families_q7_8: qbound::Q<7, 8>;
    families_uq0_16: qbound::UQ<0, 16>;
    families_q1_16: qbound::Q<1, 16>;
    families_q15_16: qbound::Q<15, 16>;
    families_uq16_16: qbound::UQ<16, 16>;
    families_q9_30: qbound::Q<9, 30>;
    families_uq20_20: qbound::UQ<20, 20>;
    families_q31_32: qbound::Q<31, 32>;
    families_uq0_64: qbound::UQ<0, 64>;
    families_q63_64: qbound::Q<63, 64>;
    families_q0_127: qbound::Q<0, 127>;
    families_q127_0: qbound::Q<127, 0>;
    families_uq128_0: qbound::UQ<128, 0>;
    families_uq64_64: qbound::UQ<64, 64>;
    families_uq0_128: qbound::UQ<0, 128>;
}

/// Every pair of values of every listed format (up to 8 bits).
macro_rules! families_exhaustive {
    ($($T:ty),* $(,)?) => {$({
        let f = <$T as QType>::FORMAT;
        for x in all_bits(f) {
            for y in all_bits(f) {
                let va = QValue::from_i128_bits(f, x).unwrap();
                let vb = QValue::from_i128_bits(f, y).unwrap();
                check_families!($T, va, vb, roundings_for);
            }
        }
    })*};
}

#[test]
fn families_exhaustive_small_signed() {
    use qbound::Q;
    families_exhaustive!(Q<0, 0>, Q<0, 1>, Q<1, 0>, Q<2, 2>, Q<7, 0>, Q<3, 4>, Q<0, 7>);
}

#[test]
fn families_exhaustive_small_unsigned() {
    use qbound::UQ;
    families_exhaustive!(UQ<1, 0>, UQ<0, 1>, UQ<3, 2>, UQ<8, 0>, UQ<4, 4>, UQ<0, 8>);
}
