//! Time stepping of dN/dt = M N + s with the stability function of Radau IIA.
//!
//! For a linear system with constant coefficients one step of the s-stage Radau IIA method
//! is exactly N ↦ R(hM) N with R the (s−1, s) Padé approximant of exp (E. Hairer and
//! G. Wanner, *Solving Ordinary Differential Equations II*, 2nd ed. (1996), §IV.3 and §IV.5).
//! We use five stages: R = P₄/Q₅ with R(z) − e^z = O(z¹⁰) (order 9) and R(z) → 0 as
//! z → −∞ (L-stable), so stiff, fast-ionising states neither oscillate nor blow up at long
//! steps. (The three-stage, order-5 function needs about five times as many steps at the
//! 1e-13 tolerance used here, because the rates spread over ten decades keep some mode
//! active at every time scale; order 9 is the cheapest at that accuracy.)
//!
//! R has no polynomial part, so it splits into partial fractions over the roots of its
//! denominator: one real pole and two complex-conjugate pairs,
//! R(z) = c₀/(p₀ − z) + Σₖ 2·Re(cₖ/(pₖ − z)) for real arguments. A step therefore costs one
//! real and two complex band solves with (pI − hM), which are column diagonally dominant
//! for every h > 0 (see `banded`).
//!
//! A feed s is carried by augmenting the state with a constant component 1, which keeps the
//! system homogeneous; in the increment form used here it simply enters the rate Mv + s.
//!
//! Error control is by step doubling (Richardson): each step is taken once with h and twice
//! with h/2; the difference estimates the local error of the single step, and the two half
//! steps are kept, whose error is asymptotically that difference over 2⁹ − 1 (E. Hairer,
//! S. P. Nørsett and G. Wanner, *Solving ODEs I*, 2nd ed. (1993), §II.4); the tolerance
//! applies to the kept solution, credited with a factor 2⁶ only (see `KEPT_ERROR_DIVISOR`).
//! Steps follow the error control alone (only the last one is shortened to end at the last
//! output time).
//!
//! **Dense output.** Outputs inside a step are read off the collocation polynomial of the
//! half step that holds them: the degree-5 polynomial through the step's start and its five
//! Radau IIA stage values (Hairer–Wanner II, §IV.5 and §IV.8: the stage order is 5, so its
//! error is O(h⁶)). For a linear system the stage values are rational functions of hM with
//! the same denominator as the step, so they come from the same shifted solves with other
//! partial-fraction weights (`STAGE_WEIGHTS`): dense output costs a few vector sums per
//! step and one polynomial evaluation per output instead of one step per output. Its error
//! is estimated by evaluating the full step's polynomial at the midpoint against the half
//! step there and scaling by 2⁶ (its error is O(h⁶)); a step whose dense error exceeds
//! 1e-11 of the total population is repeated shorter, and dense outputs cap the next step
//! the same way. The dense error is not propagated (the steps carry the state), so the
//! outputs agree with `scipy.linalg.expm` to about 1e-11 (tested at 1e-10). Xe in the
//! benchmark trap with 1 000 log-spaced output times takes 185 steps, with two output times
//! 150: with many outputs the dense tolerance, not the local one, sets the steps.
//!
//! Two facts about generators keep the bookkeeping rigorous: e^{tM} is a contraction in the
//! 1-norm (its entries are ≥ 0 and its columns sum to ≤ 1), so local errors never grow
//! afterwards, and the rate f = Mv + s obeys df/dt = M f, so ‖f(t)‖₁ never grows either.
//! The second bounds the change over any interval Δ by Δ·‖f‖₁; outputs where that bound is
//! below the tolerance are served without stepping (a reached steady state costs nothing).

use ndarray::Array2;
use num_complex::Complex64;

use super::banded::{BandMatrix, BandPair, Poles};
use super::dense::HessenbergPair;
use super::flux::FluxBalance;
use super::tridiagonal::ChainPair;
use crate::error::{Error, Result};
use crate::interrupt;
use crate::limits::{check_memory, try_zeros};
use crate::network::RateNetwork;

/// Partial fractions of the (4,5) Padé approximant of exp, the stability function of the
/// five-stage Radau IIA method (order 9): the real pole γ with its coefficient, then the
/// complex poles of the upper half plane with theirs (computed with 40-digit arithmetic and
/// rounded to f64; checked against the polynomial form in the tests).
pub(crate) const REAL_POLE: f64 = 6.286_704_751_729_276_5;
pub(crate) const REAL_RESIDUE: f64 = 273.343_289_465_921_94;
pub(crate) const COMPLEX_POLES: [(Complex64, Complex64); 2] = [
    (
        Complex64::new(5.700_953_298_671_79, 3.210_265_600_308_549_7),
        Complex64::new(-149.998_446_597_546_92, -68.042_279_522_022_68),
    ),
    (
        Complex64::new(3.655_694_325_463_572, 6.543_736_899_360_077),
        Complex64::new(15.826_801_864_585_958, 24.125_645_782_244_38),
    ),
];

