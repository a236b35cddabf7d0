#!/usr/bin/env python3
"""Autothermal-reformer references on a Peng-Robinson gas, made with Cantera (PyPI `cantera`,
thermo model `Peng-Robinson`).

Each case is a process gas and an oxygen stream, both at the outlet pressure (30 bar), mixed
and brought to Gibbs equilibrium at constant enthalpy and pressure
(`equilibrate('HP', solver='vcs')`). The enthalpy is the sum of the two inlets' real-gas
enthalpies, each inlet taken alone at its own temperature and composition at 30 bar on the same
Peng-Robinson phase (ideal-gas enthalpy with formation enthalpies, plus the residual enthalpy
H - H_ig). That is the convention of syntrain's `autothermal-reformer` under
`gas-model: peng-robinson`: the outlet's real-gas enthalpy equals the inlets' real-gas
enthalpies at the outlet pressure.

The phase is built from syntrain's own data/species.yaml with the species writer of
tools/cantera_peng_robinson.py: the NASA 7-coefficient records at a reference pressure of 1 bar
and each species' a = Omega_a R^2 Tc^2 / Pc, b = Omega_b R Tc / Pc and acentric factor from its
`critical:` block, no binary parameters. Species: CH4, H2O, CO, CO2, H2, O2, N2, Ar. Cantera's
oxygen at the outlet is below 1e-15 (mole fraction), as in the unit, which burns it formally.

Writes tests/data/cantera_autothermal_peng_robinson.csv (with the ideal-gas outlet temperature
and mole fractions of CH4, H2O and CO of the same case in the last columns), and prints the
self-checks (element balance 1e-12, enthalpy balance |H_out - H_in| / (n_in R T_process) 1e-10,
oxygen left below 1e-15) and the ideal-gas answer of the same case (ideal phase, ideal-gas
inlet enthalpies) beside the real-gas one.

Run:  pip install cantera pyyaml numpy
      python3 tools/cantera_autothermal_peng_robinson.py

CI does not run this: the CSV file it writes is committed.
"""
import csv
import os
import sys

import cantera as ct
import numpy as np
import yaml

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from cantera_peng_robinson import records, species_yaml  # noqa: E402  (the species writer)

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
OUT = os.path.join(ROOT, "tests", "data", "cantera_autothermal_peng_robinson.csv")
SPECIES = ["CH4", "H2O", "CO", "CO2", "H2", "O2", "N2", "Ar"]
BAR = 1.0e5
# The species of the ideal-gas answer written beside the real-gas one (for the unit's
# `ideal-gas-*` figures: dry methane and CO).
IDEAL = ["CH4", "H2O", "CO"]

# (P bar, T_process K, process mol, T_oxidant K, oxidant mol): invented oxygen-blown feeds
# (pre-reformed natural gas with steam; oxygen with a little argon), common practice.
CASES = [
    # S/C 0.6, O2/C 0.58 (the first case of tools/cantera_autothermal.py).
    (30.0, 923.15, {"CH4": 1.0, "H2O": 0.6, "H2": 0.02, "CO2": 0.01, "N2": 0.01},
     513.15, {"O2": 0.58, "Ar": 0.003}),
    # S/C 1.5, O2/C 0.55 (its second case).
    (30.0, 923.15, {"CH4": 0.9, "H2O": 1.35, "H2": 0.12, "CO": 0.002, "CO2": 0.08,
                    "N2": 0.01},
     513.15, {"O2": 0.55 * 0.9}),
    # S/C 1.0, O2/C 0.6, cooler preheat (its third case).
    (30.0, 873.15, {"CH4": 1.0, "H2O": 1.0, "H2": 0.03, "CO2": 0.02},
     473.15, {"O2": 0.6}),
    # S/C 2.0, O2/C 0.52, a cooler exit.
    (30.0, 913.15, {"CH4": 1.0, "H2O": 2.0, "H2": 0.05, "CO2": 0.03, "N2": 0.005},
     503.15, {"O2": 0.52, "Ar": 0.002}),
]


