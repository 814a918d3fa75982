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
//! steps are kept (E. Hairer, S. P. Nørsett and G. Wanner, *Solving ODEs I*, 2nd ed. (1993),
//! §II.4). Step sizes are shortened so that every output time is hit exactly.
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

/// Local error allowed per step, relative to the total population (absolute per fraction).
pub(crate) const LOCAL_TOLERANCE: f64 = 1e-13;
/// Negative round-off down to this fraction of the total population is set to zero.
pub(crate) const CLIP_LEVEL: f64 = 1e-15;
/// Total population drift per step up to this relative size is treated as round-off and
/// renormalised away (networks without loss or feed only).
const DRIFT_LEVEL: f64 = 1e-13;
const MAX_STEPS: usize = 10_000_000;
/// Largest relative error of a returned total that is still round-off (see `check_output`).
const OUTPUT_TOLERANCE: f64 = 1e-9;
/// Local error ∝ h¹⁰, so step sizes scale with (tolerance / error)^(1/10).
const ERROR_EXPONENT: f64 = 1.0 / 10.0;
const SAFETY: f64 = 0.9;
const MAX_GROWTH: f64 = 5.0;

/// Below this many states every network takes the band path (its pivots from column sums
/// keep slow modes accurate next to fast ones, and its cost is small anyway).
pub(crate) const DENSE_MIN_STATES: usize = 64;

/// Whether the Hessenberg path is cheaper: a band LU costs about n·lower·upper per step
/// size, a Hessenberg LU n²/2 after a one-off reduction of 10n³/3.
pub(crate) fn use_dense(n: usize, lower: usize, upper: usize) -> bool {
    n >= DENSE_MIN_STATES && lower.min(n) * upper.min(n) > 8 * n
}

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
        })
    }

    /// Take `v` as the current state: compute its rate Mv + s and return ‖Mv + s‖₁.
    fn set_state(&mut self, v: &[f64]) -> f64 {
        self.balance.rate_of_change(v, &mut self.rate);
        l1(&self.rate)
    }

    /// From the current state v: big = R(hM)v, mid = R(hM/2)v, half = R(hM/2)²v (feed
    /// included).
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
        with_kernel!(&mut self.kernel, k => k.combine::<0>(hs, w, rw, rate, [inc0, inc1], mid_rate));
        for i in 0..v.len() {
            big[i] = v[i] + inc0[i];
            mid[i] = v[i] + inc1[i];
        }
        let unused = &mut self.rate;
        with_kernel!(&mut self.kernel, k => k.combine::<1>(hs, w, rw, mid_rate, [inc0, inc1], unused));
        for ((out, &m), &d) in half.iter_mut().zip(mid.iter()).zip(inc1.iter()) {
            *out = m + d;
        }
        Ok(())
    }
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
    if active.len() == n {
        return propagate_all(network, initial, times_s);
    }
    let mut out = try_zeros("the populations", times_s.len(), n)?;
    if active.is_empty() {
        return Ok((out, Stats::default()));
    }
    // Transitions from the set to states outside it do not exist (those would be reachable),
    // so the sub-network loses nothing but its losses.
    let sub = network.restricted(&active);
    let sub_initial: Vec<f64> = active.iter().map(|&q| initial[q]).collect();
    let (sub_out, stats) = propagate_all(&sub, &sub_initial, times_s)?;
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

fn propagate_all(
    network: &RateNetwork,
    initial: &[f64],
    times_s: &[f64],
) -> Result<(Array2<f64>, Stats)> {
    let n = network.n_states();
    let mut out = try_zeros("the populations", times_s.len(), n)?;
    let mut stats = Stats {
        n_active: n,
        ..Stats::default()
    };
    let mut stepper = Stepper::new(network)?;
    let conserving = !network.has_loss_or_feed();
    let mass = initial.iter().sum::<f64>();
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
    for (k, &t_out) in times_s.iter().enumerate() {
        // ‖y(t_out) − y(t)‖₁ ≤ (t_out − t)·‖Mv + s‖₁ (module docs).
        while t < t_out && (t_out - t) * speed > LOCAL_TOLERANCE * size {
            interrupt::check()?;
            stats.steps += 1;
            if stats.steps > MAX_STEPS {
                return Err(Error::invalid(
                    "times_s",
                    t_out,
                    "needs more steps than the solver allows; check the rates",
                ));
            }
            let remaining = t_out - t;
            let (h_step, hits) = if h >= remaining {
                (remaining, true)
            } else if 2.0 * h > remaining {
                (0.5 * remaining, false)
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
            stepper.double_step(h_step, &y, &mut big, &mut mid, &mut half)?;

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
            // Populations below the smallest normal number are flushed to zero (below), so
            // the absolute tolerance need not go below it either: a decayed population
            // does not force steps that resolve subnormal round-off.
            let tol = (LOCAL_TOLERANCE * size.max(new_size)).max(f64::MIN_POSITIVE);
            let ratio = if err > 0.0 {
                SAFETY * (tol / err).powf(ERROR_EXPONENT)
            } else {
                MAX_GROWTH
            };
            if err <= tol {
                t = if hits { t_out } else { t + h_step };
                std::mem::swap(&mut y, &mut half);
                flush_underflow(&mut y);
                if conserving {
                    renormalise(&mut y, mass);
                }
                size = l1(&y);
                speed = stepper.set_state(&y);
                let proposal = h_step * ratio.min(MAX_GROWTH);
                // A step shortened to hit an output says nothing against the longer one.
                h = if h_step < h {
                    h.max(proposal)
                } else {
                    proposal
                };
            } else {
                stats.rejected += 1;
                h = h_step * ratio.clamp(0.1, SAFETY);
            }
        }
        let mut row = out.row_mut(k);
        for (o, &v) in row.iter_mut().zip(&y) {
            *o = if v < 0.0 && v >= -CLIP_LEVEL * size {
                0.0
            } else {
                v
            };
        }
        check_output(
            row.as_slice().unwrap_or(&[]),
            mass,
            t_out,
            network,
            conserving,
        )?;
    }
    Ok((out, stats))
}

/// Populations below the smallest normal f64 are exactly zero: their round-off is no longer
/// relative, and a decay towards underflow (loss over t ≳ 700/loss) must end at 0, not in
/// a step size that shrinks to resolve subnormal noise.
fn flush_underflow(y: &mut [f64]) {
    for v in y.iter_mut() {
        if v.abs() < f64::MIN_POSITIVE {
            *v = 0.0;
        }
    }
}

/// The last line of defence: a row that is not finite, negative beyond round-off, or (for
/// a conserving network) off its total, is an error and never a result.
fn check_output(
    row: &[f64],
    mass: f64,
    t: f64,
    network: &RateNetwork,
    conserving: bool,
) -> Result<()> {
    let total: f64 = row.iter().sum();
    let bound = mass + t * network.feed_per_s().iter().sum::<f64>();
    let bad = row.iter().any(|v| !v.is_finite() || *v < 0.0)
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
        assert!((out[[1, 0]] - 7.0).abs() < 1e-13, "{}", out[[1, 0]]);
        assert!((out[[2, 0]] - 16.0).abs() < 1e-13, "{}", out[[2, 0]]);
    }
}
