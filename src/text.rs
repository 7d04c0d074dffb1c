//! Text: exact decimal display, the stored bits in hexadecimal, octal and
//! binary, and correctly rounded parsing.
//!
//! # Display
//!
//! `{}` prints the exact value: every binary fraction has a finite decimal
//! expansion (`F` fraction bits need at most `F` decimal places), so
//! nothing is rounded and nothing goes through a float. `{:.N}` rounds to
//! `N` decimal places, ties to even, exactly. Width, fill, alignment, `+`
//! and `0` flags work as for the primitive numbers. A negative value that
//! rounds to zero keeps its sign (`-0.00`), as `f64` does.
//!
//! `{:x}`, `{:X}`, `{:o}` and `{:b}` print the stored bits (two's
//! complement, within the word length) with every digit of the word, so a
//! Q7.8 always shows four hex digits. The alternate form `{:#x}` adds the
//! radix prefix and marks the binary point: the integer field (sign and
//! integer bits) before the point, the fraction bits after it, padded on
//! the right to whole digits — the same reading as a hexadecimal literal
//! with a radix point.
//!
//! # Parsing
//!
//! Accepted: an optional sign, then
//! - decimal: digits with at most one `.` and an optional exponent
//!   `e`/`E` with optional sign (`-12.5e-3`, `.5`, `5.`);
//! - hexadecimal `0x`, octal `0o` or binary `0b` (either case): digits in
//!   that radix with at most one `.`, and an optional binary exponent
//!   `p`/`P` whose digits are decimal (`0x1.8p3` is 12).
//!
//! Any number of digits is accepted; the exact value is rounded once into
//! the format with the given [`Rounding`] mode (correct rounding), then the
//! [`Overflow`] mode or the checked form applies. A huge exponent is not an
//! error by itself: `1e-999999` rounds like any tiny value, `1e999999` is
//! out of range. [`FromStr`] uses [`Rounding::NearestTiesEven`] and reports
//! out-of-range values as errors.

use core::fmt::{self, Write};
use core::str::FromStr;

use typenum::Unsigned;

use crate::convert::{Scaled, sign_magnitude};
use crate::format::Format;
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::overflow::{Overflow, RangeError};
use crate::rounding::Rounding;
use crate::storage::{Storage, Wide};
use crate::typed::{QType, Sq, Uq};
use crate::value::QValue;

// ---------------------------------------------------------------------------
// Errors.
// ---------------------------------------------------------------------------

/// What is wrong with a number's text.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum ParseErrorKind {
    /// The text is empty.
    Empty,
    /// A digit was expected here (a lone sign, a lone point, a prefix with
    /// no digits after it).
    NoDigits,
    /// This character is not a digit of the radix, nor anything else that
    /// may stand here.
    InvalidDigit,
    /// A second radix point.
    SecondPoint,
    /// An exponent marker with no digits after it.
    NoExponentDigits,
    /// The radix given to `from_str_radix` is not 2, 8, 10 or 16.
    InvalidRadix,
    /// The rounded value lies outside the format.
    OutOfRange(RangeError),
}

/// A number's text could not be read: what is wrong, and at which byte.
///
/// ```
/// use qbound::{Q, ParseErrorKind};
/// let e = "1.2.3".parse::<Q<7, 8>>().unwrap_err();
/// assert_eq!(e.kind(), ParseErrorKind::SecondPoint);
/// assert_eq!(e.position(), 3);
/// assert_eq!(e.to_string(), "a second radix point at byte 3");
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct ParseError {
    kind: ParseErrorKind,
    position: usize,
}

impl ParseError {
    pub(crate) const fn new(kind: ParseErrorKind, position: usize) -> ParseError {
        ParseError { kind, position }
    }

    /// What is wrong.
    ///
    /// ```
    /// use qbound::{Q, ParseErrorKind};
    /// assert_eq!("".parse::<Q<7, 8>>().unwrap_err().kind(), ParseErrorKind::Empty);
    /// ```
    #[must_use]
    pub const fn kind(&self) -> ParseErrorKind {
        self.kind
    }