def solution(recs, real):
    doc = {
        "units": {"length": "m", "quantity": "mol", "activation-energy": "J/mol"},
        "phases": [{
            "name": "gas",
            "thermo": "Peng-Robinson" if real else "ideal-gas",
            "elements": ["C", "H", "O", "N", "Ar"],
            "species": SPECIES,
            "state": {"T": 600.0, "P": 1e5},
        }],
        "species": [species_yaml(recs[n], real) for n in SPECIES],
    }
    return ct.Solution(yaml=yaml.safe_dump(doc))


def vector(flows):
    return np.array([flows.get(s, 0.0) for s in SPECIES])


def enthalpy_j(gas, n, t, p):
    """Enthalpy (J) of n mol (by SPECIES) at t and p on the phase `gas`."""
    gas.TPX = t, p, n
    return gas.enthalpy_mole / 1000.0 * float(np.sum(n))


def adiabatic(gas, n_in, h_in, p):
    mass_kg = float(n_in @ gas.molecular_weights) / 1000.0
    gas.HPX = h_in / mass_kg, p, n_in
    gas.equilibrate("HP", solver="vcs", rtol=1e-12, max_steps=10000)
    n_out = mass_kg * 1000.0 / gas.mean_molecular_weight * gas.X
    return n_out


def element_residual(gas, n_in, n_out):
    a = np.array([[gas.n_atoms(k, m) for m in range(gas.n_elements)]
                  for k in range(gas.n_species)])
    b_in, b_out = a.T @ n_in, a.T @ n_out
    return float(np.max(np.abs(b_out - b_in)) / np.max(np.abs(b_in)))


def main():
    recs = records()
    real, ideal = solution(recs, True), solution(recs, False)
    rows = []
    for i, (p_bar, t_p, proc, t_o, ox) in enumerate(CASES, 1):
        p = p_bar * BAR
        n_p, n_o = vector(proc), vector(ox)
        n_in = n_p + n_o
        answers = {}
        for label, gas in (("real", real), ("ideal", ideal)):
            h_in = enthalpy_j(gas, n_p, t_p, p) + enthalpy_j(gas, n_o, t_o, p)
            n_out = adiabatic(gas, n_in, h_in, p)
            h_out = gas.enthalpy_mole / 1000.0 * float(np.sum(n_out))
            el = element_residual(gas, n_in, n_out)
            dh = abs(h_out - h_in) / (float(np.sum(n_in)) * ct.gas_constant / 1000.0 * t_p)
            y_o2 = gas.X[SPECIES.index("O2")]
            if el > 1e-12 or dh > 1e-10 or y_o2 > 1e-15:
                raise SystemExit(f"case {i} {label} failed its checks: element {el:.2e}, "
                                 f"enthalpy {dh:.2e}, y_O2 {y_o2:.2e}")
            answers[label] = (gas.T, gas.X.copy(), el, dh, y_o2)
        t, y, el, dh, y_o2 = answers["real"]
        t_ig, y_ig = answers["ideal"][:2]
        k = SPECIES.index("CH4")
        print(f"case {i}: T_out {t:.4f} K (ideal gas {t_ig:.4f} K, {t - t_ig:+.4f} K), y_CH4 "
              f"{y[k]:.6e} (ideal gas {y_ig[k]:.6e}, {y[k] / y_ig[k] - 1:+.3%}); element "
              f"{el:.1e}, enthalpy {dh:.1e}, y_O2 {y_o2:.1e}")
        rows.append([i, p_bar, t_p, t_o] + [proc.get(s, 0.0) for s in SPECIES]
                    + [ox.get(s, 0.0) for s in SPECIES]
                    + [repr(float(t))] + [repr(float(x)) for x in y]
                    + [repr(float(t_ig))] + [repr(float(y_ig[SPECIES.index(s)])) for s in IDEAL])
    with open(OUT, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "P_bar", "T_process_K", "T_oxidant_K"]
                   + [f"process_{s}" for s in SPECIES] + [f"oxidant_{s}" for s in SPECIES]
                   + ["T_out_K"] + [f"y_{s}" for s in SPECIES]
                   + ["T_out_ideal_gas_K"] + [f"y_ideal_gas_{s}" for s in IDEAL])
        w.writerows(rows)
    print(f"wrote {OUT} (cantera {ct.__version__})")


if __name__ == "__main__":
    main()
