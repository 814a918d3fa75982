//! The shifted band solves of one error-controlled step: (p·I − h·M) x = b for the three
//! poles p of the rational step and for both step sizes h and h/2, factorised together.
//!
//! Why no pivoting is safe: −M is a Z-matrix whose columns sum to the loss rates (≥ 0), so for
//! any shift p with Re p > 0 the matrix p·I − h·M is strictly column diagonally dominant
//! (|p + h·out_j| > h·out_j ≥ Σ_i |h·M_ij|). Gaussian elimination keeps column diagonal
//! dominance, so every pivot is non-zero, every multiplier has modulus ≤ 1 and the
//! elimination is backward stable without row exchanges (G. H. Golub and C. F. Van Loan,
//! *Matrix Computations*, 4th ed. (2013), §3.4.3); pivots are formed from column sums so that
//! they are also free of cancellation (see [`BandPair::factor`]). Without row exchanges an LU
//! factorisation keeps the band: L has the lower and U the upper bandwidth of the matrix, so
//! a network whose charge changes by at most `p` up and `q` down costs O(n·p·q) per
//! factorisation and O(n·(p+q)) per solve; a dense network is the band with p = q = n − 1
//! (this is the path for any jump pattern; `tridiagonal` specialises p = q = 1).
//!
//! The six factorisations (3 poles × 2 step sizes) are independent recurrences; running them
//! in one pass over the rows lets the processor overlap their latencies.

use std::ops::{Mul, Sub};

use num_complex::Complex64;

use super::radau::{StageOut, COMPLEX_POLES, REAL_POLE, STAGE_WEIGHTS};

/// One value per pole of the rational step: the real pole and the two complex ones.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Poles {
    pub real: f64,
    pub complex: [Complex64; 2],
}

impl Poles {
    pub const ZERO: Poles = Poles::splat(0.0);

    #[inline(always)]
    pub const fn splat(x: f64) -> Self {
        Self {
            real: x,
            complex: [Complex64::new(x, 0.0), Complex64::new(x, 0.0)],
        }
    }

    /// The diagonal entry p − h·m for every pole p.
    #[inline(always)]
    pub fn shifted(minus_hm: f64) -> Self {
        Self {
            real: REAL_POLE + minus_hm,
            complex: [COMPLEX_POLES[0].0 + minus_hm, COMPLEX_POLES[1].0 + minus_hm],
        }
    }

    #[inline(always)]
    pub fn recip(self) -> Self {
        let inv = |z: Complex64| {
            let s = 1.0 / (z.re * z.re + z.im * z.im);
            Complex64::new(z.re * s, -z.im * s)
        };
        Self {
            real: 1.0 / self.real,
            complex: [inv(self.complex[0]), inv(self.complex[1])],
        }
    }

    /// Σ weight · value, real part.
    #[inline(always)]
    pub fn combine(self, weights: &Poles) -> f64 {
        weights.real * self.real
            + (weights.complex[0] * self.complex[0]).re
            + (weights.complex[1] * self.complex[1]).re
    }
}

impl Mul for Poles {
    type Output = Poles;
    #[inline(always)]
    fn mul(self, o: Poles) -> Poles {
        Poles {
            real: self.real * o.real,
            complex: [
                self.complex[0] * o.complex[0],
                self.complex[1] * o.complex[1],
            ],
        }
    }
}

impl Sub for Poles {
    type Output = Poles;
    #[inline(always)]
    fn sub(self, o: Poles) -> Poles {
        Poles {
            real: self.real - o.real,
            complex: [
                self.complex[0] - o.complex[0],
                self.complex[1] - o.complex[1],
            ],
        }
    }
}

/// A real band matrix: row `i` stores columns `i − lower ..= i + upper` at offsets
/// `0 ..= lower + upper` (entries outside the matrix are zero and never read).
#[derive(Clone, Debug)]
pub(crate) struct BandMatrix {
    pub n: usize,
    pub lower: usize,
    pub upper: usize,
    pub values: Vec<f64>,
}

impl BandMatrix {
    pub fn zeros(n: usize, lower: usize, upper: usize) -> Self {
        let lower = lower.min(n.saturating_sub(1));
        let upper = upper.min(n.saturating_sub(1));
        Self {
            n,
            lower,
            upper,
            values: vec![0.0; n * (lower + upper + 1)],
        }
    }

    pub fn width(&self) -> usize {
        self.lower + self.upper + 1
    }

    /// Storage index of entry (row, col); the caller keeps it inside the band.
    #[inline]
    pub fn index(&self, row: usize, col: usize) -> usize {
        row * self.width() + col + self.lower - row
    }

    /// Entry (row, col), zero outside the band.
    pub fn get(&self, row: usize, col: usize) -> f64 {
        if row < self.n && col < self.n && col + self.lower >= row && row + self.upper >= col {
            self.values[self.index(row, col)]
        } else {
            0.0
        }
    }
}

