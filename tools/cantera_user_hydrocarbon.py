#!/usr/bin/env python3
"""Reference for a pre-reformer fed a user-added higher hydrocarbon (n-heptane).

Cantera's adiabatic (fixed H, P) Gibbs equilibrium on syntrain's own species data
(data/species.yaml plus tests/data/species/n-heptane.yaml), with n-heptane itself a
member of the phase: at equilibrium it is fully reformed, so the answer must equal
syntrain's pre-reformer (complete reforming of the C2+ species, then reforming and
shift at zero approach, adiabatic).

Writes tests/data/cantera_heptane_prereformer.csv. Needs cantera and PyYAML; CI
does not run it, the CSV is committed.
"""

import os

import cantera as ct
import yaml

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SPECIES = ["CH4", "H2O", "CO", "CO2", "H2", "n-C7H16"]
FEED_KMOL_H = {"CH4": 90.0, "n-C7H16": 10.0, "H2": 2.0, "H2O": 480.0}
T_IN_K = 490.0 + 273.15
P_PA = 30.0e5


def records():
    recs = {}
    for path in ("data/species.yaml", "tests/data/species/n-heptane.yaml"):
        with open(os.path.join(ROOT, path), encoding="utf-8") as f:
            for r in yaml.safe_load(f)["species"]:
                recs[r["name"]] = r
    return recs


def nasa(rec):
    n = rec["nasa7"]
    t_low, t_mid, t_high = (float(n[k]) for k in ("from-k", "break-k", "to-k"))
    low = [float(x) for x in n["below-break"]]
    high = [float(x) for x in n["above-break"]]
    return t_low, t_mid, t_high, low, high


def main():
    recs = records()
    species = []
    for name in SPECIES:
        t_low, t_mid, t_high, low, high = nasa(recs[name])
        comp = {e: float(v) for e, v in recs[name]["atoms"].items()}
        sp = ct.Species(name, comp)
        sp.thermo = ct.NasaPoly2(t_low, t_high, 1.0e5, [t_mid] + high + low)
        species.append(sp)
    gas = ct.Solution(thermo="ideal-gas", species=species)
    total = sum(FEED_KMOL_H.values())
    gas.TPX = T_IN_K, P_PA, {k: v / total for k, v in FEED_KMOL_H.items()}
    gas.equilibrate("HP")
    # Moles out from the mass kept: feed mass over the outlet's mean molar mass.
    mw_in = sum(FEED_KMOL_H[k] * gas.molecular_weights[gas.species_index(k)] for k in FEED_KMOL_H)
    total_out = mw_in / gas.mean_molecular_weight
    out = os.path.join(ROOT, "tests", "data", "cantera_heptane_prereformer.csv")
    with open(out, "w", encoding="utf-8") as f:
        f.write("quantity,value\n")
        f.write(f"outlet_temperature_K,{gas.T:.10f}\n")
        for name in SPECIES:
            x = gas.X[gas.species_index(name)]
            f.write(f"flow_kmol_h.{name},{x * total_out:.12e}\n")
    print(f"wrote {out}: T = {gas.T:.6f} K, n-heptane left {gas['n-C7H16'].X[0]:.3e}")


if __name__ == "__main__":
    main()
