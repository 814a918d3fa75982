"""The ``[plasma]`` scenario through the planner, the CLI report and its JSON; the report's
numbers against a direct :class:`chargecast.PlasmaSource` built from keyword arguments."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import chargecast as cc

PNG = b"\x89PNG\r\n\x1a\n"

# The bundled plasma.toml written out by hand (not read back from the scenario).
SETTINGS = dict(
    electron_temperature_ev=1500.0,
    hot_electron_temperature_ev=2e4,
    hot_electron_fraction=0.1,
    electron_density_cm3=2e11,
    ion_temperature_ev=1.0,
    confinement_time_s=1e-3,
    confinement_exponent=1.0,
    gas_feed_pa={"Ar": 5e-7, "O2": 2e-6},
    residual_gas_pa={"H2": 1e-7, "H2O": 3e-8},
    wall_recycling=0.3,
    plasma_volume_m3=1e-3,
    extraction_fraction=0.5,
)


def cli(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ, MPLBACKEND="Agg")
    return subprocess.run(
        [sys.executable, "-m", "chargecast", *args],
        capture_output=True,
        text=True,
        timeout=300,
        env=env,
        cwd=cwd,
        encoding="utf-8",
    )


@pytest.fixture(scope="module")
def report() -> cc.Report:
    return cc.load_scenario("plasma").run()


def test_report_currents_equal_a_direct_plasma_source(report: cc.Report) -> None:
    assert report.model == "plasma_balance"
    direct = cc.PlasmaSource(**SETTINGS)
    p = report.plasma
    assert [e.symbol for e in p.elements] == direct.elements
    for e in p.elements:
        state = direct.steady_state(e.symbol)
        np.testing.assert_allclose(e.currents_eua, state.currents_eua, rtol=1e-12, atol=0)
        np.testing.assert_allclose(e.fractions, state.fractions, rtol=1e-12, atol=1e-300)
        assert e.residual == state.residual
    ar = direct.steady_state("Ar")
    # 40Ar is 99.6 % of natural argon (IUPAC abundances, from memory).
    assert p.target_current_eua == pytest.approx(0.996 * ar.currents_eua[10], rel=1e-3)
    # The analysed-beam lines carry eµA: the target line is the target current.
    lines = report.aq_lines
    i = list(lines.label).index("40Ar10+")
    assert float(lines.intensity[i]) == pytest.approx(p.target_current_eua, rel=1e-12)
    assert report.ions is None and report.extraction_time_s is None


def test_text_and_json_carry_the_same_numbers(report: cc.Report) -> None:
    text = report.text()
    for needle in (
        "Source: plasma ion source",
        "plasma_balance",
        "Extracted currents at steady state (eµA",
        "Best cold electron temperature",
        "A/q neighbourhood of 40Ar10+",
        "Cautions",
        "high voltage",
    ):
        assert needle in text, needle
    p = report.plasma
    assert f"40Ar10+: {p.target_current_eua:.4g} eµA" in text
    d = json.loads(report.to_json())
    assert d["model"] == "plasma_balance"
    assert d["scenario"]["source"]["kind"] == "plasma"
    assert d["scenario"]["source"]["gas_feed_pa"] == {"Ar": 5e-7, "O2": 2e-6}
    jp = d["plasma"]
    assert jp["target_current_eua"] == pytest.approx(p.target_current_eua, rel=1e-15)
    ar = next(e for e in jp["elements"] if e["symbol"] == "Ar")
    cur = p.elements[0].currents_eua
    assert ar["currents_eua"]["10+"] == pytest.approx(float(cur[10]), rel=1e-15)
    assert "high voltage" in d["cautions"]


def test_example_plasma_runs_with_its_figures(tmp_path: Path) -> None:
    r = cli("example", "plasma")
    assert r.returncode == 0 and "[plasma]" in r.stdout
    (tmp_path / "p.toml").write_text(r.stdout, encoding="utf-8")
    r = cli("plan", "p.toml", "--json", "--plot", "figs", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    d = json.loads(r.stdout)
    assert d["plasma"]["elements"][0]["symbol"] == "Ar"
    names = sorted(Path(f).name for f in d["figures"])
    assert "analysed_beam.png" in names and "aq_spectrum.png" in names
    for f in d["figures"]:
        path = Path(f) if Path(f).is_absolute() else tmp_path / f
        assert path.read_bytes()[:8] == PNG


def test_a_bad_plasma_value_names_line_key_and_range(tmp_path: Path) -> None:
    text = cc.bundled_scenarios()["plasma"].read_text(encoding="utf-8")
    bad = tmp_path / "bad.toml"
    bad.write_text(text.replace("wall_recycling = 0.3", "wall_recycling = 1.7"), encoding="utf-8")
    with pytest.raises(cc.ScenarioError, match=r"line \d+, field `plasma.wall_recycling`.*0\.\.=1"):
        cc.load_scenario(bad)
