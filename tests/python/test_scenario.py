"""Scenario files: the schema, its error messages and the report computed from a scenario."""

from __future__ import annotations

import contextlib
import json
import re
from pathlib import Path

import numpy as np
import pytest

import chargecast as cc
from chargecast import cli
from chargecast.scenario import Scenario

GOOD = """\
title = "argon test"
[target]
isotope = "40Ar"
charge = 16

[beam_trap]
energy_ev = 6000.0
current_a = 0.1
current_density_a_cm2 = 300.0
length_m = 0.4

[residual_gas_pa]
H2 = 1e-8

[time]
start_s = 1e-4
stop_s = 5.0
points = 120

[energy_scan]
points = 12

[separator]
resolving_power = 300.0
"""


def error_of(text: str, filename: str = "run.toml") -> str:
    with pytest.raises(cc.ScenarioError) as info:
        Scenario.from_text(text, filename)
    return str(info.value)


def line_of(text: str, whole_line: str) -> int:
    return next(i for i, ln in enumerate(text.splitlines(), start=1) if ln.strip() == whole_line)


def test_good_scenario_fills_defaults() -> None:
    s = Scenario.from_text(GOOD, "run.toml")
    t = s.target
    assert (t.isotope, t.symbol, t.z, t.mass_number, t.charge, t.label) == (
        "40Ar",
        "Ar",
        18,
        40,
        16,
        "40Ar16+",
    )
    assert [sp.name for sp in s.species] == ["40Ar"]
    assert s.source.kind == "beam_trap" and s.source.compensation == 0.5
    # defaults of the source (ion temperature 50 eV, gas temperature 300 K) come from the core
    assert (s.source.ion_temperature_ev, s.source.gas_temperature_k) == (50.0, 300.0)
    assert s.source.photon_energy_ev is None
    assert s.separator.peak_shape == "gaussian"
    assert (
        s.times_s[0] == pytest.approx(1e-4) and s.times_s[-1] == pytest.approx(5.0) and len(s.times_s) == 120
    )
    assert s.residual_elements == {"H": 1.0}
    assert s.lines["beam_trap.energy_ev"] == line_of(GOOD, "energy_ev = 6000.0")


@pytest.mark.parametrize(
    ("old", "new", "field", "allowed"),
    [
        # an unknown field: the message lists the allowed ones
        ("energy_ev = 6000.0", "energy_kev = 6.0", "beam_trap.energy_kev", "energy_ev"),
        # a wrong type
        ("charge = 16", 'charge = "sixteen"', "target.charge", "whole number"),
        ("length_m = 0.4", 'length_m = "long"', "beam_trap.length_m", "number"),
        ("length_m = 0.4", "length_m = 0.4\ncompensation = 1.5", "beam_trap.compensation", "0..=1"),
        # an unknown element in the target and in a gas
        ('isotope = "40Ar"', 'isotope = "40Zz"', "target.isotope", "symbol"),
        ("H2 = 1e-8", "SF6 = 1e-8", "residual_gas_pa.SF6", "H2"),
        # values out of range
        ("charge = 16", "charge = 19", "target.charge", "1..=18"),
        ("current_a = 0.1", "current_a = -0.1", "beam_trap.current_a", "> 0"),
        ("points = 12", "points = 1", "energy_scan.points", "2..="),
        (
            "resolving_power = 300.0",
            'resolving_power = 300.0\npeak_shape = "lorentzian"',
            "separator.peak_shape",
            "gaussian",
        ),
    ],
)
def test_errors_name_file_line_field_and_what_is_allowed(
    old: str, new: str, field: str, allowed: str
) -> None:
    text = GOOD.replace(old, new)
    msg = error_of(text, "my_run.toml")
    line = line_of(text, new.splitlines()[-1])
    assert msg.startswith("my_run.toml: "), msg
    assert f"line {line}," in msg, msg
    assert f"`{field}`" in msg, msg
    assert allowed in msg, msg


def test_unknown_species_element_is_reported_at_its_line() -> None:
    text = GOOD + '\n[[species]]\nname = "Ar"\n\n[[species]]\nname = "Unobtainium"\n'
    msg = error_of(text)
    line = line_of(text, 'name = "Unobtainium"')
    assert f"line {line}," in msg and "species[1].name" in msg, msg


