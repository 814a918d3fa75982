"""Figures of a :class:`chargecast.Report` (matplotlib): evolution, single-collision
yields, breeding ladder, energy × time map and the A/q neighbourhood.

The figures reuse the plots of the result classes (Evolution, EnergyScan, LineList,
AppearanceCurves); each is built from the report's arrays by ONE small function below, so
only those change when the bindings do. Nothing here computes physics.
"""

from __future__ import annotations

import math
import os
from pathlib import Path
from typing import Any

import numpy as np

from chargecast._util import PALETTE, require_pyplot
from chargecast.report_text import source_line

__all__ = [
    "plot_analysed_beam",
    "plot_dynamics",
    "plot_energy_map",
    "plot_evolution",
    "plot_ladder",
    "plot_spectrum",
    "plot_yields",
    "save_plots",
]


# ---------------------------------------------------------------- result classes from the report


def _evolution(report: Any) -> Any:
    """The target species' evolution as an :class:`chargecast.Evolution` (None without one)."""
    e = report.target_evolution
    return None if e is None else report.evolution(e.name)


def _energy_scan(report: Any) -> Any:
    """The energy × time map as an EnergyScan (PhotonEnergyScan for a photon beam)."""
    return report.energy_scan()


def _appearance_curves(report: Any) -> Any:
    """The single-collision energy scan as :class:`chargecast.AppearanceCurves`."""
    return report.energy_scan()


def _line_list(report: Any) -> Any:
    """The report's A/q lines as a :class:`chargecast.LineList`."""
    from chargecast.spectrum import LineList

    c = report.aq_lines
    names = ("label", "isotope", "z", "mass_number", "charge", "mass_u", "m_over_q", "a_over_q", "intensity")
    return LineList._from_core({**{n: getattr(c, n) for n in names}, "residual": c.residual})


# ---------------------------------------------------------------- figures


def _axes(ax: Any) -> Any:
    if ax is None:
        _, ax = require_pyplot().subplots(figsize=(8, 4.5))
    return ax


def plot_evolution(report: Any, ax: Any | None = None) -> Any:
    """The target element's charge states as a map over log time (colour = fraction), the
    target's row framed with its fraction as a curve, a side panel of the target and its
    neighbours, and the extraction time marked.

    Returns
    -------
    matplotlib Axes
        The map's axes.
    """
    evo = _evolution(report)
    if evo is None:
        return plot_yields(report, ax)
    ax = _axes(ax)
    q = int(report.scenario.target.charge)
    kind = report.scenario.source.kind
    label = "exposure time (s)" if kind == "photon_beam" else "confinement time (s)"
    # Rows: every state that reaches 1 %, and a few either side of the target.
    shown = set(evo.dominant_charges(0.01)) | set(range(max(0, q - 3), min(evo.z, q + 3) + 1))
    evo.plot(ax=ax, charges=sorted(shown), target=q, time_label=label)
    _shade_band(report, ax)
    t_ex = report.extraction_time_s
    if t_ex is None:
        # A plasma extracts continuously: its evolution is the switch-on.
        ax.set_title(
            f"{evo.element} charge states after switch-on, target {q}+ framed ({source_line(report)})",
            fontsize=10,
            pad=16,
        )
        return ax
    ax.axvline(t_ex, color="white", lw=1.2, ls=":")
    ax.annotate(
        f"extraction {t_ex:.3g} s",
        (t_ex, 1.0),
        xycoords=("data", "axes fraction"),
        textcoords="offset points",
        xytext=(0, 4),
        ha="center",
        va="bottom",
        fontsize=8,
    )
    ax.set_title(
        f"{evo.element} charge states, target {q}+ framed ({source_line(report)})", fontsize=10, pad=16
    )
    return ax


def _shade_band(report: Any, ax: Any) -> None:
    """The ``[uncertainty]`` band (5–95 %) of the target's fraction, shaded in the side
    panel of the evolution figure, its median dashed."""
    u = report.uncertainty
    if u is None or not ax.child_axes:
        return
    side = ax.child_axes[0]
    t = np.asarray(report.target_evolution.times_s)
    lo, mid, hi = np.asarray(u.target_fraction)
    ok = t > 0
    q = int(report.scenario.target.charge)
    label = f"{q}+: 5–95 % of {u.samples} samples"
    side.fill_between(t[ok], lo[ok], hi[ok], color=PALETTE[3], alpha=0.25, lw=0, label=label)
    side.plot(t[ok], mid[ok], color="black", lw=0.8, ls=":", label="median")
    side.legend(fontsize=6, loc="upper left", frameon=False)