    /// The byte offset in the text where the problem was found (0 for an
    /// empty text and for a value out of range).
    ///
    /// ```
    /// use qbound::Q;
    /// assert_eq!("12x".parse::<Q<7, 8>>().unwrap_err().position(), 2);
    /// ```
    #[must_use]
    pub const fn position(&self) -> usize {
        self.position
    }

    /// A short description of the kind, for messages (also used in const
    /// evaluation, where formatting is not available).
    pub(crate) const fn describe(&self) -> &'static str {
        match self.kind {
            ParseErrorKind::Empty => "empty text",
            ParseErrorKind::NoDigits => "a digit was expected",
            ParseErrorKind::InvalidDigit => "an invalid character",
            ParseErrorKind::SecondPoint => "a second radix point",
            ParseErrorKind::NoExponentDigits => "an exponent without digits",
            ParseErrorKind::InvalidRadix => "a radix other than 2, 8, 10 or 16",
            ParseErrorKind::OutOfRange(_) => "a value out of range",
        }
    }
}

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.kind {
            ParseErrorKind::Empty => f.write_str("empty text is not a number"),
            ParseErrorKind::InvalidRadix => f.write_str("the radix must be 2, 8, 10 or 16"),
            ParseErrorKind::OutOfRange(e) => fmt::Display::fmt(&e, f),
            _ => write!(f, "{} at byte {}", self.describe(), self.position),
        }
    }
}

impl core::error::Error for ParseError {}

// ---------------------------------------------------------------------------
// The parser: const fn, shared by run time and the const constructors.
// ---------------------------------------------------------------------------

/// The located parts of a number's text.
#[derive(Clone, Copy)]
struct Scan {
    neg: bool,
    radix: u32,
    /// Byte range of the mantissa (digits and the point).
    start: usize,
    end: usize,
    /// Digits before the point.
    int_digits: i64,
    /// The exponent (saturated), in powers of ten for decimal and of two
    /// otherwise.
    exp: i64,
}

const fn digit_value(c: u8, radix: u32) -> Option<u32> {
    let v = match c {
        b'0'..=b'9' => (c - b'0') as u32,
        b'a'..=b'z' => (c - b'a') as u32 + 10,
        b'A'..=b'Z' => (c - b'A') as u32 + 10,
        _ => return None,
    };
    if v < radix { Some(v) } else { None }
}

const EXP_LIMIT: i64 = 1 << 58;

const fn scan(s: &[u8], radix: Option<u32>) -> Result<Scan, ParseError> {
    if s.is_empty() {
        return Err(ParseError::new(ParseErrorKind::Empty, 0));
    }
    let mut i = 0;
    let neg = s[0] == b'-';
    if s[0] == b'-' || s[0] == b'+' {
        i = 1;
    }
    let radix = match radix {
        Some(r) => {
            if !matches!(r, 2 | 8 | 10 | 16) {
                return Err(ParseError::new(ParseErrorKind::InvalidRadix, 0));
            }
            r
        }
        None => {
            if i + 1 < s.len() && s[i] == b'0' {
                match s[i + 1] {
                    b'x' | b'X' => {
                        i += 2;
                        16
                    }
                    b'o' | b'O' => {
                        i += 2;
                        8
                    }
                    b'b' | b'B' => {
                        i += 2;
                        2
                    }
                    _ => 10,
                }
            } else {
                10
            }
        }
    };
    let start = i;
    let mut digits = 0i64;
    let mut int_digits = -1i64;
    while i < s.len() {
        let c = s[i];
        if c == b'.' {
            if int_digits >= 0 {
                return Err(ParseError::new(ParseErrorKind::SecondPoint, i));
            }
            int_digits = digits;
        } else if digit_value(c, radix).is_some() {
            digits += 1;
        } else {
            break;
        }
        i += 1;
    }
    let end = i;
    if int_digits < 0 {
        int_digits = digits;
    }
    if digits == 0 {
        return Err(ParseError::new(
            ParseErrorKind::NoDigits,
            if i < s.len() { i } else { s.len() },
        ));
    }
    let mut exp = 0i64;
    if i < s.len() {
        let c = s[i];
        let is_exp = if radix == 10 {
            c == b'e' || c == b'E'
        } else {
            c == b'p' || c == b'P'
        };
        if !is_exp {
            return Err(ParseError::new(ParseErrorKind::InvalidDigit, i));
        }
        i += 1;
        let mut eneg = false;
        if i < s.len() && (s[i] == b'-' || s[i] == b'+') {
            eneg = s[i] == b'-';
            i += 1;
        }
        let estart = i;
        while i < s.len() {
            match digit_value(s[i], 10) {
                Some(d) => {
                    if exp < EXP_LIMIT {
                        exp = exp * 10 + d as i64;
                    }
                }
                None => return Err(ParseError::new(ParseErrorKind::InvalidDigit, i)),
            }
            i += 1;
        }
        if i == estart {
            return Err(ParseError::new(ParseErrorKind::NoExponentDigits, i));
        }
        if eneg {
            exp = -exp;
        }
    }
    Ok(Scan {
        neg,
        radix,
        start,
        end,
        int_digits,
        exp,
    })
}

