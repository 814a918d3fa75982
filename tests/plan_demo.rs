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
    // Both runs hold the residual H2's hydrogen ions (residual_gas_ions by default), a light
    // coolant of their own: the fed N2 adds ×1.21 to that (measured with the Python
    // extension, 2026-12-03; ×1.58 with the residual gas a charge-exchange target only).
    assert!(
        cooled.0 > 1.15 * hot.0,
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

/// A small dynamic scenario (neon with a nitrogen feed) runs in a debug build: the report
/// names its model, carries the dynamic part, and its ions per extraction and A/q lines
/// follow from the trapped ion numbers.
#[test]
fn a_small_dynamic_scenario_reports_its_dynamics() {
    let text = r#"
[target]
isotope = "20Ne"
charge = 8
[beam_trap]
energy_ev = 3000.0
current_a = 0.05
current_density_a_cm2 = 500.0
length_m = 0.3
ion_temperature_ev = 1.0
model = "dynamic"
injected_atoms = 1e6
gas_feed_pa = { N2 = 1e-9 }
[time]
start_s = 1e-4
stop_s = 0.05
points = 12
[energy_scan]
points = 4
[residual_gas_pa]
H2 = 1e-9
"#;
    let s = parse_scenario(text, "neon.toml").unwrap();
    let r = run(&s, &mut |_, _, _| {}).unwrap();
    assert_eq!(r.model(), "dynamic");
    let d = r.dynamics.as_ref().unwrap();
    assert_eq!(d.target_species, "20Ne");
    assert_eq!(
        d.target_rows.iter().map(|x| x.charge).collect::<Vec<_>>(),
        vec![6, 7, 8, 9, 10]
    );
    assert!(d.run.bookkeeping.particle_balance < 1e-9);
    let t_ex = r.extraction.unwrap().0;
    assert_eq!(d.extraction_s, t_ex);
    let row = d.target_rows.iter().find(|x| x.charge == 8).unwrap();
    let ions = r.ions.as_ref().unwrap();
    assert!((ions.target - row.ions * ions.isotope_share).abs() <= 1e-12 * ions.target);
    assert_eq!(ions.per_charge[0], 0.0, "neutral atoms are not extracted");
    // The fed nitrogen is a species of the run and has lines on the A/q axis.
    assert!(d.species_rows.iter().any(|x| x.label == "N" && x.fed_only));
    assert!(r
        .lines
        .lines()
        .iter()
        .any(|l| l.z == 7 && l.residual && l.intensity > 0.0));
    // Absolute ions per extraction on the A/q axis, analyte and background alike: the
    // target line holds the target's trapped ions, and each background line its
    // species' trapped ions at that charge times the isotope's share.
    let line = |z: u32, a: u32, q: u32| -> f64 {
        r.lines
            .lines()
            .iter()
            .filter(|l| l.z == z && l.mass_number == a && l.charge == q)
            .map(|l| l.intensity)
            .sum()
    };
    assert!((line(10, 20, 8) / ions.target - 1.0).abs() < 1e-9);
    let n = r.residual_fractions.iter().find(|x| x.0 == "N").unwrap();
    let n_row = d.species_rows.iter().find(|x| x.label == "N").unwrap();
    let trapped_ions: f64 = n.1 * n.2.iter().skip(1).sum::<f64>();
    assert!((trapped_ions / n_row.ions - 1.0).abs() < 1e-9);
    // 14N: IUPAC abundance 0.996205 (mendeleev 1.3.0).
    let n1 = n.1 * n.2[1];
    assert!((line(7, 14, 1) / (n1 * 0.996205) - 1.0).abs() < 1e-6);
    // The residual H2 of the scenario is a source of hydrogen ions by default.
    assert!(r.residual_fractions.iter().any(|x| x.0 == "H" && x.1 > 0.0));
    assert!(r.notes.iter().any(|n| n.contains("fixed model")));
    // The fixed model of the same trap has no dynamic part and names itself.
    let fixed = text
        .lines()
        .filter(|l| {
            !["model", "injected_atoms", "gas_feed_pa"]
                .iter()
                .any(|k| l.starts_with(k))
        })
        .collect::<Vec<_>>()
        .join("\n");
    let r = run(
        &parse_scenario(&fixed, "fixed.toml").unwrap(),
        &mut |_, _, _| {},
    )
    .unwrap();
    assert_eq!(r.model(), "fixed");
    assert!(r.dynamics.is_none());
}
