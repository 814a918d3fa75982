"""Side-by-side timing of the ion-dynamics model: chargecast's stiff solver against scipy on
the same right-hand side.

Krypton (37 charge states) with a nitrogen coolant fed in (8 charge states), populations and
temperatures of every charge state (96 unknowns with the running totals), 0 … 1 s, 300
output times, every dynamic process on, solved

* by chargecast (``BeamTrap.evolve``, diffsol BDF with the split-difference Jacobian,
  rtol = 1e-8),
* by scipy.integrate.solve_ivp(method="BDF", rtol=1e-8) on the right-hand side and the
  Jacobian exported from the core (``_core._dynamic_system``), with the core's absolute
  tolerances,

and compares both with a tight reference (chargecast at rtol = 1e-10): the largest
difference of any population relative to the particles in the trap. The invented trap:
20 keV, 0.5 A, 1000 A/cm², 0.6 m, H2 at 1e-9 Pa, N2 fed at 1e-7 Pa, 300 V barrier.

Run from the repository root after a release install (``pip install --no-build-isolation
-e .``)::

    python3 benches/dynamics_scipy.py
"""

from __future__ import annotations

import argparse
import platform
import time

import numpy as np
from scipy.integrate import solve_ivp

import chargecast as cc
from chargecast import _core


def trap() -> cc.BeamTrap:
    beam = cc.ElectronBeam(20_000.0, 0.5, current_density_a_cm2=1000.0)
    return cc.BeamTrap(
        beam,
        length_m=0.6,
        residual_gas_pa={"H2": 1e-9},
        model="dynamic",
        axial_barrier_v=300.0,
        gas_feed_pa={"N2": 1e-7},
    )


def populations(system, y: np.ndarray, n_species: int) -> np.ndarray:
    return np.concatenate([system.populations(y, k) for k in range(n_species)])


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3, help="best of N for the core (default 3)")
    parser.add_argument("--skip-scipy", action="store_true", help="time the core only")
    args = parser.parse_args()
    t = trap()
    loads = {"Kr": 1e8}
    times = np.linspace(1.0 / 300, 1.0, 300)
    print(f"machine: {platform.machine()}, {platform.processor() or '?'}, Python {platform.python_version()}")

    reference = t.evolve(loads, times, rtol=1e-10)
    names = reference.species
    ref = np.concatenate([reference.ions(n) for n in names], axis=1)
    scale = ref.sum(axis=1).max()

    best, run = float("inf"), None
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        run = t.evolve(loads, times)
        best = min(best, time.perf_counter() - t0)
    assert run is not None
    ours = np.concatenate([run.ions(n) for n in names], axis=1)
    err_core = np.max(np.abs(ours - ref)) / scale
    kr = run.fractions("Kr")[-1]
    print(f"chargecast BDF (rtol 1e-8): {best * 1e3:9.1f} ms, error vs reference {err_core:.1e}")
    print(
        f"  Kr{int(np.argmax(kr))}+ leads with {kr.max():.3f} at 1 s; "
        f"balances: particles {run.particle_balance:.1e}, energy {run.energy_balance:.1e}"
    )
    if args.skip_scipy:
        return

    system = _core._dynamic_system(t, loads)
    y0 = np.array(system.initial_state)
    t0 = time.perf_counter()
    sol = solve_ivp(
        lambda _t, y: system.rhs(y),
        (0.0, 1.0),
        y0,
        method="BDF",
        rtol=1e-8,
        atol=system.atol(1e-8),
        jac=lambda _t, y: system.jacobian(y),
        t_eval=times,
    )
    scipy_s = time.perf_counter() - t0
    theirs = np.clip(
        np.array([populations(system, sol.y[:, i], len(names)) for i in range(len(times))]), 0, None
    )
    err_scipy = np.max(np.abs(theirs - ref)) / scale
    print(
        f"scipy solve_ivp BDF (rtol 1e-8, exported Jacobian): {scipy_s * 1e3:9.1f} ms, "
        f"error vs reference {err_scipy:.1e} ({sol.nfev} rhs, {sol.njev} Jacobians, success={sol.success})"
    )
    print(f"ratio scipy / chargecast: {scipy_s / best:.1f}x")


if __name__ == "__main__":
    main()
