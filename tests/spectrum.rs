//! Integration checks of the spectrum layer: known A/q coincidences, a krypton source with
//! residual gas, and random inputs that must give errors rather than panics.

use chargecast::atoms::element;
use chargecast::constants::{ATOMIC_MASS_UNIT_EV, ELECTRON_MASS_U};
use chargecast::spectrum::{
    aq_lines, clean_charge_states, ion_mass_u, overlaps, resolve_isotope, AcceptanceWindow,
    OverlapSettings, PeakShape, Peaks, SpeciesInput,
};
use proptest::prelude::*;

fn species(spec: &str, amount: f64, charges: &[(usize, f64)], residual: bool) -> SpeciesInput {
    let z = element(spec.trim_start_matches(char::is_numeric))
        .unwrap()
        .z() as usize;
    let mut fractions = vec![0.0; z + 1];
    for &(q, f) in charges {
        fractions[q] = f;
    }
    SpeciesInput {
        spec: spec.into(),
        amount,
        fractions,
        residual,
    }
}

/// m/q written out: atomic mass − q m_e + (first q ionization energies)/c², over q.
fn m_over_q_by_hand(symbol: &str, mass_number: u32, charge: usize) -> f64 {
    let el = element(symbol).unwrap();
    let atom = el.isotope(mass_number).unwrap().mass_u;
    let binding: f64 = el.ionization_energies_ev()[..charge].iter().sum();
    (atom - charge as f64 * ELECTRON_MASS_U + binding / ATOMIC_MASS_UNIT_EV) / charge as f64
}

#[test]
fn argon_2_plus_falls_on_neon_plus() {
    // 40Ar2+ and 20Ne+ near m/q 20 (common practice).
    let lines = aq_lines(&[
        species("20Ne", 1.0, &[(1, 1.0)], false),
        species("40Ar", 1.0, &[(2, 1.0)], false),
    ])
    .unwrap();
    let target = resolve_isotope("20Ne").unwrap();
    let settings = OverlapSettings::new(500.0, PeakShape::Gaussian, 1.0, 3.0).unwrap();
    let report = overlaps(&lines, target, 1, &settings).unwrap();
    let ne = m_over_q_by_hand("Ne", 20, 1);
    let ar = m_over_q_by_hand("Ar", 40, 2);
    let needed = ne / (ne - ar).abs();
    assert_eq!(report.interferences.len(), 1);
    let hit = &report.interferences[0];
    assert_eq!(hit.line.label(), "40Ar2+");
    assert!((hit.resolving_power_needed / needed - 1.0).abs() < 1e-12);
    assert!((1700.0..1850.0).contains(&needed), "{needed}");
    assert!((report.target.m_over_q - ne).abs() < 1e-12);
}

#[test]
fn oxygen_4_plus_helium_plus_and_carbon_3_plus_share_a_over_q_4() {
    // 16O4+, 4He+ and 12C3+ at A/q 4 (common practice).
    let lines = aq_lines(&[
        species("16O", 1.0, &[(4, 1.0)], false),
        species("4He", 1.0, &[(1, 1.0)], true),
        species("12C", 1.0, &[(3, 1.0)], true),
    ])
    .unwrap();
    assert!(lines.lines().iter().all(|l| l.a_over_q == 4.0));
    let o = m_over_q_by_hand("O", 16, 4);
    let settings = OverlapSettings::new(300.0, PeakShape::Gaussian, 1.0, 3.0).unwrap();
    let report = overlaps(&lines, resolve_isotope("16O").unwrap(), 4, &settings).unwrap();
    for (label, symbol, a, q) in [("4He1+", "He", 4, 1), ("12C3+", "C", 12, 3)] {
        let hit = report
            .interferences
            .iter()
            .find(|i| i.line.label() == label)
            .unwrap();
        let needed = o / (o - m_over_q_by_hand(symbol, a, q)).abs();
        assert!(
            (hit.resolving_power_needed / needed - 1.0).abs() < 1e-12,
            "{label}"
        );
        assert!(hit.line.residual);
    }
    // Both interferers sit well inside one FWHM at R = 300: the window is far from pure.
    assert!(report.purity < 0.5, "{}", report.purity);
}

