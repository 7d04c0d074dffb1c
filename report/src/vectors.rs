//! Input vectors for a datapath: bit-exact test vectors for firmware and
//! HDL testbenches, and per-output error histograms for the HTML report.
//!
//! Both evaluate the datapath with the engine's [`Simulator`] (the
//! fixed-point side with `qbound`'s kernels, the ideal side in exact
//! rationals) on seeded vectors: the same seed gives the same vectors on
//! every machine (ChaCha8 streams, no platform-dependent floating point in
//! the choice of inputs).
//!
//! Test vectors start with every corner of the input box (each input at
//! an end of its range) when there are at most 64 corners and they take
//! at most a quarter of the count: corners are where saturation and wrap
//! happen, and where an HDL datapath most often differs from its model.
//! The rest are random: exact inputs uniform over their grid points, real
//! inputs uniform over their range (at a resolution of 2⁻⁴⁸ of the range)
//! and then quantized by the input's converter.
//!
//! ```
//! let path = qbound_report::parse("input x : Q0.7 in [-1, 0.5]\nlet y = rescale(x, Q0.3, floor, saturate)\noutput y")?;
//! let set = qbound_report::vectors::test_vectors(&path, 10, 42)?;
//! let mut csv = Vec::new();
//! set.write_csv(&mut csv)?;
//! let text = String::from_utf8(csv)?;
//! assert!(text.starts_with("index,x,x_hex,y,y_hex\n0,-1,80,-1,8\n"));
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```

use std::io::{self, Write};
use std::path::{Path, PathBuf};

use qbound::{Format, QValue, Rounding};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use rug::{Integer, Rational};

use crate::exact::{ceil_to_grid, floor_to_grid, pow2, qvalue_to_rational, ulp};
use crate::model::{Datapath, InputKind, NodeId, Op};
use crate::result::Report;
use crate::simulate::{InputValue, Simulator};

/// Draws input vectors for one datapath.
#[derive(Debug)]
pub struct Sampler<'a> {
    sim: Simulator<'a>,
    path: &'a Datapath,
    /// Per input: the grid ends (exact data) or the real range (quantized).
    ends: Vec<(Rational, Rational)>,
    exact: Vec<bool>,
}

impl<'a> Sampler<'a> {
    /// Prepare `path`.
    #[must_use]
    pub fn new(path: &'a Datapath) -> Sampler<'a> {
        let sim = Simulator::new(path);
        let mut ends = Vec::new();
        let mut exact = Vec::new();
        for &id in sim.inputs() {
            let n = path.node(id);
            if let Op::Input { lo, hi, kind } = &n.op {
                let f = n.format.frac_bits();
                match kind {
                    InputKind::Exact => {
                        ends.push((ceil_to_grid(lo, f), floor_to_grid(hi, f)));
                        exact.push(true);
                    }
                    InputKind::Quantized(_) => {
                        ends.push((lo.clone(), hi.clone()));
                        exact.push(false);
                    }
                }
            }
        }
        Sampler {
            sim,
            path,
            ends,
            exact,
        }
    }

    /// The engine's evaluator.
    #[must_use]
    pub fn simulator(&self) -> &Simulator<'a> {
        &self.sim
    }

    /// Number of inputs.
    #[must_use]
    pub fn input_count(&self) -> usize {
        self.ends.len()
    }

    /// A random vector.
    pub fn random(&self, rng: &mut ChaCha8Rng) -> Vec<InputValue> {
        (0..self.ends.len())
            .map(|k| {
                let (lo, hi) = &self.ends[k];
                let x = if self.exact[k] {
                    let step = ulp(self.path.node(self.sim.inputs()[k]).format);
                    let n = Integer::from((Rational::from(hi - lo) / &step).numer()) + 1u32;
                    let r = Integer::from(rng.random::<u128>()) % n;
                    lo + Rational::from(r) * step
                } else {
                    let u = Rational::from(rng.random_range(0..=(1u64 << 48)));
                    lo + Rational::from(hi - lo) * u * pow2(-48)
                };
                self.sim.input_value(k, x, rng.random())
            })
            .collect()
    }

    /// The corner whose input `k` is at the upper end of its range when
    /// bit `k` of `bits` is set, else at the lower end.
    #[must_use]
    pub fn corner(&self, bits: u64) -> Vec<InputValue> {
        (0..self.ends.len())
            .map(|k| {
                let (lo, hi) = &self.ends[k];
                let x = if (bits >> k) & 1 == 1 { hi } else { lo };
                self.sim.input_value(k, x.clone(), u64::MAX / 2)
            })
            .collect()
    }
}

/// Why test vectors could not be written.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum VectorError {
    /// A stochastic rounding makes the outputs depend on a random stream
    /// that the firmware draws itself: no bit-exact vector exists.
    #[error(
        "{0} rounds stochastically: its result depends on the firmware's own random stream, so no bit-exact vector exists; use a deterministic rounding for the test build"
    )]
    Stochastic(String),
    /// The datapath has no output.
    #[error("the datapath declares no output: add an `output NAME` line")]
    NoOutput,
    /// Writing a file failed.
    #[error("cannot write {path}: {source}")]
    Io {
        /// The file.
        path: String,
        /// The cause.
        source: io::Error,
    },
}

/// A signal of a vector set: its name and format.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Signal {
    /// Column and file name.
    pub name: String,
    /// Its format.
    pub format: Format,
}

/// Bit-exact test vectors: the fixed-point input values and the
/// fixed-point output values the datapath computes from them.
#[derive(Clone, Debug)]
pub struct VectorSet {
    /// The inputs, in declaration order.
    pub inputs: Vec<Signal>,
    /// The outputs, in declaration order.
    pub outputs: Vec<Signal>,
    /// One row per vector: input values, then output values.
    pub rows: Vec<(Vec<QValue>, Vec<QValue>)>,
    /// How many of the first rows are corners of the input box.
    pub corners: usize,
}

/// Test vectors for `path`: `count` rows (corners first, see the module
/// documentation), reproducible from `seed`.
///
/// # Errors
/// [`VectorError::Stochastic`] if a node rounds stochastically,
/// [`VectorError::NoOutput`] if there is no output.
pub fn test_vectors(path: &Datapath, count: u64, seed: u64) -> Result<VectorSet, VectorError> {
    if path.outputs().is_empty() {
        return Err(VectorError::NoOutput);
    }
    for (i, n) in path.nodes().iter().enumerate() {
        // A stochastically quantized input is fine: the vector carries
        // the quantized value the firmware receives.
        if let Op::Rescale {
            rounding: Rounding::Stochastic(_),
            ..
        } = &n.op
        {
            return Err(VectorError::Stochastic(path.label(NodeId(i))));
        }
    }
    let sampler = Sampler::new(path);
    let n_in = sampler.input_count();
    let corner_count: u64 = if n_in <= 6 && (1u64 << n_in) * 4 <= count {
        1u64 << n_in
    } else {
        0
    };
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let inputs_of: Vec<NodeId> = sampler.simulator().inputs().to_vec();
    let outs: Vec<usize> = path.outputs().iter().map(|o| o.node.0).collect();
    let mut rows = Vec::new();
    for r in 0..count {
        let v = if r < corner_count {
            sampler.corner(r)
        } else {
            sampler.random(&mut rng)
        };
        let (fixed, _) = sampler.simulator().eval_fixed(&v, &[]);
        rows.push((
            v.iter().map(|x| x.actual).collect(),
            outs.iter().map(|&o| fixed[o]).collect(),
        ));
    }
    let input_names: Vec<String> = inputs_of.iter().map(|&id| path.label(id)).collect();
    let outputs = path
        .outputs()
        .iter()
        .map(|o| Signal {
            name: if input_names.contains(&o.name) {
                format!("out_{}", o.name)
            } else {
                o.name.clone()
            },
            format: path.node(o.node).format,
        })
        .collect();
    Ok(VectorSet {
        inputs: inputs_of
            .iter()
            .zip(input_names)
            .map(|(&id, name)| Signal {
                name,
                format: path.node(id).format,
            })
            .collect(),
        outputs,
        rows,
        corners: usize::try_from(corner_count).unwrap_or(0),
    })
}

/// The two's-complement bits of `v`, `ceil(width / 4)` hex digits, lower case.
///
/// ```
/// use qbound::{Format, QValue, Wide};
/// let f = Format::signed(0, 7)?;
/// let v = QValue::new(f, Wide::from_i128(-1))?;
/// assert_eq!(qbound_report::vectors::hex_bits(v), "ff");
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[must_use]
pub fn hex_bits(v: QValue) -> String {
    let w = v.format().width();
    let raw = v.bits().low_bits();
    let bits = if w >= 128 {
        raw
    } else {
        raw & ((1u128 << w) - 1)
    };
    let digits = w.div_ceil(4) as usize;
    format!("{bits:0digits$x}")
}

