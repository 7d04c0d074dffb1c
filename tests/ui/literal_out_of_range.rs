// A literal outside the format's range must stop the build: Q3.4 ends
// below 8.
use qbound::{qconst, Q};

const LIMIT: Q<3, 4> = qconst!(Q<3, 4>, "8.0");

fn main() {
    let _ = LIMIT;
}
