"""Regenerate the embedded data tables of chargecast from reference packages.

Run from the repository root with the reference packages installed::

    pip install mendeleev xraydb numpy
    python data/generate.py

Every CSV written here starts with ``#`` lines that record the source, the package and
version used to extract it and the date; chargecast embeds the files at build time
(``include_str!``) so nothing is read from disk or network at run time.
"""

from __future__ import annotations

import datetime as _dt
import math
from pathlib import Path

import mendeleev
import numpy as np
import xraydb
from mendeleev.fetch import fetch_table

HERE = Path(__file__).resolve().parent
TODAY = _dt.date.today().isoformat()

# Edge → subshell label (K = 1s, L1 = 2s, L2,3 = 2p, …); spin–orbit pairs share one (n, l) subshell.
EDGE_SUBSHELL = {
    "K": "1s", "L1": "2s", "L2": "2p", "L3": "2p",
    "M1": "3s", "M2": "3p", "M3": "3p", "M4": "3d", "M5": "3d",
    "N1": "4s", "N2": "4p", "N3": "4p", "N4": "4d", "N5": "4d", "N6": "4f", "N7": "4f",
    "O1": "5s", "O2": "5p", "O3": "5p", "O4": "5d", "O5": "5d",
    "P1": "6s", "P2": "6p", "P3": "6p",
}
MAX_XRAY_Z = 98
# Photoabsorption grid: log-spaced points plus points just below and above every edge,
# so log–log interpolation never smears an edge.
PHOTO_MIN_EV, PHOTO_MAX_EV, PHOTO_PER_DECADE = 100.0, 800_000.0, 24


def header(lines: list[str]) -> str:
    return "".join(f"# {line}\n" for line in lines)


def write(name: str, head: list[str], columns: list[str], rows: list[list[object]]) -> None:
    path = HERE / name
    with path.open("w", encoding="utf-8") as f:
        f.write(header(head + [f"generated {TODAY} by data/generate.py"]))
        f.write(",".join(columns) + "\n")
        for row in rows:
            f.write(",".join(fmt(v) for v in row) + "\n")
    print(f"wrote {path.relative_to(HERE.parent)}: {len(rows)} rows")


def fmt(v: object) -> str:
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return ""
    if isinstance(v, float):
        return repr(v)
    return str(v)


def elements() -> None:
    el = fetch_table("elements").sort_values("atomic_number")
    rows = [[int(r.atomic_number), r.symbol, r.name, float(r.atomic_weight)] for r in el.itertuples()]
    write(
        "elements.csv",
        [
            "Elements: atomic number, symbol, English name, standard atomic weight (u).",
            f"Source: mendeleev {mendeleev.__version__} (table 'elements').",
        ],
        ["z", "symbol", "name", "atomic_weight_u"],
        rows,
    )


def ionization_energies() -> None:
    ie = fetch_table("ionizationenergies").sort_values(["atomic_number", "ion_charge"])
    rows = []
    for r in ie.itertuples():
        kind = "theoretical" if r.is_theoretical else ("semi_empirical" if r.is_semi_empirical else "experimental")
        rows.append(
            [int(r.atomic_number), int(r.ion_charge), float(r.ionization_energy), float(r.uncertainty), kind, r.ground_shells]
        )
    write(
        "ionization_energies.csv",
        [
            "Successive ionization energies: row (z, charge) is the energy to go from charge to charge+1 (eV),",
            "its uncertainty (eV), how it was obtained, and the ground configuration of the ion of that charge",
            "(noble-gas and [Cd]/[Hg] cores, subshells separated by '.').",
            "Source: NIST Atomic Spectra Database, ionization energies (Kramida, Ralchenko, Reader and NIST ASD Team),",
            f"as shipped in mendeleev {mendeleev.__version__} (table 'ionizationenergies').",
        ],
        ["z", "charge", "ionization_energy_ev", "uncertainty_ev", "kind", "ground_shells"],
        rows,
    )


def xray_levels() -> None:
    rows = []
    for z in range(1, MAX_XRAY_Z + 1):
        for edge, e in xraydb.xray_edges(z).items():
            if edge not in EDGE_SUBSHELL:
                continue
            rows.append([z, edge, EDGE_SUBSHELL[edge], float(e.energy), float(e.jump_ratio), float(e.fyield)])
    write(
        "xray_levels.csv",
        [
            "Neutral-atom X-ray levels: edge, subshell, binding energy (eV, relative to the Fermi level of the solid),",
            "edge jump ratio and fluorescence yield.",
            "Source: Elam, Ravel & Sieber, Radiat. Phys. Chem. 63, 121 (2002); yields after Krause & Oliver (1979);",
            f"as shipped in xraydb {xraydb.__version__} (xray_edges).",
        ],
        ["z", "edge", "subshell", "binding_ev", "jump_ratio", "fluorescence_yield"],
        rows,
    )


