//! The rate-equation solver against references computed another way: the closed-form
//! Bateman solution, a dense matrix exponential, the GTH steady state, detailed balance,
//! and property tests for conservation and non-negativity.

use chargecast::network::RateNetwork;
use chargecast::solve::{evolve, evolve_batch, steady_state};
use ndarray::Array2;
use proptest::prelude::*;

/// Log-spaced times from `first` to `last` (inclusive).
fn geomspace(first: f64, last: f64, count: usize) -> Vec<f64> {
    (0..count)
        .map(|i| first * (last / first).powf(i as f64 / (count - 1) as f64))
        .collect()
}

fn neutral_start(n: usize) -> Vec<f64> {
    let mut v = vec![0.0; n];
    v[0] = 1.0;
    v
}

/// A nearest-neighbour chain shaped like an electron-beam ion trap (synthetic, invented
/// values): ionization falling geometrically from 1e9 s⁻¹ at the neutral to 1 s⁻¹ at the
/// last step, recombination rising from 1e-2 to 1e2 s⁻¹ and charge exchange from 1e-1 to
/// 1e2 s⁻¹ with the charge.
fn trap_like_chain(z: usize) -> RateNetwork {
    let mut net = RateNetwork::new(z + 1).unwrap();
    for q in 0..z {
        let x = if z > 1 {
            q as f64 / (z - 1) as f64
        } else {
            0.0
        };
        net.add_rate(q, q + 1, 1e9 * 1e-9f64.powf(x)).unwrap();
        let frac = (q + 1) as f64 / z as f64;
        net.add_rate(q + 1, q, 1e-2 * 1e4f64.powf(frac)).unwrap();
        net.add_rate(q + 1, q, 1e-1 * 1e3f64.powf(frac)).unwrap();
    }
    net
}

/// Dense reference: the transition matrix exp(tQ) of a conservative generator Q (columns
/// summing to zero) by uniformization and squaring, done so that every operation adds
/// non-negative numbers. exp(B) for B = tQ/2^s with |B_jj| ≤ μ ≤ 1/4 is e^{-μ}·Σ C^k/k! with
/// C = B + μI ≥ 0 (uniformization, A. Jensen, Skand. Aktuarietidskr. 36, 87 (1953)); then
/// s squarings (C. Moler and C. Van Loan, SIAM Review 45, 3 (2003), §3), renormalising the
/// columns to their exact sum 1 after each so that round-off cannot build up in the total.
/// Independent of the solver under test.
fn stochastic_exp(q: &Array2<f64>, t: f64) -> Array2<f64> {
    let n = q.nrows();
    let mu_total = (0..n).map(|j| -q[[j, j]] * t).fold(0.0, f64::max);
    let squarings = if mu_total > 0.25 {
        (mu_total / 0.25).log2().ceil() as i32
    } else {
        0
    };
    let b = q * (t / 2f64.powi(squarings));
    let mu = (0..n).map(|j| -b[[j, j]]).fold(0.0, f64::max);
    let mut c = b.clone();
    for j in 0..n {
        c[[j, j]] = (mu + b[[j, j]]).max(0.0);
    }
    let mut p = Array2::<f64>::eye(n);
    let mut term = Array2::<f64>::eye(n);
    for k in 1..=30 {
        term = term.dot(&c) / k as f64;
        p += &term;
    }
    p *= (-mu).exp();
    let normalise = |p: &mut Array2<f64>| {
        for mut col in p.columns_mut() {
            let sum = col.sum();
            col /= sum;
        }
    };
    normalise(&mut p);
    for _ in 0..squarings {
        p = p.dot(&p);
        normalise(&mut p);
    }
    p
}

