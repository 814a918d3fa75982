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
    let (trap, dynamics) = argon_with_coolant(0.0);
    let run = dynamics
        .evolve(&trap, &[("Ar".to_string(), 1e7)], &[1e-3, 1e-2])
        .unwrap();
    assert_eq!(run.species.len(), 1);
    assert!(run.species("N").is_none());
}

#[test]
fn bad_settings_are_errors() {
    let trap = argon_trap();
    assert!(TrapDynamics::new(&trap, -1.0, 5e-3, &[]).is_err());
    assert!(TrapDynamics::new(&trap, 100.0, 10e-6, &[]).is_err());
    assert!(TrapDynamics::new(&trap, 100.0, 5e-3, &[("Xx".to_string(), 1e-8)]).is_err());
    let d = TrapDynamics::new(&trap, 100.0, 5e-3, &[]).unwrap();
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
