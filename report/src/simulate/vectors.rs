//! Bit-exact test vectors for firmware and HDL testbenches: seeded input
//! vectors and the fixed-point outputs the datapath computes from them,
//! evaluated with the engine's [`Simulator`] (`qbound`'s kernels). The same
//! seed gives the same vectors on every machine.
//!
//! Test vectors start with every corner of the input box (each input at
//! an end of its range) when there are at most 64 corners and they take
//! at most a quarter of the count: corners are where saturation and wrap
//! happen, and where an HDL datapath most often differs from its model.
//! The rest are random (see [`super::sample`]).
//!
//! Rows are computed as they are written: memory does not grow with the
//! count.
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

use std::fs::File;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};

use qbound::{Format, Overflow, QValue, Rounding};
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;

use super::{Sampler, Simulator};
use crate::arith::qvalue_to_num;
use crate::model::{Datapath, NodeId, Op};

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

/// Bit-exact test vectors for one datapath: the plan of the rows (which
/// are computed as they are written).
#[derive(Debug)]
pub struct VectorSet<'a> {
    /// The inputs, in declaration order.
    pub inputs: Vec<Signal>,
    /// The outputs, in declaration order.
    pub outputs: Vec<Signal>,
    /// Number of rows.
    pub count: u64,
    /// How many of the first rows are corners of the input box.
    pub corners: u64,
    seed: u64,
    sampler: Sampler<'a>,
    /// Nodes whose overflow mode is `panic`.
    panics: Vec<usize>,
}

/// One row: input values, output values, and whether a rescale whose
/// overflow mode is `panic` overflowed (the row then holds the saturated
/// result, which a panicking firmware never produces).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Row {
    /// Input values, in declaration order.
    pub inputs: Vec<QValue>,
    /// Output values, in declaration order.
    pub outputs: Vec<QValue>,
    /// Whether a `panic` rescale overflowed for this row.
    pub panicked: bool,
}

/// What writing the vectors found.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct VectorStats {
    /// Rows written.
    pub rows: u64,
    /// Rows in which a rescale with overflow mode `panic` overflowed.
    pub panicked_rows: u64,
}

/// Test vectors for `path`: `count` rows (corners first, see the module
/// documentation), reproducible from `seed`.
///
/// # Errors
/// [`VectorError::Stochastic`] if a node rounds stochastically,
/// [`VectorError::NoOutput`] if there is no output.
pub fn test_vectors(path: &Datapath, count: u64, seed: u64) -> Result<VectorSet<'_>, VectorError> {
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
    let corners: u64 = if n_in <= 6 && (1u64 << n_in) * 4 <= count {
        1u64 << n_in
    } else {
        0
    };
    let inputs_of: Vec<NodeId> = sampler.simulator().inputs().to_vec();
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
    let panics = path
        .nodes()
        .iter()
        .enumerate()
        .filter(|(_, n)| {
            matches!(
                n.op,
                Op::Rescale {
                    overflow: Overflow::Panic,
                    ..
                }
            )
        })
        .map(|(i, _)| i)
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
        count,
        corners,
        seed,
        sampler,
        panics,
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
    qvalue_to_num(v).decimal_text()
}

impl VectorSet<'_> {
    /// All signals, inputs first.
    pub fn signals(&self) -> impl Iterator<Item = &Signal> {
        self.inputs.iter().chain(&self.outputs)
    }

    /// The rows, computed one by one.
    pub fn rows(&self) -> impl Iterator<Item = Row> + '_ {
        let mut rng = ChaCha8Rng::seed_from_u64(self.seed);
        let sim: &Simulator<'_> = self.sampler.simulator();
        let outs: Vec<usize> = sim.path().outputs().iter().map(|o| o.node.0).collect();
        let (mut fixed, mut ovf) = (Vec::new(), Vec::new());
        (0..self.count).map(move |r| {
            let v = if r < self.corners {
                self.sampler.corner(|k| (r >> k) & 1 == 1)
            } else {
                self.sampler.random(&mut rng)
            };
            sim.eval_fixed_into(&v, &[], &mut fixed, &mut ovf);
            Row {
                inputs: v.iter().map(|x| x.actual).collect(),
                outputs: outs.iter().map(|&o| fixed[o]).collect(),
                panicked: self.panics.iter().any(|&i| ovf[i]),
            }
        })
    }

    fn header(&self, w: &mut dyn Write) -> io::Result<()> {
        write!(w, "index")?;
        for s in self.signals() {
            write!(w, ",{0},{0}_hex", s.name)?;
        }
        writeln!(w)
    }

    fn csv_row(r: u64, row: &Row, w: &mut dyn Write) -> io::Result<()> {
        write!(w, "{r}")?;
        for v in row.inputs.iter().chain(&row.outputs) {
            write!(w, ",{},{}", decimal_value(*v), hex_bits(*v))?;
        }
        writeln!(w)
    }

    /// The CSV: a header `index,x,x_hex,...,y,y_hex`, then one row per
    /// vector with each signal's exact decimal value and its bits in hex.
    ///
    /// # Errors
    /// Whatever writing to `w` returns.
    pub fn write_csv(&self, w: &mut dyn Write) -> io::Result<VectorStats> {
        self.header(w)?;
        let mut stats = VectorStats::default();
        for (r, row) in self.rows().enumerate() {
            Self::csv_row(r as u64, &row, w)?;
            stats.rows += 1;
            stats.panicked_rows += u64::from(row.panicked);
        }
        Ok(stats)
    }

    /// Write `vectors.csv` and one `NAME.hex` per signal into `dir`
    /// (created if missing), one hex word per line as Verilog's `$readmemh`
    /// reads it, row by row; `progress` hears the rows done every 4096
    /// rows and stops the writing by returning `false` (the files then hold
    /// the rows so far). Returns the files written and what the rows
    /// showed.
    ///
    /// # Errors
    /// [`VectorError::Io`] naming the file that could not be written.
    pub fn write_dir(
        &self,
        dir: &Path,
        progress: &dyn Fn(u64) -> bool,
    ) -> Result<(Vec<PathBuf>, VectorStats), VectorError> {
        let io_err = |p: &Path| {
            let path = p.display().to_string();
            move |source| VectorError::Io { path, source }
        };
        std::fs::create_dir_all(dir).map_err(io_err(dir))?;
        let mut paths = vec![dir.join("vectors.csv")];
        paths.extend(self.signals().map(|s| dir.join(format!("{}.hex", s.name))));
        let mut files = paths
            .iter()
            .map(|p| File::create(p).map(BufWriter::new).map_err(io_err(p)))
            .collect::<Result<Vec<_>, _>>()?;
        self.header(&mut files[0]).map_err(io_err(&paths[0]))?;
        let mut stats = VectorStats::default();
        for (r, row) in self.rows().enumerate() {
            Self::csv_row(r as u64, &row, &mut files[0]).map_err(io_err(&paths[0]))?;
            for (k, v) in row.inputs.iter().chain(&row.outputs).enumerate() {
                writeln!(files[k + 1], "{}", hex_bits(*v)).map_err(io_err(&paths[k + 1]))?;
            }
            stats.rows += 1;
            stats.panicked_rows += u64::from(row.panicked);
            if stats.rows % 4096 == 0 && !progress(stats.rows) {
                break;
            }
        }
        for (f, p) in files.iter_mut().zip(&paths) {
            f.flush().map_err(io_err(p))?;
        }
        Ok((paths, stats))
    }
}