/// N(t) for `net` from `start` with the dense reference: loss goes to an extra absorbing
/// state, and the feed comes from a reservoir state holding K = 1e15 that empties at the
/// feed rates divided by K (the feed then stays constant to 1e-13 relative over the times
/// used here).
fn dense_reference(net: &RateNetwork, start: &[f64], t: f64) -> Vec<f64> {
    let n = net.n_states();
    let (sink, source) = (n, n + 1);
    let reservoir = 1e15;
    let mut q = Array2::<f64>::zeros((n + 2, n + 2));
    for from in 0..n {
        for to in 0..n {
            if from != to {
                q[[to, from]] += net.rate(from, to);
            }
        }
        q[[sink, from]] += net.loss_per_s()[from];
        q[[from, source]] += net.feed_per_s()[from] / reservoir;
    }
    for j in 0..n + 2 {
        let out: f64 = (0..n + 2).filter(|&i| i != j).map(|i| q[[i, j]]).sum();
        q[[j, j]] = -out;
    }
    let p = stochastic_exp(&q, t);
    let mut v = start.to_vec();
    v.push(0.0);
    v.push(reservoir);
    let v = ndarray::Array1::from(v);
    let mut result = p.dot(&v).to_vec();
    result.truncate(n);
    result
}

fn max_abs_diff(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).abs())
        .fold(0.0, f64::max)
}

/// Closed-form populations of an ionization-only chain with distinct rates (H. Bateman,
/// "Solution of a system of differential equations occurring in the theory of radio-active
/// transformations", Proc. Cambridge Philos. Soc. 15, 423 (1910)); the last state collects
/// the rest.
fn bateman(rates: &[f64], t: f64) -> Vec<f64> {
    let mut n: Vec<f64> = (0..rates.len())
        .map(|k| {
            let prefactor: f64 = rates[..k].iter().product();
            let sum: f64 = (0..=k)
                .map(|j| {
                    let denominator: f64 = (0..=k)
                        .filter(|&i| i != j)
                        .map(|i| rates[i] - rates[j])
                        .product();
                    (-rates[j] * t).exp() / denominator
                })
                .sum();
            prefactor * sum
        })
        .collect();
    n.push(1.0 - n.iter().sum::<f64>());
    n
}

#[test]
fn ionization_only_chain_matches_bateman() {
    // Rates a factor 7 apart keep the closed form well conditioned; they span 1e-3 … 1e7 s⁻¹.
    let rates: Vec<f64> = (0..9).map(|k| 1e7 / 7f64.powi(k)).collect();
    let mut net = RateNetwork::new(rates.len() + 1).unwrap();
    for (q, &r) in rates.iter().enumerate() {
        net.add_rate(q, q + 1, r).unwrap();
    }
    let times = geomspace(1e-9, 1e3, 120);
    let out = evolve(&net, &neutral_start(rates.len() + 1), &times).unwrap();
    for (k, &t) in times.iter().enumerate() {
        let expected = bateman(&rates, t);
        let got = out.row(k).to_vec();
        assert!(
            max_abs_diff(&got, &expected) < 1e-9,
            "t = {t}: {got:?} vs {expected:?}"
        );
    }
}

#[test]
fn bateman_chain_with_wide_spread_of_rates() {
    // A stiff chain: 1e9 … 1e-2 s⁻¹ in decade steps.
    let rates: Vec<f64> = (0..12).map(|k| 10f64.powi(9 - k)).collect();
    let mut net = RateNetwork::new(rates.len() + 1).unwrap();
    for (q, &r) in rates.iter().enumerate() {
        net.add_rate(q, q + 1, r).unwrap();
    }
    let times = geomspace(1e-12, 1e4, 200);
    let out = evolve(&net, &neutral_start(rates.len() + 1), &times).unwrap();
    for (k, &t) in times.iter().enumerate() {
        let expected = bateman(&rates, t);
        assert!(
            max_abs_diff(&out.row(k).to_vec(), &expected) < 1e-9,
            "t = {t}"
        );
    }
}