/// Set the bit of weight `2^p` (in steps of the target) in `s`.
pub(crate) const fn push_bit(s: &mut Scaled, p: i64) {
    if p >= 128 {
        s.over = true;
    } else if p >= 0 {
        s.mag |= 1u128 << p;
    } else if p >= -64 {
        s.frac64 |= 1u64 << (64 + p);
    } else {
        s.sticky = true;
    }
}

/// Radix 2, 8 or 16: every digit is a group of bits, placed exactly.
const fn scaled_power_of_two(s: &[u8], sc: Scan, frac: u32) -> Scaled {
    let bits_per_digit: i64 = match sc.radix {
        2 => 1,
        8 => 3,
        _ => 4,
    };
    let mut out = Scaled::ZERO;
    out.neg = sc.neg;
    let base = sc.exp.saturating_add(frac as i64);
    let mut t = sc.int_digits - 1; // position of the current digit
    let mut i = sc.start;
    while i < sc.end {
        let c = s[i];
        i += 1;
        if c == b'.' {
            continue;
        }
        let d = match digit_value(c, sc.radix) {
            Some(d) => d,
            None => 0,
        };
        let mut b = 0;
        while b < bits_per_digit {
            if (d >> b) & 1 == 1 {
                push_bit(&mut out, base.saturating_add(t * bits_per_digit + b));
            }
            b += 1;
        }
        t -= 1;
    }
    out
}

/// Decimal digits kept for the fraction: enough that the digits dropped
/// after them cannot move the value across any multiple of `2^-(F + 64)`
/// (such a multiple has at most `F + 64 <= 192` decimal places).
const FRAC_DIGITS: usize = 200;