/// LU factors of (p·I − h·M) for the three poles and for h (slot 0) and h/2 (slot 1), in
/// band storage: unit lower triangle below the diagonal, U on and above it, with U's
/// diagonal replaced by its reciprocal.
#[derive(Clone, Debug)]
pub(crate) struct BandPair {
    m: BandMatrix,
    loss: Vec<f64>,
    factors: Vec<[Poles; 2]>,
    column_sums: Vec<[Poles; 2]>,
    work: Vec<[Poles; 2]>,
}

impl BandPair {
    /// `loss` is the loss rate of every state: the column sums of −M, passed separately so
    /// that they are exact.
    pub fn new(m: BandMatrix, loss: &[f64]) -> Self {
        let len = m.values.len();
        Self {
            factors: vec![[Poles::ZERO; 2]; len],
            column_sums: vec![[Poles::ZERO; 2]; m.n],
            work: vec![[Poles::ZERO; 2]; m.n],
            loss: loss.to_vec(),
            m,
        }
    }

    /// Factorise for the step sizes `h` = [h, h/2].
    ///
    /// Pivots come from column sums, as in the GTH elimination of `steady`, instead of by
    /// subtraction: the trailing columns of p·I − h·M sum to c_j, starting from p + h·loss_j,
    /// and eliminating row k adds −A[k][j]·c_k/pivot_k to c_j; the pivot of column k is c_k
    /// plus the magnitudes of its entries below the diagonal. Every term added has a positive
    /// real part (Re p > 0, off-diagonals of −M are ≥ 0), so no cancellation occurs and slow
    /// modes keep their relative accuracy next to rates 10¹⁰ times faster (the idea of the
    /// GTH elimination in `steady`, carried over to complex shifts). With ordinary pivots the
    /// round-off of the fast rates swamped the step-doubling error estimate of slow phases.
    pub fn factor(&mut self, h: [f64; 2]) {
        let (n, p, q) = (self.m.n, self.m.lower, self.m.upper);
        let w = p + q + 1;
        for (row, chunk) in self.factors.chunks_mut(w).enumerate() {
            for (offset, cell) in chunk.iter_mut().enumerate() {
                let m = self.m.values[row * w + offset];
                *cell = h.map(|h| Poles::splat(-h * m));
            }
        }
        for (c, &loss) in self.column_sums.iter_mut().zip(&self.loss) {
            *c = h.map(|h| Poles::shifted(h * loss));
        }
        for k in 0..n {
            let last_row = (k + p).min(n - 1);
            let last_col = (k + q).min(n - 1);
            let mut pivot = self.column_sums[k];
            for i in k + 1..=last_row {
                let below = self.factors[i * w + k + p - i];
                pivot = [pivot[0] - below[0], pivot[1] - below[1]];
            }
            let inv = pivot.map(Poles::recip);
            self.factors[k * w + p] = inv;
            let share = [
                self.column_sums[k][0] * inv[0],
                self.column_sums[k][1] * inv[1],
            ];
            for j in k + 1..=last_col {
                let u = self.factors[k * w + j + p - k];
                let c = &mut self.column_sums[j];
                *c = [c[0] - u[0] * share[0], c[1] - u[1] * share[1]];
            }
            for i in k + 1..=last_row {
                let at = i * w + k + p - i;
                let l = [self.factors[at][0] * inv[0], self.factors[at][1] * inv[1]];
                self.factors[at] = l;
                for j in k + 1..=last_col {
                    if j != i {
                        let u = self.factors[k * w + j + p - k];
                        let a = &mut self.factors[i * w + j + p - i];
                        *a = [a[0] - l[0] * u[0], a[1] - l[1] * u[1]];
                    }
                }
            }
        }
    }

