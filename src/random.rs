//! A seeded normal random generator: Monte Carlo tolerance runs and randomized tests in every
//! layer draw from it.
//!
//! The generator is xorshift64* (S. Vigna, "An experimental exploration of Marsaglia's xorshift
//! generators, scrambled", ACM TOMS 42 (2016)) with the Box–Muller transform (G. E. P. Box and
//! M. E. Muller, Ann. Math. Statist. 29, 610 (1958)) for normal deviates: small, fast,
//! reproducible from a seed, and good enough for Monte Carlo tolerancing (not for cryptography).

/// A seeded pseudo-random generator of uniform and normal deviates.
#[derive(Debug, Clone)]
pub struct Rng {
    state: u64,
    spare: Option<f64>,
}

impl Rng {
    /// A generator from a seed (any value; 0 is remapped).
    pub fn new(seed: u64) -> Rng {
        Rng {
            state: seed ^ 0x9E37_79B9_7F4A_7C15 | 1,
            spare: None,
        }
    }

    /// A uniform deviate in (0, 1).
    pub fn uniform(&mut self) -> f64 {
        self.state ^= self.state >> 12;
        self.state ^= self.state << 25;
        self.state ^= self.state >> 27;
        let x = self.state.wrapping_mul(0x2545_F491_4F6C_DD1D);
        ((x >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }

    /// A standard normal deviate.
    pub fn normal(&mut self) -> f64 {
        if let Some(s) = self.spare.take() {
            return s;
        }
        let (u, v) = (self.uniform(), self.uniform());
        let r = (-2.0 * u.ln()).sqrt();
        let t = std::f64::consts::TAU * v;
        self.spare = Some(r * t.sin());
        r * t.cos()
    }
}