/// Interior nodes c₁…c₄ of five-stage Radau IIA (c₅ = 1): the roots of
/// d⁴/dx⁴ [x⁴(x − 1)⁵] in (0, 1) (Hairer–Wanner II, §IV.5).
pub(crate) const STAGE_NODES: [f64; 4] = [
    0.05710419611451768,
    0.2768430136381238,
    0.5835904323689168,
    0.8602401356562195,
];
/// The stage values of one linear step in increment form: Yᵢ − v = Σ_p wᵢ,ₚ (p·I − h·M)⁻¹
/// h(Mv + s), real part, conjugate poles folded in (factor 2). For a scalar problem
/// Yᵢ = eᵢᵀ(I − zA)⁻¹𝟙 v with A the Butcher matrix, whose eigenvalues are the reciprocal poles,
/// so wᵢ,ₖ = Vᵢₖ (V⁻¹c)ₖ / λₖ from A = V diag(λ) V⁻¹ (computed with 50-digit arithmetic and
/// rounded to f64; the tests rebuild A from the nodes and check the stages against it).
pub(crate) const STAGE_WEIGHTS: [Poles; 4] = [
    Poles {
        real: 0.5903165055889905,
        complex: [
            Complex64::new(0.5144198125044057, -0.7534335798030061),
            Complex64::new(-0.10473631809339626, -0.36049927283828764),
        ],
    },
    Poles {
        real: 0.07034563182126294,
        complex: [
            Complex64::new(0.4927479382232086, 1.205807888306876),
            Complex64::new(0.4369064299555285, 0.6969529133946755),
        ],
    },
    Poles {
        real: 3.4417503088721513,
        complex: [
            Complex64::new(-0.6151696790367216, 4.1878747925368085),
            Complex64::new(-1.82658062983543, -0.6625523065565374),
        ],
    },
    Poles {
        real: 17.924721804569497,
        complex: [
            Complex64::new(-19.571316494066576, 11.798905007960075),
            Complex64::new(2.6465946894970793, -3.7910402183761827),
        ],
    },
];

/// Local error allowed per step, relative to the total population (absolute per fraction).
pub(crate) const LOCAL_TOLERANCE: f64 = 1e-13;
/// Negative round-off down to this fraction of the total population is set to zero.
pub(crate) const CLIP_LEVEL: f64 = 1e-15;
/// Total population drift per step up to this relative size is treated as round-off and
/// renormalised away (networks without loss or feed only).
const DRIFT_LEVEL: f64 = 1e-13;
const MAX_STEPS: usize = 10_000_000;
/// Largest relative error of a returned total that is still round-off (see `check_row`).
const OUTPUT_TOLERANCE: f64 = 1e-9;
/// Error of an output read off the dense polynomial, relative to the total population. It
/// is not propagated (the steps carry the state), so it does not accumulate over steps.
pub(crate) const DENSE_TOLERANCE: f64 = 1e-11;
/// Negative dense-output round-off down to this fraction of the total is set to zero.
const DENSE_CLIP_LEVEL: f64 = 1e-10;
/// The dense error of a half step is estimated from that of the full step: collocation
/// polynomials of Radau IIA have error O(h⁶) (stage order 5).
const DENSE_HALVING: f64 = 64.0;
/// Dense error ∝ h⁶, so the step sizes it allows scale with (tolerance / error)^(1/6).
const DENSE_EXPONENT: f64 = 1.0 / 6.0;
/// Local error ∝ h¹⁰, so step sizes scale with (tolerance / error)^(1/10).
const ERROR_EXPONENT: f64 = 1.0 / 10.0;
const SAFETY: f64 = 0.9;
/// |big − half| estimates the error of the single step; the kept two half steps are
/// asymptotically 2⁹ − 1 times more accurate (Richardson, order 9). Only 2⁶ of that is
/// credited: oscillating and stiff modes are not in the asymptotic regime (with 511 a
/// four-state cycle with loss missed scipy's expm by 3e-8 relative, the test's bound 1e-8).
const KEPT_ERROR_DIVISOR: f64 = 64.0;
const MAX_GROWTH: f64 = 5.0;

/// Below this many states every network takes the band path (its pivots from column sums
/// keep slow modes accurate next to fast ones, and its cost is small anyway).
pub(crate) const DENSE_MIN_STATES: usize = 64;

/// Whether the Hessenberg path is cheaper: a band LU costs about n·lower·upper per step
/// size, a Hessenberg LU n²/2 after a one-off reduction of 10n³/3.
pub(crate) fn use_dense(n: usize, lower: usize, upper: usize) -> bool {
    n >= DENSE_MIN_STATES && lower.min(n) * upper.min(n) > 8 * n
}

/// Where a combine pass writes the four interior stage increments of each of its two step
/// sizes (`None`: not wanted).
pub(crate) type StageOut<'a> = [Option<&'a mut [Vec<f64>; 4]>; 2];

/// The factorised shifted solves for a step size and its half.
enum Kernel {
    Chain(ChainPair),
    Band(BandPair),
    Dense(HessenbergPair),
}

/// Apply the same call to whichever kernel is in use.
macro_rules! with_kernel {
    ($kernel:expr, $k:ident => $body:expr) => {
        match $kernel {
            Kernel::Chain($k) => $body,
            Kernel::Band($k) => $body,
            Kernel::Dense($k) => $body,
        }
    };
}

