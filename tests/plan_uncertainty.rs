//! The `[uncertainty]` scenario table: Monte Carlo bands of the target's peak time, peak
//! fraction and ions per extraction in the report.

use chargecast::plan::{parse_scenario, run, Report};
use chargecast::Error;

const BASE: &str = r#"
[target]
isotope = "40Ar"
charge = 16

[beam_trap]
energy_ev = 5000.0
current_a = 0.1
radius_m = 50e-6
length_m = 0.5

[residual_gas_pa]
H2 = 1e-8

[time]
start_s = 1e-4
stop_s = 10.0
points = 80

[energy_scan]
points = 4

[uncertainty]
samples = 64
seed = 3
"#;

fn report(extra: &str) -> Report {
    let s = parse_scenario(
        &BASE.replace("seed = 3", &format!("seed = 3\n{extra}")),
        "u.toml",
    )
    .unwrap();
    run(&s, &mut |_, _, _| {}).unwrap()
}

fn message(text: &str) -> String {
    match parse_scenario(text, "u.toml") {
        Err(Error::InvalidScenario { message, .. }) => message,
        other => panic!("expected a scenario error, got {other:?}"),
    }
}

fn width(b: [f64; 3]) -> f64 {
    b[2] - b[0]
}

#[test]
fn the_ranges_contain_the_nominal_values_and_widen_with_the_factors() {
    let r = report("");
    let u = r.uncertainty.as_ref().unwrap();
    assert_eq!((u.samples, u.seed), (64, 3));
    let (t, f) = r.target_peak.unwrap();
    let ions = r.ions.as_ref().unwrap().target;
    for (name, band, nominal) in [
        ("peak time", u.peak_time_s, t),
        ("peak fraction", u.peak_fraction, f),
        ("ions", u.ions_per_extraction, ions),
    ] {
        assert!(
            band[0] <= nominal && nominal <= band[2] && band[0] <= band[1] && band[1] <= band[2],
            "{name}: {band:?} vs {nominal}"
        );
        assert!(width(band) > 0.0, "{name}: {band:?}");
    }
    // The fraction band holds the nominal evolution at every time.
    let evo = r.target_evolution().unwrap();
    for (k, nominal) in evo.fractions.column(16).iter().enumerate() {
        let tol = 1e-12;
        assert!(
            u.target_fraction[0][k] <= nominal + tol && nominal - tol <= u.target_fraction[2][k],
            "time {k}"
        );
    }
    // Exact rates: the band collapses onto the nominal values.
    let exact =
        report("ionization_factor = 1.0\nrecombination_factor = 1.0\ncharge_exchange_factor = 1.0");
    let e = exact.uncertainty.as_ref().unwrap();
    assert!(width(e.peak_fraction) < 1e-12 && (e.peak_fraction[1] - f).abs() < 1e-12);
    assert!(width(e.ions_per_extraction) <= 1e-9 * ions);
    // Larger factors, wider bands (same seed, so the same normal draws scaled up).
    let wide =
        report("ionization_factor = 2.0\nrecombination_factor = 3.0\ncharge_exchange_factor = 4.0");
    let w = wide.uncertainty.as_ref().unwrap();
    assert!(width(w.peak_fraction) > width(u.peak_fraction));
    assert!(width(w.peak_time_s) > width(u.peak_time_s));
    assert!(width(w.ions_per_extraction) > width(u.ions_per_extraction));
    // The same seed gives the same bits.
    assert_eq!(report("").uncertainty, r.uncertainty);
}

#[test]
fn bad_uncertainty_values_name_the_key_and_what_is_allowed() {
    let line = |key: &str| {
        let n = BASE.lines().position(|l| l.starts_with(key)).unwrap() + 1;
        format!("line {n}")
    };
    let m = message(&BASE.replace("samples = 64", "samples = 1"));
    assert!(
        m.contains(&line("samples"))
            && m.contains("uncertainty.samples")
            && m.contains("2..=100000"),
        "{m}"
    );
    let m = message(&BASE.replace("seed = 3", "seed = -3"));
    assert!(m.contains("uncertainty.seed") && m.contains(">= 0"), "{m}");
    let m = message(&BASE.replace("seed = 3", "seed = 3\nionization_factor = 0.5"));
    assert!(
        m.contains("uncertainty.ionization_factor") && m.contains(">= 1"),
        "{m}"
    );
    let m = message(&BASE.replace("seed = 3", "seed = 3\ncharge_correlation = 2.0"));
    assert!(
        m.contains("uncertainty.charge_correlation") && m.contains("[0, 1]"),
        "{m}"
    );
    let m = message(&BASE.replace("seed = 3", "seed = 3\nsigma = 2.0"));
    assert!(
        m.contains("uncertainty.sigma") && m.contains("`ionization_factor`"),
        "{m}"
    );
    let m = message(&BASE.replace("length_m = 0.5", "length_m = 0.5\nmodel = \"dynamic\""));
    assert!(
        m.contains("uncertainty") && m.contains("fixed model"),
        "{m}"
    );
}
