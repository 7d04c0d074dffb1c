//! Run the analysis once on a generated datapath, for profilers:
//! `cargo run --release -p qbound-report --example analysis_profile -- fir_bank 100000`
//! (shapes: fir_bank, long_fir, random_blocks, decaying_cascade, recursion,
//! balanced_tree; see
//! `benches/shapes/mod.rs`). Under `valgrind --tool=callgrind` the instruction
//! count is a load-independent measure of the analysis' cost.

#[path = "../benches/shapes/mod.rs"]
mod shapes;

fn main() {
    let mut args = std::env::args().skip(1);
    let shape = args.next().unwrap_or_else(|| "fir_bank".to_owned());
    let n: usize = args.next().and_then(|a| a.parse().ok()).unwrap_or(10_000);
    let Some(make) = shapes::by_name(&shape) else {
        eprintln!("unknown shape {shape}");
        std::process::exit(2);
    };
    let path = make(n);
    let t = std::time::Instant::now();
    let a = qbound_report::analyze(&path);
    let dt = t.elapsed();
    if args.next().as_deref() == Some("dump") {
        // Every node's bound, for comparing two versions of the analysis.
        for (i, n) in a.nodes.iter().enumerate() {
            println!(
                "{i} ideal [{}, {}] actual [{}, {}] error [{}, {}]",
                n.ideal.lo, n.ideal.hi, n.actual.lo, n.actual.hi, n.error.lo, n.error.hi
            );
        }
    }
    let worst = a
        .nodes
        .iter()
        .map(|n| n.error.max_abs().to_f64())
        .fold(0.0, f64::max);
    println!(
        "{shape}: {} nodes, {} sources, analysis {dt:?}, largest error bound {worst:.3e}",
        a.nodes.len(),
        a.sources.len()
    );
}
