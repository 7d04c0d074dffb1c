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

/// A [`Format`](crate::Format) is its text form, `"Q7.8"` or `"UQ8.8"`, in
/// every serde format.
///
/// ```
/// # #[cfg(feature = "serde")] {
/// use qbound::Format;
/// let f = Format::signed(7, 8).unwrap();
/// assert_eq!(serde_json::to_string(&f).unwrap(), "\"Q7.8\"");
/// assert_eq!(serde_json::from_str::<Format>("\"uq8.8\"").unwrap(), Format::unsigned(8, 8).unwrap());
/// assert!(serde_json::from_str::<Format>("\"Q200.0\"").is_err());
/// # }
/// ```
impl Serialize for crate::Format {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_str(self)
    }
}

impl<'de> de::Deserialize<'de> for crate::Format {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct FormatVisitor;
        impl Visitor<'_> for FormatVisitor {
            type Value = crate::Format;
            fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str("a format such as \"Q7.8\" or \"UQ8.8\"")
            }
            fn visit_str<E: de::Error>(self, s: &str) -> Result<crate::Format, E> {
                s.parse().map_err(E::custom)
            }
        }
        d.deserialize_str(FormatVisitor)
    }
}

/// A [`QValue`](crate::QValue) is a struct of its format and its value:
/// `{"format": "Q7.8", "value": "1.5"}` in human-readable formats (the
/// exact decimal text), the format text and the stored integer (`i128` for
/// signed formats, `u128` for unsigned) in binary ones. When reading, the
/// format must come before the value (as it is written), and a value that
/// does not fit the format is an error.
///
/// ```
/// # #[cfg(feature = "serde")] {
/// use qbound::{Format, QValue};
/// let v = QValue::from_i128_bits(Format::signed(7, 8).unwrap(), 384).unwrap();
/// let text = serde_json::to_string(&v).unwrap();
/// assert_eq!(text, r#"{"format":"Q7.8","value":"1.5"}"#);
/// let back: QValue = serde_json::from_str(&text).unwrap();
/// assert_eq!((back, back.format()), (v, v.format()));
/// assert!(serde_json::from_str::<QValue>(r#"{"format":"Q3.4","value":"99"}"#).is_err());
/// # }
/// ```
impl Serialize for crate::QValue {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let human = s.is_human_readable();
        let mut st = s.serialize_struct("QValue", 2)?;
        st.serialize_field("format", &self.format())?;
        if human {
            st.serialize_field("value", &DecimalText(*self))?;
        } else if self.format().is_signed() {
            st.serialize_field("value", &(self.bits().low_bits() as i128))?;
        } else {
            st.serialize_field("value", &self.bits().low_bits())?;
        }
        st.end()
    }
}

/// Serializes a value as its exact decimal text.
struct DecimalText(crate::QValue);

impl Serialize for DecimalText {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_str(&self.0)
    }
}

/// The value part of a `QValue`, read once its format is known.
struct ValueSeed {
    format: crate::Format,
    human: bool,
}

impl<'de> de::DeserializeSeed<'de> for ValueSeed {
    type Value = crate::QValue;
    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<crate::QValue, D::Error> {
        if self.human {
            d.deserialize_any(self)
        } else if self.format.is_signed() {
            d.deserialize_i128(self)
        } else {
            d.deserialize_u128(self)
        }
    }
}

impl Visitor<'_> for ValueSeed {
    type Value = crate::QValue;
    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.human {
            write!(f, "a {} value as a decimal string", self.format)
        } else {
            write!(f, "the stored bits of a {} value", self.format)
        }
    }
    fn visit_str<E: de::Error>(self, s: &str) -> Result<crate::QValue, E> {
        crate::QValue::try_parse(self.format, s, Rounding::NearestTiesEven).map_err(E::custom)
    }
    fn visit_i64<E: de::Error>(self, n: i64) -> Result<crate::QValue, E> {
        self.visit_i128(i128::from(n))
    }
    fn visit_u64<E: de::Error>(self, n: u64) -> Result<crate::QValue, E> {
        self.visit_u128(u128::from(n))
    }
    fn visit_i128<E: de::Error>(self, n: i128) -> Result<crate::QValue, E> {
        if self.human {
            return Err(E::custom("expected the value as a decimal string"));
        }
        crate::QValue::new(self.format, crate::Wide::from_i128(n)).map_err(E::custom)
    }
    fn visit_u128<E: de::Error>(self, n: u128) -> Result<crate::QValue, E> {
        if self.human {
            return Err(E::custom("expected the value as a decimal string"));
        }
        crate::QValue::new(self.format, crate::Wide::from_u128(n)).map_err(E::custom)
    }
}

impl<'de> de::Deserialize<'de> for crate::QValue {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct QValueVisitor {
            human: bool,
        }
        impl<'de> Visitor<'de> for QValueVisitor {
            type Value = crate::QValue;
            fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str("a QValue: its format, then its value")
            }
            fn visit_seq<A: de::SeqAccess<'de>>(
                self,
                mut seq: A,
            ) -> Result<crate::QValue, A::Error> {
                let format: crate::Format = seq
                    .next_element()?
                    .ok_or_else(|| de::Error::invalid_length(0, &self))?;
                seq.next_element_seed(ValueSeed {
                    format,
                    human: self.human,
                })?
                .ok_or_else(|| de::Error::invalid_length(1, &self))
            }
            fn visit_map<A: de::MapAccess<'de>>(
                self,
                mut map: A,
            ) -> Result<crate::QValue, A::Error> {
                let mut format: Option<crate::Format> = None;
                let mut value: Option<crate::QValue> = None;
                while let Some(key) = map.next_key::<FieldName>()? {
                    match key {
                        FieldName::Format => format = Some(map.next_value()?),
                        FieldName::Value => {
                            let format = format.ok_or_else(|| {
                                de::Error::custom("the format must come before the value")
                            })?;
                            value = Some(map.next_value_seed(ValueSeed {
                                format,
                                human: self.human,
                            })?);
                        }
                    }
                }
                value.ok_or_else(|| de::Error::missing_field("value"))
            }
        }
        let human = d.is_human_readable();
        d.deserialize_struct("QValue", &["format", "value"], QValueVisitor { human })
    }
}

/// The field names of a serialized `QValue`.
enum FieldName {
    Format,
    Value,
}

impl<'de> de::Deserialize<'de> for FieldName {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct FieldVisitor;
        impl Visitor<'_> for FieldVisitor {
            type Value = FieldName;
            fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str("`format` or `value`")
            }
            fn visit_str<E: de::Error>(self, s: &str) -> Result<FieldName, E> {
                match s {
                    "format" => Ok(FieldName::Format),
                    "value" => Ok(FieldName::Value),
                    other => Err(E::unknown_field(other, &["format", "value"])),
                }
            }
        }
        d.deserialize_identifier(FieldVisitor)
    }
}
