//! Integration tests of the audit engine (one binary).

mod common;
mod fir;
mod hand;
mod parse_errors;
mod property;
mod stats;
