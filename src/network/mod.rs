//! The rate network of one element: states are charge states (index = charge q), with
//! transition rates between any two of them, an escape rate out of the system per state and
//! a constant injection per state. The network knows nothing about where its rates come
//! from; [`crate::solve`] propagates and balances it.
//!
//! Populations obey dN/dt = M N + s with the generator M[to, from] = rate(from → to) off the
//! diagonal and M[q, q] = −(Σ_to rate(q → to) + loss_q), and s the feed.

use ndarray::Array2;

use crate::error::{require_non_negative, Error, Result};
use crate::limits::{bytes_for, check_memory, try_vec};

/// Transition rates, losses and feeds of an `n_states`-state network.
#[derive(Clone, Debug, PartialEq)]
pub struct RateNetwork {
    n_states: usize,
    /// Row-major `[from][to]`, zero on the diagonal.
    rates_per_s: Vec<f64>,
    loss_per_s: Vec<f64>,
    feed_per_s: Vec<f64>,
}

impl RateNetwork {
    /// A network of `n_states` states (Z + 1 for an element of atomic number Z) without any
    /// transitions.
    pub fn new(n_states: usize) -> Result<Self> {
        if n_states == 0 {
            return Err(Error::invalid("n_states", n_states, "must be at least 1"));
        }
        // The rate table is n², checked before it is reserved (see `limits`).
        check_memory("the rate network", bytes_for(&[n_states, n_states], 8))?;
        Ok(Self {
            n_states,
            rates_per_s: try_vec("the rate network", n_states * n_states, 0.0)?,
            loss_per_s: vec![0.0; n_states],
            feed_per_s: vec![0.0; n_states],
        })
    }

    /// Number of states.
    pub fn n_states(&self) -> usize {
        self.n_states
    }

    fn check_state(&self, name: &str, state: usize) -> Result<()> {
        if state < self.n_states {
            Ok(())
        } else {
            Err(Error::invalid(
                name,
                state,
                &format!("must be a state index 0..={}", self.n_states - 1),
            ))
        }
    }

    /// Add `rate_per_s` (s⁻¹) to the transition `from → to`. Any jump size, up or down, is
    /// allowed; repeated calls add up (one call per process).
    pub fn add_rate(&mut self, from: usize, to: usize, rate_per_s: f64) -> Result<()> {
        self.check_state("from", from)?;
        self.check_state("to", to)?;
        if from == to {
            return Err(Error::invalid(
                "to",
                to,
                "must differ from `from` (a state has no transition to itself)",
            ));
        }
        require_non_negative("rate_per_s", rate_per_s)?;
        let slot = &mut self.rates_per_s[from * self.n_states + to];
        let sum = *slot + rate_per_s;
        if !sum.is_finite() {
            return Err(Error::invalid(
                "rate_per_s",
                rate_per_s,
                "the summed rate of the transition must stay finite",
            ));
        }
        *slot = sum;
        Ok(())
    }

    /// The rate of `from → to` in s⁻¹ (0 for out-of-range indices and for `from == to`).
    pub fn rate(&self, from: usize, to: usize) -> f64 {
        if from < self.n_states && to < self.n_states {
            self.rates_per_s[from * self.n_states + to]
        } else {
            0.0
        }
    }

    /// Set the escape rate out of the system from `state` (s⁻¹), replacing any earlier value.
    pub fn set_loss(&mut self, state: usize, loss_per_s: f64) -> Result<()> {
        self.check_state("state", state)?;
        self.loss_per_s[state] = require_non_negative("loss_per_s", loss_per_s)?;
        Ok(())
    }

    /// Set the constant injection into `state` (population units per second), replacing any
    /// earlier value.
    pub fn set_feed(&mut self, state: usize, feed_per_s: f64) -> Result<()> {
        self.check_state("state", state)?;
        self.feed_per_s[state] = require_non_negative("feed_per_s", feed_per_s)?;
        Ok(())
    }

    /// Escape rate of every state (s⁻¹).
    pub fn loss_per_s(&self) -> &[f64] {
        &self.loss_per_s
    }

    /// Injection into every state (population units per second).
    pub fn feed_per_s(&self) -> &[f64] {
        &self.feed_per_s
    }

    /// Rates out of `from` to every state, indexed by `to` (zero at `from`).
    pub fn rates_from(&self, from: usize) -> &[f64] {
        if from < self.n_states {
            &self.rates_per_s[from * self.n_states..(from + 1) * self.n_states]
        } else {
            &[]
        }
    }

    /// Total rate of leaving `state`: all transitions out of it plus its loss (s⁻¹).
    pub fn total_out_rate_per_s(&self, state: usize) -> f64 {
        if state >= self.n_states {
            return 0.0;
        }
        self.rates_from(state).iter().sum::<f64>() + self.loss_per_s[state]
    }

    /// Whether any state has a loss or a feed.
    pub fn has_loss_or_feed(&self) -> bool {
        self.loss_per_s
            .iter()
            .chain(&self.feed_per_s)
            .any(|&v| v > 0.0)
    }

    /// The transition rates as a matrix `rates[from, to]` (s⁻¹), zero on the diagonal: the
    /// form a user reads and passes back to a general solver.
    pub fn rate_matrix(&self) -> Array2<f64> {
        let n = self.n_states;
        Array2::from_shape_fn((n, n), |(from, to)| self.rates_per_s[from * n + to])
    }

