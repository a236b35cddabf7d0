#!/usr/bin/env python3
"""Generate autothermal-reformer reference data for syntrain with Cantera.

Each case is a process gas (methane, steam and some hydrogen, carbon oxides and
nitrogen) and an oxidant (oxygen or air) at their own temperatures, mixed at
constant pressure and brought to Gibbs equilibrium at the total inlet enthalpy
(Cantera's `equilibrate('HP')`). The ideal-gas phase is built from syntrain's
own species records (data/species.yaml, NASA 7-coefficient polynomials,
standard-state pressure 1 bar) with the species CH4, H2O, CO, CO2, H2, O2, N2
and Ar, so the file compares only the unit's method (oxygen burnt, reforming
and shift at equilibrium, adiabatic), not the thermodynamic data.

Writes tests/data/cantera_autothermal.csv and prints the self-checks (element
balance, reaction equilibrium residuals, enthalpy balance, oxygen left).

Usage:  python3 tools/cantera_autothermal.py [--species PATH] [--out PATH]

Needs cantera, numpy and PyYAML. CI does not run this: the CSV file it writes
is committed.
"""

import argparse
import os
import sys

import numpy as np
import cantera as ct

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from cantera_equilibrium import (  # noqa: E402  (the shared helpers)
    BAR, NU_REFORMING, NU_SHIFT, P0, element_residual, equilibrate, fmt,
    load_yaml, make_species, moles_out, poly_direct, reaction_residual)

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SPECIES = ["CH4", "H2O", "CO", "CO2", "H2", "O2", "N2", "Ar"]
TOL = 1e-9

# Dry air, mol fractions (common practice, rounded; CO2 left out).
AIR = {"N2": 0.7810, "O2": 0.2095, "Ar": 0.0095}


def air(total):
    return {k: v * total for k, v in AIR.items()}


def cases():
    """(kind, P_bar, T_process_K, process, T_oxidant_K, oxidant), mol."""
    return [
        # Oxygen-blown, pre-reformed natural gas, S/C 0.6, O2/C 0.58.
        ("oxygen", 30.0, 923.15,
         {"CH4": 1.0, "H2O": 0.6, "H2": 0.02, "CO2": 0.01, "N2": 0.01},
         513.15, {"O2": 0.58, "Ar": 0.003}),
        # Oxygen-blown, S/C 1.5 (pre-reformer gas with hydrogen), O2/C 0.55.
        ("oxygen", 30.0, 923.15,
         {"CH4": 0.9, "H2O": 1.35, "H2": 0.12, "CO": 0.002, "CO2": 0.08,
          "N2": 0.01},
         513.15, {"O2": 0.55 * 0.9}),
        # Oxygen-blown, S/C 1.0, O2/C 0.6, cooler preheat.
        ("oxygen", 30.0, 873.15,
         {"CH4": 1.0, "H2O": 1.0, "H2": 0.03, "CO2": 0.02},
         473.15, {"O2": 0.6}),
        # Air-blown secondary reformer: primary-reformed gas at 790 degC and
        # process air at 580 degC.
        ("air", 30.0, 1063.15,
         {"CH4": 0.118, "H2O": 0.99, "H2": 0.62, "CO": 0.092, "CO2": 0.10,
          "N2": 0.003},
         853.15, air(0.40)),
    ]


def make_solution(records):
    return ct.Solution(thermo="ideal-gas",
                       species=[make_species(records[n]) for n in SPECIES])


def enthalpy_j(records, flows, T):
    """H (J) of flows (mol, by name) at T from our polynomials directly."""
    return sum(n * poly_direct(records[s], T)[0] * ct.gas_constant / 1000.0 * T
               for s, n in flows.items())


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--species", default=os.path.join(ROOT, "data",
                                                      "species.yaml"))
    ap.add_argument("--out", default=os.path.join(ROOT, "tests", "data",
                                                  "cantera_autothermal.csv"))
    args = ap.parse_args()
    doc = load_yaml(args.species)
    records = {r["name"]: r for r in doc["species"]}
    gas = make_solution(records)
    assert gas.reference_pressure == P0
    print(f"cantera {ct.__version__}, species data {args.species}")
    header = (["case", "kind", "P_bar", "T_process_K", "T_oxidant_K"]
              + [f"process_{s}" for s in SPECIES]
              + [f"oxidant_{s}" for s in SPECIES]
              + ["T_out_K"] + [f"y_{s}" for s in SPECIES])
    rows = [",".join(header)]
    worst = {"element": 0.0, "reforming": 0.0, "shift": 0.0,
             "enthalpy": 0.0, "y_O2": 0.0}
    for i, (kind, p_bar, t_p, proc, t_o, ox) in enumerate(cases(), start=1):
        n_in = np.array([proc.get(s, 0.0) + ox.get(s, 0.0) for s in SPECIES])
        h_in = enthalpy_j(records, proc, t_p) + enthalpy_j(records, ox, t_o)
        mass_kg = float(n_in @ gas.molecular_weights) / 1000.0
        gas.HPX = h_in / mass_kg, p_bar * BAR, n_in
        equilibrate(gas, "HP")
        n_out = moles_out(gas, n_in) * gas.X
        h_out = enthalpy_j(records, dict(zip(SPECIES, n_out)), gas.T)
        dh = abs(h_out - h_in) / float(np.sum(n_in)) / (
            ct.gas_constant / 1000.0 * t_p)
        el = element_residual(gas, n_in)
        r1 = reaction_residual(gas, NU_REFORMING, p_bar * BAR)
        r2 = reaction_residual(gas, NU_SHIFT, p_bar * BAR)
        y_o2 = gas.X[gas.species_index("O2")]
        for k, v in [("element", el), ("reforming", abs(r1)),
                     ("shift", abs(r2)), ("enthalpy", dh), ("y_O2", y_o2)]:
            worst[k] = max(worst[k], v)
        if el > 1e-12 or abs(r1) > TOL or abs(r2) > TOL or dh > TOL \
                or y_o2 > 1e-12:
            raise SystemExit(f"case {i} failed its checks: element {el:.2e}, "
                             f"reforming {r1:.2e}, shift {r2:.2e}, enthalpy "
                             f"{dh:.2e}, y_O2 {y_o2:.2e}")
        rows.append(",".join(
            [str(i), kind, fmt(p_bar), fmt(t_p), fmt(t_o)]
            + [fmt(proc.get(s, 0.0)) for s in SPECIES]
            + [fmt(ox.get(s, 0.0)) for s in SPECIES]
            + [fmt(gas.T)] + [fmt(float(x)) for x in gas.X]))
        print(f"  case {i} {kind:6s} -> T_out {gas.T:9.3f} K, y_CH4 "
              f"{gas.X[0]:.6f}, y_O2 {y_o2:.2e}")
    with open(args.out, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(rows) + "\n")
    print(f"{len(rows) - 1} cases -> {args.out}")
    for k, v in worst.items():
        print(f"  worst {k}: {v:.3e}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
