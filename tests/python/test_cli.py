"""The command line: ``python -m chargecast …`` and the ``chargecast`` console script."""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

import chargecast as cc

PNG = b"\x89PNG\r\n\x1a\n"


def run(*args: str, script: bool = False, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    exe = [shutil.which("chargecast") or "chargecast"] if script else [sys.executable, "-m", "chargecast"]
    env = dict(os.environ, MPLBACKEND="Agg")
    return subprocess.run(
        exe + list(args), capture_output=True, text=True, timeout=120, env=env, cwd=cwd, encoding="utf-8"
    )


def test_demo_prints_the_whole_report() -> None:
    r = run("demo")
    assert r.returncode == 0, r.stderr
    out = r.stdout
    demo = cc.load_scenario("demo")
    # evolution, best energy, ions per extraction, A/q neighbourhood, recommendation, cautions
    for needle in (
        "Charge-state evolution",
        "Best electron energy",
        "Ions per extraction",
        f"A/q neighbourhood of {demo.target_label}",
        "Recommended charge state",
        "Cautions",
    ):
        assert needle in out, needle
    assert out.index("A/q neighbourhood") < out.index("Recommended charge state") < out.index("Cautions")
    assert r.stderr == ""  # no progress bar when stderr is not a terminal


def test_plan_json_and_plots(tmp_path: Path) -> None:
    scenario = tmp_path / "run.toml"
    scenario.write_text(cc.bundled_scenarios()["reference"].read_text(encoding="utf-8"), encoding="utf-8")
    r = run("plan", str(scenario), "--json", "--plot", str(tmp_path / "figs"))
    assert r.returncode == 0, r.stderr
    d = json.loads(r.stdout)
    assert d["target"] == cc.load_scenario(scenario).target_label
    for key in (
        "breeding_ladder",
        "evolution",
        "best_energy",
        "ions_per_extraction",
        "aq_neighbourhood",
        "recommended_charge_state",
        "cautions",
    ):
        assert d[key], key
    names = sorted(Path(f).name for f in d["figures"])
    assert names == ["aq_spectrum.png", "breeding_ladder.png", "energy_time_map.png", "evolution.png"]
    for f in d["figures"]:
        data = Path(f).read_bytes()
        assert data[:8] == PNG and len(data) > 5000


def test_console_script_runs_plan_and_example(tmp_path: Path) -> None:
    if shutil.which("chargecast") is None:
        pytest.skip("the chargecast console script is not on PATH (package not installed)")
    r = run("example", "demo", script=True)
    assert r.returncode == 0 and "[target]" in r.stdout
    (tmp_path / "mine.toml").write_text(r.stdout, encoding="utf-8")
    r = run("plan", "mine.toml", "--plot", "figs", script=True, cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    assert "Recommended charge state" in r.stdout
    assert (tmp_path / "figs" / "evolution.png").read_bytes()[:8] == PNG


def test_scenario_error_exit_status_and_message(tmp_path: Path) -> None:
    bad = tmp_path / "bad.toml"
    bad.write_text(
        '[target]\nisotope = "129Xe"\ncharge = 43\n\n[beam_trap]\nenergy_ev = "high"\n', encoding="utf-8"
    )
    r = run("plan", str(bad))
    assert r.returncode == 2
    assert "bad.toml" in r.stderr and "line 6" in r.stderr and "beam_trap.energy_ev" in r.stderr
    assert r.stdout == ""


def test_element_and_example_listing() -> None:
    r = run("element", "xenon")
    assert r.returncode == 0 and "Xenon (Xe, Z = 54" in r.stdout and "53+ → 54+" in r.stdout
    r = run("example")
    assert r.returncode == 0 and "demo" in r.stdout and "reference" in r.stdout
    r = run("element", "Qq")
    assert r.returncode == 1 and "unknown element" in r.stderr


def test_progress_bar_draws_only_when_enabled() -> None:
    import io

    from chargecast.cli import ProgressBar

    quiet = io.StringIO()
    ProgressBar(quiet)(1, 4, "energy scan")
    assert quiet.getvalue() == ""  # a StringIO is not a terminal
    loud = io.StringIO()
    bar = ProgressBar(loud, enabled=True)
    bar(2, 4, "energy scan")
    assert "energy scan" in loud.getvalue() and "2/4" in loud.getvalue()
    bar(4, 4, "energy scan")
    assert loud.getvalue().endswith("\r")
