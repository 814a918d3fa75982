//! Time evolution and steady state of a [`RateNetwork`]: dN/dt = M N + s.
//!
//! * [`evolve`]: L-stable rational time stepping, N ↦ R(hM)N with R the (4,5) Padé
//!   approximant of exp (the stability function of five-stage Radau IIA, order 9), evaluated
//!   by partial fractions as one real and two complex shifted solves per step; error control
//!   by step doubling at a local tolerance of 1e-13 of the total population; outputs inside
//!   a step come from the Radau collocation polynomial (dense output, error ≤ 1e-11 of the
//!   total; see `radau`). The rate M N + s is summed with compensation
//!   (`flux`). States that the initial populations and feeds cannot reach are left out (they
//!   stay exactly zero), and outputs for which ‖M N + s‖₁·Δt is below the tolerance are
//!   served without stepping. Negative round-off down to 1e-15 of the total population is
//!   set to zero in the output; without loss or feed, drift of the total below 1e-13 per
//!   step is renormalised away.
//! * The shifted solves, chosen per network:
//!   - nearest-neighbour chains: Thomas elimination (`tridiagonal`);
//!   - banded networks (charge jumps up to p up and q down): band LU without row exchanges,
//!     pivots built from column sums, so badly scaled chains (rates 1e-6 … 1e10 s⁻¹) keep
//!     full accuracy in their slow modes; O(n·p·q) per step size (`banded`);
//!   - general, non-banded networks (at least 64 states and p·q > 8n): a one-off Householder
//!     reduction to Hessenberg form, then a Hessenberg LU, O(n²), per step size (`dense`).
//!     A fully connected 1 000-state network over 20 output times takes 2.9 s (measured on
//!     2 cores; the band path, O(n³) per step size, had been reported at 160 s for such a
//!     network).
//! * Decay to underflow: populations below the smallest normal f64 (2.2e-308) are set to
//!   exactly zero after every step, and the local tolerance has that absolute floor, so a
//!   population decaying through it (loss L over t ≳ 700/L) ends at 0 instead of driving
//!   the step size down. Relative accuracy is therefore lost within a factor ~1e13 above
//!   the underflow threshold (e^-700 ≈ 1e-304 agrees with scipy to 2e-9 relative).
//! * Time range: the last output time may be at most [`MAX_RATE_TIME`] (1e20) divided by
//!   the largest total rate out of a state; beyond it an `InvalidParameter` error names the
//!   limit. Reason: the compensated balances resolve the rate of change near equilibrium to
//!   round-off of the fastest fluxes, and that residual, integrated over the time, grows
//!   with t × rate; in a scan of 180 electron-beam-trap networks (O, Ar, Kr; 300 eV – 30 keV,
//!   0.01 – 2 A) the populations first lost 1e-12 of their total at t × rate ≈ 1e23, so 1e20
//!   leaves a margin of 1000. Feed × time must stay below 1e300.
//! * Output check: a row that is not finite, has a population below zero (after the clip
//!   above), a total above initial + feed × t, or (without loss and feed) a total off by
//!   more than 1e-9 is an error, never a result.
//! * Size: [`evolve_memory_bytes`] estimates result plus working set (8·T·n for the result,
//!   ~88 bytes per band entry or ~116·n² for the Hessenberg path, 32 bytes per band entry of
//!   flux terms); [`evolve`], [`evolve_batch`] and the energy × time maps
//!   ([`energy_map_memory_bytes`]) refuse beyond `limits::memory_limit_bytes` and reserve
//!   their big buffers fallibly.
//! * Interrupts: every step, every batch item and every energy of a map calls
//!   `interrupt::check`, and parallel loops run under `interrupt::run_polled`, so a cancel
//!   request stops them at the next step (`Error::Interrupted`).
//! * [`steady_state`]: GTH elimination, free of subtractions (see `steady`).
//! * [`evolve_batch`]: many independent problems in parallel (rayon).
//!
//! Measured accuracy against scipy (tests/python/test_solver_scipy.py and
//! test_solver_stress.py; references scipy.linalg.expm with exact column sums and
//! scipy.integrate.solve_ivp(method="Radau", rtol=1e-10, atol=1e-14)): random stiff chains
//! and banded networks (rates 1e-6 … 1e9 s⁻¹) agree to 1e-8 absolute (the test bound);
//! fully connected 100-state networks with rates 1e-2 … 1e2, 1e-4 … 1e4 and 1e-6 … 1e9 s⁻¹
//! agree with expm to 1.3e-15, 1.1e-16 and 1.7e-15; an 80-state dense network with rates
//! 1e-4 … 1e4 s⁻¹ and losses agrees with Radau to 2.3e-12; a 1 000-state dense network
//! with rates 0 … 1 s⁻¹ agrees with expm to 1.5e-15.

mod banded;
mod dense;
pub mod evolution;
mod flux;
mod radau;
mod steady;
pub mod stiff;
mod tridiagonal;

use ndarray::Array2;
use rayon::prelude::*;

use crate::error::{require_sorted_times, Error, Result};
use crate::interrupt;
use crate::limits::{bytes_for, check_memory};
use crate::network::RateNetwork;

/// Largest t × (largest total rate out of a state) accepted, 1e20 (see the module docs).
pub const MAX_RATE_TIME: f64 = 1e20;

