//! The run-time [`Format`] and the format algebra: the single definition of
//! what format the exact result of `+`, `-`, `*` and unary `-` has.
//!
//! The typed operators compute their result types with `typenum`; every
//! operator impl checks at compile time that its type-level result equals
//! the format this module computes, so the two can never drift apart.

use core::fmt;
use core::str::FromStr;

use crate::storage::Wide;

/// The widest word length any format may have.
pub const MAX_WIDTH: u32 = 128;

/// A binary-point format: signedness, integer bits and fraction bits.
///
/// Signed `Q(I, F)` has one sign bit, `I` integer bits and `F` fraction bits
/// (word length `1 + I + F`, range `[-2^I, 2^I - 2^-F]`); unsigned `UQ(I, F)`
/// has word length `I + F` and range `[0, 2^I - 2^-F]`. The word length is
/// 1 to 128 bits. The text form is `Q7.8` or `UQ8.8` (case-insensitive when
/// parsed).
///
/// ```
/// use qbound::Format;
/// let f: Format = "Q7.8".parse()?;
/// assert_eq!(f.width(), 16);
/// assert_eq!(f.to_string(), "Q7.8");
/// assert_eq!(f, Format::signed(7, 8)?);
/// # Ok::<(), qbound::FormatError>(())
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
pub struct Format {
    signed: bool,
    int_bits: u32,
    frac_bits: u32,
}

/// Why a format is not valid, or why text does not name one.
///
/// ```
/// use qbound::{Format, FormatError};
/// assert_eq!(Format::signed(100, 100), Err(FormatError::TooWide { width: 201 }));
/// assert_eq!("Q7".parse::<Format>(), Err(FormatError::Syntax));
/// ```
#[derive(Clone, Copy, PartialEq, Eq, Hash, Debug)]
#[non_exhaustive]
pub enum FormatError {
    /// The word length would pass 128 bits.
    TooWide {
        /// The word length the format would need.
        width: u64,
    },
    /// An unsigned format with no bits at all (`UQ0.0`).
    Empty,
    /// The text is not of the form `Q<int>.<frac>` or `UQ<int>.<frac>`.
    Syntax,
}

impl fmt::Display for FormatError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FormatError::TooWide { width } => write!(
                f,
                "the format needs {width} bits; the widest supported word length is {MAX_WIDTH}"
            ),
            FormatError::Empty => f.write_str("an unsigned format needs at least one bit (UQ0.0 is empty)"),
            FormatError::Syntax => f.write_str(
                "expected a format such as Q7.8 (signed: sign + 7 integer + 8 fraction bits) or UQ8.8 (unsigned)",
            ),
        }
    }
}

impl core::error::Error for FormatError {}