def plot_yields(report: Any, ax: Any | None = None) -> Any:
    """Single-collision charge yields of every species (grouped bars, log scale).

    Returns
    -------
    matplotlib Axes
    """
    ax = _axes(ax)
    q = int(report.scenario.target.charge)
    yields = report.fractions_at_extraction
    names = report.species_names
    top = max(int(np.flatnonzero(y > 0).max()) if (y > 0).any() else 1 for y in yields.values())
    qs = np.arange(1, top + 1)
    width = 0.8 / max(1, len(names))
    floor = min(float(y[y > 0].min()) for y in yields.values() if (y > 0).any())
    for k, name in enumerate(names):
        y = yields[name][1 : top + 1]
        ax.bar(
            qs + (k - (len(names) - 1) / 2) * width,
            np.where(y > 0, y, np.nan),
            width,
            color=PALETTE[k % len(PALETTE)],
            label=name,
        )
    ax.set_yscale("log")
    ax.set_ylim(floor / 3, 1.5)
    ax.set_xticks(qs)
    ax.set_xticklabels([f"{c}+" + (" (target)" if c == q else "") for c in qs])
    ax.set_xlabel("charge state")
    ax.set_ylabel("fraction of the ions made")
    ax.legend(fontsize=8, frameon=False, title="species")
    ax.set_title(
        f"charge yields of one {report.scenario.source.energy_ev:g} eV electron collision", fontsize=10
    )
    return ax


def plot_ladder(report: Any, ax: Any | None = None) -> Any:
    """Stepwise breeding: σ of each step (Lotz, or photoionization for a photon beam) and the
    time to reach each charge state (the σ panel alone for a single-collision source).

    Returns
    -------
    matplotlib Axes (the breeding-time axis)
    """
    plt = require_pyplot()
    lad = report.ladder
    q = int(report.scenario.target.charge)
    charge = np.array([st.charge for st in lad.steps], dtype=float)
    sigma = np.array([st.cross_section_cm2 for st in lad.steps], dtype=float)
    t = np.array(
        [np.nan if st.breeding_time_s is None else st.breeding_time_s for st in lad.steps], dtype=float
    )
    kind = report.scenario.source.kind
    times_known = bool(np.isfinite(t).any())
    if ax is None and times_known:
        fig, (ax_s, ax) = plt.subplots(2, 1, figsize=(8, 5.5), sharex=True, height_ratios=[1, 1.3])
    elif ax is None:
        fig, ax_s = plt.subplots(figsize=(8, 3.5))
        ax = None
    else:
        fig, ax_s = ax.figure, None
    if ax_s is not None:
        ok = sigma > 0
        ax_s.semilogy(charge[ok], sigma[ok], "o-", color=PALETTE[0], ms=3, lw=1)
        what = {"photon_beam": "photoionization σ", "plasma": "Maxwellian ⟨σv⟩/⟨v⟩"}.get(kind, "Lotz σ")
        ax_s.set_ylabel(f"{what} of step\n(q−1)+ → q+ (cm²)")
        if ax is None:
            ax_s.set_xlabel("charge state q")
        j, e = lad.current_density_a_cm2, lad.energy_ev
        sym = report.scenario.target.symbol
        title = {
            "beam_trap": f"stepwise breeding of {sym} at {e:.5g} eV, {j or 0:.4g} A/cm² (ionization only)",
            "photon_beam": f"stepwise photoionization of {sym} at {e:.5g} eV (one charge per photon)",
            "electron_impact": f"ionization steps of {sym}: Lotz cross sections at {e:.5g} eV",
            "plasma": f"stepwise ionization of {sym} in the plasma, kT_e {e:.5g} eV (ionization only)",
        }[kind]
        ax_s.set_title(title, fontsize=10)
        from matplotlib.ticker import MaxNLocator

        ax_s.xaxis.set_major_locator(MaxNLocator(integer=True))
        ax_s.grid(True, which="major", alpha=0.3)
        ax_s.axvline(q, color=PALETTE[3], lw=1, ls="--", label=f"target {q}+")
    if ax is None:
        ax_s.legend(fontsize=8, frameon=False)
        fig.tight_layout()
        return ax_s
    ok = np.isfinite(t) & (t > 0)
    if ok.any():
        ax.semilogy(
            charge[ok], t[ok], "o-", color=PALETTE[0], ms=3, lw=1, label="time to reach q+ from the neutral"
        )
    blocked = np.isinf(t)
    if blocked.any():
        ax.plot(
            charge[blocked],
            np.full(int(blocked.sum()), np.nanmax(t[ok]) if ok.any() else 1.0),
            "x",
            color=PALETTE[3],
            ms=8,
            label="not reached: beam energy below the step's threshold",
        )
    ax.axvline(q, color=PALETTE[3], lw=1, ls="--", label=f"target {q}+")
    t_ex = report.extraction_time_s
    if t_ex is not None and math.isfinite(t_ex):
        ax.axhline(t_ex, color="black", lw=1, ls=":", label=f"extraction time {t_ex:.3g} s")
    ax.set_xlabel("charge state q")
    ax.set_ylabel("stepwise breeding time (s)")
    ax.grid(True, which="major", alpha=0.3)
    ax.legend(fontsize=8, frameon=True, framealpha=0.9, loc="lower right")
    fig.tight_layout()
    return ax


