//! The right-hand side M N + s, computed so that round-off does not pretend to be change.
//!
//! Near a steady state large fluxes (10⁹ s⁻¹ × population) cancel in every balance. Summed
//! naively, each balance carries a round-off of ε × flux that the implicit solve treats as a
//! real source, and long steps multiply it by h. Two measures keep it out:
//! * every flux r·N_from is rounded once and enters its two balances with opposite signs, so
//!   its rounding error only moves population between the two states (and the total is
//!   conserved exactly up to the summation);
//! * each balance is summed with compensated summation (error-free TwoSum, D. E. Knuth,
//!   *The Art of Computer Programming* vol. 2, §4.2.2; accumulated as in A. Neumaier,
//!   Z. Angew. Math. Mech. 54, 39 (1974)), so the cancellation leaves an error of order
//!   ε × result instead of ε × flux.

use crate::network::RateNetwork;

/// The balance terms of every state.
#[derive(Clone, Debug)]
pub(crate) enum FluxBalance {
    /// Nearest-neighbour chain: rates q → q+1 and q → q−1 and the loss, per state.
    Chain {
        up: Vec<f64>,
        down: Vec<f64>,
        loss: Vec<f64>,
        feed: Vec<f64>,
        /// Scratch: the fluxes up and down out of every state.
        flux_up: Vec<f64>,
        flux_down: Vec<f64>,
    },
    /// Any network: row `i` owns `terms[start[i]..start[i + 1]]`, each a (state the flux
    /// comes from, signed rate) pair.
    General {
        start: Vec<usize>,
        terms: Vec<(usize, f64)>,
        feed: Vec<f64>,
    },
}

/// Knuth's branch-free TwoSum, accumulated: sum + carry gains `x` with no rounding lost.
#[inline(always)]
fn add(sum: &mut f64, carry: &mut f64, x: f64) {
    let t = *sum + x;
    let z = t - *sum;
    *carry += (*sum - (t - z)) + (x - z);
    *sum = t;
}

impl FluxBalance {
    pub fn new(network: &RateNetwork) -> Self {
        let n = network.n_states();
        let feed = network.feed_per_s().to_vec();
        if network.max_jump_up() <= 1 && network.max_jump_down() <= 1 {
            return FluxBalance::Chain {
                up: (0..n).map(|q| network.rate(q, q + 1)).collect(),
                down: (0..n)
                    .map(|q| q.checked_sub(1).map_or(0.0, |to| network.rate(q, to)))
                    .collect(),
                loss: network.loss_per_s().to_vec(),
                feed,
                flux_up: vec![0.0; n + 1],
                flux_down: vec![0.0; n + 1],
            };
        }
        let mut start = Vec::with_capacity(n + 1);
        let mut terms = Vec::new();
        for state in 0..n {
            start.push(terms.len());
            for from in 0..n {
                let rate = network.rate(from, state);
                if from != state && rate > 0.0 {
                    terms.push((from, rate));
                }
            }
            for (to, &rate) in network.rates_from(state).iter().enumerate() {
                if to != state && rate > 0.0 {
                    terms.push((state, -rate));
                }
            }
            let loss = network.loss_per_s()[state];
            if loss > 0.0 {
                terms.push((state, -loss));
            }
        }
        start.push(terms.len());
        FluxBalance::General { start, terms, feed }
    }

    /// out = M v + s.
    pub fn rate_of_change(&mut self, v: &[f64], out: &mut [f64]) {
        match self {
            FluxBalance::Chain {
                up,
                down,
                loss,
                feed,
                flux_up,
                flux_down,
            } => {
                // flux_up[i + 1] = up_i·v_i and flux_down[i] = down_i·v_i, with a zero at the
                // free end, so that every row reads its four fluxes without branches and the
                // loop runs in vector registers.
                let n = v.len();
                flux_up[0] = 0.0;
                flux_down[n] = 0.0;
                for i in 0..n {
                    flux_up[i + 1] = up[i] * v[i];
                    flux_down[i] = down[i] * v[i];
                }
                let has_loss = loss.iter().any(|&l| l > 0.0);
                for i in 0..n {
                    let mut sum = feed[i];
                    let mut carry = 0.0;
                    add(&mut sum, &mut carry, flux_up[i]);
                    add(&mut sum, &mut carry, flux_down[i + 1]);
                    add(&mut sum, &mut carry, -flux_up[i + 1]);
                    add(&mut sum, &mut carry, -flux_down[i]);
                    if has_loss {
                        add(&mut sum, &mut carry, -(loss[i] * v[i]));
                    }
                    out[i] = sum + carry;
                }
            }
            FluxBalance::General { start, terms, feed } => {
                for (i, o) in out.iter_mut().enumerate() {
                    let mut sum = feed[i];
                    let mut carry = 0.0;
                    for &(from, rate) in &terms[start[i]..start[i + 1]] {
                        add(&mut sum, &mut carry, rate * v[from]);
                    }
                    *o = sum + carry;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn balances_conserve_the_total_to_round_off_of_the_result() {
        // 3e5 s⁻¹ up and 7e2 s⁻¹ down in detailed balance: the two fluxes cancel.
        let mut net = RateNetwork::new(3).unwrap();
        net.add_rate(0, 1, 3e5).unwrap();
        net.add_rate(1, 0, 7e2).unwrap();
        net.add_rate(1, 2, 1e-3).unwrap();
        let v = [7e2 / (3e5 + 7e2), 3e5 / (3e5 + 7e2), 0.0];
        let mut out = [1.0; 3];
        FluxBalance::new(&net).rate_of_change(&v, &mut out);
        assert!(out[0].abs() < 1e-10, "{out:?}");
        assert!((out.iter().sum::<f64>()).abs() < 1e-18, "{out:?}");
        // The same network with a (zero) long jump takes the general path.
        net.add_rate(0, 2, 0.0).unwrap();
        net.add_rate(2, 0, 1e-30).unwrap();
        let mut general = [1.0; 3];
        FluxBalance::new(&net).rate_of_change(&v, &mut general);
        assert!((general[1] - out[1]).abs() < 1e-18 && (general[2] - out[2]).abs() < 1e-40);
    }
}
