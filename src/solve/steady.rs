//! Steady states by GTH elimination (W. K. Grassmann, M. I. Taksar and D. P. Heyman,
//! "Regenerative analysis and steady state distributions for Markov chains",
//! Operations Research 33, 1107 (1985)).
//!
//! GTH is Gaussian elimination on the generator in which every pivot is taken as the sum of
//! the rates leaving the eliminated state towards the states still present, instead of the
//! diagonal entry. Every operation then adds, multiplies or divides non-negative numbers, so
//! each stationary population comes out with a small relative error however widely the rates
//! are spread. For a birth–death chain it reduces to N_{q+1}/N_q = ion_q / down_{q+1}.
//!
//! With loss and feed the balance M N + s = 0 is solved as the stationary distribution of an
//! augmented chain with one extra "outside" state O: every loss is a transition to O and O
//! sends s_q per unit of its own population into q. If π is that chain's stationary vector,
//! N = π_states / π_O. Eliminating O last, this is elimination on the column diagonally
//! dominant M-matrix −M with every pivot computed from off-diagonal sums (loss included),
//! so it is free of cancellation too.

use crate::error::{Error, Result};
use crate::network::RateNetwork;

/// Rescale the back substitution when populations leave this range, so that products of
/// large rate ratios (10¹¹ per step across 90 charge states) cannot overflow.
const RESCALE_ABOVE: f64 = 1e200;

pub(crate) fn steady_state(network: &RateNetwork) -> Result<Vec<f64>> {
    let n = network.n_states();
    if !network.has_loss_or_feed() {
        let rates = Dense::new(n, |from, to| network.rate(from, to));
        let class = single_closed_class(&rates).ok_or_else(|| {
            Error::invalid(
                "network",
                "a network without loss or feed",
                "needs a unique stationary distribution: every state must lead into one common \
                 closed set of states",
            )
        })?;
        let weights = gth(&class, &rates)?;
        let total: f64 = weights.iter().sum();
        let mut out = vec![0.0; n];
        for (&state, w) in class.iter().zip(&weights) {
            out[state] = w / total;
        }
        return Ok(out);
    }

    // Losses without feed would give all zeros: say so instead of returning an empty state.
    if network.feed_per_s().iter().all(|&v| v <= 0.0) {
        return Err(Error::invalid(
            "feed_per_s",
            "no feed with losses",
            "everything leaks out: with losses and no feed the only steady state is empty; \
             give a feed, or no losses for the stationary distribution",
        ));
    }
    // Index 0 is the outside state O, index q + 1 is charge state q.
    let rates = Dense::new(n + 1, |from, to| match (from, to) {
        (0, 0) => 0.0,
        (0, to) => network.feed_per_s()[to - 1],
        (from, 0) => network.loss_per_s()[from - 1],
        (from, to) => network.rate(from - 1, to - 1),
    });
    let singular = || {
        Error::invalid(
            "network",
            "a network with loss or feed",
            "has no unique steady state: some states can reach no loss (M N + s = 0 is singular)",
        )
    };
    let class = single_closed_class(&rates).ok_or_else(singular)?;
    if class.first() != Some(&0) {
        return Err(singular());
    }
    let weights = gth(&class, &rates)?;
    let outside = weights[0];
    let mut out = vec![0.0; n];
    for (&state, w) in class.iter().zip(&weights).skip(1) {
        out[state - 1] = w / outside;
    }
    if out.iter().any(|v| !v.is_finite()) {
        return Err(Error::invalid(
            "feed_per_s",
            "the feed",
            "the steady populations overflow; feed/loss ratios are too large",
        ));
    }
    Ok(out)
}

/// Dense rates `[from][to]` (zero diagonal) with the list of non-zero targets per state.
struct Dense {
    n: usize,
    rates: Vec<f64>,
    targets: Vec<Vec<usize>>,
}

impl Dense {
    fn new(n: usize, rate: impl Fn(usize, usize) -> f64) -> Self {
        let mut rates = vec![0.0; n * n];
        let mut targets = vec![Vec::new(); n];
        for from in 0..n {
            for to in 0..n {
                let r = if from == to { 0.0 } else { rate(from, to) };
                if r > 0.0 {
                    rates[from * n + to] = r;
                    targets[from].push(to);
                }
            }
        }
        Self { n, rates, targets }
    }

    fn rate(&self, from: usize, to: usize) -> f64 {
        self.rates[from * self.n + to]
    }
}

/// The states of the only closed communicating class, ascending, or None if there are
/// several.
fn single_closed_class(rates: &Dense) -> Option<Vec<usize>> {
    let n = rates.n;
    let reach = reachability(rates);
    let recurrent: Vec<usize> = (0..n)
        .filter(|&i| (0..n).all(|j| !reach[i * n + j] || reach[j * n + i]))
        .collect();
    let first = *recurrent.first()?;
    recurrent
        .iter()
        .all(|&j| reach[first * n + j])
        .then_some(recurrent)
}

/// reach[i·n + j]: j can be reached from i (every state reaches itself).
fn reachability(rates: &Dense) -> Vec<bool> {
    let n = rates.n;
    let mut reach = vec![false; n * n];
    let mut stack = Vec::with_capacity(n);
    for start in 0..n {
        let row = &mut reach[start * n..(start + 1) * n];
        row[start] = true;
        stack.push(start);
        while let Some(i) = stack.pop() {
            for &j in &rates.targets[i] {
                if !row[j] {
                    row[j] = true;
                    stack.push(j);
                }
            }
        }
    }
    reach
}

