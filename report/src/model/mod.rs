//! The datapath model: a graph of fixed-point operations, held as a vector
//! of nodes in topological order (every operand index is smaller than the
//! index of the node that uses it, by construction).
//!
//! Build one with [`Builder`] or parse one from text with
//! [`crate::parse()`]. Formats come from `qbound`'s format algebra, so a
//! node's format here is exactly the type the typed library would give.
//!
//! # Adding a delay node (state)
//!
//! Datapaths with state (IIR filters, control loops) need a `Delay` node
//! whose operand may be a *later* node (the feedback edge). The model is
//! ready for it:
//! - a delay's output is a *state input*: a node with no operand at
//!   evaluation time, exactly like [`Op::Input`], whose value at step `t`
//!   is the operand's value at step `t - 1`. Evaluation order stays the
//!   vector order; the feedback edge is resolved between steps, so the
//!   topological invariant holds for every edge except the delay's, which
//!   is checked separately (the delayed node must have the delay's format);
//! - bounding: the analysis already keeps every error source as its own
//!   affine term. For a loop, the error (and range) of the state is the
//!   sum over the impulse response from each source to the state: with the
//!   loop's impulse response `h` the bound of source `s` is
//!   `sum_t |h_s[t]| * |eps_s|`, summed to a tail bound (geometric, from the
//!   spectral radius) in exact rationals. The per-node transfer from each
//!   source is what the affine forms of one evaluation pass compute, so
//!   the loop analysis iterates that pass on the impulse input;
//! - simulation runs sequences instead of single vectors, carrying state.

pub mod parse;

use std::fmt;

use crate::arith::{Num, ceil_to_grid, floor_to_grid, format_range, round_to_grid};
use qbound::{Format, Overflow, Rounding};

/// The index of a node in its [`Datapath`].
#[derive(
    Clone, Copy, PartialEq, Eq, Hash, Debug, PartialOrd, Ord, serde::Serialize, serde::Deserialize,
)]
pub struct NodeId(pub usize);

/// A place in the source text: 1-based line and column.
#[derive(
    Clone, Copy, PartialEq, Eq, Hash, Debug, Default, serde::Serialize, serde::Deserialize,
)]
pub struct Span {
    /// Line, from 1.
    pub line: usize,
    /// Column (in characters), from 1.
    pub column: usize,
}

impl fmt::Display for Span {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}:{}", self.line, self.column)
    }
}

/// How an input's values reach the datapath.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub enum InputKind {
    /// Already fixed-point data in the input's format: the ideal value is
    /// the stored value, no error.
    Exact,
    /// A real signal in the stated range, quantized into the format with
    /// this rounding mode (an ADC, a sensor read-out, a float converted at
    /// the boundary). If rounding can pass the format's range the
    /// converter saturates.
    Quantized(Rounding),
}

/// The operation of a node.
#[derive(Clone, Debug, PartialEq)]
pub enum Op {
    /// An input with a real range `[lo, hi]` (exact decimals).
    Input {
        /// Smallest value.
        lo: Num,
        /// Largest value.
        hi: Num,
        /// Exact data or a quantized real signal.
        kind: InputKind,
    },
    /// A constant: the exact decimal `value`, rounded into the node's format
    /// with `rounding` (its quantization error is a known number).
    Const {
        /// The exact (design) value.
        value: Num,
        /// How it was rounded into the format.
        rounding: Rounding,
    },
    /// Exact sum.
    Add(NodeId, NodeId),
    /// Exact difference.
    Sub(NodeId, NodeId),
    /// Exact negation.
    Neg(NodeId),
    /// Exact product.
    Mul(NodeId, NodeId),
    /// Multiplication by `2^k` (exact; only the format changes).
    Shift(NodeId, i32),
    /// Explicit narrowing (or widening) into the node's format.
    Rescale {
        /// The operand.
        src: NodeId,
        /// Rounding of the discarded fraction bits.
        rounding: Rounding,
        /// What happens if the rounded value does not fit.
        overflow: Overflow,
    },
}

