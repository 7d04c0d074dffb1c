//! Random datapaths (random formats including 1-bit and very wide ones,
//! operators, rounding and overflow modes, ranges): the simulation never
//! finds an error above the bound, and the loosest bound/measured ratio
//! over the run is reported.

use std::sync::Mutex;

use proptest::prelude::*;
use qbound::{Format, Overflow, Rounding};
use qbound_report::{Builder, InputKind, NodeId, Num, SimulationOptions, analyze, simulate};

#[derive(Clone, Debug)]
pub enum Step {
    Add(usize, usize),
    Sub(usize, usize),
    Mul(usize, usize),
    Neg(usize),
    Shift(usize, i32),
    Rescale(usize, bool, u32, i32, usize, usize),
}

pub fn format() -> impl Strategy<Value = (bool, u32, u32)> {
    prop_oneof![
        (any::<bool>(), 0u32..6, 0u32..12),
        Just((true, 0, 0)),   // 1 bit
        Just((false, 1, 0)),  // 1 bit unsigned
        Just((true, 0, 62)),  // wide
        Just((true, 60, 60)), // 121 bits
    ]
    .prop_filter("non-empty", |&(s, i, f)| s || i + f > 0)
}

pub fn step() -> impl Strategy<Value = Step> {
    prop_oneof![
        (any::<usize>(), any::<usize>()).prop_map(|(a, b)| Step::Add(a, b)),
        (any::<usize>(), any::<usize>()).prop_map(|(a, b)| Step::Sub(a, b)),
        (any::<usize>(), any::<usize>()).prop_map(|(a, b)| Step::Mul(a, b)),
        any::<usize>().prop_map(Step::Neg),
        (any::<usize>(), -4i32..5).prop_map(|(a, k)| Step::Shift(a, k)),
        (
            any::<usize>(),
            any::<bool>(),
            0u32..6,
            -2i32..10,
            0usize..9,
            0usize..4
        )
            .prop_map(|(a, s, i, f, r, o)| Step::Rescale(a, s, i, f, r, o)),
    ]
}

/// The random datapath generator: inputs, constants, steps, a seed.
#[allow(clippy::type_complexity)]
pub fn strategy()
-> impl Strategy<Value = (Vec<InputSpec>, Vec<(i32, (bool, u32, u32))>, Vec<Step>, u64)> {
    (
        prop::collection::vec(
            (
                format(),
                (any::<u16>(), any::<u16>()),
                prop::option::of(0usize..9),
            ),
            1..4,
        ),
        prop::collection::vec((-3000i32..3000, format()), 0..3),
        prop::collection::vec(step(), 1..10),
        any::<u64>(),
    )
}

/// An input: format, range as fractions of the format range, kind.
pub type InputSpec = ((bool, u32, u32), (u16, u16), Option<usize>);

pub fn build(
    inputs: &[InputSpec],
    consts: &[(i32, (bool, u32, u32))],
    steps: &[Step],
) -> Option<qbound_report::Datapath> {
    let mut b = Builder::new();
    let mut ids: Vec<NodeId> = Vec::new();
    for (k, &((s, i, f), (a, c), kind)) in inputs.iter().enumerate() {
        let fmt = Format::new(s, i, f).ok()?;
        let r = qbound_report::arith::format_range(fmt);
        let span = &r.hi - &r.lo;
        let (a, c) = (a.min(c), a.max(c));
        // Decimal fractions of the range (five digits), so that decimal
        // range ends are exercised.
        let frac = |x: u16| Num::decimal(i128::from(x) * 100_000 / 65535, -5);
        let lo = &r.lo + &span * frac(a);
        let hi = &r.lo + &span * frac(c);
        let kind = kind.map_or(InputKind::Exact, |m| {
            InputKind::Quantized(Rounding::ALL[m % 9])
        });
        ids.push(b.input(&format!("x{k}"), fmt, lo, hi, kind).ok()?);
    }
    for (k, &(v, (s, i, f))) in consts.iter().enumerate() {
        let fmt = Format::new(s, i, f).ok()?;
        let value = Num::decimal(i128::from(v), -3);
        if let Ok(id) = b.constant(&format!("c{k}"), value, fmt, Rounding::NearestTiesEven) {
            ids.push(id);
        }
    }
    for st in steps {
        let pick = |x: usize| ids[x % ids.len()];
        let r = match *st {
            Step::Add(x, y) => b.add(pick(x), pick(y)),
            Step::Sub(x, y) => b.sub(pick(x), pick(y)),
            Step::Mul(x, y) => b.mul(pick(x), pick(y)),
            Step::Neg(x) => b.neg(pick(x)),
            Step::Shift(x, k) => b.shift(pick(x), k),
            Step::Rescale(x, s, i, f, r, o) => {
                let src = b.format_of(pick(x));
                let fb = (i64::from(src.frac_bits()) - i64::from(f)).clamp(0, 60) as u32;
                match Format::new(s, i, fb) {
                    Ok(fmt) => b.rescale(pick(x), fmt, Rounding::ALL[r % 9], Overflow::ALL[o % 4]),
                    Err(_) => continue,
                }
            }
        };
        if let Ok(id) = r {
            ids.push(id);
        }
    }
    let n = b.len();
    for k in 0..3.min(n) {
        b.output(&format!("o{k}"), NodeId(n - 1 - k), None).ok()?;
    }
    Some(b.build())
}

