//! Exact decimal text in and out.

use dashu_int::IBig;

use super::num::Num;

/// Parse an exact decimal: optional sign, digits with an optional
/// fraction, optional exponent of up to 4 digits (`-1.25`, `0.1`, `3e-4`,
/// `.5`). Returns `None` for anything else.
///
/// ```
/// let x = qbound_report::parse_decimal("-2.5E+3").unwrap();
/// assert_eq!(x.to_string(), "-2500");
/// assert!(qbound_report::parse_decimal("1e99999").is_none());
/// ```
#[must_use]
pub fn parse_decimal(s: &str) -> Option<Num> {
    let b = s.as_bytes();
    let mut i = 0;
    let neg = match b.first() {
        Some(b'-') => {
            i = 1;
            true
        }
        Some(b'+') => {
            i = 1;
            false
        }
        _ => false,
    };
    let mut digits = String::new();
    let mut scale: i64 = 0;
    while i < b.len() && b[i].is_ascii_digit() {
        digits.push(b[i] as char);
        i += 1;
    }
    if i < b.len() && b[i] == b'.' {
        i += 1;
        while i < b.len() && b[i].is_ascii_digit() {
            digits.push(b[i] as char);
            scale -= 1;
            i += 1;
        }
    }
    if digits.is_empty() {
        return None;
    }
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        i += 1;
        let (eneg, start) = match b.get(i) {
            Some(b'-') => (true, i + 1),
            Some(b'+') => (false, i + 1),
            _ => (false, i),
        };
        let e = s.get(start..)?;
        if e.is_empty() || e.len() > 4 || !e.bytes().all(|c| c.is_ascii_digit()) {
            return None;
        }
        let e: i64 = e.parse().ok()?;
        scale += if eneg { -e } else { e };
        i = b.len();
    }
    if i != b.len() {
        return None;
    }
    let mant: IBig = digits.parse().ok()?;
    let mant = if neg { -mant } else { mant };
    let k = i32::try_from(scale).ok()?;
    Some(Num::from(mant) * Num::decimal(1, k))
}

/// A number as a short decimal if it has one of at most 40 digits after
/// the point, else as `p/q`.
///
/// ```
/// let x = qbound_report::parse_decimal("0.0625").unwrap();
/// assert_eq!(qbound_report::arith::decimal_text(&x), "0.0625");
/// let tiny = qbound_report::arith::pow2(-200);
/// assert!(qbound_report::arith::decimal_text(&tiny).starts_with("1/"));
/// ```
#[must_use]
pub fn decimal_text(x: &Num) -> String {
    if x.decimal_digits() > 40 {
        x.ratio_text()
    } else {
        x.decimal_text()
    }
}

/// An exact number as text with an `f64` approximation for display: the
/// form every exact quantity takes in a report (and its JSON).
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Exact {
    /// The exact value, `p/q` or an integer, in lowest terms.
    pub exact: String,
    /// The nearest `f64` (display only).
    pub approx: f64,
}

impl Exact {
    /// From a number.
    ///
    /// ```
    /// let e = qbound_report::arith::Exact::new(&qbound_report::arith::pow2(-3));
    /// assert_eq!((e.exact.as_str(), e.approx), ("1/8", 0.125));
    /// ```
    #[must_use]
    pub fn new(x: &Num) -> Exact {
        Exact {
            exact: x.ratio_text(),
            approx: x.to_f64(),
        }
    }

    /// The exact value back as a number (`None` if the text is not one).
    #[must_use]
    pub fn num(&self) -> Option<Num> {
        self.exact.parse::<Num>().ok()
    }
}

/// A number for people: four significant digits, plain decimal between
/// 0.001 and 10⁶, scientific outside, `0` for zero.
///
/// ```
/// use qbound_report::arith::num;
/// assert_eq!(num(0.0), "0");
/// assert_eq!(num(1.5), "1.5");
/// assert_eq!(num(-0.000030517578125), "-3.052e-5");
/// assert_eq!(num(12345.678), "12346");
/// ```
#[must_use]
pub fn num(x: f64) -> String {
    num_sig(x, 4)
}

/// A number with `sig` significant digits (at least 1), as [`num`]; plain
/// decimals reach up to `10^(sig + 2)` (at least 10⁶).
///
/// ```
/// assert_eq!(qbound_report::arith::num_sig(0.999969482421875, 6), "0.999969");
/// ```
#[must_use]
pub fn num_sig(x: f64, sig: u32) -> String {
    let sig = i32::try_from(sig.max(1)).unwrap_or(17);
    if x == 0.0 {
        return "0".to_owned();
    }
    if !x.is_finite() {
        return format!("{x}");
    }
    let a = x.abs();
    // Plain decimals up to 10^(sig + 2): ADC counts read better as 7800000.
    if (1e-3..10f64.powi(sig + 2).max(1e6)).contains(&a) {
        let digits = (sig - 1 - a.log10().floor() as i32).max(0) as usize;
        let s = format!("{x:.digits$}");
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_owned()
        } else {
            s
        }
    } else {
        let prec = (sig - 1) as usize;
        let s = format!("{x:.prec$e}");
        // 3.000e-5 -> 3e-5
        match s.split_once('e') {
            Some((m, e)) => {
                let m = if m.contains('.') {
                    m.trim_end_matches('0').trim_end_matches('.')
                } else {
                    m
                };
                format!("{m}e{e}")
            }
            None => s,
        }
    }
}
