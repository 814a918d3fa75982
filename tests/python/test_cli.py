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


# --- file problems never lose the computed report (issue 15, item 6) -----------------------

FIGURES = ["aq_spectrum.png", "breeding_ladder.png", "energy_time_map.png", "evolution.png"]


def one_line_errors(stderr: str) -> list[str]:
    """The error lines of a run; fails on a traceback."""
    assert "Traceback" not in stderr, stderr
    lines = [ln for ln in stderr.splitlines() if ln.strip()]
    assert all(ln.startswith("chargecast: ") for ln in lines), stderr
    return lines


def assert_report_printed(r: subprocess.CompletedProcess[str]) -> None:
    assert "Recommended charge state" in r.stdout, r.stderr


def test_plot_into_an_existing_file_keeps_the_report_and_the_file(tmp_path: Path) -> None:
    existing = tmp_path / "notes.txt"
    existing.write_text("mine", encoding="utf-8")
    r = run("demo", "--plot", str(existing))
    assert r.returncode == 1
    assert_report_printed(r)
    (line,) = one_line_errors(r.stderr)
    assert "not a directory" in line and "notes.txt" in line
    assert existing.read_text(encoding="utf-8") == "mine"


def test_plot_into_dev_null_is_one_error_and_json_is_still_printed() -> None:
    r = run("demo", "--json", "--plot", "/dev/null")
    assert r.returncode == 1
    assert json.loads(r.stdout)["recommended_charge_state"]
    (line,) = one_line_errors(r.stderr)
    assert "/dev/null" in line and "not a directory" in line


def test_read_only_directory_gives_one_line_per_figure(tmp_path: Path) -> None:
    if os.geteuid() == 0:
        # chmod does not stop root; /proc/self is a directory no one can create files in.
        target = "/proc/self"
    else:
        ro = tmp_path / "ro"
        ro.mkdir()
        ro.chmod(0o555)
        target = str(ro)
    r = run("demo", "--plot", target)
    assert r.returncode == 1
    assert_report_printed(r)
    lines = one_line_errors(r.stderr)
    assert len(lines) == 4 and all("cannot write" in ln for ln in lines), lines
    assert "Figures" not in r.stdout


def test_a_directory_named_like_a_figure_is_refused_and_the_rest_written(tmp_path: Path) -> None:
    (tmp_path / "evolution.png").mkdir()
    r = run("demo", "--plot", str(tmp_path))
    assert r.returncode == 1
    assert_report_printed(r)
    (line,) = one_line_errors(r.stderr)
    assert "evolution.png" in line and "a directory" in line
    assert (tmp_path / "evolution.png").is_dir()
    for name in FIGURES[:3]:
        assert (tmp_path / name).read_bytes()[:8] == PNG
    assert sorted(p.name for p in tmp_path.iterdir()) == FIGURES  # no temporary files left


def test_a_symlinked_figure_is_refused_and_its_target_untouched(tmp_path: Path) -> None:
    outside = tmp_path / "precious.txt"
    outside.write_bytes(b"do not overwrite")
    figs = tmp_path / "figs"
    figs.mkdir()
    (figs / "evolution.png").symlink_to(outside)
    r = run("demo", "--plot", str(figs))
    assert r.returncode == 1
    assert_report_printed(r)
    (line,) = one_line_errors(r.stderr)
    assert "evolution.png" in line and "symbolic link" in line
    assert outside.read_bytes() == b"do not overwrite"
    assert (figs / "evolution.png").is_symlink()
    assert (figs / "aq_spectrum.png").read_bytes()[:8] == PNG


def test_a_hard_linked_figure_is_replaced_without_touching_the_other_name(tmp_path: Path) -> None:
    other = tmp_path / "other.bin"
    other.write_bytes(b"keep")
    figs = tmp_path / "figs"
    figs.mkdir()
    os.link(other, figs / "evolution.png")
    r = run("demo", "--plot", str(figs))
    assert r.returncode == 0, r.stderr
    assert other.read_bytes() == b"keep"
    assert (figs / "evolution.png").read_bytes()[:8] == PNG


def test_existing_figures_are_replaced(tmp_path: Path) -> None:
    (tmp_path / "evolution.png").write_bytes(b"old")
    r = run("demo", "--plot", str(tmp_path))
    assert r.returncode == 0, r.stderr
    assert (tmp_path / "evolution.png").read_bytes()[:8] == PNG
    assert "Figures" in r.stdout


def test_empty_plot_directory_is_a_usage_error() -> None:
    r = run("demo", "--plot", "")
    assert r.returncode == 2
    (line,) = one_line_errors(r.stderr)
    assert "--plot" in line and "directory" in line
    assert r.stdout == ""


def test_over_long_names_give_one_line(tmp_path: Path) -> None:
    long_dir = str(tmp_path / ("d" * 300))
    r = run("demo", "--plot", long_dir)
    assert r.returncode == 1
    assert_report_printed(r)
    (line,) = one_line_errors(r.stderr)
    assert "too long" in line.lower() and len(line) < 200
    r = run("plan", str(tmp_path / ("s" * 300 + ".toml")))
    assert r.returncode == 2
    (line,) = one_line_errors(r.stderr)
    assert "cannot read" in line and len(line) < 200


