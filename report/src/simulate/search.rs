//! The worst-case search at one output: coordinate ascent over the corners
//! of the input box, then a residue walk that moves one input at a time a
//! few ulps inward (which steers the residues that the roundings discard
//! toward their worst case).

use super::{Acc, Run, Scratch, SimulationError};
use crate::arith::Num;

/// Search from the corner `start` for the largest (`maximize`) or smallest
/// error of node `out`; every vector is recorded in the returned [`Acc`].
pub(super) fn search(
    run: &Run<'_>,
    start: &[bool],
    out: usize,
    maximize: bool,
    steps: u32,
) -> Result<Acc, SimulationError> {
    let mut acc = run.new_acc();
    let mut s = Scratch::default();
    let words = vec![u64::MAX / 2; run.analysis.nodes.len()];
    let better = |a: &Num, b: &Num| if maximize { a > b } else { a < b };
    let mut bits = start.to_vec();
    let mut eval = |acc: &mut Acc, v: &[super::InputValue]| -> Result<Num, SimulationError> {
        run.record(acc, &mut s, v, &words, false)?;
        Ok(s.errs[out].clone())
    };
    let mut cur = eval(&mut acc, &run.sampler.corner(|k| bits[k]))?;
    for _ in 0..4 {
        let mut changed = false;
        for k in 0..bits.len() {
            bits[k] = !bits[k];
            let e = eval(&mut acc, &run.sampler.corner(|j| bits[j]))?;
            if better(&e, &cur) {
                cur = e;
                changed = true;
            } else {
                bits[k] = !bits[k];
            }
        }
        if !changed {
            break;
        }
    }
    let mut xs: Vec<Num> = bits
        .iter()
        .enumerate()
        .map(|(k, &up)| {
            let (lo, hi) = run.sampler.ends(k);
            if up { hi.clone() } else { lo.clone() }
        })
        .collect();
    for _ in 0..2 {
        let mut changed = false;
        for k in 0..xs.len() {
            let (lo, hi) = run.sampler.ends(k);
            let (lo, hi) = (lo.clone(), hi.clone());
            let step = run.sampler.step(k).clone();
            let inward = if xs[k] == hi { -1i64 } else { 1 };
            let mut best_x = xs[k].clone();
            for d in 1..=steps {
                let x = &xs[k] + Num::from(inward * i64::from(d)) * &step;
                if x < lo || x > hi {
                    break;
                }
                let old = std::mem::replace(&mut xs[k], x);
                let e = eval(&mut acc, &run.sampler.at(&xs))?;
                if better(&e, &cur) {
                    cur = e;
                    best_x.clone_from(&xs[k]);
                    changed = true;
                }
                xs[k] = old;
            }
            xs[k] = best_x;
        }
        if !changed {
            break;
        }
    }
    Ok(acc)
}
