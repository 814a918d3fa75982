//! Photoionization below 100 eV of the elements without Verner fits, from the embedded
//! Henke, Gullikson & Davis (1993) neutral totals: measured values, thresholds and continuity
//! into the Elam table.

use chargecast::atoms::element;
use chargecast::processes::henke::{henke_elements, JOIN_END_EV, JOIN_START_EV};
use chargecast::processes::photoionization::{
    photoionization_cross_section_cm2, subshell_cross_sections_cm2, PhotoModel,
};

const MB: f64 = 1e-18;
/// Rydberg energy, fine-structure constant and Bohr radius, CODATA 2018 (scipy.constants).
const RY_EV: f64 = 13.605_693_122_994;
const ALPHA: f64 = 7.297_352_569_3e-3;
const A0_CM: f64 = 5.291_772_109_03e-9;

#[test]
fn xenon_against_measured_totals() {
    // Measured photoabsorption of Xe gas (from memory): about 35 Mb at 20 eV (Marr & West
    // 1976), about 2 Mb in the minimum before the 4d onset at 50 eV and about 26 Mb at the
    // 4d giant resonance near 100 eV (West & Morton 1978). The hydrogenic model gave 2.4 and
    // 3.8 Mb at 20 and 100 eV. Asked within 30 % at 20 and 100 eV, a factor 2 at 50 eV
    // (the value recalled least well).
    let xe = element("Xe").unwrap().ion(0).unwrap();
    for (e, measured, tolerance) in [(20.0, 35.0, 0.3), (50.0, 2.0, 1.0), (100.0, 26.0, 0.3)] {
        let ours = photoionization_cross_section_cm2(&xe, e).unwrap() / MB;
        let ratio = ours / measured;
        assert!(
            ratio > 1.0 / (1.0 + tolerance) && ratio < 1.0 + tolerance,
            "Xe {e} eV: {ours} Mb vs {measured} Mb"
        );
    }
    // Just above threshold (5p₃/₂ at 12.13 eV; NIST via mendeleev) measured about 45 Mb
    // (Marr & West 1976, from memory) at 1.05 × threshold; the hydrogenic model gave 0.24 ×.
    let ie = xe.ionization_energy_ev().unwrap();
    let ours = photoionization_cross_section_cm2(&xe, 1.05 * ie).unwrap() / MB;
    assert!((ours / 45.0 - 1.0).abs() < 0.3, "Xe at 1.05 IE: {ours} Mb");
}

#[test]
fn krypton_near_threshold_against_measured() {
    // Kr gas between the 4p thresholds and 20 eV: about 35–40 Mb (Marr & West 1976, from
    // memory); asked within 30 % of 37 Mb at 15 and 20 eV.
    let kr = element("Kr").unwrap().ion(0).unwrap();
    for e in [15.0, 20.0] {
        let ours = photoionization_cross_section_cm2(&kr, e).unwrap() / MB;
        assert!((ours / 37.0 - 1.0).abs() < 0.3, "Kr {e} eV: {ours} Mb");
    }
}

#[test]
fn zero_below_the_first_ionization_energy_and_positive_above() {
    for z in henke_elements().unwrap() {
        let el = chargecast::atoms::element_by_z(i64::from(z)).unwrap();
        for q in [0, 1, 3] {
            let ion = el.ion(q).unwrap();
            let ie = ion.ionization_energy_ev().unwrap();
            let below = photoionization_cross_section_cm2(&ion, 0.999 * ie).unwrap();
            let above = photoionization_cross_section_cm2(&ion, 1.001 * ie).unwrap();
            assert_eq!(below, 0.0, "Z={z} q={q}");
            assert!(above > 0.0, "Z={z} q={q}");
        }
    }
}

#[test]
fn continuous_where_the_tables_join() {
    // Henke below 100 eV, the blend over 100–200 eV, Elam above: no step at either end.
    for z in henke_elements().unwrap() {
        let ion = chargecast::atoms::element_by_z(i64::from(z))
            .unwrap()
            .ion(0)
            .unwrap();
        for e in [JOIN_START_EV, JOIN_END_EV] {
            let lo = photoionization_cross_section_cm2(&ion, e * (1.0 - 1e-9)).unwrap();
            let hi = photoionization_cross_section_cm2(&ion, e * (1.0 + 1e-9)).unwrap();
            assert!(
                (hi / lo - 1.0).abs() < 1e-6,
                "Z={z} at {e} eV: {lo:e} {hi:e}"
            );
        }
    }
}

#[test]
fn the_table_serves_the_neutral_atom_and_its_ions_below_100_ev() {
    let xe = element("Xe").unwrap();
    for q in [0, 1, 5] {
        let ion = xe.ion(q).unwrap();
        let e = 1.2 * ion.ionization_energy_ev().unwrap();
        let parts = subshell_cross_sections_cm2(&ion, e).unwrap();
        let outer = parts
            .iter()
            .min_by(|a, b| a.binding_ev.total_cmp(&b.binding_ev))
            .unwrap();
        assert_eq!(outer.model, PhotoModel::Tabulated, "Xe{q}+");
    }
    // Argon keeps its Verner fit below 100 eV.
    let ar = element("Ar").unwrap().ion(0).unwrap();
    let parts = subshell_cross_sections_cm2(&ar, 30.0).unwrap();
    assert!(parts.iter().any(|p| p.model == PhotoModel::Verner));
    assert!(parts.iter().all(|p| p.model != PhotoModel::Tabulated));
}

#[test]
fn one_electron_ions_of_these_elements_stay_exact() {
    // H-like ions: the blend weight q/(Z − 1) is 1, so the exact hydrogenic threshold value
    // remains, (2⁹π²/3e⁴)·α·a₀²·Ry/B with the NIST binding B (Stobbe 1930; Bethe & Salpeter
    // 1957).
    let sigma0 =
        2f64.powi(9) * std::f64::consts::PI.powi(2) / 3.0 * (-4.0f64).exp() * ALPHA * A0_CM * A0_CM;
    for symbol in ["P", "Cu", "Kr", "Xe"] {
        let el = element(symbol).unwrap();
        let ion = el.ion(i64::from(el.z()) - 1).unwrap();
        let b = ion.ionization_energy_ev().unwrap();
        let ours = photoionization_cross_section_cm2(&ion, b).unwrap();
        let exact = sigma0 * RY_EV / b;
        assert!(
            (ours / exact - 1.0).abs() < 1e-3,
            "{symbol}: {ours:e} vs {exact:e}"
        );
    }
}
