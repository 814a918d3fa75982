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
        let s = parse_scenario(text, name).unwrap();
        let r = run(&s, &mut |_, _, _| {}).unwrap();
        assert_eq!(r.source.kind(), s.source.kind(), "{name}");
        assert!(!r.ladder.steps.is_empty(), "{name}");
    }
}