def test_structural_errors() -> None:
    assert "exactly one of radius_m" in error_of(
        GOOD.replace("length_m = 0.4", "length_m = 0.4\nradius_m = 1e-4")
    )
    assert "missing table [target]" in error_of(GOOD.replace('[target]\nisotope = "40Ar"\ncharge = 16\n', ""))
    assert "exactly one of [beam_trap]" in error_of(GOOD + "\n[electron_impact]\nenergy_ev = 70.0\n")
    assert "line 2" in error_of('[target]\nisotope = "40Ar\n')  # unterminated string
    # the target isotope must come from some species
    msg = error_of(GOOD + '\n[[species]]\nname = "Ne"\n')
    assert "40Ar" in msg and "species" in msg
    # an element alone is ambiguous for a target with several isotopes
    assert "mass number" in error_of(GOOD.replace('"40Ar"', '"Ar"'))


def test_missing_file_is_a_scenario_error(tmp_path: Path) -> None:
    with pytest.raises(cc.ScenarioError, match="cannot read"):
        cc.load_scenario(tmp_path / "nothing.toml")


def test_bundled_scenarios_parse() -> None:
    found = cc.bundled_scenarios()
    assert {"demo", "reference"} <= set(found)
    for path in found.values():
        s = cc.load_scenario(path)
        assert s.target.charge >= 1


def test_reference_file_covers_every_documented_field() -> None:
    doc = cc.scenario.__doc__ or ""
    schema = doc[doc.index("Schema") : doc.index("Examples")]
    fields = set(re.findall(r"``([a-z_0-9]+)``", schema))
    fields -= {
        "log",
        "linear",
        "gaussian",
        "triangular",
        "rectangular",
        "ionization",
        "radiative_recombination",
        "charge_exchange",
        "beam_trap",
        "photon_beam",
        "electron_impact",
    }
    text = cc.bundled_scenarios()["reference"].read_text(encoding="utf-8")
    written = set(re.findall(r"^#?\s*([a-z_0-9]+)\s*=", text, flags=re.M))
    assert fields, "no fields found in the schema documentation"
    assert fields <= written, sorted(fields - written)


@pytest.fixture(scope="module")
def report() -> cc.Report:
    return Scenario.from_text(GOOD, "run.toml").run()


def test_report_parts_are_consistent(report: cc.Report) -> None:
    q = 16
    evo = report.target_evolution
    # The extraction time defaults to the peak of the target on the grid.
    i = int(np.argmax(evo.fractions[:, q]))
    assert report.extraction_time_s == evo.times_s[i]
    assert report.extraction_chosen == "peak of the target"
    assert report.target_peak == (evo.times_s[i], evo.fractions[i, q])
    # The same trap built through the Python API evolves the same fractions …
    beam = cc.ElectronBeam(6000.0, 0.1, current_density_a_cm2=300.0)
    trap = cc.BeamTrap(beam, 0.4, residual_gas_pa={"H2": 1e-8})
    own = trap.evolve("Ar", report.scenario.times_s)
    np.testing.assert_allclose(own.fractions, evo.fractions, rtol=1e-12, atol=1e-300)
    # … and, for a single isotope given alone, the trap's own ions per extraction.
    np.testing.assert_allclose(report.ions.per_charge, trap.ions_per_extraction(evo.fractions[i]), rtol=1e-12)
    assert report.ions.isotope_share == 1.0 and report.ions.species_share_of_charge == 1.0
    # Best energy: the whole map's maximum, and never below the value at the scenario's energy
    # (which is on the grid).
    scan = report.best_energy
    assert scan.best_fraction == scan.fraction.max()
    assert scan.best_fraction >= report.target_peak[1]
    # Ladder rows are the breeding table of the beam.
    step = report.ladder.steps[q - 1]
    assert step.charge == q
    ref = cc.breeding_time_s("Ar", q, energies_ev=6000.0, current_density_a_cm2=300.0)
    assert step.breeding_time_s == pytest.approx(ref, rel=1e-12)
    # The recommendation is the best-scored eligible charge state of the ranking.
    best = next(r for r in report.ranking if r.eligible)
    assert report.recommended is not None and report.recommended.label == best.ion
    assert all(r.fraction >= 1e-3 for r in report.ranking if r.eligible)


def test_progress_is_reported_from_the_energy_scan() -> None:
    calls: list[tuple[int, int, str]] = []
    report = Scenario.from_text(GOOD, "run.toml").run(progress=lambda d, t, w: calls.append((d, t, w)))
    n = len(report.best_energy.energies_ev)
    assert calls[0] == (0, n, "energy scan")
    assert calls[-1] == (n, n, "energy scan")
    assert len(calls) > 2  # reported between chunks of energies, not only at the ends
    assert [c[0] for c in calls] == sorted(c[0] for c in calls)