impl Op {
    /// The operand nodes.
    #[must_use]
    pub fn operands(&self) -> Vec<NodeId> {
        match *self {
            Op::Input { .. } | Op::Const { .. } => vec![],
            Op::Add(a, b) | Op::Sub(a, b) | Op::Mul(a, b) => vec![a, b],
            Op::Neg(a) | Op::Shift(a, _) | Op::Rescale { src: a, .. } => vec![a],
        }
    }

    /// A short name of the operation kind (`input`, `const`, `add`, ...).
    #[must_use]
    pub fn kind_name(&self) -> &'static str {
        match self {
            Op::Input { .. } => "input",
            Op::Const { .. } => "const",
            Op::Add(..) => "add",
            Op::Sub(..) => "sub",
            Op::Neg(..) => "neg",
            Op::Mul(..) => "mul",
            Op::Shift(..) => "shift",
            Op::Rescale { .. } => "rescale",
        }
    }
}

/// One node: an operation, its format, an optional name and where it was
/// written.
#[derive(Clone, Debug, PartialEq)]
pub struct Node {
    /// The operation.
    pub op: Op,
    /// The node's format.
    pub format: Format,
    /// The name given in the builder or the text (`None` for intermediate
    /// results of an expression).
    pub name: Option<String>,
    /// Where the node was written, if it came from text.
    pub span: Option<Span>,
}

/// An error budget for an output.
#[derive(Clone, Debug, PartialEq)]
pub enum Budget {
    /// At most this absolute error.
    Absolute(Num),
    /// At most this many ulps of the output's format.
    Ulps(Num),
}

impl Budget {
    /// The budget as an absolute error for an output of format `f`.
    #[must_use]
    pub fn absolute(&self, f: Format) -> Num {
        match self {
            Budget::Absolute(x) => x.clone(),
            Budget::Ulps(n) => n * crate::arith::ulp(f),
        }
    }
}

/// A named output.
#[derive(Clone, Debug, PartialEq)]
pub struct Output {
    /// The output's name.
    pub name: String,
    /// The node it reads.
    pub node: NodeId,
    /// Its error budget, if any.
    pub budget: Option<Budget>,
}

/// A validated datapath: nodes in topological order and named outputs.
#[derive(Clone, Debug, PartialEq, Default)]
pub struct Datapath {
    nodes: Vec<Node>,
    outputs: Vec<Output>,
}

impl Datapath {
    /// The nodes, in evaluation order.
    #[must_use]
    pub fn nodes(&self) -> &[Node] {
        &self.nodes
    }

    /// The outputs.
    #[must_use]
    pub fn outputs(&self) -> &[Output] {
        &self.outputs
    }

    /// The node `id`.
    #[must_use]
    pub fn node(&self, id: NodeId) -> &Node {
        &self.nodes[id.0]
    }

    /// The input nodes, in order.
    #[must_use]
    pub fn inputs(&self) -> Vec<NodeId> {
        (0..self.nodes.len())
            .filter(|&i| matches!(self.nodes[i].op, Op::Input { .. }))
            .map(NodeId)
            .collect()
    }

    /// A label for node `id`: its name, or `#id` with its operation.
    #[must_use]
    pub fn label(&self, id: NodeId) -> String {
        match &self.nodes[id.0].name {
            Some(n) => n.clone(),
            None => format!("#{} ({})", id.0, self.nodes[id.0].op.kind_name()),
        }
    }
}

