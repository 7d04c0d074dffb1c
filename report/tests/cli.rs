//! The `qbound` binary end to end: every demo through every subcommand,
//! broken input, exit statuses, JSON against the engine's own report, SVG
//! well-formedness, and test vectors checked against an independent exact
//! evaluation written here with `rug` from each demo's datapath.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use predicates::prelude::*;
use qbound_report::{Report, analyze, parse};
use rug::{Integer, Rational};

const DEMOS: &[&str] = &["load_cell", "motor_pi", "tone_power", "vibration_fir"];

fn demo(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("demos")
        .join(format!("{name}.qbdp"))
}

fn qbound() -> Command {
    let mut c = Command::cargo_bin("qbound").expect("the binary builds");
    c.env_remove("NO_COLOR");
    c
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

// ---------------------------------------------------------------- audit

#[test]
fn every_demo_audits_in_the_terminal_format() {
    for d in DEMOS {
        let path = parse(&std::fs::read_to_string(demo(d)).unwrap()).unwrap();
        let out = qbound()
            .args(["audit", "--vectors", "300", "--quiet"])
            .arg(demo(d))
            .assert()
            .success()
            .get_output()
            .stdout
            .clone();
        let text = String::from_utf8(out).unwrap();
        assert!(text.starts_with("qbound audit:"), "{d}: {text}");
        assert!(
            text.contains("headroom") && text.contains("overflow"),
            "{d}"
        );
        for o in path.outputs() {
            assert!(
                text.contains(&format!("Output {}", o.name)),
                "{d}: {}",
                o.name
            );
        }
        // Piped: no colour.
        assert!(!text.contains('\x1b'), "{d}: ANSI escapes in piped output");
        assert!(text.contains("does not replace the verification"), "{d}");
    }
}

#[test]
fn colour_only_when_asked_or_on_a_terminal() {
    let out = qbound()
        .args(["audit", "--vectors", "0", "--color", "always"])
        .arg(demo("tone_power"))
        .output()
        .unwrap();
    assert!(String::from_utf8_lossy(&out.stdout).contains("\x1b[33mSATURATES"));
}

#[test]
fn key_verdicts_of_the_demos() {
    let run = |d: &str| {
        String::from_utf8(
            qbound()
                .args(["audit", "--vectors", "200", "-q"])
                .arg(demo(d))
                .output()
                .unwrap()
                .stdout,
        )
        .unwrap()
    };
    let pi = run("motor_pi");
    assert!(
        pi.lines()
            .any(|l| l.contains("integ_next") && l.contains("SATURATES"))
    );
    assert!(
        pi.lines()
            .any(|l| l.contains("duty") && l.contains("SATURATES"))
    );
    let scale = run("load_cell");
    assert!(
        scale.contains("met (guaranteed by the sound bound)"),
        "{scale}"
    );
    let fir = run("vibration_fir");
    // The 2 guard bits of the accumulator: wrap mode, but no overflow.
    assert!(
        fir.lines()
            .any(|l| l.trim_start().starts_with("acc ") && l.contains(" no ") && l.contains("2.0")),
        "{fir}"
    );
    let tone = run("tone_power");
    assert!(
        tone.lines()
            .any(|l| l.contains("p16") && l.contains("SATURATES"))
    );
}

#[test]
fn json_is_the_engines_report() {
    for d in DEMOS {
        let text = std::fs::read_to_string(demo(d)).unwrap();
        let path = parse(&text).unwrap();
        // Analysis only: the engine's report exactly.
        let out = qbound()
            .args(["audit", "--format", "json", "--vectors", "0"])
            .arg(demo(d))
            .assert()
            .success()
            .get_output()
            .stdout
            .clone();
        let got: Report = serde_json::from_slice(&out).expect("valid JSON of a Report");
        let engine = analyze(&path).report(&path);
        // Same document as the engine's own serialisation (compared as
        // parsed JSON values, so both sides go through the same parser).
        let as_value = |b: &[u8]| serde_json::from_slice::<serde_json::Value>(b).unwrap();
        assert_eq!(as_value(&out), as_value(engine.to_json().as_bytes()), "{d}");
        assert_eq!(got.nodes.len(), engine.nodes.len());
        // With a simulation: same bounds, plus the measurements.
        let out = qbound()
            .args(["audit", "--format", "json", "--vectors", "300", "-q"])
            .arg(demo(d))
            .output()
            .unwrap();
        let sim: Report = serde_json::from_slice(&out.stdout).unwrap();
        let sim_summary = sim.simulation.as_ref().expect("simulation summary");
        assert_eq!(sim_summary.random_vectors, 300);
        for (a, b) in sim.nodes.iter().zip(&got.nodes) {
            assert_eq!(a.error, b.error, "{d} {}", a.label);
            assert_eq!(a.actual_range, b.actual_range, "{d} {}", a.label);
            let m = a.measured.as_ref().expect("measured");
            let measured = m.max_abs.num().unwrap();
            assert!(
                measured <= a.error.max_abs.num().unwrap(),
                "{d} {}",
                a.label
            );
        }
    }
}

#[test]
fn markdown_report() {
    let out = qbound()
        .args(["audit", "-f", "md", "--vectors", "0"])
        .arg(demo("load_cell"))
        .output()
        .unwrap();
    let md = String::from_utf8(out.stdout).unwrap();
    assert!(md.starts_with("# qbound audit:"));
    assert!(md.contains("| node | operation | format |"));
    assert!(md.contains("| grams | Q13.4 |"));
    assert!(md.contains("> **Caution.**"));
}

fn svgs(html: &str) -> Vec<&str> {
    let mut v = Vec::new();
    let mut rest = html;
    while let Some(a) = rest.find("<svg") {
        let b = rest[a..].find("</svg>").expect("every <svg> is closed") + a + 6;
        v.push(&rest[a..b]);
        rest = &rest[b..];
    }
    v
}

#[test]
fn html_is_self_contained_with_well_formed_svg() {
    let dir = tempfile::tempdir().unwrap();
    for d in DEMOS {
        let file = dir.path().join(format!("{d}.html"));
        qbound()
            .args(["audit", "--vectors", "400", "-q", "-o"])
            .arg(&file)
            .arg(demo(d))
            .assert()
            .success();
        let html = std::fs::read_to_string(&file).unwrap();
        assert!(html.starts_with("<!DOCTYPE html>"));
        assert!(html.contains("does not replace the verification"));
        // Nothing fetched: no external resources.
        assert!(!html.contains("src=") && !html.contains("href=") && !html.contains("<script"));
        let path = parse(&std::fs::read_to_string(demo(d)).unwrap()).unwrap();
        let plots = svgs(&html);
        // A histogram and a source chart per output, and the range chart.
        assert_eq!(plots.len(), 2 * path.outputs().len() + 1, "{d}");
        for svg in &plots {
            let doc = roxmltree::Document::parse(svg)
                .unwrap_or_else(|e| panic!("{d}: SVG not well-formed: {e}\n{svg}"));
            assert_eq!(doc.root_element().tag_name().name(), "svg");
        }
        for o in path.outputs() {
            assert!(html.contains(&format!("error of {} over 400 random vectors", o.name)));
        }
    }
}

// ---------------------------------------------------------------- errors

#[test]
fn malformed_file_shows_the_line_and_a_caret() {
    let dir = tempfile::tempdir().unwrap();
    let bad = write(
        dir.path(),
        "bad.qbdp",
        "input x : Q0.15 in [-1, 0.5]\nlet y = rescale(x, Q0.7, nearest-even, clamp)\noutput y\n",
    );
    let out = qbound().arg("audit").arg(&bad).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.starts_with("error: expected"), "{err}");
    assert!(err.contains("bad.qbdp:2:"), "{err}");
    assert!(
        err.contains("2 | let y = rescale(x, Q0.7, nearest-even, clamp)"),
        "{err}"
    );
    let caret = err.lines().find(|l| l.contains('^')).expect("a caret line");
    // The caret sits under `clamp`.
    let col = caret.find('^').unwrap() - caret.find('|').unwrap() - 2;
    assert_eq!(
        col,
        "let y = rescale(x, Q0.7, nearest-even, ".len(),
        "{err}"
    );
    assert!(caret.contains("^^^^^"), "{err}");
    assert!(out.stdout.is_empty());
}

