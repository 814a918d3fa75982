use super::*;
use crate::sources::beam_trap::Processes;
use crate::sources::{BeamTrap, ElectronBeam};

fn trap() -> BeamTrap {
    let beam = ElectronBeam::with_radius(6000.0, 0.3, 100e-6).unwrap();
    let gas = vec![("H2".to_string(), 1e-9)];
    BeamTrap::new(beam, 0.6, &gas, 50.0).unwrap()
}

/// A cycle of 97Rb following at most `max` nuclides (few, to keep the debug-build tests
/// short).
fn cycle(injection: Injection, capture: f64, rate_hz: f64, t_b: f64, max: usize) -> BreedingCycle {
    BreedingCycle::new(
        37,
        97,
        injection,
        capture,
        rate_hz,
        t_b,
        1,
        DaughterCharge::Parent,
        max,
    )
    .unwrap()
}

/// Bateman (1910) closed form for a linear chain 0 → 1 → … → n with decay constants λ_i and
/// branchings b_i (i → i+1), all λ distinct, N_0(0) = 1:
/// N_n(t) = (Π_{i<n} b_i λ_i) Σ_{i≤n} e^{−λ_i t} / Π_{j≤n, j≠i} (λ_j − λ_i).
fn bateman(lambdas: &[f64], branchings: &[f64], t: f64) -> f64 {
    let n = lambdas.len() - 1;
    let prefactor: f64 = (0..n).map(|i| branchings[i] * lambdas[i]).product();
    let sum: f64 = (0..=n)
        .map(|i| {
            let denom: f64 = (0..=n)
                .filter(|&j| j != i)
                .map(|j| lambdas[j] - lambdas[i])
                .product();
            (-lambdas[i] * t).exp() / denom
        })
        .sum();
    prefactor * sum
}

#[test]
fn the_chain_of_97rb_follows_its_decay_channels() {
    let chain = decay_chain(37, 97, 8).unwrap();
    let labels: Vec<String> = chain.iter().map(|n| n.label()).collect();
    // 97Rb: beta- to 97Sr, beta-n to 96Sr (mendeleev 1.3.0 channels); then 97Sr → 97Y, …
    assert_eq!(&labels[..3], ["97Rb", "97Sr", "96Sr"]);
    assert!(labels.contains(&"97Y".to_string()));
    assert!(chain.len() <= 8);
    let rb = &chain[0];
    assert!((std::f64::consts::LN_2 / rb.decay_rate_per_s - 0.1691).abs() < 1e-9);
    let shares: f64 = rb.channels.iter().map(|c| c.1).sum::<f64>() + rb.unfollowed_branching;
    assert!((shares - 1.0).abs() < 1e-9);
    // A limit of one nuclide follows nothing: every decay goes to "not followed".
    let alone = decay_chain(37, 97, 1).unwrap();
    assert_eq!(alone.len(), 1);
    assert!((alone[0].unfollowed_branching - 1.0).abs() < 1e-9);
    // A stable nuclide has no decay.
    assert_eq!(decay_chain(37, 85, 8).unwrap()[0].decay_rate_per_s, 0.0);
}

#[test]
fn summed_charge_states_follow_the_bateman_chain() {
    // Breeding changes charge states, never the nuclide: with no escape, each nuclide's
    // ions summed over charge states obey the decay chain alone (Bateman 1910).
    let t = trap();
    let c = cycle(Injection::PerBunch(1.0), 1.0, 1.0, 1.0, 4);
    let times = [0.05, 0.2, 0.6, 1.0];
    let r = run_cycle(&t, &c, &times).unwrap();
    let chain = &r.nuclides;
    let find = |label: &str| chain.iter().position(|n| n.label() == label).unwrap();
    let (rb, sr, y) = (find("97Rb"), find("97Sr"), find("97Y"));
    let branch = |from: usize, to: usize| -> f64 {
        chain[from]
            .channels
            .iter()
            .filter(|c| c.2 == to)
            .map(|c| c.1)
            .sum()
    };
    let lambdas = [
        chain[rb].decay_rate_per_s,
        chain[sr].decay_rate_per_s,
        chain[y].decay_rate_per_s,
    ];
    let b = [branch(rb, sr), branch(sr, y)];
    for (ti, &time) in r.times_s.iter().enumerate() {
        for (k, n) in [(rb, 1), (sr, 2), (y, 3)] {
            let got: f64 = r.ions[k][ti].iter().sum();
            let want = bateman(&lambdas[..n], &b[..n - 1], time);
            assert!(
                (got - want).abs() < 1e-9 * want.max(1e-3),
                "{} at {time} s: {got} vs Bateman {want}",
                chain[k].label()
            );
        }
    }
}

