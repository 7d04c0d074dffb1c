//! Evaluation of one input vector: the fixed-point side with `qbound`'s
//! [`QValue`] kernels (bit-exact), the ideal side with exact numbers.
//!
//! The exact side never needs a general rational: fixed-point values are
//! dyadic and the decimals of constants and inputs only add powers of 5
//! (see [`crate::arith::Num`]), so sums and products stay on the native
//! 128-bit fast path for all but very wide datapaths.

use qbound::{Format, Overflow, QValue, Rounding, Wide};

use crate::arith::{Num, format_range, num_to_qvalue, round_to_grid, wide_to_num};
use crate::model::{Datapath, InputKind, NodeId, Op};

/// One input value: the ideal (real) value and the fixed-point value that
/// enters the datapath.
#[derive(Clone, Debug)]
pub struct InputValue {
    /// The ideal value.
    pub ideal: Num,
    /// The quantized value.
    pub actual: QValue,
}

/// A prepared evaluator for one datapath.
#[derive(Debug)]
pub struct Simulator<'a> {
    path: &'a Datapath,
    consts: Vec<Option<QValue>>,
    inputs: Vec<NodeId>,
}

impl<'a> Simulator<'a> {
    /// Prepare `path` for evaluation.
    ///
    /// # Panics
    /// If a constant does not fit its format (the builder prevents that).
    #[must_use]
    pub fn new(path: &'a Datapath) -> Simulator<'a> {
        let consts = path
            .nodes()
            .iter()
            .map(|n| match &n.op {
                Op::Const { value, rounding } => Some(
                    num_to_qvalue(
                        &round_to_grid(value, n.format.frac_bits(), *rounding),
                        n.format,
                    )
                    .expect("checked by the builder"),
                ),
                _ => None,
            })
            .collect();
        Simulator {
            path,
            consts,
            inputs: path.inputs(),
        }
    }

    /// The datapath.
    #[must_use]
    pub fn path(&self) -> &'a Datapath {
        self.path
    }

    /// The input nodes, in the order vectors list them.
    #[must_use]
    pub fn inputs(&self) -> &[NodeId] {
        &self.inputs
    }

    /// The input value for the ideal value `x` of input `k` (quantized if
    /// the input is a quantized real signal; `word` drives stochastic
    /// rounding).
    ///
    /// # Panics
    /// If an exact input's value is not on its grid or outside its format.
    #[must_use]
    pub fn input_value(&self, k: usize, x: Num, word: u64) -> InputValue {
        let n = self.path.node(self.inputs[k]);
        let f = n.format;
        let q = match &n.op {
            Op::Input {
                kind: InputKind::Quantized(mode),
                ..
            } => {
                let r = match mode {
                    Rounding::Stochastic(_) => stochastic_round(&x, f.frac_bits(), word),
                    m => round_to_grid(&x, f.frac_bits(), *m),
                };
                let fr = format_range(f);
                if r > fr.hi {
                    fr.hi
                } else if r < fr.lo {
                    fr.lo
                } else {
                    r
                }
            }
            _ => x.clone(),
        };
        InputValue {
            actual: num_to_qvalue(&q, f).expect("input value on the grid and in range"),
            ideal: x,
        }
    }

    /// Evaluate the fixed-point side: every node's actual value, and for
    /// each node whether its overflow mode acted. `words` feeds stochastic
    /// roundings (one word per node, reused if short).
    #[must_use]
    pub fn eval_fixed(&self, inputs: &[InputValue], words: &[u64]) -> (Vec<QValue>, Vec<bool>) {
        let mut v = Vec::with_capacity(self.path.nodes().len());
        let mut ovf = Vec::with_capacity(self.path.nodes().len());
        self.eval_fixed_into(inputs, words, &mut v, &mut ovf);
        (v, ovf)
    }

