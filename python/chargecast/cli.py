"""The ``chargecast`` command line.

::

    chargecast demo [--json] [--plot DIR]          run the bundled invented scenario
    chargecast plan FILE.toml [--json] [--plot DIR]
    chargecast example [NAME]                      print a bundled scenario to start from
    chargecast element SYMBOL                      ionization energies of an element

Exit status: 0 on success, 2 for a scenario or usage error, 1 for any other chargecast
error. Errors go to stderr; a progress bar is drawn on stderr during long steps when it is
a terminal.
"""

from __future__ import annotations

import argparse
import sys
import time
from collections.abc import Sequence
from pathlib import Path
from typing import Any, TextIO

from chargecast import __version__
from chargecast._core import ChargecastError, ScenarioError


class ProgressBar:
    """A one-line progress bar on a terminal stream; silent when the stream is not a terminal."""

    def __init__(self, stream: TextIO | None = None, enabled: bool | None = None, width: int = 30) -> None:
        self.stream = stream if stream is not None else sys.stderr
        isatty = getattr(self.stream, "isatty", None)
        self.enabled = bool(isatty and isatty()) if enabled is None else enabled
        self.width = width
        self.start = time.monotonic()
        self.drawn = False

    def __call__(self, done: int, total: int, what: str) -> None:
        if not self.enabled or total <= 0:
            return
        filled = int(self.width * done / total)
        bar = "█" * filled + "·" * (self.width - filled)
        elapsed = time.monotonic() - self.start
        self.stream.write(f"\r{what:<14} [{bar}] {done}/{total} {elapsed:5.1f} s")
        self.stream.flush()
        self.drawn = True
        if done >= total:
            self.close()

    def close(self) -> None:
        if self.drawn:
            self.stream.write("\r" + " " * (self.width + 40) + "\r")
            self.stream.flush()
            self.drawn = False


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="chargecast",
        description="Plan an ion-source run: charge-state evolution, best energy, ions per extraction, "
        "and the A/q neighbourhood of the target.",
        epilog="Start from a bundled scenario: chargecast example demo > my_run.toml; edit it; "
        "chargecast plan my_run.toml --plot figures/",
    )
    p.add_argument("--version", action="version", version=f"chargecast {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    def report_options(sp: argparse.ArgumentParser) -> None:
        sp.add_argument("--json", action="store_true", help="print the report as JSON instead of text")
        sp.add_argument("--plot", metavar="DIR", help="write PNG figures into DIR (created if missing)")
        sp.add_argument("--no-progress", action="store_true", help="no progress bar on stderr")

    demo = sub.add_parser("demo", help="run the bundled invented demo scenario")
    report_options(demo)
    plan = sub.add_parser("plan", help="run a scenario file and print the report")
    plan.add_argument("file", metavar="FILE.toml", help="scenario file (see: chargecast example)")
    report_options(plan)
    ex = sub.add_parser("example", help="print a bundled scenario (TOML) to start your own from")
    ex.add_argument("name", nargs="?", default=None, help="scenario name; without it, list them")
    el = sub.add_parser("element", help="ionization energies and subshells of an element")
    el.add_argument("element", help='symbol, name or Z, e.g. "Xe", "xenon", 54')
    return p


def _run_report(path: str, args: argparse.Namespace, out: TextIO) -> int:
    from chargecast.scenario import load_scenario

    scenario = load_scenario(path)
    bar = ProgressBar(enabled=False if args.no_progress else None)
    try:
        report = scenario.run(progress=bar)
    finally:
        bar.close()
    figures: list[Path] = []
    if args.plot:
        import matplotlib

        matplotlib.use("Agg")
        figures = report.save_plots(args.plot)
    if args.json:
        import json

        d = report.to_dict()
        d["figures"] = [str(f) for f in figures]
        out.write(json.dumps(d, indent=2, allow_nan=False) + "\n")
    else:
        out.write(report.text() + "\n")
        if figures:
            out.write("\nFigures\n" + "".join(f"  {f}\n" for f in figures))
    return 0


def _example(name: str | None, out: TextIO) -> int:
    from chargecast.scenario import bundled_scenarios

    found = bundled_scenarios()
    if name is None:
        out.write("bundled scenarios (print one with: chargecast example NAME > my_run.toml)\n")
        for key, path in found.items():
            first = next(
                (ln for ln in path.read_text(encoding="utf-8").splitlines() if ln.startswith("title")), ""
            )
            out.write(f"  {key:<18} {first.partition('=')[2].strip().strip(chr(34))}\n")
        return 0
    if name not in found:
        raise ScenarioError(f"no bundled scenario {name!r}: allowed {', '.join(found)}")
    out.write(found[name].read_text(encoding="utf-8"))
    return 0


def _element(query: str, out: TextIO) -> int:
    from chargecast.atoms import element

    try:
        key: Any = int(query)
    except ValueError:
        key = query
    el = element(key)
    out.write(f"{el.name} ({el.symbol}, Z = {el.z}, {el.atomic_weight_u:.6g} u)\n")
    out.write(f"{'step':>10}  {'IE (eV)':>10}  {'threshold (eV)':>14}  {'electron removed':>16}\n")
    total = 0.0
    for q, ie in enumerate(el.ionization_energies_ev):
        total += float(ie)
        try:
            shell = el.ion(q).ionized_subshell or "–"
        except ChargecastError:
            shell = "–"
        out.write(f"{f'{q}+ → {q + 1}+':>10}  {ie:>10.6g}  {total:>14.7g}  {shell:>16}\n")
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``chargecast`` console script; returns the exit status.

    Parameters
    ----------
    argv : sequence of str, optional
        Arguments without the program name; default ``sys.argv[1:]``.

    Returns
    -------
    int
        0 on success, 2 for a scenario or usage error, 1 for other chargecast errors.

    Examples
    --------
    >>> main(["element", "He"])
    Helium (He, Z = 2, 4.0026 u)
          step     IE (eV)  threshold (eV)  electron removed
       0+ → 1+     24.5874        24.58739                1s
       1+ → 2+     54.4178        79.00515                1s
    0
    """
    args = _parser().parse_args(argv)
    out = sys.stdout
    if hasattr(out, "reconfigure"):
        try:
            out.reconfigure(errors="replace")
        except (AttributeError, ValueError):  # pragma: no cover - exotic streams
            pass
    try:
        if args.command == "demo":
            from chargecast.scenario import bundled_scenarios

            return _run_report(str(bundled_scenarios()["demo"]), args, out)
        if args.command == "plan":
            return _run_report(args.file, args, out)
        if args.command == "example":
            return _example(args.name, out)
        if args.command == "element":
            return _element(args.element, out)
        _parser().print_help(out)
        return 2
    except ScenarioError as exc:
        sys.stderr.write(f"chargecast: scenario error: {exc}\n")
        return 2
    except ChargecastError as exc:
        sys.stderr.write(f"chargecast: error: {exc}\n")
        return 1
    except BrokenPipeError:  # pragma: no cover - e.g. piped into head
        return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
