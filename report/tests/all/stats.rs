//! The quantization-noise model against measurement on the demo datapaths:
//! the predicted standard deviation of the error must be within 10% of the
//! measured one.

use crate::common::audit;

fn check(name: &str, text: &str, vectors: u64) {
    let (_, r) = audit(text, vectors);
    for o in &r.outputs {
        let m = o.measured.as_ref().unwrap();
        let rel = (o.stats.std_dev - m.std_dev).abs() / m.std_dev;
        println!(
            "{name}/{}: predicted std {:.5e}, measured {:.5e} ({:+.2}%); predicted mean {:.4e}, measured {:.4e}; SQNR predicted {:.2} dB, measured {:.2} dB",
            o.name,
            o.stats.std_dev,
            m.std_dev,
            100.0 * (o.stats.std_dev / m.std_dev - 1.0),
            o.stats.mean,
            m.mean,
            o.sqnr_db.unwrap_or(f64::NAN),
            o.measured_sqnr_db.unwrap_or(f64::NAN),
        );
        assert!(
            rel < 0.10,
            "{name}/{}: predicted {} measured {}",
            o.name,
            o.stats.std_dev,
            m.std_dev
        );
    }
}

#[test]
fn fir64_noise_model() {
    check("fir64", include_str!("../../examples/fir64.qbdp"), 20_000);
}

#[test]
fn sensor_noise_model() {
    check("sensor", include_str!("../../examples/sensor.qbdp"), 20_000);
}

#[test]
fn power_noise_model() {
    check("power", include_str!("../../examples/power.qbdp"), 20_000);
}

#[test]
fn uniform_quantizer_follows_six_db_per_bit() {
    // Handbook rule (uniform quantization-noise model): a full-scale
    // uniform signal quantized to B bits has SQNR = 6.02·B dB; for a signal
    // uniform over [-1, 1) that is exactly 20·log10(2^B). Check 8 and 12
    // bits, predicted and measured.
    for (bits, fmt) in [(8, "Q0.7"), (12, "Q0.11")] {
        let (_, r) = audit(
            &format!("input s : {fmt} in [-1, 0.99] quantize nearest-even\noutput s"),
            20_000,
        );
        let o = &r.outputs[0];
        let rule = 6.0206 * f64::from(bits);
        let p = o.sqnr_db.unwrap();
        let m = o.measured_sqnr_db.unwrap();
        println!("{bits} bits: rule {rule:.2} dB, predicted {p:.2} dB, measured {m:.2} dB");
        assert!((p - rule).abs() < 0.2, "{p} vs {rule}");
        assert!((m - rule).abs() < 0.3, "{m} vs {rule}");
    }
}
