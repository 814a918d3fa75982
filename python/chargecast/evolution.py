"""The result of a charge-state evolution: fractions of every charge state over time."""

from __future__ import annotations

import html
from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, inline_png, require_pandas, require_pyplot

# Yellow is hard to see as a thin line on white: curves use the rest of the palette.
LINE_COLORS = [c for c in PALETTE if c != "#F0E442"]


class Evolution(_core.Evolution):
    """Charge-state fractions of one element over confinement time.

    Made by ``BeamTrap.evolve``, ``PhotonBeam.evolve`` and ``evolve_batch``, or directly
    from arrays. ``times_s``, ``charges``, ``fractions`` [T, Z+1], ``element``, ``label``,
    ``z``; ``mean_charge()``, ``peak(q)``, ``at(t)``, ``dominant_charges()``, ``summary()``
    are computed in the core; this class adds tables and figures.

    Parameters
    ----------
    element : str or int
        Element symbol, name or Z, e.g. ``"Kr"``.
    times_s : array_like, shape (T,)
        Output times (s), ascending.
    fractions : array_like, shape (T, Z+1)
        Population of each charge state 0 … Z at each time (sums to 1 without losses).
    label : str, optional
        Description of the source settings, used in plots and tables.

    Examples
    --------
    >>> import numpy as np
    >>> evo = Evolution("He", np.array([0.0, 1.0]), np.array([[1.0, 0.0, 0.0], [0.2, 0.5, 0.3]]))
    >>> evo.mean_charge().tolist()
    [0.0, 1.1]
    >>> evo.peak(1)
    (1.0, 0.5)
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """The fractions as a DataFrame: one row per time (index ``time_s``), one column per charge.

        Returns
        -------
        pandas.DataFrame
        """
        pd = require_pandas()
        df = pd.DataFrame(self.fractions, index=pd.Index(self.times_s, name="time_s"), columns=self.charges)
        df.columns.name = "charge"
        return df

    def plot(
        self, ax: Optional[Any] = None, charges: Optional[list[int]] = None, threshold: float = 0.01
    ) -> Any:
        """Fractions against time on a log time axis.

        Parameters
        ----------
        ax : matplotlib Axes, optional
            Where to draw; a new figure otherwise.
        charges : list of int, optional
            Which charge states to draw; by default those exceeding ``threshold``.
        threshold : float
            Smallest peak fraction for a charge state to be drawn by default.

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(7.5, 4.5))
        qs = charges if charges is not None else self.dominant_charges(threshold)
        styles = ["-", "--", "-.", ":"]
        positive = self.times_s > 0
        for k, q in enumerate(qs):
            self.peak(q)  # the core checks the charge state
            t, f = self.times_s[positive], self.fractions[positive, q]
            ax.plot(
                t,
                f,
                styles[(k // len(LINE_COLORS)) % 4],
                color=LINE_COLORS[k % len(LINE_COLORS)],
                label=f"{q}+",
            )
            if f.size == 0:  # only t = 0 on the grid: nothing to show on a log axis
                continue
            i = int(np.argmax(f))
            if f[i] > 0.05:
                ax.annotate(
                    f"{q}+", (t[i], f[i]), textcoords="offset points", xytext=(0, 3), ha="center", fontsize=7
                )
        ax.set_xscale("log")
        ax.set_xlabel("confinement time (s)")
        ax.set_ylabel("fraction of ions")
        ax.set_ylim(0, 1.05)
        ax.set_title(
            f"{self.element} charge-state evolution" + (f" — {self.label}" if self.label else ""), fontsize=10
        )
        if len(qs) <= 24:
            ax.legend(
                ncol=max(1, len(qs) // 12 + 1),
                fontsize=7,
                title="charge",
                loc="center left",
                bbox_to_anchor=(1.0, 0.5),
                frameon=False,
            )
        ax.grid(True, which="major", alpha=0.3)
        return ax

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{r['charge']}+</td><td>{r['peak_fraction']:.3f}</td><td>{r['peak_time_s']:.3g}</td>"
            f"<td>{r['final_fraction']:.3f}</td></tr>"
            for r in self.summary()
        )
        title = html.escape(
            f"{self.element} evolution, {len(self.times_s)} times "
            f"{self.times_s[0]:.3g}–{self.times_s[-1]:.3g} s {self.label}"
        )
        table = (
            f"<b>{title}</b><table><tr><th>charge</th><th>peak fraction</th><th>peak time (s)</th>"
            f"<th>final fraction</th></tr>{rows}</table>"
        )
        return table + inline_png(self.plot)

    def __repr__(self) -> str:
        return (
            f"Evolution({self.element!r}, {len(self.times_s)} times {self.times_s[0]:.3g}–"
            f"{self.times_s[-1]:.3g} s, mean charge at end {self.mean_charge()[-1]:.2f})"
        )


_core._register_result("Evolution", Evolution)
