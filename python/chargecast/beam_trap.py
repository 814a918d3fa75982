"""Electron-beam ion traps: charge-state evolution, steady state, best energy, ions per
extraction, and many traps at once. The classes are the compiled ones; EnergyScan adds its
figure, table and HTML view."""

from __future__ import annotations

import html
from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, inline_png, require_pyplot

BeamTrap = _core.BeamTrap
evolve_batch = _core.evolve_batch


class EnergyScan(_core.EnergyScan):
    """Fraction of target charge state(s) over an energy × time grid, and its maximum.

    Made by ``BeamTrap.best_energy``: ``element``, ``charges``, ``energies_ev``,
    ``times_s``, ``fraction[energy, time]``, ``best_energy_ev``, ``best_time_s``,
    ``best_fraction``.
    """

    __slots__ = ()

    def _target(self) -> str:
        return "+".join(f"{q}+" for q in self.charges)

    def plot(self, ax: Optional[Any] = None) -> Any:
        """Energy × time map of the target fraction (log time axis), best point marked.

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(7, 4.5))
        t = np.where(self.times_s > 0, self.times_s, np.nan)
        mesh = ax.pcolormesh(t, self.energies_ev, self.fraction, shading="nearest", cmap="viridis", vmin=0)
        ax.figure.colorbar(mesh, ax=ax, label=f"fraction of {self.element}{self._target()}")
        ax.plot(
            [self.best_time_s],
            [self.best_energy_ev],
            marker="*",
            color=PALETTE[1],
            markersize=14,
            markeredgecolor="black",
            linestyle="none",
            label=f"best: {self.best_energy_ev:.4g} eV, {self.best_time_s:.3g} s ({self.best_fraction:.2f})",
        )
        ax.set_xscale("log")
        if self.energies_ev.max() / max(self.energies_ev.min(), 1e-300) > 20:
            ax.set_yscale("log")
        ax.set_xlabel("confinement time (s)")
        ax.set_ylabel("electron energy (eV)")
        ax.set_title(f"{self.element}{self._target()} over energy and time", fontsize=10)
        ax.legend(loc="lower left", fontsize=8)
        return ax

    def _repr_html_(self) -> str:
        head = html.escape(
            f"{self.element}{self._target()}: best {self.best_energy_ev:.4g} eV at "
            f"{self.best_time_s:.3g} s, fraction {self.best_fraction:.3f}"
        )
        return f"<b>{head}</b>" + inline_png(self.plot)

    def __repr__(self) -> str:
        return (
            f"EnergyScan({self.element}{self._target()}: best_energy_ev={self.best_energy_ev:.4g}, "
            f"best_time_s={self.best_time_s:.3g}, best_fraction={self.best_fraction:.3f})"
        )


_core._register_result("EnergyScan", EnergyScan)