#[test]
fn dense_reference_reproduces_closed_forms() {
    // Two states, 2e6 s⁻¹ up and 1 s⁻¹ down: N₀(t) = b/(a+b)·(1 − e^{−(a+b)t}) from N₁ = 1.
    let (a, b) = (2.0e6, 1.0);
    let mut two = RateNetwork::new(2).unwrap();
    two.add_rate(0, 1, a).unwrap();
    two.add_rate(1, 0, b).unwrap();
    for t in [1e-8, 1e-4, 1.0, 1e3] {
        let exact = b / (a + b) * (1.0 - (-(a + b) * t).exp());
        let got = dense_reference(&two, &[0.0, 1.0], t);
        assert!(
            (got[0] - exact).abs() < 1e-15,
            "t = {t}: {} vs {exact}",
            got[0]
        );
    }
    let rates: Vec<f64> = (0..12).map(|k| 10f64.powi(9 - k)).collect();
    let mut chain = RateNetwork::new(13).unwrap();
    for (q, &r) in rates.iter().enumerate() {
        chain.add_rate(q, q + 1, r).unwrap();
    }
    for t in geomspace(1e-12, 1e4, 9) {
        let diff = max_abs_diff(
            &dense_reference(&chain, &neutral_start(13), t),
            &bateman(&rates, t),
        );
        assert!(diff < 1e-12, "t = {t}: {diff:e}");
    }
}

#[test]
fn trap_like_xenon_matches_a_dense_matrix_exponential() {
    let net = trap_like_chain(54);
    let start = neutral_start(55);
    let times = geomspace(1e-9, 1.0, 19);
    let out = evolve(&net, &start, &times).unwrap();
    for (k, &t) in times.iter().enumerate() {
        let expected = dense_reference(&net, &start, t);
        let diff = max_abs_diff(&out.row(k).to_vec(), &expected);
        assert!(diff < 1e-9, "t = {t}: max difference {diff:e}");
    }
}

#[test]
fn multi_jump_network_matches_a_dense_matrix_exponential() {
    // Jumps up by 1–3 and down by 1–2: the general band path.
    let n = 14;
    let mut net = RateNetwork::new(n).unwrap();
    for q in 0..n {
        for k in 1..=3 {
            if q + k < n {
                net.add_rate(q, q + k, 10f64.powf(8.0 - q as f64 * 0.6 - k as f64))
                    .unwrap();
            }
        }
        for k in 1..=2 {
            if q >= k {
                net.add_rate(q, q - k, 10f64.powf(-1.0 + q as f64 * 0.3 - k as f64))
                    .unwrap();
            }
        }
    }
    net.set_loss(3, 0.5).unwrap();
    net.set_feed(0, 2.0).unwrap();
    let start = neutral_start(n);
    let times = geomspace(1e-7, 30.0, 15);
    let out = evolve(&net, &start, &times).unwrap();
    for (k, &t) in times.iter().enumerate() {
        let expected = dense_reference(&net, &start, t);
        let scale = expected.iter().sum::<f64>().max(1.0);
        let diff = max_abs_diff(&out.row(k).to_vec(), &expected);
        assert!(diff < 1e-9 * scale, "t = {t}: max difference {diff:e}");
    }
}

#[test]
fn steady_state_is_the_long_time_limit() {
    let net = trap_like_chain(36);
    let steady = steady_state(&net).unwrap();
    let out = evolve(&net, &neutral_start(37), &[1e4, 1e6]).unwrap();
    assert!(max_abs_diff(&out.row(1).to_vec(), &steady) < 1e-10);
}

#[test]
fn long_times_obey_detailed_balance() {
    // A birth–death chain relaxes to N_{q+1}/N_q = ion_q / down_{q+1}.
    let net = trap_like_chain(18);
    let out = evolve(&net, &neutral_start(19), &[1e6]).unwrap();
    let n = out.row(0);
    for q in 0..18 {
        if n[q] > 1e-6 && n[q + 1] > 1e-6 {
            let expected = net.rate(q, q + 1) / net.rate(q + 1, q);
            assert!((n[q + 1] / n[q] / expected - 1.0).abs() < 1e-8, "q = {q}");
        }
    }
    let steady = steady_state(&net).unwrap();
    for q in 0..18 {
        let expected = net.rate(q, q + 1) / net.rate(q + 1, q);
        assert!(
            (steady[q + 1] / steady[q] / expected - 1.0).abs() < 1e-13,
            "q = {q}"
        );
    }
}

