//! The `[plasma]` scenario table: parsed and checked once in the core, run through the
//! planner; the report's numbers equal a direct `PlasmaSource` built by hand.

use chargecast::atoms::element;
use chargecast::plan::{parse_scenario, run, SourceSettings};
use chargecast::sources::plasma::{
    Confinement, PlasmaSettings, PlasmaSource, DEFAULT_NEUTRAL_RESIDENCE_TIME_S,
};
use chargecast::Error;

const BUNDLED: &str = include_str!("../python/chargecast/scenarios/plasma.toml");

fn message(text: &str) -> String {
    match parse_scenario(text, "p.toml") {
        Err(Error::InvalidScenario { message, .. }) => message,
        other => panic!("expected a scenario error, got {other:?}"),
    }
}

/// The line (1-based) of the first line of `text` that starts with `key`.
fn line_of(text: &str, key: &str) -> usize {
    text.lines().position(|l| l.starts_with(key)).unwrap() + 1
}

/// The bundled scenario's settings, written out by hand (not read back from the parser).
fn by_hand(residual: bool) -> PlasmaSettings {
    let mut s = PlasmaSettings::new(
        1500.0,
        2e11,
        Confinement::Scaling {
            tau1_s: 1e-3,
            exponent: 1.0,
        },
        vec![("Ar".into(), 5e-7), ("O2".into(), 2e-6)],
    );
    s.hot_electron_temperature_ev = Some(2e4);
    s.hot_electron_fraction = 0.1;
    s.ion_temperature_ev = 1.0;
    s.wall_recycling = 0.3;
    s.plasma_volume_m3 = 1e-3;
    s.extraction_fraction = 0.5;
    if residual {
        s.residual_gas_pa = vec![("H2".into(), 1e-7), ("H2O".into(), 3e-8)];
    }
    s
}

#[test]
fn the_table_round_trips_into_the_core_settings() {
    let s = parse_scenario(BUNDLED, "plasma.toml").unwrap();
    let SourceSettings::Plasma(p) = &s.source else {
        panic!("a plasma source")
    };
    assert_eq!(s.source.kind(), "plasma");
    // Every written value, and the documented default of the one left out.
    assert_eq!(*p, by_hand(false));
    assert_eq!(p.neutral_residence_time_s, DEFAULT_NEUTRAL_RESIDENCE_TIME_S);
    // The species are the fed gases' elements with their fed atom densities.
    let names: Vec<_> = s.species.iter().map(|x| x.name.as_str()).collect();
    assert_eq!(names, ["Ar", "O"]);
    let direct = PlasmaSource::new(by_hand(true)).unwrap();
    assert_eq!(s.species[1].amount, direct.species()[1].atom_density_cm3);
    assert_eq!(
        s.lines["plasma.wall_recycling"],
        line_of(BUNDLED, "wall_recycling")
    );
    // One time per charge, and a scaling without exponent (the default α).
    let per = BUNDLED.replace("confinement_exponent = 1.0", "").replace(
        "confinement_time_s = 1e-3",
        &format!("confinement_time_s = [{}]", vec!["2e-3"; 18].join(", ")),
    );
    let s = parse_scenario(&per, "p.toml").unwrap();
    let SourceSettings::Plasma(p) = &s.source else {
        panic!("a plasma source")
    };
    assert_eq!(p.confinement, Confinement::PerCharge(vec![2e-3; 18]));
    let s = parse_scenario(&BUNDLED.replace("confinement_exponent = 1.0", ""), "p.toml").unwrap();
    let SourceSettings::Plasma(p) = &s.source else {
        panic!("a plasma source")
    };
    assert_eq!(
        p.confinement,
        Confinement::Scaling {
            tau1_s: 1e-3,
            exponent: chargecast::sources::plasma::DEFAULT_CONFINEMENT_EXPONENT
        }
    );
}

