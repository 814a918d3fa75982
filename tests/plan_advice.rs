//! Advice a planner can trust: an unreachable target still gives a report, and each
//! plausibility warning fires on its case and on none of the bundled scenarios.

use chargecast::plan::{parse_scenario, run, Report};

fn scenario(target: &str, charge: u32, trap: &str, time: &str) -> String {
    format!(
        "title = \"t\"\n[target]\nisotope = \"{target}\"\ncharge = {charge}\n\
         [[species]]\nname = \"{target}\"\n[beam_trap]\n{trap}\nlength_m = 0.5\n\
         [residual_gas_pa]\nH2 = 1e-9\n{time}\n[energy_scan]\nstart_ev = 500.0\nstop_ev = 8000.0\npoints = 8\n"
    )
}

fn plan(text: &str) -> Report {
    let s = parse_scenario(text, "case.toml").unwrap();
    run(&s, &mut |_, _, _| {}).unwrap()
}

fn whats(r: &Report) -> Vec<&str> {
    r.warnings.iter().map(|w| w.what).collect()
}

const BEAM: &str = "current_a = 0.5\nradius_m = 250e-6";
const TIME: &str = "[time]\nstart_s = 1e-3\nstop_s = 10.0\npoints = 60";

#[test]
fn an_unreachable_target_gives_a_report_with_the_reason() {
    // 97Rb23+ needs the 1024 eV ionization energy of Rb22+; the beam has 1000 eV.
    let r = plan(&scenario(
        "97Rb",
        23,
        &format!("energy_ev = 1000.0\n{BEAM}"),
        TIME,
    ));
    assert!(r.neighbourhood.is_none());
    assert!(
        r.notes.iter().any(|n| n.contains("no A/q neighbourhood")),
        "{:?}",
        r.notes
    );
    let w = r
        .warnings
        .iter()
        .find(|w| w.what == "target_threshold")
        .unwrap();
    assert!(w.message.contains("needs at least 1024"), "{}", w.message);
}

#[test]
fn a_grid_starting_after_the_target_is_over_bred_says_start_earlier() {
    // Ar8+ at 3 kA/cm² is made within microseconds; the grid starts at 1 s.
    let r = plan(&scenario(
        "40Ar",
        8,
        "energy_ev = 3000.0\ncurrent_a = 0.5\nradius_m = 70e-6",
        "[time]\nstart_s = 1.0\nstop_s = 10.0\npoints = 20",
    ));
    assert!(whats(&r).contains(&"time_grid"), "{:?}", whats(&r));
    assert!(
        r.notes.iter().any(|n| n.contains("start earlier")),
        "{:?}",
        r.notes
    );
    assert!(!r.notes.iter().any(|n| n.contains("extend [time] stop_s")));
}

#[test]
fn absurd_beams_warn_with_value_and_range() {
    for (beam, what) in [
        (
            "energy_ev = 5000.0\ncurrent_a = 0.5\nradius_m = 1e-9",
            "current_density",
        ),
        (
            "energy_ev = 1e9\ncurrent_a = 0.5\nradius_m = 250e-6",
            "beam_energy",
        ),
        (
            "energy_ev = 5000.0\ncurrent_a = 1e6\nradius_m = 0.5",
            "perveance",
        ),
        (
            "energy_ev = 5000.0\ncurrent_a = 0.5\nmagnetic_field_t = 3.0",
            "brillouin_radius",
        ),
    ] {
        let r = plan(&scenario("40Ar", 16, beam, TIME));
        let w = r.warnings.iter().find(|w| w.what == what);
        let w = w.unwrap_or_else(|| panic!("{what}: {:?}", whats(&r)));
        assert!(
            w.message.contains(&format!("{:.4e}", w.value)),
            "{}",
            w.message
        );
        assert!(!w.range.is_empty());
    }
}

#[test]
fn a_typical_charge_breeder_has_no_warning() {
    let r = plan(&scenario(
        "40Ar",
        16,
        &format!("energy_ev = 5000.0\n{BEAM}"),
        TIME,
    ));
    assert!(r.warnings.is_empty(), "{:?}", whats(&r));
}

#[test]
fn no_bundled_scenario_warns() {
    for (name, text) in [
        (
            "demo",
            include_str!("../python/chargecast/scenarios/demo.toml"),
        ),
        (
            "photon_beam",
            include_str!("../python/chargecast/scenarios/photon_beam.toml"),
        ),
        (
            "electron_impact",
            include_str!("../python/chargecast/scenarios/electron_impact.toml"),
        ),
        (
            "reference",
            include_str!("../python/chargecast/scenarios/reference.toml"),
        ),
    ] {
        let r = plan(text);
        assert!(r.warnings.is_empty(), "{name}: {:?}", whats(&r));
    }
}

#[test]
fn the_robust_optimum_steps_off_the_cliff_below_the_next_ionization_energy() {
    // He-like Fe24+: the sharp optimum sits just below the 8828 eV that opens Fe25+. The
    // network leaves out dielectronic recombination: the Fe25+ resonances that crowd below
    // the 1s → n limits near 8.8 keV recombine the Fe25+ made just above the threshold and
    // keep the cliff from showing; this test is about the cliff.
    let text = "title = \"fe\"\n[target]\nisotope = \"56Fe\"\ncharge = 24\n\
        [beam_trap]\nenergy_ev = 10000.0\ncurrent_a = 0.3\nradius_m = 150e-6\nlength_m = 0.5\n\
        processes = [\"ionization\", \"radiative_recombination\", \"charge_exchange\", \"excitation_autoionization\"]\n\
        [residual_gas_pa]\nH2 = 1e-9\n[time]\nstart_s = 1e-3\nstop_s = 20.0\npoints = 40\n\
        [energy_scan]\nstart_ev = 2000.0\nstop_ev = 12000.0\npoints = 30\n";
    let r = plan(text);
    let ro = r.robust_optimum.as_ref().unwrap();
    let ie = chargecast::atoms::element("Fe")
        .unwrap()
        .ionization_energies_ev()[24];
    assert!(ro.sharp_near_threshold, "sharp {}", ro.sharp_energy_ev);
    assert!(!ro.near_threshold && !ro.on_scan_edge, "{ro:?}");
    assert_eq!(ro.next_threshold, Some((25, ie)));
    assert!(
        ro.margin_ev.unwrap() > 0.5 * ro.spread_ev,
        "{:?}",
        ro.margin_ev
    );
    assert!(
        ro.spread_ev > 1.0 && ro.spread_ev < 100.0,
        "{}",
        ro.spread_ev
    );
}
