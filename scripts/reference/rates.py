"""Independent reference for the rate smoothers and the rate-adjusted Moran's I.

numpy only, with the hand-written readers of columbus.py (same folder). Dataset: the North Carolina
counties file sids.shp from Debian's r-cran-spdata (CC0), events SID74, population BIR74, queen
contiguity, row-standardised weights for Moran's I.

Formulas: Marshall (1991) method of moments for the global and local empirical-Bayes rates (negative
between-area variance set to 0), the pooled neighbourhood rate, and Assuncao & Reis (1999) for the
empirical-Bayes standardisation before Moran's I. Usage:
    python3 scripts/reference/rates.py > test/golden/rates.json
"""
import importlib.util
import json
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
spec = importlib.util.spec_from_file_location("columbus_reference", HERE / "columbus.py")
ref = importlib.util.module_from_spec(spec)
spec.loader.exec_module(ref)


def moments(d, n):
    b = d.sum() / n.sum()
    s2 = (n * (d / n - b) ** 2).sum() / n.sum()
    a = s2 - b / (n.sum() / len(n))
    return b, max(a, 0.0)


def eb(d, n, i, members):
    b, a = moments(d[members], n[members])
    c = a / (a + b / n[i]) if a > 0 else 0.0
    return b + c * (d[i] / n[i] - b), c


def main():
    fx = HERE.parent.parent / "test" / "fixtures" / "sids"
    polys = ref.read_polygons(fx / "sids.shp")
    table = ref.read_table(fx / "sids.dbf")
    d = np.array(table["SID74"], dtype=float)
    n = np.array(table["BIR74"], dtype=float)
    nb = ref.queen_neighbours(polys)
    m = len(d)
    every = np.arange(m)
    glob = [eb(d, n, i, every) for i in range(m)]
    local = [eb(d, n, i, np.array([i] + list(nb[i]))) for i in range(m)]
    hood = [(d[[i] + list(nb[i])].sum() / n[[i] + list(nb[i])].sum()) for i in range(m)]
    b, a = moments(d, n)
    z = (d / n - b) / np.sqrt(a + b / n)
    W = ref.row_standardised(nb)
    zc = z - z.mean()
    I = m / W.sum() * (zc @ W @ zc) / (zc @ zc)
    out = {
        "source": "sids.shp (r-cran-spdata, CC0), SID74 / BIR74, queen contiguity, row-standardised",
        "ids": table["FIPS"],
        "ebGlobal": [g[0] for g in glob],
        "ebGlobalWeight": [g[1] for g in glob],
        "ebLocal": [g[0] for g in local],
        "neighbourhood": hood,
        "ebMoranI": I,
        "standardised": z.tolist(),
    }
    print(json.dumps(out, indent=1))


if __name__ == "__main__":
    main()
