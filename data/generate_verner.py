"""Write data/verner96_photoionization.csv: Verner et al. (1996) outer-shell fits.

Source: D. A. Verner, G. J. Ferland, K. T. Korista and D. G. Yakovlev, ApJ 465, 487 (1996),
Table 1 (ground-state outer-shell photoionization fits), as shipped in the PyPI package
rabacus 0.9.5 (file rabacus/atomic/verner/photox/photo.dat; 185 ions of Z = 1-14, 16, 18,
20, 26). The package does not build on current numpy, so this script reads the file from
the unpacked source distribution (``pip download rabacus==0.9.5 --no-deps``, then untar):

    python3 data/generate_verner.py path/to/rabacus-0.9.5

Columns of photo.dat: Z, N (electrons), E_th, E_max, E_0 (eV), sigma_0 (Mb), y_a, P, y_w,
y_0, y_1.
"""

import datetime
import pathlib
import sys

OUT = pathlib.Path(__file__).resolve().parent / "verner96_photoionization.csv"
COLUMNS = "z,electrons,threshold_ev,max_ev,e0_ev,sigma0_mb,ya,p,yw,y0,y1"


def main(root: str) -> None:
    src = pathlib.Path(root) / "rabacus" / "atomic" / "verner" / "photox" / "photo.dat"
    rows = []
    for line in src.read_text().splitlines():
        fields = line.split()
        if len(fields) != 11:
            continue
        z, n = int(fields[0]), int(fields[1])
        values = [float(v) for v in fields[2:]]
        rows.append((z, n, values))
    rows.sort(key=lambda r: (r[0], -r[1]))
    today = datetime.date.today().isoformat()
    with OUT.open("w") as f:
        f.write(
            "# Ground-state outer-shell photoionization fits: Verner, Ferland, Korista &\n"
            "# Yakovlev, ApJ 465, 487 (1996), Table 1, as shipped in rabacus 0.9.5 (PyPI),\n"
            "# rabacus/atomic/verner/photox/photo.dat: 185 ions of Z = 1-14, 16, 18, 20, 26.\n"
            "# sigma(E) = sigma0 [(x-1)^2 + yw^2] y^(P/2-5.5) (1 + sqrt(y/ya))^-P Mb,\n"
            "# x = E/E0 - y0, y = sqrt(x^2 + y1^2), valid threshold_ev <= E <= max_ev.\n"
            f"# generated {today} by data/generate_verner.py\n"
        )
        f.write(COLUMNS + "\n")
        for z, n, values in rows:
            f.write(f"{z},{n}," + ",".join(f"{v:.4g}" for v in values) + "\n")


if __name__ == "__main__":
    main(sys.argv[1])
