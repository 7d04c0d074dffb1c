//! Regenerate `src/functions/tables.rs` (the integer constants of the
//! function kernels) with MPFR: `cargo run -p qbound --example gen_function_tables`.

#[path = "../tests/all/functables.rs"]
mod functables;

fn main() -> std::io::Result<()> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/src/functions/tables.rs");
    std::fs::write(path, functables::generate())?;
    println!("wrote {path}");
    Ok(())
}
