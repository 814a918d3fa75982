//! The solver under stress: decay to underflow, huge times, general (dense) networks, and
//! property tests that every returned population is finite, non-negative and conserves
//! its total. References: closed-form exponentials (a uniform loss L scales every solution
//! by e^{-Lt}, since it adds −L·I to the generator, which commutes with it).

use chargecast::atoms::element;
use chargecast::network::RateNetwork;
use chargecast::solve::{evolve, MAX_RATE_TIME};
use chargecast::sources::beam_trap::BeamTrap;
use chargecast::sources::electron_beam::ElectronBeam;
use proptest::prelude::*;

fn geomspace(first: f64, last: f64, count: usize) -> Vec<f64> {
    (0..count)
        .map(|i| first * (last / first).powf(i as f64 / (count - 1) as f64))
        .collect()
}

/// Total population at every time, against e^{-loss·t}: relative 1e-9 where that is a
/// normal number, exactly zero once it has underflowed.
fn assert_uniform_decay(out: &ndarray::Array2<f64>, times: &[f64], loss: f64) {
    for (row, &t) in out.outer_iter().zip(times) {
        assert!(
            row.iter().all(|v| v.is_finite() && *v >= 0.0),
            "t={t}: {row}"
        );
        let total: f64 = row.sum();
        let exact = (-loss * t).exp();
        if exact > 1e-290 {
            assert!(
                (total - exact).abs() <= 1e-9 * exact,
                "t={t}: {total} vs {exact}"
            );
        } else if exact == 0.0 {
            assert_eq!(total, 0.0, "t={t}");
        } else {
            assert!(total <= 2.0 * exact + 1e-300, "t={t}: {total} vs {exact}");
        }
    }
}

#[test]
fn argon_with_escape_decays_to_zero_instead_of_failing() {
    // 8 keV, 0.3 A, 70 µm beam; 0.6 m; 5e-9 Pa of H2; loss 10 s⁻¹ from every charge state.
    let beam = ElectronBeam::with_radius(8000.0, 0.3, 70e-6).unwrap();
    let mut trap = BeamTrap::new(beam, 0.6, &[("H2".to_string(), 5e-9)], 10.0).unwrap();
    trap.loss_per_s = vec![10.0; 19];
    let times = geomspace(1e-4, 100.0, 50);
    let out = trap.evolve(element("Ar").unwrap(), &times, 0).unwrap();
    assert_uniform_decay(&out, &times, 10.0);
    assert!(out.row(49).iter().all(|&v| v == 0.0));
}

#[test]
fn one_state_with_loss_reaches_exactly_zero() {
    let mut net = RateNetwork::new(1).unwrap();
    net.set_loss(0, 1.0).unwrap();
    let times = [0.0, 1.0, 100.0, 700.0, 742.0, 1e4];
    let out = evolve(&net, &[1.0], &times).unwrap();
    assert_uniform_decay(&out, &times, 1.0);
    assert_eq!(out[[4, 0]], 0.0);
    assert_eq!(out[[5, 0]], 0.0);
}

#[test]
fn a_cycle_with_loss_decays_to_zero() {
    let mut net = RateNetwork::new(4).unwrap();
    for q in 0..4 {
        net.add_rate(q, (q + 1) % 4, 5.0).unwrap();
        net.set_loss(q, 1.0).unwrap();
    }
    let times = geomspace(1e-3, 742.0, 40);
    let out = evolve(&net, &[1.0, 0.0, 0.0, 0.0], &times).unwrap();
    assert_uniform_decay(&out, &times, 1.0);
    assert!(out.row(39).iter().all(|&v| v == 0.0));
}

#[test]
fn times_beyond_the_f64_range_are_rejected_with_the_limit() {
    let mut net = RateNetwork::new(3).unwrap();
    net.add_rate(0, 1, 1e9).unwrap();
    net.add_rate(1, 2, 1e-3).unwrap();
    net.add_rate(2, 1, 1.0).unwrap();
    let ok = evolve(&net, &[1.0, 0.0, 0.0], &[1e10]).unwrap();
    assert!((ok.row(0).sum() - 1.0).abs() < 1e-12);
    let err = evolve(&net, &[1.0, 0.0, 0.0], &[1e40])
        .unwrap_err()
        .to_string();
    assert!(err.contains("must be at most 1e11 s"), "{err}");
    assert!(err.contains("1e20"), "{err}");
}

