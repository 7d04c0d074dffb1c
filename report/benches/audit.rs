//! Analysis time against datapath size, and simulation throughput
//! (node evaluations per second) of the fixed-point and the exact side.
//! The datapaths are described in `shapes/mod.rs`.

mod shapes;

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use qbound_report::{Datapath, Simulator, analyze};
use rug::Rational;
use shapes::{decaying_cascade, fir_bank, long_fir, random_blocks};

type Shape = (&'static str, fn(usize) -> Datapath, &'static [usize]);

fn analysis(c: &mut Criterion) {
    let shapes: [Shape; 4] = [
        ("fir_bank", fir_bank, &[1_000, 10_000, 100_000]),
        ("long_fir", long_fir, &[1_000, 10_000, 100_000]),
        ("random_blocks", random_blocks, &[1_000, 10_000, 100_000]),
        ("decaying_cascade", decaying_cascade, &[1_000, 10_000]),
    ];
    for (name, make, sizes) in shapes {
        let mut g = c.benchmark_group(format!("analysis/{name}"));
        g.sample_size(10);
        for &n in sizes {
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
        .map(|k| {
            sim.input_value(
                k,
                Rational::from(((k as i64 * 7919) % 65536 - 32768, 32768)),
                0,
            )
        })
        .collect();
    let nodes = path.nodes().len() as u64;
    let mut g = c.benchmark_group("simulation");
    g.throughput(Throughput::Elements(nodes));
    g.bench_function("fixed_point", |b| b.iter(|| sim.eval_fixed(&inputs, &[0])));
    g.bench_function("exact", |b| b.iter(|| sim.eval_exact(&inputs)));
    g.finish();
}

criterion_group!(benches, analysis, simulation);
criterion_main!(benches);
