//! Multi-electron relaxation (shake-off, double Auger) and direct triple ionization:
//! published charge spectra, energy bounds, and the switch that restores the one-electron
//! model.

use chargecast::atoms::{all_elements, element, Subshell};
use chargecast::processes::relaxation::{
    mean_extra_charge, vacancy_relaxation, vacancy_relaxation_with, Relaxation,
};
use chargecast::sources::electron_impact::{appearance_curves_with, ElectronImpactSource};
use proptest::prelude::*;

const K: Subshell = Subshell::new(1, 0);

fn close(a: &[f64], b: &[f64], tol: f64) -> bool {
    a.len() == b.len() && a.iter().zip(b).all(|(x, y)| (x - y).abs() <= tol)
}

#[test]
fn switched_off_the_results_are_the_one_electron_model_to_1e_12() {
    // Values computed with the project's previous model (commit 082f171, before shake-off,
    // double Auger and triple ionization existed), through its Python bindings.
    let cases: [(&str, u32, Subshell, &[f64]); 4] = [
        (
            "Ar",
            0,
            K,
            &[
                0.006505816617886934,
                0.10632404806301007,
                0.08916712602368101,
                0.4190349515580866,
                0.34413591007981537,
                0.034832147657519894,
            ],
        ),
        ("Xe", 0, Subshell::new(4, 2), &[6.3e-05, 0.9999370000000001]),
        (
            "Kr",
            3,
            Subshell::new(2, 1),
            &[
                0.0007836191872626993,
                0.029183209323599756,
                0.5911854197848392,
                0.3788477517042983,
            ],
        ),
        ("Ne", 0, K, &[0.016, 0.984]),
    ];
    for (symbol, q, s, before) in cases {
        let ion = element(symbol).unwrap().ion(i64::from(q)).unwrap();
        for energy in [f64::INFINITY, 2.0e4] {
            let p = vacancy_relaxation_with(&ion, s, Relaxation::SINGLE_ELECTRON, energy).unwrap();
            assert!(close(&p, before, 1e-12), "{symbol}{q}+ {s:?}: {p:?}");
        }
    }
    // The single-collision source, charges 1…6 (same commit, appearance_curves).
    let before: [(&str, f64, [f64; 6]); 3] = [
        (
            "Kr",
            150.0,
            [
                3.4195877966738095e-16,
                5.174360795960992e-17,
                0.0,
                0.0,
                0.0,
                0.0,
            ],
        ),
        (
            "Kr",
            2000.0,
            [
                5.487049778193528e-17,
                1.3811806709478109e-17,
                1.4420684703113646e-18,
                2.353652784293669e-19,
                1.0215674386376433e-20,
                1.1692298679716849e-21,
            ],
        ),
        (
            "Xe",
            150.0,
            [
                4.21162117387535e-16,
                1.0608169266987832e-16,
                9.370550369642377e-20,
                2.411244107648962e-19,
                0.0,
                0.0,
            ],
        ),
    ];
    for (symbol, e, expected) in before {
        let el = element(symbol).unwrap();
        let m = appearance_curves_with(el, &[e], 0.0, Relaxation::SINGLE_ELECTRON).unwrap();
        for (c, want) in expected.iter().enumerate() {
            let got = m[[0, c + 1]];
            assert!(
                (got - want).abs() <= 1e-12 * want.abs().max(1e-30),
                "{symbol} {e} eV {}+: {got:e} vs {want:e}",
                c + 1
            );
        }
    }
}

#[test]
fn neon_k_hole_charge_spectrum() {
    // Ne after K-shell photoionization: Ne2+ about 73 %, Ne3+ about 22 %, Ne4+ a few %
    // (T. A. Carlson, W. E. Hunt and M. O. Krause, Phys. Rev. 151, 41 (1966), values from
    // memory, ±3 % absolute; the issue quotes 20–25 % Ne3+). Asked: Ne3+ 15–30 %, Ne2+
    // 65–85 %.
    let ne = element("Ne").unwrap().ion(0).unwrap();
    let p = vacancy_relaxation(&ne, K).unwrap();
    assert!((0.15..=0.30).contains(&p[2]), "{p:?}");
    assert!((0.65..=0.85).contains(&p[1]), "{p:?}");
    let single =
        vacancy_relaxation_with(&ne, K, Relaxation::SINGLE_ELECTRON, f64::INFINITY).unwrap();
    assert!(
        single.len() == 2,
        "the one-electron model stops at Ne2+: {single:?}"
    );
}

#[test]
fn xenon_4d_hole_charge_spectrum() {
    // A Xe 4d hole: Xe2+ about 80 %, Xe3+ about 20 % (V. Schmidt, Rep. Prog. Phys. 55, 1483
    // (1992) review of Xe 4d Auger decay incl. double Auger; from memory, ±5 % absolute).
    // Asked: Xe3+ 12–30 %.
    let xe = element("Xe").unwrap().ion(0).unwrap();
    let p = vacancy_relaxation(&xe, Subshell::new(4, 2)).unwrap();
    assert!((0.12..=0.30).contains(&p[2]), "{p:?}");
    assert!(p[1] > 0.65, "{p:?}");
}

