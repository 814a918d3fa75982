"""Sweeps and Monte Carlo batches on a ``dask.distributed`` cluster (optional extra
``chargecast[dask]``).

Work travels as plain settings (the trap's constructor keywords), each worker rebuilds the
trap and runs the same core code as a local call. Monte Carlo chunks carry their first
sample index, and sample ``i`` of a seed draws its own factors, so the concatenated result
equals a local run bit for bit whatever the chunk size.

Examples
--------
>>> from dask.distributed import Client, LocalCluster          # doctest: +SKIP
>>> client = Client(LocalCluster(n_workers=2, processes=True))  # doctest: +SKIP
>>> bands = trap.evolve("Kr", times_s, samples=1000, client=client)  # doctest: +SKIP
>>> cubes = cc.dask.map_cases(client, trap, ["Ar", "Kr"], energies_ev, times_s)  # doctest: +SKIP
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any, Optional

import numpy as np


def _samples_task(
    settings: dict[str, Any],
    element: Any,
    times_s: list[float],
    samples: int,
    seed: int,
    first_sample: int,
    initial_charge: int,
    factors: dict[str, float],
) -> np.ndarray:
    from chargecast.fit import build_trap
    from chargecast.uncertainty import sample_populations

    return sample_populations(
        build_trap(settings),
        element,
        times_s,
        samples=samples,
        seed=seed,
        first_sample=first_sample,
        initial_charge=initial_charge,
        factors=factors,
    )


def _sweep_task(settings: dict[str, Any], element: Any, energy_ev: float, times_s: list[float]) -> np.ndarray:
    from chargecast.fit import build_trap

    s = dict(settings)
    s["beam"] = dict(s["beam"], energy_ev=energy_ev)
    trap = build_trap(s)
    return np.asarray(trap.evolve(element, times_s).fractions)


def map_samples(
    client: Any,
    trap: Any,
    element: Any,
    times_s: Any,
    *,
    samples: int,
    seed: int = 0,
    initial_charge: int = 0,
    factors: Optional[Mapping[str, float]] = None,
    chunk: int = 100,
) -> np.ndarray:
    """Monte Carlo populations ``[samples, T, Z+1]`` computed on ``client``'s workers in
    chunks of ``chunk`` samples; equal to ``uncertainty.sample_populations`` bit for bit."""
    from chargecast import _core
    from chargecast.fit import trap_settings
    from chargecast.uncertainty import uncertainty_factors

    _require_client(client)
    n = _core._as_int("samples", samples)
    c = _core._as_int("chunk", chunk)
    if n < 1 or c < 1:
        raise _core.InvalidParameterError("invalid samples or chunk: both must be >= 1")
    settings = trap_settings(trap)
    used = uncertainty_factors(factors)
    t = np.asarray(_core._as_float_array("times_s", times_s), dtype=float).reshape(-1).tolist()
    futures = [
        client.submit(
            _samples_task,
            settings,
            element,
            t,
            min(c, n - first),
            int(seed),
            first,
            int(initial_charge),
            used,
            pure=False,
        )
        for first in range(0, n, c)
    ]
    return np.concatenate(client.gather(futures), axis=0)


def _require_client(client: Any) -> None:
    """ArgumentTypeError unless ``client`` has a client's submit and gather (e.g. a
    ``dask.distributed.Client``): one check for every entry point that takes one."""
    from chargecast import _core

    if not (callable(getattr(client, "submit", None)) and callable(getattr(client, "gather", None))):
        raise _core.ArgumentTypeError(
            f"invalid client: {type(client).__name__} given, must be a dask.distributed Client"
        )


def map_cases(
    client: Any, trap: Any, elements: Sequence[Any], energies_ev: Any, times_s: Any
) -> dict[str, np.ndarray]:
    """Fractions ``{element: [energies, T, Z+1]}`` of a trap over elements × energies, one
    task per (element, energy) on ``client``'s workers; equal to the local
    ``trap.evolve`` results bit for bit."""
    from chargecast import _core
    from chargecast.fit import trap_settings

    _require_client(client)
    settings = trap_settings(trap)
    e = np.asarray(_core._as_float_array("energies_ev", energies_ev), dtype=float).reshape(-1)
    t = np.asarray(_core._as_float_array("times_s", times_s), dtype=float).reshape(-1).tolist()
    out = {}
    for el in elements:
        futures = [client.submit(_sweep_task, settings, el, float(x), t, pure=False) for x in e]
        out[_core.element(el).symbol] = np.stack(client.gather(futures))
    return out