#[test]
fn simulation_never_exceeds_the_bound() {
    // Case count: proptest's default, raised by PROPTEST_CASES for long runs.
    let mut runner =
        proptest::test_runner::TestRunner::new(proptest::test_runner::Config::default());
    let worst = Mutex::new((0.0f64, String::new()));
    let worst_clean = Mutex::new((0.0f64, String::new()));
    let loose = Mutex::new(0u32);
    let simulated = Mutex::new(0u32);
    let ratios = Mutex::new(Vec::<f64>::new());
    let strategy = strategy();
    let result = runner.run(&strategy, |(inputs, consts, steps, seed)| {
        let Some(path) = build(&inputs, &consts, &steps) else {
            return Ok(());
        };
        let a = analyze(&path);
        let opts = SimulationOptions {
            seed,
            random_vectors: 100,
            max_corners: 64,
            search: true,
            search_steps: 4,
            ..SimulationOptions::default()
        };
        let r = simulate(&path, &a, &opts).map_err(|e| TestCaseError::fail(e.to_string()))?;
        *simulated.lock().unwrap() += 1;
        for o in &r.outputs {
            if let Some(t) = o.measured.as_ref().and_then(|m| m.tightness) {
                let n = &r.nodes[o.node];
                ratios.lock().unwrap().push(t);
                if t > 2.0 {
                    *loose.lock().unwrap() += 1;
                }
                let what = format!("{} = {} in {}", n.label, n.detail, n.format);
                let mut w = worst.lock().unwrap();
                if t > w.0 {
                    *w = (t, what.clone());
                }
                // Datapaths where nothing can overflow: the bound is then the
                // rounding analysis alone.
                let mut w = worst_clean.lock().unwrap();
                if r.diagnostics.is_empty() && t > w.0 {
                    *w = (t, what);
                }
            }
        }
        Ok(())
    });
    if let Err(e) = result {
        panic!("{e}");
    }
    assert!(
        *simulated.lock().unwrap() >= runner.config().cases / 2,
        "too few datapaths were valid"
    );
    let mut rs = ratios.lock().unwrap().clone();
    rs.sort_by(f64::total_cmp);
    if !rs.is_empty() {
        let pct = |p: f64| rs[((rs.len() - 1) as f64 * p) as usize];
        println!(
            "random datapaths: output bound/measured ratio median {:.3}, 90th percentile {:.3}, 99th {:.3}",
            pct(0.5),
            pct(0.9),
            pct(0.99)
        );
    }
    let w = worst.lock().unwrap();
    let c = worst_clean.lock().unwrap();
    println!(
        "random datapaths without possible overflow: loosest output bound/measured ratio {:.3} ({})",
        c.0, c.1
    );
    println!(
        "random datapaths: {} simulated; loosest output bound/measured ratio {:.3} ({}); outputs with ratio > 2: {}",
        simulated.lock().unwrap(),
        w.0,
        w.1,
        loose.lock().unwrap()
    );
}
