"""Fit the concentration dependence of ion apparent molar volumes to recalled densities.

Reproduces the ``masson_cm3`` column of ``ionact/data/ions.csv``: the coefficient S_i of
V_i = V°_i + S_i √I_c (I_c the molar ionic strength, mol/L; Masson's √c law written ion
by ion), fitted by least squares to densities of single-salt solutions at 20 °C recalled
from the CRC Handbook's "concentrative properties of aqueous solutions" table (values
from memory; see ``tests/reference/densities_crc_20C.csv``). The V°_i are held at the
table's infinite-dilution values. The fit leaves one direction free (adding k·z_i to
every S_i changes no neutral solution); the minimum-norm solution is taken.

Run: ``python tools/fit_apparent_volumes.py`` (prints the fitted S_i and the residuals).
"""

from __future__ import annotations

import csv
import math
from pathlib import Path

import numpy as np

import ionact as ia
from ionact import water

ROOT = Path(__file__).resolve().parents[1]


def load():
    rows = list(csv.DictReader((ROOT / "tests/reference/densities_crc_20C.csv").open()))
    return [(r["salt"], float(r["mass_percent"]), float(r["density_g_cm3"])) for r in rows]


def main() -> None:
    data = load()
    ions = sorted({i for s, _, _ in data for i, _ in ia.Salt.parse(s).ions})
    col = {n: k for k, n in enumerate(ions)}
    rho_w = water.density(20.0) / 1000.0
    a_rows, b_rows = [], []
    for salt, wp, rho in data:
        s = ia.Salt.parse(salt)
        c = rho * wp * 10.0 / s.molar_mass  # mol/L
        ic = c * s.ionic_strength_factor
        v0 = sum(nu * ia.Ion.parse(i).volume for i, nu in s.ions)
        # rho = rho_w + c (M - rho_w phiV)/1000  ->  phiV = (M - 1000 (rho - rho_w)/c) / rho_w
        phi_v = (s.molar_mass - 1000.0 * (rho - rho_w) / c) / rho_w
        row = np.zeros(len(ions))
        for i, nu in s.ions:
            row[col[i]] += nu * math.sqrt(ic)
        # weight by c so that the residual is a density residual (g/cm3 x 1000)
        a_rows.append(row * c * rho_w)
        b_rows.append((phi_v - v0) * c * rho_w)
    a, b = np.array(a_rows), np.array(b_rows)
    sol, *_ = np.linalg.lstsq(a, b, rcond=None)
    z = np.array([ia.Ion.parse(n).charge for n in ions], dtype=float)
    k = -(sol @ z) / (z @ z)  # minimum-norm along the free direction S_i + k z_i
    sol = sol + k * z
    for n, v in zip(ions, sol, strict=True):
        print(f"{n:8s} {v:8.3f}")
    res = (a @ sol - b) / 1000.0
    for (salt, wp, rho), r in zip(data, res, strict=True):
        print(f"{salt:10s} {wp:5.1f} %  {rho:.4f}  residual {r:+.4f} g/cm3 ({r / rho * 100:+.2f} %)")


if __name__ == "__main__":
    main()
