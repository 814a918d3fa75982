//! A scenario with a radioactive-beam breeding cycle: the report carries the cycle, the
//! decay daughters sit in the A/q spectrum as isobaric contaminants, and the residual-gas
//! lines hold absolute ions per extraction from the partial pressures.

use chargecast::plan::{parse_scenario, run};

const SCENARIO: &str = "\
[target]\nisotope = \"97Rb\"\ncharge = 22\n\
[[species]]\nname = \"97Rb\"\n\
[beam_trap]\nenergy_ev = 5000.0\ncurrent_a = 0.25\nradius_m = 120e-6\nlength_m = 0.8\n\
[residual_gas_pa]\nH2 = 1e-8\nCO = 2e-9\n\
[injection]\nions_per_bunch = 1e5\nrepetition_rate_hz = 20.0\nbreeding_time_s = 0.05\nmax_nuclides = 2\n\
[time]\nstart_s = 1e-4\nstop_s = 1.0\npoints = 20\n\
[energy_scan]\npoints = 4\n";

#[test]
fn the_cycle_daughters_and_absolute_gas_ions_reach_the_report() {
    let s = parse_scenario(SCENARIO, "rib.toml").unwrap();
    assert_eq!(s.time.extraction_s, Some(0.05));
    let report = run(&s, &mut |_, _, _| {}).unwrap();
    let c = report.injection.as_ref().expect("a cycle");
    let labels: Vec<String> = c.nuclides.iter().map(|n| n.label()).collect();
    assert_eq!(labels, ["97Rb", "97Sr"]);
    // Bookkeeping at extraction (to 1e-9 relative, as the core promises).
    let (trapped, decayed, lost) = c.balance(c.times_s.len() - 1);
    assert!(((trapped + decayed + lost) / 1e5 - 1.0).abs() < 1e-9);
    // The target's ions per extraction are the cycle's.
    let ions = report.ions.as_ref().unwrap();
    assert!((ions.all_charges - trapped).abs() < 1e-9 * trapped);
    // 97Sr lines are in the spectrum, and so are the residual-gas lines with the absolute
    // numbers of the pressures.
    let lines = report.lines.lines();
    assert!(lines
        .iter()
        .any(|l| l.z == 38 && l.mass_number == 97 && !l.residual));
    let Some(chargecast::sources::Source::BeamTrap(trap)) = Some(&report.source) else {
        panic!("a beam trap")
    };
    let gas = trap.residual_ions(0.05).unwrap();
    let oxygen: f64 = gas.iter().find(|r| r.symbol == "O").unwrap().ions();
    let in_lines: f64 = lines
        .iter()
        .filter(|l| l.residual && l.z == 8)
        .map(|l| l.intensity)
        .sum();
    // Natural oxygen isotopes share the element's ions (abundances sum to 1).
    assert!(
        (in_lines / oxygen - 1.0).abs() < 1e-4,
        "{in_lines} vs {oxygen}"
    );
}

#[test]
fn injection_settings_are_checked_where_written() {
    let bad = SCENARIO.replace(
        "ions_per_bunch = 1e5",
        "ions_per_bunch = 1e5\nions_per_s = 1e6",
    );
    let err = parse_scenario(&bad, "rib.toml").unwrap_err().to_string();
    assert!(err.contains("exactly one"), "{err}");
    let bad = SCENARIO.replace("breeding_time_s = 0.05", "breeding_time_s = 0.5");
    let err = parse_scenario(&bad, "rib.toml").unwrap_err().to_string();
    assert!(err.contains("injection") && err.contains("period"), "{err}");
    let bad = SCENARIO.replace("[injection]\n", "[injection]\nisotope = \"96Rb\"\n");
    let err = parse_scenario(&bad, "rib.toml").unwrap_err().to_string();
    assert!(err.contains("target isotope"), "{err}");
}