def plot_energy_map(report: Any, ax: Any | None = None) -> Any:
    """Target fraction over beam energy and time, the scenario's energy marked (for a
    single collision: the appearance curves, the target bold and its best energy starred).

    Returns
    -------
    matplotlib Axes
    """
    src = report.scenario.source
    sc = report.best_energy
    if sc.kind == "appearance":
        return _plot_appearance(report, ax)
    ax = _energy_scan(report).plot(ax=ax)
    if src.kind == "photon_beam":
        ax.set_xlabel("exposure time (s)")
    if src.kind == "plasma":
        ax.set_xlabel("time after switch-on (s)")
        ax.set_ylabel("cold electron temperature kT_e (eV)")
    own = (src.energy_ev, src.photon_energy_ev, src.electron_temperature_ev)
    energy = next(e for e in own if e is not None)
    ax.axhline(energy, color="white", lw=1, ls="--")
    ax.annotate(
        f"scenario: {energy:.4g} eV",
        (ax.get_xlim()[0], energy),
        textcoords="offset points",
        xytext=(4, 3),
        color="white",
        fontsize=8,
    )
    ro = report.robust_optimum
    if ro is not None:
        # A second, distinct marker (open circle, not the sharp optimum's star).
        ax.plot(
            [ro.time_s],
            [ro.energy_ev],
            marker="o",
            markersize=11,
            markerfacecolor="none",
            markeredgecolor=PALETTE[5],
            markeredgewidth=2,
            linestyle="none",
            label=f"over the {ro.spread_ev:.3g} eV spread: {ro.energy_ev:.4g} eV, {ro.time_s:.3g} s",
        )
        ax.legend(loc="lower left", fontsize=8)
    return ax


def _plot_appearance(report: Any, ax: Any | None) -> Any:
    sc = report.best_energy
    q = int(report.scenario.target.charge)
    ax = _appearance_curves(report).plot(ax=ax)
    for line in ax.get_lines():
        if line.get_label() == f"{q}+":
            line.set_linewidth(2.6)
    if sc.best_cross_section_cm2 > 0:
        ax.plot(
            [sc.best_energy_ev],
            [sc.best_cross_section_cm2],
            "*",
            color=PALETTE[1],
            markersize=13,
            markeredgecolor="black",
            linestyle="none",
            label=f"best for {q}+: {sc.best_energy_ev:.4g} eV",
        )
    own = sc.own_energy_ev
    ax.axvline(own, color="black", lw=1, ls=":", label=f"scenario: {own:.4g} eV")
    ax.legend(fontsize=7, loc="center left", bbox_to_anchor=(1.0, 0.5), frameon=False)
    # Plain numbers on an energy axis spanning a decade or two read better than powers of ten.
    from matplotlib.ticker import FuncFormatter

    ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    ax.xaxis.set_minor_formatter(FuncFormatter(lambda v, _: f"{v:g}" if str(f"{v:g}")[0] in "25" else ""))
    return ax


