//! The shifted solves of [`banded`](super::banded) for general, non-banded networks: the
//! generator is reduced once to upper Hessenberg form, M = Q H Qᵀ with Q orthogonal
//! (Householder reflections; G. H. Golub and C. F. Van Loan, *Matrix Computations*, 4th ed.
//! (2013), Algorithm 7.4.2), so that every shifted matrix p·I − h·M = Q (p·I − h·H) Qᵀ is
//! Hessenberg too. A Hessenberg LU with partial pivoting costs O(n²) instead of the O(n³) of
//! a dense LU, so a change of step size, which the error control makes at nearly every step,
//! costs O(n²) and the O(n³) work is done once per propagation (the reduction of
//! W. H. Enright, ACM Trans. Math. Softw. 4, 127 (1978), for stiff integrators).
//!
//! Unlike the band elimination with pivots from column sums, orthogonal reduction carries
//! round-off of order ε·‖M‖ into every mode, so slow modes next to very fast rates keep less
//! relative accuracy; the band path is therefore kept whenever its cost is moderate (see
//! `radau::Kernel`).

use num_complex::Complex64;
use rayon::prelude::*;

use super::banded::{BandMatrix, Poles};
use super::radau::{StageOut, COMPLEX_POLES, REAL_POLE, STAGE_WEIGHTS};
use crate::error::Result;
use crate::interrupt;
use crate::limits::try_vec;

/// The poles as complex numbers: the real one first.
fn poles() -> [Complex64; 3] {
    [
        Complex64::new(REAL_POLE, 0.0),
        COMPLEX_POLES[0].0,
        COMPLEX_POLES[1].0,
    ]
}

/// LU factors of one Hessenberg matrix p·I − h·H: row swaps between neighbours, the
/// multiplier of each elimination and U in row-major storage (lower part unused).
#[derive(Clone, Debug)]
struct HessenbergLu {
    swapped: Vec<bool>,
    multiplier: Vec<Complex64>,
    u: Vec<Complex64>,
}

impl HessenbergLu {
    fn new(n: usize) -> Result<Self> {
        Ok(Self {
            swapped: try_vec("the Hessenberg factors", n, false)?,
            multiplier: try_vec("the Hessenberg factors", n, Complex64::new(0.0, 0.0))?,
            u: try_vec("the Hessenberg factors", n * n, Complex64::new(0.0, 0.0))?,
        })
    }

    fn factor(&mut self, hess: &[f64], n: usize, pole: Complex64, h: f64) {
        for (i, row) in self.u.chunks_mut(n).enumerate() {
            let first = i.saturating_sub(1);
            for j in first..n {
                row[j] = Complex64::new(-h * hess[i * n + j], 0.0);
            }
            row[i] += pole;
        }
        for k in 0..n.saturating_sub(1) {
            let (top, rest) = self.u.split_at_mut((k + 1) * n);
            let (row_k, row_next) = (&mut top[k * n..], &mut rest[..n]);
            let swap = row_next[k].norm_sqr() > row_k[k].norm_sqr();
            if swap {
                for j in k..n {
                    std::mem::swap(&mut row_k[j], &mut row_next[j]);
                }
            }
            let l = row_next[k] / row_k[k];
            for j in k + 1..n {
                let a = row_k[j];
                row_next[j] -= l * a;
            }
            self.swapped[k] = swap;
            self.multiplier[k] = l;
        }
    }

    /// Solve in place.
    fn solve(&self, x: &mut [Complex64], n: usize) {
        for k in 0..n.saturating_sub(1) {
            if self.swapped[k] {
                x.swap(k, k + 1);
            }
            let a = x[k];
            x[k + 1] -= self.multiplier[k] * a;
        }
        for i in (0..n).rev() {
            let row = &self.u[i * n..(i + 1) * n];
            let mut s = x[i];
            for j in i + 1..n {
                s -= row[j] * x[j];
            }
            x[i] = s / row[i];
        }
    }
}

/// The Hessenberg form of M and the factors of p·I − h·H for three poles × [h, h/2].
#[derive(Clone, Debug)]
pub(crate) struct HessenbergPair {
    n: usize,
    hess: Vec<f64>,
    /// Householder vectors v_k (length n − k − 1) with their β_k, k = 0 … n − 3.
    reflectors: Vec<(Vec<f64>, f64)>,
    factors: Vec<HessenbergLu>,
    work: Vec<f64>,
    solve: Vec<Complex64>,
    sums: [Vec<f64>; 3],
}

