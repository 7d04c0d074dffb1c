// A NaN has no fixed-point value: the constant fails to build.
use qbound::{qconst, Q};

const BAD: Q<3, 4> = qconst!(Q<3, 4>, f64 f64::NAN);

fn main() {
    let _ = BAD;
}