/// Radix 10: the integer part modulo 2^128 with an overflow flag, and the
/// fraction by repeated doubling of its first 200 decimal digits.
const fn scaled_decimal(s: &[u8], sc: Scan, frac: u32) -> Scaled {
    let mut out = Scaled::ZERO;
    out.neg = sc.neg;
    // Position of the decimal point counted in digits from the first digit.
    let point = sc.int_digits.saturating_add(sc.exp);
    let mut int: u128 = 0;
    let mut int_over = false;
    let mut buf = [0u8; FRAC_DIGITS];
    let mut used = 0usize; // fraction digits in buf
    let mut sticky = false;
    // Leading zeros of the fraction when the point lies before the digits.
    if point < 0 {
        used = if -point >= FRAC_DIGITS as i64 {
            FRAC_DIGITS
        } else {
            (-point) as usize
        };
    }
    let mut pos = 0i64; // index of the current digit
    let mut i = sc.start;
    while i < sc.end {
        let c = s[i];
        i += 1;
        if c == b'.' {
            continue;
        }
        let d = (c - b'0') as u128;
        if pos < point {
            // Integer digit.
            match int.checked_mul(10) {
                Some(v) => match v.checked_add(d) {
                    Some(w) => int = w,
                    None => {
                        int = v.wrapping_add(d);
                        int_over = true;
                    }
                },
                None => {
                    int = int.wrapping_mul(10).wrapping_add(d);
                    int_over = true;
                }
            }
        } else if used < FRAC_DIGITS {
            buf[used] = d as u8;
            used += 1;
        } else if d != 0 {
            sticky = true;
        }
        pos += 1;
    }
    // Zeros between the last digit and the point.
    if point > pos {
        let mut k = point - pos;
        if k > 130 {
            k = 130;
        }
        while k > 0 {
            match int.checked_mul(10) {
                Some(v) => int = v,
                None => {
                    int = int.wrapping_mul(10);
                    int_over = true;
                }
            }
            k -= 1;
        }
    }
    // Trim trailing zeros of the fraction.
    while used > 0 && buf[used - 1] == 0 {
        used -= 1;
    }
    // Fraction bits by doubling: each carry out of the top digit is the
    // next bit.
    let total = frac + 64;
    let mut frac_bits: u128 = 0;
    let mut frac64: u64 = 0;
    let mut n = 0;
    while n < total && used > 0 {
        let mut carry = 0u8;
        let mut j = used;
        while j > 0 {
            j -= 1;
            let v = buf[j] * 2 + carry;
            if v >= 10 {
                buf[j] = v - 10;
                carry = 1;
            } else {
                buf[j] = v;
                carry = 0;
            }
        }
        if n < frac {
            frac_bits = (frac_bits << 1) | carry as u128;
        } else {
            frac64 = (frac64 << 1) | carry as u64;
        }
        while used > 0 && buf[used - 1] == 0 {
            used -= 1;
        }
        n += 1;
    }
    // Bits not produced because the fraction ran out are zeros.
    while n < total {
        if n < frac {
            frac_bits <<= 1;
        } else {
            frac64 <<= 1;
        }
        n += 1;
    }
    out.sticky = sticky || used > 0;
    out.frac64 = frac64;
    if frac == 0 {
        out.mag = int;
        out.over = int_over;
    } else if frac >= 128 {
        out.mag = frac_bits;
        out.over = int_over || int != 0;
    } else {
        out.mag = (int << frac) | frac_bits;
        out.over = int_over || (int >> (128 - frac)) != 0;
    }
    out
}

/// The exact value of a number's text scaled to `frac` fraction bits.
pub(crate) const fn parse_scaled(
    s: &[u8],
    radix: Option<u32>,
    frac: u32,
) -> Result<Scaled, ParseError> {
    let sc = match scan(s, radix) {
        Ok(sc) => sc,
        Err(e) => return Err(e),
    };
    Ok(if sc.radix == 10 {
        scaled_decimal(s, sc, frac)
    } else {
        scaled_power_of_two(s, sc, frac)
    })
}

// ---------------------------------------------------------------------------
// Display.
// ---------------------------------------------------------------------------

/// The next decimal digit of the fraction `r / 2^frac`, and what remains.
fn next_digit(r: u128, frac: u32) -> (u8, u128) {
    // r * 10 as a 132-bit number (hi, lo).
    let a = (r >> 64) * 10;
    let b = (r & u64::MAX as u128) * 10;
    let mid = a + (b >> 64);
    let hi = mid >> 64;
    let lo = (mid << 64) | (b & u64::MAX as u128);
    if frac >= 128 {
        (hi as u8, lo)
    } else {
        let digit = (hi << (128 - frac)) | (lo >> frac);
        (digit as u8, lo & ((1u128 << frac) - 1))
    }
}

/// Write `sign`, `body` and `zeros` trailing zeros with the formatter's
/// width, fill, alignment and zero-padding.
fn pad_number(f: &mut fmt::Formatter<'_>, neg: bool, body: &str, zeros: usize) -> fmt::Result {
    let sign = if neg {
        "-"
    } else if f.sign_plus() {
        "+"
    } else {
        ""
    };
    let len = sign.len() + body.len() + zeros;
    let write_zeros = |f: &mut fmt::Formatter<'_>, n: usize| -> fmt::Result {
        for _ in 0..n {
            f.write_char('0')?;
        }
        Ok(())
    };
    let pad = f.width().map_or(0, |w| w.saturating_sub(len));
    if pad == 0 {
        f.write_str(sign)?;
        f.write_str(body)?;
        return write_zeros(f, zeros);
    }
    if f.sign_aware_zero_pad() {
        f.write_str(sign)?;
        write_zeros(f, pad)?;
        f.write_str(body)?;
        return write_zeros(f, zeros);
    }
    let (before, after) = match f.align() {
        Some(fmt::Alignment::Left) => (0, pad),
        Some(fmt::Alignment::Center) => (pad / 2, pad - pad / 2),
        _ => (pad, 0),
    };
    let fill = f.fill();
    for _ in 0..before {
        f.write_char(fill)?;
    }
    f.write_str(sign)?;
    f.write_str(body)?;
    write_zeros(f, zeros)?;
    for _ in 0..after {
        f.write_char(fill)?;
    }
    Ok(())
}