def plot_spectrum(report: Any, ax: Any | None = None) -> Any:
    """The A/q neighbourhood of the target at the separator's resolving power, the
    recommended charge state marked.

    Returns
    -------
    matplotlib Axes
    """
    lines = _line_list(report)
    o = report.neighbourhood
    s = report.scenario
    r = float(s.separator.resolving_power)
    # Without a target line (the target is not made) centre on its nominal A/q.
    centre = o.m_over_q if o is not None else s.target.mass_number / s.target.charge
    lo, hi = centre * (1 - 4.5 / r), centre * (1 + 4.5 / r)
    rec = report.recommended
    if rec is not None:
        lo, hi = min(lo, rec.m_over_q * (1 - 3 / r)), max(hi, rec.m_over_q * (1 + 3 / r))
    ax = lines.plot(
        ax=ax,
        resolving_power=r,
        target=(s.target.isotope, int(s.target.charge)) if o is not None else None,
        shape=s.separator.peak_shape,
        m_over_q_range=(lo, hi),
    )
    # Labels of lines too weak to see only collide at the baseline; the table lists them.
    shown = (lines.m_over_q >= lo) & (lines.m_over_q <= hi)
    ymax = max((float(v) for v in lines.intensity[shown]), default=0.0)
    for text in list(ax.texts):
        xy = getattr(text, "xy", None)
        if xy is not None and xy[1] < 0.03 * ymax:
            text.remove()
    if o is None:
        ax.set_title(f"A/q near {s.target.label}: the target is not made at this setting", fontsize=10)
        ax.legend(fontsize=8, frameon=False, loc="upper left", bbox_to_anchor=(1.0, 1.0))
        return ax
    ax.axvspan(*o.window, color=PALETTE[3], alpha=0.12, lw=0, label="target acceptance window")
    if rec is not None and rec.label != o.target:
        i = int(np.flatnonzero(lines.label == rec.label)[0])
        height = float(lines.intensity[i])
        ax.vlines([rec.m_over_q], 0.0, height, color=PALETTE[4], lw=2.2, label="recommended")
        ax.annotate(
            f"recommended {rec.label}",
            (rec.m_over_q, height),
            textcoords="offset points",
            xytext=(0, 16),
            ha="center",
            fontsize=8,
            color=PALETTE[4],
            arrowprops={"arrowstyle": "->", "color": PALETTE[4]},
        )
    top = max((float(np.max(ln.get_ydata())) for ln in ax.get_lines() if len(ln.get_ydata())), default=ymax)
    ax.set_ylim(0.0, 1.12 * max(top, ymax, 1e-300))
    ax.legend(fontsize=8, frameon=False, loc="upper left", bbox_to_anchor=(1.0, 1.0))
    ax.set_title(f"A/q neighbourhood of {o.target} at R = {r:g}", fontsize=10)
    if report.plasma is not None:
        ax.set_ylabel("extracted current (eµA)")
    return ax


def plot_analysed_beam(report: Any, ax: Any | None = None) -> Any:
    """A plasma source's analysed beam: extracted current (eµA) against A/q over every line
    (fed, mixing and residual gas) at the separator's resolving power, the target marked.

    Returns
    -------
    matplotlib Axes
    """
    lines = _line_list(report)
    s = report.scenario
    r = float(s.separator.resolving_power)
    a_q = lines.m_over_q
    lo, hi = float(np.min(a_q)) * (1 - 5 / r), float(np.max(a_q)) * (1 + 5 / r)
    ax = lines.plot(
        ax=ax,
        resolving_power=r,
        target=(s.target.isotope, int(s.target.charge)) if report.neighbourhood is not None else None,
        shape=s.separator.peak_shape,
        m_over_q_range=(lo, hi),
    )
    ymax = float(np.max(lines.intensity)) if len(lines.intensity) else 0.0
    for text in list(ax.texts):
        xy = getattr(text, "xy", None)
        if xy is not None and xy[1] < 0.05 * ymax:
            text.remove()
    ax.set_ylabel("extracted current (eµA)")
    ax.set_title(f"analysed beam at R = {r:g} ({source_line(report)})", fontsize=10)
    ax.legend(fontsize=8, frameon=False, loc="upper left", bbox_to_anchor=(1.0, 1.0))
    return ax


