#!/usr/bin/env python3
"""Whole-process benchmark: a 20 000-case sweep of one reformer written to CSV by syntrain,
against a general-purpose equilibrium library (Cantera, from PyPI) doing the same 20 000
isothermal, isobaric equilibria in a Python loop, both measured in this one run.

The problem is the same on both sides: flowsheets/single-reformer.yaml (a CH4/H2O/H2/CO2/N2
feed at 30 bar, reforming and shift at zero approach) at 20 000 outlet temperatures evenly
spaced from 700 degC to 950 degC; Cantera's phase holds the same species with syntrain's own
NASA polynomials (data/species.yaml). syntrain writes every default column (streams, unit,
summary) of every case to a CSV file, and by default checks carbon formation along the
reformer's path (21 more equilibria a case); the Python loop only keeps each outlet
composition. The script times the default, the outlet stream only, and the reformer with
`carbon-path-points: 0` (the equilibria alone).
The script checks both give the same outlet methane at three temperatures before timing.

Usage: python3 tools/bench_sweep_vs_cantera.py [path/to/syntrain]  (build with
`cargo build --release` first). Needs cantera and PyYAML; CI does not run it.
"""

import csv
import os
import subprocess
import sys
import tempfile
import time

import cantera as ct
import yaml

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
FLOWSHEET = os.path.join(ROOT, "flowsheets", "single-reformer.yaml")
FEED_KMOL_H = {"CH4": 1000.0, "H2O": 3000.0, "H2": 30.0, "CO2": 10.0, "N2": 10.0}
SPECIES = ["CH4", "H2O", "CO", "CO2", "H2", "N2"]
P_PA = 30.0e5
CASES = 20_000
T_FROM_C, T_TO_C = 700.0, 950.0


def gas_phase():
    with open(os.path.join(ROOT, "data", "species.yaml"), encoding="utf-8") as f:
        recs = {r["name"]: r for r in yaml.safe_load(f)["species"]}
    species = []
    for name in SPECIES:
        n = recs[name]["nasa7"]
        t_low, t_mid, t_high = (float(n[k]) for k in ("from-k", "break-k", "to-k"))
        low = [float(x) for x in n["below-break"]]
        high = [float(x) for x in n["above-break"]]
        sp = ct.Species(name, {e: float(v) for e, v in recs[name]["atoms"].items()})
        sp.thermo = ct.NasaPoly2(t_low, t_high, 1.0e5, [t_mid] + high + low)
        species.append(sp)
    return ct.Solution(thermo="ideal-gas", species=species)


def temperatures_c():
    n = CASES - 1
    return [(T_FROM_C * (n - k) + T_TO_C * k) / n for k in range(CASES)]


def main():
    exe = sys.argv[1] if len(sys.argv) > 1 else os.path.join(ROOT, "target", "release", "syntrain")
    gas = gas_phase()
    total = sum(FEED_KMOL_H.values())
    x_feed = {k: v / total for k, v in FEED_KMOL_H.items()}
    ts = temperatures_c()

    vary = f"units.reformer.outlet-temperature={T_FROM_C} degC..{T_TO_C} degC:{CASES}"

    def sweep(extra, flowsheet=FLOWSHEET):
        with tempfile.TemporaryDirectory() as tmp:
            out = os.path.join(tmp, "sweep.csv")
            start = time.perf_counter()
            subprocess.run([exe, "sweep", flowsheet, "--vary", vary, "-o", out] + extra,
                           check=True, stderr=subprocess.DEVNULL)
            seconds = time.perf_counter() - start
            with open(out, newline="", encoding="utf-8") as f:
                return seconds, list(csv.DictReader(f))

    # Every default column (streams, unit, summary), then the outlet stream only (what the
    # Python loop keeps).
    syntrain_s, rows = sweep([])
    columns = len(rows[0])
    outlet_s, outlet_rows = sweep(["--columns", "streams.reformed-gas.*"])
    # The same with the reformer's carbon check along its path switched off
    # (`carbon-path-points: 0`, the outlet gas still checked): the equilibria alone, as the
    # Python loop solves them.
    with open(FLOWSHEET, encoding="utf-8") as f:
        text = f.read().replace("    approach: {reforming: 0 K, shift: 0 K}",
                                "    approach: {reforming: 0 K, shift: 0 K}\n"
                                "    carbon-path-points: 0")
    with tempfile.TemporaryDirectory() as tmp:
        no_path = os.path.join(tmp, "no-path.yaml")
        with open(no_path, "w", encoding="utf-8") as f:
            f.write(text)
        bare_s, _ = sweep([], no_path)

    start = time.perf_counter()
    outlet = []
    for t_c in ts:
        gas.TPX = t_c + 273.15, P_PA, x_feed
        gas.equilibrate("TP")
        outlet.append(gas.X)
    cantera_s = time.perf_counter() - start

    i_ch4, i_h2o = gas.species_index("CH4"), gas.species_index("H2O")
    worst = 0.0
    for k in (0, CASES // 2, CASES - 1):
        x = outlet[k]
        dry_ch4 = 100.0 * x[i_ch4] / (1.0 - x[i_h2o])
        mine = float(rows[k]["streams.reformed-gas.dry_mol_pct.CH4"])
        worst = max(worst, abs(mine - dry_ch4))
    print(f"cases: {CASES}, syntrain CSV columns: {columns} (outlet only: "
          f"{len(outlet_rows[0])}), rows: {len(rows)}")
    print(f"largest difference in outlet CH4 (mol % dry) at 3 checked cases: {worst:.2e}")
    print(f"syntrain sweep to CSV: {syntrain_s:.3f} s ({1e6 * syntrain_s / CASES:.2f} us a case)")
    print(f"Cantera loop: {cantera_s:.3f} s ({1e6 * cantera_s / CASES:.2f} us a call)")
    print(f"ratio: {cantera_s / syntrain_s:.1f}x")
    print(f"syntrain sweep, outlet stream only: {outlet_s:.3f} s "
          f"({1e6 * outlet_s / CASES:.2f} us a case), ratio {cantera_s / outlet_s:.1f}x")
    print(f"syntrain sweep, every column, no carbon check along the path: {bare_s:.3f} s "
          f"({1e6 * bare_s / CASES:.2f} us a case), ratio {cantera_s / bare_s:.1f}x")
    if worst > 1e-6:
        sys.exit("the two sides do not solve the same problem")


if __name__ == "__main__":
    main()
