//! Integration tests of the audit engine (one binary).

mod arith;
mod common;
mod dependency;
mod fir;
mod hand;
mod parse_errors;
mod precision;
mod property;
mod stats;