/// `{}` and `{:.N}` of the value `bits * 2^-frac`.
pub(crate) fn fmt_decimal(bits: Wide, frac: u32, f: &mut fmt::Formatter<'_>) -> fmt::Result {
    let (neg, mag) = sign_magnitude(bits);
    let (int, mut r) = if frac == 0 {
        (mag, 0)
    } else if frac >= 128 {
        (0, mag)
    } else {
        (mag >> frac, mag & ((1u128 << frac) - 1))
    };
    // buf[0] is spare room for a carry into a new leading digit.
    let mut buf = [0u8; 1 + 39 + 1 + 128];
    let mut len = 1;
    // Integer digits.
    let mut tmp = [0u8; 39];
    let mut n = 0;
    let mut v = int;
    loop {
        tmp[n] = b'0' + (v % 10) as u8;
        n += 1;
        v /= 10;
        if v == 0 {
            break;
        }
    }
    while n > 0 {
        n -= 1;
        buf[len] = tmp[n];
        len += 1;
    }
    let mut zeros = 0;
    match f.precision() {
        None => {
            if r != 0 {
                buf[len] = b'.';
                len += 1;
                while r != 0 {
                    let (d, rest) = next_digit(r, frac);
                    buf[len] = b'0' + d;
                    len += 1;
                    r = rest;
                }
            }
        }
        Some(places) => {
            if places > 0 {
                buf[len] = b'.';
                len += 1;
            }
            let mut emitted = 0;
            while emitted < places && r != 0 {
                let (d, rest) = next_digit(r, frac);
                buf[len] = b'0' + d;
                len += 1;
                r = rest;
                emitted += 1;
            }
            zeros = places - emitted;
            // Round the dropped part r / 2^frac of a unit in the last place.
            if r != 0 {
                let half = 1u128 << (frac - 1);
                // The last character is a digit: with places > 0 and a
                // nonzero remainder, all `places` digits were written.
                let up = r > half || (r == half && (buf[len - 1] - b'0') % 2 == 1);
                if up {
                    let mut j = len;
                    loop {
                        j -= 1;
                        if buf[j] == b'.' {
                            continue;
                        }
                        if buf[j] == b'9' {
                            buf[j] = b'0';
                            if j == 1 {
                                buf[0] = b'1';
                                break;
                            }
                        } else {
                            buf[j] += 1;
                            break;
                        }
                    }
                }
            }
        }
    }
    let start = if buf[0] == b'1' { 0 } else { 1 };
    let body = core::str::from_utf8(&buf[start..len]).map_err(|_| fmt::Error)?;
    pad_number(f, neg, body, zeros)
}

/// The `n` bits of `low` starting at bit `lo_bit` (bits below 0 are zero).
fn bits_at(low: u128, lo_bit: i32, n: u32) -> u32 {
    let mask = (1u32 << n) - 1;
    if lo_bit >= 128 {
        0
    } else if lo_bit >= 0 {
        ((low >> lo_bit) as u32) & mask
    } else {
        let s = (-lo_bit) as u32;
        if s >= n {
            0
        } else {
            ((low << s) as u32) & mask
        }
    }
}