#[test]
fn loss_and_feed_follow_the_reference_and_approach_the_steady_state() {
    let mut net = trap_like_chain(18);
    for q in 0..=18 {
        // Escape that grows with the charge (invented values).
        net.set_loss(q, 0.05 + 0.02 * q as f64).unwrap();
    }
    net.set_feed(0, 3.0).unwrap();
    let empty = vec![0.0; 19];
    let times = [0.0, 1e-6, 1e-3, 0.3, 10.0, 1e4];
    let out = evolve(&net, &empty, &times).unwrap();
    assert!(out.row(0).iter().all(|&v| v == 0.0));
    for (k, &t) in times.iter().enumerate().take(5) {
        let expected = dense_reference(&net, &empty, t);
        let scale = expected.iter().sum::<f64>().max(1.0);
        let diff = max_abs_diff(&out.row(k).to_vec(), &expected);
        assert!(diff < 1e-9 * scale, "t = {t}: max difference {diff:e}");
    }
    let steady = steady_state(&net).unwrap();
    let total: f64 = steady.iter().sum();
    assert!(max_abs_diff(&out.row(5).to_vec(), &steady) < 1e-11 * total);
}

#[test]
fn outputs_at_zero_and_repeated_times() {
    let net = trap_like_chain(10);
    let start: Vec<f64> = (0..11)
        .map(|q| if q < 3 { 0.25 } else { 0.03125 })
        .collect();
    let out = evolve(&net, &start, &[0.0, 0.0, 1e-3, 1e-3, 2.0]).unwrap();
    assert_eq!(out.row(0).to_vec(), start);
    assert_eq!(out.row(1).to_vec(), start);
    assert_eq!(out.row(2), out.row(3));
    assert!((out.row(4).sum() - 1.0).abs() < 1e-12);
    assert_eq!(evolve(&net, &start, &[]).unwrap().dim(), (0, 11));
}

#[test]
fn batch_agrees_with_single_runs_and_reports_errors_per_problem() {
    let times = geomspace(1e-6, 1.0, 50);
    let problems: Vec<(RateNetwork, Vec<f64>)> = [2, 7, 18, 36]
        .iter()
        .map(|&z| (trap_like_chain(z), neutral_start(z + 1)))
        .chain(std::iter::once((trap_like_chain(3), vec![1.0])))
        .collect();
    let results = evolve_batch(&problems, &times);
    for ((net, start), result) in problems.iter().zip(&results).take(4) {
        assert_eq!(
            result.as_ref().unwrap(),
            &evolve(net, start, &times).unwrap()
        );
    }
    assert!(results[4].is_err());
    let unsorted = evolve_batch(&problems, &[1.0, 0.5]);
    assert!(unsorted.iter().all(|r| r.is_err()));
}

#[test]
fn invalid_input_is_an_error_not_a_panic() {
    let net = trap_like_chain(4);
    let start = neutral_start(5);
    assert!(evolve(&net, &start, &[1.0, 0.5]).is_err());
    assert!(evolve(&net, &start, &[-1.0]).is_err());
    assert!(evolve(&net, &start, &[f64::NAN]).is_err());
    assert!(evolve(&net, &start, &[f64::INFINITY]).is_err());
    assert!(evolve(&net, &[1.0, 0.0], &[1.0]).is_err());
    assert!(evolve(&net, &[1.0, -0.1, 0.0, 0.0, 0.0], &[1.0]).is_err());
    assert!(evolve(&net, &[1.0, f64::NAN, 0.0, 0.0, 0.0], &[1.0]).is_err());
    let mut bad = RateNetwork::new(3).unwrap();
    assert!(bad.add_rate(0, 3, 1.0).is_err());
    assert!(bad.add_rate(0, 1, -1.0).is_err());
    assert!(bad.add_rate(0, 1, f64::NAN).is_err());
    assert!(bad.set_loss(3, 1.0).is_err());
    assert!(bad.set_feed(0, f64::NEG_INFINITY).is_err());
    // Overflowing populations are reported, not returned as infinities or NaN.
    let mut huge = RateNetwork::new(2).unwrap();
    huge.add_rate(0, 1, 1e300).unwrap();
    huge.add_rate(1, 0, 1.0).unwrap();
    huge.set_feed(0, 1e300).unwrap();
    assert!(evolve(&huge, &[1.0, 0.0], &[1e300]).is_err());
    // A fast pair that has long reached its equilibrium is not an error, within the time
    // range f64 supports (t × largest rate ≤ 1e20); beyond it a clear error.
    huge.set_feed(0, 0.0).unwrap();
    let beyond = evolve(&huge, &[1.0, 0.0], &[1e300])
        .unwrap_err()
        .to_string();
    assert!(beyond.contains("must be at most 1e-280 s"), "{beyond}");
    let settled = evolve(&huge, &[1.0, 0.0], &[1e-285]).unwrap();
    assert!(
        // Absolute accuracy 1e-13 of the total, the solver's local tolerance.
        (settled[[0, 0]] - 1e-300).abs() < 1e-13 && (settled[[0, 1]] - 1.0).abs() < 1e-13,
        "{settled:?}"
    );
}

