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


# Half-life units of mendeleev's isotope table, in seconds (year: Julian year, 365.25 d).
_YEAR_S = 365.25 * 86400.0
HALF_LIFE_UNIT_S = {
    "ysec": 1e-24, "zsec": 1e-21, "asec": 1e-18, "fsec": 1e-15, "psec": 1e-12, "nsec": 1e-9,
    "usec": 1e-6, "msec": 1e-3, "sec": 1.0, "minute": 60.0, "hour": 3600.0, "day": 86400.0,
    "year": _YEAR_S, "kyear": 1e3 * _YEAR_S, "Myear": 1e6 * _YEAR_S, "Gyear": 1e9 * _YEAR_S,
    "Tyear": 1e12 * _YEAR_S, "Pyear": 1e15 * _YEAR_S, "Eyear": 1e18 * _YEAR_S,
    "Zyear": 1e21 * _YEAR_S, "Yyear": 1e24 * _YEAR_S,
}
# Primary decay modes kept as channels (mendeleev code -> our name); every other primary
# mode (fission, particle emission, double beta, clusters) is the channel "other".
PRIMARY_MODES = {"B-": "beta-", "B+": "beta+/EC", "EC": "beta+/EC", "EC+B+": "beta+/EC",
                 "A": "alpha", "IT": "IT"}
# Beta-delayed particle emission: a sub-branch of its beta mode (ENSDF convention: the
# delayed branch is a percentage of all decays, included in the beta intensity).
DELAYED_MODES = {"B-n": ("beta-", "beta-n"), "B+p": ("beta+/EC", "beta+/EC p")}
SUB_BRANCH_PREFIXES = ("B-", "B+")


def decays() -> None:
    iso = fetch_table("isotopes").sort_values(["atomic_number", "mass_number"])
    modes = fetch_table("isotopedecaymodes")
    by_isotope: dict[int, list] = {}
    for r in modes.itertuples():
        by_isotope.setdefault(int(r.isotope_id), []).append(r)
    rows = []
    for r in iso.itertuples():
        if r.is_radioactive != 1:
            continue
        half_life_s = None
        if r.half_life is not None and not math.isnan(r.half_life):
            half_life_s = float(f"{float(r.half_life) * HALF_LIFE_UNIT_S[r.half_life_unit]:.6g}")
        channels: dict[str, float] = {}
        delayed: dict[str, float] = {}
        for m in by_isotope.get(int(r.id), []):
            # Only measured branchings ("=" or "~"); limits and allowed-not-observed modes
            # carry no usable number.
            if m.relation not in ("=", "~") or m.intensity is None or math.isnan(m.intensity):
                continue
            if m.is_allowed_not_observed == 1:
                continue
            share = float(m.intensity) / 100.0
            if m.mode in DELAYED_MODES:
                delayed[m.mode] = share
            elif m.mode in PRIMARY_MODES:
                name = PRIMARY_MODES[m.mode]
                channels[name] = channels.get(name, 0.0) + share
            elif not m.mode.startswith(SUB_BRANCH_PREFIXES) and m.mode not in ("e+",):
                channels["other"] = channels.get("other", 0.0) + share
        for code, share in delayed.items():
            parent, name = DELAYED_MODES[code]
            if parent in channels:
                moved = min(share, channels[parent])
                channels[parent] -= moved
                channels[name] = moved
        total = sum(channels.values())
        text = ""
        if total > 0:
            text = ";".join(
                f"{k}:{v / total:.6g}" for k, v in sorted(channels.items()) if v / total > 0
            )
        rows.append([int(r.atomic_number), int(r.mass_number), half_life_s, text])
    write(
        "decays.csv",
        [
            "Radioactive isotopes (ground states): half-life (s; year = 365.25 d) and decay channels",
            "with branching fractions normalised to 1 (channel:fraction;...). Channels: beta-, beta-n",
            "(beta-delayed neutron), beta+/EC, beta+/EC p (beta-delayed proton), alpha, IT, other",
            "(fission, particle and cluster emission, double beta). Delayed-particle branches are",
            "taken out of their beta branch (ENSDF convention). Only measured branchings ('=', '~').",
            "Empty half_life_s or decay_modes: not known in the source.",
            "Intensities are taken as mendeleev gives them (it lists 238U fission at 5.44 %; the",
            "evaluated value is about 5e-5 %, from memory): 'other' shares of heavy nuclides can be high.",
            f"Source: mendeleev {mendeleev.__version__} (tables 'isotopes' and 'isotopedecaymodes').",
        ],
        ["z", "mass_number", "half_life_s", "decay_modes"],
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


TABLES = {
    "elements": elements,
    "ionization_energies": ionization_energies,
    "xray_levels": xray_levels,
    "coster_kronig": coster_kronig,
    "isotopes": isotopes,
    "decays": decays,
    "photoabsorption": photoabsorption,
}

if __name__ == "__main__":
    import sys

    # `python data/generate.py decays isotopes` rewrites only the named tables.
    for table in sys.argv[1:] or list(TABLES):
        TABLES[table]()
