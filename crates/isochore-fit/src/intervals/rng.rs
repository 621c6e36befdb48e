//! The random numbers of the Monte Carlo and bootstrap intervals, reproducible: draw `i` of
//! a run with seed `s` reads its own ChaCha8 stream (key = `s` in little-endian bytes,
//! stream number = `i`), so it is the same number whichever thread computes it and however
//! many threads there are. ChaCha's output is fixed by its definition (Bernstein 2008) and
//! `rand_chacha` keeps it stable across versions and platforms; normal deviates are
//! `rand_distr`'s `StandardNormal` (Ziggurat), which with its default features computes
//! through `libm`, not the platform's mathematics library, so its values do not depend on
//! the platform either. Indices and signs are taken from the raw 32-bit words here (Lemire's
//! unbiased multiply-and-reject), so no third algorithm of another crate is involved.

use super::IntervalError;
use rand_chacha::ChaCha8Rng;
use rand_core::{Rng, SeedableRng};
use rand_distr::{ChiSquared, Distribution, StandardNormal};

/// The generator of one draw.
pub(crate) struct DrawRng(ChaCha8Rng);

impl DrawRng {
    /// The stream of draw `index` of a run with `seed`.
    pub(crate) fn new(seed: u64, index: u64) -> DrawRng {
        let mut key = [0u8; 32];
        key[..8].copy_from_slice(&seed.to_le_bytes());
        let mut rng = ChaCha8Rng::from_seed(key);
        rng.set_stream(index);
        DrawRng(rng)
    }

    /// A standard normal deviate.
    pub(crate) fn normal(&mut self) -> f64 {
        StandardNormal.sample(&mut self.0)
    }

    /// A deviate of the distribution `d` (the scale's χ² of the Monte Carlo).
    pub(crate) fn sample<D: Distribution<f64>>(&mut self, d: &D) -> f64 {
        d.sample(&mut self.0)
    }

    /// A uniform index in 0..n (n ≥ 1, n < 2³²), without bias (Lemire 2019, "Fast random
    /// integer generation in an interval").
    pub(crate) fn index(&mut self, n: usize) -> usize {
        let n32 = n as u32;
        let threshold = (n32.wrapping_neg() % n32) as u64; // 2³² mod n
        let n = n32 as u64;
        loop {
            let m = (self.0.next_u32() as u64) * n;
            if (m & 0xFFFF_FFFF) >= threshold {
                return (m >> 32) as usize;
            }
        }
    }

    /// +1 or −1 with probability ½ each (Rademacher).
    pub(crate) fn sign(&mut self) -> f64 {
        if self.0.next_u32() & 1 == 0 {
            1.0
        } else {
            -1.0
        }
    }
}

/// The factor every σ of one Monte Carlo draw is multiplied by. With σ known it is 1 and
/// nothing is drawn; with σ as relative weights only (the scale estimated from the
/// residuals) it is s·√(ν/X), X drawn from χ² with ν degrees of freedom once per draw, so
/// that the draws carry the scale's own uncertainty (after GUM Supplement 1's treatment of
/// a standard deviation estimated from ν degrees of freedom; from memory). One rule for the
/// single-series, the σ(T) and the joint Monte Carlo.
pub(crate) struct SigmaScale {
    scaled: bool,
    s: f64,
    nu: f64,
    chi2: ChiSquared<f64>,
}

impl SigmaScale {
    /// `scaled`: whether σ are relative weights only; `s`: the fit's residual SD; `nu`: its
    /// degrees of freedom.
    ///
    /// # Errors
    /// [`IntervalError::Singular`] when χ²(ν) cannot be formed (ν not finite).
    pub(crate) fn new(scaled: bool, s: f64, nu: f64) -> Result<SigmaScale, IntervalError> {
        // ν ≥ 1 whenever the scale is estimated (the fit needs n ≥ p + 1 then).
        let chi2 = ChiSquared::new(nu.max(1.0)).map_err(|_| IntervalError::Singular)?;
        Ok(SigmaScale {
            scaled,
            s,
            nu,
            chi2,
        })
    }

    /// This draw's factor, read from the draw's own stream (nothing read when σ are known).
    pub(crate) fn draw(&self, rng: &mut DrawRng) -> f64 {
        if self.scaled {
            self.s * (self.nu / rng.sample(&self.chi2)).sqrt()
        } else {
            1.0
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn streams_are_fixed_by_seed_and_index_alone() {
        let a: Vec<f64> = (0..5).map(|_| DrawRng::new(7, 3).normal()).collect();
        assert!(a.windows(2).all(|w| w[0] == w[1]));
        let mut x = DrawRng::new(7, 3);
        let mut y = DrawRng::new(7, 4);
        let mut z = DrawRng::new(8, 3);
        let (u, v, w) = (x.normal(), y.normal(), z.normal());
        assert!(u != v && u != w);
    }

    #[test]
    fn indices_are_uniform_and_in_range() {
        let mut r = DrawRng::new(1, 0);
        let mut counts = [0usize; 7];
        for _ in 0..70_000 {
            counts[r.index(7)] += 1;
        }
        // 10 000 expected in each; SD √(70000·(1/7)(6/7)) ≈ 93 (binomial), so ±500 is > 5 SD.
        assert!(
            counts.iter().all(|&c| (9_500..=10_500).contains(&c)),
            "{counts:?}"
        );
    }
}
