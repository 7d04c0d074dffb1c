//! Compile-fail tests (`tests/ui/`): a product wider than 128 bits, lossy
//! `widen` (fewer integer bits, fewer fraction bits, signed into
//! unsigned), a same-format method called with another format, and
//! bad `qconst!` literals (a malformed digit, NaN, an out-of-range value). The
//! `.stderr` files hold the diagnostics a user sees; regenerate them with
//! `TRYBUILD=overwrite cargo test -p qbound --test all compile_fail` after a
//! deliberate change to the messages, and read them.

#[test]
fn compile_fail() {
    let t = trybuild::TestCases::new();
    t.compile_fail("tests/ui/*.rs");
}
