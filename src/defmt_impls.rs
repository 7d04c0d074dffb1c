//! defmt support (feature `defmt`): values log as their format and exact
//! decimal value, `Q7.8(1.5)`, rendered on the target into a stack buffer
//! (no allocation). `Format` logs as its text form.

use core::fmt::Write;

use typenum::Unsigned;

use crate::layout::{SignedLayout, UnsignedLayout};
use crate::typed::{Sq, Uq};
use crate::{Format, QValue};

/// A fixed stack buffer that `core::fmt` writes into; long enough for any
/// value of any format up to 128 bits (sign, 39 integer digits, point, 128
/// fraction digits) and its format.
struct StackText {
    buf: [u8; 192],
    len: usize,
}

impl StackText {
    fn new() -> StackText {
        StackText {
            buf: [0; 192],
            len: 0,
        }
    }
    fn as_str(&self) -> &str {
        // Only whole `&str` pieces are ever copied in, so this is UTF-8.
        core::str::from_utf8(&self.buf[..self.len]).unwrap_or("?")
    }
}

impl Write for StackText {
    fn write_str(&mut self, s: &str) -> core::fmt::Result {
        let end = self.len + s.len();
        if end > self.buf.len() {
            return Err(core::fmt::Error);
        }
        self.buf[self.len..end].copy_from_slice(s.as_bytes());
        self.len = end;
        Ok(())
    }
}

fn log_value(f: defmt::Formatter<'_>, v: QValue) {
    let mut t = StackText::new();
    let _ = write!(t, "{v:?}");
    defmt::write!(f, "{=str}", t.as_str());
}

impl<I: SignedLayout<F>, F: Unsigned> defmt::Format for Sq<I, F> {
    fn format(&self, f: defmt::Formatter<'_>) {
        log_value(f, self.to_value());
    }
}

impl<I: UnsignedLayout<F>, F: Unsigned> defmt::Format for Uq<I, F> {
    fn format(&self, f: defmt::Formatter<'_>) {
        log_value(f, self.to_value());
    }
}

impl defmt::Format for QValue {
    fn format(&self, f: defmt::Formatter<'_>) {
        log_value(f, *self);
    }
}

impl defmt::Format for Format {
    fn format(&self, f: defmt::Formatter<'_>) {
        let mut t = StackText::new();
        let _ = write!(t, "{self}");
        defmt::write!(f, "{=str}", t.as_str());
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn stack_text_holds_the_longest_value() {
        // The longest text: a 128-bit format with every digit in use.
        let f = Format::signed(0, 127).unwrap();
        let mut t2 = StackText::new();
        let v = QValue::from_i128_bits(f, i128::MIN + 1).unwrap();
        write!(t2, "{v:?}").unwrap();
        assert!(t2.as_str().starts_with("Q0.127(-0.99999"));
        let g = Format::unsigned(128, 0).unwrap();
        let mut t3 = StackText::new();
        write!(t3, "{:?}", QValue::max(g)).unwrap();
        assert_eq!(
            t3.as_str(),
            "UQ128.0(340282366920938463463374607431768211455)"
        );
    }
}