/// `{:x}`, `{:X}`, `{:o}`, `{:b}` of the stored bits of format `fmt`.
pub(crate) fn fmt_bits(
    bits: Wide,
    format: Format,
    f: &mut fmt::Formatter<'_>,
    shift: u32,
    upper: bool,
    prefix: &str,
) -> fmt::Result {
    let width = format.width();
    let low = if width == 128 {
        bits.low_bits()
    } else {
        bits.low_bits() & ((1u128 << width) - 1)
    };
    let digit = |d: u32| -> u8 {
        match d {
            0..=9 => b'0' + d as u8,
            _ if upper => b'A' + (d - 10) as u8,
            _ => b'a' + (d - 10) as u8,
        }
    };
    let mut buf = [0u8; 132];
    let mut len = 0;
    let frac = format.frac_bits();
    if f.alternate() && frac > 0 {
        // Integer field: bits frac..width; fraction field: bits 0..frac,
        // padded on the right to whole digits.
        let int_width = width - frac;
        let int_digits = int_width.div_ceil(shift).max(1);
        for k in (0..int_digits).rev() {
            buf[len] = digit(bits_at(low, (frac + k * shift) as i32, shift));
            len += 1;
        }
        buf[len] = b'.';
        len += 1;
        let frac_digits = frac.div_ceil(shift);
        for k in 0..frac_digits {
            buf[len] = digit(bits_at(low, frac as i32 - ((k + 1) * shift) as i32, shift));
            len += 1;
        }
    } else {
        let digits = width.div_ceil(shift);
        for k in (0..digits).rev() {
            buf[len] = digit(bits_at(low, (k * shift) as i32, shift));
            len += 1;
        }
    }
    let body = core::str::from_utf8(&buf[..len]).map_err(|_| fmt::Error)?;
    f.pad_integral(true, prefix, body)
}

// ---------------------------------------------------------------------------
// The typed and run-time API.
// ---------------------------------------------------------------------------