def test_an_error_in_the_progress_callback_stops_the_run_and_reaches_the_caller() -> None:
    calls: list[int] = []

    def fail(done: int, total: int, what: str) -> None:
        calls.append(done)
        raise RuntimeError("stop")

    with pytest.raises(RuntimeError, match="stop"):
        Scenario.from_text(GOOD, "run.toml").run(progress=fail)
    # The run stopped at the first failure instead of scanning on to the end (Ctrl-C during
    # the CLI's progress bar arrives this way, as KeyboardInterrupt raised in the callback).
    assert calls == [0]
    # The stop request was cleared: the next run completes.
    assert Scenario.from_text(GOOD, "run.toml").run().best_energy is not None


def test_report_text_has_tables_units_and_cautions(report: cc.Report) -> None:
    text = report.text()
    for needle in (
        "IE (eV)",
        "σ Lotz (cm²)",
        "breeding time (s)",
        "jτ (C/cm²)",
        "peak time (s)",
        "Best electron energy",
        "ions per extraction",
        "A/q neighbourhood",
        "Recommended charge state",
        "radiation-safety officer",
        "high voltage",
    ):
        assert needle in text, needle


def test_report_json_is_strict_json(report: cc.Report) -> None:
    d = json.loads(report.to_json())
    assert d["target"] == "40Ar16+"
    assert d["best_energy"]["best_energy_ev"] > 0
    assert d["ions_per_extraction"]["target"] > 0
    assert d["recommended_charge_state"]["charge"] >= 1
    assert "radiation-safety" in d["cautions"]


def test_report_html_and_figures(report: cc.Report, tmp_path: Path) -> None:
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    html = report._repr_html_()
    assert "<pre>" in html and "data:image/png;base64" in html
    files = report.save_plots(tmp_path)
    assert [f.name for f in files] == [
        "evolution.png",
        "breeding_ladder.png",
        "energy_time_map.png",
        "aq_spectrum.png",
    ]
    for f in files:
        assert f.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.parametrize(
    ("name", "needs"), [("photon_beam", "PhotonBeam"), ("electron_impact", "ElectronImpactSource")]
)
def test_other_source_kinds_run(name: str, needs: str) -> None:
    if not hasattr(cc, needs):
        pytest.skip(f"this build has no chargecast.{needs}")
    report = cc.load_scenario(name).run()
    d = json.loads(report.to_json())
    assert d["target"] == report.scenario.target_label
    assert d["aq_neighbourhood"] is not None and d["recommended_charge_state"] is not None
    assert "Cautions" in report.text()


UNREACHABLE = """\
title = "rubidium below its threshold"
[target]
isotope = "97Rb"
charge = 23

[beam_trap]
energy_ev = 1000.0
current_a = 0.05
radius_m = 100e-6
length_m = 0.5

[residual_gas_pa]
H2 = 1e-9

[time]
start_s = 1e-3
stop_s = 10.0
points = 60

[energy_scan]
start_ev = 800.0
stop_ev = 4000.0
points = 8
"""


def test_an_unreachable_target_gives_a_report_json_and_figures(tmp_path: Path) -> None:
    # 97Rb23+ needs 1024 eV (the ionization energy of Rb22+); the beam has 1000 eV.
    path = tmp_path / "rb.toml"
    path.write_text(UNREACHABLE, encoding="utf-8")
    out_json = tmp_path / "rb.json"
    # The CLI lists the warning in the report itself (not again as a Python warning).
    with out_json.open("w", encoding="utf-8") as fh:
        with contextlib.redirect_stdout(fh):
            code = cli.main(["plan", str(path), "--json", "--plot", str(tmp_path / "fig")])
    assert code == 0
    d = json.loads(out_json.read_text(encoding="utf-8"))
    assert d["aq_neighbourhood"] is None
    assert any("no A/q neighbourhood" in n for n in d["notes"])
    assert [w["what"] for w in d["warnings"]] == ["target_threshold"]
    assert sorted(p.name for p in (tmp_path / "fig").iterdir()) == sorted(Path(f).name for f in d["figures"])
    assert len(d["figures"]) == 4
    with pytest.warns(cc.ChargecastWarning):
        text = Scenario.from_text(UNREACHABLE).run().text()
    assert "Warnings" in text and "not computed" in text