/// The exact decimal value of `v`: every fixed-point value has a
/// terminating decimal expansion (`bits × 2^-F = bits × 5^F / 10^F`), at
/// most `F` digits after the point.
///
/// ```
/// use qbound::{Format, QValue, Wide};
/// let v = QValue::new(Format::signed(0, 100)?, Wide::from_i128(-1))?;
/// let d = qbound_report::vectors::decimal_value(v);
/// assert!(d.starts_with("-0.000000000000000000000000000000788860905221011805411728565282786"));
/// assert_eq!(d.len(), "-0.".len() + 100);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[must_use]
pub fn decimal_value(v: QValue) -> String {
    let frac = v.format().frac_bits();
    let bits = crate::exact::wide_to_integer(v.bits());
    if frac == 0 {
        return bits.to_string();
    }
    let scaled = Integer::from(bits.abs_ref()) * Integer::from(Integer::u_pow_u(5, frac));
    let digits = scaled.to_string();
    let f = frac as usize;
    let padded = if digits.len() <= f {
        format!("{}{digits}", "0".repeat(f + 1 - digits.len()))
    } else {
        digits
    };
    let (int, fr) = padded.split_at(padded.len() - f);
    let fr = fr.trim_end_matches('0');
    let sign = if bits < 0 { "-" } else { "" };
    if fr.is_empty() {
        format!("{sign}{int}")
    } else {
        format!("{sign}{int}.{fr}")
    }
}