/// Takes error-controlled double steps: R(hM)v and R(hM/2)²v from one factorisation pass.
struct Stepper {
    balance: FluxBalance,
    kernel: Kernel,
    /// Largest total out-rate: bounds every pivot, so h·fastest finite means finite factors.
    fastest: f64,
    factored_h: f64,
    weights: Poles,
    rate_weights: Poles,
    /// Mv + s at the current state, and at the state after the first half step.
    rate: Vec<f64>,
    mid_rate: Vec<f64>,
    increment: [Vec<f64>; 2],
    /// Interior stage increments of the full step, the first and the second half step.
    stages: [[Vec<f64>; 4]; 3],
}

impl Stepper {
    fn new(network: &RateNetwork) -> Result<Self> {
        let n = network.n_states();
        let mut m = BandMatrix::zeros(n, network.max_jump_up(), network.max_jump_down());
        let mut fastest: f64 = 0.0;
        for from in 0..n {
            for (to, &rate) in network.rates_from(from).iter().enumerate() {
                if to != from && rate > 0.0 {
                    let at = m.index(to, from);
                    m.values[at] += rate;
                }
            }
            let out = network.total_out_rate_per_s(from);
            fastest = fastest.max(out);
            let at = m.index(from, from);
            m.values[at] = -out;
        }
        let kernel = if m.lower <= 1 && m.upper <= 1 {
            Kernel::Chain(ChainPair::new(&m, network.loss_per_s()))
        } else if use_dense(n, m.lower, m.upper) {
            Kernel::Dense(HessenbergPair::new(&m)?)
        } else {
            Kernel::Band(BandPair::new(m, network.loss_per_s()))
        };
        // R(hM)v − v = Σ (cᵢ/pᵢ)(pᵢI − hM)⁻¹ h(Mv + s); conjugate poles fold into 2·Re.
        let [(p1, c1), (p2, c2)] = COMPLEX_POLES;
        let weights = Poles {
            real: REAL_RESIDUE / REAL_POLE,
            complex: [2.0 * c1 / p1, 2.0 * c2 / p2],
        };
        let rate_weights = Poles {
            real: REAL_RESIDUE,
            complex: [2.0 * c1, 2.0 * c2],
        };
        Ok(Self {
            balance: FluxBalance::new(network),
            kernel,
            fastest,
            factored_h: f64::NAN,
            weights,
            rate_weights,
            rate: vec![0.0; n],
            mid_rate: vec![0.0; n],
            increment: [vec![0.0; n], vec![0.0; n]],
            stages: std::array::from_fn(|_| std::array::from_fn(|_| vec![0.0; n])),
        })
    }

    /// Take `v` as the current state: compute its rate Mv + s and return ‖Mv + s‖₁.
    fn set_state(&mut self, v: &[f64]) -> f64 {
        self.balance.rate_of_change(v, &mut self.rate);
        l1(&self.rate)
    }

    /// From the current state v: big = R(hM)v, mid = R(hM/2)v, half = R(hM/2)²v (feed
    /// included); with `dense`, also the stage values of the full and both half steps.
    ///
    /// Each step is evaluated as an increment, R(hM)v = v + Σ (cᵢ/pᵢ)(pᵢI − hM)⁻¹ h(Mv + s),
    /// which follows from R(0) = Σ cᵢ/pᵢ = 1. Near a steady state the increment is small, so
    /// the round-off of the partial fractions scales with the change of the populations,
    /// not with the populations themselves.
    fn double_step(
        &mut self,
        h: f64,
        v: &[f64],
        big: &mut [f64],
        mid: &mut [f64],
        half: &mut [f64],
        dense: bool,
    ) -> Result<()> {
        let hs = [h, 0.5 * h];
        if self.factored_h != h {
            if !(4.0 * h * self.fastest + 16.0).is_finite() {
                return Err(Error::invalid(
                    "times_s",
                    h,
                    "rate × time overflows; rates or times are too large",
                ));
            }
            with_kernel!(&mut self.kernel, k => k.factor(hs));
            self.factored_h = h;
        }
        let [inc0, inc1] = &mut self.increment;
        let (w, rw) = (&self.weights, &self.rate_weights);
        // The rate at mid is R(hM/2)(Mv + s), since M commutes with R(hM/2): it comes from
        // the same solves, with round-off relative to the rate.
        let (rate, mid_rate) = (&self.rate, &mut self.mid_rate);
        let [full_stages, first_stages, second_stages] = &mut self.stages;
        let stages: StageOut = if dense {
            [Some(full_stages), Some(first_stages)]
        } else {
            [None, None]
        };
        with_kernel!(&mut self.kernel, k => k.combine::<0>(hs, w, rw, rate, [inc0, inc1], mid_rate, stages));
        for i in 0..v.len() {
            big[i] = v[i] + inc0[i];
            mid[i] = v[i] + inc1[i];
        }
        let unused = &mut self.rate;
        let stages: StageOut = [None, dense.then_some(second_stages)];
        with_kernel!(&mut self.kernel, k => k.combine::<1>(hs, w, rw, mid_rate, [inc0, inc1], unused, stages));
        for ((out, &m), &d) in half.iter_mut().zip(mid.iter()).zip(inc1.iter()) {
            *out = m + d;
        }
        Ok(())
    }
}