#[test]
fn broken_inputs_give_status_2_and_say_what_to_do() {
    let dir = tempfile::tempdir().unwrap();
    qbound()
        .args(["audit", "no/such/file.qbdp"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("no such file").and(predicate::str::contains("hint:")));
    qbound()
        .arg("audit")
        .arg(dir.path())
        .assert()
        .code(2)
        .stderr(predicate::str::contains("not a directory"));
    let bin = dir.path().join("bin.qbdp");
    std::fs::write(&bin, [0xff, 0xfe, 0x00, 0x41]).unwrap();
    qbound()
        .arg("check")
        .arg(&bin)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("not UTF-8"));
    qbound()
        .args(["audit", "--format", "pdf"])
        .arg(demo("load_cell"))
        .assert()
        .code(2)
        .stderr(predicate::str::contains("possible values"));
    qbound().args(["frobnicate"]).assert().code(2);
    qbound().assert().code(2);
    qbound()
        .args(["audit", "--seed", "banana"])
        .arg(demo("load_cell"))
        .assert()
        .code(2)
        .stderr(predicate::str::contains("is not a seed"));
    let wide = write(
        dir.path(),
        "wide.qbdp",
        "input a : Q63.0 in [0, 1]\ninput b : Q63.0 in [0, 1]\nlet p = a * b * a\noutput p\n",
    );
    qbound()
        .arg("audit")
        .arg(&wide)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("wide.qbdp:3:").and(predicate::str::contains("^")));
    qbound()
        .args(["audit", "-o", "/no/such/dir/out.html"])
        .arg(demo("load_cell"))
        .args(["--vectors", "0"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("cannot write"));
}

