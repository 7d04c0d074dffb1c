//! Facts about one format, for quick questions at the desk
//! (`qbound describe Q1.15`).
//!
//! ```
//! let f: qbound::Format = "Q0.15".parse()?;
//! let d = qbound_report::describe::describe(f);
//! assert_eq!(d.min, "-1");
//! assert_eq!(d.max, "0.999969482421875");
//! assert_eq!(d.step, "0.000030517578125");
//! assert_eq!(d.storage, "i16");
//! # Ok::<(), qbound::FormatError>(())
//! ```

use std::io::{self, Write};

use qbound::Format;
use serde::Serialize;

use crate::arith::{decimal_text, format_range, ulp};

/// 20·log10(2): decibels per bit of a ratio of amplitudes.
const DB_PER_BIT: f64 = 6.020_599_913_279_624;
/// 10·log10(3/2): the full-scale sine's extra term in the SQNR rule.
const SINE_TERM_DB: f64 = 1.760_912_590_556_812_5;

/// What `describe` tells about a format.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Description {
    /// The format, as written back (`Q1.15`).
    pub format: String,
    /// Signed (two's complement) or unsigned.
    pub signed: bool,
    /// Integer bits (not counting the sign bit).
    pub int_bits: u32,
    /// Fraction bits.
    pub frac_bits: u32,
    /// Word length in bits (sign + integer + fraction).
    pub width: u32,
    /// The smallest Rust integer that stores it (`i16`).
    pub storage: String,
    /// The `qbound` type (`Q<1, 15>`).
    pub rust_type: String,
    /// Smallest value, exact decimal.
    pub min: String,
    /// Largest value, exact decimal.
    pub max: String,
    /// Step (one ulp), exact decimal.
    pub step: String,
    /// `2^-F` as a power of two (`2^-15`).
    pub step_pow2: String,
    /// Largest magnitude over the step, in dB: `20·log10(max|x| / step)`.
    pub dynamic_range_db: f64,
    /// SQNR of a full-scale sine rounded to nearest into the format,
    /// `6.02·N + 1.76` dB with `N` the word length.
    pub sine_sqnr_db: f64,
    /// RMS error of rounding to nearest into the format, `step / √12`.
    pub rounding_rms: f64,
    /// Hex digits of one word in test vectors.
    pub hex_digits: u32,
}

/// Describe `f`.
#[must_use]
pub fn describe(f: Format) -> Description {
    let r = format_range(f);
    let q = ulp(f);
    let big = r.lo.abs().max(r.hi.clone());
    // Both are exact powers of two times integers: log2 of the ratio in
    // f64 is accurate to far better than the 0.01 dB shown.
    let ratio = big.mul_pow2(i64::from(f.frac_bits()));
    let ratio_bits = ratio.to_f64().log2();
    let w = f.width();
    Description {
        format: f.to_string(),
        signed: f.is_signed(),
        int_bits: f.int_bits(),
        frac_bits: f.frac_bits(),
        width: w,
        storage: format!(
            "{}{}",
            if f.is_signed() { "i" } else { "u" },
            f.storage_bits()
        ),
        rust_type: format!(
            "{}<{}, {}>",
            if f.is_signed() { "Q" } else { "UQ" },
            f.int_bits(),
            f.frac_bits()
        ),
        min: decimal_text(&r.lo),
        max: decimal_text(&r.hi),
        step: decimal_text(&q),
        step_pow2: format!("2^-{}", f.frac_bits()),
        dynamic_range_db: ratio_bits * DB_PER_BIT,
        // Handbook formula (uniform quantization-noise model, noise power
        // step²/12, full-scale sine of power A²/2): SQNR = 6.02·N + 1.76 dB.
        sine_sqnr_db: f64::from(w) * DB_PER_BIT + SINE_TERM_DB,
        rounding_rms: q.to_f64() / 12f64.sqrt(),
        hex_digits: w.div_ceil(4),
    }
}

impl Description {
    /// Write the description for people.
    ///
    /// # Errors
    /// Whatever writing to `out` returns.
    pub fn write_text(&self, out: &mut dyn Write) -> io::Result<()> {
        let kind = if self.signed {
            "signed, two's complement"
        } else {
            "unsigned"
        };
        writeln!(out, "{} ({kind})", self.format)?;
        writeln!(
            out,
            "  width          {} bit{} = {}{} integer + {} fraction",
            self.width,
            if self.width == 1 { "" } else { "s" },
            if self.signed { "sign + " } else { "" },
            self.int_bits,
            self.frac_bits
        )?;
        writeln!(
            out,
            "  storage        {} (qbound type {}), {} hex digits per word",
            self.storage, self.rust_type, self.hex_digits
        )?;
        writeln!(out, "  range          [{}, {}]", self.min, self.max)?;
        writeln!(out, "  step (1 ulp)   {} = {}", self.step, self.step_pow2)?;
        writeln!(
            out,
            "  dynamic range  {:.2} dB (largest magnitude / step)",
            self.dynamic_range_db
        )?;
        writeln!(
            out,
            "  resolution     {:.2} dB SQNR for a full-scale sine rounded to nearest",
            self.sine_sqnr_db
        )?;
        writeln!(
            out,
            "                 (handbook formula: 6.02 dB per bit + 1.76 dB, uniform quantization noise of power step^2/12)"
        )?;
        writeln!(
            out,
            "  rounding noise rms {} (step / sqrt(12)) when rounding to nearest",
            crate::render::num(self.rounding_rms)
        )?;
        Ok(())
    }
}
