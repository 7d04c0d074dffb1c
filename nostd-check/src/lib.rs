//! A `#![no_std]` static library that exercises qbound's multiply, rescale
//! and comparison. It defines its own panic handler, so it fails to build
//! (duplicate `panic_impl`) if anything in qbound's dependency tree links
//! `std`. Built by `tests/nostd.rs` with `-C panic=abort`.
#![no_std]
#![forbid(unsafe_code)]

use core::panic::PanicInfo;
use qbound::{Overflow, Rounding, Sq};
use typenum::{U0, U3, U15, U30};

type Sample = Sq<U0, U15>;

/// One multiply-accumulate step and a rounding back to Q0.15.
pub extern "C" fn qbound_mac_q15(acc_bits: i64, x: i16, h: i16) -> i16 {
    let acc = Sq::<U3, U30>::wrapping_from_bits(acc_bits);
    let p = Sample::from_bits(x) * Sample::from_bits(h);
    let sum = acc + p;
    let out: Sample = sum.rescale(Rounding::NearestTiesEven, Overflow::Saturate);
    if out > Sample::ZERO { out.to_bits() } else { 0 }
}

#[panic_handler]
fn panic(_: &PanicInfo) -> ! {
    loop {}
}