def test_plan_dev_zero_is_refused_at_once() -> None:
    r = run("plan", "/dev/zero")
    assert r.returncode == 2
    (line,) = one_line_errors(r.stderr)
    assert "1 MiB" in line


def test_a_scenario_of_more_than_a_mebibyte_is_refused(tmp_path: Path) -> None:
    big = tmp_path / "big.toml"
    big.write_text("# " + "x" * cc._core.MAX_SCENARIO_BYTES + "\n", encoding="utf-8")
    with pytest.raises(cc.ScenarioError, match="1 MiB"):
        cc.load_scenario(big)
    # The core refuses the same text given directly.
    with pytest.raises(cc.ScenarioError, match="too large"):
        cc.Scenario.from_text(big.read_text(encoding="utf-8"), "big.toml")


# --- Ctrl-C (issue 15, item 3) -------------------------------------------------------------


def test_ctrl_c_during_a_long_scenario_exits_130_without_traceback(tmp_path: Path) -> None:
    import signal
    import time

    text = cc.bundled_scenarios()["demo"].read_text(encoding="utf-8")
    # The demo with a fine time grid and energy scan: about 18 s of work on the development
    # machine, 0.7 GB (2 000 scan points took only 2-3 s, so a fast machine could finish before
    # the signal and exit 0).
    assert "points = 300" in text and "[energy_scan]" not in text
    slow = tmp_path / "slow.toml"
    slow.write_text(
        text.replace("points = 300", "points = 2000") + "\n[energy_scan]\npoints = 20000\n", "utf-8"
    )
    env = dict(os.environ, MPLBACKEND="Agg")
    proc = subprocess.Popen(
        [sys.executable, "-m", "chargecast", "plan", str(slow)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
    )
    try:
        time.sleep(2.0)
        assert proc.poll() is None, "the slow scenario finished before the signal"
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=120)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.communicate()
    assert proc.returncode == 130, err
    assert "Traceback" not in err
    assert err.strip().splitlines() == ["chargecast: interrupted"], err


def test_a_scenario_with_a_list_of_80000_entries_is_refused_by_line_with_a_short_message() -> None:
    """Once quadratic (15 s): a line count from the start of the text for every field."""
    text = cc.bundled_scenarios()["demo"].read_text(encoding="utf-8")
    assert "aq_range = [2.85, 3.05]" in text
    long = text.replace("aq_range = [2.85, 3.05]", "aq_range = [" + ", ".join(["2.9"] * 80_000) + "]")
    line = next(i for i, ln in enumerate(long.splitlines(), 1) if ln.startswith("aq_range"))
    with pytest.raises(cc.ScenarioError) as info:
        cc.Scenario.from_text(long, "long.toml")
    msg = str(info.value)
    assert f"line {line}" in msg and "a list of 80000 numbers" in msg and len(msg) < 250, msg[:300]
    bad = text.replace('isotope = "129Xe"', 'isotope = "' + "Q" * 400_000 + '"')
    with pytest.raises(cc.ScenarioError) as info:
        cc.Scenario.from_text(bad, "name.toml")
    assert "target.isotope" in str(info.value) and len(str(info.value)) < 400


def test_a_scenario_beyond_the_memory_limit_is_refused_before_running() -> None:
    text = cc.bundled_scenarios()["demo"].read_text(encoding="utf-8")
    huge = text.replace("points = 300", "points = 100000") + "\n[energy_scan]\npoints = 100000\n"
    with pytest.raises(cc.ScenarioError, match=r"energy_scan\.points.*limit"):
        cc.Scenario.from_text(huge, "huge.toml")
    before = cc.memory_limit_bytes()
    try:
        cc.set_memory_limit_bytes(200 << 30)  # raised by the user: the same file is accepted
        assert cc.Scenario.from_text(huge, "huge.toml").energy_scan.points == 100000
    finally:
        cc.set_memory_limit_bytes(before)


def test_a_full_stdout_is_one_line_error() -> None:
    if not Path("/dev/full").exists():
        pytest.skip("no /dev/full")
    env = dict(os.environ, MPLBACKEND="Agg")
    with open("/dev/full", "w") as full:
        cmd = [sys.executable, "-m", "chargecast", "demo"]
        r = subprocess.run(cmd, stdout=full, stderr=subprocess.PIPE, text=True, env=env)
    assert r.returncode == 1
    (line,) = one_line_errors(r.stderr)
    assert "cannot write the report" in line


def test_the_coolant_scenario_by_name_reports_its_dynamics(tmp_path: Path) -> None:
    r = run("plan", "coolant", "--json", "--plot", str(tmp_path / "figs"))
    assert r.returncode == 0, r.stderr
    d = json.loads(r.stdout)
    assert d["model"] == "dynamic" and d["scenario"]["source"]["model"] == "dynamic"
    assert d["dynamics"]["gas_feed_pa"] == {"N2": 2e-9}
    # The fed N2's nitrogen and the residual H2's hydrogen (residual_gas_ions by default).
    assert {row["label"] for row in d["dynamics"]["species"]} == {"Ar", "N", "H"}
    names = sorted(Path(f).name for f in d["figures"])
    assert names == sorted(
        ["aq_spectrum.png", "breeding_ladder.png", "energy_time_map.png", "evolution.png", "ion_dynamics.png"]
    )
    assert "radiation-safety" in d["cautions"]