def test_steady_state_with_losses_and_no_feed_says_everything_leaks_out() -> None:
    rates = np.array([[0.0, 1.0], [0.0, 0.0]])
    with pytest.raises(cc.InvalidParameterError, match="everything leaks out"):
        cc.steady_state_rate_equations(rates, loss_per_s=np.array([0.0, 0.5]))


def test_bundled_scenarios_raise_no_warning() -> None:
    import warnings

    for name, path in cc.bundled_scenarios().items():
        with warnings.catch_warnings():
            warnings.simplefilter("error", cc.ChargecastWarning)
            report = cc.load_scenario(path).run()
        assert report.warnings == [], name


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"energy_ev": 5000.0, "current_a": 1e-3, "radius_m": 1e-9}, "current density beyond"),
        ({"energy_ev": 1e9, "current_a": 0.5, "radius_m": 250e-6}, "non-relativistic"),
        ({"energy_ev": 1e4, "current_a": 50.0, "radius_m": 0.05}, "perveance limit"),
        ({"energy_ev": 5000.0, "current_a": 0.5, "magnetic_field_t": 3.0}, "Herrmann"),
    ],
)
def test_each_beam_warning_is_raised_when_the_beam_is_built(kwargs: dict[str, float], match: str) -> None:
    with pytest.warns(cc.ChargecastWarning, match=match):
        cc.ElectronBeam(**kwargs)


def test_a_charge_breeder_beam_raises_no_warning() -> None:
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error", cc.ChargecastWarning)
        cc.ElectronBeam(
            energy_ev=3000.0,
            current_a=0.3,
            magnetic_field_t=2.0,
            cathode_radius_m=1e-3,
            cathode_temperature_k=1400.0,
            cathode_field_t=0.05,
        )


def test_sweep_is_labelled_with_units() -> None:
    trap = cc.BeamTrap(cc.ElectronBeam(energy_ev=3000.0, current_a=0.2, current_density_a_cm2=300.0), 0.5)
    out = trap.sweep(["He", "Ne"], [1000.0, 3000.0], np.geomspace(1e-3, 1.0, 5))
    assert out.attrs["units"]["energy_ev"] == "eV"
    if hasattr(out, "data_vars"):
        assert out["fraction"].dims == ("element", "energy_ev", "time_s", "charge")
        assert np.isnan(out["fraction"].sel(element="He", charge=3)).all()
        total = out["fraction"].sum("charge")
    else:
        assert list(out.index.names) == ["element", "energy_ev", "time_s", "charge"]
        # Helium has charges 0…2 only: no padding rows in the frame.
        assert out.xs("He", level="element").index.get_level_values("charge").max() == 2
        total = out["fraction"].groupby(level=["element", "energy_ev", "time_s"]).sum()
    np.testing.assert_allclose(np.asarray(total), 1.0, atol=1e-9)


# ---------------------------------------------------------------- the ion-dynamics model


def _without_feed(text: str) -> str:
    return "\n".join(line for line in text.splitlines() if not line.lstrip().startswith("gas_feed_pa"))


@pytest.fixture(scope="module")
def coolant_reports() -> tuple[cc.Report, cc.Report]:
    """The bundled coolant scenario as it is, and without its nitrogen feed."""
    text = cc.bundled_scenarios()["coolant"].read_text(encoding="utf-8")
    cooled = Scenario.from_text(text, "coolant.toml").run()
    bare = Scenario.from_text(_without_feed(text), "bare.toml").run()
    return cooled, bare


Pair = tuple[cc.Report, cc.Report]


def test_a_light_coolant_raises_the_heavy_targets_fraction(coolant_reports: Pair) -> None:
    # Penetrante et al., Phys. Rev. A 43, 4861 (1991): a light coolant takes heat from the
    # heavy ions and carries it away as it escapes (evaporative cooling), so the heavy ions
    # stay cold and inside the beam and breed further. The expectation is qualitative: a
    # gain in the target's end-time fraction, a lower temperature and a larger overlap.
    # The scenario's residual H2 (1e-8 Pa) makes hydrogen ions in both runs (residual_gas_ions
    # is on by default), a light coolant of its own, so the fed N2 adds to that cooling:
    # measured ×1.21 (×1.58 with the residual gas a charge-exchange target only).
    cooled, bare = coolant_reports
    q = 17
    f = [r.target_evolution.fractions[-1, q] for r in (cooled, bare)]
    assert f[0] > 1.15 * f[1], f
    rows = [next(row for row in r.dynamics.target_rows if row.charge == q) for r in (cooled, bare)]
    assert rows[0].temperature_ev < 0.7 * rows[1].temperature_ev
    assert rows[0].overlap > rows[1].overlap
    # Without the feed no nitrogen appears (only the residual gas's hydrogen); with it,
    # nitrogen ions are made and escape.
    assert bare.dynamics.run.species == ["Ar", "H"]
    n = next(sp for sp in cooled.dynamics.species_rows if sp.label == "N")
    assert n.fed_only and n.ions > 0 and n.escape_per_s > 0
    for r in (cooled, bare):
        assert r.model == "dynamic"
        assert r.dynamics.particle_balance < 1e-9 and r.dynamics.energy_balance < 1e-6


