//! What does each rounding and overflow mode cost in *your* kernel?
//!
//! A dev-facing helper (not part of the `no_std` library): it runs one
//! kernel once per mode with [criterion], with the modes written as
//! literals so the compiler folds the choice away exactly as in firmware
//! that names its modes, and prints a Markdown table of the criterion
//! means beside the cheapest combination (floor + wrap).
//!
//! ```no_run
//! use qbound::{Overflow, Q, QType, Rounding};
//! use qbound_bench::{ModeCosts, mode_costs};
//! use std::hint::black_box;
//!
//! let x = Q::<9, 30>::from_bits(123_456_789);
//! let mut costs = ModeCosts::new("narrow");
//! mode_costs!(&mut costs, |rounding, overflow| {
//!     black_box(black_box(x).rescale::<Q<0, 15>>(rounding, overflow))
//! });
//! println!("{}", costs.table());
//! ```
//!
//! The closure body is expanded once per mode; `rounding` and `overflow`
//! are constants inside it. Stochastic rounding gets a fixed random word
//! (what it costs does not depend on the word). The times are criterion's
//! means on this machine: compare rows of one table, and count
//! instructions (`valgrind --tool=callgrind`) when the machine is shared.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::time::Duration;

pub use criterion;
pub use qbound;

use criterion::Criterion;
use qbound::{Overflow, Rounding};

/// The random word of the stochastic rows.
pub const STOCHASTIC_WORD: u64 = 0x9e37_79b9_7f4a_7c15;

/// A set of per-mode benchmarks of one kernel, and their table.
pub struct ModeCosts {
    criterion: Criterion,
    group: String,
    dir: PathBuf,
    rows: Vec<(Rounding, Overflow)>,
}

impl ModeCosts {
    /// Benchmarks named `group/<rounding>+<overflow>`, with their output
    /// in `target/qbound-mode-costs` below the current directory. From a
    /// `cargo run` (no `--bench` argument) they run as benchmarks with
    /// criterion's defaults shortened to 0.5 s warm-up and 2 s of
    /// measurement; from `cargo bench`, or with `-- --bench [FILTER]
    /// [criterion options]`, criterion's command line applies.
    pub fn new(group: &str) -> ModeCosts {
        let dir = Path::new("target").join("qbound-mode-costs");
        let c = Criterion::default()
            .output_directory(&dir)
            .warm_up_time(Duration::from_millis(500))
            .measurement_time(Duration::from_secs(2));
        let cli = std::env::args().any(|a| matches!(a.as_str(), "--bench" | "--test" | "--list"));
        ModeCosts {
            criterion: if cli { c.configure_from_args() } else { c },
            group: group.to_string(),
            dir,
            rows: Vec::new(),
        }
    }

    /// Replace the criterion configuration (sample size, times, ...).
    pub fn with_criterion(mut self, c: Criterion) -> ModeCosts {
        self.criterion = c.output_directory(&self.dir);
        self
    }

    /// Benchmark `f` as the row for `rounding` and `overflow` (the
    /// [`mode_costs!`] macro calls this once per mode).
    pub fn bench<O>(&mut self, rounding: Rounding, overflow: Overflow, mut f: impl FnMut() -> O) {
        let id = row_id(rounding, overflow);
        let mut g = self.criterion.benchmark_group(&self.group);
        g.bench_function(&id, |b| b.iter(&mut f));
        g.finish();
        self.rows.push((rounding, overflow));
    }

    /// The Markdown table of the criterion means, each beside the first
    /// row (floor + wrap in [`mode_costs!`]). Rows without a result (for
    /// example filtered out) are left out.
    pub fn table(&self) -> String {
        let mut found: Vec<(Rounding, Overflow, f64)> = Vec::new();
        for &(r, o) in &self.rows {
            if let Some(ns) = self.mean_ns(&row_id(r, o)) {
                found.push((r, o, ns));
            }
        }
        let mut s = String::new();
        let _ = writeln!(
            s,
            "| rounding | overflow | {} (ns) | vs first row |",
            self.group
        );
        s.push_str("|---|---|---:|---:|\n");
        let base = found.first().map(|f| f.2).unwrap_or(1.0);
        for (r, o, ns) in found {
            let _ = writeln!(
                s,
                "| {} | {} | {ns:.2} | {:.2}x |",
                r.name(),
                o.name(),
                ns / base
            );
        }
        s
    }

    /// The mean of one row from criterion's `estimates.json`.
    fn mean_ns(&self, id: &str) -> Option<f64> {
        let full = format!("{}/{}", self.group, id);
        find_estimates(&self.dir, &full)
    }
}

fn row_id(r: Rounding, o: Overflow) -> String {
    format!("{}+{}", r.name(), o.name())
}

/// Search criterion's output for the benchmark whose full id is `full`.
fn find_estimates(dir: &Path, full: &str) -> Option<f64> {
    for entry in std::fs::read_dir(dir).ok()?.flatten() {
        let p = entry.path();
        if !p.is_dir() {
            continue;
        }
        let bench = p.join("new").join("benchmark.json");
        if let Ok(text) = std::fs::read_to_string(&bench) {
            let v: serde_json::Value = serde_json::from_str(&text).ok()?;
            if v["full_id"] == full {
                let e = std::fs::read_to_string(p.join("new").join("estimates.json")).ok()?;
                let e: serde_json::Value = serde_json::from_str(&e).ok()?;
                return e["mean"]["point_estimate"].as_f64();
            }
        }
        if let Some(ns) = find_estimates(&p, full) {
            return Some(ns);
        }
    }
    None
}

/// Benchmark a kernel once per rounding and overflow mode, with the modes
/// as literals: `mode_costs!(&mut costs, |rounding, overflow| body)`.
///
/// The rows: every rounding mode with wrap-around, then round-to-nearest
/// (ties to even) with each other overflow mode. See the [crate] docs.
#[macro_export]
macro_rules! mode_costs {
    ($costs:expr, |$r:ident, $o:ident| $body:expr) => {{
        let costs: &mut $crate::ModeCosts = $costs;
        $crate::mode_costs!(@rows costs, $r, $o, $body;
            (Floor, Wrap), (Ceil, Wrap), (TowardZero, Wrap), (AwayFromZero, Wrap),
            (NearestTiesUp, Wrap), (NearestTiesAway, Wrap), (NearestTiesEven, Wrap),
            (ToOdd, Wrap), (Stochastic($crate::STOCHASTIC_WORD), Wrap),
            (NearestTiesEven, Saturate), (NearestTiesEven, SaturateSymmetric),
            (NearestTiesEven, Panic));
    }};
    (@rows $c:ident, $r:ident, $o:ident, $body:expr; $(($rm:ident $(($arg:expr))?, $om:ident)),+) => {$(
        $c.bench(
            $crate::qbound::Rounding::$rm $(($arg))?,
            $crate::qbound::Overflow::$om,
            || {
                let $r = $crate::qbound::Rounding::$rm $(($arg))?;
                let $o = $crate::qbound::Overflow::$om;
                $body
            },
        );
    )+};
}