#[test]
fn trapped_decayed_and_lost_add_up_to_the_injected_ions() {
    let mut t = trap();
    // Escape from every charge state of rubidium, so "lost in the trap" is not empty.
    t.loss_per_s = (0..=37).map(|q| 0.5 + 0.1 * q as f64).collect();
    let c = cycle(Injection::PerSecond(1e6), 0.6, 5.0, 0.15, 2);
    let times = [0.01, 0.05, 0.15];
    let r = run_cycle(&t, &c, &times).unwrap();
    assert!((r.ions_per_bunch - 2e5).abs() < 1e-6);
    assert!(r.decayed_before_injection > 0.0 && r.not_captured > 0.0);
    for ti in 0..r.times_s.len() {
        let (trapped, decayed, lost) = r.balance(ti);
        let total = trapped + decayed + lost;
        assert!(
            (total / r.ions_per_bunch - 1.0).abs() < 1e-9,
            "t = {}: {total} vs {}",
            r.times_s[ti],
            r.ions_per_bunch
        );
        assert!(r.lost_in_trap[ti] > 0.0 && r.decayed_in_trap[ti] > 0.0);
    }
    // Waiting upstream for 0.2 s: surviving share (1 − e^{−λT})/(λT).
    let x = std::f64::consts::LN_2 / 0.1691 * 0.2;
    let want = 2e5 * (1.0 - (1.0 - (-x).exp()) / x);
    assert!((r.decayed_before_injection / want - 1.0).abs() < 1e-12);
    // Efficiency is the extracted share of the injected ions, per charge state.
    let eff: f64 = r.efficiency().iter().sum();
    let (trapped, _, _) = r.balance(r.times_s.len() - 1);
    assert!((eff - trapped / r.ions_per_bunch).abs() < 1e-15);
    let per_s = r.extracted_per_s(0);
    assert!((per_s.iter().sum::<f64>() - trapped * 5.0).abs() < 1e-6 * trapped);
}

#[test]
fn daughters_enter_at_the_parent_charge_or_keep_the_electrons() {
    // No processes: the charge changes only by decay.
    let mut t = trap();
    t.processes = Processes::from_names::<&str>(&[]).unwrap();
    for (mode, offset) in [
        (DaughterCharge::Parent, 0),
        (DaughterCharge::ElectronsKept, 1),
    ] {
        let c = BreedingCycle::new(37, 97, Injection::PerBunch(1.0), 1.0, 1.0, 0.1, 5, mode, 2)
            .unwrap();
        let r = run_cycle(&t, &c, &[]).unwrap();
        // The result names the rule it used.
        assert_eq!(r.daughter_charge, mode);
        let sr = r.extracted_per_bunch(1);
        let populated: Vec<usize> = (0..sr.len()).filter(|&q| sr[q] > 0.0).collect();
        assert_eq!(populated, vec![5 + offset], "{mode:?}");
    }
    assert_eq!(
        DaughterCharge::parse("parent").unwrap(),
        DaughterCharge::Parent
    );
    assert!(DaughterCharge::parse("same").is_err());
}

#[test]
fn settings_are_checked_once() {
    let ok = |inj, cap, f, tb, q, max| {
        BreedingCycle::new(37, 97, inj, cap, f, tb, q, DaughterCharge::Parent, max)
    };
    assert!(ok(Injection::PerBunch(1.0), 1.0, 1.0, 1.0, 1, 8).is_ok());
    assert!(ok(Injection::PerBunch(0.0), 1.0, 1.0, 1.0, 1, 8).is_err());
    assert!(ok(Injection::PerSecond(f64::NAN), 1.0, 1.0, 1.0, 1, 8).is_err());
    assert!(ok(Injection::PerBunch(1.0), 0.0, 1.0, 1.0, 1, 8).is_err());
    assert!(ok(Injection::PerBunch(1.0), 1.5, 1.0, 1.0, 1, 8).is_err());
    assert!(ok(Injection::PerBunch(1.0), 1.0, 10.0, 0.2, 1, 8).is_err());
    assert!(ok(Injection::PerBunch(1.0), 1.0, 1.0, 1.0, 38, 8).is_err());
    assert!(ok(Injection::PerBunch(1.0), 1.0, 1.0, 1.0, 1, 0).is_err());
    assert!(BreedingCycle::new(
        37,
        300,
        Injection::PerBunch(1.0),
        1.0,
        1.0,
        1.0,
        1,
        DaughterCharge::Parent,
        8
    )
    .is_err());
    let c = ok(Injection::PerBunch(1.0), 1.0, 1.0, 0.5, 1, 8).unwrap();
    assert!(run_cycle(&trap(), &c, &[0.6]).is_err());
}
