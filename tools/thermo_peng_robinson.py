#!/usr/bin/env python3
"""Reference values of the Peng-Robinson equation of state for tests/peng_robinson.rs.

Pure species and gas mixtures (reformer gas, shift gas) at 200-900 degC and 10-40 bar,
evaluated with the Peng-Robinson implementation of PyPI `thermo` (thermo.eos.PR for a pure
species, thermo.eos_mix.PRMIX for a mixture with every binary parameter zero) on the critical
temperature, critical pressure and acentric factor of data/species.yaml. Writes
tests/data/thermo_peng_robinson.csv, one row per species and state: the compressibility Z and
residual enthalpy H - H_ig (J/mol of mixture) of the vapour root, and ln phi of the species.

Run:  pip install thermo pyyaml
      python3 tools/thermo_peng_robinson.py
"""
import csv
import os

import thermo
import yaml
from thermo.eos import PR
from thermo.eos_mix import PRMIX

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.join(HERE, "..")
OUT = os.path.join(ROOT, "tests", "data", "thermo_peng_robinson.csv")

# Invented compositions typical of the trade (common practice): a reformer outlet and an LTS
# inlet, mole fractions.
MIXTURES = {
    "reformer-gas": {"CH4": 0.035, "H2O": 0.32, "CO": 0.095, "CO2": 0.055, "H2": 0.49, "N2": 0.005},
    "shift-gas": {"CH4": 0.02, "H2O": 0.28, "CO": 0.03, "CO2": 0.12, "H2": 0.545, "N2": 0.005},
}
STATES = [(473.15, 10e5), (473.15, 25e5), (623.15, 40e5), (873.15, 20e5), (1133.15, 26e5),
          (1173.15, 40e5)]
PURE_STATES = [(473.15, 10e5), (873.15, 25e5), (1173.15, 40e5)]
PURE = ["CH4", "C2H6", "C3H8", "n-C4H10", "i-C4H10", "C2H4", "H2O", "H2", "CO", "CO2", "N2",
        "O2", "Ar", "He", "NH3"]


def critical():
    with open(os.path.join(ROOT, "data", "species.yaml")) as f:
        data = yaml.safe_load(f)
    out = {}
    for r in data["species"]:
        c = r.get("critical")
        if c:
            out[r["name"]] = (c["temperature-k"], c["pressure-pa"], c["acentric-factor"])
    return out


def vapour(e):
    """Z, H - H_ig and ln phi of the largest root. With three real roots thermo names the largest
    the gas root (`_g`); with one real root it names it by its volume, `_g` or `_l`: that one
    root is the largest either way."""
    if hasattr(e, "Z_g") and hasattr(e, "Z_l"):
        assert e.Z_g > e.Z_l
    if hasattr(e, "Z_g"):
        return repr(e.Z_g), repr(e.H_dep_g), repr(getattr(e, "lnphi_g", None))
    return repr(e.Z_l), repr(e.H_dep_l), repr(getattr(e, "lnphi_l", None))


def main():
    crit = critical()
    rows = []
    for name in PURE:
        tc, pc, w = crit[name]
        for t, p in PURE_STATES:
            e = PR(Tc=tc, Pc=pc, omega=w, T=t, P=p)
            rows.append([f"pure-{name}", t, p, name, 1.0, *vapour(e)])
    for case, comp in MIXTURES.items():
        names = list(comp)
        zs = [comp[n] for n in names]
        tot = sum(zs)
        zs = [z / tot for z in zs]
        for t, p in STATES:
            e = PRMIX(Tcs=[crit[n][0] for n in names], Pcs=[crit[n][1] for n in names],
                      omegas=[crit[n][2] for n in names], zs=zs,
                      kijs=[[0.0] * len(names) for _ in names], T=t, P=p)
            zg, hg, _ = vapour(e)
            lnphis = e.lnphis_g if hasattr(e, "Z_g") else e.lnphis_l
            for n, z, lp in zip(names, zs, lnphis):
                rows.append([case, t, p, n, repr(z), zg, hg, repr(lp)])
    with open(OUT, "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["case", "temperature_k", "pressure_pa", "species", "mole_fraction", "z",
                    "residual_enthalpy_j_per_mol", "ln_phi"])
        w.writerows(rows)
    print(f"wrote {len(rows)} rows to {OUT} (thermo {thermo.__version__})")


if __name__ == "__main__":
    main()