#[test]
fn steady_state_errors() {
    // Two absorbing ends: no unique stationary distribution.
    let mut net = RateNetwork::new(3).unwrap();
    net.add_rate(1, 0, 1.0).unwrap();
    net.add_rate(1, 2, 1.0).unwrap();
    assert!(steady_state(&net).is_err());
    // Feed into a chain without any loss: M N + s = 0 has no solution.
    let mut fed = trap_like_chain(5);
    fed.set_feed(0, 1.0).unwrap();
    assert!(steady_state(&fed).is_err());
}

fn log_uniform(lo: f64, hi: f64) -> impl Strategy<Value = f64> {
    (lo.ln()..hi.ln()).prop_map(f64::exp)
}

/// Random networks: up to 12 states, upward jumps of 1–`up`, downward of 1–`down`, each
/// present with probability ~1/2 and rates log-uniform in 1e-6 … 1e10 s⁻¹.
fn random_network(up: usize, down: usize) -> impl Strategy<Value = (RateNetwork, Vec<f64>)> {
    (2usize..=12).prop_flat_map(move |n| {
        let slots = n * (up + down);
        (
            prop::collection::vec(
                prop_oneof![Just(0.0), log_uniform(1e-6, 1e10)],
                slots..=slots,
            ),
            prop::collection::vec(0.0f64..1.0, n..=n),
        )
            .prop_map(move |(rates, weights)| {
                let mut net = RateNetwork::new(n).unwrap();
                let mut it = rates.into_iter();
                for q in 0..n {
                    for k in 1..=up {
                        let r = it.next().unwrap_or(0.0);
                        if q + k < n {
                            net.add_rate(q, q + k, r).unwrap();
                        }
                    }
                    for k in 1..=down {
                        let r = it.next().unwrap_or(0.0);
                        if q >= k {
                            net.add_rate(q, q - k, r).unwrap();
                        }
                    }
                }
                let total: f64 = weights.iter().sum::<f64>().max(1e-300);
                let start = weights.iter().map(|w| w / total).collect();
                (net, start)
            })
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn chains_conserve_population_and_stay_non_negative((net, start) in random_network(1, 1)) {
        let times = geomspace(1e-10, 1e4, 40);
        let out = evolve(&net, &start, &times).unwrap();
        let total: f64 = start.iter().sum();
        for row in out.outer_iter() {
            prop_assert!((row.sum() - total).abs() < 1e-12, "sum {}", row.sum());
            prop_assert!(row.iter().all(|&v| v >= 0.0), "{row:?}");
        }
    }

    #[test]
    fn banded_networks_conserve_population_and_stay_non_negative(
        (net, start) in random_network(3, 2)
    ) {
        let times = geomspace(1e-10, 1e4, 40);
        let out = evolve(&net, &start, &times).unwrap();
        let total: f64 = start.iter().sum();
        for row in out.outer_iter() {
            prop_assert!((row.sum() - total).abs() < 1e-12, "sum {}", row.sum());
            prop_assert!(row.iter().all(|&v| v >= 0.0), "{row:?}");
        }
    }

    #[test]
    fn random_chains_match_the_dense_exponential((net, start) in random_network(1, 1)) {
        let times = [1e-8, 1e-4, 1.0, 1e3];
        let out = evolve(&net, &start, &times).unwrap();
        for (k, &t) in times.iter().enumerate() {
            let expected = dense_reference(&net, &start, t);
            let diff = max_abs_diff(&out.row(k).to_vec(), &expected);
            prop_assert!(diff < 1e-9, "t = {t}: {diff:e}");
        }
    }
}
