//! The `no_std` proof: build `nostd-check` (a `#![no_std]` static library
//! with its own panic handler that uses qbound's multiply, rescale and
//! comparison and a sine), without features (the table-free build) and
//! with `function-tables`, with `panic = abort` (set in its own
//! workspace's profiles). If anything in qbound's dependency
//! tree pulled in `std`, its panic handler would clash with the crate's own
//! and the build would fail.

use std::path::Path;
use std::process::Command;

#[test]
fn nostd_check_crate_builds() {
    // Without features: qbound's table-free build; then with the tables.
    for features in [None, Some("function-tables")] {
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        let mut cmd = Command::new(env!("CARGO"));
        cmd.current_dir(root)
            .args(["build", "--release", "--manifest-path"])
            .arg(root.join("nostd-check").join("Cargo.toml"))
            .arg("--target-dir")
            .arg(root.join("target").join("nostd"))
            .env_remove("CARGO_TARGET_DIR")
            .env_remove("RUSTFLAGS");
        if let Some(f) = features {
            cmd.args(["--features", f]);
        }
        let out = cmd.output().expect("cargo runs");
        assert!(
            out.status.success(),
            "the no_std crate failed to build ({features:?}):\n{}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
}