/// Unnormalised stationary weights of the irreducible chain on `states` (the first state
/// gets weight 1 before any rescaling).
fn gth(states: &[usize], rates: &Dense) -> Result<Vec<f64>> {
    let m = states.len();
    let mut a = vec![0.0; m * m];
    for (i, &si) in states.iter().enumerate() {
        for (j, &sj) in states.iter().enumerate() {
            a[i * m + j] = rates.rate(si, sj);
        }
    }
    for k in (1..m).rev() {
        let pivot: f64 = a[k * m..k * m + k].iter().sum();
        if !(pivot > 0.0 && pivot.is_finite()) {
            return Err(Error::invalid(
                "rate_per_s",
                pivot,
                "the elimination met a state without finite exit rate",
            ));
        }
        for i in 0..k {
            let into_k = a[i * m + k] / pivot;
            a[i * m + k] = into_k;
            if into_k > 0.0 {
                for j in 0..k {
                    if j != i {
                        a[i * m + j] += into_k * a[k * m + j];
                    }
                }
            }
        }
    }
    let mut x = vec![0.0; m];
    if m > 0 {
        x[0] = 1.0;
    }
    for j in 1..m {
        let mut sum = 0.0;
        for i in 0..j {
            sum += x[i] * a[i * m + j];
        }
        x[j] = sum;
        if sum > RESCALE_ABOVE {
            x[..=j].iter_mut().for_each(|v| *v /= RESCALE_ABOVE);
        }
    }
    if x.iter().any(|v| !v.is_finite()) {
        return Err(Error::invalid(
            "rate_per_s",
            "the rates",
            "the steady state overflows; rates must be finite and not extreme",
        ));
    }
    Ok(x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn losses_without_feed_are_an_error_that_says_everything_leaks_out() {
        let mut net = RateNetwork::new(3).unwrap();
        net.add_rate(0, 1, 1.0).unwrap();
        net.add_rate(1, 2, 1.0).unwrap();
        net.set_loss(2, 0.5).unwrap();
        let err = steady_state(&net).unwrap_err();
        assert!(matches!(err, Error::InvalidParameter { .. }), "{err}");
        assert!(err.to_string().contains("everything leaks out"), "{err}");
    }

    #[test]
    fn birth_death_chain_obeys_detailed_balance_across_wide_scales() {
        let n = 30;
        let mut net = RateNetwork::new(n).unwrap();
        for q in 0..n - 1 {
            net.add_rate(q, q + 1, 10f64.powf(9.0 - q as f64 * 0.35))
                .unwrap();
            net.add_rate(q + 1, q, 10f64.powf(-2.0 + q as f64 * 0.15))
                .unwrap();
        }
        let p = steady_state(&net).unwrap();
        assert!((p.iter().sum::<f64>() - 1.0).abs() < 1e-15);
        for q in 0..n - 1 {
            if p[q] > 1e-290 {
                let ratio = p[q + 1] / p[q];
                let expected = net.rate(q, q + 1) / net.rate(q + 1, q);
                assert!((ratio / expected - 1.0).abs() < 1e-13, "q={q}");
            }
        }
    }

    #[test]
    fn ionisation_only_chain_ends_in_the_top_state() {
        let mut net = RateNetwork::new(4).unwrap();
        for q in 0..3 {
            net.add_rate(q, q + 1, 1.0 + q as f64).unwrap();
        }
        assert_eq!(steady_state(&net).unwrap(), vec![0.0, 0.0, 0.0, 1.0]);
    }

    #[test]
    fn two_closed_classes_have_no_unique_steady_state() {
        let mut net = RateNetwork::new(3).unwrap();
        net.add_rate(1, 0, 1.0).unwrap();
        net.add_rate(1, 2, 1.0).unwrap();
        assert!(steady_state(&net).is_err());
    }

    #[test]
    fn feed_and_loss_balance() {
        // One state fed at 6 /s and lost at 2 /s holds 3; a second state fed through the
        // first at 1 /s and lost at 4 /s holds 3·1/4.
        let mut net = RateNetwork::new(2).unwrap();
        net.set_feed(0, 6.0).unwrap();
        net.set_loss(0, 1.0).unwrap();
        net.add_rate(0, 1, 1.0).unwrap();
        net.set_loss(1, 4.0).unwrap();
        let n = steady_state(&net).unwrap();
        assert!((n[0] - 3.0).abs() < 1e-15);
        assert!((n[1] - 0.75).abs() < 1e-15);
    }

    #[test]
    fn feed_without_a_loss_path_is_singular() {
        let mut net = RateNetwork::new(2).unwrap();
        net.set_feed(0, 1.0).unwrap();
        net.add_rate(0, 1, 1.0).unwrap();
        assert!(steady_state(&net).is_err());
        net.set_loss(0, 1.0).unwrap();
        // State 1 is fed through state 0 but cannot leave.
        assert!(steady_state(&net).is_err());
        net.set_loss(1, 0.5).unwrap();
        assert!(steady_state(&net).is_ok());
    }
}