impl Stepper {
    /// The estimated error of the dense output of the last double step: the full step's
    /// collocation polynomial at its midpoint against the half step there, scaled down to
    /// the half steps whose polynomials serve the outputs.
    fn dense_error(&self, v: &[f64], big: &[f64], mid: &[f64]) -> f64 {
        let basis = collocation_basis(0.5);
        let mut err: f64 = 0.0;
        collocation_values(&basis, v, big, &self.stages[0], |i, value| {
            err = err.max((value - mid[i]).abs());
        });
        err / DENSE_HALVING
    }

    /// Output row `row` at θ·h inside the last accepted double step (0 < θ < 1), from the
    /// collocation polynomial of the half step that holds it; values below the smallest
    /// normal number are 0 (as for the steps' states, see [`flush_underflow`]), round-off
    /// negatives down to `clip` are 0 (see [`clipped`]).
    fn dense_row(
        &self,
        theta: f64,
        (v, mid, half): (&[f64], &[f64], &[f64]),
        row: &mut [f64],
        clip: f64,
    ) {
        let (start, end, stages, phi) = if theta <= 0.5 {
            (v, mid, &self.stages[1], 2.0 * theta)
        } else {
            (mid, half, &self.stages[2], 2.0 * theta - 1.0)
        };
        let basis = collocation_basis(phi);
        let row = &mut row[..start.len()];
        collocation_values(&basis, start, end, stages, |i, value| {
            row[i] = clipped(flushed(value), clip);
        });
    }
}

/// Every component of a step's collocation polynomial from its start, end and interior
/// stage increments, with the basis of [`collocation_basis`], handed to `each(i, value)`.
/// (One pass over zipped slices: the compiler keeps it free of bounds checks; this runs
/// once per output time.)
#[inline(always)]
fn collocation_values(
    basis: &[f64; 5],
    start: &[f64],
    end: &[f64],
    stages: &[Vec<f64>; 4],
    mut each: impl FnMut(usize, f64),
) {
    let [s0, s1, s2, s3] = stages;
    let n = start.len();
    let (end, s0, s1, s2, s3) = (&end[..n], &s0[..n], &s1[..n], &s2[..n], &s3[..n]);
    for i in 0..n {
        let a = start[i];
        let value = a
            + basis[4] * (end[i] - a)
            + basis[0] * s0[i]
            + basis[1] * s1[i]
            + basis[2] * s2[i]
            + basis[3] * s3[i];
        each(i, value);
    }
}

/// The collocation nodes of a step: 0, c₁…c₄, 1.
const NODES: [f64; 6] = [
    0.0,
    STAGE_NODES[0],
    STAGE_NODES[1],
    STAGE_NODES[2],
    STAGE_NODES[3],
    1.0,
];

/// 1 / Π_{m≠j} (x_j − x_m) for the nodes x_j = c₁…c₄, 1 (the Lagrange denominators).
const BASIS_SCALE: [f64; 5] = {
    let mut out = [0.0; 5];
    let mut j = 0;
    while j < 5 {
        let mut p = 1.0;
        let mut m = 0;
        while m < 6 {
            if m != j + 1 {
                p *= NODES[j + 1] - NODES[m];
            }
            m += 1;
        }
        out[j] = 1.0 / p;
        j += 1;
    }
    out
};

/// Lagrange basis of the nodes 0, c₁…c₄, 1 at φ, without the node 0 (the increments are
/// taken from the step's start, so its weight drops out).
fn collocation_basis(phi: f64) -> [f64; 5] {
    let d = NODES.map(|x| phi - x);
    std::array::from_fn(|j| {
        let mut p = BASIS_SCALE[j];
        for (m, dm) in d.iter().enumerate() {
            if m != j + 1 {
                p *= dm;
            }
        }
        p
    })
}

fn l1(v: &[f64]) -> f64 {
    v.iter().map(|x| x.abs()).sum()
}

/// Work done by one propagation (for tests and tuning).
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub(crate) struct Stats {
    pub steps: usize,
    pub rejected: usize,
    pub n_active: usize,
    /// Outputs read off the dense polynomial (inside a step) rather than a step's end.
    pub dense_outputs: usize,
}

/// Propagate `initial` through the sorted, validated output `times_s`.
pub(crate) fn propagate(
    network: &RateNetwork,
    initial: &[f64],
    times_s: &[f64],
) -> Result<Array2<f64>> {
    propagate_with_stats(network, initial, times_s).map(|(out, _)| out)
}

