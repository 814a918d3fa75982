"""Monte Carlo uncertainty bands of a beam trap's charge-state evolution.

Every process rate is multiplied by a lognormal factor: ln k has standard deviation
ln(factor), median 1 (the nominal rate); the charges of one process share a fraction
``charge_correlation`` of the logarithmic variance, processes are independent (the core
module ``sources::uncertainty`` documents the model). Defaults: Lotz ionization ×1.35
(±35 %), Kim–Pratt radiative recombination ×1.5, Müller–Salzborn charge exchange ×2,
ρ = 0.5. Sample ``i`` of a seed is the same bits however the samples are split into chunks,
so local, threaded and cluster runs agree exactly.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, require_pyplot, require_type
from chargecast.evolution import Evolution

#: 1-σ multiplicative factor of each process and the charge correlation when none is given.
DEFAULT_FACTORS: dict[str, float] = {
    "ionization_factor": 1.35,
    "recombination_factor": 1.5,
    "charge_exchange_factor": 2.0,
    "charge_correlation": 0.5,
}

#: The percentiles a band reports: the core's, so the report and the figures agree.
BAND_PERCENTILES = tuple(_core.BAND_PERCENTILES)


def uncertainty_factors(factors: Optional[Mapping[str, float]] = None) -> dict[str, float]:
    """The defaults with ``factors`` applied; unknown names raise InvalidParameterError."""
    out = dict(DEFAULT_FACTORS)
    if factors is not None:
        require_type("factors", factors, Mapping, "a mapping of process name to factor")
    for name, value in (factors or {}).items():
        if name not in out:
            raise _core.InvalidParameterError(
                f"invalid factors: unknown name {name!r}, allowed: {', '.join(DEFAULT_FACTORS)}"
            )
        out[name] = _core._as_float(name, value)
    return out


def sample_populations(
    trap: Any,
    element: Any,
    times_s: Any,
    *,
    samples: int,
    seed: int = 0,
    first_sample: int = 0,
    initial_charge: int = 0,
    factors: Optional[Mapping[str, float]] = None,
) -> np.ndarray:
    """Raw Monte Carlo populations ``[samples, T, Z+1]`` of samples
    ``first_sample … first_sample + samples − 1`` (solved in parallel, GIL released)."""
    return _core._monte_carlo_evolve(
        trap,
        element,
        times_s,
        samples=samples,
        seed=seed,
        first_sample=first_sample,
        initial_charge=initial_charge,
        **uncertainty_factors(factors),
    )


class EvolutionBands:
    """Monte Carlo samples of a charge-state evolution and their percentile bands.

    Made by ``BeamTrap.evolve(element, times_s, samples=N)``.

    Attributes
    ----------
    nominal : Evolution
        The evolution with nominal rates.
    samples : ndarray, shape (N, T, Z+1)
        Fractions of every sample.
    factors : dict
        The 1-σ factors and the charge correlation used.
    seed : int
        The seed (sample ``i`` of a seed is reproducible on its own).
    """

    __slots__ = ("nominal", "samples", "factors", "seed", "trap")

    def __init__(
        self, nominal: Evolution, samples: np.ndarray, factors: dict[str, float], seed: int, trap: Any
    ):
        require_type("nominal", nominal, Evolution, "an Evolution")
        require_type("samples", samples, np.ndarray, "an array [samples, times, charges]")
        if samples.ndim != 3 or not np.isfinite(samples).all():
            raise _core.InvalidParameterError(
                "invalid samples: must be a finite array [samples, times, charges]"
            )
        self.nominal = nominal
        self.samples = samples
        self.factors = factors
        self.seed = seed
        self.trap = trap

    @property
    def times_s(self) -> np.ndarray:
        """Output times (s)."""
        return np.asarray(self.nominal.times_s)

    @property
    def charges(self) -> np.ndarray:
        """Charge states 0 … Z."""
        return np.asarray(self.nominal.charges)

    def percentile(self, p: Any) -> np.ndarray:
        """Percentile(s) ``p`` (0–100) of the fractions over the samples.

        Returns
        -------
        ndarray, shape (T, Z+1) for a scalar ``p``, (len(p), T, Z+1) otherwise.
        """
        return np.percentile(self.samples, p, axis=0)

    def peak_time_s(self, charge: int) -> tuple[float, float, float]:
        """5th, 50th and 95th percentile of the time (s) of charge ``charge``'s maximum."""
        q = _core._as_int("charge", charge)
        idx = np.argmax(self.samples[:, :, q], axis=1)
        return _band(self.times_s[idx])

    def peak_fraction(self, charge: int) -> tuple[float, float, float]:
        """5th, 50th and 95th percentile of charge ``charge``'s largest fraction."""
        q = _core._as_int("charge", charge)
        return _band(self.samples[:, :, q].max(axis=1))

    def ions_per_extraction(self, charge: int, time_s: float) -> tuple[float, float, float]:
        """5th, 50th and 95th percentile of the ions of ``charge`` per extraction at
        ``time_s`` (the trap's compensation rule applied to every sample)."""
        q = _core._as_int("charge", charge)
        k = int(np.argmin(np.abs(self.times_s - _core._as_float("time_s", time_s))))
        ions = [self.trap.ions_per_extraction(np.clip(s[k], 0.0, 1.0))[q] for s in self.samples]
        return _band(np.asarray(ions))

    def summary(self, charge: int) -> dict[str, tuple[float, float, float]]:
        """Bands (5/50/95 %) of peak time (s) and peak fraction of ``charge``."""
        return {"peak_time_s": self.peak_time_s(charge), "peak_fraction": self.peak_fraction(charge)}

    def plot(self, charges: Optional[Sequence[int]] = None, ax: Optional[Any] = None) -> Any:
        """Nominal fractions against time with the 5–95 % band shaded (log time axis).

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(7, 4.5))
        if charges is None:
            charges = list(self.nominal.dominant_charges())[-6:]
        lo, mid, hi = self.percentile(list(BAND_PERCENTILES))
        t = np.where(self.times_s > 0, self.times_s, np.nan)
        for i, q in enumerate(charges):
            colour = PALETTE[i % len(PALETTE)]
            ax.fill_between(t, lo[:, q], hi[:, q], color=colour, alpha=0.22, linewidth=0)
            ax.plot(t, self.nominal.fractions[:, q], color=colour, label=f"{q}+")
            ax.plot(t, mid[:, q], color=colour, linestyle=":", linewidth=1)
        ax.set_xscale("log")
        ax.set_ylim(0, None)
        ax.set_xlabel("confinement time (s)")
        ax.set_ylabel("fraction")
        ax.set_title(
            f"{self.nominal.element}: nominal (solid), median (dotted), "
            f"5–95 % band of {len(self.samples)} samples",
            fontsize=9,
        )
        ax.legend(fontsize=8, ncol=2)
        return ax

    def __repr__(self) -> str:
        return (
            f"EvolutionBands({self.nominal.element}, {len(self.samples)} samples, "
            f"{len(self.times_s)} times, seed={self.seed})"
        )


def _band(values: np.ndarray) -> tuple[float, float, float]:
    lo, mid, hi = np.percentile(values, BAND_PERCENTILES)
    return (float(lo), float(mid), float(hi))


def evolve_bands(
    trap: Any,
    element: Any,
    times_s: Any,
    *,
    samples: int,
    seed: int = 0,
    initial_charge: int = 0,
    factors: Optional[Mapping[str, float]] = None,
    client: Any = None,
    chunk: int = 100,
) -> EvolutionBands:
    """Monte Carlo bands of ``trap.evolve(element, times_s)``; with a ``dask.distributed``
    ``client`` the samples run on its workers in chunks of ``chunk`` (same bits as local)."""
    require_type("samples", samples, (int, np.integer), "an int >= 1")
    require_type("seed", seed, (int, np.integer), "an int >= 0")
    require_type("chunk", chunk, (int, np.integer), "an int >= 1")
    nominal = trap.evolve(element, times_s, initial_charge=initial_charge)
    used = uncertainty_factors(factors)
    if client is None:
        pops = sample_populations(
            trap, element, times_s, samples=samples, seed=seed, initial_charge=initial_charge, factors=used
        )
    else:
        from chargecast.dask import map_samples

        pops = map_samples(
            client,
            trap,
            element,
            times_s,
            samples=samples,
            seed=seed,
            initial_charge=initial_charge,
            factors=used,
            chunk=chunk,
        )
    return EvolutionBands(nominal, pops, used, int(seed), trap)


def best_energy_band(
    trap: Any,
    element: Any,
    charge: int,
    energies_ev: Any,
    times_s: Any,
    *,
    samples: int,
    seed: int = 0,
    factors: Optional[Mapping[str, float]] = None,
) -> tuple[float, float, float]:
    """5th, 50th and 95th percentile (eV) of the energy giving the largest fraction of
    ``charge`` (over ``times_s``). Sample ``i`` keeps its factors at every energy.

    Examples
    --------
    >>> import chargecast as cc
    >>> trap = cc.BeamTrap(cc.ElectronBeam(energy_ev=2000.0, current_a=0.05, radius_m=1e-4), length_m=0.5)
    >>> lo, mid, hi = cc.best_energy_band(trap, "Ar", 16, [1000.0, 3000.0], [0.01, 0.1], samples=10)
    >>> lo <= mid <= hi
    True
    """
    require_type("trap", trap, _core.BeamTrap, "a BeamTrap")
    require_type("samples", samples, (int, np.integer), "an int >= 1")
    q = _core._as_int("charge", charge)
    energies = np.asarray(_core._as_float_array("energies_ev", energies_ev), dtype=float).reshape(-1)
    best = np.full((samples, len(energies)), -np.inf)
    for j, e in enumerate(energies):
        pops = sample_populations(
            trap.with_energy(float(e)) if hasattr(trap, "with_energy") else _with_energy(trap, float(e)),
            element,
            times_s,
            samples=samples,
            seed=seed,
            factors=factors,
        )
        best[:, j] = pops[:, :, q].max(axis=1)
    return _band(energies[np.argmax(best, axis=1)])


def _with_energy(trap: Any, energy_ev: float) -> Any:
    from chargecast.fit import rebuild_trap

    return rebuild_trap(trap, energy_ev=energy_ev)
