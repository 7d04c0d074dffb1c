//! Fuzz the audit-text parser: any input either parses or gives an error
//! whose position lies inside the text; it never panics. A text that parses
//! is analysed too (the analysis must not panic either).
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    match qbound_report::parse(text) {
        Ok(path) => {
            if path.nodes().len() <= 64 {
                let _ = qbound_report::analyze(&path);
            }
        }
        Err(e) => {
            let lines = text.lines().count().max(1);
            assert!(e.span.line >= 1 && e.span.line <= lines);
            assert!(e.span.column >= 1);
        }
    }
});