/// [`propagate`], restricted to the states reachable from the initial populations and the
/// feeds (all others stay exactly zero).
pub(crate) fn propagate_with_stats(
    network: &RateNetwork,
    initial: &[f64],
    times_s: &[f64],
) -> Result<(Array2<f64>, Stats)> {
    let n = network.n_states();
    check_memory(
        "the evolution",
        super::evolve_memory_bytes(network, times_s.len()),
    )?;
    let active = reachable(network, initial);
    let mut out = try_zeros("the populations", times_s.len(), n)?;
    if active.len() == n {
        let stats = propagate_all(network, initial, times_s, &mut out, 0..n)?;
        return Ok((out, stats));
    }
    if active.is_empty() {
        return Ok((out, Stats::default()));
    }
    // Transitions from the set to states outside it do not exist (those would be reachable),
    // so the sub-network loses nothing but its losses.
    let sub = network.restricted(&active);
    let sub_initial: Vec<f64> = active.iter().map(|&q| initial[q]).collect();
    let (first, last) = (active[0], active[active.len() - 1]);
    if last - first + 1 == active.len() {
        // A run of states (the usual case: up to the highest charge the beam reaches) is
        // written in place.
        let stats = propagate_all(&sub, &sub_initial, times_s, &mut out, first..last + 1)?;
        return Ok((out, stats));
    }
    let mut sub_out = try_zeros("the populations", times_s.len(), active.len())?;
    let stats = propagate_all(&sub, &sub_initial, times_s, &mut sub_out, 0..active.len())?;
    for (k, row) in sub_out.outer_iter().enumerate() {
        for (&q, &v) in active.iter().zip(row.iter()) {
            out[[k, q]] = v;
        }
    }
    Ok((out, stats))
}

/// States reachable through non-zero rates from a populated or fed state, ascending.
fn reachable(network: &RateNetwork, initial: &[f64]) -> Vec<usize> {
    let n = network.n_states();
    let mut seen: Vec<bool> = (0..n)
        .map(|q| initial[q] > 0.0 || network.feed_per_s()[q] > 0.0)
        .collect();
    let mut stack: Vec<usize> = (0..n).filter(|&q| seen[q]).collect();
    while let Some(from) = stack.pop() {
        for (to, &rate) in network.rates_from(from).iter().enumerate() {
            if rate > 0.0 && !seen[to] {
                seen[to] = true;
                stack.push(to);
            }
        }
    }
    (0..n).filter(|&q| seen[q]).collect()
}

/// Propagate the whole `network` into columns `cols` of `out` (zeros, [times, ≥ cols.end]).
fn propagate_all(
    network: &RateNetwork,
    initial: &[f64],
    times_s: &[f64],
    out: &mut Array2<f64>,
    cols: std::ops::Range<usize>,
) -> Result<Stats> {
    let n = network.n_states();
    let width = out.ncols();
    let out = out
        .as_slice_mut()
        .filter(|_| cols.len() == n && cols.end <= width)
        .ok_or_else(|| Error::invalid("the populations", "array", "an internal layout error"))?;
    let mut stats = Stats {
        n_active: n,
        ..Stats::default()
    };
    let mut stepper = Stepper::new(network)?;
    let conserving = !network.has_loss_or_feed();
    let mass = initial.iter().sum::<f64>();
    let feed_per_s: f64 = network.feed_per_s().iter().sum();
    let mut h = if stepper.fastest > 0.0 {
        0.01 / stepper.fastest
    } else {
        f64::INFINITY
    };

    // `t` is the time of the state `y`; outputs may lie beyond it while y is provably
    // unchanged within the tolerance.
    let mut t = 0.0;
    let mut y = initial.to_vec();
    let mut size = l1(&y);
    let mut speed = stepper.set_state(&y);
    let (mut big, mut mid, mut half) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
    let last = times_s.last().copied().unwrap_or(0.0);
    // `k` is the next output to fill.
    let mut k = 0;
    let mut dense_limit = f64::INFINITY;
    while k < times_s.len() {
        let t_out = times_s[k];
        // ‖y(t_out) − y(t)‖₁ ≤ (t_out − t)·‖Mv + s‖₁ (module docs).
        if t >= t_out || (t_out - t) * speed <= LOCAL_TOLERANCE * size {
            let row = output_row(out, width, k, &cols);
            for (o, &v) in row.iter_mut().zip(&y) {
                *o = clipped(v, CLIP_LEVEL * size);
            }
            check_row(row, mass, t_out, feed_per_s, conserving)?;
            k += 1;
            continue;
        }
        interrupt::check()?;
        stats.steps += 1;
        if stats.steps > MAX_STEPS {
            return Err(Error::invalid(
                "times_s",
                t_out,
                "needs more steps than the solver allows; check the rates",
            ));
        }
        // Steps follow the error control alone, up to the last output; outputs inside a
        // step are read off its dense polynomial.
        let remaining = last - t;
        let (h_step, hits) = if h >= remaining {
            (remaining, true)
        } else {
            (h, false)
        };
        if h_step <= 4.0 * f64::EPSILON * t {
            return Err(Error::invalid(
                "times_s",
                t_out,
                "the step size underflowed; the rates are too stiff to resolve",
            ));
        }
        let t_end = if hits { last } else { t + h_step };
        let inside = times_s[k..].iter().take_while(|&&x| x < t_end).count();
        stepper.double_step(h_step, &y, &mut big, &mut mid, &mut half, inside > 0)?;

        let mut err: f64 = 0.0;
        let mut new_size = 0.0;
        for (a, b) in big.iter().zip(&half) {
            err = err.max((a - b).abs());
            new_size += b.abs();
        }
        if !(err.is_finite() && new_size.is_finite()) {
            return Err(Error::invalid(
                "rate_per_s",
                "a rate",
                "the populations became non-finite; rates or feeds are too large",
            ));
        }
        let err = err / KEPT_ERROR_DIVISOR;
        // Populations below the smallest normal number are flushed to zero (below), so
        // the absolute tolerance need not go below it either: a decayed population
        // does not force steps that resolve subnormal round-off.
        let scale = size.max(new_size);
        let tol = (LOCAL_TOLERANCE * scale).max(f64::MIN_POSITIVE);
        let ratio = if err > 0.0 {
            SAFETY * (tol / err).powf(ERROR_EXPONENT)
        } else {
            MAX_GROWTH
        };
        if err > tol {
            stats.rejected += 1;
            h = h_step * ratio.clamp(0.1, SAFETY);
            continue;
        }
        if inside > 0 {
            let dense_err = stepper.dense_error(&y, &big, &mid);
            let dense_tol = (DENSE_TOLERANCE * scale).max(f64::MIN_POSITIVE);
            if dense_err.is_nan() || dense_err > dense_tol {
                // Dense error ∝ h⁶ (see DENSE_EXPONENT).
                stats.rejected += 1;
                let shrink = SAFETY * (dense_tol / dense_err).powf(DENSE_EXPONENT);
                h = h_step
                    * if shrink.is_finite() {
                        shrink.clamp(0.1, SAFETY)
                    } else {
                        0.1
                    };
                continue;
            }
            // Dense outputs keep the next step within the dense tolerance too.
            let dense_ratio = if dense_err > 0.0 {
                SAFETY * (dense_tol / dense_err).powf(DENSE_EXPONENT)
            } else {
                MAX_GROWTH
            };
            dense_limit = h_step * dense_ratio.min(MAX_GROWTH);
            for (j, &t_j) in times_s.iter().enumerate().skip(k).take(inside) {
                let theta = (t_j - t) / (t_end - t);
                let row = output_row(out, width, j, &cols);
                stepper.dense_row(theta, (&y, &mid, &half), row, DENSE_CLIP_LEVEL * scale);
                check_row(row, mass, t_j, feed_per_s, conserving)?;
            }
            stats.dense_outputs += inside;
            k += inside;
        }
        t = t_end;
        std::mem::swap(&mut y, &mut half);
        flush_underflow(&mut y);
        if conserving {
            renormalise(&mut y, mass);
        }
        size = l1(&y);
        speed = stepper.set_state(&y);
        let mut proposal = h_step * ratio.min(MAX_GROWTH);
        if inside > 0 {
            proposal = proposal.min(dense_limit);
        }
        // A step shortened to end at the last output says nothing against the longer one.
        h = if h_step < h {
            h.max(proposal)
        } else {
            proposal
        };
    }
    Ok(stats)
}

