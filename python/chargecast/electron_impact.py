"""The single-collision electron-impact source: the charge yields of one collision with the
neutral atom and the appearance curves of an energy scan. The classes are the compiled ones;
the result classes add tables and figures."""

from __future__ import annotations

import html
from typing import Any

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, inline_png, require_pandas, require_pyplot

ElectronImpactSource = _core.ElectronImpactSource
appearance_curves = _core.appearance_curves


class ChargeYields(_core.ChargeYields):
    """Charge states one electron collision makes from the neutral atom.

    Made by ``ElectronImpactSource.charge_yields``: ``element``, ``energy_ev``,
    ``energy_spread_ev``, ``charges`` (1 … highest with a non-zero cross section),
    ``cross_section_cm2``, ``subshell_ionization_cm2``, ``direct_double_cm2``,
    ``direct_triple_cm2``, ``yields`` and ``ratio(charge, reference=1)``.
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """One row per charge.

        Returns
        -------
        pandas.DataFrame
            Columns ``cross_section_cm2``, ``subshell_ionization_cm2``, ``direct_double_cm2``,
            ``direct_triple_cm2``, ``yield``; index ``charge``.
        """
        pd = require_pandas()
        return pd.DataFrame(
            {
                "cross_section_cm2": self.cross_section_cm2,
                "subshell_ionization_cm2": self.subshell_ionization_cm2,
                "direct_double_cm2": self.direct_double_cm2,
                "direct_triple_cm2": self.direct_triple_cm2,
                "yield": self.yields,
            },
            index=pd.Index(self.charges, name="charge"),
        )

    def plot(self, ax: Any | None = None) -> Any:
        """Bar chart of the relative yields (log scale).

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(6, 3.5))
        ax.bar(self.charges, np.where(self.yields > 0, self.yields, np.nan), color=PALETTE[0])
        ax.set_yscale("log")
        ax.set_xticks(self.charges)
        ax.set_xticklabels([f"{q}+" for q in self.charges])
        ax.set_xlabel("charge")
        ax.set_ylabel("relative yield")
        spread = f" ± {self.energy_spread_ev:g}" if self.energy_spread_ev > 0 else ""
        ax.set_title(f"{self.element}, one {self.energy_ev:g}{spread} eV electron collision", fontsize=10)
        return ax

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{q}+</td><td>{s:.3e}</td><td>{y:.4f}</td></tr>"
            for q, s, y in zip(self.charges, self.cross_section_cm2, self.yields)
        )
        head = html.escape(f"{self.element}: one collision at {self.energy_ev:g} eV")
        return (
            f"<b>{head}</b><table><tr><th>charge</th><th>σ (cm²)</th><th>yield</th></tr>{rows}</table>"
            + inline_png(self.plot)
        )

    def __repr__(self) -> str:
        ys = ", ".join(f"{q}+: {y:.3g}" for q, y in zip(self.charges, self.yields) if y > 1e-4)
        return f"ChargeYields({self.element!r}, {self.energy_ev:g} eV: {ys})"


class AppearanceCurves(_core.AppearanceCurves):
    """Partial cross sections of each charge against electron energy (one collision).

    Made by :func:`appearance_curves`: ``element``, ``energies_ev``, ``energy_spread_ev``,
    ``charges`` (1 … highest seen in the scan), ``cross_section_cm2`` [E, len(charges)] and
    ``appearance_energy_ev(charge)``.
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """Cross sections (cm²): one row per energy (index ``energy_ev``), one column per charge.

        Returns
        -------
        pandas.DataFrame
        """
        pd = require_pandas()
        df = pd.DataFrame(
            self.cross_section_cm2, index=pd.Index(self.energies_ev, name="energy_ev"), columns=self.charges
        )
        df.columns.name = "charge"
        return df

    def plot(self, ax: Any | None = None) -> Any:
        """Partial cross sections against electron energy, log–log.

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(7, 4.5))
        for k, q in enumerate(self.charges):
            y = self.cross_section_cm2[:, k]
            ax.plot(
                self.energies_ev, np.where(y > 0, y, np.nan), color=PALETTE[k % len(PALETTE)], label=f"{q}+"
            )
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlabel("electron energy (eV)")
        ax.set_ylabel("partial cross section (cm²)")
        ax.set_title(f"{self.element} appearance curves (one collision)", fontsize=10)
        if len(self.charges) <= 24:
            ax.legend(
                fontsize=7,
                ncol=max(1, len(self.charges) // 12 + 1),
                loc="center left",
                bbox_to_anchor=(1.0, 0.5),
                frameon=False,
            )
        ax.grid(True, which="major", alpha=0.3)
        return ax

    def _repr_html_(self) -> str:
        head = html.escape(
            f"{self.element} appearance curves, {len(self.energies_ev)} energies "
            f"{self.energies_ev.min():g}–{self.energies_ev.max():g} eV"
        )
        rows = "".join(
            f"<tr><td>{q}+</td><td>{self.appearance_energy_ev(int(q)):.4g}</td></tr>" for q in self.charges
        )
        return (
            f"<b>{head}</b><table><tr><th>charge</th><th>first scanned energy with σ &gt; 0 (eV)</th></tr>"
            f"{rows}</table>" + inline_png(self.plot)
        )

    def __repr__(self) -> str:
        return (
            f"AppearanceCurves({self.element!r}, {len(self.energies_ev)} energies, "
            f"charges 1..{self.charges[-1]})"
        )


_core._register_result("ChargeYields", ChargeYields)
_core._register_result("AppearanceCurves", AppearanceCurves)
