// A signed value cannot widen into an unsigned format.
use qbound::{Q, UQ};

fn main() {
    let x = Q::<3, 4>::ZERO;
    let _y: UQ<8, 8> = x.widen();
}
