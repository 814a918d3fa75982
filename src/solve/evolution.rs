//! Quantities read off a charge-state evolution (fractions `[times, charge 0…Z]` on a time
//! grid): peaks, interpolation, mean charge, the charges that matter. One definition serves
//! the Python `Evolution` and the planning layer's report.

use ndarray::ArrayView2;

/// Time (s) and value of the largest fraction of charge `q` on the grid (the first if tied);
/// NaNs for an empty grid.
pub fn peak(times_s: &[f64], fractions: ArrayView2<'_, f64>, q: usize) -> (f64, f64) {
    let col = fractions.column(q);
    if col.is_empty() {
        return (f64::NAN, f64::NAN);
    }
    let mut best = 0;
    for (i, v) in col.iter().enumerate() {
        if *v > col[best] {
            best = i;
        }
    }
    (times_s[best], col[best])
}

/// Fractions at `time_s`, linear between grid points, held at the ends outside the grid
/// (numpy.interp's arithmetic, slope × offset + left value, so results match it).
pub fn interpolate(times_s: &[f64], fractions: ArrayView2<'_, f64>, time_s: f64) -> Vec<f64> {
    let n = times_s.len();
    if n == 0 {
        return Vec::new();
    }
    let k = times_s.partition_point(|x| *x < time_s);
    if k == 0 {
        return fractions.row(0).to_vec();
    }
    if k == n {
        return fractions.row(n - 1).to_vec();
    }
    if times_s[k] == time_s {
        return fractions.row(k).to_vec();
    }
    let (t0, t1) = (times_s[k - 1], times_s[k]);
    fractions
        .row(k - 1)
        .iter()
        .zip(fractions.row(k))
        .map(|(a, b)| (b - a) / (t1 - t0) * (time_s - t0) + a)
        .collect()
}

/// Mean charge Σ q·F_q / Σ F_q at every time (0 where every fraction is 0).
pub fn mean_charge(fractions: ArrayView2<'_, f64>) -> Vec<f64> {
    fractions
        .rows()
        .into_iter()
        .map(|r| {
            let total: f64 = r.sum();
            let charge: f64 = r.iter().enumerate().map(|(q, f)| q as f64 * f).sum();
            if total > 0.0 {
                charge / total
            } else {
                0.0
            }
        })
        .collect()
}

/// Index of the grid value nearest to `x` (the first if tied; 0 for an empty grid).
pub fn nearest_index(values: &[f64], x: f64) -> usize {
    let mut best = (0, f64::INFINITY);
    for (i, v) in values.iter().enumerate() {
        let d = (v - x).abs();
        if d < best.1 {
            best = (i, d);
        }
    }
    best.0
}

/// Charge states whose fraction ever exceeds `threshold`.
pub fn dominant_charges(fractions: ArrayView2<'_, f64>, threshold: f64) -> Vec<usize> {
    (0..fractions.ncols())
        .filter(|&q| fractions.column(q).iter().any(|f| *f > threshold))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use ndarray::array;

    #[test]
    fn peak_interpolation_mean_and_dominant() {
        let t = [0.0, 1.0, 3.0];
        let f = array![[1.0, 0.0], [0.4, 0.6], [0.2, 0.8]];
        assert_eq!(peak(&t, f.view(), 1), (3.0, 0.8));
        assert_eq!(peak(&t, f.view(), 0), (0.0, 1.0));
        let mid = interpolate(&t, f.view(), 2.0);
        assert!((mid[1] - 0.7).abs() < 1e-15);
        assert_eq!(interpolate(&t, f.view(), -1.0), vec![1.0, 0.0]);
        assert_eq!(interpolate(&t, f.view(), 9.0), vec![0.2, 0.8]);
        assert_eq!(interpolate(&t, f.view(), 1.0), vec![0.4, 0.6]);
        assert_eq!(mean_charge(f.view()), vec![0.0, 0.6, 0.8]);
        assert_eq!(nearest_index(&t, 2.2), 2);
        assert_eq!(dominant_charges(f.view(), 0.5), vec![0, 1]);
        assert_eq!(dominant_charges(f.view(), 0.9), vec![0]);
    }
}