    /// The generator M[to, from]; every column sums to minus the loss of its state.
    pub fn generator(&self) -> Array2<f64> {
        let n = self.n_states;
        let mut m = Array2::zeros((n, n));
        for from in 0..n {
            for (to, &rate) in self.rates_from(from).iter().enumerate() {
                if to != from {
                    m[[to, from]] = rate;
                }
            }
            m[[from, from]] = -self.total_out_rate_per_s(from);
        }
        m
    }

    /// The sub-network on `states` (ascending, in range, not empty): rates among them, their
    /// losses and feeds. Rates from these states to others are dropped.
    pub(crate) fn restricted(&self, states: &[usize]) -> RateNetwork {
        let m = states.len();
        let mut rates_per_s = vec![0.0; m * m];
        for (i, &from) in states.iter().enumerate() {
            for (j, &to) in states.iter().enumerate() {
                if i != j {
                    rates_per_s[i * m + j] = self.rates_per_s[from * self.n_states + to];
                }
            }
        }
        RateNetwork {
            n_states: m,
            rates_per_s,
            loss_per_s: states.iter().map(|&q| self.loss_per_s[q]).collect(),
            feed_per_s: states.iter().map(|&q| self.feed_per_s[q]).collect(),
        }
    }

    /// Largest upward jump `to − from` with a non-zero rate (0 if there is none).
    pub fn max_jump_up(&self) -> usize {
        self.max_jump(|from, to| to.checked_sub(from))
    }

    /// Largest downward jump `from − to` with a non-zero rate (0 if there is none).
    pub fn max_jump_down(&self) -> usize {
        self.max_jump(|from, to| from.checked_sub(to))
    }

    fn max_jump(&self, distance: impl Fn(usize, usize) -> Option<usize>) -> usize {
        let n = self.n_states;
        let mut widest = 0;
        for from in 0..n {
            for (to, &rate) in self.rates_from(from).iter().enumerate() {
                if rate > 0.0 {
                    if let Some(d) = distance(from, to) {
                        widest = widest.max(d);
                    }
                }
            }
        }
        widest
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rejects_empty_and_oversized_networks() {
        assert!(RateNetwork::new(0).is_err());
        // 1e6 states would need an 8 TB rate table: refused, not an allocation abort.
        let err = RateNetwork::new(1_000_000).unwrap_err();
        assert!(matches!(err, Error::MemoryLimit { .. }), "{err}");
    }

    #[test]
    fn rates_add_up_and_generator_columns_sum_to_minus_loss() {
        let mut net = RateNetwork::new(4).unwrap();
        net.add_rate(0, 1, 2.0).unwrap();
        net.add_rate(0, 1, 1.0).unwrap();
        net.add_rate(0, 3, 5.0).unwrap();
        net.add_rate(2, 1, 0.5).unwrap();
        net.set_loss(2, 0.25).unwrap();
        net.set_feed(0, 7.0).unwrap();
        assert_eq!(net.rate(0, 1), 3.0);
        assert_eq!(net.total_out_rate_per_s(0), 8.0);
        assert_eq!(net.total_out_rate_per_s(2), 0.75);
        assert!(net.has_loss_or_feed());
        let m = net.generator();
        for (col, loss) in net.loss_per_s().iter().enumerate() {
            let sum: f64 = m.column(col).sum();
            assert!((sum + loss).abs() < 1e-15, "column {col}: {sum}");
        }
        assert_eq!(m[[1, 0]], 3.0);
        let r = net.rate_matrix();
        assert_eq!(
            (r[[0, 1]], r[[0, 3]], r[[2, 1]], r[[1, 0]]),
            (3.0, 5.0, 0.5, 0.0)
        );
        assert!((0..4).all(|q| r[[q, q]] == 0.0));
        assert_eq!(net.max_jump_up(), 3);
        assert_eq!(net.max_jump_down(), 1);
        assert_eq!(net.feed_per_s(), &[7.0, 0.0, 0.0, 0.0]);
    }

    #[test]
    fn restriction_keeps_rates_losses_and_feeds_among_the_states() {
        let mut net = RateNetwork::new(5).unwrap();
        net.add_rate(1, 3, 2.0).unwrap();
        net.add_rate(3, 1, 0.5).unwrap();
        net.add_rate(3, 4, 9.0).unwrap();
        net.set_loss(3, 0.25).unwrap();
        net.set_feed(1, 4.0).unwrap();
        let sub = net.restricted(&[1, 3]);
        assert_eq!(sub.n_states(), 2);
        assert_eq!((sub.rate(0, 1), sub.rate(1, 0)), (2.0, 0.5));
        assert_eq!(sub.loss_per_s(), &[0.0, 0.25]);
        assert_eq!(sub.feed_per_s(), &[4.0, 0.0]);
        assert_eq!(sub.total_out_rate_per_s(1), 0.75);
    }

    #[test]
    fn bad_inputs_are_errors() {
        let mut net = RateNetwork::new(3).unwrap();
        assert!(net.add_rate(0, 3, 1.0).is_err());
        assert!(net.add_rate(1, 1, 1.0).is_err());
        assert!(net.add_rate(0, 1, -1.0).is_err());
        assert!(net.add_rate(0, 1, f64::NAN).is_err());
        assert!(net.add_rate(0, 1, f64::INFINITY).is_err());
        net.add_rate(0, 1, f64::MAX).unwrap();
        assert!(net.add_rate(0, 1, f64::MAX).is_err());
        assert!(net.set_loss(5, 1.0).is_err());
        assert!(net.set_loss(0, -1.0).is_err());
        assert!(net.set_feed(0, f64::NAN).is_err());
        assert_eq!(net.rate(7, 0), 0.0);
        assert_eq!(net.total_out_rate_per_s(9), 0.0);
        assert!(!net.has_loss_or_feed());
    }
}
