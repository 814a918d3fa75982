"""Write data/henke93_photoabsorption.csv: measured-based neutral photoabsorption below 200 eV.

Source: B. L. Henke, E. M. Gullikson and J. C. Davis, At. Data Nucl. Data Tables 54, 181
(1993), atomic scattering factors f1, f2 (with the later updates the files list), as shipped
in the PyPI package periodictable (module periodictable.xsf, files xsf/<symbol>.nff;
columns E (eV), f1, f2). The photoabsorption cross section per atom is
sigma = 2 r_e lambda f2 (Henke et al. 1993, eq. of their read.me), r_e and hc from
scipy.constants (CODATA).

Elements: Z = 1-92 without a Verner et al. (1996) fit in data/verner96_photoionization.csv
(chargecast uses those fits below 100 eV where they exist). Rows: every tabulated energy from
the file's first (10 eV for most elements) up to and including the first one at or above
200 eV, where chargecast hands over to the Elam table, less the rows below the first
ionization energy (data/ionization_energies.csv) and the file's sub-threshold tail (leading
values under 1e-3 of the largest); a first kept point within 1 eV above the ionization
energy is repeated at the ionization energy (the files place some edges a few tenths of an
eV high). Run from the repository root::

    pip install periodictable scipy numpy
    python data/generate_henke.py
"""

from __future__ import annotations

import datetime
import importlib.metadata
import pathlib

import numpy as np
import periodictable
from periodictable import xsf
from scipy import constants

HERE = pathlib.Path(__file__).resolve().parent
OUT = HERE / "henke93_photoabsorption.csv"
VERNER = HERE / "verner96_photoionization.csv"
IONIZATION = HERE / "ionization_energies.csv"
# Leading values below this fraction of the table's largest one are the file's own
# sub-threshold tail (e.g. Xe at 12.2 eV, above the 12.13 eV ionization energy).
TAIL_FRACTION = 1e-3
# A first kept point this close above the ionization energy is extended flat down to it.
FLAT_GAP_EV = 1.0
# chargecast blends this table into the Elam table between 100 and 200 eV.
JOIN_END_EV = 200.0
MAX_Z = 92

R_E_CM = constants.physical_constants["classical electron radius"][0] * 100.0
HC_EV_CM = constants.h * constants.c / constants.e * 100.0


def verner_elements() -> set[int]:
    lines = [line for line in VERNER.read_text().splitlines() if line and not line.startswith("#")]
    return {int(line.split(",")[0]) for line in lines[1:]}


def first_ionization_energies() -> dict[int, float]:
    lines = [line for line in IONIZATION.read_text().splitlines() if line and not line.startswith("#")]
    out = {}
    for line in lines[1:]:
        fields = line.split(",")
        if fields[1] == "0":
            out[int(fields[0])] = float(fields[2])
    return out


def table(z: int) -> list[tuple[float, float]]:
    symbol = periodictable.elements[z].symbol
    path = pathlib.Path(xsf.__file__).parent / "xsf" / f"{symbol.lower()}.nff"
    data = np.loadtxt(path, skiprows=1)
    rows = []
    for e, f2 in zip(data[:, 0], data[:, 2]):
        if rows and e <= rows[-1][0]:
            continue  # keep energies strictly increasing
        if f2 <= 0.0:
            continue
        sigma = 2.0 * R_E_CM * (HC_EV_CM / e) * f2
        rows.append((float(e), float(sigma)))
        if e >= JOIN_END_EV:
            break
    return rows


def above_threshold(rows: list[tuple[float, float]], ie_ev: float) -> list[tuple[float, float]]:
    """Rows from the first ionization energy up, without the file's sub-threshold tail."""
    largest = max(s for _, s in rows)
    kept = [r for r in rows if r[0] >= ie_ev]
    while kept and kept[0][1] < TAIL_FRACTION * largest:
        kept.pop(0)
    if kept and kept[0][0] - ie_ev <= FLAT_GAP_EV and kept[0][0] > ie_ev:
        kept.insert(0, (ie_ev, kept[0][1]))
    return kept


def main() -> None:
    skip = verner_elements()
    ies = first_ionization_energies()
    version = importlib.metadata.version("periodictable")
    today = datetime.date.today().isoformat()
    count = 0
    with OUT.open("w") as f:
        f.write(
            "# Photoabsorption cross section of neutral atoms (cm^2 per atom) from the first\n"
            "# ionization energy (or the first tabulated energy above it) to 200 eV: Henke,\n"
            "# Gullikson & Davis, At. Data Nucl. Data Tables 54, 181 (1993),\n"
            "# sigma = 2 r_e lambda f2, from the f2 files shipped in\n"
            f"# periodictable {version} (PyPI, periodictable/xsf/*.nff). Z = 1-92 without a\n"
            "# Verner et al. (1996) fit in verner96_photoionization.csv.\n"
            f"# generated {today} by data/generate_henke.py\n"
        )
        f.write("z,energy_ev,cross_section_cm2\n")
        for z in range(1, MAX_Z + 1):
            if z in skip:
                continue
            rows = above_threshold(table(z), ies[z])
            print(f"Z={z}: IE {ies[z]:.3f} eV, table from {rows[0][0]:.3f} eV")
            for e, sigma in rows:
                f.write(f"{z},{e:.6g},{sigma:.6g}\n")
                count += 1
    print(f"wrote {OUT.relative_to(HERE.parent)}: {count} rows")


if __name__ == "__main__":
    main()
