#!/usr/bin/env python3
"""Brute-force reference for ringbox's exact counter: the script a user would
otherwise write. It enumerates every level of a free-electron hard-wall cube
(m = m0, spin 2), sorts them and searches the sorted array for N(E) at the
same 40 energies `ringbox count` is asked for, and prints the integers.

    python3 enumerate.py SIDE_NM [EMAX_EV]

Constants are CODATA 2018 (hbar^2/2m0 = 3.80998212 eV A^2).
"""
import sys
import numpy as np

side_nm = float(sys.argv[1])
emax = float(sys.argv[2]) if len(sys.argv) > 2 else 7.0
c = 3.80998212e-20  # hbar^2/(2 m0) in eV m^2
q = c * (np.pi / (side_nm * 1e-9)) ** 2  # level scale: E = q (nx^2 + ny^2 + nz^2)
nmax = int(np.sqrt(emax / q)) + 1
n2 = np.arange(1, nmax + 1, dtype=np.float64) ** 2
levels = []
for nx in n2:  # one 2D slab at a time keeps memory to nmax^2 floats
    e = q * (nx + n2[:, None] + n2[None, :]).ravel()
    levels.append(e[e <= emax * (1 + 1e-12)])
levels = np.sort(np.concatenate(levels))
energies = emax * np.arange(1, 41) / 40
counts = 2 * np.searchsorted(levels, energies * (1 + 1e-12), side="right")
print(" ".join(str(int(x)) for x in counts))