impl Format {
    /// A format, or an error if its word length is 0 or above 128.
    ///
    /// ```
    /// use qbound::Format;
    /// assert!(Format::new(false, 0, 0).is_err());
    /// assert_eq!(Format::new(true, 0, 0)?.width(), 1);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn new(signed: bool, int_bits: u32, frac_bits: u32) -> Result<Format, FormatError> {
        let width = signed as u64 + int_bits as u64 + frac_bits as u64;
        if width == 0 {
            Err(FormatError::Empty)
        } else if width > MAX_WIDTH as u64 {
            Err(FormatError::TooWide { width })
        } else {
            Ok(Format {
                signed,
                int_bits,
                frac_bits,
            })
        }
    }

    /// The signed format `Q(int_bits, frac_bits)`.
    ///
    /// ```
    /// use qbound::Format;
    /// assert_eq!(Format::signed(0, 15)?.width(), 16);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn signed(int_bits: u32, frac_bits: u32) -> Result<Format, FormatError> {
        Format::new(true, int_bits, frac_bits)
    }

    /// The unsigned format `UQ(int_bits, frac_bits)`.
    ///
    /// ```
    /// use qbound::Format;
    /// assert_eq!(Format::unsigned(8, 8)?.width(), 16);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn unsigned(int_bits: u32, frac_bits: u32) -> Result<Format, FormatError> {
        Format::new(false, int_bits, frac_bits)
    }

    /// Like [`Format::new`] but panics on an invalid format; meant for
    /// `const` items, where the panic is a compile error.
    ///
    /// ```
    /// use qbound::Format;
    /// const ACC: Format = Format::new_const(true, 9, 30);
    /// assert_eq!(ACC.width(), 40);
    /// ```
    pub const fn new_const(signed: bool, int_bits: u32, frac_bits: u32) -> Format {
        match Format::new(signed, int_bits, frac_bits) {
            Ok(f) => f,
            Err(FormatError::TooWide { .. }) => panic!("format wider than 128 bits"),
            Err(_) => panic!("unsigned format with no bits"),
        }
    }

    /// Whether the format has a sign bit.
    ///
    /// ```
    /// assert!(qbound::Format::signed(1, 1).unwrap().is_signed());
    /// ```
    #[must_use]
    pub const fn is_signed(self) -> bool {
        self.signed
    }

    /// Integer bits (not counting the sign bit).
    ///
    /// ```
    /// assert_eq!(qbound::Format::signed(7, 8).unwrap().int_bits(), 7);
    /// ```
    #[must_use]
    pub const fn int_bits(self) -> u32 {
        self.int_bits
    }

    /// Fraction bits: the value is the stored integer times `2^-frac_bits`.
    ///
    /// ```
    /// assert_eq!(qbound::Format::signed(7, 8).unwrap().frac_bits(), 8);
    /// ```
    #[must_use]
    pub const fn frac_bits(self) -> u32 {
        self.frac_bits
    }

    /// Word length in bits, sign bit included.
    ///
    /// ```
    /// assert_eq!(qbound::Format::signed(9, 30).unwrap().width(), 40);
    /// ```
    #[must_use]
    pub const fn width(self) -> u32 {
        self.signed as u32 + self.int_bits + self.frac_bits
    }

    /// Bits of the native integer that stores the format (8, 16, 32, 64 or
    /// 128): the smallest that holds the word length.
    ///
    /// ```
    /// assert_eq!(qbound::Format::signed(9, 30).unwrap().storage_bits(), 64);
    /// ```
    #[must_use]
    pub const fn storage_bits(self) -> u32 {
        storage_bits_for(self.width())
    }

    /// The smallest stored integer (`-2^(W-1)` signed, `0` unsigned).
    ///
    /// ```
    /// use qbound::{Format, Wide};
    /// assert_eq!(Format::signed(7, 8)?.min_bits(), Wide::from_i128(-32768));
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn min_bits(self) -> Wide {
        if self.signed {
            match Wide::neg_pow2(self.width() - 1) {
                Some(w) => w,
                None => Wide::ZERO,
            }
        } else {
            Wide::ZERO
        }
    }

    /// The largest stored integer (`2^(W-1) - 1` signed, `2^W - 1`
    /// unsigned).
    ///
    /// ```
    /// use qbound::{Format, Wide};
    /// assert_eq!(Format::unsigned(128, 0)?.max_bits(), Wide::from_u128(u128::MAX));
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    #[must_use]
    pub const fn max_bits(self) -> Wide {
        let w = self.width() - self.signed as u32;
        if w == 128 {
            Wide::from_u128(u128::MAX)
        } else {
            Wide::from_u128((1u128 << w) - 1)
        }
    }

    /// Whether every value of `other` is a value of `self` (so a conversion
    /// from `other` to `self` is exact).
    ///
    /// ```
    /// use qbound::Format;
    /// let q = |i, f| Format::signed(i, f).unwrap();
    /// assert!(q(9, 30).holds(q(3, 30)));
    /// assert!(!q(3, 30).holds(q(3, 31)));
    /// assert!(q(8, 0).holds(Format::unsigned(8, 0).unwrap()));
    /// ```
    #[must_use]
    pub const fn holds(self, other: Format) -> bool {
        if self.frac_bits < other.frac_bits {
            return false;
        }
        if other.signed && !self.signed {
            return false;
        }
        self.int_bits >= other.int_bits
    }

    /// Format of the exact sum `a + b`.
    ///
    /// | operands | result |
    /// |---|---|
    /// | Q + Q, Q + UQ, UQ + Q | Q(max I + 1, max F) |
    /// | UQ + UQ | UQ(max I + 1, max F) |
    ///
    /// ```
    /// use qbound::Format;
    /// let a = Format::signed(7, 8)?;
    /// let b = Format::signed(3, 12)?;
    /// assert_eq!(Format::sum(a, b)?, Format::signed(8, 12)?);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn sum(a: Format, b: Format) -> Result<Format, FormatError> {
        let i = max(a.int_bits, b.int_bits) as u64 + 1;
        let f = max(a.frac_bits, b.frac_bits);
        make(a.signed || b.signed, i, f as u64)
    }

    /// Format of the exact difference `a - b`.
    ///
    /// | operands | result |
    /// |---|---|
    /// | Q - Q, Q - UQ, UQ - Q | Q(max I + 1, max F) |
    /// | UQ - UQ | Q(max I, max F) |
    ///
    /// ```
    /// use qbound::Format;
    /// let u = Format::unsigned(8, 0)?;
    /// assert_eq!(Format::difference(u, u)?, Format::signed(8, 0)?);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn difference(a: Format, b: Format) -> Result<Format, FormatError> {
        let f = max(a.frac_bits, b.frac_bits) as u64;
        if !a.signed && !b.signed {
            make(true, max(a.int_bits, b.int_bits) as u64, f)
        } else {
            make(true, max(a.int_bits, b.int_bits) as u64 + 1, f)
        }
    }

    /// Format of the exact product `a * b`.
    ///
    /// | operands | result |
    /// |---|---|
    /// | Q × Q | Q(I1 + I2 + 1, F1 + F2) |
    /// | UQ × UQ | UQ(I1 + I2, F1 + F2) |
    /// | Q × UQ, UQ × Q | Q(I1 + I2, F1 + F2) |
    ///
    /// ```
    /// use qbound::Format;
    /// let q15 = Format::signed(0, 15)?;
    /// assert_eq!(Format::product(q15, q15)?, Format::signed(1, 30)?);
    /// assert!(Format::product(Format::signed(63, 0)?, Format::signed(64, 0)?).is_err());
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn product(a: Format, b: Format) -> Result<Format, FormatError> {
        let i = a.int_bits as u64 + b.int_bits as u64 + (a.signed && b.signed) as u64;
        let f = a.frac_bits as u64 + b.frac_bits as u64;
        make(a.signed || b.signed, i, f)
    }

    /// Format of the exact negation `-a`: `Q(I + 1, F)` for signed,
    /// `Q(I, F)` for unsigned.
    ///
    /// ```
    /// use qbound::Format;
    /// assert_eq!(Format::negation(Format::signed(0, 15)?)?, Format::signed(1, 15)?);
    /// assert_eq!(Format::negation(Format::unsigned(4, 4)?)?, Format::signed(4, 4)?);
    /// # Ok::<(), qbound::FormatError>(())
    /// ```
    pub const fn negation(a: Format) -> Result<Format, FormatError> {
        make(
            true,
            a.int_bits as u64 + a.signed as u64,
            a.frac_bits as u64,
        )
    }
}

