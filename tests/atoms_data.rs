//! Integration checks of the embedded atomic data and the ion model.

use chargecast::atoms::{element_by_z, Subshell};

#[test]
fn successive_ionization_energies_strictly_increase() {
    // A property of every atom: removing the next electron from a more positive ion costs more
    // (common practice; holds for every chain of the NIST ASD tables).
    for z in 1..=103 {
        let e = element_by_z(z).unwrap();
        for (q, w) in e.ionization_energies_ev().windows(2).enumerate() {
            assert!(
                w[1] > w[0],
                "{} step {}: {} then {}",
                e.symbol(),
                q,
                w[0],
                w[1]
            );
        }
    }
}

#[test]
fn breaking_into_a_noble_gas_core_more_than_doubles_the_cost() {
    // Common practice: the step after a noble-gas configuration is reached jumps by more than 2×.
    let noble_electrons = [2u32, 10, 18];
    for z in 3..=20u32 {
        let e = element_by_z(z as i64).unwrap();
        let ies = e.ionization_energies_ev();
        for q in 1..z as usize {
            let electrons_left = z - q as u32;
            if noble_electrons.contains(&electrons_left) {
                let ratio = ies[q] / ies[q - 1];
                assert!(ratio > 2.0, "{} q={}: ratio {}", e.symbol(), q, ratio);
            }
        }
    }
}

#[test]
fn binding_energies_never_decrease_with_charge() {
    // The binding-energy rule of chargecast::atoms::binding; checked while planning over
    // Z = 1–98, here over every complete chain.
    for z in 1..=103 {
        let e = element_by_z(z).unwrap();
        for q in 1..z {
            let prev = e.ion(q - 1).unwrap();
            let ion = e.ion(q).unwrap();
            for s in ion.subshells() {
                if let Some(b_prev) = prev.binding_ev(s.subshell) {
                    assert!(
                        s.binding_ev >= b_prev * (1.0 - 1e-12),
                        "{} {} {}: {} < {}",
                        e.symbol(),
                        q,
                        s.subshell,
                        s.binding_ev,
                        b_prev
                    );
                }
            }
        }
    }
}

#[test]
fn neutral_bindings_are_edges_or_first_ionization_energy() {
    // At q = 0 the rule is exact by construction: max(edge, IE0) (Elam et al. 2002 edges).
    let fe = element_by_z(26).unwrap();
    let ion = fe.ion(0).unwrap();
    let ie0 = fe.ionization_energies_ev()[0];
    assert_eq!(ion.binding_ev(Subshell::new(3, 2)), Some(ie0)); // edge 2 eV < IE0
    assert_eq!(ion.binding_ev(Subshell::new(1, 0)), Some(7112.0)); // xraydb K edge (Elam 2002)
}

#[test]
fn no_subshell_is_bound_less_than_the_ionization_energy() {
    // IE_q is the least energy that removes any electron of ion q (definition).
    for z in 1..=103 {
        let e = element_by_z(z).unwrap();
        for q in 0..z {
            let ion = e.ion(q).unwrap();
            let ie = ion.ionization_energy_ev().unwrap();
            for s in ion.subshells() {
                assert!(
                    s.binding_ev >= ie,
                    "{} {} {}: {} < {}",
                    e.symbol(),
                    q,
                    s.subshell,
                    s.binding_ev,
                    ie
                );
            }
        }
    }
}