#[test]
fn argon_k_and_l_hole_spectra() {
    // Ar K hole: 4+ most probable, mean about 4.2; Ar 2p hole: Ar2+ about 70 %, Ar3+ about
    // 25 % (T. A. Carlson and M. O. Krause, Phys. Rev. 137, A1655 (1965); from memory).
    // Asked: K-hole mean 4.2 ± 0.5; 2p hole Ar3+ 12–35 %.
    let ar = element("Ar").unwrap().ion(0).unwrap();
    let k = vacancy_relaxation(&ar, K).unwrap();
    let mean = 1.0 + mean_extra_charge(&k);
    assert!((mean - 4.2).abs() <= 0.5, "{mean} {k:?}");
    let l = vacancy_relaxation(&ar, Subshell::new(2, 1)).unwrap();
    assert!((0.12..=0.35).contains(&l[2]), "{l:?}");
}

#[test]
fn shake_off_needs_the_energy_of_the_two_hole_state() {
    // Just above the Ne K edge (870.2 eV, Elam et al. 2002 via xraydb) there is no energy to
    // shake off a 2p electron as well; far above it the sudden limit holds.
    let ne = element("Ne").unwrap().ion(0).unwrap();
    let near = vacancy_relaxation_with(&ne, K, Relaxation::default(), 875.0).unwrap();
    let far = vacancy_relaxation_with(&ne, K, Relaxation::default(), 1.0e5).unwrap();
    let sudden = vacancy_relaxation(&ne, K).unwrap();
    assert!(
        near[2] < far[2] && far[2] <= sudden[2] + 1e-15,
        "{near:?} {far:?}"
    );
}

#[test]
fn triple_ionization_onsets_in_one_collision() {
    // Onsets: Xe3+ 64.2 eV and Ar3+ 84.1 eV, sums of the NIST ASD ionization energies
    // (measured appearance: Xe3+ about 65–70 eV, Ar3+ at 84 eV threshold).
    for (symbol, onset) in [("Xe", 64.16), ("Ar", 84.13)] {
        let el = element(symbol).unwrap();
        let below = ElectronImpactSource::new(onset - 0.5, 0.0)
            .unwrap()
            .charge_yields(el)
            .unwrap();
        let above = ElectronImpactSource::new(onset + 5.0, 0.0)
            .unwrap()
            .charge_yields(el)
            .unwrap();
        assert_eq!(below[3], 0.0, "{symbol}");
        assert!(above[3] > 0.0, "{symbol}");
        let off = ElectronImpactSource::new(onset + 5.0, 0.0)
            .unwrap()
            .with_relaxation(Relaxation::SINGLE_ELECTRON)
            .charge_yields(el)
            .unwrap();
        assert_eq!(off[3], 0.0, "{symbol} without the multi-electron channels");
    }
    // Ar3+ at 200 eV, measured about 1e-18 cm² (Straub et al. 1995, from memory): within a
    // factor of 4.
    let ar = element("Ar").unwrap();
    let s = ElectronImpactSource::new(200.0, 0.0)
        .unwrap()
        .cross_sections(ar)
        .unwrap();
    let ar3 = s.total_cm2()[3];
    assert!(ar3 > 0.25e-18 && ar3 < 4e-18, "{ar3:e}");
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 32, .. ProptestConfig::default() })]

    #[test]
    fn multi_electron_relaxation_conserves_probability_and_energy(
        z in 2u32..=60, q_frac in 0.0f64..0.999, pick in 0usize..8, excess in 0.0f64..3.0
    ) {
        let el = &all_elements().unwrap()[(z - 1) as usize];
        let q = (q_frac * f64::from(z)) as u32;
        let ion = el.ion(i64::from(q)).unwrap();
        let shells = ion.subshells();
        let s = shells[pick % shells.len()];
        // The incoming particle carries between 1 and 4 times the hole's binding energy.
        let energy = s.binding_ev * (1.0 + excess);
        let p = vacancy_relaxation_with(&ion, s.subshell, Relaxation::default(), energy).unwrap();
        let total: f64 = p.iter().sum();
        prop_assert!((total - 1.0).abs() < 1e-12, "sum {}", total);
        prop_assert!(p.iter().all(|x| *x >= 0.0));
        let ies = el.ionization_energies_ev();
        for (k, x) in p.iter().enumerate() {
            if *x > 0.0 {
                // Final charge q+1+k costs no more than the particle brought.
                let spent: f64 = ies[q as usize..=q as usize + k].iter().sum();
                prop_assert!(spent <= energy + 1e-6, "k={} spends {} > {}", k, spent, energy);
            }
        }
    }
}