/// Why a datapath could not be built.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum ModelError {
    /// An operand refers to a node that does not exist (yet).
    #[error("node #{0} does not exist")]
    NoSuchNode(usize),
    /// A result format would pass 128 bits.
    #[error("{what}: {source}")]
    Format {
        /// What was being built.
        what: String,
        /// The format error.
        source: qbound::FormatError,
    },
    /// An input range with `lo > hi`.
    #[error("input {name}: the range is empty (lower end {lo} above upper end {hi})")]
    EmptyRange {
        /// Input name.
        name: String,
        /// Lower end.
        lo: String,
        /// Upper end.
        hi: String,
    },
    /// An input range outside the format.
    #[error("input {name}: {detail}")]
    RangeOutsideFormat {
        /// Input name.
        name: String,
        /// What is wrong.
        detail: String,
    },
    /// A constant that does not fit its format after rounding.
    #[error("constant {name}: {value} does not fit {format} after rounding")]
    ConstantOutOfRange {
        /// Constant name.
        name: String,
        /// Its value as written.
        value: String,
        /// The format.
        format: Format,
    },
    /// A name used twice.
    #[error("the name {0} is already used")]
    DuplicateName(String),
    /// A budget that is negative.
    #[error("output {0}: the budget must not be negative")]
    NegativeBudget(String),
    /// A shift so large that no format holds the result.
    #[error("shift by {0} is out of range (|k| <= 256)")]
    ShiftOutOfRange(i32),
}

/// Builds a [`Datapath`] node by node; each method checks its operation and
/// returns the new node's id.
///
/// ```
/// use qbound::{Format, Overflow, Rounding};
/// use qbound_report::{Builder, InputKind};
/// use qbound_report::arith::Num;
/// let q15 = Format::signed(0, 15)?;
/// let mut b = Builder::new();
/// let x = b.input("x", q15, Num::from(-1), Num::dyadic(32767, -15), InputKind::Exact)?;
/// let c = b.constant("c", qbound_report::parse_decimal("0.3").unwrap(), q15, Rounding::NearestTiesEven)?;
/// let p = b.mul(x, c)?;                       // Q1.30, exact
/// let y = b.rescale(p, q15, Rounding::NearestTiesEven, Overflow::Saturate)?;
/// b.output("y", y, None)?;
/// let path = b.build();
/// assert_eq!(path.node(p).format, Format::signed(1, 30)?);
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
#[derive(Clone, Debug, Default)]
pub struct Builder {
    path: Datapath,
    names: std::collections::HashSet<String>,
}

impl Builder {
    /// An empty builder.
    #[must_use]
    pub fn new() -> Builder {
        Builder::default()
    }

    /// Number of nodes so far.
    #[must_use]
    pub fn len(&self) -> usize {
        self.path.nodes.len()
    }

