//! A `#![no_std]` static library that exercises qbound's multiply, rescale,
//! comparison and a sine. It defines its own panic handler, so it fails to build
//! (duplicate `panic_impl`) if anything in qbound's dependency tree links
//! `std`. Built by `tests/nostd.rs` with `-C panic=abort`.
#![no_std]
#![forbid(unsafe_code)]

use core::panic::PanicInfo;
use qbound::{Overflow, Rounding, Sq, Uq};
use typenum::{U0, U1, U3, U14, U15, U30, U32};

type Sample = Sq<U0, U15>;

/// One multiply-accumulate step and a rounding back to Q0.15.
pub extern "C" fn qbound_mac_q15(acc_bits: i64, x: i16, h: i16) -> i16 {
    let acc = Sq::<U3, U30>::wrapping_from_bits(acc_bits);
    let p = Sample::from_bits(x) * Sample::from_bits(h);
    let sum = acc + p;
    let out: Sample = sum.rescale(Rounding::NearestTiesEven, Overflow::Saturate);
    if out > Sample::ZERO { out.to_bits() } else { 0 }
}

/// One step of a numerically controlled oscillator: the sine of a 32-bit
/// phase (in turns) as Q1.14, through the fast path when the crate is
/// built with `function-tables`, else through the shift-and-add kernel.
pub extern "C" fn qbound_nco_q14(phase: u32) -> i16 {
    let p = Uq::<U0, U32>::from_bits(phase);
    let s: Sq<U1, U14> = p.sin_turns(Rounding::NearestTiesEven, Overflow::Saturate);
    s.to_bits()
}

#[panic_handler]
fn panic(_: &PanicInfo) -> ! {
    loop {}
}
