"""Timing of Monte Carlo uncertainty bands and of one evolution against a scipy baseline.

* 1 000 samples of Xe in an electron-beam trap (55 states), 300 log-spaced output times,
  every process rate scaled by its lognormal factor, solved in parallel in the core;
* one nominal evolution of the same network with chargecast and with scipy.linalg.expm at
  every output time (the exact reference), their time ratio and largest difference;
* a fit of a synthetic Ar spectrum (two free parameters, scipy.optimize.least_squares).

Run from the repository root after installing the package::

    python3 benches/monte_carlo.py
"""

from __future__ import annotations

import os
import platform
import time

import numpy as np
from scipy.linalg import expm

import chargecast as cc


def best_of(f, repeat: int) -> tuple[float, object]:
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = f()
        best = min(best, time.perf_counter() - t0)
    return best, out


def generator(rates: np.ndarray) -> np.ndarray:
    m = rates.T.copy()
    np.fill_diagonal(m, 0.0)
    m -= np.diag(rates.sum(axis=1) - np.diag(rates))
    return m


def main() -> None:
    print(f"{platform.machine()}, {os.cpu_count()} cores, load average {os.getloadavg()[0]:.1f}")
    beam = cc.ElectronBeam(energy_ev=20000.0, current_a=0.5, current_density_a_cm2=1000.0)
    trap = cc.BeamTrap(beam, length_m=0.6, residual_gas_pa={"H2": 1e-9}, ion_temperature_ev=50.0)
    times = np.geomspace(1e-4, 10.0, 300)

    t_mc, bands = best_of(lambda: trap.evolve("Xe", times, samples=1000, seed=1), 2)
    lo, mid, hi = bands.peak_fraction(44)
    print(
        f"Monte Carlo, Xe, 1000 samples x 300 times: {t_mc:.3f} s  (Xe44+ peak fraction 5/50/95 %: "
        f"{lo:.3f} / {mid:.3f} / {hi:.3f})"
    )

    t_one, evo = best_of(lambda: trap.evolve("Xe", times), 5)
    m = generator(trap.rates("Xe"))
    y0 = np.zeros(m.shape[0])
    y0[0] = 1.0
    t_expm, ref = best_of(lambda: np.array([expm(m * t) @ y0 for t in times]), 1)
    err = np.abs(np.asarray(evo.fractions) - ref).max()
    print(
        f"one evolution: chargecast {t_one * 1e3:.2f} ms, scipy expm {t_expm * 1e3:.1f} ms, "
        f"ratio {t_expm / t_one:.0f}x, max |difference| {err:.1e}"
    )
    print(f"Monte Carlo per sample: {t_mc / 1000 * 1e3:.2f} ms ({t_mc / 1000 / t_one:.2f} x one evolution)")

    ar = cc.TrapFitModel(
        cc.BeamTrap(
            cc.ElectronBeam(energy_ev=3000.0, current_a=0.05, current_density_a_cm2=300.0),
            length_m=0.5,
            residual_gas_pa={"H2": 2e-8},
        ),
        "Ar",
        0.02,
    )
    f = ar.evaluate([{}])[0]
    q = np.flatnonzero(f > 0.01)
    sigma = 0.03 * f[q] + 0.002
    t_fit, res = best_of(
        lambda: cc.fit_charge_distribution(
            ar,
            dict(zip(q.tolist(), f[q])),
            free={"current_density_a_cm2": (10, 3000), "pressure_pa": (1e-10, 1e-6)},
            uncertainties=dict(zip(q.tolist(), sigma)),
        ),
        3,
    )
    print(f"fit of Ar (2 free parameters): {t_fit * 1e3:.1f} ms, {res.evaluations} evaluations")


if __name__ == "__main__":
    main()
