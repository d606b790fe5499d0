//! Summary statistics of samples, for tolerance runs (the samples come from
//! [`crate::random::Rng`]).
//!
//! Percentiles use linear interpolation between order statistics (the "type 7" rule of
//! R. J. Hyndman and Y. Fan, Am. Stat. 50, 361 (1996)), the default of common numerical tools.

use crate::contract::fields::{Fields, as_number, type_name};
use crate::error::Error;
use serde::Serialize;
use serde_json::Value;

/// A histogram with equal bins.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Histogram {
    /// Bin edges, one more than the counts.
    pub edges: Vec<f64>,
    /// Samples per bin.
    pub counts: Vec<u64>,
}

/// Mean, spread, percentiles and histogram of a sample.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Summary {
    /// Number of samples.
    pub n: usize,
    /// Arithmetic mean.
    pub mean: f64,
    /// Sample standard deviation (n − 1 in the denominator).
    pub std: f64,
    /// 5th percentile.
    pub p5: f64,
    /// 95th percentile.
    pub p95: f64,
    /// Smallest sample.
    pub min: f64,
    /// Largest sample.
    pub max: f64,
    /// Histogram over [min, max].
    pub histogram: Histogram,
}

impl Summary {
    /// Reads a summary written as JSON (the shape it serializes to), by hand to keep the page's
    /// WebAssembly module small.
    ///
    /// # Errors
    /// The path of the first offending field, under `summary`.
    pub fn from_json(v: &Value) -> Result<Summary, Error> {
        let mut f = Fields::new("summary", v)?;
        let list = |path: &str, v: Option<&Value>| -> Result<Vec<f64>, Error> {
            match v {
                Some(Value::Array(items)) => items
                    .iter()
                    .enumerate()
                    .map(|(i, x)| as_number(&format!("{path}[{i}]"), x))
                    .collect(),
                Some(other) => Err(Error::new(
                    path,
                    format!("must be a list of numbers, got {}", type_name(other)),
                )),
                None => Ok(Vec::new()),
            }
        };
        let n = f.number_or("n", 0.0)?;
        let (mean, std, p5, p95, min, max) = (
            f.number_or("mean", 0.0)?,
            f.number_or("std", 0.0)?,
            f.number_or("p5", 0.0)?,
            f.number_or("p95", 0.0)?,
            f.number_or("min", 0.0)?,
            f.number_or("max", 0.0)?,
        );
        let (edges, counts) = match f.get("histogram") {
            None => (Vec::new(), Vec::new()),
            Some(h) => {
                let mut g = Fields::new("summary.histogram", h)?;
                let edges = list("summary.histogram.edges", g.get("edges"))?;
                let counts = list("summary.histogram.counts", g.get("counts"))?;
                g.finish()?;
                (edges, counts.iter().map(|c| c.max(0.0) as u64).collect())
            }
        };
        f.finish()?;
        Ok(Summary {
            n: n.max(0.0) as usize,
            mean,
            std,
            p5,
            p95,
            min,
            max,
            histogram: Histogram { edges, counts },
        })
    }
}

/// The `q`-quantile (0–1) of sorted data by linear interpolation (type 7).
///
/// Degenerate cases: empty data gives NaN is avoided by returning 0.
pub fn quantile_sorted(sorted: &[f64], q: f64) -> f64 {
    match sorted.len() {
        0 => 0.0,
        1 => sorted[0],
        n => {
            let h = (n - 1) as f64 * q.clamp(0.0, 1.0);
            let lo = h.floor() as usize;
            let hi = (lo + 1).min(n - 1);
            sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo])
        }
    }
}

/// Summarizes `samples` (non-finite values are dropped) with `bins` histogram bins.
pub fn summarize(samples: &[f64], bins: usize) -> Summary {
    let mut v: Vec<f64> = samples.iter().copied().filter(|x| x.is_finite()).collect();
    crate::small_sort::sort_by_less(&mut v, |a, b| a.total_cmp(b).is_lt());
    let n = v.len();
    if n == 0 {
        return Summary {
            n: 0,
            mean: 0.0,
            std: 0.0,
            p5: 0.0,
            p95: 0.0,
            min: 0.0,
            max: 0.0,
            histogram: Histogram {
                edges: vec![],
                counts: vec![],
            },
        };
    }
    // Two-pass mean and variance (accurate for data far from zero).
    let mean = v.iter().sum::<f64>() / n as f64;
    let var = if n > 1 {
        v.iter().map(|x| (x - mean) * (x - mean)).sum::<f64>() / (n - 1) as f64
    } else {
        0.0
    };
    let (min, max) = (v[0], v[n - 1]);
    let bins = bins.clamp(1, 1000);
    let width = (max - min) / bins as f64;
    let edges: Vec<f64> = (0..=bins).map(|i| min + width * i as f64).collect();
    let mut counts = vec![0u64; bins];
    for x in &v {
        let k = if width > 0.0 {
            (((x - min) / width) as usize).min(bins - 1)
        } else {
            0
        };
        counts[k] += 1;
    }
    Summary {
        n,
        mean,
        std: var.sqrt(),
        p5: quantile_sorted(&v, 0.05),
        p95: quantile_sorted(&v, 0.95),
        min,
        max,
        histogram: Histogram { edges, counts },
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn normal_deviates_have_unit_spread() {
        let mut r = crate::random::Rng::new(7);
        let xs: Vec<f64> = (0..200_000).map(|_| r.normal()).collect();
        let s = summarize(&xs, 20);
        assert!(s.mean.abs() < 0.01, "{}", s.mean);
        assert!((s.std - 1.0).abs() < 0.01, "{}", s.std);
        // Standard normal quantile z(0.95) = 1.6449 (statistical tables).
        assert!(
            (s.p95 - 1.6449).abs() < 0.02 && (s.p5 + 1.6449).abs() < 0.02,
            "{} {}",
            s.p5,
            s.p95
        );
        assert_eq!(s.histogram.counts.iter().sum::<u64>(), 200_000);
    }

    #[test]
    fn summaries_read_back_what_they_write() {
        let s = summarize(&[1.0, 2.0, 2.5, 4.0], 3);
        let v = serde_json::to_value(&s).unwrap();
        assert_eq!(Summary::from_json(&v).unwrap(), s);
        assert_eq!(
            Summary::from_json(&serde_json::json!({"mean": "x"})).unwrap_err().field,
            "summary.mean"
        );
    }

    #[test]
    fn quantiles_interpolate_like_type_7() {
        // Hyndman & Fan type 7 on 1..=5: the 0.05 quantile is 1.2, the 0.95 quantile 4.8.
        let v = [1.0, 2.0, 3.0, 4.0, 5.0];
        assert!((quantile_sorted(&v, 0.05) - 1.2).abs() < 1e-12);
        assert!((quantile_sorted(&v, 0.95) - 4.8).abs() < 1e-12);
        assert_eq!(summarize(&[], 5).n, 0);
        assert_eq!(summarize(&[f64::NAN, 2.0], 5).n, 1);
    }
}
