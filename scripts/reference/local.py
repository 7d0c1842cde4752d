#!/usr/bin/env python3
"""Independent reference figures for the local statistics (local Moran, Getis-Ord G_i and G_i*).

numpy only, with the hand-written readers of columbus.py (same folder), so the TypeScript engine is
checked against code it shares nothing with.

    python3 scripts/reference/local.py > test/golden/local.json

Datasets (both from Debian's r-cran-spdata, CC0): Columbus (49 areas, CRIME, queen contiguity) and
the North Carolina counties file sids.shp (100 areas, SID79 per 1,000 BIR79, queen contiguity).
Weights are row-standardised for local Moran and G_i; G_i* uses binary weights with the area itself
included. Moments are under total randomisation:
- local Moran (Anselin 1995 eqs. 13-14 as corrected by Sokal, Oden & Thomson 1998);
- G_i, G_i* (Getis & Ord 1992; Ord & Getis 1995), variance from sampling without replacement.
Both moment formulas were also checked here by exhaustive enumeration of every permutation of a
7-area example (printed to stderr). The conditional permutation p (Anselin 1995) is estimated with
200,000 draws per area (numpy's default generator, seed 20261202), folded to the observed direction:
(M + 1)/(R + 1) with M counting draws at or beyond the observed value on its side of the expectation.
"""
import importlib.util
import itertools
import json
import sys
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
spec = importlib.util.spec_from_file_location("columbus_reference", HERE / "columbus.py")
ref = importlib.util.module_from_spec(spec)
spec.loader.exec_module(ref)

DRAWS = 200_000
SEED = 20261202


def log(*parts):
    print(*parts, file=sys.stderr)


def local_moran(x, W):
    n = len(x)
    z = x - x.mean()
    m2 = (z ** 2).sum() / n
    m4 = (z ** 4).sum() / n
    b2 = m4 / m2 ** 2
    value = z / m2 * (W @ z)
    wi = W.sum(axis=1)
    wi2 = (W ** 2).sum(axis=1)
    expected = -wi / (n - 1)
    variance = wi2 * (n - b2) / (n - 1) + (wi ** 2 - wi2) * (2 * b2 - n) / ((n - 1) * (n - 2)) - wi ** 2 / (n - 1) ** 2
    return value, expected, variance


def getis_ord(x, W, star):
    n = len(x)
    value = np.empty(n); expected = np.empty(n); variance = np.empty(n)
    for i in range(n):
        keep = np.ones(n, bool) if star else np.arange(n) != i
        w = W[i, keep]; v = x[keep]; m = keep.sum()
        value[i] = w @ v / v.sum()
        expected[i] = w.sum() / m
        s2 = (v ** 2).mean() - v.mean() ** 2
        variance[i] = s2 * (m * (w ** 2).sum() - w.sum() ** 2) / ((m - 1) * v.sum() ** 2)
    return value, expected, variance


def permutation_p(stat_of, x, W, observed, expected, rng, star=False):
    """Conditional permutation: area i keeps x_i; |N_i| of the other values are drawn without
    replacement onto its neighbours (in the row's order)."""
    n = len(x)
    out = np.empty(n)
    for i in range(n):
        nb = [j for j in np.nonzero(W[i])[0] if j != i]
        others = np.delete(np.arange(n), i)
        # a draw without replacement per permutation: argsort of uniform keys, first k taken
        keys = rng.random((DRAWS, n - 1))
        picks = others[np.argpartition(keys, len(nb) - 1, axis=1)[:, :len(nb)]]
        stats = stat_of(i, nb, picks)
        if observed[i] >= expected[i]:
            m = (stats >= observed[i] - 1e-12 * max(1, abs(observed[i]))).sum()
        else:
            m = (stats <= observed[i] + 1e-12 * max(1, abs(observed[i]))).sum()
        out[i] = (m + 1) / (DRAWS + 1)
    return out