def test_dynamic_report_parts_are_consistent(coolant_reports: Pair) -> None:
    r = coolant_reports[0]
    d = r.dynamics
    run = d.run
    q = 17
    t = run.times_s
    np.testing.assert_array_equal(t, r.scenario.times_s)
    assert d.extraction_time_s == r.extraction_time_s
    # The rows are the histories at the extraction time (here a grid time).
    i = int(np.argmin(abs(t - d.extraction_time_s)))
    row = next(row for row in d.target_rows if row.charge == q)
    assert row.ions == pytest.approx(run.ions("Ar")[i, q], rel=1e-12)
    assert row.temperature_ev == pytest.approx(run.temperatures_ev("Ar")[i, q], rel=1e-12)
    assert row.escape_per_s == pytest.approx(run.escape_per_s("Ar")[i, q], rel=1e-12)
    assert d.compensation == pytest.approx(run.compensation[i], rel=1e-12)
    assert [row.charge for row in d.target_rows] == [15, 16, 17, 18]
    # Fractions are the ion numbers normalised; ions per extraction follow from N.
    n = run.ions("Ar")
    np.testing.assert_allclose(r.target_evolution.fractions, n / n.sum(axis=1, keepdims=True), rtol=1e-12)
    iso = r.ions.isotope_share
    assert iso == pytest.approx(0.996035, rel=1e-4)  # 40Ar natural abundance (from memory: 99.60 %)
    assert r.ions.target == pytest.approx(row.ions * iso, rel=1e-12)
    assert r.ions.compensation == d.compensation
    assert d.injected_atoms == 1e7 and d.gas_feed_pa == {"N2": 2e-9}
    assert "heating" in d.processes and "ionization_heating" not in d.processes
    with pytest.raises(cc.InvalidParameterError, match="the run holds Ar, N"):
        run.ions("Kr")


def test_every_report_names_its_model(report: cc.Report, coolant_reports: Pair) -> None:
    assert report.model == "fixed" and report.dynamics is None
    fixed = cc.report_text.render(report)
    assert "ion model: fixed" in fixed and "Ion dynamics" not in fixed
    d = json.loads(report.to_json())
    assert d["model"] == "fixed" and "dynamics" not in d and d["scenario"]["source"]["model"] == "fixed"
    cooled = coolant_reports[0]
    text = cc.report_text.render(cooled)
    for needle in (
        "ion model: dynamic",
        "Ion dynamics at",
        "leaky-mode delivery of Ar17+",
        "compensation",
        "radial well depth",
        "bookkeeping",
        "N (gas)",
        "A/q spectrum: absolute ions per extraction",
        "the energy scan (best and robust energy) uses the fixed model",
        "Cautions",
    ):
        assert needle in text, needle
    d = json.loads(cooled.to_json())
    assert d["model"] == "dynamic"
    assert d["scenario"]["source"]["gas_feed_pa"] == {"N2": 2e-9}
    dyn = d["dynamics"]
    assert [row["charge"] for row in dyn["target_and_neighbours"]] == [15, 16, 17, 18]
    assert dyn["bookkeeping"]["particle_balance"] < 1e-9
    assert dyn["aq_intensity_unit"].startswith("ions per extraction")


def test_dynamic_figure_and_html(coolant_reports: Pair, tmp_path: Path) -> None:
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    r = coolant_reports[0]
    files = r.save_plots(tmp_path)
    assert [f.name for f in files][-1] == "ion_dynamics.png"
    assert files[-1].read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    ax = cc.report_figures.plot_dynamics(r)
    labels = [ln.get_label() for ln in ax.get_lines() if not ln.get_label().startswith("_")]
    assert labels == ["Ar15+", "Ar16+", "Ar17+ (target)", "Ar18+"]
    assert cc.report_figures.plot_dynamics(coolant_reports[1]) is not None
    assert r._repr_html_().count("data:image/png;base64") == 4