impl VectorSet {
    /// All signals, inputs first.
    pub fn signals(&self) -> impl Iterator<Item = &Signal> {
        self.inputs.iter().chain(&self.outputs)
    }

    fn column(&self, k: usize) -> impl Iterator<Item = QValue> + '_ {
        let n_in = self.inputs.len();
        self.rows
            .iter()
            .map(move |(i, o)| if k < n_in { i[k] } else { o[k - n_in] })
    }

    /// The CSV: a header `index,x,x_hex,...,y,y_hex`, then one row per
    /// vector with each signal's exact decimal value and its bits in hex.
    ///
    /// # Errors
    /// Whatever writing to `w` returns.
    pub fn write_csv(&self, w: &mut dyn Write) -> io::Result<()> {
        write!(w, "index")?;
        for s in self.signals() {
            write!(w, ",{0},{0}_hex", s.name)?;
        }
        writeln!(w)?;
        for (r, (i, o)) in self.rows.iter().enumerate() {
            write!(w, "{r}")?;
            for v in i.iter().chain(o) {
                write!(w, ",{},{}", decimal_value(*v), hex_bits(*v))?;
            }
            writeln!(w)?;
        }
        Ok(())
    }

    /// One signal's values, one hex word per line (as Verilog's
    /// `$readmemh` and VHDL testbenches read them). `k` counts inputs
    /// first, then outputs.
    ///
    /// # Errors
    /// Whatever writing to `w` returns.
    pub fn write_hex(&self, k: usize, w: &mut dyn Write) -> io::Result<()> {
        for v in self.column(k) {
            writeln!(w, "{}", hex_bits(v))?;
        }
        Ok(())
    }

    /// Write `vectors.csv` and one `NAME.hex` per signal into `dir`
    /// (created if missing); returns the files written.
    ///
    /// # Errors
    /// [`VectorError::Io`] naming the file that could not be written.
    pub fn write_dir(&self, dir: &Path) -> Result<Vec<PathBuf>, VectorError> {
        let io_err = |p: &Path| {
            let path = p.display().to_string();
            move |source| VectorError::Io { path, source }
        };
        std::fs::create_dir_all(dir).map_err(io_err(dir))?;
        let mut written = Vec::new();
        let csv = dir.join("vectors.csv");
        let mut buf = Vec::new();
        self.write_csv(&mut buf).map_err(io_err(&csv))?;
        std::fs::write(&csv, buf).map_err(io_err(&csv))?;
        written.push(csv);
        for (k, s) in self.signals().enumerate() {
            let p = dir.join(format!("{}.hex", s.name));
            let mut buf = Vec::new();
            self.write_hex(k, &mut buf).map_err(io_err(&p))?;
            std::fs::write(&p, buf).map_err(io_err(&p))?;
            written.push(p);
        }
        Ok(written)
    }
}

