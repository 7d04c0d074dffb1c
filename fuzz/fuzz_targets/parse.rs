//! Fuzz the number parser: any bytes, into a spread of formats and every
//! rounding and overflow mode except `Panic`. It must never panic, and
//! whatever parses must display and parse back to the same value.
#![no_main]

use libfuzzer_sys::fuzz_target;
use qbound::{Format, Overflow, QValue, Rounding};

const FORMATS: &[(bool, u32, u32)] = &[
    (true, 0, 0),
    (true, 7, 8),
    (true, 0, 127),
    (true, 127, 0),
    (false, 0, 128),
    (false, 128, 0),
    (false, 5, 6),
    (true, 20, 19),
];

fuzz_target!(|data: &[u8]| {
    let Some((&sel, rest)) = data.split_first() else {
        return;
    };
    let Ok(text) = core::str::from_utf8(rest) else {
        return;
    };
    let (s, i, f) = FORMATS[sel as usize % FORMATS.len()];
    let format = Format::new(s, i, f).unwrap();
    let rounding = Rounding::ALL[(sel as usize / 8) % 8];
    let overflow = [
        Overflow::Wrap,
        Overflow::Saturate,
        Overflow::SaturateSymmetric,
    ][(sel as usize / 64) % 3];
    if let Ok(v) = QValue::parse(format, text, rounding, overflow) {
        let shown = v.to_string();
        let back = QValue::try_parse(format, &shown, Rounding::Floor).expect("display parses back");
        assert_eq!(back.bits(), v.bits(), "{text:?} -> {shown}");
        let _ = format!("{v:.5} {v:#x} {v:#b} {v:?}");
    }
    let _ = QValue::try_parse(format, text, rounding);
    let _ = text.parse::<qbound::Q<7, 8>>();
});
