//! A symmetric banded linear solve by Cholesky factorization, for the director solver's Newton
//! steps.
//!
//! The matrix is stored by its lower band: `band[i][d]` = A(i, i − d) for d ≤ the half-width.
//! Cholesky without pivoting succeeds exactly when the matrix is positive definite, which is what
//! the Newton solver needs to know (a descent direction); a non-positive pivot is reported, not
//! hidden. Source: G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed. (2013),
//! §4.3.5 (band Cholesky).

/// Half-width of the band the director solver uses: two unknowns per node, each coupled to the
/// nodes on either side.
pub const HALF_WIDTH: usize = 3;

/// A symmetric matrix of half-width [`HALF_WIDTH`], stored by its lower band.
#[derive(Debug, Clone, PartialEq)]
pub struct Banded {
    band: Vec<[f64; HALF_WIDTH + 1]>,
}

impl Banded {
    /// The zero matrix of order `n`.
    pub fn zeros(n: usize) -> Banded {
        Banded {
            band: vec![[0.0; HALF_WIDTH + 1]; n],
        }
    }

    /// Order of the matrix.
    pub fn order(&self) -> usize {
        self.band.len()
    }

    /// Adds `v` to A(i, j) (and so to A(j, i)); entries outside the band are ignored, which the
    /// caller never asks for.
    pub fn add(&mut self, i: usize, j: usize, v: f64) {
        let (i, j) = if i >= j { (i, j) } else { (j, i) };
        if i - j <= HALF_WIDTH && i < self.band.len() {
            self.band[i][i - j] += v;
        }
    }

    /// The diagonal entry A(i, i).
    pub fn diagonal(&self, i: usize) -> f64 {
        self.band[i][0]
    }

    /// Adds `mu` to every diagonal entry.
    pub fn shift(&mut self, mu: f64) {
        for row in &mut self.band {
            row[0] += mu;
        }
    }

    /// The Cholesky factor L (A = L Lᵀ) in the same storage, or `None` when a pivot is not
    /// positive (the matrix is not positive definite) or not finite.
    pub fn cholesky(&self) -> Option<Banded> {
        let n = self.band.len();
        let mut l = Banded::zeros(n);
        for i in 0..n {
            let first = i.saturating_sub(HALF_WIDTH);
            for j in first..=i {
                let mut s = self.band[i][i - j];
                let from = first.max(j.saturating_sub(HALF_WIDTH));
                for k in from..j {
                    s -= l.band[i][i - k] * l.band[j][j - k];
                }
                if i == j {
                    if !(s > 0.0 && s.is_finite()) {
                        return None;
                    }
                    l.band[i][0] = s.sqrt();
                } else {
                    l.band[i][i - j] = s / l.band[j][0];
                }
            }
        }
        Some(l)
    }

    /// Solves L Lᵀ x = b for this Cholesky factor L.
    // Index loops read the band as the textbook writes it (Golub & Van Loan Alg. 4.3.5).
    #[allow(clippy::needless_range_loop)]
    pub fn solve_factored(&self, b: &[f64]) -> Vec<f64> {
        let n = self.band.len();
        let mut y = b.to_vec();
        for i in 0..n {
            let mut s = y[i];
            for k in i.saturating_sub(HALF_WIDTH)..i {
                s -= self.band[i][i - k] * y[k];
            }
            y[i] = s / self.band[i][0];
        }
        for i in (0..n).rev() {
            let mut s = y[i];
            for k in i + 1..n.min(i + HALF_WIDTH + 1) {
                s -= self.band[k][k - i] * y[k];
            }
            y[i] = s / self.band[i][0];
        }
        y
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_within;

    /// Cross-check against a dense solve: the second-difference matrix plus a coupling of width 3
    /// solved both ways.
    #[test]
    fn agrees_with_a_dense_solve() {
        let n = 9;
        let mut a = Banded::zeros(n);
        let mut dense = nalgebra::DMatrix::<f64>::zeros(n, n);
        for i in 0..n {
            for d in 0..=HALF_WIDTH.min(i) {
                let v = if d == 0 {
                    4.0 + i as f64
                } else {
                    -1.0 / (d as f64 + 0.5)
                };
                a.add(i, i - d, v);
                dense[(i, i - d)] += v;
                if d > 0 {
                    dense[(i - d, i)] += v;
                }
            }
        }
        let b: Vec<f64> = (0..n).map(|i| (i as f64 * 0.7).sin()).collect();
        let x = a.cholesky().unwrap().solve_factored(&b);
        let y = dense.lu().solve(&nalgebra::DVector::from_vec(b)).unwrap();
        for i in 0..n {
            assert_within(x[i], y[i], 1e-14, "banded solve");
        }
    }

    /// An indefinite matrix is refused.
    #[test]
    fn indefinite_is_refused() {
        let mut a = Banded::zeros(2);
        a.add(0, 0, 1.0);
        a.add(1, 1, 1.0);
        a.add(1, 0, 2.0);
        assert!(a.cholesky().is_none());
    }
}