// ---------------------------------------------------------------- check

#[test]
fn check_passes_clean_demos() {
    for d in ["load_cell", "vibration_fir"] {
        qbound()
            .arg("check")
            .arg(demo(d))
            .assert()
            .success()
            .stdout(predicate::str::contains(": ok ("));
    }
    qbound()
        .args(["check", "-q"])
        .arg(demo("load_cell"))
        .assert()
        .success()
        .stdout(predicate::str::is_empty());
}

#[test]
fn check_fails_on_saturation_until_it_is_allowed() {
    let out = qbound()
        .arg("check")
        .arg(demo("motor_pi"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let text = String::from_utf8(out.stdout).unwrap();
    let fails: Vec<&str> = text.lines().filter(|l| l.contains(": FAIL: ")).collect();
    assert_eq!(fails.len(), 2, "{text}");
    assert!(fails[0].contains("motor_pi.qbdp:22: FAIL: integ_next can saturate"));
    assert!(fails[1].contains("duty can saturate"));
    assert!(text.contains("--allow-saturation duty"));
    assert!(text.ends_with("2 reasons to fail\n"));
    qbound()
        .args(["check", "--allow-saturation", "integ_next,duty"])
        .arg(demo("motor_pi"))
        .assert()
        .success();
    qbound()
        .args(["check", "--allow-saturation", "integ_next"])
        .arg(demo("motor_pi"))
        .assert()
        .code(1)
        .stdout(predicate::str::contains("1 reason to fail"));
    qbound()
        .args(["check", "--allow-saturation", "*"])
        .arg(demo("tone_power"))
        .assert()
        .success();
    qbound()
        .args(["check", "--allow-saturation", "dutty"])
        .arg(demo("motor_pi"))
        .assert()
        .code(2)
        .stderr(predicate::str::contains("dutty").and(predicate::str::contains("the nodes are")));
}

#[test]
fn check_fails_on_wrap_and_on_a_budget() {
    let dir = tempfile::tempdir().unwrap();
    let wrap = write(
        dir.path(),
        "wrap.qbdp",
        "# two Q0.15 samples summed back into Q0.15 with wrap: can overflow\n\
         input a : Q0.15 in [-1, 0.5]\ninput b : Q0.15 in [-0.5, 0.5]\n\
         let s = rescale(a + b, Q0.15, floor, wrap)\noutput s\n",
    );
    qbound()
        .arg("check")
        .arg(&wrap)
        .assert()
        .code(1)
        .stdout(predicate::str::contains(
            "wrap.qbdp:4: FAIL: s can overflow Q0.15 and wraps",
        ));
    let budget = write(
        dir.path(),
        "budget.qbdp",
        "input a : Q0.15 in [-0.5, 0.5]\nlet y = rescale(a, Q0.7, floor, wrap)\noutput y budget 0.5 ulp\n",
    );
    qbound()
        .args(["check", "--simulate", "200"])
        .arg(&budget)
        .assert()
        .code(1)
        .stdout(
            predicate::str::contains("output y: worst-case error")
                .and(predicate::str::contains("exceeds the budget 0.5 ulp")),
        );
}

// ---------------------------------------------------------------- describe

#[test]
fn describe_formats() {
    let out = qbound()
        .args(["describe", "Q0.15", "uq8.8", "Q1.15"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("range          [-1, 0.999969482421875]"),
        "{text}"
    );
    assert!(text.contains("step (1 ulp)   0.000030517578125 = 2^-15"));
    assert!(text.contains("storage        i16"));
    // Q1.15 is sign + 1 + 15 = 17 bits: stored in an i32.
    assert!(text.contains("width          17 bits = sign + 1 integer + 15 fraction"));
    assert!(text.contains("storage        i32"));
    assert!(text.contains("range          [-2, 1.999969482421875]"));
    assert!(text.contains("UQ8.8 (unsigned)"));
    assert!(text.contains("range          [0, 255.99609375]"));
    // Handbook formula: SQNR of a full-scale sine = 6.02 N + 1.76 dB; for
    // N = 16: 98.09 dB.
    assert!(text.contains("98.09 dB SQNR"), "{text}");
    // 20 log10(2^15) = 90.31 dB for Q0.15 (largest magnitude 1, step
    // 2^-15); 96.33 dB for Q1.15.
    assert!(text.contains("dynamic range  90.31 dB"), "{text}");
    assert!(text.contains("dynamic range  96.33 dB"), "{text}");
    let json = qbound()
        .args(["describe", "--json", "Q0.31"])
        .output()
        .unwrap();
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    assert_eq!(v[0]["storage"], "i32");
    assert_eq!(v[0]["width"], 32);
    qbound().args(["describe", "Q1.x"]).assert().code(2).stderr(
        predicate::str::contains("`Q1.x` is not a format").and(predicate::str::contains("hint")),
    );
    qbound()
        .args(["describe", "Q100.100"])
        .assert()
        .code(2)
        .stderr(predicate::str::contains("128"));
}

// ---------------------------------------------------------------- vectors

/// An exact decimal as a rational (the CSV's values).
fn decimal(s: &str) -> Rational {
    let (neg, s) = match s.strip_prefix('-') {
        Some(r) => (true, r),
        None => (false, s),
    };
    let (int, frac) = s.split_once('.').unwrap_or((s, ""));
    let digits: Integer = format!("{int}{frac}").parse().unwrap();
    let r = Rational::from((
        digits,
        Integer::from(Integer::u_pow_u(10, frac.len() as u32)),
    ));
    if neg { -r } else { r }
}

fn pow2(e: i32) -> Rational {
    if e >= 0 {
        Rational::from(Integer::from(1) << e as u32)
    } else {
        Rational::from((Integer::from(1), Integer::from(1) << (-e) as u32))
    }
}

#[derive(Clone, Copy)]
enum Mode {
    Floor,
    NearestEven,
    NearestAway,
}

/// Round to a multiple of 2^-frac: floor, or nearest with ties to even
/// (IEEE 754 roundTiesToEven applied to a fixed-point grid).
fn round(x: &Rational, frac: i32, mode: Mode) -> Rational {
    let scaled = x * pow2(frac);
    let fl = scaled.clone().floor().numer().clone();
    let rem = scaled - Rational::from(fl.clone());
    let half = Rational::from((1, 2));
    let n = match mode {
        Mode::Floor => fl,
        Mode::NearestEven => {
            if rem > half || (rem == half && fl.is_odd()) {
                fl + 1
            } else {
                fl
            }
        }
        // Ties away from zero (IEEE 754 roundTiesToAway).
        Mode::NearestAway => {
            if rem > half || (rem == half && !x.is_negative()) {
                fl + 1
            } else {
                fl
            }
        }
    };
    Rational::from(n) * pow2(-frac)
}

/// Signed Q(i, f) or unsigned UQ(i, f) limits.
fn limits(signed: bool, i: i32, f: i32) -> (Rational, Rational) {
    let hi = pow2(i) - pow2(-f);
    let lo = if signed { -pow2(i) } else { Rational::new() };
    (lo, hi)
}

fn saturate(x: Rational, (lo, hi): &(Rational, Rational)) -> Rational {
    if x > *hi {
        hi.clone()
    } else if x < *lo {
        lo.clone()
    } else {
        x
    }
}

fn wrap(x: Rational, signed: bool, i: i32, f: i32) -> Rational {
    let width = i + f + i32::from(signed);
    let span = pow2(width - f);
    let (lo, _) = limits(signed, i, f);
    let mut y = Rational::from(&x - &lo);
    let k = Rational::from(&y / &span).floor();
    y -= k * &span;
    y + lo
}

/// A constant as the datapath rounds it (nearest-even into `frac` bits).
fn konst(s: &str, frac: i32) -> Rational {
    round(&decimal(s), frac, Mode::NearestEven)
}

/// The two's complement bits of `x` in a word of `width` bits with `frac`
/// fraction bits, as lower-case hex.
fn hex(x: &Rational, width: u32, frac: i32) -> String {
    let n = x * pow2(frac);
    assert_eq!(*n.denom(), 1, "{x} is not on the grid");
    let mut bits = n.numer().clone();
    if bits < 0 {
        bits += Integer::from(1) << width;
    }
    format!("{:0w$x}", bits, w = width.div_ceil(4) as usize)
}

/// The datapath of each demo, written out by hand from its .qbdp file:
/// inputs in CSV order to outputs with their (width, frac bits).
fn reference(d: &str, x: &[Rational]) -> Vec<(Rational, u32, i32)> {
    match d {
        "load_cell" => {
            let net = &x[0] - decimal("83251");
            let exact = net * konst("0.000642317", 31) + konst("-1.37", 10);
            let g = saturate(round(&exact, 4, Mode::NearestEven), &limits(true, 13, 4));
            vec![(g, 18, 4)]
        }
        "motor_pi" => {
            let err = Rational::from(&x[0] - &x[1]);
            let integ = saturate(
                round(
                    &(konst("0.0125", 15) * err.clone() + &x[2]),
                    31,
                    Mode::NearestEven,
                ),
                &limits(true, 0, 31),
            );
            // saturate-symmetric: [-(2^0 - 2^-15), 2^0 - 2^-15].
            let (_, hi) = limits(true, 0, 15);
            let duty = saturate(
                round(&(konst("0.35", 15) * err + &integ), 15, Mode::NearestEven),
                &(Rational::from(-&hi), hi),
            );
            vec![(duty, 16, 15), (integ, 32, 31)]
        }
        "tone_power" => {
            let power = Rational::from(&x[0] * &x[0]) + Rational::from(&x[1] * &x[1]);
            let p16 = saturate(round(&power, 15, Mode::Floor), &limits(false, 1, 15));
            let margin = &p16 - decimal("0.0625");
            vec![(p16, 16, 15), (margin, 17, 15)]
        }
        "vibration_fir" => {
            let c = [
                "-0.0110", "0.0280", "0.1440", "0.3390", "0.3390", "0.1440", "0.0280", "-0.0110",
            ];
            let mut sum = Rational::new();
            for (k, ck) in c.iter().enumerate() {
                sum += konst(ck, 15) * &x[k];
            }
            let acc = wrap(round(&sum, 29, Mode::Floor), true, 2, 29);
            let y = saturate(round(&acc, 15, Mode::NearestEven), &limits(true, 0, 15));
            vec![(y, 16, 15)]
        }
        _ => unreachable!(),
    }
}

fn read_csv(p: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let text = std::fs::read_to_string(p).unwrap();
    let mut lines = text.lines();
    let head: Vec<String> = lines.next().unwrap().split(',').map(String::from).collect();
    let rows = lines
        .map(|l| l.split(',').map(String::from).collect())
        .collect();
    (head, rows)
}

#[test]
fn test_vectors_match_an_independent_exact_evaluation() {
    let dir = tempfile::tempdir().unwrap();
    for d in DEMOS {
        let out = dir.path().join(d);
        qbound()
            .args(["vectors", "--count", "300", "--seed", "7", "--out-dir"])
            .arg(&out)
            .arg(demo(d))
            .assert()
            .success()
            .stdout(predicate::str::contains("wrote 300 vectors"));
        let path = parse(&std::fs::read_to_string(demo(d)).unwrap()).unwrap();
        let n_in = path.inputs().len();
        let (head, rows) = read_csv(&out.join("vectors.csv"));
        assert_eq!(head.len(), 1 + 2 * (n_in + path.outputs().len()), "{d}");
        assert_eq!(rows.len(), 300);
        let mut corner_seen = false;
        for (r, row) in rows.iter().enumerate() {
            assert_eq!(row[0], r.to_string());
            let xs: Vec<Rational> = (0..n_in).map(|k| decimal(&row[1 + 2 * k])).collect();
            // Inputs: the hex is the decimal's bits.
            for (k, &id) in path.inputs().iter().enumerate() {
                let f = path.node(id).format;
                assert_eq!(
                    row[2 + 2 * k],
                    hex(&xs[k], f.width(), f.frac_bits() as i32),
                    "{d} row {r}"
                );
            }
            for (j, (want, width, frac)) in reference(d, &xs).into_iter().enumerate() {
                let c = 1 + 2 * (n_in + j);
                assert_eq!(
                    decimal(&row[c]),
                    want,
                    "{d} row {r} output {j}: inputs {xs:?}"
                );
                assert_eq!(
                    row[c + 1],
                    hex(&want, width, frac),
                    "{d} row {r} output {j}"
                );
            }
            if *d == "tone_power" && xs[0] == -1 && xs[1] == -1 {
                // (-1)² + (-1)² = 2 saturates UQ1.15.
                assert_eq!(row[6], "ffff");
                corner_seen = true;
            }
        }
        if *d == "tone_power" {
            assert!(corner_seen, "the corner re = im = -1 is among the vectors");
        }
        // One hex file per signal, equal to the CSV's hex column.
        for (k, name) in head.iter().skip(1).step_by(2).enumerate() {
            let words = std::fs::read_to_string(out.join(format!("{name}.hex"))).unwrap();
            let col: Vec<&str> = rows.iter().map(|r| r[2 + 2 * k].as_str()).collect();
            assert_eq!(words.lines().collect::<Vec<_>>(), col, "{d} {name}");
        }
    }
}

#[test]
fn test_vectors_are_reproducible_from_the_seed() {
    let dir = tempfile::tempdir().unwrap();
    let run = |sub: &str, seed: &str| {
        let out = dir.path().join(sub);
        qbound()
            .args([
                "vectors",
                "-q",
                "--count",
                "50",
                "--seed",
                seed,
                "--out-dir",
            ])
            .arg(&out)
            .arg(demo("motor_pi"))
            .assert()
            .success()
            .stdout(predicate::str::is_empty());
        std::fs::read_to_string(out.join("vectors.csv")).unwrap()
    };
    let a = run("a", "99");
    assert_eq!(a, run("b", "99"));
    assert_ne!(a, run("c", "0x63".replace("63", "64").as_str()));
    assert_eq!(a, run("d", "0x63"));
}

#[test]
fn vectors_refuse_stochastic_rounding() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "st.qbdp",
        "input a : Q0.15 in [-1, 0.5]\nlet y = rescale(a, Q0.7, stochastic, saturate)\noutput y\n",
    );
    qbound()
        .args(["vectors", "--out-dir"])
        .arg(dir.path().join("v"))
        .arg(&f)
        .assert()
        .code(2)
        .stderr(predicate::str::contains("rounds stochastically"));
}

#[test]
fn test_vectors_of_wide_formats() {
    // 121- and 128-bit words, a 124-bit shift result, nearest-away into
    // Q3.60, an output that reads an input directly (its files get `out_`).
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "wide.qbdp",
        "input a : Q0.120 in [-1, 0.5]\ninput b : UQ128.0 in [0, 340282366920938463463374607431768211455]\n\
         let c = rescale(a >> 3, Q3.60, nearest-away, saturate)\noutput c\noutput b\n",
    );
    let out = dir.path().join("v");
    qbound()
        .args(["vectors", "-q", "--count", "100", "--out-dir"])
        .arg(&out)
        .arg(&f)
        .assert()
        .success();
    let (head, rows) = read_csv(&out.join("vectors.csv"));
    assert_eq!(
        head,
        [
            "index",
            "a",
            "a_hex",
            "b",
            "b_hex",
            "c",
            "c_hex",
            "out_b",
            "out_b_hex"
        ]
    );
    for row in &rows {
        let a = decimal(&row[1]);
        let b = decimal(&row[3]);
        assert_eq!(row[2], hex(&a, 121, 120));
        assert_eq!(row[4], hex(&b, 128, 0));
        let c = saturate(
            round(&(a * pow2(-3)), 60, Mode::NearestAway),
            &limits(true, 3, 60),
        );
        assert_eq!(decimal(&row[5]), c);
        assert_eq!(row[6], hex(&c, 64, 60));
        assert_eq!(row[7], row[3]);
        assert_eq!(row[8], row[4]);
    }
    // The corners come first: b's top is all ones.
    assert!(rows.iter().take(4).any(|r| r[4] == "f".repeat(32)));
    assert!(
        std::fs::read_to_string(out.join("out_b.hex"))
            .unwrap()
            .lines()
            .count()
            == 100
    );
}

