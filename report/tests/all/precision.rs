//! Outward rounding keeps every bound sound and close to the exact one.
//!
//! - Demos and examples: nothing is rounded at the default precision; the
//!   bounds are identical to the exact analysis (`precision = u32::MAX`).
//! - Deep recursions and the benchmark shapes: every interval at the
//!   default precision (120 bits) encloses the exact analysis' interval and
//!   lies within 10^-30 of it, relative to its own size or to its format's
//!   range (its ulp for errors), whichever is larger.
//! - Random datapaths: the same closeness. The exact analysis takes a few
//!   different steps there (it cannot enclose an inexact ratio of two
//!   scales, so it multiplies the terms out instead), so enclosure of that
//!   analysis is not the criterion; soundness is checked against the truth
//!   itself: on small formats every input vector is evaluated exactly and
//!   every node's ideal value, actual value and error must lie in the
//!   bounds, at the default precision and at 10 bits.
//! - A very low precision (12 bits) stays sound on the demos: the
//!   simulation never finds an error outside its (loose) bounds.

use qbound_report::{
    Analysis, AnalysisOptions, Datapath, Interval, Num, SimulationOptions, analyze_with, parse,
    simulate,
};

#[path = "../../benches/shapes/mod.rs"]
#[allow(dead_code, clippy::all)]
mod shapes;

fn opts(precision: u32) -> AnalysisOptions {
    AnalysisOptions {
        precision,
        ..AnalysisOptions::default()
    }
}

/// Each end of `wide` within 10^-30·`scale` of `exact` (and, if
/// `enclose`, outside it).
fn close(what: &str, exact: &Interval, wide: &Interval, scale: f64, enclose: bool) {
    assert!(
        !enclose || wide.encloses(exact),
        "{what}: [{}, {}] does not enclose the exact [{}, {}]",
        wide.lo,
        wide.hi,
        exact.lo,
        exact.hi
    );
    let scale = exact.max_abs().to_f64().max(scale);
    let d = (&exact.lo - &wide.lo)
        .to_f64()
        .abs()
        .max((&wide.hi - &exact.hi).to_f64().abs());
    assert!(
        d / scale <= 1e-30,
        "{what}: outward rounding moved an end by {d:e} (scale {scale:e})"
    );
}

fn compare_with(name: &str, path: &Datapath, enclose: bool) -> (Analysis, Analysis) {
    let exact = analyze_with(path, &opts(u32::MAX));
    let rounded = analyze_with(path, &AnalysisOptions::default());
    for (i, (e, r)) in exact.nodes.iter().zip(&rounded.nodes).enumerate() {
        let f = path.nodes()[i].format;
        let range = qbound_report::arith::format_range(f).max_abs().to_f64();
        let ulp = qbound_report::arith::ulp(f).to_f64();
        close(
            &format!("{name} node {i} ideal"),
            &e.ideal,
            &r.ideal,
            range,
            enclose,
        );
        close(
            &format!("{name} node {i} actual"),
            &e.actual,
            &r.actual,
            range,
            enclose,
        );
        close(
            &format!("{name} node {i} error"),
            &e.error,
            &r.error,
            ulp,
            enclose,
        );
    }
    (exact, rounded)
}

fn compare(name: &str, path: &Datapath) -> (Analysis, Analysis) {
    compare_with(name, path, true)
}

fn files() -> Vec<(&'static str, &'static str)> {
    vec![
        ("load_cell", include_str!("../../demos/load_cell.qbdp")),
        ("motor_pi", include_str!("../../demos/motor_pi.qbdp")),
        ("tone_power", include_str!("../../demos/tone_power.qbdp")),
        ("vibration_fir", include_str!("../../demos/vibration_fir.qbdp")),
        ("fir64", include_str!("../../examples/fir64.qbdp")),
        ("power", include_str!("../../examples/power.qbdp")),
        ("sensor", include_str!("../../examples/sensor.qbdp")),
    ]
}

#[test]
fn demos_and_examples_are_exact_at_the_default_precision() {
    for (name, text) in files() {
        let path = parse(text).unwrap();
        let (exact, rounded) = compare(name, &path);
        // Their numbers are short: nothing is rounded at all.
        for (e, r) in exact.nodes.iter().zip(&rounded.nodes) {
            assert_eq!(
                (&e.ideal, &e.actual, &e.error),
                (&r.ideal, &r.actual, &r.error),
                "{name}"
            );
        }
    }
}

#[test]
fn deep_recursions_round_and_stay_sound() {
    // 500 steps of y = floor(0.9·y + x): the exact ranges need hundreds of
    // bits; the default precision rounds them and must still enclose them.
    let path = shapes::recursion(2000);
    let (exact, rounded) = compare("recursion", &path);
    let bits = |a: &Analysis| {
        a.nodes
            .iter()
            .map(|n| n.ideal.hi.mantissa_bits() + n.ideal.hi.cost_bits())
            .max()
            .unwrap()
    };
    assert!(
        bits(&exact) > 300,
        "the exact analysis should need long numbers"
    );
    assert!(
        bits(&rounded) <= 2 * 130,
        "the rounded analysis keeps numbers short"
    );
    let path = shapes::decaying_cascade(1500);
    compare("decaying_cascade", &path);
}

