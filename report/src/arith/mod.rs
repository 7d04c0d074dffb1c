//! Sound numbers for the audit: exact numbers `N · 2^a · 5^b` ([`Num`]),
//! intervals with optional outward rounding ([`Interval`]), formats as sets
//! of numbers (ranges, steps, rounding to a grid), and exact decimal text.
//!
//! Pure Rust: the mantissa is an `i128` while it fits and a
//! [`dashu_int::IBig`] beyond. No floating point touches a bound; `f64`
//! appears only in display and statistics fields.

mod decimal;
mod grid;
mod interval;
mod num;

pub use decimal::{Exact, decimal_text, num, num_sig, parse_decimal};
pub use grid::{
    ceil_to_grid, floor_to_grid, format_range, num_to_qvalue, pow2, qvalue_to_num, round_to_grid,
    ulp, wide_to_num, wide_value,
};
pub use interval::Interval;
pub use num::{Direction, Num, NumParseError};