// ---------------------------------------------------------------- robustness

#[test]
fn empty_files_and_encodings() {
    let dir = tempfile::tempdir().unwrap();
    // Nothing but comments and blanks: an error, for audit and check alike.
    let empty = write(dir.path(), "empty.qbdp", "# only a comment\n\n   \n");
    for cmd in ["audit", "check"] {
        qbound()
            .arg(cmd)
            .arg(&empty)
            .assert()
            .code(2)
            .stderr(predicate::str::contains("holds no statement"));
    }
    // A bad byte on line 2, column 7 (after `input ` on that line).
    let bad = dir.path().join("bad.qbdp");
    let mut bytes = b"# comment\ninput \xe9x : Q0.7 in [0, 0.5]\n".to_vec();
    bytes.extend_from_slice(b"output x\n");
    std::fs::write(&bad, bytes).unwrap();
    qbound().arg("audit").arg(&bad).assert().code(2).stderr(
        predicate::str::contains("bad.qbdp:2:7: not UTF-8").and(predicate::str::contains("0xe9")),
    );
    // A UTF-8 byte-order mark is accepted.
    let bom = dir.path().join("bom.qbdp");
    std::fs::write(
        &bom,
        "\u{feff}input x : Q0.7 in [0, 0.5]\noutput x\n".as_bytes(),
    )
    .unwrap();
    qbound()
        .args(["audit", "--vectors", "0"])
        .arg(&bom)
        .assert()
        .success();
}

