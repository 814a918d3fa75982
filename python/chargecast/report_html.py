"""The HTML view of a :class:`chargecast.Report` (for notebooks): its text and figures."""

from __future__ import annotations

import html
from typing import Any

from chargecast import report_figures
from chargecast._util import inline_png
from chargecast.report_text import render

__all__ = ["to_html"]


def to_html(report: Any) -> str:
    """The report as an HTML fragment: title, the text report, three inline PNG figures
    (four for the dynamic model: kT and overlap against time)."""
    s = report.scenario
    parts = [f"<h4>{html.escape(s.title or s.file)}</h4>", f"<pre>{html.escape(render(report))}</pre>"]
    plots = [report_figures.plot_evolution, report_figures.plot_energy_map, report_figures.plot_spectrum]
    if report.dynamics is not None:
        plots.append(report_figures.plot_dynamics)
    for plot in plots:
        parts.append(inline_png(lambda ax=None, plot=plot: plot(report, ax=ax), figsize=(7, 3.8)))
    return "".join(parts)
