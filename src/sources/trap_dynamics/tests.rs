use super::*;
use crate::atoms::element;
use crate::sources::electron_beam::ElectronBeam;

fn argon_trap() -> BeamTrap {
    let beam = ElectronBeam::with_radius(8000.0, 0.3, 70e-6).unwrap();
    BeamTrap::new(beam, 0.6, &[("H2".to_string(), 5e-9)], 50.0).unwrap()
}

#[test]
fn everything_off_is_the_fixed_model() {
    let trap = argon_trap();
    let mut dynamics = TrapDynamics::new(&trap, 100.0, 5e-3, &[]).unwrap();
    dynamics.switches = DynamicsSwitches::none();
    dynamics.rtol = 1e-12;
    let times: Vec<f64> = (0..40)
        .map(|k| 1e-5 * 10f64.powf(k as f64 * 0.15))
        .collect();
    let run = dynamics
        .evolve(&trap, &[("Ar".to_string(), 1e6)], &times)
        .unwrap();
    let fixed = trap.evolve(element("Ar").unwrap(), &times, 0).unwrap();
    let ar = run.species("Ar").unwrap();
    let f = ar.fractions();
    let worst = f
        .iter()
        .zip(fixed.iter())
        .map(|(a, b)| (a - b).abs())
        .fold(0.0, f64::max);
    assert!(worst < 1e-9, "largest difference {worst:e}");
    // Temperatures stay at the initial value.
    for (n, t) in ar.ions.iter().zip(ar.temperatures_ev.iter()) {
        if *n > 1e-3 {
            assert!((t - 50.0).abs() < 1e-6, "{t}");
        }
    }
}

/// Argon (18 charge states) with an optional nitrogen coolant: small enough for debug-build
/// test runs, with every process active.
fn argon_with_coolant(feed_pa: f64) -> (BeamTrap, TrapDynamics) {
    let beam = ElectronBeam::with_current_density(6_000.0, 0.2, 400.0).unwrap();
    let trap = BeamTrap::new(beam, 0.6, &[("H2".to_string(), 1e-8)], 1.0).unwrap();
    let feed: Vec<(String, f64)> = if feed_pa > 0.0 {
        vec![("N2".to_string(), feed_pa)]
    } else {
        Vec::new()
    };
    let dynamics = TrapDynamics::new(&trap, 200.0, 5e-3, &feed).unwrap();
    (trap, dynamics)
}

#[test]
fn bookkeeping_balances_with_every_process_on() {
    let (trap, mut dynamics) = argon_with_coolant(1e-8);
    dynamics.switches.ionization_heating = true;
    let times: Vec<f64> = (0..30)
        .map(|k| 1e-4 * 10f64.powf(k as f64 * 0.12))
        .collect();
    let run = dynamics
        .evolve(&trap, &[("Kr".to_string(), 1e7)], &times)
        .unwrap();
    let b = &run.bookkeeping;
    assert!(
        b.particle_balance < 1e-9,
        "particles {:e}",
        b.particle_balance
    );
    assert!(b.energy_balance < 1e-6, "energy {:e}", b.energy_balance);
    assert!(b.fed[times.len() - 1] > 0.0);
    assert!(b.escaped[times.len() - 1] > 0.0);
    let n = run.species("N").unwrap();
    assert!(n.ions.row(times.len() - 1).sum() > 0.0);
    // Temperatures are finite and positive; overlaps in (0, 1].
    for h in &run.species {
        assert!(h.temperatures_ev.iter().all(|t| t.is_finite() && *t > 0.0));
        assert!(h.overlap.iter().all(|o| *o > 0.0 && *o <= 1.0));
        assert!(h.ions.iter().all(|v| *v >= 0.0));
    }
}