    /// For each slot s in FIRST..2: out_s[i] = Σ_poles weight · ((p·I − h_s·M)⁻¹ h_s·f)[i]
    /// (FIRST = 0: both step sizes, FIRST = 1: the half step only). With FIRST = 0 also
    /// rate = R(h_1·M) f = Σ_poles c · ((p·I − h_1·M)⁻¹ f), from the same solves.
    #[allow(clippy::needless_range_loop)]
    // slot loops index several arrays in lockstep
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
        let (n, p, q) = (self.m.n, self.m.lower, self.m.upper);
        let w = p + q + 1;
        for i in 0..n {
            let row = &self.factors[i * w..(i + 1) * w];
            for s in FIRST..2 {
                let mut y = Poles::splat(h[s] * f[i]);
                for k in i.saturating_sub(p)..i {
                    y = y - row[k + p - i][s] * self.work[k][s];
                }
                self.work[i][s] = y;
            }
        }
        let [out0, out1] = out;
        let inv_h = 1.0 / h[1];
        for i in (0..n).rev() {
            let row = &self.factors[i * w..(i + 1) * w];
            for s in FIRST..2 {
                let mut y = self.work[i][s];
                for j in i + 1..=(i + q).min(n - 1) {
                    y = y - row[j + p - i][s] * self.work[j][s];
                }
                self.work[i][s] = y * row[p][s];
            }
            let x = self.work[i];
            if FIRST == 0 {
                out0[i] = x[0].combine(weights);
                rate[i] = x[1].combine(rate_weights) * inv_h;
            }
            out1[i] = x[1].combine(weights);
            for s in FIRST..2 {
                if let Some(st) = stages[s].as_deref_mut() {
                    for (j, w) in STAGE_WEIGHTS.iter().enumerate() {
                        st[j][i] = x[s].combine(w);
                    }
                }
            }
        }
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    /// A generator-like band matrix (columns sum to −loss) with rates over many decades.
    pub(crate) fn sample(n: usize, lower: usize, upper: usize) -> (BandMatrix, Vec<f64>) {
        let mut m = BandMatrix::zeros(n, lower, upper);
        let loss: Vec<f64> = (0..n).map(|j| if j % 3 == 0 { 0.5 } else { 0.0 }).collect();
        for (col, &lost) in loss.iter().enumerate() {
            let mut out = lost;
            for row in col.saturating_sub(m.upper)..=(col + m.lower).min(n - 1) {
                if row != col {
                    let rate = 10f64.powi(((row * 7 + col * 3) % 11) as i32 - 3);
                    let at = m.index(row, col);
                    m.values[at] = rate;
                    out += rate;
                }
            }
            let at = m.index(col, col);
            m.values[at] = -out;
        }
        (m, loss)
    }

    /// Σ_poles weight · ((p·I − h·M)⁻¹ h·f) by dense complex Gaussian elimination with
    /// partial pivoting (Golub and Van Loan, §3.4), independent of the band code.
    pub(crate) fn dense_combine(m: &BandMatrix, h: f64, weights: &Poles, f: &[f64]) -> Vec<f64> {
        let n = m.n;
        let poles = [
            (
                Complex64::new(REAL_POLE, 0.0),
                Complex64::new(weights.real, 0.0),
            ),
            (COMPLEX_POLES[0].0, weights.complex[0]),
            (COMPLEX_POLES[1].0, weights.complex[1]),
        ];
        let mut out = vec![0.0; n];
        for (pole, weight) in poles {
            let mut a: Vec<Vec<Complex64>> = (0..n)
                .map(|i| {
                    let mut row: Vec<Complex64> = (0..n)
                        .map(|j| Complex64::new(-h * m.get(i, j), 0.0))
                        .collect();
                    row[i] += pole;
                    row.push(Complex64::new(h * f[i], 0.0));
                    row
                })
                .collect();
            for k in 0..n {
                let pivot_row = (k..n)
                    .max_by(|&x, &y| a[x][k].norm().total_cmp(&a[y][k].norm()))
                    .unwrap();
                a.swap(k, pivot_row);
                let pivot = a[k].clone();
                for row in a.iter_mut().skip(k + 1) {
                    let l = row[k] / pivot[k];
                    for (aij, akj) in row[k..].iter_mut().zip(&pivot[k..]) {
                        *aij -= l * akj;
                    }
                }
            }
            let mut x = vec![Complex64::new(0.0, 0.0); n];
            for i in (0..n).rev() {
                let mut sum = a[i][n];
                for j in i + 1..n {
                    sum -= a[i][j] * x[j];
                }
                x[i] = sum / a[i][i];
            }
            // The real pole enters once, the complex ones with 2·Re (weights carry the 2).
            for (o, xi) in out.iter_mut().zip(&x) {
                *o += (weight * xi).re;
            }
        }
        out
    }

    #[test]
    fn band_solves_match_a_dense_elimination() {
        let weights = Poles {
            real: 0.7,
            complex: [Complex64::new(-1.3, 0.4), Complex64::new(0.2, 2.1)],
        };
        for (lower, upper) in [(1, 1), (3, 1), (2, 4), (0, 0), (6, 6)] {
            let n = 9;
            let (m, loss) = sample(n, lower, upper);
            let f: Vec<f64> = (0..n).map(|i| (i as f64 - 3.5) * 0.3).collect();
            let h = [0.37, 0.185];
            let mut pair = BandPair::new(m.clone(), &loss);
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
                for i in 0..n {
                    let tol = 1e-12 * expected.iter().map(|v| v.abs()).fold(1.0, f64::max);
                    assert!(
                        (got[i] - expected[i]).abs() < tol,
                        "({lower},{upper}) slot {slot} row {i}: {} vs {}",
                        got[i],
                        expected[i]
                    );
                }
            }
        }
    }
}