macro_rules! text_common {
    ($name:ident, $layout:ident, $ex:literal) => {
        impl<I: $layout<F>, F: Unsigned> fmt::Display for $name<I, F> {
            /// The exact decimal value; `{:.N}` rounds to `N` places, ties to
            /// even.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("let x = ", $ex, "::<7, 8>::from_bits(0x0150); // 1.3125")]
            /// assert_eq!(x.to_string(), "1.3125");
            /// assert_eq!(format!("{x:.2}"), "1.31");
            /// assert_eq!(format!("{x:>8.1}"), "     1.3");
            /// ```
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                fmt_decimal(self.to_bits().to_wide(), F::U32, f)
            }
        }

        impl<I: $layout<F>, F: Unsigned> fmt::Debug for $name<I, F> {
            /// The value and the format, e.g. `Q7.8(1.5)`.
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                write!(f, "{}(", Self::FORMAT)?;
                fmt::Display::fmt(self, f)?;
                f.write_str(")")
            }
        }

        impl<I: $layout<F>, F: Unsigned> fmt::LowerHex for $name<I, F> {
            /// The stored bits; `{:#x}` marks the binary point.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("let x = ", $ex, "::<7, 8>::from_bits(0x0180); // 1.5")]
            /// assert_eq!(format!("{x:x}"), "0180");
            /// assert_eq!(format!("{x:#x}"), "0x01.80");
            /// ```
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                fmt_bits(self.to_bits().to_wide(), Self::FORMAT, f, 4, false, "0x")
            }
        }

        impl<I: $layout<F>, F: Unsigned> fmt::UpperHex for $name<I, F> {
            /// The stored bits in upper-case hexadecimal.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("assert_eq!(format!(\"{:X}\", ", $ex, "::<3, 4>::from_bits(0x2b)), \"2B\");")]
            /// ```
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                fmt_bits(self.to_bits().to_wide(), Self::FORMAT, f, 4, true, "0x")
            }
        }

        impl<I: $layout<F>, F: Unsigned> fmt::Octal for $name<I, F> {
            /// The stored bits in octal.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("assert_eq!(format!(\"{:o}\", ", $ex, "::<3, 2>::from_bits(9)), \"11\");")]
            /// ```
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                fmt_bits(self.to_bits().to_wide(), Self::FORMAT, f, 3, false, "0o")
            }
        }

        impl<I: $layout<F>, F: Unsigned> fmt::Binary for $name<I, F> {
            /// The stored bits in binary; `{:#b}` marks the binary point.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("let x = ", $ex, "::<3, 2>::from_bits(6); // 1.5")]
            #[doc = concat!("assert_eq!(format!(\"{x:#b}\"), if ", $ex, "::<3, 2>::FORMAT.is_signed() { \"0b0001.10\" } else { \"0b001.10\" });")]
            /// ```
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                fmt_bits(self.to_bits().to_wide(), Self::FORMAT, f, 1, false, "0b")
            }
        }

        impl<I: $layout<F>, F: Unsigned> FromStr for $name<I, F> {
            type Err = ParseError;
            /// Parse with [`Rounding::NearestTiesEven`]; a value outside the
            /// range is an error.
            ///
            /// ```
            #[doc = concat!("use qbound::", $ex, ";")]
            #[doc = concat!("let x: ", $ex, "<7, 8> = \"1.3e1\".parse()?;")]
            /// assert_eq!(x.to_bits(), 13 * 256);
            #[doc = concat!("assert!(\"1000\".parse::<", $ex, "<7, 8>>().is_err());")]
            /// # Ok::<(), qbound::ParseError>(())
            /// ```
            fn from_str(s: &str) -> Result<Self, ParseError> {
                Self::try_parse(s, Rounding::NearestTiesEven)
            }
        }

        impl<I: $layout<F>, F: Unsigned> $name<I, F> {
            /// Parse a decimal, hexadecimal (`0x`), octal (`0o`) or binary
            /// (`0b`) number of any length, rounded once into this format
            /// with `rounding`, with `overflow` for values outside the
            /// range. See the [module docs](crate#text) for the syntax.
            ///
            /// # Panics
            /// With [`Overflow::Panic`], if the rounded value does not fit.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, Overflow, QType};")]
            #[doc = concat!("type T = ", $ex, "<3, 4>;")]
            /// assert_eq!(T::parse("1.03125", Rounding::NearestTiesEven, Overflow::Panic)?.to_bits(), 16);
            /// assert_eq!(T::parse("0x1.8p1", Rounding::Floor, Overflow::Panic)?.to_bits(), 48);
            /// assert_eq!(T::parse("99", Rounding::Floor, Overflow::Saturate)?, T::MAX);
            /// # Ok::<(), qbound::ParseError>(())
            /// ```
            #[track_caller]
            pub fn parse(s: &str, rounding: Rounding, overflow: Overflow) -> Result<Self, ParseError> {
                <Self as QType>::parse(s, rounding, overflow)
            }

            /// Parse like [`Self::parse`]; a value outside the range is an
            /// error.
            ///
            /// ```
            #[doc = concat!("use qbound::{", $ex, ", Rounding, ParseErrorKind};")]
            #[doc = concat!("let e = ", $ex, "::<3, 4>::try_parse(\"16\", Rounding::Floor).unwrap_err();")]
            /// assert!(matches!(e.kind(), ParseErrorKind::OutOfRange(_)));
            /// ```
            pub fn try_parse(s: &str, rounding: Rounding) -> Result<Self, ParseError> {
                <Self as QType>::try_parse(s, rounding)
            }
        }
    };
}

/// Text in `radix` (or with a prefix), rounded into `f` before the
/// overflow mode.
pub(crate) fn parse_fit<D: Storage>(
    s: &str,
    radix: Option<u32>,
    f: Format,
    rounding: Rounding,
) -> Result<crate::kernel::Fitted<D>, ParseError> {
    let sc = parse_scaled(s.as_bytes(), radix, f.frac_bits())?;
    Ok(crate::convert::fitted(sc, rounding, f))
}

/// Text rounded into the format of `T`; a value outside it is an error.
pub(crate) fn parse_checked<T: QType>(
    s: &str,
    radix: Option<u32>,
    rounding: Rounding,
) -> Result<T, ParseError> {
    parse_fit::<T::Storage>(s, radix, T::FORMAT, rounding)?
        .checked(T::FORMAT)
        .map(T::from_bits_in_range)
        .map_err(|e| ParseError::new(ParseErrorKind::OutOfRange(e), 0))
}

