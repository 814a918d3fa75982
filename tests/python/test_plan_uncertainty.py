"""The ``[uncertainty]`` scenario table: 5/50/95 % ranges in the report, its text and JSON,
checked against numpy's percentiles of the same Monte Carlo samples drawn through
``BeamTrap.evolve(..., samples=N)``, and the shaded evolution figure."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

import chargecast as cc

SCENARIO = """
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
samples = 48
seed = 5
ionization_factor = 1.4
"""


@pytest.fixture(scope="module")
def report() -> cc.Report:
    return cc.Scenario.from_text(SCENARIO, "u.toml").run()


def test_bands_equal_numpy_percentiles_of_the_same_samples(report: cc.Report) -> None:
    u = report.uncertainty
    assert (u.samples, u.seed) == (48, 5)
    assert u.factors["ionization_factor"] == 1.4
    trap = cc.BeamTrap(
        cc.ElectronBeam(energy_ev=5000.0, current_a=0.1, radius_m=50e-6),
        length_m=0.5,
        residual_gas_pa={"H2": 1e-8},
        ion_temperature_ev=report.scenario.source.ion_temperature_ev,
    )
    t = report.scenario.times_s
    bands = trap.evolve("Ar", t, samples=48, seed=5, factors=dict(u.factors))
    # numpy's default (linear) percentiles of the samples' peaks.
    np.testing.assert_allclose(u.peak_fraction, bands.peak_fraction(16), rtol=1e-12)
    np.testing.assert_allclose(u.peak_time_s, bands.peak_time_s(16), rtol=1e-12)
    np.testing.assert_allclose(
        np.asarray(u.target_fraction), np.percentile(bands.samples[:, :, 16], [5, 50, 95], axis=0), atol=1e-13
    )
    lo, mid, hi = u.ions_per_extraction
    assert lo <= report.ions.target <= hi and lo < mid < hi


def test_text_json_and_figure_show_the_ranges(report: cc.Report, tmp_path: Path) -> None:
    text = report.text()
    assert "Uncertainty of 40Ar16+ (Monte Carlo over the process rates, 48 samples, seed 5)" in text
    assert f"{report.uncertainty.peak_fraction[2]:.4f}" in text
    d = json.loads(report.to_json())
    assert d["uncertainty"]["percentiles"] == [5, 50, 95]
    ions = list(report.uncertainty.ions_per_extraction)
    assert d["uncertainty"]["ions_per_extraction"] == pytest.approx(ions)
    pytest.importorskip("matplotlib")
    ax = report.plot()
    side = ax.child_axes[0]
    assert any("5–95 %" in str(c.get_label()) for c in side.collections)
