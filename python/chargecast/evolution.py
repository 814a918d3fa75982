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
        self,
        ax: Optional[Any] = None,
        charges: Optional[list[int]] = None,
        threshold: float = 0.01,
        target: Optional[int] = None,
        time_label: Optional[str] = None,
    ) -> Any:
        """The evolution as a map: charge state against log time, colour = fraction.

        The map uses the perceptually uniform, colour-blind-safe ``cividis`` colormap. With
        a ``target`` its row is framed and its fraction drawn over the map as a white curve
        (right-hand scale), and a side panel shows the target and its neighbours as lines,
        each labelled at its right end; the labels are spread so they never overlap.

        Parameters
        ----------
        ax : matplotlib Axes, optional
            Where to draw the map; a new figure otherwise. The side panel is placed to its
            right.
        charges : list of int, optional
            Charge states of the map's rows; by default those whose fraction exceeds
            ``threshold``, and the target.
        threshold : float
            Smallest peak fraction for a charge state to be shown by default.
        target : int, optional
            The wanted charge state: marked on the map, with the side panel.
        time_label : str, optional
            The time axis' name; default "exposure time (s)" for a photon beam (its label
            names photons), else "confinement time (s)".

        Returns
        -------
        matplotlib Axes
            The map's axes.
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(8.5, 4.5))
        qs = list(charges) if charges is not None else self.dominant_charges(threshold)
        if target is not None and target not in qs:
            qs.append(target)
        if not qs:
            qs = [int(np.argmax(self.fractions[-1]))]
        for q in qs:
            self.peak(q)  # the core checks the charge state
        lo, hi = min(qs), max(qs)
        rows = np.arange(lo, hi + 1)
        positive = self.times_s > 0
        t = self.times_s[positive]
        f = self.fractions[positive][:, lo : hi + 1].T
        if t.size == 0:  # only t = 0 on the grid: nothing to show on a log time axis
            ax.set_title(f"{self.element}: no time after t = 0 on the grid", fontsize=10)
            return ax
        if time_label is None:
            time_label = "exposure time (s)" if "photons" in self.label else "confinement time (s)"
        # Cell edges half-way (in log time) between the output times.
        lt = np.log10(t)
        mid = (lt[1:] + lt[:-1]) / 2 if len(lt) > 1 else lt
        step = (lt[-1] - lt[0]) / max(len(lt) - 1, 1) or 0.5
        edges = 10 ** np.concatenate([[lt[0] - step / 2], mid, [lt[-1] + step / 2]])
        mesh = ax.pcolormesh(
            edges, np.arange(lo - 0.5, hi + 1.5), f, cmap="cividis", vmin=0.0, vmax=1.0, shading="flat"
        )
        ax.set_xscale("log")
        ax.set_xlabel(time_label)
        ax.set_ylabel("charge state q")
        ax.set_ylim(lo - 0.5, hi + 0.5)
        if len(rows) <= 30:
            ax.set_yticks(rows)
        cbar = ax.figure.colorbar(mesh, ax=ax, pad=0.01, fraction=0.04)
        cbar.set_label("fraction of ions")
        ax.set_title(
            f"{self.element} charge states" + (f" — {self.label}" if self.label else ""), fontsize=10
        )
        if target is None:
            return ax
        frame = ax.axhspan(target - 0.5, target + 0.5, fill=False, edgecolor="white", lw=1.4)
        # The target's fraction as a curve on the colour bar's scale: 0 at the bottom of
        # the map, 1 at the top, so one scale reads both.
        height = hi - lo + 1
        y = lo - 0.5 + height * self.fractions[positive, target]
        ax.plot(t, y, color="white", lw=2.2)
        (curve,) = ax.plot(t, y, color=PALETTE[3], lw=1.0, ls="--")
        ax.legend(
            [frame, curve],
            [f"row of {target}+", f"fraction of {target}+ (colour-bar scale)"],
            fontsize=7,
            loc="lower right",
            framealpha=0.85,
        )
        side = ax.inset_axes((1.3, 0.0, 0.42, 1.0))
        self._plot_neighbours(side, target, t, positive, time_label)
        return ax

    def _plot_neighbours(self, ax: Any, target: int, t: Any, positive: Any, time_label: str) -> None:
        """Lines of the target and up to two states either side, labelled at the right end
        with the labels pushed apart (never overlapping) and joined to their curves."""
        near = [q for q in range(max(0, target - 2), min(self.z, target + 2) + 1)]
        # Fixed roles, so a colour never means two states: target vermillion and thick,
        # lower states blues, higher states greens/oranges (Okabe–Ito colours).
        role = {-2: PALETTE[5], -1: PALETTE[0], 0: PALETTE[3], 1: PALETTE[2], 2: PALETTE[1]}
        dash = {-2: ":", -1: "--", 0: "-", 1: "-.", 2: (0, (5, 1, 1, 1))}
        ends: list[tuple[float, str, str]] = []
        for q in near:
            y = self.fractions[positive, q]
            k = q - target
            ax.plot(t, y, color=role[k], ls=dash[k], lw=2.4 if k == 0 else 1.3)
            ends.append((float(y[-1]), f"{q}+", role[k]))
        ax.set_xscale("log")
        ax.set_ylim(0.0, 1.05)
        ax.set_xlabel(time_label, fontsize=8)
        ax.set_ylabel("fraction of ions", fontsize=8)
        ax.tick_params(labelsize=7)
        ax.set_title(f"{target}+ and neighbours", fontsize=9)
        ax.grid(True, which="major", alpha=0.3)
        # Spread the labels: at least `gap` apart in data units, kept inside [0, 1.05].
        gap = 0.075
        order = sorted(range(len(ends)), key=lambda i: ends[i][0])
        pos = [max(ends[i][0], 0.03) for i in order]
        for i in range(1, len(pos)):
            pos[i] = max(pos[i], pos[i - 1] + gap)
        over = pos[-1] - 1.02 if pos else 0.0
        if over > 0:
            pos = [p - over for p in pos]
            for i in range(len(pos) - 2, -1, -1):
                pos[i] = min(pos[i], pos[i + 1] - gap)
        for i, y in zip(order, pos):
            ax.annotate(
                ends[i][1],
                (float(t[-1]), ends[i][0]),
                xytext=(1.05, y),
                textcoords=("axes fraction", "data"),
                va="center",
                fontsize=8,
                color=ends[i][2],
                annotation_clip=False,
                arrowprops={"arrowstyle": "-", "color": ends[i][2], "lw": 0.6},
            )

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