/// Populations below the smallest normal f64 are exactly zero: their round-off is no longer
/// relative, and a decay towards underflow (loss over t ≳ 700/loss) must end at 0, not in
/// a step size that shrinks to resolve subnormal noise.
fn flush_underflow(y: &mut [f64]) {
    for v in y.iter_mut() {
        *v = flushed(*v);
    }
}

/// One value as [`flush_underflow`] leaves it.
#[inline(always)]
fn flushed(v: f64) -> f64 {
    if v.abs() < f64::MIN_POSITIVE {
        0.0
    } else {
        v
    }
}

/// An output value: round-off negatives down to `clip` (the clip level times the total
/// population) become 0.
#[inline(always)]
fn clipped(v: f64, clip: f64) -> f64 {
    if v < 0.0 && v >= -clip {
        0.0
    } else {
        v
    }
}

/// The last line of defence: a row that is not finite, negative beyond round-off, or (for
/// a conserving network) off its total, is an error and never a result. The total may grow
/// from `mass` at t = 0 by at most `feed_per_s`·t. (Four partial sums and minima, so that
/// the check runs at vector speed instead of along one chain of additions; a NaN or an
/// infinity makes the total non-finite.)
fn check_row(row: &[f64], mass: f64, t: f64, feed_per_s: f64, conserving: bool) -> Result<()> {
    let mut sums = [0.0; 4];
    let mut lows = [f64::INFINITY; 4];
    let chunks = row.chunks_exact(4);
    let rest = chunks.remainder();
    for c in chunks {
        for j in 0..4 {
            sums[j] += c[j];
            lows[j] = lows[j].min(c[j]);
        }
    }
    let mut total = (sums[0] + sums[1]) + (sums[2] + sums[3]);
    let mut lowest = lows.iter().copied().fold(f64::INFINITY, f64::min);
    for &v in rest {
        total += v;
        lowest = lowest.min(v);
    }
    let bound = mass + t * feed_per_s;
    let bad = lowest < 0.0
        || !total.is_finite()
        || total > bound * (1.0 + OUTPUT_TOLERANCE) + f64::MIN_POSITIVE
        || (conserving && (total - mass).abs() > OUTPUT_TOLERANCE * mass);
    if bad {
        return Err(Error::invalid(
            "times_s",
            t,
            "the populations lost their f64 accuracy at this time (round-off of the fastest rates outgrew them); use shorter times",
        ));
    }
    Ok(())
}