#[test]
fn json_streams_the_same_document() {
    for d in DEMOS {
        let path = parse(&std::fs::read_to_string(demo(d)).unwrap()).unwrap();
        let report = analyze(&path).report(&path);
        let mut streamed = Vec::new();
        report.write_json(&mut streamed).unwrap();
        assert_eq!(
            String::from_utf8(streamed).unwrap(),
            report.to_json(),
            "{d}"
        );
    }
}

#[test]
fn vectors_stream_and_warn_about_panicking_rows() {
    let dir = tempfile::tempdir().unwrap();
    let file = write(
        dir.path(),
        "p.qbdp",
        "input x : Q3.4 in [-8, 7.9375]\nlet y = rescale(x, Q1.4, floor, panic)\noutput y\n",
    );
    let out = dir.path().join("tv");
    qbound()
        .args(["vectors", "--count", "20000", "--seed", "3", "--out-dir"])
        .arg(&out)
        .arg(&file)
        .assert()
        .success()
        .stderr(predicate::str::contains(
            "overflow mode is `panic` overflowed",
        ));
    let csv = std::fs::read_to_string(out.join("vectors.csv")).unwrap();
    assert_eq!(csv.lines().count(), 20_001);
    let hex = std::fs::read_to_string(out.join("y.hex")).unwrap();
    assert_eq!(hex.lines().count(), 20_000);
}

/// Ctrl-C (SIGINT) stops a long simulation after its current batch; the
/// report of what was measured is written and the status is 130.
#[cfg(unix)]
#[test]
fn ctrl_c_stops_a_long_simulation_cleanly() {
    use std::process::{Command as Std, Stdio};
    let bin = assert_cmd::cargo::cargo_bin("qbound");
    let child = Std::new(bin)
        .args([
            "audit",
            "--format",
            "json",
            "--vectors",
            "1000000000000",
            "--quiet",
        ])
        .arg(demo("vibration_fir"))
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1500));
    let sent = Std::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    let out = child.wait_with_output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(130),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let r: Report = serde_json::from_slice(&out.stdout).expect("a complete report");
    let s = r.simulation.expect("simulation summary");
    assert!(s.interrupted);
    assert!(s.random_vectors > 0 && s.random_vectors < s.random_vectors_requested);
    assert!(String::from_utf8_lossy(&out.stderr).contains("interrupted"));
}
