"""Side-by-side timing: chargecast against a scipy baseline on the same physical network.

Builds the rate network of an element in an electron-beam trap (Lotz ionization,
Kim–Pratt recombination, Müller–Salzborn charge exchange), then solves dN/dt = M·N for
1000 log-spaced output times with

* chargecast (``BeamTrap.evolve``, the Rust solver),
* scipy.integrate.solve_ivp(method="BDF", rtol=1e-10, atol=1e-14) with the exact Jacobian,
* scipy.linalg.expm at every output time (the exact reference),

and prints the times, the ratios and the largest absolute difference to the expm
reference. Finally a batch sweep (elements × energies × times) is timed.

Run from the repository root after installing the package::

    python3 benches/compare_scipy.py
"""

from __future__ import annotations

import argparse
import platform
import time

import numpy as np
from scipy.integrate import solve_ivp
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


def compare(element: str, trap: cc.BeamTrap, times: np.ndarray, repeat: int) -> None:
    rates = trap.rates(element)
    n = rates.shape[0]
    m = generator(rates)
    y0 = np.zeros(n)
    y0[0] = 1.0

    t_cc, evo = best_of(lambda: trap.evolve(element, times), repeat)
    ours = evo.fractions

    def bdf():
        sol = solve_ivp(
            lambda t, y: m @ y,
            (0.0, times[-1]),
            y0,
            method="BDF",
            t_eval=times,
            rtol=1e-10,
            atol=1e-14,
            jac=m,
        )
        return sol.y.T

    t_bdf, theirs = best_of(bdf, 1)
    t_expm, exact = best_of(lambda: np.array([expm(m * t) @ y0 for t in times]), 1)
    print(
        f"{element:>3} ({n:3d} states, {len(times)} times): chargecast {t_cc * 1e3:8.2f} ms | "
        f"solve_ivp BDF {t_bdf * 1e3:8.1f} ms (x{t_bdf / t_cc:6.0f}) | expm {t_expm * 1e3:8.1f} ms "
        f"(x{t_expm / t_cc:5.0f}) | max |chargecast - expm| {np.abs(ours - exact).max():.1e}, "
        f"max |BDF - expm| {np.abs(theirs - exact).max():.1e}"
    )


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument("--quick", action="store_true", help="smaller sweep")
    args = parser.parse_args()
    print(
        f"machine: {platform.machine()}, {platform.processor() or platform.platform()}, "
        f"python {platform.python_version()}, {time.strftime('%Y-%m-%d')}"
    )
    beam = cc.ElectronBeam(energy_ev=20000.0, current_a=0.5, radius_m=50e-6)
    trap = cc.BeamTrap(beam, length_m=0.5, residual_gas_pa={"H2": 1e-8, "N2": 1e-9}, ion_temperature_ev=100.0)
    times = np.geomspace(1e-4, 1.0, 1000)
    for element in ("Ar", "Kr", "Xe", "U"):
        compare(element, trap, times, args.repeat)

    zs = list(range(1, 93))
    energies = np.geomspace(500.0, 50000.0, 20 if args.quick else 100)
    sweep_times = np.geomspace(1e-4, 1.0, 200)
    t0 = time.perf_counter()
    out = trap.sweep(zs, energies, sweep_times)
    dt = time.perf_counter() - t0
    cases = len(zs) * len(energies)
    print(
        f"sweep Z = 1..92 x {len(energies)} energies x {len(sweep_times)} times: {dt:.2f} s "
        f"({cases} evolutions, {dt / cases * 1e3:.2f} ms each); "
        f"max |sum - 1| = {max(abs(v.sum(axis=-1) - 1).max() for v in out.values()):.1e}"
    )


if __name__ == "__main__":
    main()
