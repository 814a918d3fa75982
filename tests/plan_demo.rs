//! A Rust user can run a scenario: the bundled demo through `plan::run`.

use chargecast::plan::{parse_scenario, run, EnergyScan, ExtractionChoice};

const DEMO: &str = include_str!("../python/chargecast/scenarios/demo.toml");

#[test]
fn the_demo_recommends_xe44_and_reports_progress_of_the_energy_scan() {
    let scenario = parse_scenario(DEMO, "demo.toml").unwrap();
    let mut calls = Vec::new();
    let report = run(&scenario, &mut |done, total, what| {
        calls.push((done, total, what.to_string()))
    })
    .unwrap();
    // 129Xe43+ is hidden under 132Xe44+ (both at A/q = 3.0000); 44+ at A/q 2.93 is clean.
    let rec = report.recommended.as_ref().unwrap();
    assert_eq!(rec.label, "129Xe44+");
    assert_eq!(rec.charge, 44);
    assert!(rec.purity > 0.99, "{}", rec.purity);
    let (t_ex, how) = report.extraction.unwrap();
    assert_eq!(how, ExtractionChoice::TargetPeak);
    assert_eq!(report.target_peak.unwrap().0, t_ex);
    // Progress comes from inside the energy map and ends complete.
    let (done, total, what) = calls.last().unwrap().clone();
    assert_eq!((done, what.as_str()), (total, "energy scan"));
    let EnergyScan::Map(map) = &report.energy_scan else {
        panic!("a beam trap scans energy × time")
    };
    // The scenario's own 5500 eV is on the grid, so the best point is at least as good.
    assert!(map.energies_ev.contains(&5500.0));
    assert!(map.best_fraction >= report.target_peak.unwrap().1);
    let ions = report.ions.as_ref().unwrap();
    // All charge states of 129Xe: the isotope's share of the compensated charge.
    let total: f64 = ions.per_charge.iter().sum();
    assert!((total - ions.all_charges).abs() <= 1e-9 * total);
}

#[test]
fn every_bundled_scenario_runs() {
    for (name, text) in [
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
        // coolant.toml (the dynamic model) runs in the_coolant_raises_the_targets_fraction.
        let s = parse_scenario(text, name).unwrap();
        let r = run(&s, &mut |_, _, _| {}).unwrap();
        assert_eq!(r.source.kind(), s.source.kind(), "{name}");
        assert!(!r.ladder.steps.is_empty(), "{name}");
    }
}

const COOLANT: &str = include_str!("../python/chargecast/scenarios/coolant.toml");

/// The coolant scenario without its gas feed: the same run with nothing fed.
fn without_feed(text: &str) -> String {
    text.lines()
        .filter(|l| !l.trim_start().starts_with("gas_feed_pa"))
        .collect::<Vec<_>>()
        .join("\n")
}

#[test]
fn the_coolant_scenario_is_dynamic_and_feeds_nitrogen() {
    use chargecast::plan::SourceSettings;
    let s = parse_scenario(COOLANT, "coolant.toml").unwrap();
    let SourceSettings::BeamTrap(t) = &s.source else {
        panic!("a beam trap")
    };
    assert!(t.is_dynamic());
    assert_eq!(t.gas_feed_pa, vec![("N2".to_string(), 2e-9)]);
    let bare = parse_scenario(&without_feed(COOLANT), "bare.toml").unwrap();
    let SourceSettings::BeamTrap(b) = &bare.source else {
        panic!("a beam trap")
    };
    assert!(b.is_dynamic() && b.gas_feed_pa.is_empty());
}

/// The coolant raises the target's end-time fraction (Penetrante et al., Phys. Rev. A 43,
/// 4861 (1991): evaporative cooling by a light coolant keeps the heavy ions cold and
/// inside the beam, so they breed to higher charges). Two dynamic runs take about 30 s in
/// a debug build, so this runs in release builds only; tests/python/test_scenario.py checks
/// the same gain on the release extension in every CI run.
#[test]
#[cfg_attr(debug_assertions, ignore = "two dynamic runs: run with --release")]
fn the_coolant_raises_the_targets_fraction() {
    let q = 17;
    let mut end = Vec::new();
    for text in [COOLANT.to_string(), without_feed(COOLANT)] {
        let s = parse_scenario(&text, "coolant.toml").unwrap();
        let r = run(&s, &mut |_, _, _| {}).unwrap();
        assert_eq!(r.model(), "dynamic");
        let d = r.dynamics.as_ref().unwrap();
        assert!(d.run.bookkeeping.particle_balance < 1e-9);
        assert!(d.run.bookkeeping.energy_balance < 1e-6);
        let evo = r.target_evolution().unwrap();
        let last = evo.times_s.len() - 1;
        let ar = d.target_history().unwrap();
        end.push((evo.fractions[[last, q]], ar.temperatures_ev[[last, q]]));
    }
    let (cooled, hot) = (end[0], end[1]);
    assert!(
        cooled.0 > 1.3 * hot.0,
        "Ar17+ {:.4} with, {:.4} without",
        cooled.0,
        hot.0
    );
    assert!(
        cooled.1 < 0.7 * hot.1,
        "kT {:.4} with, {:.4} without",
        cooled.1,
        hot.1
    );
}
