//! A day with qbound, in an invented scenario.
//!
//! Invented scenario (not real data): a pump-vibration monitor
//! samples a MEMS accelerometer through a 16-bit ADC at 3.2 kHz. Full scale
//! is ±16 g, so the samples are read as Q0.15 (−1.0 … +0.99997 of full
//! scale). Before the peak detector, the firmware runs an 8-tap low-pass
//! FIR on a Cortex-M0+ without an FPU. This program is the bit-exact
//! reference model of that filter: the firmware's test bench compares its
//! output word for word.
//!
//! Run: `cargo run --release -p qbound --example vibration_fir`

use qbound::{Format, Overflow, Q, Rounding};

/// Samples and coefficients: sign + 15 fraction bits (16-bit words).
type Sample = Q<0, 15>;
/// One product: Q0.15 × Q0.15 is exactly Q1.30 (32 bits).
type Product = Q<1, 30>;
/// The accumulator: a 40-bit word, Q9.30, with 8 guard bits over the
/// product, enough for 2^8 = 256 taps without overflow.
type Acc = Q<9, 30>;

fn main() {
    // The taps of an invented symmetric low-pass (sum ≈ 1.0), already in
    // Q0.15 bits as the firmware stores them.
    let taps: [Sample; 8] = [
        Sample::from_bits(621),
        Sample::from_bits(2_240),
        Sample::from_bits(5_410),
        Sample::from_bits(8_113),
        Sample::from_bits(8_113),
        Sample::from_bits(5_410),
        Sample::from_bits(2_240),
        Sample::from_bits(621),
    ];
    // Invented ADC words: a 0.4 g-ish hum, a knock, and a saturated spike.
    let adc: [i16; 16] = [
        800, 1_900, 2_600, 2_300, 1_100, -300, -1_600, -2_400, -2_200, 14_000, 32_767, 32_767,
        30_500, -5_000, -32_768, -900,
    ];

    println!(
        "formats: sample {}, product {}, accumulator {} ({} bits)",
        Sample::FORMAT,
        Product::FORMAT,
        Acc::FORMAT,
        Acc::FORMAT.width()
    );
    let exact: Format = Format::product(Sample::FORMAT, Sample::FORMAT).expect("fits 128 bits");
    assert_eq!(exact, Product::FORMAT); // the type system agrees with the algebra

    let mut history = [Sample::ZERO; 8];
    println!(
        "{:>4} {:>8} {:>12} {:>14} {:>8} {:>10}",
        "n", "adc", "in (FS)", "acc", "out", "out (FS)"
    );
    for (n, word) in adc.iter().enumerate() {
        history.rotate_right(1);
        history[0] = Sample::from_bits(*word);

        // Multiply exactly, accumulate exactly: the guard bits make
        // overflow impossible for 8 taps, checked at compile time.
        let acc = Acc::dot(&history, &taps);

        // The one place information is lost, chosen explicitly: round to
        // nearest (ties to even, no bias) and saturate at full scale.
        let out: Sample = acc.rescale(Rounding::NearestTiesEven, Overflow::Saturate);

        // The same step written term by term, with the exact `*` and a
        // lossless `+=` (the product widens into the accumulator).
        let mut check = Acc::ZERO;
        for (x, h) in history.iter().zip(&taps) {
            let p: Product = *x * *h;
            check += p;
        }
        assert_eq!(check, acc);

        // Exact decimal text, rounded for the table (no floats involved),
        // and the output word as the firmware sees it.
        println!(
            "{n:>4} {word:>8} {:>12.6} {:>14.9} {:>#8x} {:>10.6}",
            history[0], acc, out, out
        );
    }

    // What a firmware engineer asks next: did the output ever clip?
    let full_scale = Acc::dot(&[Sample::MAX; 8], &taps);
    let clipped: Result<Sample, _> = full_scale.try_rescale(Rounding::NearestTiesEven);
    match clipped {
        Ok(s) => println!(
            "a full-scale input gives {full_scale} in {}: no clipping ({s})",
            Acc::FORMAT
        ),
        Err(e) => println!(
            "a full-scale input gives {full_scale} in {}: it clips ({e})",
            Acc::FORMAT
        ),
    }
}
