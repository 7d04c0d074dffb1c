// The same-format families take a right side of the same format.
use qbound::Q;

fn main() {
    let a = Q::<7, 8>::ZERO;
    let b = Q::<3, 12>::ZERO;
    let _s = a.saturating_add(b);
}