text_common!(Sq, SignedLayout, "Q");
text_common!(Uq, UnsignedLayout, "UQ");

impl fmt::Display for QValue {
    /// The exact decimal value; `{:.N}` rounds to `N` places, ties to even.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let v = QValue::from_i128_bits(Format::signed(0, 15)?, -1)?;
    /// assert_eq!(v.to_string(), "-0.000030517578125");
    /// assert_eq!(format!("{v:.3}"), "-0.000");
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt_decimal(self.bits(), self.format().frac_bits(), f)
    }
}

impl fmt::Debug for QValue {
    /// The value and the format, e.g. `Q7.8(1.5)`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}(", self.format())?;
        fmt::Display::fmt(self, f)?;
        f.write_str(")")
    }
}

impl fmt::LowerHex for QValue {
    /// The stored bits; `{:#x}` marks the binary point.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let v = QValue::from_i128_bits(Format::signed(7, 8)?, -256)?; // -1
    /// assert_eq!(format!("{v:x}"), "ff00");
    /// assert_eq!(format!("{v:#x}"), "0xff.00");
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt_bits(self.bits(), self.format(), f, 4, false, "0x")
    }
}

impl fmt::UpperHex for QValue {
    /// The stored bits in upper-case hexadecimal.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let v = QValue::max(Format::unsigned(4, 4)?);
    /// assert_eq!(format!("{v:X}"), "FF");
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt_bits(self.bits(), self.format(), f, 4, true, "0x")
    }
}

impl fmt::Octal for QValue {
    /// The stored bits in octal.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// assert_eq!(format!("{:o}", QValue::max(Format::unsigned(6, 0)?)), "77");
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt_bits(self.bits(), self.format(), f, 3, false, "0o")
    }
}

impl fmt::Binary for QValue {
    /// The stored bits in binary; `{:#b}` marks the binary point.
    ///
    /// ```
    /// use qbound::{Format, QValue};
    /// let v = QValue::min(Format::signed(1, 2)?); // -2
    /// assert_eq!(format!("{v:#b}"), "0b10.00");
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        fmt_bits(self.bits(), self.format(), f, 1, false, "0b")
    }
}

impl QValue {
    /// Parse a number's text into `format`, rounded once with `rounding`,
    /// with `overflow` for values outside the range (syntax in the
    /// [crate docs](crate#text)).
    ///
    /// # Panics
    /// With [`Overflow::Panic`], if the rounded value does not fit.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding, Overflow};
    /// let f = Format::signed(0, 15)?;
    /// let v = QValue::parse(f, "-0.7071067811865476", Rounding::NearestTiesEven, Overflow::Panic)?;
    /// assert_eq!(v.to_i128_bits(), Some(-23170));
    /// # Ok::<(), Box<dyn core::error::Error>>(())
    /// ```
    #[track_caller]
    pub fn parse(
        format: Format,
        s: &str,
        rounding: Rounding,
        overflow: Overflow,
    ) -> Result<QValue, ParseError> {
        let sc = parse_scaled(s.as_bytes(), None, format.frac_bits())?;
        Ok(QValue::from_scaled(sc, format, rounding, overflow))
    }

    /// Parse into `format`; a value outside the range is an error.
    ///
    /// ```
    /// use qbound::{Format, QValue, Rounding};
    /// let f = Format::unsigned(8, 0)?;
    /// assert!(QValue::try_parse(f, "256", Rounding::Floor).is_err());
    /// assert!(QValue::try_parse(f, "255.5", Rounding::Floor).is_ok());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub fn try_parse(format: Format, s: &str, rounding: Rounding) -> Result<QValue, ParseError> {
        let sc = parse_scaled(s.as_bytes(), None, format.frac_bits())?;
        QValue::try_from_scaled(sc, format, rounding)
            .map_err(|e| ParseError::new(ParseErrorKind::OutOfRange(e), 0))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn digits_of_a_fraction() {
        assert_eq!(next_digit(1 << 127, 128), (5, 0));
        assert_eq!(next_digit(1, 1), (5, 0));
        assert_eq!(next_digit(u128::MAX, 128).0, 9);
    }
}
