"""The result of a charge-state evolution: fractions of every charge state over time."""

from __future__ import annotations

import html
from typing import Any, Optional

import numpy as np

from chargecast._core import ChargeOutOfRangeError, InvalidParameterError
from chargecast._util import PALETTE, as_float, inline_png, require_pandas, require_pyplot

# Yellow is hard to see as a thin line on white: curves use the rest of the palette.
LINE_COLORS = [c for c in PALETTE if c != "#F0E442"]


class Evolution:
    """Charge-state fractions of one element over confinement time.

    Parameters
    ----------
    element_symbol : str
        Element symbol, e.g. ``"Kr"``.
    times_s : ndarray, shape (T,)
        Output times (s), ascending.
    fractions : ndarray, shape (T, Z+1)
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

    def __init__(
        self, element_symbol: str, times_s: np.ndarray, fractions: np.ndarray, label: str = ""
    ) -> None:
        self.element = element_symbol
        self.times_s = np.asarray(times_s, dtype=np.float64)
        self.fractions = np.asarray(fractions, dtype=np.float64)
        self.label = label
        if self.fractions.ndim != 2 or self.fractions.shape[0] != self.times_s.shape[0]:
            raise InvalidParameterError(
                f"fractions must have shape (len(times_s), Z+1); got {self.fractions.shape} "
                f"for {self.times_s.shape[0]} times"
            )
        self.charges = np.arange(self.fractions.shape[1])

    @property
    def z(self) -> int:
        """Atomic number (the highest charge state)."""
        return int(self.fractions.shape[1] - 1)

    def _check_charge(self, charge: int) -> int:
        if isinstance(charge, bool) or not isinstance(charge, (int, np.integer)) or not 0 <= charge <= self.z:
            raise ChargeOutOfRangeError(
                f"charge {charge!r} is out of range for {self.element}: allowed 0..={self.z}"
            )
        return int(charge)

    def mean_charge(self) -> np.ndarray:
        """Mean charge Σ q·F_q / Σ F_q at every time.

        Returns
        -------
        ndarray, shape (T,)
            Mean charge (elementary charges).
        """
        total = self.fractions.sum(axis=1)
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(total > 0, self.fractions @ self.charges / total, 0.0)

    def peak(self, charge: int) -> tuple[float, float]:
        """Time (s) and value of the largest fraction of one charge state on the time grid.

        Parameters
        ----------
        charge : int
            Charge state, 0 … Z.

        Returns
        -------
        tuple of float
            ``(time_s, fraction)``.
        """
        q = self._check_charge(charge)
        i = int(np.argmax(self.fractions[:, q]))
        return float(self.times_s[i]), float(self.fractions[i, q])

    def at(self, time_s: float) -> np.ndarray:
        """Fractions at one time, interpolated linearly between grid points.

        Parameters
        ----------
        time_s : float
            Time (s) within the computed grid.

        Returns
        -------
        ndarray, shape (Z+1,)
            Fraction of each charge state.
        """
        t = as_float("time_s", time_s)
        if not (self.times_s[0] <= t <= self.times_s[-1]):
            raise InvalidParameterError(
                f"invalid time_s = {t}: must lie within the computed grid "
                f"{self.times_s[0]:g} … {self.times_s[-1]:g} s"
            )
        return np.array([np.interp(t, self.times_s, self.fractions[:, q]) for q in self.charges])

    def dominant_charges(self, threshold: float = 0.01) -> list[int]:
        """Charge states whose fraction ever exceeds ``threshold``."""
        return [int(q) for q in self.charges if self.fractions[:, q].max() > threshold]

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
            q = self._check_charge(q)
            t, f = self.times_s[positive], self.fractions[positive, q]
            ax.plot(
                t,
                f,
                styles[(k // len(LINE_COLORS)) % 4],
                color=LINE_COLORS[k % len(LINE_COLORS)],
                label=f"{q}+",
            )
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

    def summary(self, threshold: float = 0.01) -> list[dict[str, float]]:
        """Per charge state that exceeds ``threshold``: peak fraction, time of peak, final fraction."""
        rows = []
        for q in self.dominant_charges(threshold):
            t, f = self.peak(q)
            rows.append(
                {
                    "charge": q,
                    "peak_fraction": f,
                    "peak_time_s": t,
                    "final_fraction": float(self.fractions[-1, q]),
                }
            )
        return rows

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