/// The error of one output over random vectors, binned.
#[derive(Clone, Debug, PartialEq)]
pub struct ErrorHistogram {
    /// The output's name.
    pub output: String,
    /// Left edge of the first bin (the sound bound's lower end).
    pub lo: f64,
    /// Right edge of the last bin (the sound bound's upper end).
    pub hi: f64,
    /// Counts per bin, equal widths over `[lo, hi]`.
    pub counts: Vec<u64>,
    /// Number of vectors.
    pub samples: u64,
    /// Smallest and largest error seen.
    pub seen: (f64, f64),
}

/// Error histograms of every output over `samples` random vectors from
/// `seed`, with `bins` bins spanning each output's sound bound in
/// `report`. Runs in parallel chunks; `progress` is called with the number
/// of vectors done after each chunk.
#[must_use]
pub fn error_histograms(
    path: &Datapath,
    report: &Report,
    samples: u64,
    seed: u64,
    bins: usize,
    progress: &(dyn Fn(u64) + Sync),
) -> Vec<ErrorHistogram> {
    const CHUNK: u64 = 256;
    let sampler = Sampler::new(path);
    let outs: Vec<usize> = path.outputs().iter().map(|o| o.node.0).collect();
    let n_nodes = path.nodes().len();
    let done = std::sync::atomic::AtomicU64::new(0);
    let errors: Vec<Vec<f64>> = (0..samples.div_ceil(CHUNK))
        .into_par_iter()
        .map(|c| {
            let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x4157_0641);
            rng.set_stream(c);
            let count = CHUNK.min(samples - c * CHUNK);
            let mut out = vec![Vec::with_capacity(count as usize); outs.len()];
            let mut words = vec![0u64; n_nodes];
            for _ in 0..count {
                let v = sampler.random(&mut rng);
                for w in &mut words {
                    *w = rng.random();
                }
                let (fixed, _) = sampler.simulator().eval_fixed(&v, &words);
                let exact = sampler.simulator().eval_exact(&v);
                for (k, &o) in outs.iter().enumerate() {
                    let e = Rational::from(&qvalue_to_rational(fixed[o]) - &exact[o]);
                    out[k].push(e.to_f64());
                }
            }
            let d = done.fetch_add(count, std::sync::atomic::Ordering::Relaxed) + count;
            progress(d);
            out
        })
        .reduce(
            || vec![Vec::new(); outs.len()],
            |mut a, b| {
                for (x, y) in a.iter_mut().zip(b) {
                    x.extend(y);
                }
                a
            },
        );
    let bins = bins.max(1);
    report
        .outputs
        .iter()
        .zip(errors)
        .map(|(o, errs)| {
            let (mut lo, mut hi) = (o.error.lo.approx, o.error.hi.approx);
            let seen = errs
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |a, &e| {
                    (a.0.min(e), a.1.max(e))
                });
            if !errs.is_empty() {
                lo = lo.min(seen.0);
                hi = hi.max(seen.1);
            }
            let mut counts = vec![0u64; bins];
            let width = hi - lo;
            for e in &errs {
                let b = if width > 0.0 {
                    (((e - lo) / width) * bins as f64).floor() as usize
                } else {
                    0
                };
                counts[b.min(bins - 1)] += 1;
            }
            ErrorHistogram {
                output: o.name.clone(),
                lo,
                hi,
                counts,
                samples: errs.len() as u64,
                seen: if errs.is_empty() { (0.0, 0.0) } else { seen },
            }
        })
        .collect()
}