/// Bytes of the result and working set of [`evolve`] on `network` at `n_times` outputs: the
/// result [n_times, n] plus the stepper (band or Hessenberg factors, flux terms, vectors).
pub fn evolve_memory_bytes(network: &RateNetwork, n_times: usize) -> u64 {
    let n = network.n_states();
    let (lower, upper) = (network.max_jump_down(), network.max_jump_up());
    let band_entries = bytes_for(&[n, lower.min(n) + upper.min(n) + 1], 1);
    let kernel = if radau::use_dense(n, lower, upper) {
        dense::working_bytes(n)
    } else {
        // Band matrix (8) plus its factors for three poles × two step sizes (80).
        band_entries.saturating_mul(88)
    };
    // Flux terms (16 bytes each, up to two per band entry) and a dozen vectors.
    let flux = band_entries.saturating_mul(32);
    bytes_for(&[n_times, n], 8)
        .saturating_add(kernel)
        .saturating_add(flux)
        .saturating_add(bytes_for(&[n, 16], 8))
}

/// Bytes of an energy × time map over `n_energies` × `n_times` for `n_states` states: the
/// map, its copy for the caller, and one evolution [n_times, n_states] per worker thread.
pub fn energy_map_memory_bytes(n_energies: usize, n_times: usize, n_states: usize) -> u64 {
    bytes_for(&[n_energies, n_times], 16).saturating_add(bytes_for(
        &[rayon::current_num_threads(), n_times, n_states],
        8,
    ))
}

/// Reject output times that f64 cannot follow on this network (see the module docs).
fn check_time_range(network: &RateNetwork, initial: &[f64], times_s: &[f64]) -> Result<()> {
    let Some(&last) = times_s.last() else {
        return Ok(());
    };
    let fastest = (0..network.n_states())
        .map(|q| network.total_out_rate_per_s(q))
        .fold(0.0, f64::max);
    if last * fastest > MAX_RATE_TIME {
        return Err(Error::invalid(
            "times_s",
            format!("{last:e}"),
            &format!(
                "must be at most {:e} s for this network: t × (largest rate out of a state, \
                 {fastest:e} s⁻¹) is limited to {MAX_RATE_TIME:e}, beyond which the f64 \
                 round-off of the fastest fluxes, integrated over the time, can outgrow the \
                 populations",
                MAX_RATE_TIME / fastest
            ),
        ));
    }
    let growth = initial.iter().sum::<f64>() + last * network.feed_per_s().iter().sum::<f64>();
    if !growth.is_finite() || growth >= 1e300 {
        return Err(Error::invalid(
            "times_s",
            last,
            "feed × time overflows f64: the populations would exceed 1e300",
        ));
    }
    Ok(())
}

/// Populations at each output time for dN/dt = M N + s, N(0) = `initial`.
///
/// `times_s` must be finite, ≥ 0 and sorted ascending (repeats allowed); t = 0 returns
/// `initial`. `initial` has one finite, non-negative entry per state. Returns
/// `[times_s.len(), n_states]`.
pub fn evolve(network: &RateNetwork, initial: &[f64], times_s: &[f64]) -> Result<Array2<f64>> {
    require_sorted_times("times_s", times_s)?;
    check_initial(network, initial)?;
    check_time_range(network, initial, times_s)?;
    radau::propagate(network, initial, times_s)
}

/// Steady state of the network.
///
/// Without loss and feed: the stationary distribution, normalised to a total of 1; it must
/// be unique (every state leads into one common closed set of states), otherwise an error.
/// With loss or feed: the solution of M N + s = 0; an `InvalidParameter` error when there is
/// loss but no feed (everything leaks out, the only steady state is empty);
/// an error if that system is singular, e.g. feed into states that reach no loss.
pub fn steady_state(network: &RateNetwork) -> Result<Vec<f64>> {
    steady::steady_state(network)
}

/// [`evolve`] for many independent problems in parallel, one result per problem.
pub fn evolve_batch(
    problems: &[(RateNetwork, Vec<f64>)],
    times_s: &[f64],
) -> Vec<Result<Array2<f64>>> {
    if let Err(e) = require_sorted_times("times_s", times_s) {
        return problems.iter().map(|_| Err(e.clone())).collect();
    }
    let results: u64 = problems
        .iter()
        .map(|(net, _)| bytes_for(&[times_s.len(), net.n_states()], 8))
        .fold(0, u64::saturating_add);
    let workers = problems
        .iter()
        .map(|(net, _)| evolve_memory_bytes(net, 0))
        .max()
        .unwrap_or(0)
        .saturating_mul(rayon::current_num_threads() as u64);
    if let Err(e) = check_memory("the batch of evolutions", results.saturating_add(workers)) {
        return problems.iter().map(|_| Err(e.clone())).collect();
    }
    interrupt::run_polled(|| {
        problems
            .par_iter()
            .map(|(network, initial)| {
                interrupt::check()?;
                check_initial(network, initial)?;
                check_time_range(network, initial, times_s)?;
                radau::propagate(network, initial, times_s)
            })
            .collect()
    })
}

fn check_initial(network: &RateNetwork, initial: &[f64]) -> Result<()> {
    if initial.len() != network.n_states() {
        return Err(Error::invalid(
            "initial",
            format!("{} values", initial.len()),
            &format!("needs one population per state ({})", network.n_states()),
        ));
    }
    match initial.iter().find(|v| !(v.is_finite() && **v >= 0.0)) {
        Some(v) => Err(Error::invalid(
            "initial",
            v,
            "every population must be finite and >= 0",
        )),
        None => Ok(()),
    }
}
