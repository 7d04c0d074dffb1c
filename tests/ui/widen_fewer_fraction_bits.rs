// Q1.15 -> Q1.8 drops fraction bits: `widen` must not compile.
use qbound::Q;

fn main() {
    let x = Q::<1, 15>::ZERO;
    let _y: Q<1, 8> = x.widen();
}
