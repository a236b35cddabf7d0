#!/usr/bin/env python3
"""Real-gas equilibrium references for tests/peng_robinson.rs, made with Cantera's
Peng-Robinson phase (PyPI `cantera`, thermo model `Peng-Robinson`).

The phase is built from syntrain's own data/species.yaml: the NASA 7-coefficient records and
the critical constants (Tc, Pc, acentric factor) of each species, given to Cantera as the
Peng-Robinson a = Omega_a R^2 Tc^2 / Pc and b = Omega_b R Tc / Pc with the exact Omega_a,
Omega_b (the roots of the critical conditions) and the acentric factor; no binary parameters
(Cantera's van der Waals mixing with a_ij = sqrt(a_i a_j)). Equilibrium at fixed T and P by
Gibbs minimisation over the species subset the stage sees:

  shift:      CO, H2O, CO2, H2 and N2 (inert): one independent reaction, the shift;
  reforming:  CH4, H2O, CO, CO2, H2, N2: reforming and shift.

Writes tests/data/cantera_peng_robinson.csv (feeds in mol, equilibrium mole fractions) and
prints the ideal-gas answer beside the real-gas one.

Run:  pip install cantera pyyaml
      python3 tools/cantera_peng_robinson.py
"""
import csv
import os

import cantera as ct
import yaml

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
OUT = os.path.join(ROOT, "tests", "data", "cantera_peng_robinson.csv")
SPECIES = ["CH4", "H2O", "CO", "CO2", "H2", "N2"]
R = 8.31446261815324
OMEGA_A = 0.4572355289213821893834601962251837888504
OMEGA_B = 0.0777960739038884559718447100373331839711
BAR = 1.0e5

# (kind, T degC, P bar, feed mol of CH4, H2O, CO, CO2, H2, N2); invented feeds typical of the
# trade (common practice).
SHIFT_FEED = [0.0, 0.30, 0.03, 0.12, 0.545, 0.005]
HTS_FEED = [0.0, 0.33, 0.13, 0.05, 0.485, 0.005]
REFORMER_FEED = [1.0, 3.0, 0.0, 0.01, 0.05, 0.02]
CASES = (
    [("shift", t, p, SHIFT_FEED) for t in (200.0, 250.0, 300.0, 350.0) for p in (10.0, 25.0, 40.0)]
    + [("shift", t, p, HTS_FEED) for t in (350.0,) for p in (25.0, 40.0)]
    + [("reforming", t, p, REFORMER_FEED) for t in (800.0, 860.0, 900.0) for p in (20.0, 30.0, 40.0)]
)


def records():
    with open(os.path.join(ROOT, "data", "species.yaml")) as f:
        return {r["name"]: r for r in yaml.safe_load(f)["species"]}


def species_yaml(rec, real):
    n = rec["nasa7"]
    d = {
        "name": rec["name"],
        "composition": {k: int(v) for k, v in rec["atoms"].items()},
        "thermo": {
            "model": "NASA7",
            "reference-pressure": 1e5,
            "temperature-ranges": [n["from-k"], n["break-k"], n["to-k"]],
            "data": [n["below-break"], n["above-break"]],
        },
    }
    if real:
        c = rec["critical"]
        tc, pc, w = c["temperature-k"], c["pressure-pa"], c["acentric-factor"]
        d["equation-of-state"] = {
            "model": "Peng-Robinson",
            "a": OMEGA_A * R * R * tc * tc / pc,  # Pa m6/mol2 (units below)
            "b": OMEGA_B * R * tc / pc,  # m3/mol
            "acentric-factor": w,
        }
    return d


def solution(recs, names, real):
    doc = {
        "units": {"length": "m", "quantity": "mol", "activation-energy": "J/mol"},
        "phases": [{
            "name": "gas",
            "thermo": "Peng-Robinson" if real else "ideal-gas",
            "elements": ["C", "H", "O", "N"],
            "species": names,
            "state": {"T": 600.0, "P": 1e5},
        }],
        "species": [species_yaml(recs[n], real) for n in names],
    }
    gas = ct.Solution(yaml=yaml.safe_dump(doc))
    assert gas.reference_pressure == 1e5
    return gas


def equilibrium(gas, names, t, p, feed):
    gas.TPX = t, p, {n: feed[SPECIES.index(n)] for n in names if feed[SPECIES.index(n)] > 0}
    gas.equilibrate("TP", solver="vcs", rtol=1e-14, max_steps=10000)
    return {n: gas[n].X[0] for n in names}


def main():
    recs = records()
    rows = []
    for i, (kind, tc, pb, feed) in enumerate(CASES, 1):
        names = [n for n in SPECIES if not (kind == "shift" and n == "CH4")]
        t, p = tc + 273.15, pb * BAR
        real = equilibrium(solution(recs, names, True), names, t, p, feed)
        ideal = equilibrium(solution(recs, names, False), names, t, p, feed)
        key = "CO" if kind == "shift" else "CH4"
        print(f"{i:2d} {kind:9s} {tc:5.0f} degC {pb:4.0f} bar: y_{key} ideal {ideal[key]:.6e} "
              f"Peng-Robinson {real[key]:.6e} ({real[key] / ideal[key] - 1:+.3%})")
        rows.append([i, kind, t, pb] + feed + [repr(float(real.get(n, 0.0))) for n in SPECIES])
    with open(OUT, "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["case", "kind", "T_K", "P_bar"] + [f"n_{s}" for s in SPECIES]
                   + [f"y_{s}" for s in SPECIES])
        w.writerows(rows)
    print(f"wrote {OUT} (cantera {ct.__version__})")


if __name__ == "__main__":
    main()
