//! Time evolution and steady state of a [`RateNetwork`]: dN/dt = M N + s.
//!
//! * [`evolve`]: L-stable rational time stepping, N ↦ R(hM)N with R the (4,5) Padé
//!   approximant of exp (the stability function of five-stage Radau IIA, order 9), evaluated
//!   by partial fractions as one real and two complex band solves per step; error control by
//!   step doubling at a local tolerance of 1e-13 of the total population; every output time
//!   is hit exactly (see `radau`). The shifted systems are factorised without pivoting and
//!   with pivots built from column sums, so badly scaled chains (rates 1e-6 … 1e10 s⁻¹)
//!   keep full accuracy in their slow modes (`banded`, `tridiagonal` for nearest-neighbour
//!   chains); the rate M N + s is summed with compensation (`flux`). States that the initial
//!   populations and feeds cannot reach are left out (they stay exactly zero), and outputs
//!   for which ‖M N + s‖₁·Δt is below the tolerance are served without stepping.
//!   Negative round-off down to 1e-15 of the total population is set to zero in the output;
//!   without loss or feed, drift of the total below 1e-13 per step is renormalised away.
//! * [`steady_state`]: GTH elimination, free of subtractions (see `steady`).
//! * [`evolve_batch`]: many independent problems in parallel (rayon).

mod banded;
mod flux;
mod radau;
mod steady;
mod tridiagonal;

use ndarray::Array2;
use rayon::prelude::*;

use crate::error::{require_sorted_times, Error, Result};
use crate::network::RateNetwork;

/// Populations at each output time for dN/dt = M N + s, N(0) = `initial`.
///
/// `times_s` must be finite, ≥ 0 and sorted ascending (repeats allowed); t = 0 returns
/// `initial`. `initial` has one finite, non-negative entry per state. Returns
/// `[times_s.len(), n_states]`.
pub fn evolve(network: &RateNetwork, initial: &[f64], times_s: &[f64]) -> Result<Array2<f64>> {
    require_sorted_times("times_s", times_s)?;
    check_initial(network, initial)?;
    radau::propagate(network, initial, times_s)
}

/// Steady state of the network.
///
/// Without loss and feed: the stationary distribution, normalised to a total of 1; it must
/// be unique (every state leads into one common closed set of states), otherwise an error.
/// With loss or feed: the solution of M N + s = 0 (all zeros if there is loss but no feed);
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
    problems
        .par_iter()
        .map(|(network, initial)| {
            check_initial(network, initial)?;
            radau::propagate(network, initial, times_s)
        })
        .collect()
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
