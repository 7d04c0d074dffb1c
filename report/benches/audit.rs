//! Analysis time against datapath size, and simulation throughput
//! (node evaluations per second) of the fixed-point and the exact side.

use criterion::{BenchmarkId, Criterion, Throughput, criterion_group, criterion_main};
use qbound::{Format, Overflow, Rounding};
use qbound_report::{Builder, Datapath, InputKind, NodeId, Simulator, analyze, parse_decimal};
use rug::Rational;

/// A cascade of multiply-accumulate sections (invented): every section
/// multiplies a fresh input by a constant, adds it to a rescaled running
/// sum and rounds back to 24 bits; about `n` nodes in all.
fn cascade(n: usize) -> Datapath {
    let q15 = Format::signed(0, 15).unwrap();
    let acc = Format::signed(3, 20).unwrap();
    let mut b = Builder::new();
    let x = b
        .input(
            "x",
            q15,
            Rational::from(-1),
            Rational::from((32767, 32768)),
            InputKind::Exact,
        )
        .unwrap();
    let mut s = b
        .rescale(x, acc, Rounding::Floor, Overflow::Saturate)
        .unwrap();
    let mut k = 0;
    while b.len() + 5 <= n {
        let c = b
            .constant(
                &format!("c{k}"),
                parse_decimal(&format!("0.{:04}", 1000 + (k * 7919) % 8000)).unwrap(),
                q15,
                Rounding::NearestTiesEven,
            )
            .unwrap();
        let xi = b
            .input(
                &format!("x{k}"),
                q15,
                Rational::from(-1),
                Rational::from((32767, 32768)),
                InputKind::Exact,
            )
            .unwrap();
        let p = b.mul(c, xi).unwrap();
        let half = b.shift(s, -1).unwrap();
        let t = b.add(half, p).unwrap();
        s = b
            .rescale(t, acc, Rounding::NearestTiesEven, Overflow::Saturate)
            .unwrap();
        k += 1;
    }
    b.output("y", s, None).unwrap();
    b.build()
}

fn analysis(c: &mut Criterion) {
    let mut g = c.benchmark_group("analysis");
    g.sample_size(10);
    for n in [1_000usize, 10_000, 100_000] {
        let path = cascade(n);
        g.throughput(Throughput::Elements(path.nodes().len() as u64));
        g.bench_with_input(BenchmarkId::from_parameter(n), &path, |b, p| {
            b.iter(|| analyze(p))
        });
    }
    g.finish();
}

fn simulation(c: &mut Criterion) {
    let path = cascade(1_000);
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
    let _ = NodeId(0);
}

criterion_group!(benches, analysis, simulation);
criterion_main!(benches);