/// Columns `cols` of row `k` of the output, a `[times, width]` array in standard layout
/// (empty past its end, which the callers never reach).
fn output_row<'a>(
    out: &'a mut [f64],
    width: usize,
    k: usize,
    cols: &std::ops::Range<usize>,
) -> &'a mut [f64] {
    let start = k * width;
    out.get_mut(start + cols.start..start + cols.end)
        .unwrap_or_default()
}

/// Remove round-off drift of the total; larger drift is left in place so tests expose it.
fn renormalise(y: &mut [f64], mass: f64) {
    let now: f64 = y.iter().sum();
    if mass > 0.0 && now > 0.0 {
        let factor = mass / now;
        if (factor - 1.0).abs() <= DRIFT_LEVEL {
            y.iter_mut().for_each(|v| *v *= factor);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The (4,5) Padé approximant of exp from its coefficients (m+n−j)!·m!/((m+n)!·j!·(m−j)!)
    /// (Hairer–Wanner II, §IV.3).
    fn pade(z: f64) -> f64 {
        let fact = |k: u32| (1..=k).map(f64::from).product::<f64>();
        let (m, n) = (4u32, 5u32);
        let term = |deg: u32, j: u32| {
            fact(m + n - j) * fact(deg) / (fact(m + n) * fact(j) * fact(deg - j))
        };
        let p: f64 = (0..=m).map(|j| term(m, j) * z.powi(j as i32)).sum();
        let q: f64 = (0..=n).map(|j| term(n, j) * (-z).powi(j as i32)).sum();
        p / q
    }

    fn partial_fractions(z: f64) -> f64 {
        let z = Complex64::new(z, 0.0);
        REAL_RESIDUE / (REAL_POLE - z.re)
            + COMPLEX_POLES
                .iter()
                .map(|&(pole, c)| 2.0 * (c / (pole - z)).re)
                .sum::<f64>()
    }

    #[test]
    fn partial_fractions_reproduce_the_pade_approximant() {
        for z in [0.0, -1e-3, -0.5, -1.0, -7.0, -40.0, -1e4, 0.3] {
            let (a, b) = (pade(z), partial_fractions(z));
            // Cancellation among the partial fractions costs up to ~100 ulp of R(0) = 1.
            assert!((a - b).abs() <= 1e-13 * a.abs() + 1e-14, "z={z}: {a} {b}");
        }
        // Order 9: R(z) − e^z ≈ 2.2e-9·z¹⁰ is far below round-off at z = −0.2.
        assert!((partial_fractions(-0.2) - (-0.2f64).exp()).abs() < 5e-14);
    }

    /// The Butcher matrix of five-stage Radau IIA from its nodes: aᵢⱼ = ∫₀^{cᵢ} lⱼ(τ) dτ
    /// (Hairer–Wanner II, §IV.5), by five-point Gauss–Legendre (exact for degree 4).
    fn butcher() -> [[f64; 5]; 5] {
        let c = [
            STAGE_NODES[0],
            STAGE_NODES[1],
            STAGE_NODES[2],
            STAGE_NODES[3],
            1.0,
        ];
        let lagrange = |j: usize, x: f64| -> f64 {
            (0..5)
                .filter(|&m| m != j)
                .map(|m| (x - c[m]) / (c[j] - c[m]))
                .product()
        };
        let gauss = [
            (0.0, 128.0 / 225.0),
            (-0.538_469_310_105_683, 0.478_628_670_499_366_5),
            (0.538_469_310_105_683, 0.478_628_670_499_366_5),
            (-0.906_179_845_938_664, 0.236_926_885_056_189_1),
            (0.906_179_845_938_664, 0.236_926_885_056_189_1),
        ];
        std::array::from_fn(|i| {
            std::array::from_fn(|j| {
                gauss
                    .iter()
                    .map(|&(x, w)| 0.5 * c[i] * w * lagrange(j, 0.5 * c[i] * (x + 1.0)))
                    .sum()
            })
        })
    }

    /// Solve the 5 × 5 system (I − zA) y = 𝟙 by Gaussian elimination with pivoting.
    #[allow(clippy::needless_range_loop)]
    fn stage_values(z: f64) -> [f64; 5] {
        let a = butcher();
        let mut m: [[f64; 6]; 5] = std::array::from_fn(|i| {
            std::array::from_fn(|j| match j {
                5 => 1.0,
                _ => f64::from(u8::from(i == j)) - z * a[i][j],
            })
        });
        for col in 0..5 {
            let p = (col..5)
                .max_by(|&x, &y| m[x][col].abs().total_cmp(&m[y][col].abs()))
                .unwrap();
            m.swap(col, p);
            for row in col + 1..5 {
                let f = m[row][col] / m[col][col];
                for k in col..6 {
                    m[row][k] -= f * m[col][k];
                }
            }
        }
        let mut y = [0.0; 5];
        for i in (0..5).rev() {
            let s: f64 = (i + 1..5).map(|k| m[i][k] * y[k]).sum();
            y[i] = (m[i][5] - s) / m[i][i];
        }
        y
    }

    #[test]
    fn stage_weights_reproduce_the_radau_stages() {
        // The last stage is the step itself; the interior ones come from STAGE_WEIGHTS.
        for z in [-1e-3, -0.3, -2.0, -7.0, -60.0, -1e3, 0.4] {
            let exact = stage_values(z);
            let zc = Complex64::new(z, 0.0);
            for (i, w) in STAGE_WEIGHTS.iter().enumerate() {
                let sum = w.real / (REAL_POLE - z)
                    + (0..2)
                        .map(|k| (w.complex[k] / (COMPLEX_POLES[k].0 - zc)).re)
                        .sum::<f64>();
                let ours = 1.0 + z * sum;
                assert!(
                    (ours - exact[i]).abs() < 1e-12 * exact[i].abs().max(1.0),
                    "z={z} stage {i}: {ours} {}",
                    exact[i]
                );
            }
            assert!((partial_fractions(z) - exact[4]).abs() < 1e-12 * exact[4].abs().max(1.0));
        }
        // Row sums of A are the nodes (the stages are consistent).
        let a = butcher();
        for i in 0..4 {
            assert!((a[i].iter().sum::<f64>() - STAGE_NODES[i]).abs() < 1e-14);
        }
    }

    #[test]
    fn dense_outputs_agree_with_exact_exponentials() {
        // A two-state exchange has the closed form p₁(t) = a/(a+b)·(1 − e^{−(a+b)t}).
        let (a, b) = (3.0, 0.5);
        let mut net = RateNetwork::new(2).unwrap();
        net.add_rate(0, 1, a).unwrap();
        net.add_rate(1, 0, b).unwrap();
        let times: Vec<f64> = (0..400).map(|k| 1e-3 * 1.02f64.powi(k)).collect();
        let (out, stats) = propagate_with_stats(&net, &[1.0, 0.0], &times).unwrap();
        assert!(stats.dense_outputs > 300, "{stats:?}");
        assert!(stats.steps < 100, "{stats:?}");
        for (row, &t) in out.outer_iter().zip(&times) {
            let exact = a / (a + b) * (1.0 - (-(a + b) * t).exp());
            assert!((row[1] - exact).abs() < 1e-11, "t={t}: {} {exact}", row[1]);
            assert!((row.sum() - 1.0).abs() < 1e-13);
        }
    }

    fn chain(n: usize) -> RateNetwork {
        let mut net = RateNetwork::new(n).unwrap();
        for q in 0..n - 1 {
            net.add_rate(q, q + 1, 10f64.powf(8.0 - q as f64)).unwrap();
            net.add_rate(q + 1, q, 0.1 * (q + 1) as f64).unwrap();
        }
        net
    }

    #[test]
    fn a_steady_state_costs_no_steps() {
        let net = chain(8);
        let steady = super::super::steady_state(&net).unwrap();
        let times: Vec<f64> = (0..50).map(|k| 1e-6 * 1.5f64.powi(k)).collect();
        let (out, stats) = propagate_with_stats(&net, &steady, &times).unwrap();
        assert_eq!(stats.steps, 0);
        assert!(out.outer_iter().all(|row| row.to_vec() == steady));
    }

    #[test]
    fn unreachable_states_stay_exactly_empty() {
        // Ionization stops at state 4; states 5–9 can never be populated.
        let mut net = RateNetwork::new(10).unwrap();
        for q in 0..4 {
            net.add_rate(q, q + 1, 1e3 / (q + 1) as f64).unwrap();
        }
        for q in 1..10 {
            net.add_rate(q, q - 1, 1.0).unwrap();
        }
        let mut start = vec![0.0; 10];
        start[0] = 1.0;
        let (out, stats) = propagate_with_stats(&net, &start, &[1e-3, 1.0, 1e3]).unwrap();
        assert_eq!(stats.n_active, 5);
        assert!(out
            .outer_iter()
            .all(|row| row.iter().skip(5).all(|&v| v == 0.0)));
        assert!((out.row(2).sum() - 1.0).abs() < 1e-14);
    }

    #[test]
    fn nothing_to_propagate() {
        let net = chain(4);
        let out = propagate(&net, &[0.0; 4], &[0.0, 1.0]).unwrap();
        assert!(out.iter().all(|&v| v == 0.0));
    }

    #[test]
    fn single_state_with_feed_grows_linearly() {
        let mut net = RateNetwork::new(1).unwrap();
        net.set_feed(0, 3.0).unwrap();
        let out = propagate(&net, &[1.0], &[0.0, 2.0, 5.0]).unwrap();
        assert_eq!(out[[0, 0]], 1.0);
        assert!((out[[1, 0]] - 7.0).abs() < 1e-13 * 7.0, "{}", out[[1, 0]]);
        assert!((out[[2, 0]] - 16.0).abs() < 1e-13 * 16.0, "{}", out[[2, 0]]);
    }
}
