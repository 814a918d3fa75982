"""The ``chargecast`` command line.

::

    chargecast demo [--json] [--plot DIR]          run the bundled invented scenario
    chargecast plan FILE.toml [--json] [--plot DIR]
    chargecast example [NAME]                      print a bundled scenario to start from
    chargecast element SYMBOL                      ionization energies of an element

Exit status: 0 on success, 2 for a scenario or usage error, 1 for any other chargecast
error or a figure that could not be written, 130 after Ctrl-C. Errors go to stderr, one
line each; a progress bar is drawn on stderr during long steps when it is a terminal.

A computed report is never lost to a file problem: the text (or JSON) goes to stdout
first, then each figure is written into ``--plot DIR``; each figure that cannot be written
gets a one-line error and the exit status 1. Only chargecast's own figure names in DIR are
written, each through a new file renamed over the old one, and an existing entry of that
name that is a symbolic link, a directory or any other non-regular file is refused, so no
link is followed out of DIR and no other file is overwritten.
"""

from __future__ import annotations

import argparse
import os
import shutil
import stat
import sys
import tempfile
import time
import warnings
from collections.abc import Sequence
from pathlib import Path
from typing import Any, TextIO

from chargecast import __version__
from chargecast._core import ChargecastError, ChargecastWarning, ScenarioError
from chargecast.scenario import _short


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
        sp.add_argument(
            "--plot",
            metavar="DIR",
            help="write PNG figures into DIR (created if missing; only chargecast's own "
            "figure names in it are written)",
        )
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


def _why(exc: OSError) -> str:
    return exc.strerror or type(exc).__name__


class _Refused(Exception):
    """A figure path chargecast will not write (it is not one of its own regular files)."""


def _install(data: bytes, dir_fd: int, name: str) -> None:
    """Write ``data`` as ``name`` in the directory open as ``dir_fd``.

    An existing entry is replaced only if it is a regular file: the bytes go to a new file
    created beside it (never through a link) and renamed over it, which replaces the
    directory entry itself, so a link or hard link to another file leaves that file alone.
    """
    try:
        st = os.stat(name, dir_fd=dir_fd, follow_symlinks=False)
    except FileNotFoundError:
        st = None
    if st is not None and not stat.S_ISREG(st.st_mode):
        kind = (
            "a symbolic link"
            if stat.S_ISLNK(st.st_mode)
            else "a directory"
            if stat.S_ISDIR(st.st_mode)
            else "not a regular file"
        )
        raise _Refused(f"{kind}; chargecast only replaces its own regular figure files")
    tmp = f".{name}.{os.getpid()}.tmp"
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_NOFOLLOW, 0o644, dir_fd=dir_fd)
    try:
        with os.fdopen(fd, "wb") as f:
            f.write(data)
        os.replace(tmp, name, src_dir_fd=dir_fd, dst_dir_fd=dir_fd)
    except BaseException:
        try:
            os.unlink(tmp, dir_fd=dir_fd)
        except OSError:
            pass
        raise


def _render_figures(report: Any, staging: Path) -> list[Path]:
    """Draw the report's figures into the private directory ``staging``."""
    import matplotlib

    matplotlib.use("Agg")
    return report.save_plots(staging)


def _write_figures(rendered: list[Path], directory: str, err: TextIO) -> tuple[list[Path], int]:
    """Copy the rendered figures into ``directory``; one error line per figure not written."""
    written: list[Path] = []
    failed = 0
    target = Path(directory)
    try:
        target.mkdir(parents=True, exist_ok=True)
        dir_fd = os.open(target, os.O_RDONLY | os.O_DIRECTORY)
    except FileExistsError:
        err.write(f"chargecast: error: --plot {_short(directory)}: not a directory; no figures written\n")
        return written, len(rendered)
    except OSError as exc:
        err.write(f"chargecast: error: --plot {_short(directory)}: {_why(exc)}; no figures written\n")
        return written, len(rendered)
    try:
        for src in rendered:
            path = target / src.name
            try:
                _install(src.read_bytes(), dir_fd, src.name)
                written.append(path)
            except _Refused as exc:
                failed += 1
                err.write(f"chargecast: error: not writing {_short(str(path))}: {exc}\n")
            except OSError as exc:
                failed += 1
                err.write(f"chargecast: error: cannot write {_short(str(path))}: {_why(exc)}\n")
    finally:
        os.close(dir_fd)
    return written, failed


def _run_report(path: str, args: argparse.Namespace, out: TextIO) -> int:
    from chargecast.scenario import load_scenario

    if args.plot is not None and not args.plot.strip():
        raise _Usage("--plot needs a directory: give DIR (created if missing), e.g. --plot figures")
    scenario = load_scenario(path)
    bar = ProgressBar(enabled=False if args.no_progress else None)
    try:
        # The report lists its plausibility warnings in its own section: not twice.
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", ChargecastWarning)
            report = scenario.run(progress=bar)
    finally:
        bar.close()
    status = 0
    staging: str | None = None
    try:
        rendered: list[Path] = []
        if args.plot:
            try:
                staging = tempfile.mkdtemp(prefix="chargecast-")
                rendered = _render_figures(report, Path(staging))
            except (ChargecastError, ImportError, OSError) as exc:
                sys.stderr.write(f"chargecast: error: the figures could not be drawn: {_clip(exc)}\n")
                status = 1
        planned = [Path(args.plot) / f.name for f in rendered]
        # The report first: whatever happens to the figures, it is not lost.
        if args.json:
            import json

            d = report.to_dict()
            d["figures"] = [str(f) for f in planned]
            out.write(json.dumps(d, indent=2, allow_nan=False) + "\n")
        else:
            out.write(report.text() + "\n")
        out.flush()
        if rendered:
            written, failed = _write_figures(rendered, args.plot, sys.stderr)
            if failed:
                status = 1
            if written and not args.json:
                out.write("\nFigures\n" + "".join(f"  {f}\n" for f in written))
                out.flush()
    finally:
        if staging is not None:
            shutil.rmtree(staging, ignore_errors=True)
    return status


def _clip(exc: BaseException) -> str:
    """An exception's message on one line."""
    return " ".join(str(exc).split())[:300]


class _Usage(Exception):
    """A command-line option with a value that is not allowed (exit status 2)."""


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
        0 on success, 2 for a scenario or usage error, 1 for other chargecast errors and
        figures that could not be written, 130 after Ctrl-C.

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
    except _Usage as exc:
        sys.stderr.write(f"chargecast: error: {exc}\n")
        return 2
    except ScenarioError as exc:
        sys.stderr.write(f"chargecast: scenario error: {exc}\n")
        return 2
    except ChargecastError as exc:
        sys.stderr.write(f"chargecast: error: {exc}\n")
        return 1
    except KeyboardInterrupt:
        sys.stderr.write("\nchargecast: interrupted\n")
        return 130
    except BrokenPipeError:  # pragma: no cover - e.g. piped into head
        return 0
    except OSError as exc:  # the report's own stream failed (a full disk behind stdout)
        sys.stderr.write(f"chargecast: error: cannot write the report: {exc.strerror or _clip(exc)}\n")
        return 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
