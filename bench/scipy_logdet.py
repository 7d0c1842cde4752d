"""Reference timing: scipy.sparse.linalg.splu of I - rho*S (CSC), ln|det| = sum(log|diag U|).

Reads a little-endian binary file: int32 n, int32 nnz, int32 rows[nnz], int32 cols[nnz],
float64 vals[nnz], int32 count, float64 rhos[count]. Prints one JSON line.
"""
import json
import sys
import time

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import splu

with open(sys.argv[1], "rb") as f:
    n, nnz = np.frombuffer(f.read(8), dtype="<i4")
    rows = np.frombuffer(f.read(4 * nnz), dtype="<i4")
    cols = np.frombuffer(f.read(4 * nnz), dtype="<i4")
    vals = np.frombuffer(f.read(8 * nnz), dtype="<f8")
    (count,) = np.frombuffer(f.read(4), dtype="<i4")
    rhos = np.frombuffer(f.read(8 * count), dtype="<f8")

s = sp.csc_matrix((vals, (rows, cols)), shape=(n, n))
eye = sp.identity(n, format="csc")
seconds = []
logdets = []
for rho in rhos:
    t0 = time.perf_counter()
    lu = splu((eye - rho * s).tocsc())
    logdet = float(np.sum(np.log(np.abs(lu.U.diagonal()))))
    seconds.append(time.perf_counter() - t0)
    logdets.append(logdet)
print(json.dumps({"seconds": seconds, "logdets": logdets, "nnzLU": int(lu.L.nnz + lu.U.nnz)}))
