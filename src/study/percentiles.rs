//! Percentiles of a study's results: P10, P50 and P90 by linear interpolation between order
//! statistics, definition 7 of Hyndman & Fan (1996), "Sample quantiles in statistical
//! packages", The American Statistician 50(4) (the default of most statistics packages).

/// The spread of one result over the cases that gave it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Spread {
    /// Number of values (failed cases and missing values left out).
    pub count: usize,
    /// Smallest value.
    pub min: f64,
    /// 10th percentile.
    pub p10: f64,
    /// Median.
    pub p50: f64,
    /// 90th percentile.
    pub p90: f64,
    /// Largest value.
    pub max: f64,
    /// Arithmetic mean.
    pub mean: f64,
}

/// The `p`-th quantile (0..=1) of sorted finite values, Hyndman & Fan definition 7:
/// h = (n - 1) p, Q = x[floor h] + (h - floor h) (x[floor h + 1] - x[floor h]).
pub fn quantile(sorted: &[f64], p: f64) -> f64 {
    match sorted.len() {
        0 => f64::NAN,
        1 => sorted[0],
        n => {
            let h = (n - 1) as f64 * p.clamp(0.0, 1.0);
            let lo = h.floor() as usize;
            let hi = (lo + 1).min(n - 1);
            sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo])
        }
    }
}

/// The spread of `values`, non-finite ones left out; `None` when none is finite.
pub fn spread(values: &[f64]) -> Option<Spread> {
    let mut v: Vec<f64> = values.iter().copied().filter(|x| x.is_finite()).collect();
    if v.is_empty() {
        return None;
    }
    v.sort_by(f64::total_cmp);
    Some(Spread {
        count: v.len(),
        min: v[0],
        p10: quantile(&v, 0.1),
        p50: quantile(&v, 0.5),
        p90: quantile(&v, 0.9),
        max: v[v.len() - 1],
        mean: v.iter().sum::<f64>() / v.len() as f64,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percentiles_as_numpy_computes_them() {
        // numpy 1.x `numpy.percentile(x, [10, 50, 90])` (linear method, Hyndman & Fan 7) on
        // these ten values gives [0.94, 4.85, 8.91].
        let x = [3.1, 1.0, 4.7, 2.2, 9.9, 5.0, 6.5, 0.4, 8.8, 7.3];
        let s = spread(&x).unwrap();
        assert!((s.p10 - 0.94).abs() < 1e-12, "{}", s.p10);
        assert!((s.p50 - 4.85).abs() < 1e-12, "{}", s.p50);
        assert!((s.p90 - 8.91).abs() < 1e-12, "{}", s.p90);
        assert_eq!((s.min, s.max, s.count), (0.4, 9.9, 10));
        assert!((s.mean - 4.89).abs() < 1e-12);
    }

    #[test]
    fn missing_values_are_left_out() {
        let s = spread(&[f64::NAN, 2.0, 1.0, f64::INFINITY]).unwrap();
        assert_eq!(s.count, 2);
        assert_eq!(s.p50, 1.5);
        assert!(spread(&[f64::NAN]).is_none());
        assert_eq!(quantile(&[5.0], 0.9), 5.0);
        // The ends are the smallest and the largest value (h = 0 and h = n - 1).
        let sorted = [1.0, 2.0, 4.0, 8.0];
        assert_eq!(quantile(&sorted, 0.0), 1.0);
        assert_eq!(quantile(&sorted, 1.0), 8.0);
        assert_eq!(quantile(&sorted, 0.5), 3.0);
    }
}
