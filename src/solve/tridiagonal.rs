//! [`BandPair`](super::banded::BandPair) specialised to nearest-neighbour chains (charge
//! changes by one up or down), the common case: Thomas elimination with the six recurrences
//! (3 poles × 2 step sizes) side by side. The complex lanes are stored as separate real and
//! imaginary arrays so that the compiler can run them in vector registers.

// The lane loops index several arrays in lockstep on purpose: it is the shape the compiler
// turns into vector instructions.
#![allow(clippy::needless_range_loop)]

use super::banded::{BandMatrix, Poles};
use super::radau::{StageOut, COMPLEX_POLES, REAL_POLE, STAGE_WEIGHTS};

/// Real lanes: the real pole for [h, h/2]. Complex lanes: (h, p₁), (h, p₂), (h/2, p₁),
/// (h/2, p₂).
#[derive(Clone, Copy, Debug, Default)]
struct Lanes {
    r: [f64; 2],
    re: [f64; 4],
    im: [f64; 4],
}

/// Factors of one row: multiplier of the row below the diagonal and reciprocal pivot.
#[derive(Clone, Copy, Debug, Default)]
struct Row {
    l: Lanes,
    inv: Lanes,
}

const SLOT: [usize; 4] = [0, 0, 1, 1];

#[derive(Clone, Debug)]
pub(crate) struct ChainPair {
    /// M[i][i−1] (ionization of i−1), M[i][i+1] (recombination of i+1), zero beyond the
    /// ends, and the loss of state i.
    sub: Vec<f64>,
    sup: Vec<f64>,
    loss: Vec<f64>,
    rows: Vec<Row>,
    work: Vec<Lanes>,
}

impl ChainPair {
    pub fn new(m: &BandMatrix, loss: &[f64]) -> Self {
        let n = m.n;
        let sub = (0..n)
            .map(|i| if i > 0 { m.get(i, i - 1) } else { 0.0 })
            .collect();
        let sup = (0..n).map(|i| m.get(i, i + 1)).collect();
        Self {
            sub,
            sup,
            loss: loss.to_vec(),
            rows: vec![Row::default(); n],
            work: vec![Lanes::default(); n],
        }
    }

    /// Factorise for the step sizes `h` = [h, h/2], with pivots from column sums (see
    /// [`BandPair::factor`](super::banded::BandPair::factor)): for a chain the trailing
    /// column sum is c_i = p + h·loss_i + h·down_i·c_{i−1}/pivot_{i−1} and the pivot is
    /// c_i + h·ion_i.
    pub fn factor(&mut self, h: [f64; 2]) {
        let n = self.loss.len();
        let pole_re = [0, 1, 0, 1].map(|k| COMPLEX_POLES[k].0.re);
        let pole_im = [0, 1, 0, 1].map(|k| COMPLEX_POLES[k].0.im);
        let hc = SLOT.map(|s| h[s]);
        let mut inv = Lanes::default();
        let mut share = Lanes::default();
        for i in 0..n {
            let ion = self.sub.get(i + 1).copied().unwrap_or(0.0);
            let down = if i > 0 { self.sup[i - 1] } else { 0.0 };
            let below = if i > 0 { self.sub[i] } else { 0.0 };
            let loss = self.loss[i];
            let mut row = Row::default();
            for s in 0..2 {
                let c = REAL_POLE + h[s] * loss + share.r[s] * (h[s] * down);
                row.l.r[s] = inv.r[s] * (-h[s] * below);
                inv.r[s] = 1.0 / (c + h[s] * ion);
                share.r[s] = c * inv.r[s];
            }
            for k in 0..4 {
                let hd = hc[k] * down;
                let c_re = pole_re[k] + hc[k] * loss + share.re[k] * hd;
                let c_im = pole_im[k] + share.im[k] * hd;
                row.l.re[k] = inv.re[k] * (-hc[k] * below);
                row.l.im[k] = inv.im[k] * (-hc[k] * below);
                let d_re = c_re + hc[k] * ion;
                let scale = 1.0 / (d_re * d_re + c_im * c_im);
                inv.re[k] = d_re * scale;
                inv.im[k] = -c_im * scale;
                share.re[k] = c_re * inv.re[k] - c_im * inv.im[k];
                share.im[k] = c_re * inv.im[k] + c_im * inv.re[k];
            }
            row.inv = inv;
            self.rows[i] = row;
        }
    }

