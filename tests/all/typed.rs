//! Typed results against the run-time algebra: for a set of typed format
//! pairs, the result type of `+ - ×` and unary `-` has the format that
//! `Format::sum` / `difference` / `product` / `negation` give, and the
//! typed operators, comparisons and `rescale` give the same bits as the
//! `QValue` operations.

use core::ops::{Add, Mul, Neg, Sub};

use qbound::{Format, Overflow, QType, QValue, Rounding};
#[allow(unused_imports)]
use qbound::{Q, UQ};

use crate::common::*;
use crate::families::typed;

/// Sampled values of `T`'s format (edges favoured), as run-time values.
fn samples(f: Format, seed: u64) -> Vec<QValue> {
    let mut mix = Mix(seed);
    (0..48)
        .map(|_| {
            let raw = mix.next_u128();
            value_of(f, &pick_bits(f, raw, (raw >> 120) as u8))
        })
        .collect()
}

fn check_pair<A, B>()
where
    A: QType
        + Add<B, Output: QType>
        + Sub<B, Output: QType>
        + Mul<B, Output: QType>
        + Neg<Output: QType>
        + PartialOrd<B>,
    B: QType,
{
    let (fa, fb) = (A::FORMAT, B::FORMAT);
    assert_eq!(
        <A as Add<B>>::Output::FORMAT,
        Format::sum(fa, fb).unwrap(),
        "{fa} + {fb}"
    );
    assert_eq!(
        <A as Sub<B>>::Output::FORMAT,
        Format::difference(fa, fb).unwrap(),
        "{fa} - {fb}"
    );
    assert_eq!(
        <A as Mul<B>>::Output::FORMAT,
        Format::product(fa, fb).unwrap(),
        "{fa} * {fb}"
    );
    assert_eq!(
        <A as Neg>::Output::FORMAT,
        Format::negation(fa).unwrap(),
        "-{fa}"
    );
    let (sa, sb) = (samples(fa, 1), samples(fb, 2));
    for &va in &sa {
        let a: A = typed(va);
        assert_eq!(a.to_value().bits(), va.bits());
        assert_eq!((-a).to_value(), va.exact_neg().unwrap());
        assert_eq!((-a).to_value().bits(), va.exact_neg().unwrap().bits());
        for &vb in &sb {
            let b: B = typed(vb);
            let same = |x: QValue, y: QValue| x.format() == y.format() && x.bits() == y.bits();
            assert!(
                same((a + b).to_value(), va.exact_add(vb).unwrap()),
                "{va:?} + {vb:?}"
            );
            assert!(
                same((a - b).to_value(), va.exact_sub(vb).unwrap()),
                "{va:?} - {vb:?}"
            );
            assert!(
                same((a * b).to_value(), va.exact_mul(vb).unwrap()),
                "{va:?} * {vb:?}"
            );
            assert_eq!(a.partial_cmp(&b), Some(va.cmp(&vb)), "{va:?} vs {vb:?}");
        }
    }
}

macro_rules! typed_pairs {
    ($($name:ident: $A:ty, $B:ty;)*) => {$(
        #[test]
        fn $name() {
            check_pair::<$A, $B>();
            let (fa, fb) = (<$A as QType>::FORMAT, <$B as QType>::FORMAT);
            let same = |x: QValue, y: QValue| x.format() == y.format() && x.bits() == y.bits();
            for &va in &samples(fa, 3) {
                let a: $A = typed(va);
                for &vb in &samples(fb, 4) {
                    let b: $B = typed(vb);
                    for rnd in Rounding::ALL {
                        for ovf in [Overflow::Wrap, Overflow::Saturate, Overflow::SaturateSymmetric] {
                            let t: $B = a.rescale(rnd, ovf);
                            assert!(same(t.to_value(), va.rescale(fb, rnd, ovf)), "{va:?} -> {fb} {rnd:?} {ovf:?}");
                            let m: $A = a.mul_rescale(b, rnd, ovf);
                            assert!(same(m.to_value(), va.mul_rescale(vb, fa, rnd, ovf)));
                        }
                        let t: Result<$B, _> = a.try_rescale(rnd);
                        assert_eq!(t.map(|t| t.to_value().bits()), va.try_rescale(fb, rnd).map(|v| v.bits()));
                    }
                }
            }
        }
    )*};
}

typed_pairs! {
    typed_q7_8_q7_8: Q<7, 8>, Q<7, 8>;
    typed_q0_15_q0_15: Q<0, 15>, Q<0, 15>;
    typed_q3_4_uq2_5: Q<3, 4>, UQ<2, 5>;
    typed_uq2_5_q3_4: UQ<2, 5>, Q<3, 4>;
    typed_uq8_8_uq0_16: UQ<8, 8>, UQ<0, 16>;
    typed_q0_0_q0_0: Q<0, 0>, Q<0, 0>;
    typed_uq1_0_uq0_1: UQ<1, 0>, UQ<0, 1>;
    typed_uq0_1_q3_4: UQ<0, 1>, Q<3, 4>;
    typed_q9_30_q1_16: Q<9, 30>, Q<1, 16>;
    typed_q31_32_q31_32: Q<31, 32>, Q<31, 32>;
    typed_uq63_0_uq0_64: UQ<63, 0>, UQ<0, 64>;
    typed_q62_0_uq0_64: Q<62, 0>, UQ<0, 64>;
    typed_q126_0_q0_0: Q<126, 0>, Q<0, 0>;
    typed_uq12_12_q11_0: UQ<12, 12>, Q<11, 0>;
    typed_q0_39_uq5_13: Q<0, 39>, UQ<5, 13>;
}
