//! Regenerate `src/functions/tables.rs` and `src/functions/fast_tables.rs`
//! (the integer constants of the function kernels) with MPFR:
//! `cargo run -p qbound --example gen_function_tables`.

#[path = "../tests/all/functables.rs"]
mod functables;

fn main() -> std::io::Result<()> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/src/functions/");
    for (name, text) in [
        ("tables.rs", functables::generate()),
        ("fast_tables.rs", functables::generate_fast()),
    ] {
        let path = format!("{dir}{name}");
        std::fs::write(&path, text)?;
        println!("wrote {path}");
    }
    Ok(())
}
