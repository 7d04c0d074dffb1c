// A product of Q63.0 and Q64.0 would need 129 bits.
use qbound::Q;

fn main() {
    let a = Q::<63, 0>::ZERO;
    let b = Q::<64, 0>::ZERO;
    let _p = a * b;
}