def plot_dynamics(report: Any, ax: Any | None = None) -> Any:
    """Ion dynamics (model "dynamic"): kT of the target charge and its neighbours against
    time (log-log), and their overlap with the beam; the extraction time marked.

    Without ``ax`` two stacked panels (kT above, overlap below); with ``ax`` one panel, kT
    on the left axis as solid lines and the overlap on a right axis as dotted lines.

    Parameters
    ----------
    report : chargecast.Report
        A report of a beam trap run with the dynamic model.
    ax : matplotlib Axes, optional

    Returns
    -------
    matplotlib Axes or None
        The kT axes; None for a report without the dynamic model.
    """
    d = report.dynamics
    if d is None:
        return None
    plt = require_pyplot()
    if ax is None:
        fig, (ax, ax_o) = plt.subplots(2, 1, figsize=(8, 5.5), sharex=True, height_ratios=[1.4, 1])
        overlap_style = "-"
    else:
        fig, ax_o = ax.figure, ax.twinx()
        overlap_style = ":"
    q = int(report.scenario.target.charge)
    label = d.target_species
    run = d.run
    t = run.times_s
    kt = run.temperatures_ev(label)
    ov = run.overlap(label)
    n = run.ions(label)
    charges = [row.charge for row in d.target_rows]
    # Our look: the target black and heavy, neighbours below it in warm, above it in cool
    # tones of the project palette; a population is drawn only where it holds ions.
    below, above = [PALETTE[3], PALETTE[1]], [PALETTE[0], PALETTE[5]]
    for c in charges:
        k = c - q
        colour = "black" if k == 0 else (below[(-k - 1) % 2] if k < 0 else above[(k - 1) % 2])
        width = 2.4 if k == 0 else 1.2
        present = n[:, c] > 1e-6 * max(float(n[:, c].max()), 1e-300)
        kt_c = np.where(present, kt[:, c], np.nan)
        ov_c = np.where(present, ov[:, c], np.nan)
        name = f"{label}{c}+" + (" (target)" if k == 0 else "")
        z = 3 if k == 0 else 2  # the target on top of its neighbours
        ax.plot(t, kt_c, "-", color=colour, lw=width, label=name, zorder=z)
        ax_o.plot(t, ov_c, overlap_style, color=colour, lw=width, label=name, zorder=z)
    ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_ylabel("kT (eV)")
    ax_o.set_ylabel("overlap with the beam")
    ax_o.set_ylim(0.0, 1.05)
    t_ex = d.extraction_time_s
    for a in (ax, ax_o):
        a.axvline(t_ex, color="grey", lw=1, ls="--")
    ax.grid(True, which="major", alpha=0.3)
    ax.legend(fontsize=8, frameon=False, loc="upper left")
    bottom = ax_o if overlap_style == "-" else ax
    bottom.set_xlabel("confinement time (s)")
    if overlap_style == "-":
        ax_o.set_xscale("log")
        ax_o.grid(True, which="major", alpha=0.3)
        ax_o.annotate(
            f"extraction {t_ex:.3g} s",
            (t_ex, 0.05),
            textcoords="offset points",
            xytext=(4, 0),
            fontsize=8,
            color="grey",
        )
    feed = ", ".join(f"{k} {v:.2g} Pa" for k, v in d.gas_feed_pa.items()) or "no gas fed"
    ax.set_title(
        f"{label} ion temperatures and overlap near {q}+ ({feed}; {source_line(report)})",
        fontsize=10,
    )
    if overlap_style == "-":
        fig.tight_layout()
    return ax


def save_plots(report: Any, directory: str | os.PathLike, dpi: int = 120) -> list[Path]:
    """Write the report's figures as PNG files.

    Parameters
    ----------
    report : chargecast.Report
    directory : str or path-like
        Created if missing.
    dpi : int
        Resolution.

    Returns
    -------
    list of pathlib.Path
        ``evolution.png``, ``breeding_ladder.png``, ``energy_time_map.png``, ``aq_spectrum.png``,
        ``ion_dynamics.png`` for a report of the dynamic model, ``analysed_beam.png`` for
        a plasma source.
    """
    plt = require_pyplot()
    out = Path(directory)
    out.mkdir(parents=True, exist_ok=True)
    written = []
    figures = [
        ("evolution", plot_evolution),
        ("breeding_ladder", plot_ladder),
        ("energy_time_map", plot_energy_map),
        ("aq_spectrum", plot_spectrum),
    ]
    if report.dynamics is not None:
        figures.append(("ion_dynamics", plot_dynamics))
    if report.plasma is not None:
        figures.append(("analysed_beam", plot_analysed_beam))
    for name, plot in figures:
        if name in ("breeding_ladder", "ion_dynamics"):
            ax = plot(report)
        else:
            _, ax0 = plt.subplots(figsize=(8, 4.5))
            ax = plot(report, ax=ax0)
        path = out / f"{name}.png"
        ax.figure.savefig(path, dpi=dpi, bbox_inches="tight")
        plt.close(ax.figure)
        written.append(path)
    return written
