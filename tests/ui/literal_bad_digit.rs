// A malformed decimal literal must stop the build.
use qbound::{qconst, Q};

const GAIN: Q<3, 12> = qconst!(Q<3, 12>, "1.2.5");

fn main() {
    let _ = GAIN;
}
