#!/usr/bin/env python3
"""Write the NIST-JANAF reference tables that the Rust tests check against.

Source: NIST-JANAF Thermochemical Tables, 4th ed. (M. W. Chase Jr., J. Phys. Chem. Ref. Data
Monograph 9, 1998), as shipped in the PyPI package `janaf`. Standard-state pressure 1 bar.

One CSV per species under tests/data/janaf/, with the rows at 298.15 K and at every tabulated
temperature from 300 to 1500 K, copied from the package's table text (numbers as printed in
JANAF; a number printed with a bare trailing point, e.g. "0.", gets a trailing zero, "0.0").
The 298.15 K row carries dfH(298.15 K).

Columns: T_K, Cp_J_molK, S_J_molK, H_minus_H298_kJ_mol, dfH_kJ_mol, dfG_kJ_mol, log10_Kf

Run:  python3 tools/janaf_reference.py      (needs only the `janaf` package)
"""

from __future__ import annotations

import os

import janaf

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OUT_DIR = os.path.join(ROOT, "tests", "data", "janaf")

# file stem -> JANAF table index (janaf.search finds these: e.g. CH4 "Methane (g)" is C-067)
TABLES = {
    "CH4": "C-067",    # Methane, gas
    "H2O": "H-064",    # Water, gas (ideal gas, 1 bar)
    "CO": "C-093",     # Carbon monoxide, gas
    "CO2": "C-095",    # Carbon dioxide, gas
    "H2": "H-050",     # Hydrogen, reference state
    "N2": "N-023",     # Nitrogen, reference state
    "O2": "O-029",     # Oxygen, reference state
    "Ar": "Ar-001",    # Argon, reference state
    "NH3": "H-083",    # Ammonia, gas
    "C_gr": "C-002",   # Carbon, reference state (graphite)
}

HEADER = "T_K,Cp_J_molK,S_J_molK,H_minus_H298_kJ_mol,dfH_kJ_mol,dfG_kJ_mol,log10_Kf"


def clean(x: str) -> str:
    x = x.strip()
    if x.endswith("."):
        x += "0"
    float(x)  # must be a number
    return x


def rows(index: str):
    table = janaf.Table(index)
    lines = table.raw.splitlines()
    # line 0: name and formula; line 1: column titles; then data
    cols = lines[1].split("\t")
    assert cols[:8] == ["T(K)", "Cp", "S", "-[G-H(Tr)]/T", "H-H(Tr)", "delta-f H", "delta-f G",
                        "log Kf"], cols
    out = []
    for line in lines[2:]:
        if not line.strip():
            continue
        f = line.split("\t")
        t = float(f[0])
        if not (abs(t - 298.15) < 1e-9 or 300.0 - 1e-9 <= t <= 1500.0 + 1e-9):
            continue
        if len(f) < 8:
            raise SystemExit(f"{index}: short row at {t} K: {line!r}")
        # columns: T, Cp, S, -(G-H298)/T (not kept), H-H298, dfH, dfG, log Kf
        out.append((t, [clean(f[0]), clean(f[1]), clean(f[2]), clean(f[4]), clean(f[5]),
                        clean(f[6]), clean(f[7])]))
    out.sort(key=lambda r: r[0])
    return table, [r[1] for r in out]


def main():
    os.makedirs(OUT_DIR, exist_ok=True)
    print(f"janaf {janaf.__version__}")
    for stem, index in TABLES.items():
        table, data = rows(index)
        path = os.path.join(OUT_DIR, f"{stem}.csv")
        with open(path, "w", newline="\n") as f:
            f.write(HEADER + "\n")
            for r in data:
                f.write(",".join(r) + "\n")
        temps = [r[0] for r in data]
        print(f"  {os.path.relpath(path, ROOT)}: {index} {table.name} {table.formula}, "
              f"{len(data)} rows, {temps[0]}..{temps[-1]} K, dfH298 = {data[0][4]} kJ/mol")


if __name__ == "__main__":
    main()
