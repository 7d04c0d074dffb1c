//! Analysis time against datapath size, simulation throughput (node
//! evaluations per second) of the fixed-point and the exact side, and the
//! full default audit of the 64-tap example. The datapaths are described
//! in `shapes/mod.rs`; `report/AUDIT.md` lists the figures.
//!
//! `QBOUND_BENCH_BIG=1` adds the largest sizes (100,000-step recursion,
//! 1,000,000-node tree), which take seconds per sample.

mod shapes;

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use qbound_report::{Datapath, Num, SimulationOptions, Simulator, analyze, parse, simulate};
use shapes::{balanced_tree, decaying_cascade, fir_bank, long_fir, random_blocks, recursion};

type Shape = (&'static str, fn(usize) -> Datapath, Vec<usize>);

fn analysis(c: &mut Criterion) {
    let big = std::env::var_os("QBOUND_BENCH_BIG").is_some();
    let extra = |v: usize| if big { vec![v] } else { vec![] };
    let shapes: Vec<Shape> = vec![
        ("fir_bank", fir_bank, vec![1_000, 10_000, 100_000]),
        ("long_fir", long_fir, vec![1_000, 10_000, 100_000]),
        ("random_blocks", random_blocks, vec![1_000, 10_000, 100_000]),
        ("decaying_cascade", decaying_cascade, vec![1_000, 10_000]),
        // 4 nodes per step: 1,000, 10,000 and 100,000 steps.
        (
            "recursion",
            recursion,
            [vec![4_000, 40_000], extra(400_000)].concat(),
        ),
        (
            "balanced_tree",
            balanced_tree,
            [vec![10_000, 100_000], extra(1_000_000)].concat(),
        ),
    ];
    for (name, make, sizes) in shapes {
        let mut g = c.benchmark_group(format!("analysis/{name}"));
        g.sample_size(10);
        for n in sizes {
            let path = make(n);
            g.throughput(Throughput::Elements(path.nodes().len() as u64));
            g.bench_with_input(BenchmarkId::from_parameter(n), &path, |b, p| {
                // The result's deallocation is left out of the timing.
                b.iter_with_large_drop(|| analyze(p));
            });
        }
        g.finish();
    }
}

fn simulation(c: &mut Criterion) {
    let path = fir_bank(1_000);
    let sim = Simulator::new(&path);
    let inputs: Vec<_> = (0..sim.inputs().len())
        .map(|k| sim.input_value(k, Num::dyadic(((k as i128 * 7919) % 65536) - 32768, -15), 0))
        .collect();
    let nodes = path.nodes().len() as u64;
    let mut g = c.benchmark_group("simulation");
    g.throughput(Throughput::Elements(nodes));
    let (mut fixed, mut ovf, mut exact) = (Vec::new(), Vec::new(), Vec::new());
    g.bench_function("fixed_point", |b| {
        b.iter(|| sim.eval_fixed_into(&inputs, &[0], &mut fixed, &mut ovf));
    });
    g.bench_function("exact", |b| {
        b.iter(|| sim.eval_exact_into(&inputs, &mut exact));
    });
    g.finish();
}

fn full_audit(c: &mut Criterion) {
    let text = include_str!("../examples/fir64.qbdp");
    let path = parse(text).expect("fir64 parses");
    let mut g = c.benchmark_group("audit");
    g.sample_size(10);
    g.bench_function("fir64_default", |b| {
        b.iter(|| {
            let a = analyze(&path);
            simulate(&path, &a, &SimulationOptions::default()).expect("no bound violation")
        });
    });
    g.finish();
}

criterion_group!(benches, analysis, simulation, full_audit);
criterion_main!(benches);