def coster_kronig() -> None:
    families = {"L": ["L1", "L2", "L3"], "M": ["M1", "M2", "M3", "M4", "M5"]}
    rows = []
    for z in range(1, MAX_XRAY_Z + 1):
        edges = xraydb.xray_edges(z)
        for levels in families.values():
            for i, initial in enumerate(levels):
                for final in levels[i + 1 :]:
                    if initial not in edges or final not in edges:
                        continue
                    try:
                        p = float(xraydb.ck_probability(z, initial, final, total=True))
                    except Exception:  # noqa: BLE001 - xraydb raises plain errors for missing pairs
                        continue
                    if p > 0.0:
                        rows.append([z, initial, final, p])
    write(
        "coster_kronig.csv",
        [
            "Coster-Kronig transition probabilities (total, including radiative) between edges of one shell.",
            "Source: Elam, Ravel & Sieber (2002) after Krause & Oliver (1979);",
            f"as shipped in xraydb {xraydb.__version__} (ck_probability, total=True).",
        ],
        ["z", "initial", "final", "probability"],
        rows,
    )


def isotopes() -> None:
    iso = fetch_table("isotopes").sort_values(["atomic_number", "mass_number"])
    rows = []
    for r in iso.itertuples():
        if r.mass is None or (isinstance(r.mass, float) and math.isnan(r.mass)):
            continue
        ab = None if r.abundance is None or math.isnan(r.abundance) else float(r.abundance) / 100.0
        rows.append([int(r.atomic_number), int(r.mass_number), float(r.mass), ab])
    write(
        "isotopes.csv",
        [
            "Isotopes: atomic mass (u, AME2020: Wang et al., Chinese Phys. C 45, 030003 (2021)) and natural",
            "abundance (mole fraction, IUPAC; empty where the isotope does not occur naturally).",
            f"Source: mendeleev {mendeleev.__version__} (table 'isotopes').",
        ],
        ["z", "mass_number", "mass_u", "abundance"],
        rows,
    )


def elam_jumps(z: int, nominal_ev: float) -> list[float]:
    """Where mu_elam actually jumps near a nominal edge energy (the Elam tables place some
    edges a little away from xray_edges' value, and spin-orbit partners lie close by): every
    upward step of more than 2 % on a fine grid within ±3 %, each refined by bisection to
    1e-9 relative."""
    grid = np.geomspace(nominal_ev * 0.97, nominal_ev * 1.03, 1201)
    mu = xraydb.mu_elam(z, grid, kind="photo")
    ratios = mu[1:] / mu[:-1]
    jumps = []
    for i in np.flatnonzero(ratios > 1.02):
        lo, hi = float(grid[i]), float(grid[i + 1])
        mu_lo, mu_hi = float(mu[i]), float(mu[i + 1])
        while hi / lo - 1.0 > 1e-9:
            mid = 0.5 * (lo + hi)
            m = float(xraydb.mu_elam(z, [mid], kind="photo")[0])
            # Stay on the side of the jump: below it mu is close to mu_lo, above it close to mu_hi.
            if abs(m - mu_lo) < abs(m - mu_hi):
                lo, mu_lo = mid, m
            else:
                hi, mu_hi = mid, m
        jumps.append(0.5 * (lo + hi))
    return jumps


def photoabsorption() -> None:
    n = int(round(math.log10(PHOTO_MAX_EV / PHOTO_MIN_EV) * PHOTO_PER_DECADE)) + 1
    base = np.geomspace(PHOTO_MIN_EV, PHOTO_MAX_EV, n)
    avogadro = 6.02214076e23
    rows = []
    for z in range(1, MAX_XRAY_Z + 1):
        grid = set(base.tolist())
        for e in xraydb.xray_edges(z).values():
            if PHOTO_MIN_EV < e.energy < PHOTO_MAX_EV:
                for jump in elam_jumps(z, e.energy) or [e.energy]:
                    grid.update([jump * (1 - 1e-7), jump * (1 + 1e-7)])
        energies = np.array(sorted(grid))
        per_atom = xraydb.atomic_mass(z) / avogadro
        mu = xraydb.mu_elam(z, energies, kind="photo") * per_atom
        rows.extend([z, float(f"{e:.10g}"), float(f"{m:.6g}")] for e, m in zip(energies, mu))
    write(
        "photoabsorption.csv",
        [
            "Photoabsorption cross section of neutral atoms (cm^2 per atom) from 100 eV to 800 keV,",
            f"{PHOTO_PER_DECADE} log-spaced points per decade plus points 1e-7 below and above each edge (located where",
            "the Elam table actually jumps, within 3 % of the tabulated edge energy).",
            "Source: Elam, Ravel & Sieber, Radiat. Phys. Chem. 63, 121 (2002),",
            f"as shipped in xraydb {xraydb.__version__} (mu_elam kind='photo', cm^2/g times atomic mass / N_A).",
        ],
        ["z", "energy_ev", "cross_section_cm2"],
        rows,
    )


if __name__ == "__main__":
    elements()
    ionization_energies()
    xray_levels()
    coster_kronig()
    isotopes()
    photoabsorption()
