//! Verdicts: the plain-data [`Report`] that every renderer reads, its
//! assembly from an analysis (and a simulation), and the CI gate's rules.

mod assemble;
pub mod gate;
mod report;

pub use assemble::assemble;
pub use report::*;