    /// [`Simulator::eval_fixed`] into reused buffers.
    pub fn eval_fixed_into(
        &self,
        inputs: &[InputValue],
        words: &[u64],
        v: &mut Vec<QValue>,
        ovf: &mut Vec<bool>,
    ) {
        v.clear();
        ovf.clear();
        let mut k = 0;
        for (i, n) in self.path.nodes().iter().enumerate() {
            let mut o = false;
            let x = match &n.op {
                Op::Input { .. } => {
                    k += 1;
                    inputs[k - 1].actual
                }
                Op::Const { .. } => self.consts[i].expect("constant"),
                Op::Add(a, b) => v[a.0].exact_add(v[b.0]).expect("format checked"),
                Op::Sub(a, b) => v[a.0].exact_sub(v[b.0]).expect("format checked"),
                Op::Mul(a, b) => v[a.0].exact_mul(v[b.0]).expect("format checked"),
                Op::Neg(a) => v[a.0].exact_neg().expect("format checked"),
                Op::Shift(a, s) => shift_value(v[a.0], *s, n.format),
                Op::Rescale {
                    src,
                    rounding,
                    overflow,
                } => {
                    let rnd = match rounding {
                        Rounding::Stochastic(_) => Rounding::Stochastic(
                            words.get(i % words.len().max(1)).copied().unwrap_or(0),
                        ),
                        r => *r,
                    };
                    let mode = if *overflow == Overflow::Panic {
                        Overflow::Saturate
                    } else {
                        *overflow
                    };
                    let r = v[src.0].rescale(n.format, rnd, mode);
                    o = match v[src.0].try_rescale(n.format, rnd) {
                        Ok(t) => t.bits() != r.bits(),
                        Err(_) => true,
                    };
                    r
                }
            };
            v.push(x);
            ovf.push(o);
        }
    }

    /// Evaluate the exact side: every node's ideal value.
    #[must_use]
    pub fn eval_exact(&self, inputs: &[InputValue]) -> Vec<Num> {
        let mut v = Vec::with_capacity(self.path.nodes().len());
        self.eval_exact_into(inputs, &mut v);
        v
    }

    /// [`Simulator::eval_exact`] into a reused buffer.
    pub fn eval_exact_into(&self, inputs: &[InputValue], v: &mut Vec<Num>) {
        v.clear();
        let mut k = 0;
        for n in self.path.nodes() {
            let x = match &n.op {
                Op::Input { .. } => {
                    k += 1;
                    inputs[k - 1].ideal.clone()
                }
                Op::Const { value, .. } => value.clone(),
                Op::Add(a, b) => &v[a.0] + &v[b.0],
                Op::Sub(a, b) => &v[a.0] - &v[b.0],
                Op::Mul(a, b) => &v[a.0] * &v[b.0],
                Op::Neg(a) => -&v[a.0],
                Op::Shift(a, s) => v[a.0].mul_pow2(i64::from(*s)),
                Op::Rescale { src, .. } => v[src.0].clone(),
            };
            v.push(x);
        }
    }
}

/// Stochastic rounding as the library does it: up exactly when `word` is
/// below the discarded fraction scaled by 2^64.
fn stochastic_round(x: &Num, frac: u32, word: u64) -> Num {
    let fl = crate::arith::floor_to_grid(x, frac);
    if fl == *x {
        return fl;
    }
    let scaled = (x - &fl).mul_pow2(64 + i64::from(frac)).floor();
    let frac64 = scaled.to_i128().map_or(u64::MAX, |v| v as u64);
    if word < frac64 {
        crate::arith::ceil_to_grid(x, frac)
    } else {
        fl
    }
}

/// `v × 2^s` in `f` (the format [`crate::model::shift_format`] gives): the
/// bits move left by `max(0, s - F)`, otherwise only the format changes.
fn shift_value(v: QValue, s: i32, f: Format) -> QValue {
    let src_f = i64::from(v.format().frac_bits());
    let left = (i64::from(s) - src_f + i64::from(f.frac_bits())).max(0);
    let bits = if left == 0 {
        v.bits()
    } else {
        let b = wide_to_num(v.bits()).mul_pow2(left);
        if f.is_signed() {
            Wide::from_i128(b.to_i128().expect("fits by format"))
        } else {
            Wide::from_u128(
                b.to_ibig()
                    .and_then(|x| u128::try_from(&x).ok())
                    .expect("fits by format"),
            )
        }
    };
    QValue::new(f, bits).expect("shift is exact")
}
