//! `cargo xtask test [ARGS...]`: make sure the machine has what the test
//! suite needs, then run `cargo test --workspace [ARGS...]`.
//!
//! The tests compare qbound with GMP/MPFR through the `rug` crate (the test
//! oracle, a dev-dependency only). Building GMP needs GNU m4 and a C
//! compiler. When m4 is missing, this installs it with the system's package
//! manager where it knows how (apt-get, dnf, yum, zypper, pacman, apk,
//! brew; with sudo when not root), and otherwise stops with a message that
//! says what to install. Nothing else is changed on the machine.

use std::process::{Command, ExitCode, Stdio};

/// Whether `program` runs with `arg` (e.g. `m4 --version`).
fn runs(program: &str, arg: &str) -> bool {
    Command::new(program)
        .arg(arg)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success())
}

fn is_root() -> bool {
    Command::new("id")
        .arg("-u")
        .output()
        .is_ok_and(|o| String::from_utf8_lossy(&o.stdout).trim() == "0")
}

/// Run `cmd` (with sudo when not root and sudo exists); whether it worked.
fn install(cmd: &[&str], needs_root: bool) -> bool {
    let mut full: Vec<&str> = Vec::new();
    if needs_root && !is_root() {
        if !runs("sudo", "--version") {
            return false;
        }
        full.push("sudo");
    }
    full.extend_from_slice(cmd);
    eprintln!("xtask: running `{}`", full.join(" "));
    Command::new(full[0])
        .args(&full[1..])
        .status()
        .is_ok_and(|s| s.success())
}

/// Install the Debian/other package `pkg` providing `program`, if missing.
fn ensure(program: &str, probe: &str, pkg: &str, why: &str) -> Result<(), String> {
    if runs(program, probe) {
        return Ok(());
    }
    eprintln!("xtask: `{program}` is missing ({why}); installing package `{pkg}`");
    let tried = if runs("apt-get", "--version") {
        install(&["apt-get", "install", "-y", pkg], true)
            || (install(&["apt-get", "update"], true)
                && install(&["apt-get", "install", "-y", pkg], true))
    } else if runs("dnf", "--version") {
        install(&["dnf", "install", "-y", pkg], true)
    } else if runs("yum", "--version") {
        install(&["yum", "install", "-y", pkg], true)
    } else if runs("zypper", "--version") {
        install(&["zypper", "--non-interactive", "install", pkg], true)
    } else if runs("pacman", "--version") {
        install(&["pacman", "-S", "--noconfirm", pkg], true)
    } else if runs("apk", "--version") {
        install(&["apk", "add", pkg], true)
    } else if runs("brew", "--version") {
        install(&["brew", "install", pkg], false)
    } else {
        false
    };
    if tried && runs(program, probe) {
        Ok(())
    } else {
        Err(format!(
            "`{program}` is needed ({why}) and could not be installed automatically; \
             install the package `{pkg}` with your system's package manager and run \
             `cargo xtask test` again"
        ))
    }
}

fn test(args: &[String]) -> Result<ExitCode, String> {
    ensure(
        "m4",
        "--version",
        "m4",
        "GMP, behind the test oracle `rug`, is built with it",
    )?;
    if !runs("cc", "--version") && !runs("gcc", "--version") && !runs("clang", "--version") {
        return Err(
            "a C compiler is needed to build GMP/MPFR for the test oracle; install gcc or clang"
                .to_owned(),
        );
    }
    let cargo = std::env::var("CARGO").unwrap_or_else(|_| "cargo".to_owned());
    let status = Command::new(cargo)
        .args(["test", "--workspace"])
        .args(args)
        .status()
        .map_err(|e| format!("cannot run cargo: {e}"))?;
    Ok(if status.success() {
        ExitCode::SUCCESS
    } else {
        ExitCode::FAILURE
    })
}

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let result = match args.first().map(String::as_str) {
        Some("test") => test(&args[1..]),
        _ => Err("usage: cargo xtask test [cargo test arguments]".to_owned()),
    };
    match result {
        Ok(code) => code,
        Err(msg) => {
            eprintln!("xtask: {msg}");
            ExitCode::from(2)
        }
    }
}
