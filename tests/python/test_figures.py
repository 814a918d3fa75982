"""Every figure renders to PNG without a matplotlib warning, on every bundled scenario and
on the photon-beam and electron-impact results; axes name the right quantity and legends
list only what is drawn.

Set ``CHARGECAST_FIGURES_DIR`` to keep the PNGs (default: pytest's tmp path)."""

from __future__ import annotations

import os
import warnings
from pathlib import Path

import numpy as np
import pytest

import chargecast as cc

matplotlib = pytest.importorskip("matplotlib")
matplotlib.use("Agg")
plt = pytest.importorskip("matplotlib.pyplot")


@pytest.fixture()
def outdir(tmp_path: Path) -> Path:
    keep = os.environ.get("CHARGECAST_FIGURES_DIR")
    return Path(keep) if keep else tmp_path


@pytest.mark.parametrize("name", sorted(cc.bundled_scenarios()))
def test_report_figures_render_without_warnings(name: str, outdir: Path) -> None:
    report = cc.load_scenario(cc.bundled_scenarios()[name]).run()
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        files = report.save_plots(outdir / name)
    # Four figures for every report; the dynamic trap model adds kT and overlap, a plasma
    # source the analysed beam over its whole A/q range.
    assert len(files) == (5 if report.model in ("dynamic", "plasma_balance") else 4)
    for f in files:
        assert f.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n", f
        assert f.stat().st_size > 5000, f


def test_evolution_map_marks_the_target_and_never_overlaps_labels(outdir: Path) -> None:
    trap = cc.BeamTrap(
        cc.ElectronBeam(energy_ev=12000.0, current_a=0.3, current_density_a_cm2=400.0), length_m=0.5
    )
    evo = trap.evolve("Kr", np.geomspace(1e-4, 100.0, 200))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ax = evo.plot(target=26)
        fig = ax.figure
        fig.savefig(outdir / "evolution_map_kr.png", dpi=110, bbox_inches="tight")
    assert ax.get_xlabel() == "confinement time (s)"
    assert ax.get_ylabel() == "charge state q"
    assert ax.collections[0].get_cmap().name == "cividis"
    side = [a for a in ax.child_axes if a.get_title().startswith("26+ and neighbours")][0]
    labels = [t for t in side.texts]
    assert sorted(t.get_text() for t in labels) == ["24+", "25+", "26+", "27+", "28+"]
    fig.canvas.draw()
    # The text's own box (an annotation's extent also holds its connector line).
    from matplotlib.text import Text

    boxes = [Text.get_window_extent(t) for t in labels]
    for i, a in enumerate(boxes):
        for b in boxes[i + 1 :]:
            assert not a.overlaps(b), (a, b)
    plt.close(fig)


def test_photon_beam_time_axis_is_exposure_time(outdir: Path) -> None:
    beam = cc.PhotonBeam(photon_energy_ev=1500.0, flux_cm2_s=1e22)
    evo = beam.evolve("Ne", np.geomspace(1e-6, 10.0, 60))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ax = evo.plot(target=8)
        ax.figure.savefig(outdir / "evolution_map_photon.png", dpi=100, bbox_inches="tight")
    assert ax.get_xlabel() == "exposure time (s)"
    plt.close(ax.figure)


def test_aq_legend_lists_only_classes_that_are_drawn(outdir: Path) -> None:
    # 20Ne1+ and a residual-gas 40Ar2+ line 1e-9 as strong at the same A/q: too weak to see.
    lines = cc.aq_lines({"20Ne": {1: 1.0}}, residual_gas={"Ar": (1e-9, {2: 1.0})})
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        ax = lines.plot(resolving_power=50, target=("20Ne", 1))
        ax.figure.savefig(outdir / "aq_legend.png", dpi=90, bbox_inches="tight")
    names = [t.get_text() for t in ax.get_legend().get_texts()]
    assert "residual gas" not in names and "interferer" not in names, names
    assert "target" in names
    plt.close(ax.figure)
