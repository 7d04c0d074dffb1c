// Q7.8 -> Q3.8 drops integer bits: `widen` must not compile.
use qbound::Q;

fn main() {
    let x = Q::<7, 8>::ZERO;
    let _y: Q<3, 8> = x.widen();
}