#[test]
fn bad_values_name_the_key_and_what_is_allowed() {
    let line = |key: &str| format!("line {}", line_of(BUNDLED, key));
    let cases = [
        (
            "electron_temperature_ev = 1500.0",
            "electron_temperature_ev = -5.0",
            "plasma.electron_temperature_ev",
            "> 0",
        ),
        (
            "hot_electron_fraction = 0.1",
            "hot_electron_fraction = 1.5",
            "plasma.hot_electron_fraction",
            "0..=1",
        ),
        (
            "wall_recycling = 0.3",
            "wall_recycling = -0.1",
            "plasma.wall_recycling",
            "0..=1",
        ),
        (
            "extraction_fraction = 0.5",
            "extraction_fraction = 0.0",
            "plasma.extraction_fraction",
            "(0, 1]",
        ),
        (
            "electron_density_cm3 = 2e11",
            "electron_density_cm3 = 0.0",
            "plasma.electron_density_cm3",
            "> 0",
        ),
        (
            "confinement_time_s = 1e-3",
            "confinement_time_s = [1e-3, 2e-3]",
            "plasma.confinement_exponent",
            "single confinement_time_s",
        ),
    ];
    for (from, to, path, allowed) in cases {
        let key = from.split(' ').next().unwrap();
        let m = message(&BUNDLED.replace(from, to));
        let want_line = if path.ends_with("exponent") {
            line("confinement_exponent")
        } else {
            line(key)
        };
        assert!(
            m.contains(&want_line) && m.contains(path) && m.contains(allowed),
            "{to}: {m}"
        );
    }
    // Too few per-charge times for argon (Z = 18), naming the charge range.
    let m = message(&BUNDLED.replace("confinement_exponent = 1.0", "").replace(
        "confinement_time_s = 1e-3",
        "confinement_time_s = [1e-3, 2e-3]",
    ));
    assert!(
        m.contains("plasma.confinement_time_s") && m.contains("1..=18"),
        "{m}"
    );
    let m = message(&BUNDLED.replace("confinement_exponent = 1.0", "").replace(
        "confinement_time_s = 1e-3",
        &format!(
            "confinement_time_s = [{}, -1.0]",
            vec!["1e-3"; 17].join(", ")
        ),
    ));
    assert!(
        m.contains("plasma.confinement_time_s") && m.contains("> 0"),
        "{m}"
    );
    // A wrong type says what is expected.
    let m = message(&BUNDLED.replace("confinement_time_s = 1e-3", "confinement_time_s = \"x\""));
    assert!(
        m.contains(&line("confinement_time_s"))
            && m.contains("expected a number")
            && m.contains("array"),
        "{m}"
    );
    // An unknown key lists the allowed ones.
    let m = message(&BUNDLED.replace("wall_recycling", "wall_recycle"));
    assert!(
        m.contains("plasma.wall_recycle")
            && m.contains("`wall_recycling`")
            && m.contains("`electron_temperature_ev`"),
        "{m}"
    );
    // Gases: unknown formula, negative pressure, nothing fed.
    let m = message(&BUNDLED.replace("O2 = 2e-6", "SF6 = 2e-6"));
    assert!(
        m.contains("plasma.gas_feed_pa.SF6") && m.contains("N2"),
        "{m}"
    );
    let m = message(&BUNDLED.replace("O2 = 2e-6", "O2 = -1.0"));
    assert!(
        m.contains("plasma.gas_feed_pa.O2") && m.contains(">= 0"),
        "{m}"
    );
    let m = message(&BUNDLED.replace("Ar = 5e-7, O2 = 2e-6", "Ar = 0.0"));
    assert!(
        m.contains("plasma.gas_feed_pa") && m.contains("> 0 Pa"),
        "{m}"
    );
    // The target must come from a fed gas; species come from the feed, not [[species]].
    let m = message(&BUNDLED.replace("isotope = \"40Ar\"", "isotope = \"84Kr\""));
    assert!(m.contains("plasma.gas_feed_pa") && m.contains("Kr"), "{m}");
    let m = message(&format!("{BUNDLED}\n[[species]]\nname = \"Ar\"\n"));
    assert!(m.contains("species") && m.contains("gas_feed_pa"), "{m}");
    let m = message(&format!(
        "{BUNDLED}\n[electron_impact]\nenergy_ev = 100.0\n"
    ));
    assert!(m.contains("exactly one") && m.contains("[plasma]"), "{m}");
}