#[test]
fn krypton_source_with_residual_gas_ranks_charge_states() {
    // An invented run: natural krypton bred to 24+…28+, residual N, O, Ar spread over 1+…3+.
    let mut inputs = vec![species(
        "Kr",
        1.0,
        &[(24, 0.15), (25, 0.25), (26, 0.3), (27, 0.2), (28, 0.1)],
        false,
    )];
    for gas in ["N", "O", "Ar"] {
        inputs.push(species(
            gas,
            0.5,
            &[(1, 1.0 / 3.0), (2, 1.0 / 3.0), (3, 1.0 / 3.0)],
            true,
        ));
    }
    let lines = aq_lines(&inputs).unwrap();
    assert!(lines
        .lines()
        .windows(2)
        .all(|w| w[0].m_over_q <= w[1].m_over_q));
    let kr84 = resolve_isotope("84Kr").unwrap();
    let peaks = Peaks::new(150.0, PeakShape::Gaussian).unwrap();
    let ranks =
        clean_charge_states(&lines, kr84, AcceptanceWindow::Fwhm(1.0), Some(peaks)).unwrap();
    assert_eq!(ranks.len(), 5);
    let total: f64 = ranks.iter().map(|r| r.fraction).sum();
    assert!((total - 1.0).abs() < 1e-12);
    for r in &ranks {
        assert!(r.purity > 0.0 && r.purity <= 1.0);
        assert!((r.score - r.fraction * r.purity).abs() < 1e-15);
    }
    assert!(ranks.windows(2).all(|w| w[0].score >= w[1].score));
    // The neighbouring krypton isotopes at the same charge crowd each window at R = 150.
    let worst = ranks.iter().find(|r| r.line.charge == 26).unwrap();
    let contaminant = worst.main_contaminant.as_ref().unwrap();
    assert_eq!(contaminant.z, 36);
}

#[test]
fn ion_masses_follow_the_formula() {
    let kr84 = resolve_isotope("Kr-84").unwrap();
    let direct = m_over_q_by_hand("Kr", 84, 26) * 26.0;
    assert!((ion_mass_u(kr84, 26).unwrap() - direct).abs() < 1e-12);
}

proptest! {
    #[test]
    fn random_inputs_give_errors_not_panics(
        spec in prop::sample::select(vec!["Kr", "84Kr", "Ne", "H", "Tc", "Xx", "", "Kr-", "U", "238U"]),
        amount in prop::num::f64::ANY,
        fractions in prop::collection::vec(prop::num::f64::ANY, 0..95),
        charge in -3i64..100,
        r in prop::num::f64::ANY,
        window in prop::num::f64::ANY,
        search in prop::num::f64::ANY,
        shape in prop::sample::select(vec![PeakShape::Gaussian, PeakShape::Triangular, PeakShape::Rectangular]),
    ) {
        let input = SpeciesInput { spec: spec.into(), amount, fractions, residual: false };
        if let Ok(lines) = aq_lines(&[input]) {
            if let (Ok(settings), Ok(iso)) = (OverlapSettings::new(r, shape, window, search), resolve_isotope(spec)) {
                if let Ok(report) = overlaps(&lines, iso, charge, &settings) {
                    prop_assert!((0.0..=1.0).contains(&report.purity));
                }
            }
            if let Ok(iso) = resolve_isotope(spec) {
                let peaks = Peaks::new(r, shape).ok();
                let _ = clean_charge_states(&lines, iso, AcceptanceWindow::Relative(window), peaks);
                let _ = clean_charge_states(&lines, iso, AcceptanceWindow::Fwhm(window), peaks);
            }
        }
    }
}