/// Bytes held by a [`HessenbergPair`] for `n` states (for the size model).
pub(crate) fn working_bytes(n: usize) -> u64 {
    let n2 = (n as u64).saturating_mul(n as u64);
    // H and a copy while reducing (2 × 8), reflectors (8 / 2), six complex factors (6 × 16).
    n2.saturating_mul(16 + 4 + 96)
}

impl HessenbergPair {
    pub fn new(m: &BandMatrix) -> Result<Self> {
        let n = m.n;
        let mut a = try_vec("the Hessenberg form", n * n, 0.0)?;
        for (i, row) in a.chunks_mut(n).enumerate() {
            for (j, x) in row.iter_mut().enumerate() {
                *x = m.get(i, j);
            }
        }
        let mut reflectors = Vec::new();
        let mut w = vec![0.0; n];
        for k in 0..n.saturating_sub(2) {
            // O(n²) per column: a long reduction stays interruptible.
            interrupt::check()?;
            let mut v: Vec<f64> = (k + 1..n).map(|i| a[i * n + k]).collect();
            let norm = v.iter().map(|x| x * x).sum::<f64>().sqrt();
            if norm == 0.0 {
                reflectors.push((v, 0.0));
                continue;
            }
            let alpha = if v[0] > 0.0 { -norm } else { norm };
            v[0] -= alpha;
            let vv: f64 = v.iter().map(|x| x * x).sum();
            let beta = 2.0 / vv;
            // Left: rows k+1.. of columns k.. minus β v (vᵀ A).
            w[k..].iter_mut().for_each(|x| *x = 0.0);
            for (i, vi) in v.iter().enumerate() {
                let row = &a[(k + 1 + i) * n..(k + 2 + i) * n];
                for j in k..n {
                    w[j] += vi * row[j];
                }
            }
            for (i, vi) in v.iter().enumerate() {
                let row = &mut a[(k + 1 + i) * n..(k + 2 + i) * n];
                let s = beta * vi;
                for j in k..n {
                    row[j] -= s * w[j];
                }
            }
            // Right: every row minus β (A v) vᵀ on columns k+1.. (rows are independent).
            a.par_chunks_mut(n).for_each(|row| {
                let tail = &mut row[k + 1..];
                let s = beta * tail.iter().zip(&v).map(|(x, y)| x * y).sum::<f64>();
                for (x, y) in tail.iter_mut().zip(&v) {
                    *x -= s * y;
                }
            });
            for i in k + 2..n {
                a[i * n + k] = 0.0;
            }
            reflectors.push((v, beta));
        }
        let factors = (0..6)
            .map(|_| HessenbergLu::new(n))
            .collect::<Result<Vec<_>>>()?;
        Ok(Self {
            n,
            hess: a,
            reflectors,
            factors,
            work: vec![0.0; n],
            solve: vec![Complex64::new(0.0, 0.0); n],
            sums: [vec![0.0; n], vec![0.0; n], vec![0.0; n]],
        })
    }

    pub fn factor(&mut self, h: [f64; 2]) {
        let (n, hess) = (self.n, &self.hess);
        let ps = poles();
        self.factors
            .par_iter_mut()
            .enumerate()
            .for_each(|(k, lu)| lu.factor(hess, n, ps[k % 3], h[k / 3]));
    }

    /// x ↦ Qᵀx (`transpose`) or Qx.
    fn apply_q(reflectors: &[(Vec<f64>, f64)], x: &mut [f64], transpose: bool) {
        let mut one = |(v, beta): &(Vec<f64>, f64), k: usize| {
            let tail = &mut x[k + 1..];
            let s = beta * tail.iter().zip(v).map(|(a, b)| a * b).sum::<f64>();
            for (a, b) in tail.iter_mut().zip(v) {
                *a -= s * b;
            }
        };
        if transpose {
            reflectors.iter().enumerate().for_each(|(k, r)| one(r, k));
        } else {
            reflectors
                .iter()
                .enumerate()
                .rev()
                .for_each(|(k, r)| one(r, k));
        }
    }