    /// For each slot s in FIRST..2: out_s[i] = Σ_poles weight · ((p·I − h_s·M)⁻¹ h_s·f)[i]
    /// (FIRST = 0: both step sizes, FIRST = 1: the half step only). With FIRST = 0 also
    /// rate = R(h_1·M) f = Σ_poles c · ((p·I − h_1·M)⁻¹ f), from the same solves.
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
        let n = self.loss.len();
        let hc = SLOT.map(|s| h[s]);
        let mut y = Lanes::default();
        for i in 0..n {
            let l = self.rows[i].l;
            for s in FIRST..2 {
                y.r[s] = h[s] * f[i] - l.r[s] * y.r[s];
            }
            for k in 2 * FIRST..4 {
                let re = hc[k] * f[i] - (l.re[k] * y.re[k] - l.im[k] * y.im[k]);
                let im = -(l.re[k] * y.im[k] + l.im[k] * y.re[k]);
                y.re[k] = re;
                y.im[k] = im;
            }
            self.work[i] = y;
        }
        let weight_re = [0, 1].map(|k| weights.complex[k].re);
        let weight_im = [0, 1].map(|k| weights.complex[k].im);
        let rate_re = [0, 1].map(|k| rate_weights.complex[k].re);
        let rate_im = [0, 1].map(|k| rate_weights.complex[k].im);
        let stage_real = STAGE_WEIGHTS.map(|w| w.real);
        let stage_re = STAGE_WEIGHTS.map(|w| [w.complex[0].re, w.complex[1].re]);
        let stage_im = STAGE_WEIGHTS.map(|w| [w.complex[0].im, w.complex[1].im]);
        let mut x = Lanes::default();
        let [out0, out1] = out;
        let inv_h = 1.0 / h[1];
        for i in (0..n).rev() {
            let (inv, y, above) = (self.rows[i].inv, self.work[i], self.sup[i]);
            for s in FIRST..2 {
                x.r[s] = (y.r[s] + x.r[s] * (h[s] * above)) * inv.r[s];
            }
            for k in 2 * FIRST..4 {
                let t_re = y.re[k] + x.re[k] * (hc[k] * above);
                let t_im = y.im[k] + x.im[k] * (hc[k] * above);
                x.re[k] = t_re * inv.re[k] - t_im * inv.im[k];
                x.im[k] = t_re * inv.im[k] + t_im * inv.re[k];
            }
            let slot = |s: usize, wr: f64, wre: [f64; 2], wim: [f64; 2]| {
                wr * x.r[s]
                    + (wre[0] * x.re[2 * s] - wim[0] * x.im[2 * s])
                    + (wre[1] * x.re[2 * s + 1] - wim[1] * x.im[2 * s + 1])
            };
            if FIRST == 0 {
                out0[i] = slot(0, weights.real, weight_re, weight_im);
                rate[i] = slot(1, rate_weights.real, rate_re, rate_im) * inv_h;
            }
            out1[i] = slot(1, weights.real, weight_re, weight_im);
            for s in FIRST..2 {
                if let Some(st) = stages[s].as_deref_mut() {
                    for j in 0..4 {
                        st[j][i] = slot(s, stage_real[j], stage_re[j], stage_im[j]);
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::banded::tests::{dense_combine, sample};
    use super::super::banded::BandPair;
    use super::*;
    use num_complex::Complex64;

    #[test]
    fn chain_kernel_matches_the_band_kernel_and_a_dense_solve() {
        let weights = Poles {
            real: 0.7,
            complex: [Complex64::new(-1.3, 0.4), Complex64::new(0.2, 2.1)],
        };
        let n = 12;
        let (m, loss) = sample(n, 1, 1);
        let f: Vec<f64> = (0..n).map(|i| ((i * 5) % 7) as f64 - 3.0).collect();
        let h = [2.5e-3, 1.25e-3];
        let mut chain = ChainPair::new(&m, &loss);
        let mut band = BandPair::new(m.clone(), &loss);
        chain.factor(h);
        band.factor(h);
        let mut results = Vec::new();
        for both in [true, false] {
            let (mut a, mut b, mut r) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
            if both {
                chain.combine::<0>(
                    h,
                    &weights,
                    &weights,
                    &f,
                    [&mut a, &mut b],
                    &mut r,
                    [None, None],
                );
            } else {
                band.combine::<0>(
                    h,
                    &weights,
                    &weights,
                    &f,
                    [&mut a, &mut b],
                    &mut r,
                    [None, None],
                );
            }
            results.push((a, b, r));
        }
        let expected_half = dense_combine(&m, h[1], &weights, &f);
        let scale = expected_half.iter().map(|v| v.abs()).fold(1.0, f64::max);
        for i in 0..n {
            assert!((results[0].0[i] - results[1].0[i]).abs() < 1e-13 * scale);
            assert!((results[0].1[i] - results[1].1[i]).abs() < 1e-13 * scale);
            assert!((results[0].2[i] - results[1].2[i]).abs() < 1e-13 * scale / h[1]);
            assert!((results[0].1[i] - expected_half[i]).abs() < 1e-12 * scale);
        }
        // The half-step-only pass gives the same half step.
        let (mut unused, mut half, mut rate) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        chain.combine::<1>(
            h,
            &weights,
            &weights,
            &f,
            [&mut unused, &mut half],
            &mut rate,
            [None, None],
        );
        assert_eq!(half, results[0].1);
    }
}
