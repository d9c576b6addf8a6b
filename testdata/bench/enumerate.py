#!/usr/bin/env python3
"""Brute-force reference for ringbox's exact counter: the script a user would
otherwise write. It enumerates every level of a free-electron hard-wall cube
(m = m0, spin 2), sorts them and searches the sorted array for N(E) at the
same 40 energies `ringbox count` is asked for, and prints the integers.

    python3 enumerate.py SIDE_NM [EMAX_EV] [--plain]

By default the levels are built one slab of nx at a time and cut at EMAX
before sorting (the careful version). --plain builds the whole nmax^3 cube of
levels at once, as the shortest script does. Both print the same integers.

Constants are CODATA 2018 (hbar^2/2m0 = 3.80998212 eV A^2).
"""
import sys
import numpy as np

args = [a for a in sys.argv[1:] if not a.startswith("--")]
plain = "--plain" in sys.argv
side_nm = float(args[0])
emax = float(args[1]) if len(args) > 1 else 7.0
c = 3.80998212e-20  # hbar^2/(2 m0) in eV m^2
q = c * (np.pi / (side_nm * 1e-9)) ** 2  # level scale: E = q (nx^2 + ny^2 + nz^2)
nmax = int(np.sqrt(emax / q)) + 1
n2 = np.arange(1, nmax + 1, dtype=np.float64) ** 2
if plain:
    levels = q * (n2[:, None, None] + n2[None, :, None] + n2[None, None, :]).ravel()
else:
    parts = []
    for nx in n2:  # one 2D slab at a time keeps memory to nmax^2 floats
        e = q * (nx + n2[:, None] + n2[None, :]).ravel()
        parts.append(e[e <= emax * (1 + 1e-12)])
    levels = np.concatenate(parts)
levels.sort()
energies = emax * np.arange(1, 41) / 40
counts = 2 * np.searchsorted(levels, energies * (1 + 1e-12), side="right")
print(" ".join(str(int(x)) for x in counts))