#[test]
fn other_shapes_stay_within_the_precision() {
    // Not `random_blocks`: its chains of products need exact numbers of
    // tens of thousands of bits (the reason the analysis rounds); random
    // datapaths below cover those operations.
    for (name, make) in [
        ("fir_bank", shapes::fir_bank as fn(usize) -> Datapath),
        ("long_fir", shapes::long_fir),
        ("balanced_tree", shapes::balanced_tree),
    ] {
        compare(name, &make(1500));
    }
}

#[test]
fn very_low_precision_is_still_sound() {
    let sim = SimulationOptions {
        random_vectors: 300,
        ..SimulationOptions::default()
    };
    for (name, text) in files() {
        let path = parse(text).unwrap();
        let exact = analyze_with(&path, &opts(u32::MAX));
        let low = analyze_with(&path, &opts(12));
        for (i, (e, l)) in exact.nodes.iter().zip(&low.nodes).enumerate() {
            assert!(l.error.encloses(&e.error), "{name} node {i}");
            assert!(l.actual.encloses(&e.actual), "{name} node {i}");
        }
        simulate(&path, &low, &sim).unwrap_or_else(|e| panic!("{name}: {e}"));
    }
    let path = shapes::recursion(400);
    let low = analyze_with(&path, &opts(12));
    simulate(&path, &low, &sim).unwrap();
}

/// Random datapaths (the generator of `property.rs`): default-precision
/// bounds lie within 10^-30 of the exact analysis' bounds.
#[test]
fn random_datapaths_stay_close_to_exact() {
    // The exact analysis of a random datapath can need very long numbers:
    // 64 cases by default, PROPTEST_CASES for long runs.
    let mut runner = proptest::test_runner::TestRunner::new(crate::common::cases(64));
    runner
        .run(
            &crate::property::strategy(),
            |(inputs, consts, steps, _)| {
                if let Some(path) = crate::property::build(&inputs, &consts, &steps) {
                    compare_with("random", &path, false);
                }
                Ok(())
            },
        )
        .unwrap();
}

/// Random datapaths on small exact inputs: every input vector evaluated
/// exactly; each node's ideal value, actual value and error lie in the
/// bounds, at the default precision and at 10 bits.
#[test]
fn every_input_vector_lies_in_the_bounds() {
    use proptest::prelude::*;
    use qbound_report::Simulator;
    use qbound_report::arith::qvalue_to_num;
    let small =
        (any::<bool>(), 0u32..3, 0u32..4).prop_filter("non-empty", |&(s, i, f)| s || i + f > 0);
    let inputs = prop::collection::vec(
        (small, (any::<u16>(), any::<u16>()), Just(None::<usize>)),
        1..3,
    );
    let strategy = (
        inputs,
        prop::collection::vec((-3000i32..3000, crate::property::format()), 0..3),
        prop::collection::vec(crate::property::step(), 1..10),
    );
    let mut runner =
        proptest::test_runner::TestRunner::new(proptest::test_runner::Config::default());
    runner
        .run(&strategy, |(inputs, consts, steps)| {
            let Some(path) = crate::property::build(&inputs, &consts, &steps) else {
                return Ok(());
            };
            let analyses = [
                analyze_with(&path, &AnalysisOptions::default()),
                analyze_with(&path, &opts(10)),
            ];
            let sim = Simulator::new(&path);
            let sampler = qbound_report::simulate::Sampler::new(&path);
            let n_in = sampler.input_count();
            // Every grid point of every input.
            let grids: Vec<Vec<Num>> = (0..n_in)
                .map(|k| {
                    let (lo, hi) = sampler.ends(k);
                    let step = sampler.step(k);
                    let mut v = Vec::new();
                    let mut x = lo.clone();
                    while x <= *hi {
                        v.push(x.clone());
                        x = &x + step;
                    }
                    v
                })
                .collect();
            let mut idx = vec![0usize; n_in];
            loop {
                let xs: Vec<Num> = (0..n_in).map(|k| grids[k][idx[k]].clone()).collect();
                let v = sampler.at(&xs);
                let (fixed, _) = sim.eval_fixed(&v, &[]);
                let exact = sim.eval_exact(&v);
                for a in &analyses {
                    for (i, n) in a.nodes.iter().enumerate() {
                        let actual = qvalue_to_num(fixed[i]);
                        let e = &actual - &exact[i];
                        prop_assert!(
                            n.ideal.contains(&exact[i]),
                            "node {i} ideal {} outside [{}, {}]",
                            exact[i],
                            n.ideal.lo,
                            n.ideal.hi
                        );
                        prop_assert!(
                            n.actual.contains(&actual),
                            "node {i} actual {actual} outside [{}, {}]",
                            n.actual.lo,
                            n.actual.hi
                        );
                        prop_assert!(
                            n.error.contains(&e),
                            "node {i} error {e} outside [{}, {}]",
                            n.error.lo,
                            n.error.hi
                        );
                    }
                }
                // Next vector.
                let mut k = 0;
                while k < n_in {
                    idx[k] += 1;
                    if idx[k] < grids[k].len() {
                        break;
                    }
                    idx[k] = 0;
                    k += 1;
                }
                if k == n_in {
                    break;
                }
            }
            Ok(())
        })
        .unwrap();
}