const fn max(a: u32, b: u32) -> u32 {
    if a > b { a } else { b }
}

const fn make(signed: bool, i: u64, f: u64) -> Result<Format, FormatError> {
    let width = signed as u64 + i + f;
    if width > MAX_WIDTH as u64 {
        return Err(FormatError::TooWide { width });
    }
    Format::new(signed, i as u32, f as u32)
}

/// Bits of the smallest native integer holding `width` bits.
pub(crate) const fn storage_bits_for(width: u32) -> u32 {
    if width <= 8 {
        8
    } else if width <= 16 {
        16
    } else if width <= 32 {
        32
    } else if width <= 64 {
        64
    } else {
        128
    }
}

impl fmt::Display for Format {
    /// `Q7.8` or `UQ8.8`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let prefix = if self.signed { "Q" } else { "UQ" };
        write!(f, "{prefix}{}.{}", self.int_bits, self.frac_bits)
    }
}

impl FromStr for Format {
    type Err = FormatError;

    /// Parses `Q7.8`, `q7.8`, `UQ8.8`, `uq0.16`; surrounding spaces are
    /// allowed.
    fn from_str(s: &str) -> Result<Format, FormatError> {
        let s = s.trim();
        let (signed, rest) = if let Some(r) = strip_prefix_ci(s, "uq") {
            (false, r)
        } else if let Some(r) = strip_prefix_ci(s, "q") {
            (true, r)
        } else {
            return Err(FormatError::Syntax);
        };
        let (i, f) = rest.split_once('.').ok_or(FormatError::Syntax)?;
        let i = parse_count(i)?;
        let f = parse_count(f)?;
        make(signed, i, f)
    }
}

fn strip_prefix_ci<'a>(s: &'a str, prefix: &str) -> Option<&'a str> {
    let head = s.get(..prefix.len())?;
    if head.eq_ignore_ascii_case(prefix) {
        Some(&s[prefix.len()..])
    } else {
        None
    }
}

/// A bit count: ASCII digits only, no sign; large counts saturate so that
/// the width check reports them.
fn parse_count(s: &str) -> Result<u64, FormatError> {
    if s.is_empty() || !s.bytes().all(|b| b.is_ascii_digit()) {
        return Err(FormatError::Syntax);
    }
    let mut v: u64 = 0;
    for b in s.bytes() {
        v = v.saturating_mul(10).saturating_add((b - b'0') as u64);
    }
    Ok(v.min(u32::MAX as u64))
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::string::ToString;

    #[test]
    fn parse_and_print() {
        for s in ["Q7.8", "UQ8.8", "Q0.0", "UQ0.1", "Q0.127", "UQ128.0"] {
            let f: Format = s.parse().unwrap();
            assert_eq!(f.to_string(), s);
        }
        assert_eq!(
            "uq3.4".parse::<Format>().unwrap(),
            Format::unsigned(3, 4).unwrap()
        );
        for bad in [
            "",
            "Q",
            "Q7",
            "Q7.",
            "Q.8",
            "Q-1.8",
            "Q7.8.1",
            "X7.8",
            "Q 7.8",
            "UQ0.0",
            "Q128.0",
            "Q99999999999999999999.0",
        ] {
            assert!(bad.parse::<Format>().is_err(), "{bad}");
        }
    }
}