#[test]
fn no_feed_means_no_coolant_ions() {
    let (trap, mut dynamics) = argon_with_coolant(0.0);
    // The residual H2 makes hydrogen ions by default, and no coolant element appears.
    let run = dynamics
        .evolve(&trap, &[("Ar".to_string(), 1e7)], &[1e-3, 1e-2])
        .unwrap();
    let labels: Vec<&str> = run.species.iter().map(|h| h.label.as_str()).collect();
    assert_eq!(labels, ["Ar", "H"]);
    // With residual gas as a charge-exchange target only, argon is alone.
    dynamics.switches.residual_gas_ions = false;
    let run = dynamics
        .evolve(&trap, &[("Ar".to_string(), 1e7)], &[1e-3, 1e-2])
        .unwrap();
    assert_eq!(run.species.len(), 1);
    assert!(run.species("N").is_none());
}

/// A trap with no residual gas, fed with `gas` only.
fn fed_trap(gas: &str, pressure_pa: f64, residual: &[(String, f64)]) -> (BeamTrap, TrapDynamics) {
    let beam = ElectronBeam::with_current_density(3_000.0, 0.1, 300.0).unwrap();
    let trap = BeamTrap::new(beam, 0.5, residual, 10.0).unwrap();
    let dynamics =
        TrapDynamics::new(&trap, 100.0, 5e-3, &[(gas.to_string(), pressure_pa)]).unwrap();
    (trap, dynamics)
}

#[test]
fn a_nitrogen_feed_makes_atomic_nitrogen_ions_and_balances() {
    let (trap, dynamics) = fed_trap("N2", 1e-8, &[]);
    let times = [1e-4, 1e-3, 1e-2, 5e-2];
    let run = dynamics.evolve(&trap, &[], &times).unwrap();
    // N2 is fed as a molecule: its ions are atomic nitrogen, no species named "N2".
    let labels: Vec<&str> = run.species.iter().map(|h| h.label.as_str()).collect();
    assert_eq!(labels, ["N"]);
    let n = run.species("N").unwrap();
    assert_eq!(n.z, 7);
    assert!(n.ions.row(times.len() - 1).iter().skip(1).sum::<f64>() > 0.0);
    // Ions fed per second = molecules ionized per second, n V (j/e) σ_additivity with
    // σ_additivity = 2 σ_N (Otvos & Stevenson 1956; the neutral N Lotz cross section);
    // n = p/(k_B T), CODATA k_B; N2's pattern (data/fragments.csv) has N⁺ as its only
    // atomic ion, so every ionization gives one N⁺.
    let beam = &trap.beam;
    let sigma_n = crate::processes::ion_lotz::ionization_cross_sections_cm2(
        element("N").unwrap(),
        0,
        &[beam.energy_ev],
        None,
    )
    .unwrap()[0];
    let n_cm3 = 1e-8 / (1.380649e-23 * trap.gas_temperature_k) * 1e-6;
    let v_cm3 = std::f64::consts::PI * (beam.radius_m * 100.0).powi(2) * trap.length_m * 100.0;
    let expected = n_cm3 * v_cm3 * beam.electron_flux_per_cm2_s() * 2.0 * sigma_n;
    let system = dynamics.system(&trap, &[]).unwrap();
    let fed: f64 = system.species[0].feed_per_s.iter().sum();
    assert!(
        (fed / expected - 1.0).abs() < 1e-12,
        "{fed:e} vs {expected:e}"
    );
    assert_eq!(system.species[0].feed_per_s[1], fed);
    // Bookkeeping, the molecular feed included: injected − escaped − trapped to 1e-9.
    let b = &run.bookkeeping;
    assert!(b.particle_balance < 1e-9, "{:e}", b.particle_balance);
    assert!((b.fed[0] / times[0] / fed - 1.0).abs() < 1e-6);
}