def enumeration_check():
    rng = np.random.default_rng(3)
    n = 7
    x = rng.normal(size=n) ** 3
    W = (rng.random((n, n)) < 0.5).astype(float); np.fill_diagonal(W, 0); W[0, 1] = 0.7; W[0, 3] = 2.0
    v, e, var = local_moran(x, W)
    z = x - x.mean(); m2 = (z ** 2).sum() / n
    all_i = np.array([z[list(p)][0] / m2 * (W[0] @ z[list(p)]) for p in itertools.permutations(range(n))])
    log("enumeration, local Moran area 0: mean", all_i.mean(), "vs", e[0], "; variance", all_i.var(), "vs", var[0])
    xp = np.abs(x) + 0.1
    Ws = W.copy(); Ws[0, 0] = 1.0
    g, ge, gv = getis_ord(xp, Ws, True)
    all_g = np.array([Ws[0] @ xp[list(p)] / xp.sum() for p in itertools.permutations(range(n))])
    log("enumeration, G_i* area 0: mean", all_g.mean(), "vs", ge[0], "; variance", all_g.var(), "vs", gv[0])


def analyse(name, x, neighbours, rng):
    n = len(x)
    binary = np.zeros((n, n))
    for i, nb in enumerate(neighbours):
        binary[i, nb] = 1.0
    W = binary / binary.sum(axis=1, keepdims=True)
    lm, lme, lmv = local_moran(x, W)
    z = x - x.mean(); m2 = (z ** 2).sum() / n
    log(name, "identity: sum I_i / S0 =", lm.sum() / n, "global I =", n / n * (z @ W @ z) / (z @ z))
    lm_p = permutation_p(lambda i, nb, picks: z[i] / m2 * (z[picks] * W[i, nb]).sum(axis=1), x, W, lm, lme, rng)
    gi, gie, giv = getis_ord(x, W, False)
    gi_p = permutation_p(lambda i, nb, picks: (x[picks] * W[i, nb]).sum(axis=1) / (x.sum() - x[i]), x, W, gi, gie, rng)
    star = binary.copy(); np.fill_diagonal(star, 1.0)
    gs, gse, gsv = getis_ord(x, star, True)
    gs_p = permutation_p(lambda i, nb, picks: (x[i] + x[picks].sum(axis=1)) / x.sum(), x, star, gs, gse, rng)

    def block(v, e, var, p):
        zz = (v - e) / np.sqrt(var)
        return {"value": v.tolist(), "expected": e.tolist(), "variance": var.tolist(), "z": zz.tolist(), "pPermutation": p.tolist()}

    return {
        "n": n, "links": int(binary.sum()),
        "moran": block(lm, lme, lmv, lm_p), "gi": block(gi, gie, giv, gi_p), "gistar": block(gs, gse, gsv, gs_p),
    }


def main():
    enumeration_check()
    rng = np.random.default_rng(SEED)
    out = {"source": __doc__.strip().split("\n")[0] + " See scripts/reference/local.py.", "draws": DRAWS, "seed": SEED}
    fx = ROOT / "test" / "fixtures"
    polys = ref.read_polygons(fx / "columbus" / "columbus.shp")
    table = ref.read_table(fx / "columbus" / "columbus.dbf")
    out["columbus"] = {"variable": "CRIME", **analyse("columbus", np.array(table["CRIME"]), ref.queen_neighbours(polys), rng)}
    polys = ref.read_polygons(fx / "sids" / "sids.shp")
    table = ref.read_table(fx / "sids" / "sids.dbf")
    rate = 1000 * np.array(table["SID79"]) / np.array(table["BIR79"])
    out["sids"] = {"variable": "1000 * SID79 / BIR79", "ids": table["FIPS"], **analyse("sids", rate, ref.queen_neighbours(polys), rng)}
    json.dump(out, sys.stdout, indent=1)
    print()


if __name__ == "__main__":
    main()
