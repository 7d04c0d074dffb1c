//! Malformed audit text: every case gives an error with a line and column,
//! never a panic.

use qbound_report::parse;

/// `(text, line, column, fragment of the message)`.
const CASES: &[(&str, usize, usize, &str)] = &[
    ("inptu x : Q0.15 in [-1, 1]", 1, 1, "a statement"),
    ("input : Q0.15 in [-1, 1]", 1, 7, "an input name"),
    ("input x Q0.15 in [-1, 1]", 1, 9, "`:`"),
    ("input x : Q0.x in [-1, 1]", 1, 11, "a format"),
    ("input x : Q200.15 in [-1, 1]", 1, 11, "widest supported"),
    ("input x : UQ0.0 in [0, 0]", 1, 11, "at least one bit"),
    ("input x : Q0.15 [-1, 1]", 1, 17, "`in`"),
    ("input x : Q0.15 in -1, 1]", 1, 20, "`[`"),
    ("input x : Q0.15 in [-1 1]", 1, 24, "`,`"),
    ("input x : Q0.15 in [-1, 1.2.3]", 1, 25, "exact decimal"),
    ("input x : Q0.15 in [-1, 0.5", 1, 28, "`]`"),
    ("input x : Q0.15 in [1, -1]", 1, 7, "empty"),
    ("input x : Q0.15 in [-3, 1]", 1, 7, "passes the range"),
    (
        "input x : Q0.15 in [-1, 0.5] quantize banker",
        1,
        39,
        "a rounding mode",
    ),
    ("input x : Q0.15 in [-1, 0.5] extra", 1, 30, "end of line"),
    ("input in : Q0.15 in [-1, 0.5]", 1, 7, "keyword"),
    (
        "input x : Q0.15 in [-1, 0.5]\ninput x : Q0.15 in [-1, 0.5]",
        2,
        7,
        "already defined",
    ),
    ("const c = 3 : Q0.15", 1, 7, "does not fit"),
    ("const c = abc : Q0.15", 1, 11, "the constant's value"),
    ("const c = 0.5 : Q0.15 sideways", 1, 23, "a rounding mode"),
    ("const c = 1e99999 : Q0.15", 1, 11, "exact decimal"),
    ("let y = x + 1", 1, 9, "not defined"),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = x + 1",
        2,
        13,
        "numbers are declared",
    ),
    ("input x : Q0.15 in [-1, 0.5]\nlet y = (x + x", 2, 15, "`)`"),
    ("input x : Q0.15 in [-1, 0.5]\nlet y = x +", 2, 12, "a name"),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = rescale(x, Q0.7, nearest-even)",
        2,
        38,
        "`,`",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = rescale(x, Q0.7, nearest-even, clip)",
        2,
        40,
        "an overflow mode",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = rescale x",
        2,
        17,
        "`(`",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = x << q",
        2,
        14,
        "a shift count",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = x << 300",
        2,
        11,
        "out of range",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = x << 200",
        2,
        11,
        "widest supported",
    ),
    (
        "input x : Q60.60 in [-1, 0.5]\nlet y = x * x",
        2,
        11,
        "product of Q60.60 and Q60.60",
    ),
    ("input x : Q0.15 in [-1, 0.5]\nlet y x", 2, 7, "`=`"),
    (
        "input x : Q0.15 in [-1, 0.5]\noutput z",
        2,
        8,
        "not defined",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\noutput x budget many",
        2,
        17,
        "the error budget",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\noutput x budget -1",
        2,
        8,
        "not be negative",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\noutput x\noutput x",
        3,
        8,
        "already used",
    ),
    (
        "input x : Q0.15 in [-1, 0.5]\noutput x = x + x",
        2,
        8,
        "already defined",
    ),
    ("  let = 3", 1, 7, "a name"),
    ("@", 1, 1, "a statement"),
    (
        "input x : Q0.15 in [-1, 0.5]\nlet y = x * * x",
        2,
        13,
        "a name",
    ),
];

#[test]
fn every_malformed_case_has_a_position() {
    for &(text, line, col, frag) in CASES {
        let e = parse(text).expect_err(text);
        let msg = e.to_string();
        assert_eq!((e.span.line, e.span.column), (line, col), "{text:?}: {msg}");
        assert!(msg.contains(frag), "{text:?}: {msg:?} lacks {frag:?}");
        assert!(
            msg.starts_with(&format!("line {line}, column {col}")),
            "{msg}"
        );
    }
}

#[test]
fn deep_nesting_is_an_error_not_a_stack_overflow() {
    let text = format!(
        "input x : Q0.15 in [-1, 0.5]\nlet y = {}x{}",
        "(".repeat(5000),
        ")".repeat(5000)
    );
    let e = parse(&text).unwrap_err();
    assert_eq!(e.span.line, 2);
    assert!(e.to_string().contains("nested"), "{e}");
    let text = format!(
        "input x : Q0.15 in [-1, 0.5]\nlet y = {}x",
        "-".repeat(5000)
    );
    assert!(parse(&text).is_err());
}

#[test]
fn comments_blank_lines_and_unicode() {
    let p = parse("# a comment\n\n  input x : q0.15 in [-1, .5] # trailing\noutput x").unwrap();
    assert_eq!(p.outputs().len(), 1);
    let e = parse("input x : Q0.15 in [-1, 0.5]\nlet ü = x").unwrap_err();
    assert_eq!((e.span.line, e.span.column), (2, 5));
}

/// A long randomized run (the stand-in for the fuzz target on machines
/// without cargo-fuzz): mutate valid text at random and check that parsing
/// never panics and every error has a position inside the text.
#[test]
fn randomized_mutations_never_panic() {
    use rand::{Rng, SeedableRng};
    let base = "input x0 : Q0.15 in [-1, 0.999969482421875]\ninput t : Q3.12 in [-7.5, 7.25] quantize nearest-even\n\
                const c0 = 0.25 : Q0.15\nconst c1 = 0.4999 : Q0.15 floor\nlet acc = c0 * x0 + c1 * (x0 << 2) - -t\n\
                let y = rescale(acc >> 1, Q0.15, nearest-even, saturate)\noutput y budget 2 ulp\noutput d = y - t budget 0.001\n";
    let alphabet: Vec<char> = "()[],:=+-*<>#.eE0123456789 QUq\nxyzabcinputconstletoutputrescale_ü"
        .chars()
        .collect();
    let n: u64 = std::env::var("QBOUND_PARSE_FUZZ_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(20_000);
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(7);
    let mut errors = 0;
    for _ in 0..n {
        let mut s: Vec<char> = base.chars().collect();
        for _ in 0..rng.random_range(1..6) {
            let i = rng.random_range(0..=s.len());
            match rng.random_range(0..3) {
                0 if i < s.len() => {
                    s.remove(i);
                }
                1 if i < s.len() => s[i] = alphabet[rng.random_range(0..alphabet.len())],
                _ => s.insert(i, alphabet[rng.random_range(0..alphabet.len())]),
            }
        }
        let text: String = s.into_iter().collect();
        if let Err(e) = parse(&text) {
            errors += 1;
            let lines: Vec<&str> = text.lines().collect();
            assert!(
                e.span.line >= 1 && e.span.line <= lines.len().max(1),
                "{text:?}: {e}"
            );
            let len = lines.get(e.span.line - 1).map_or(0, |l| l.chars().count());
            assert!(
                e.span.column >= 1 && e.span.column <= len + 1,
                "{text:?}: {e}"
            );
        }
    }
    assert!(errors > 0);
}
