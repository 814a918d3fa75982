"""Electron-beam ion traps: charge-state evolution, steady state, best energy, ions per
extraction, and many traps at once. The classes are the compiled ones; EnergyScan adds its
figure, table and HTML view, BeamTrap labels its sweeps."""

from __future__ import annotations

import html
from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, inline_png, require_pandas, require_pyplot

evolve_batch = _core.evolve_batch

#: Units of the labelled sweep's coordinates and values.
SWEEP_UNITS = {
    "energy_ev": "eV",
    "time_s": "s",
    "charge": "e",
    "fraction": "1 (fraction of the element's ions)",
}


class BeamTrap(_core.BeamTrap):
    __doc__ = (_core.BeamTrap.__doc__ or "") + (
        "\n\n``sweep`` returns a labelled table (an xarray Dataset, or a pandas MultiIndex frame)."
    )

    __slots__ = ()

    def evolve(  # type: ignore[override]
        self,
        element: Any,
        times_s: Any,
        initial_charge: Optional[int] = None,
        *,
        rtol: Optional[float] = None,
        samples: Optional[int] = None,
        seed: int = 0,
        factors: Optional[Any] = None,
        client: Any = None,
        chunk: int = 100,
    ) -> Any:
        """Charge-state fractions over time; with ``samples``, Monte Carlo bands too.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.
        times_s : array_like
            Output times (s), ascending, ≥ 0.
        initial_charge : int, optional
            Charge of the injected atoms or ions (0 = neutral atoms).
        rtol : float, optional
            Relative tolerance of the dynamic model's nonlinear solve (dynamic model only).
        samples : int, optional
            Number of Monte Carlo samples over the process uncertainty factors.
        seed : int
            Seed of the samples (sample ``i`` of a seed is reproducible on its own).
        factors : dict, optional
            1-σ factors ``ionization_factor``, ``recombination_factor``,
            ``charge_exchange_factor`` and ``charge_correlation`` (defaults 1.35, 1.5, 2, 0.5).
        client : dask.distributed.Client, optional
            Run the samples on this cluster (same bits as locally).
        chunk : int
            Samples per cluster task.

        Returns
        -------
        Evolution, or EvolutionBands with ``samples`` (``.percentile(5/50/95)``)
        """
        if samples is None:
            if factors is not None or client is not None:
                raise _core.InvalidParameterError("invalid arguments: factors and client need samples=N")
            return _core.BeamTrap.evolve(self, element, times_s, initial_charge, rtol=rtol)
        if rtol is not None or self.model != "fixed":
            raise _core.InvalidParameterError(
                "invalid arguments: Monte Carlo bands (samples=N) are for the fixed model, without rtol"
            )
        from chargecast.uncertainty import evolve_bands

        return evolve_bands(
            self,
            element,
            times_s,
            samples=samples,
            seed=seed,
            initial_charge=0 if initial_charge is None else initial_charge,
            factors=factors,
            client=client,
            chunk=chunk,
        )

    def sweep(self, elements: Any, energies_ev: Any, times_s: Any) -> Any:  # type: ignore[override]
        """Charge-state fractions of several elements over energies × times, in parallel,
        as a labelled table.

        Parameters
        ----------
        elements : str, int or sequence of str or int
            Element symbols, names or Z.
        energies_ev : array_like
            Electron energies (eV).
        times_s : array_like
            Output times (s), ascending.

        Returns
        -------
        xarray.Dataset or pandas.DataFrame
            With xarray installed (``pip install chargecast[xarray]``): a Dataset with the
            variable ``fraction`` over ``element`` × ``energy_ev`` × ``time_s`` × ``charge``
            (charges above an element's Z are NaN), units in ``attrs``. Without it: a
            DataFrame with a (element, energy_ev, time_s, charge) MultiIndex and a
            ``fraction`` column, units in ``DataFrame.attrs``.
        """
        raw = _core.BeamTrap.sweep(self, elements, energies_ev, times_s)
        e = np.asarray(energies_ev, dtype=float).reshape(-1)
        t = np.asarray(times_s, dtype=float).reshape(-1)
        names = list(raw)
        width = max(a.shape[2] for a in raw.values())
        cube = np.full((len(names), len(e), len(t), width), np.nan)
        for i, name in enumerate(names):
            cube[i, :, :, : raw[name].shape[2]] = raw[name]
        attrs = {"units": dict(SWEEP_UNITS)}
        try:
            import xarray as xr
        except ImportError:
            pd = require_pandas()
            index = pd.MultiIndex.from_product(
                [names, e, t, np.arange(width)], names=["element", "energy_ev", "time_s", "charge"]
            )
            frame = pd.DataFrame({"fraction": cube.reshape(-1)}, index=index).dropna()
            frame.attrs.update(attrs)
            return frame
        ds = xr.Dataset(
            {"fraction": (("element", "energy_ev", "time_s", "charge"), cube)},
            coords={"element": names, "energy_ev": e, "time_s": t, "charge": np.arange(width)},
            attrs=attrs,
        )
        for name in ("energy_ev", "time_s", "charge"):
            ds[name].attrs["units"] = SWEEP_UNITS[name]
        ds["fraction"].attrs["units"] = SWEEP_UNITS["fraction"]
        return ds


class EnergyScan(_core.EnergyScan):
    """Fraction of target charge state(s) over an energy × time grid, and its maximum.

    Made by ``BeamTrap.best_energy``: ``element``, ``charges``, ``energies_ev``,
    ``times_s``, ``fraction[energy, time]``, ``best_energy_ev``, ``best_time_s``,
    ``best_fraction``.
    """

    __slots__ = ()

    def _target(self) -> str:
        return "+".join(f"{q}+" for q in self.charges)

    def _resonance_bands_ev(self) -> list[tuple[float, float]]:
        """Dielectronic-resonance bands (eV) inside the scanned electron energies that make
        or destroy the target: those of the target charges and of one charge higher, clipped
        to the scanned range (see :meth:`DrResonances.bands_ev`)."""
        from chargecast.indirect import dr_resonances

        lo, hi = float(self.energies_ev.min()), float(self.energies_ev.max())
        z = _core.element(self.element).z
        out = []
        for q in sorted({c for t in self.charges for c in (t, t + 1) if 1 <= c <= z}):
            for a, b in dr_resonances(self.element, q).bands_ev(min_fraction=1e-2):
                if b >= lo and a <= hi:
                    out.append((max(a, lo), min(b, hi)))
        return out

    def plot(self, ax: Optional[Any] = None) -> Any:
        """Energy × time map of the target fraction (log time axis), best point marked, and
        the dielectronic-resonance bands that make or destroy the target hatched.

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
        for i, (a, b) in enumerate(self._resonance_bands_ev()):
            ax.axhspan(
                a,
                b,
                facecolor="none",
                edgecolor=PALETTE[2],
                hatch="//",
                linewidth=0.6,
                label="DR resonance bands" if i == 0 else None,
            )
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
