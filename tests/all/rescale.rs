//! `QValue::rescale` and `try_rescale` against the rug reference, for every
//! rounding × overflow combination over the format grid.

use proptest::prelude::*;
use qbound::{Format, Overflow, QValue, Rounding, Side};
use rug::Integer;

use crate::common::*;

/// Checks one rescale of `bits` (in `src`) into `dst` with `rnd` under every
/// overflow mode, and `try_rescale`.
pub fn check_rescale(src: Format, bits: &Integer, dst: Format, rnd: Rounding) {
    let v = value_of(src, bits);
    let n = round_to(bits, src.frac_bits(), dst.frac_bits(), rnd);
    for ovf in Overflow::ALL {
        let expect = overflow_ref(&n, dst, ovf);
        let got = catch(|| v.rescale(dst, rnd, ovf));
        let ctx = || format!("{src} bits {bits} -> {dst}, {rnd:?}, {ovf:?} (rounded {n})");
        assert_outcome(&expect, got, dst, ctx);
        if ovf == Overflow::SaturateSymmetric && dst.is_signed() {
            let g = got.unwrap();
            assert_ne!(
                g,
                QValue::min(dst),
                "symmetric saturation gave MIN: {}",
                ctx()
            );
        }
    }
    let (lo, hi) = def_range(dst);
    match v.try_rescale(dst, rnd) {
        Ok(g) => {
            assert!(fits(&n, dst), "{src} {bits} -> {dst} {rnd:?}: accepted {n}");
            assert_eq!(wide_to_integer(g.bits()), n);
        }
        Err(e) => {
            assert_eq!(e.format(), dst);
            let side = if n > hi {
                Side::Above
            } else {
                assert!(n < lo);
                Side::Below
            };
            assert_eq!(e.side(), side, "{src} {bits} -> {dst} {rnd:?}");
        }
    }
}

proptest! {
    /// One source value, rescaled into every format of the grid with every
    /// rounding mode (stochastic with the case's random word and at its
    /// threshold) and every overflow mode.
    #[test]
    fn rescale_into_every_grid_format(
        src in arb_format(),
        raw in any::<u128>(),
        sel in any::<u8>(),
        random in any::<u64>(),
    ) {
        let bits = pick_bits(src, raw, sel);
        for dst in grid() {
            let mut modes = roundings_for(&bits, src.frac_bits(), dst.frac_bits());
            modes.push(Rounding::Stochastic(random));
            for rnd in modes {
                check_rescale(src, &bits, dst, rnd);
            }
        }
    }
}

/// The stochastic rule with a uniform word: over all 2^8 values of the top
/// byte of the word, rounding 0.25 (two discarded bits `01`) up happens for
/// exactly a quarter of them (words below 2^62).
#[test]
fn stochastic_rounds_up_with_the_discarded_fraction() {
    let src = q(7, 2);
    let v = QValue::from_i128_bits(src, 1).unwrap(); // 0.25
    let ups = (0..=255u64)
        .filter(|top| {
            let r = v.rescale(q(7, 0), Rounding::Stochastic(top << 56), Overflow::Panic);
            r.to_i128_bits() == Some(1)
        })
        .count();
    assert_eq!(ups, 64);
}
