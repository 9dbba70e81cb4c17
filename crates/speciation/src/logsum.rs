//! Sums of powers of ten kept as their log10, so that weights of 10^±300 and beyond neither
//! overflow nor vanish.

use std::f64::consts::LN_10;

/// `10^x`.
pub(crate) fn exp10(x: f64) -> f64 {
    (x * LN_10).exp()
}

/// `log10(sum 10^x)` over the values.
pub(crate) fn sum(values: impl Iterator<Item = f64> + Clone) -> f64 {
    let hi = values.clone().fold(f64::NEG_INFINITY, f64::max);
    if hi == f64::NEG_INFINITY {
        return hi;
    }
    let s: f64 = values.map(|v| exp10(v - hi)).sum();
    hi + s.log10()
}

/// A running `log10(sum 10^x)`, rescaled whenever a larger term arrives.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Accumulator {
    max: f64,
    scaled: f64,
}

impl Accumulator {
    pub(crate) fn new() -> Self {
        Self {
            max: f64::NEG_INFINITY,
            scaled: 0.0,
        }
    }

    #[inline]
    pub(crate) fn push(&mut self, x: f64) {
        if x > self.max {
            self.scaled = self.scaled * exp10(self.max - x) + 1.0;
            self.max = x;
        } else {
            self.scaled += exp10(x - self.max);
        }
    }

    pub(crate) fn log10(&self) -> f64 {
        if self.max == f64::NEG_INFINITY {
            f64::NEG_INFINITY
        } else {
            self.max + self.scaled.log10()
        }
    }
}

/// Product of two polynomials given by the log10 of their coefficients.
pub(crate) fn convolve(a: &[f64], b: &[f64]) -> Vec<f64> {
    if a.is_empty() || b.is_empty() {
        return Vec::new();
    }
    // The product's start, `[0]` times one group (most systems have one): each coefficient
    // gets one push, `x = 0 + y`, which leaves `scaled = 0 * 10^-inf + 1 = 1`, and reads
    // back as `x + log10(1)`. Written out, without the powers and logarithms.
    if a.len() == 1 && a[0].to_bits() == 0f64.to_bits() && b.iter().all(|y| y.is_finite()) {
        return b.iter().map(|&y| (0.0 + y) + 0.0).collect();
    }
    let mut out = vec![Accumulator::new(); a.len() + b.len() - 1];
    for (i, &x) in a.iter().enumerate() {
        for (j, &y) in b.iter().enumerate() {
            out[i + j].push(x + y);
        }
    }
    out.iter().map(Accumulator::log10).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sum_handles_huge_exponents() {
        let v = [500.0, 500.0];
        assert!((sum(v.iter().copied()) - (500.0 + 2f64.log10())).abs() < 1e-12);
        let v = [-900.0, -900.0];
        assert!((sum(v.iter().copied()) - (-900.0 + 2f64.log10())).abs() < 1e-12);
    }

    #[test]
    fn accumulator_matches_direct_sum() {
        let mut acc = Accumulator::new();
        for x in [-1.0, 2.0, 0.5, 2.0] {
            acc.push(x);
        }
        let direct = (0.1f64 + 100.0 + 10f64.powf(0.5) + 100.0).log10();
        assert!((acc.log10() - direct).abs() < 1e-12);
    }

    #[test]
    fn convolve_from_one_is_bit_for_bit_the_general_product() {
        let acc_way = |b: &[f64]| -> Vec<u64> {
            let mut out = vec![Accumulator::new(); b.len()];
            for (j, &y) in b.iter().enumerate() {
                out[j].push(0.0 + y);
            }
            out.iter().map(|a| a.log10().to_bits()).collect()
        };
        for b in [
            vec![0.0, -3.7, -9.25, -20.5],
            vec![-0.0, 1e-300, -1e300, 123.456],
            vec![5.0],
        ] {
            let short: Vec<u64> = convolve(&[0.0], &b).iter().map(|x| x.to_bits()).collect();
            assert_eq!(short, acc_way(&b), "{b:?}");
        }
    }

    #[test]
    fn convolve_multiplies_polynomials() {
        // (1 + 2x) * (3 + x) = 3 + 7x + 2x^2
        let a = [0.0, 2f64.log10()];
        let b = [3f64.log10(), 0.0];
        let c = convolve(&a, &b);
        let back: Vec<f64> = c.iter().map(|&v| exp10(v)).collect();
        assert!((back[0] - 3.0).abs() < 1e-12);
        assert!((back[1] - 7.0).abs() < 1e-12);
        assert!((back[2] - 2.0).abs() < 1e-12);
    }
}
