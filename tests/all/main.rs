//! All integration tests, built into one test binary (one link of `rug`).
//! Each area has its own module; shared helpers live in `common`.
//!
//! Property tests use proptest's default configuration, so the case count
//! can be raised for long runs: `PROPTEST_CASES=100000 cargo test`.

mod common;

mod arith;
mod compile_fail;
mod convert;
mod exhaustive;
mod families;
mod fastpath;
mod functions;
mod nostd;
mod references;
mod rescale;
mod table;
mod typed;
