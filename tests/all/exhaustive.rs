//! Exhaustive checks over every value of every format of up to 8 bits
//! (signed and unsigned, every split of the bits): rescale into every such
//! format with every rounding and overflow mode, and `mul_rescale` and
//! comparison over all value pairs of the formats up to 3 bits.

use rug::Integer;

use crate::arith::{check_cmp, check_mul_rescale};
use crate::common::*;
use crate::rescale::check_rescale;

/// Every value of every format of width `w` into every format of width
/// 1..=8; the stochastic mode at its threshold words (see `roundings_for`).
fn rescale_exhaustive_from_width(w: u32) {
    let dsts = all_formats(1, 8);
    for src in all_formats(w, w) {
        for bits in all_bits(src) {
            let bits = Integer::from(bits);
            for &dst in &dsts {
                for rnd in roundings_for(&bits, src.frac_bits(), dst.frac_bits()) {
                    check_rescale(src, &bits, dst, rnd);
                }
            }
        }
    }
}

macro_rules! rescale_by_width {
    ($($name:ident: $w:expr;)*) => {$(
        #[test]
        fn $name() {
            rescale_exhaustive_from_width($w);
        }
    )*};
}

rescale_by_width! {
    rescale_exhaustive_from_1_bit: 1;
    rescale_exhaustive_from_2_bits: 2;
    rescale_exhaustive_from_3_bits: 3;
    rescale_exhaustive_from_4_bits: 4;
    rescale_exhaustive_from_5_bits: 5;
    rescale_exhaustive_from_6_bits: 6;
    rescale_exhaustive_from_7_bits: 7;
    rescale_exhaustive_from_8_bits: 8;
}

#[test]
fn mul_rescale_and_cmp_exhaustive_small() {
    let small = all_formats(1, 3);
    let dsts = all_formats(1, 4);
    for &fa in &small {
        for &fb in &small {
            for x in all_bits(fa) {
                for y in all_bits(fb) {
                    let a = value_of(fa, &Integer::from(x));
                    let b = value_of(fb, &Integer::from(y));
                    check_cmp(a, b);
                    for &dst in &dsts {
                        check_mul_rescale(a, b, dst);
                    }
                }
            }
        }
    }
}