#[test]
fn fragment_shares_follow_the_bundled_pattern_and_residual_gas_is_a_source() {
    // CO in data/fragments.csv (NIST Chemistry WebBook EI spectrum, from memory):
    // C⁺ 4.5, O⁺ 1.7; the run's C and O feeds keep that ratio.
    let (trap, mut dynamics) = fed_trap("CO", 1e-8, &[("CO2".to_string(), 2e-9)]);
    dynamics.switches.residual_gas_ions = false;
    let system = dynamics.system(&trap, &[]).unwrap();
    let feed = |label: &str| -> f64 {
        system
            .species
            .iter()
            .find(|s| s.label == label)
            .map_or(0.0, |s| s.feed_per_s.iter().sum())
    };
    assert!((feed("C") / feed("O") - 4.5 / 1.7).abs() < 1e-12);
    // The residual CO2 (CO2: C⁺ 6, O⁺ 9) adds its ions by default, at its own pattern.
    dynamics.switches.residual_gas_ions = true;
    let with = dynamics.system(&trap, &[]).unwrap();
    let feed2 = |label: &str| -> f64 {
        with.species
            .iter()
            .find(|s| s.label == label)
            .map_or(0.0, |s| s.feed_per_s.iter().sum())
    };
    let (dc, d_o) = (feed2("C") - feed("C"), feed2("O") - feed("O"));
    assert!(
        dc > 0.0 && (dc / d_o - 6.0 / 9.0).abs() < 1e-9,
        "{dc:e} {d_o:e}"
    );
    // Only residual gas, no load and no feed: still a run, of the gas's own ions.
    let (trap, mut dynamics) = fed_trap("CO", 0.0, &[("H2".to_string(), 1e-8)]);
    dynamics.gas_feed.clear();
    let run = dynamics.evolve(&trap, &[], &[1e-3, 1e-2]).unwrap();
    assert_eq!(run.species.len(), 1);
    assert_eq!(run.species[0].label, "H");
    assert!(run.species[0].ions[[1, 1]] > 0.0);
}

#[test]
fn bad_settings_are_errors() {
    let trap = argon_trap();
    assert!(TrapDynamics::new(&trap, -1.0, 5e-3, &[]).is_err());
    assert!(TrapDynamics::new(&trap, 100.0, 10e-6, &[]).is_err());
    assert!(TrapDynamics::new(&trap, 100.0, 5e-3, &[("Xx".to_string(), 1e-8)]).is_err());
    let mut d = TrapDynamics::new(&trap, 100.0, 5e-3, &[]).unwrap();
    d.switches.residual_gas_ions = false;
    assert!(d.evolve(&trap, &[], &[1.0]).is_err());
    assert!(d
        .evolve(
            &trap,
            &[("Ar".to_string(), 1.0), ("Ar".to_string(), 2.0)],
            &[1.0]
        )
        .is_err());
}

#[test]
fn cheap_jacobian_equals_the_plain_forward_difference() {
    use crate::solve::stiff::{forward_difference_jacobian, StiffSystem};
    // With the compensation fixed: with space charge the plain difference loses the
    // compensation's dependence on small populations (a step of 1e-12 ions changes c by
    // less than its round-off), which the split form keeps.
    let (trap, mut dynamics) = argon_with_coolant(1e-8);
    dynamics.switches.space_charge = false;
    let system = dynamics.system(&trap, &[("Ar".to_string(), 1e7)]).unwrap();
    let tol = system.tolerances(1e-8);
    // A state part-way through the evolution, every process active.
    let y = crate::solve::stiff::integrate_stiff(&system, &system.initial_state(), &[3e-3], &tol)
        .unwrap()
        .row(0)
        .to_vec();
    let n = system.dim();
    let mut fast = ndarray::Array2::zeros((n, n));
    let mut plain = ndarray::Array2::zeros((n, n));
    system.jacobian(&y, &tol.atol, &mut fast);
    forward_difference_jacobian(&system, &y, &tol.atol, &mut plain);
    // Compare column by column against the column's size (both are differences with the
    // same steps; the rows of the conserved totals are rewritten in `fast` only).
    let rows = n - super::system::TOTALS;
    // Columns of well-resolved populations only: for tiny ones both differences are
    // dominated by round-off (ε·|f|/h with h ∝ atol).
    let mut checked = 0;
    for j in (0..rows).filter(|&j| y[j].abs() >= 1e-4 * system.scale) {
        checked += 1;
        let size = (0..rows).map(|i| plain[[i, j]].abs()).fold(0.0, f64::max);
        for i in 0..rows {
            let diff = (fast[[i, j]] - plain[[i, j]]).abs();
            assert!(
                diff <= 1e-5 * size + 1e-12,
                "J[{i},{j}] {} vs {}",
                fast[[i, j]],
                plain[[i, j]]
            );
        }
    }
    assert!(checked >= 10, "{checked} columns checked");
}

