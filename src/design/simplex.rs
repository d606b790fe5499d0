//! A local minimizer over a box: the Nelder–Mead simplex, restarted until it stops improving.
//!
//! Method (J. A. Nelder and R. Mead, "A simplex method for function minimization", The Computer
//! Journal 7, 308-313 (1965)): a simplex of n + 1 points moves downhill by reflecting its worst
//! point through the centroid of the others, expanding when that helps, contracting when it
//! does not, and shrinking toward the best point when even a contraction fails; the standard
//! coefficients 1, 2, ½, ½. Points are clamped into the box. The simplex can collapse on a
//! face before it reaches a minimum, so it is restarted from its best point with a fresh simplex
//! (a step of `STEP` of each side of the box, then smaller) while that lowers the value, the
//! usual remedy (e.g. Numerical Recipes, 3rd ed. §10.5, from memory).
//!
//! Used to finish what a global search found: the global search gets into the right valley, this
//! goes to its floor. Deterministic: no randomness. The value returned is never above the
//! starting point's.

/// First step of each restarted simplex, as a fraction of each side of the box.
const STEP: f64 = 0.02;
/// Each restart's step is this fraction of the last one's.
const STEP_SHRINK: f64 = 0.3;
/// Most restarts.
const RESTARTS: usize = 6;
/// A simplex is done when its values agree to this (relative, with an absolute floor).
const FLAT: f64 = 1e-13;

/// Minimizes `f` over the box `bounds` from `start` with at most `evaluations` evaluations of
/// `f`; returns the best point and its value (never worse than `start`'s). A non-finite value
/// counts as worse than any finite one.
pub fn polish(f: impl Fn(&[f64]) -> f64, bounds: &[(f64, f64)], start: &[f64], evaluations: usize) -> (Vec<f64>, f64) {
    let score = |x: &[f64]| {
        let v = f(x);
        if v.is_finite() { v } else { f64::INFINITY }
    };
    let clamp = |x: &mut Vec<f64>| {
        for (v, (lo, hi)) in x.iter_mut().zip(bounds) {
            *v = v.clamp(*lo, *hi);
        }
    };
    let n = bounds.len();
    let mut best: Vec<f64> = start.to_vec();
    clamp(&mut best);
    let mut best_value = score(&best);
    let mut used = 1;
    let mut step = STEP;
    for _ in 0..RESTARTS {
        if n == 0 || used >= evaluations {
            break;
        }
        // A fresh simplex about the best point: one step along each coordinate, toward the
        // box's larger side.
        let mut points: Vec<Vec<f64>> = vec![best.clone()];
        for (j, (lo, hi)) in bounds.iter().enumerate() {
            let mut p = best.clone();
            let d = step * (hi - lo);
            p[j] = if p[j] + d <= *hi { p[j] + d } else { p[j] - d };
            clamp(&mut p);
            points.push(p);
        }
        let mut values: Vec<f64> = points.iter().map(|p| score(p)).collect();
        used += n;
        while used < evaluations {
            let mut order: Vec<usize> = (0..=n).collect();
            crate::small_sort::sort_by_less(&mut order, |&a, &b| {
                values[a].total_cmp(&values[b]).then(a.cmp(&b)).is_lt()
            });
            let (lo_i, hi_i, next_i) = (order[0], order[n], order[n - 1]);
            let (lo_v, hi_v) = (values[lo_i], values[hi_i]);
            if hi_v - lo_v <= FLAT * lo_v.abs().max(1e-300) {
                break;
            }
            let centroid: Vec<f64> = (0..n)
                .map(|j| (0..=n).filter(|&k| k != hi_i).map(|k| points[k][j]).sum::<f64>() / n as f64)
                .collect();
            let toward = |t: f64| -> Vec<f64> {
                let mut p: Vec<f64> = (0..n)
                    .map(|j| centroid[j] + t * (points[hi_i][j] - centroid[j]))
                    .collect();
                clamp(&mut p);
                p
            };
            let reflected = toward(-1.0);
            let r = score(&reflected);
            used += 1;
            if r < lo_v {
                let expanded = toward(-2.0);
                let e = score(&expanded);
                used += 1;
                (points[hi_i], values[hi_i]) = if e < r { (expanded, e) } else { (reflected, r) };
            } else if r < values[next_i] {
                (points[hi_i], values[hi_i]) = (reflected, r);
            } else {
                let contracted = if r < hi_v { toward(-0.5) } else { toward(0.5) };
                let c = score(&contracted);
                used += 1;
                if c < hi_v.min(r) {
                    (points[hi_i], values[hi_i]) = (contracted, c);
                } else {
                    for k in 0..=n {
                        if k != lo_i {
                            let mut p: Vec<f64> = (0..n)
                                .map(|j| points[lo_i][j] + 0.5 * (points[k][j] - points[lo_i][j]))
                                .collect();
                            clamp(&mut p);
                            values[k] = score(&p);
                            points[k] = p;
                        }
                    }
                    used += n;
                }
            }
        }
        let k = (0..=n).min_by(|&a, &b| values[a].total_cmp(&values[b])).unwrap_or(0);
        if values[k] < best_value {
            let gain = best_value - values[k];
            best = points[k].clone();
            best_value = values[k];
            if gain <= FLAT * best_value.abs() {
                break;
            }
        } else {
            break;
        }
        step *= STEP_SHRINK;
    }
    (best, best_value)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Rosenbrock's curved valley (H. H. Rosenbrock, The Computer Journal 3, 175 (1960)), the
    /// classic test of Nelder and Mead's method, from a point far up its side; a bowl whose
    /// minimum lies outside the box ends on the box's face; never worse than the start.
    #[test]
    fn it_reaches_rosenbrock_s_minimum_and_holds_the_box() {
        let rosen = |x: &[f64]| (1.0 - x[0]).powi(2) + 100.0 * (x[1] - x[0] * x[0]).powi(2);
        let (x, v) = polish(rosen, &[(-2.0, 2.0), (-1.0, 3.0)], &[-1.2, 1.0], 20_000);
        assert!(
            (x[0] - 1.0).abs() < 1e-5 && (x[1] - 1.0).abs() < 1e-5 && v < 1e-10,
            "{x:?} {v}"
        );
        let bowl = |x: &[f64]| (x[0] - 2.0).powi(2) + (x[1] + 0.5).powi(2);
        let (x, _) = polish(bowl, &[(-1.0, 1.0), (-1.0, 1.0)], &[0.0, 0.0], 5_000);
        assert!((x[0] - 1.0).abs() < 1e-9 && (x[1] + 0.5).abs() < 1e-5, "{x:?}");
        let (x, v) = polish(|x: &[f64]| x[0].abs(), &[(-1.0, 1.0)], &[0.0], 100);
        assert_eq!((x, v), (vec![0.0], 0.0));
    }
}