#[test]
fn the_report_equals_a_direct_plasma_source() {
    let s = parse_scenario(BUNDLED, "plasma.toml").unwrap();
    let r = run(&s, &mut |_, _, _| {}).unwrap();
    assert_eq!(r.model(), "plasma_balance");
    assert!(r.ions.is_none() && r.extraction.is_none());
    let p = r.plasma.as_ref().unwrap();
    let direct = PlasmaSource::new(by_hand(true)).unwrap();
    let ar = element("Ar").unwrap();
    let n = direct.steady_state(ar).unwrap();
    let i = direct.currents_eua(&n).unwrap();
    let row = p.element("Ar").unwrap();
    for q in 0..=18 {
        assert!(
            (row.currents_eua[q] - i[q]).abs() <= 1e-12 * i[q].abs().max(1e-300),
            "{q}+"
        );
        assert!((row.densities_cm3[q] - n[q]).abs() <= 1e-12 * n[q].max(1e-300));
    }
    // I_q = η q e n_q V / τ_q by hand for the target (e from CODATA 2018, exact).
    let hand = 0.5 * 10.0 * 1.602_176_634e-19 * n[10] * 1e3 / (1e-3 * 10.0) * 1e6;
    assert!((row.currents_eua[10] / hand - 1.0).abs() < 1e-12);
    // The target's current: the isotope's share of the element's 10+ current (40Ar
    // 99.6 % of natural argon, IUPAC, from memory).
    assert!(
        (p.isotope_share - 0.996).abs() < 0.001,
        "{}",
        p.isotope_share
    );
    assert!((p.target_current_eua / (p.isotope_share * i[10]) - 1.0).abs() < 1e-12);
    // The residual gas: H only from residual, oxygen both fed and residual (counted as fed).
    let h = p.element("H").unwrap();
    assert!(h.residual && !p.element("O").unwrap().residual);
    // The analysed-beam spectrum carries the currents: the 40Ar10+ line is the target current,
    // 16O4+ (from the mixing gas) its neighbour.
    let line = |label: &str| {
        r.lines
            .lines()
            .iter()
            .find(|l| l.label() == label)
            .map(|l| l.intensity)
            .unwrap()
    };
    assert!((line("40Ar10+") / p.target_current_eua - 1.0).abs() < 1e-12);
    let o = direct.steady_state(element("O").unwrap()).unwrap();
    let io = direct.currents_eua(&o).unwrap();
    let o16 = element("O")
        .unwrap()
        .isotope(16)
        .unwrap()
        .abundance
        .unwrap();
    assert!((line("16O4+") / (o16 * io[4]) - 1.0).abs() < 1e-12);
    let n_h = direct.steady_state(element("H").unwrap()).unwrap();
    let i_h = direct.currents_eua(&n_h).unwrap();
    assert!(r
        .lines
        .lines()
        .iter()
        .any(|l| l.label() == "1H1+" && l.residual));
    assert!((h.total_current_eua / i_h[1] - 1.0).abs() < 1e-12);
    // Steady-state fractions are what the ions leave with.
    let total: f64 = n.iter().sum();
    let f = &r.target_fractions().fractions;
    assert!((f[10] - n[10] / total).abs() < 1e-14);
    // The temperature scan contains the scenario's own setting's neighbourhood and its best
    // is at least the current at any scanned temperature.
    assert!(p
        .scan_target_current_eua
        .iter()
        .all(|c| *c <= p.best_current_eua));
    assert_eq!(
        r.neighbourhood.as_ref().unwrap().overlap.target.label(),
        "40Ar10+"
    );
    // The bundled feed keeps the ions' charge within n_e; ten times the feed does not, and
    // the report says so.
    assert!(p.ion_charge_density_cm3 <= p.electron_density_cm3);
    assert!(!r.notes.iter().any(|n| n.contains("quasi-neutral")));
    let heavy = BUNDLED.replace("Ar = 5e-7, O2 = 2e-6", "Ar = 5e-6, O2 = 2e-5");
    let r = run(
        &parse_scenario(&heavy, "p.toml").unwrap(),
        &mut |_, _, _| {},
    )
    .unwrap();
    assert!(
        r.notes.iter().any(|n| n.contains("not quasi-neutral")),
        "{:?}",
        r.notes
    );
}