    /// Same contract as [`BandPair::combine`](super::banded::BandPair::combine).
    // The outputs stay separate slices: the hot loop writes each directly.
    #[allow(clippy::too_many_arguments)]
    pub fn combine<const FIRST: usize>(
        &mut self,
        h: [f64; 2],
        weights: &Poles,
        rate_weights: &Poles,
        f: &[f64],
        out: [&mut [f64]; 2],
        rate: &mut [f64],
        mut stages: StageOut<'_>,
    ) {
        let n = self.n;
        self.work.copy_from_slice(f);
        Self::apply_q(&self.reflectors, &mut self.work, true);
        let w = [
            Complex64::new(weights.real, 0.0),
            weights.complex[0],
            weights.complex[1],
        ];
        let rw = [
            Complex64::new(rate_weights.real, 0.0),
            rate_weights.complex[0],
            rate_weights.complex[1],
        ];
        let [sum0, sum1, sum_rate] = &mut self.sums;
        for s in FIRST..2 {
            let target = if s == 0 { &mut *sum0 } else { &mut *sum1 };
            target.iter_mut().for_each(|x| *x = 0.0);
            if s == 1 && FIRST == 0 {
                sum_rate.iter_mut().for_each(|x| *x = 0.0);
            }
            for pole in 0..3 {
                for (x, g) in self.solve.iter_mut().zip(&self.work) {
                    *x = Complex64::new(h[s] * g, 0.0);
                }
                self.factors[s * 3 + pole].solve(&mut self.solve, n);
                for (t, x) in target.iter_mut().zip(&self.solve) {
                    *t += (w[pole] * x).re;
                }
                if let Some(st) = stages[s].as_deref_mut() {
                    for (j, sw) in STAGE_WEIGHTS.iter().enumerate() {
                        let weight =
                            [Complex64::new(sw.real, 0.0), sw.complex[0], sw.complex[1]][pole];
                        if pole == 0 {
                            st[j].iter_mut().for_each(|x| *x = 0.0);
                        }
                        for (t, x) in st[j].iter_mut().zip(&self.solve) {
                            *t += (weight * x).re;
                        }
                    }
                }
                if s == 1 && FIRST == 0 {
                    for (t, x) in sum_rate.iter_mut().zip(&self.solve) {
                        *t += (rw[pole] * x).re / h[1];
                    }
                }
            }
        }
        let [out0, out1] = out;
        if FIRST == 0 {
            Self::apply_q(&self.reflectors, sum0, false);
            out0.copy_from_slice(sum0);
            Self::apply_q(&self.reflectors, sum_rate, false);
            rate.copy_from_slice(sum_rate);
        }
        Self::apply_q(&self.reflectors, sum1, false);
        out1.copy_from_slice(sum1);
        for st in stages.iter_mut().skip(FIRST) {
            if let Some(st) = st.as_deref_mut() {
                for stage in st.iter_mut() {
                    Self::apply_q(&self.reflectors, stage, false);
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::banded::tests::{dense_combine, sample};
    use super::*;

    #[test]
    fn hessenberg_solves_match_a_dense_elimination() {
        let weights = Poles {
            real: 0.7,
            complex: [Complex64::new(-1.3, 0.4), Complex64::new(0.2, 2.1)],
        };
        let n = 11;
        let (m, _loss) = sample(n, n - 1, n - 1);
        let f: Vec<f64> = (0..n).map(|i| (i as f64 - 3.5) * 0.3).collect();
        let h = [0.37, 0.185];
        let mut pair = HessenbergPair::new(&m).unwrap();
        pair.factor(h);
        let (mut full, mut half, mut rate) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        pair.combine::<0>(
            h,
            &weights,
            &weights,
            &f,
            [&mut full, &mut half],
            &mut rate,
            [None, None],
        );
        for (slot, got) in [(0, &full), (1, &half)] {
            let expected = dense_combine(&m, h[slot], &weights, &f);
            let scale = expected.iter().map(|v| v.abs()).fold(1.0, f64::max);
            for i in 0..n {
                assert!(
                    (got[i] - expected[i]).abs() < 1e-11 * scale,
                    "slot {slot} row {i}: {} vs {}",
                    got[i],
                    expected[i]
                );
            }
        }
        let expected_rate = dense_combine(&m, h[1], &weights, &f);
        for i in 0..n {
            assert!(
                (rate[i] - expected_rate[i] / h[1]).abs()
                    < 1e-10 * (1.0 + expected_rate[i].abs() / h[1])
            );
        }
    }
}