/// A 6 keV, 1000 A/cm² trap with residual hydrogen and a nitrogen feed, nothing loaded: the
/// everyday fed trap. Its nearly empty neutral populations (made by charge exchange, lost at
/// once) once carried energy at the regularised temperature: nitrogen's neutral U drifted
/// below zero and hydrogen's grew for ever, so the state never settled and Newton's matrix
/// was singular. Now the energy moved is the rate times U.
#[test]
fn a_fed_trap_settles_and_every_state_stays_non_negative() {
    let beam = ElectronBeam::with_current_density(6_000.0, 0.3, 1_000.0).unwrap();
    let trap = BeamTrap::builder(beam, 0.6)
        .residual_gas_pa(vec![("H2".into(), 1e-9)])
        .model("dynamic")
        .axial_barrier_v(200.0)
        .gas_feed_pa(vec![("N2".into(), 1e-8)])
        .build()
        .unwrap();
    let dynamics = trap.model.dynamics().unwrap();
    let system = dynamics.system(&trap, &[]).unwrap();
    let tol = system.tolerances(dynamics.rtol);
    let times = [1.0, 10.0, 100.0, 1e3];
    let y = crate::solve::stiff::integrate_stiff(&system, &system.initial_state(), &times, &tol)
        .unwrap();
    let m = system.dim - super::system::TOTALS;
    for row in y.rows() {
        for (i, v) in row.iter().take(m).enumerate() {
            assert!(*v >= -tol.atol[i], "component {i}: {v:e}");
        }
    }
    // Settled: the last two decades agree.
    let (a, b) = (y.row(2), y.row(3));
    let worst = (0..m)
        .map(|i| (a[i] - b[i]).abs() / (system.scale + a[i].abs()))
        .fold(0.0, f64::max);
    assert!(worst < 1e-8, "{worst:e}");
    let steady = trap.steady_state_dynamic(&[]).unwrap();
    assert_eq!(steady.steady_method, Some(SteadyMethod::Newton));
    for label in ["N", "H"] {
        let ours = steady.species(label).unwrap().ions.row(0).to_owned();
        let k = system
            .species
            .iter()
            .position(|s| s.label == label)
            .unwrap();
        let theirs: Vec<f64> = (0..=system.species[k].z)
            .map(|q| b[system.n_index(k, q)].max(0.0))
            .collect();
        let total: f64 = theirs.iter().sum();
        let worst = ours
            .iter()
            .zip(&theirs)
            .map(|(x, y)| (x - y).abs())
            .fold(0.0, f64::max);
        assert!(worst / total < 1e-6, "{label}: {:e}", worst / total);
    }
}

/// A trap that keeps the stiff solver at short steps (heavy feed, rich residual gas) is
/// refused once the search's step budget is spent, instead of running for half an hour.
#[test]
fn a_steady_state_search_stops_at_its_step_budget() {
    let beam = ElectronBeam::with_current_density(20_000.0, 0.3, 100.0).unwrap();
    let trap = BeamTrap::builder(beam, 0.6)
        .residual_gas_pa(vec![("H2".into(), 1e-8), ("CO".into(), 1e-9)])
        .model("dynamic")
        .axial_barrier_v(200.0)
        .gas_feed_pa(vec![("Kr".into(), 1e-9), ("N2".into(), 1e-8)])
        .build()
        .unwrap();
    let dynamics = trap.model.dynamics().unwrap();
    let err = dynamics.steady_state_within(&trap, &[], 200).unwrap_err();
    let msg = err.to_string();
    assert!(msg.contains("after 200 solver steps"), "{msg}");
}
