//! serde support (feature `serde`).
//!
//! Human-readable formats (JSON, TOML, YAML, ...) carry the exact decimal
//! text: `"1.5"`, never a float that might not round-trip. Reading them
//! accepts that text (any syntax the parser takes, rounded to nearest with
//! ties to even), and also plain integers and floats, which are converted
//! exactly and then rounded the same way. Binary formats carry the stored
//! integer in the format's native storage type. In every case a value that
//! does not fit the format is an error, never wrapped or clamped.
//!
//! ```
//! # #[cfg(feature = "serde")] {
//! use qbound::Q;
//! let x: Q<7, 8> = "1.5".parse().unwrap();
//! assert_eq!(serde_json::to_string(&x).unwrap(), "\"1.5\"");
//! let y: Q<7, 8> = serde_json::from_str("\"0x1.8\"").unwrap();
//! assert_eq!(x, y);
//! assert!(serde_json::from_str::<Q<7, 8>>("\"128\"").is_err());
//! # }
//! ```

use core::fmt;
use core::marker::PhantomData;

use serde::de::{self, Deserializer, Visitor};
use serde::ser::{Serialize, Serializer};
use typenum::Unsigned;

use crate::layout::{SignedLayout, UnsignedLayout};
use crate::rounding::Rounding;
use crate::storage::{Storage, WorkInt};
use crate::typed::{QType, Sq, Uq};

/// Serialize stored bits in their native integer type.
fn serialize_bits<S: Serializer, B: Storage>(bits: B, s: S) -> Result<S::Ok, S::Error> {
    let u = bits.to_u128_bits();
    match (B::SIGNED, B::BITS) {
        (true, 8) => s.serialize_i8(u as i8),
        (true, 16) => s.serialize_i16(u as i16),
        (true, 32) => s.serialize_i32(u as i32),
        (true, 64) => s.serialize_i64(u as i64),
        (true, _) => s.serialize_i128(u as i128),
        (false, 8) => s.serialize_u8(u as u8),
        (false, 16) => s.serialize_u16(u as u16),
        (false, 32) => s.serialize_u32(u as u32),
        (false, 64) => s.serialize_u64(u as u64),
        (false, _) => s.serialize_u128(u),
    }
}

/// Reads a value of `T` from text, integers, floats or (binary formats)
/// stored bits.
struct ValueVisitor<T> {
    bits: bool,
    _t: PhantomData<T>,
}

macro_rules! serde_common {
    ($name:ident, $layout:ident) => {
        impl<I: $layout<F>, F: Unsigned> Serialize for $name<I, F> {
            fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
                if s.is_human_readable() {
                    s.collect_str(self)
                } else {
                    serialize_bits(self.to_bits(), s)
                }
            }
        }

        impl<'de, I: $layout<F>, F: Unsigned> de::Deserialize<'de> for $name<I, F> {
            fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
                if d.is_human_readable() {
                    d.deserialize_any(ValueVisitor::<Self> {
                        bits: false,
                        _t: PhantomData,
                    })
                } else {
                    let v = ValueVisitor::<Self> {
                        bits: true,
                        _t: PhantomData,
                    };
                    let storage = <<Self as QType>::Storage as Storage>::BITS;
                    match (Self::FORMAT.is_signed(), storage) {
                        (true, 8) => d.deserialize_i8(v),
                        (true, 16) => d.deserialize_i16(v),
                        (true, 32) => d.deserialize_i32(v),
                        (true, 64) => d.deserialize_i64(v),
                        (true, _) => d.deserialize_i128(v),
                        (false, 8) => d.deserialize_u8(v),
                        (false, 16) => d.deserialize_u16(v),
                        (false, 32) => d.deserialize_u32(v),
                        (false, 64) => d.deserialize_u64(v),
                        (false, _) => d.deserialize_u128(v),
                    }
                }
            }
        }

        impl<'de, I: $layout<F>, F: Unsigned> Visitor<'de> for ValueVisitor<$name<I, F>> {
            type Value = $name<I, F>;

            fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                if self.bits {
                    write!(f, "the stored bits of a {} value", <$name<I, F>>::FORMAT)
                } else {
                    write!(
                        f,
                        "a {} value as a decimal string or a number",
                        <$name<I, F>>::FORMAT
                    )
                }
            }

            fn visit_str<E: de::Error>(self, s: &str) -> Result<Self::Value, E> {
                s.parse().map_err(E::custom)
            }

            fn visit_i64<E: de::Error>(self, n: i64) -> Result<Self::Value, E> {
                self.visit_i128(i128::from(n))
            }

            fn visit_u64<E: de::Error>(self, n: u64) -> Result<Self::Value, E> {
                self.visit_u128(u128::from(n))
            }

            fn visit_i128<E: de::Error>(self, n: i128) -> Result<Self::Value, E> {
                if self.bits {
                    let s = <<$name<I, F> as QType>::Storage as Storage>::from_u128_bits(n as u128);
                    if s.to_u128_bits() as i128 != n {
                        return Err(E::custom("stored bits out of range"));
                    }
                    <$name<I, F>>::checked_from_bits(s)
                        .ok_or_else(|| E::custom("stored bits out of range"))
                } else {
                    <$name<I, F>>::try_from_int(n).map_err(E::custom)
                }
            }

            fn visit_u128<E: de::Error>(self, n: u128) -> Result<Self::Value, E> {
                if self.bits {
                    let s = <<$name<I, F> as QType>::Storage as Storage>::from_u128_bits(n);
                    if s.to_u128_bits() != n || s.is_negative() {
                        return Err(E::custom("stored bits out of range"));
                    }
                    <$name<I, F>>::checked_from_bits(s)
                        .ok_or_else(|| E::custom("stored bits out of range"))
                } else {
                    <$name<I, F>>::try_from_int(n).map_err(E::custom)
                }
            }

            fn visit_f64<E: de::Error>(self, x: f64) -> Result<Self::Value, E> {
                <$name<I, F>>::try_from_f64(x, Rounding::NearestTiesEven).map_err(E::custom)
            }
        }
    };
}

serde_common!(Sq, SignedLayout);
serde_common!(Uq, UnsignedLayout);