/// A dense network (every pair connected) large enough for the Hessenberg path.
fn dense_network(n: usize, seed: u64, spread: f64) -> RateNetwork {
    let mut state = seed
        .wrapping_mul(6364136223846793005)
        .wrapping_add(1442695040888963407);
    let mut uniform = move || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut net = RateNetwork::new(n).unwrap();
    for from in 0..n {
        for to in 0..n {
            if from != to {
                net.add_rate(from, to, 10f64.powf(spread * (uniform() - 0.5)))
                    .unwrap();
            }
        }
    }
    net
}

#[test]
fn a_dense_network_conserves_and_reaches_its_steady_state() {
    let net = dense_network(120, 3, 4.0);
    let steady = chargecast::solve::steady_state(&net).unwrap();
    let mut start = vec![0.0; 120];
    start[0] = 1.0;
    let times = geomspace(1e-6, 1e3, 30);
    let out = evolve(&net, &start, &times).unwrap();
    for row in out.outer_iter() {
        assert!(row.iter().all(|v| v.is_finite() && *v >= 0.0));
        assert!((row.sum() - 1.0).abs() < 1e-12);
    }
    // By 1e3 s every mode (slowest rate 1e-2 s⁻¹ × 119 partners) has relaxed.
    for (a, b) in out.row(29).iter().zip(&steady) {
        assert!((a - b).abs() < 1e-10, "{a} vs {b}");
    }
}

/// Random networks: any jumps, rates 1e-6 … 1e9 s⁻¹, optional loss and feed.
fn networks() -> impl Strategy<Value = (RateNetwork, Vec<f64>)> {
    (2usize..9).prop_flat_map(|n| {
        (
            proptest::collection::vec(
                (0..n, 0..n, -6.0f64..9.0, proptest::bool::weighted(0.6)),
                1..3 * n,
            ),
            proptest::collection::vec(proptest::option::weighted(0.3, -3.0f64..2.0), n),
            proptest::option::weighted(0.3, -2.0f64..2.0),
            proptest::collection::vec(0.0f64..1.0, n),
        )
            .prop_map(move |(jumps, losses, feed, weights)| {
                let mut net = RateNetwork::new(n).unwrap();
                for (from, to, exponent, keep) in jumps {
                    if from != to && keep {
                        net.add_rate(from, to, 10f64.powf(exponent)).unwrap();
                    }
                }
                for (q, loss) in losses.iter().enumerate() {
                    if let Some(e) = loss {
                        net.set_loss(q, 10f64.powf(*e)).unwrap();
                    }
                }
                if let Some(e) = feed {
                    net.set_feed(0, 10f64.powf(e)).unwrap();
                }
                let total: f64 = weights.iter().sum::<f64>() + 1e-3;
                let mut initial: Vec<f64> = weights.iter().map(|w| w / total).collect();
                initial[0] += 1e-3 / total;
                (net, initial)
            })
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]
    #[test]
    fn every_returned_population_is_finite_non_negative_and_conserved(
        (net, initial) in networks(),
        log_times in proptest::collection::vec(-9.0f64..40.0, 1..6),
    ) {
        let mut times: Vec<f64> = log_times.iter().map(|e| 10f64.powf(*e)).collect();
        times.sort_by(f64::total_cmp);
        let fastest = (0..net.n_states()).map(|q| net.total_out_rate_per_s(q)).fold(0.0, f64::max);
        let last = *times.last().unwrap();
        match evolve(&net, &initial, &times) {
            Err(e) => {
                // The only error allowed here is the documented time range.
                prop_assert!(last * fastest > MAX_RATE_TIME, "{e}");
            }
            Ok(out) => {
                let mass: f64 = initial.iter().sum();
                let feed: f64 = net.feed_per_s().iter().sum();
                for (row, &t) in out.outer_iter().zip(&times) {
                    prop_assert!(row.iter().all(|v| v.is_finite() && *v >= 0.0), "{row}");
                    let total = row.sum();
                    prop_assert!(total <= (mass + t * feed) * (1.0 + 1e-9), "t={t}: {total}");
                    if !net.has_loss_or_feed() {
                        prop_assert!((total - mass).abs() <= 1e-10 * mass, "t={t}: {total}");
                        prop_assert!(row.iter().all(|v| *v <= mass * (1.0 + 1e-10)));
                    }
                }
            }
        }
    }
}