    /// Whether no node was added yet.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.path.nodes.is_empty()
    }

    /// The format of node `id`.
    ///
    /// # Panics
    /// If `id` does not exist.
    #[must_use]
    pub fn format_of(&self, id: NodeId) -> Format {
        self.path.nodes[id.0].format
    }

    /// The name of node `id`, if it has one.
    #[must_use]
    pub fn name_of(&self, id: NodeId) -> Option<String> {
        self.path.nodes.get(id.0).and_then(|n| n.name.clone())
    }

    fn check(&self, id: NodeId) -> Result<Format, ModelError> {
        self.path
            .nodes
            .get(id.0)
            .map(|n| n.format)
            .ok_or(ModelError::NoSuchNode(id.0))
    }

    fn claim(&mut self, name: &str) -> Result<(), ModelError> {
        if !self.names.insert(name.to_owned()) {
            return Err(ModelError::DuplicateName(name.to_owned()));
        }
        Ok(())
    }

    fn push(&mut self, op: Op, format: Format) -> NodeId {
        self.path.nodes.push(Node {
            op,
            format,
            name: None,
            span: None,
        });
        NodeId(self.path.nodes.len() - 1)
    }

    /// Give node `id` a name (for reports). Names are unique.
    ///
    /// # Errors
    /// If the name is taken or the node does not exist.
    pub fn name(&mut self, id: NodeId, name: &str) -> Result<(), ModelError> {
        self.check(id)?;
        self.claim(name)?;
        self.path.nodes[id.0].name = Some(name.to_owned());
        Ok(())
    }

    /// Record where node `id` was written.
    pub fn set_span(&mut self, id: NodeId, span: Span) {
        if let Some(n) = self.path.nodes.get_mut(id.0) {
            n.span = Some(span);
        }
    }

    /// An input of `format` with values in `[lo, hi]`.
    ///
    /// # Errors
    /// If the range is empty or does not fit the format (for exact data:
    /// no format value in the range, or a range end outside the format;
    /// for a quantized signal: a range end outside the format by more than
    /// the rounding can absorb is still allowed, it saturates, but a range
    /// wholly outside is an error).
    pub fn input(
        &mut self,
        name: &str,
        format: Format,
        lo: Num,
        hi: Num,
        kind: InputKind,
    ) -> Result<NodeId, ModelError> {
        if lo > hi {
            return Err(ModelError::EmptyRange {
                name: name.to_owned(),
                lo: crate::arith::decimal_text(&lo),
                hi: crate::arith::decimal_text(&hi),
            });
        }
        let fr = format_range(format);
        let dt = crate::arith::decimal_text;
        let (lo_t, hi_t) = (dt(&lo), dt(&hi));
        let detail = match kind {
            InputKind::Exact => {
                if lo < fr.lo || hi > fr.hi {
                    Some(format!(
                        "the range [{lo_t}, {hi_t}] passes the range of {format} [{}, {}]",
                        dt(&fr.lo),
                        dt(&fr.hi)
                    ))
                } else if ceil_to_grid(&lo, format.frac_bits())
                    > floor_to_grid(&hi, format.frac_bits())
                {
                    Some(format!("no value of {format} lies in [{lo_t}, {hi_t}]"))
                } else {
                    None
                }
            }
            InputKind::Quantized(_) => (hi < fr.lo || lo > fr.hi)
                .then(|| format!("the range [{lo_t}, {hi_t}] lies outside the range of {format}")),
        };
        if let Some(detail) = detail {
            return Err(ModelError::RangeOutsideFormat {
                name: name.to_owned(),
                detail,
            });
        }
        self.claim(name)?;
        let id = self.push(Op::Input { lo, hi, kind }, format);
        self.path.nodes[id.0].name = Some(name.to_owned());
        Ok(id)
    }

    /// A constant: the exact `value` rounded into `format`.
    ///
    /// # Errors
    /// If the rounded value does not fit the format, or the name is taken.
    pub fn constant(
        &mut self,
        name: &str,
        value: Num,
        format: Format,
        rounding: Rounding,
    ) -> Result<NodeId, ModelError> {
        let q = round_to_grid(&value, format.frac_bits(), rounding);
        if !format_range(format).contains(&q) {
            return Err(ModelError::ConstantOutOfRange {
                name: name.to_owned(),
                value: crate::arith::decimal_text(&value),
                format,
            });
        }
        self.claim(name)?;
        let id = self.push(Op::Const { value, rounding }, format);
        self.path.nodes[id.0].name = Some(name.to_owned());
        Ok(id)
    }

    fn binary(
        &mut self,
        a: NodeId,
        b: NodeId,
        what: &str,
        op: Op,
        rule: fn(Format, Format) -> Result<Format, qbound::FormatError>,
    ) -> Result<NodeId, ModelError> {
        let (fa, fb) = (self.check(a)?, self.check(b)?);
        let f = rule(fa, fb).map_err(|source| ModelError::Format {
            what: format!("{what} of {fa} and {fb}"),
            source,
        })?;
        Ok(self.push(op, f))
    }

    /// The exact sum `a + b` (format from [`Format::sum`]).
    ///
    /// # Errors
    /// If an operand does not exist or the sum would pass 128 bits.
    pub fn add(&mut self, a: NodeId, b: NodeId) -> Result<NodeId, ModelError> {
        self.binary(a, b, "sum", Op::Add(a, b), Format::sum)
    }

    /// The exact difference `a - b` (format from [`Format::difference`]).
    ///
    /// # Errors
    /// If an operand does not exist or the result would pass 128 bits.
    pub fn sub(&mut self, a: NodeId, b: NodeId) -> Result<NodeId, ModelError> {
        self.binary(a, b, "difference", Op::Sub(a, b), Format::difference)
    }

    /// The exact product `a * b` (format from [`Format::product`]).
    ///
    /// # Errors
    /// If an operand does not exist or the product would pass 128 bits.
    pub fn mul(&mut self, a: NodeId, b: NodeId) -> Result<NodeId, ModelError> {
        self.binary(a, b, "product", Op::Mul(a, b), Format::product)
    }

    /// The exact negation `-a` (format from [`Format::negation`]).
    ///
    /// # Errors
    /// If the operand does not exist or the result would pass 128 bits.
    pub fn neg(&mut self, a: NodeId) -> Result<NodeId, ModelError> {
        let fa = self.check(a)?;
        let f = Format::negation(fa).map_err(|source| ModelError::Format {
            what: format!("negation of {fa}"),
            source,
        })?;
        Ok(self.push(Op::Neg(a), f))
    }

    /// `a × 2^k`, exact: the binary point moves, the bits stay. The result
    /// format of `Q(I, F)` is `Q(max(I + k, 0), max(F - k, 0))` (the same
    /// signedness); when `k > F` the low bits are filled with zeros, when
    /// `k < -I` the high bits are sign bits, so no bit is ever lost.
    ///
    /// # Errors
    /// If the operand does not exist, `|k| > 256`, or the result would pass
    /// 128 bits.
    pub fn shift(&mut self, a: NodeId, k: i32) -> Result<NodeId, ModelError> {
        let fa = self.check(a)?;
        let f = shift_format(fa, k)?;
        Ok(self.push(Op::Shift(a, k), f))
    }

    /// Rescale `a` into `format` with a rounding and an overflow mode.
    ///
    /// # Errors
    /// If the operand does not exist.
    pub fn rescale(
        &mut self,
        a: NodeId,
        format: Format,
        rounding: Rounding,
        overflow: Overflow,
    ) -> Result<NodeId, ModelError> {
        self.check(a)?;
        Ok(self.push(
            Op::Rescale {
                src: a,
                rounding,
                overflow,
            },
            format,
        ))
    }

    /// Declare a named output reading node `node`, with an optional budget.
    ///
    /// # Errors
    /// If the node does not exist, the output name is taken by another
    /// output, or the budget is negative.
    pub fn output(
        &mut self,
        name: &str,
        node: NodeId,
        budget: Option<Budget>,
    ) -> Result<(), ModelError> {
        self.check(node)?;
        if self.path.outputs.iter().any(|o| o.name == name) {
            return Err(ModelError::DuplicateName(name.to_owned()));
        }
        if let Some(Budget::Absolute(x) | Budget::Ulps(x)) = &budget {
            if x.is_negative() {
                return Err(ModelError::NegativeBudget(name.to_owned()));
            }
        }
        self.path.outputs.push(Output {
            name: name.to_owned(),
            node,
            budget,
        });
        Ok(())
    }

    /// The finished datapath.
    #[must_use]
    pub fn build(self) -> Datapath {
        self.path
    }
}

/// The format of `Q(I, F) × 2^k`: `Q(max(I + k, 0), max(F - k, 0))`.
///
/// # Errors
/// If `|k| > 256` or the result would pass 128 bits.
pub fn shift_format(f: Format, k: i32) -> Result<Format, ModelError> {
    if k.unsigned_abs() > 256 {
        return Err(ModelError::ShiftOutOfRange(k));
    }
    let i = (i64::from(f.int_bits()) + i64::from(k)).max(0);
    let fr = (i64::from(f.frac_bits()) - i64::from(k)).max(0);
    let clamp = |x: i64| u32::try_from(x.min(1000)).unwrap_or(1000);
    Format::new(f.is_signed(), clamp(i), clamp(fr)).map_err(|source| ModelError::Format {
        what: format!("{f} shifted by {k}"),
        source,
    })
}
