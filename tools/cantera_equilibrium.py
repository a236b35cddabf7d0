#!/usr/bin/env python3
"""Generate equilibrium reference data for syntrain with Cantera.

The ideal-gas phase is built from syntrain's own species records
(data/species.yaml, NASA 7-coefficient polynomials, standard-state pressure
1 bar), so that the reference files compare only the equilibrium solver, not
the thermodynamic data.

Writes
  tests/data/cantera_equilibrium.csv   fixed T, P Gibbs equilibrium
  tests/data/cantera_adiabatic.csv     adiabatic (fixed H, P) equilibrium

and prints the self-checks (thermo agreement, element balances, reaction
equilibrium residuals, enthalpy balances).

Usage:  python3 tools/cantera_equilibrium.py [--species PATH] [--out-dir DIR]

Needs cantera, numpy and PyYAML (or ruamel.yaml). CI does not run this: the
CSV files it writes are committed.
"""

import argparse
import math
import os
import sys

import numpy as np
import cantera as ct

try:
    import yaml

    def load_yaml(path):
        with open(path, encoding="utf-8") as f:
            return yaml.safe_load(f)
except ImportError:  # pragma: no cover
    from ruamel.yaml import YAML

    def load_yaml(path):
        with open(path, encoding="utf-8") as f:
            return YAML(typ="safe").load(f)


ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
SPECIES = ["CH4", "H2O", "CO", "CO2", "H2", "N2"]
P0 = 1.0e5  # standard-state pressure, Pa (1 bar)
BAR = 1.0e5

# reaction stoichiometries over SPECIES order
NU_REFORMING = {"CH4": -1, "H2O": -1, "CO": 1, "H2": 3}  # CH4+H2O = CO+3 H2
NU_SHIFT = {"CO": -1, "H2O": -1, "CO2": 1, "H2": 1}  # CO + H2O = CO2 + H2

TOL_THERMO = 1e-12
TOL_ELEMENT = 1e-12
TOL_REACTION = 1e-9
TOL_ENTHALPY = 1e-9


# --------------------------------------------------------------------------
# species data
# --------------------------------------------------------------------------

def read_records(path):
    doc = load_yaml(path)
    recs = {r["name"]: r for r in doc["species"]}
    missing = [s for s in SPECIES if s not in recs]
    if missing:
        raise SystemExit(f"{path}: missing species {missing}")
    return {s: recs[s] for s in SPECIES}


def nasa_parts(rec):
    n = rec["nasa7"]
    t_low, t_mid, t_high = (float(n[k]) for k in ("from-k", "break-k", "to-k"))
    low = [float(x) for x in n["below-break"]]
    high = [float(x) for x in n["above-break"]]
    assert len(low) == 7 and len(high) == 7
    return t_low, t_mid, t_high, low, high


def make_species(rec):
    t_low, t_mid, t_high, low, high = nasa_parts(rec)
    comp = {k: float(v) for k, v in rec["atoms"].items()}
    sp = ct.Species(rec["name"], comp)
    # cantera's NasaPoly2 order: [T_mid, 7 high-range, 7 low-range]
    sp.thermo = ct.NasaPoly2(t_low, t_high, P0, [t_mid] + high + low)
    return sp


def make_solution(records, names):
    gas = ct.Solution(thermo="ideal-gas",
                      species=[make_species(records[n]) for n in names])
    assert gas.reference_pressure == P0, gas.reference_pressure
    return gas


def poly_direct(rec, T):
    """h/RT, s/R, cp/R evaluated directly from our coefficients."""
    _, t_mid, _, low, high = nasa_parts(rec)
    a = low if T <= t_mid else high
    cp = a[0] + a[1] * T + a[2] * T**2 + a[3] * T**3 + a[4] * T**4
    h = (a[0] + a[1] * T / 2 + a[2] * T**2 / 3 + a[3] * T**3 / 4
         + a[4] * T**4 / 5 + a[5] / T)
    s = (a[0] * math.log(T) + a[1] * T + a[2] * T**2 / 2 + a[3] * T**3 / 3
         + a[4] * T**4 / 4 + a[6])
    return h, s, cp


def check_thermo(gas, records):
    worst = 0.0
    temps = [300.0, 500.0, 700.0, 900.0, 999.0, 1001.0, 1100.0, 1300.0,
             1500.0]
    print("thermo check: cantera vs direct evaluation of species.yaml "
          "polynomials (relative differences)")
    print(f"  {'species':7s} {'T/K':>8s} {'h/RT':>22s} {'s/R':>22s} "
          f"{'cp/R':>22s}  max rel diff")
    for T in temps:
        gas.TP = T, P0
        hc = gas.standard_enthalpies_RT
        sc = gas.standard_entropies_R
        cc = gas.standard_cp_R
        for k, name in enumerate(gas.species_names):
            h, s, cp = poly_direct(records[name], T)
            rel = max(abs(hc[k] - h) / abs(h), abs(sc[k] - s) / abs(s),
                      abs(cc[k] - cp) / abs(cp))
            worst = max(worst, rel)
            if T in (300.0, 1001.0, 1300.0):
                print(f"  {name:7s} {T:8.1f} {h:22.15e} {s:22.15e} "
                      f"{cp:22.15e}  {rel:.2e}")
    print(f"  worst relative difference over {len(temps)} temperatures: "
          f"{worst:.3e}")
    if worst > TOL_THERMO:
        raise SystemExit("thermo check failed")
    return worst


# --------------------------------------------------------------------------
# checks on an equilibrium state
# --------------------------------------------------------------------------

def element_matrix(gas):
    return np.array([[gas.n_atoms(k, m) for m in range(gas.n_elements)]
                     for k in range(gas.n_species)])


def feed_vector(gas, feed):
    return np.array([feed.get(n, 0.0) for n in gas.species_names])


def moles_out(gas, n_in):
    """Total moles of the equilibrium mixture from mass conservation."""
    mass_in = float(n_in @ gas.molecular_weights)
    return mass_in / gas.mean_molecular_weight


def element_residual(gas, n_in):
    A = element_matrix(gas)
    b_in = A.T @ n_in
    b_out = A.T @ (moles_out(gas, n_in) * gas.X)
    return float(np.max(np.abs(b_out - b_in)) / np.max(np.abs(b_in)))


def standard_gibbs_RT_at_P0(gas, T):
    """g°_k/RT at T and the standard-state pressure P0 = 1 bar.

    Cantera's standard_gibbs_RT is the ideal-gas standard state at the
    phase's current pressure, so it is read from a scratch copy of the
    phase set to (T, P0)."""
    ref = _REF_PHASES.get(id(gas))
    if ref is None:
        ref = ct.Solution(thermo="ideal-gas",
                          species=[gas.species(n) for n in gas.species_names])
        _REF_PHASES[id(gas)] = ref
    ref.TP = T, P0
    assert abs(ref.P / P0 - 1.0) < 1e-12
    return ref.standard_gibbs_RT


_REF_PHASES = {}


def reaction_residual(gas, nu, P, T=None):
    """sum nu ln(y P/P0) - ln K, with ln K = -sum nu g°/RT from cantera's
    standard Gibbs energies at P0.

    P (Pa) and, for fixed-T cases, T (K) are the case's nominal values:
    cantera stores T and density, so gas.T and gas.P can differ from them
    by round-off. For adiabatic cases T is None and gas.T is used."""
    g_rt = standard_gibbs_RT_at_P0(gas, gas.T if T is None else T)
    lnK = 0.0
    lnQ = 0.0
    for name, v in nu.items():
        k = gas.species_index(name)
        lnK -= v * g_rt[k]
        lnQ += v * math.log(gas.X[k] * P / P0)
    return lnQ - lnK


def lnK_cantera(gas, nu, T):
    g_rt = standard_gibbs_RT_at_P0(gas, T)
    return -sum(v * g_rt[gas.species_index(n)] for n, v in nu.items())


def lnK_direct(records, nu, T):
    """ln K from our polynomials evaluated directly (g/RT = h/RT - s/R)."""
    total = 0.0
    for n, v in nu.items():
        h, s, _ = poly_direct(records[n], T)
        total -= v * (h - s)
    return total


SOLVER_USE = {}


def equilibrate(gas, mode):
    """Cantera's element-potential Gibbs minimizer with a tight tolerance;
    cantera's other Gibbs solver is tried if that one does not converge.
    (rtol much below 1e-12 makes the element-potential solver stall on
    some cases without improving the result.)"""
    state = gas.TPX
    try:
        gas.equilibrate(mode, solver="element_potential", rtol=1e-12,
                        max_steps=100000, max_iter=1000)
        used = "element_potential"
    except ct.CanteraError:
        gas.TPX = state
        gas.equilibrate(mode, solver="gibbs", rtol=1e-12, max_steps=100000,
                        max_iter=1000)
        used = "gibbs"
    SOLVER_USE[used] = SOLVER_USE.get(used, 0) + 1
    return used


def total_enthalpy_direct(records, names, n, T):
    """Total enthalpy (J) of n mol (ordered as names) at T, from our
    polynomials evaluated directly (independent of cantera)."""
    return sum(nk * poly_direct(records[name], T)[0] * ct.gas_constant / 1000.0
               * T for name, nk in zip(names, n))


# --------------------------------------------------------------------------
# case lists (deterministic)
# --------------------------------------------------------------------------

def tp_cases():
    """Fixed list of (T_K, P_bar, feed) with feed in mol, CH4 = 1."""
    cases = []
    # 1) corners and a few hand-picked plant-like points
    for T, P, sc in [(600.0, 1.0, 1.5), (600.0, 60.0, 1.5), (600.0, 60.0, 6.0),
                     (1300.0, 1.0, 1.5), (1300.0, 60.0, 6.0),
                     (1300.0, 1.0, 6.0), (600.0, 1.0, 6.0),
                     (1300.0, 60.0, 1.5)]:
        cases.append((T, P, {"CH4": 1.0, "H2O": sc}))
    # typical tubular reformer outlet / pre-reformer
    cases.append((1123.15, 30.0, {"CH4": 1.0, "H2O": 3.0, "CO2": 0.05,
                                  "H2": 0.05, "N2": 0.02}))
    cases.append((1173.15, 25.0, {"CH4": 1.0, "H2O": 2.8, "H2": 0.1}))
    cases.append((753.15, 30.0, {"CH4": 1.0, "H2O": 3.5, "H2": 0.08}))
    cases.append((1073.15, 40.0, {"CH4": 1.0, "H2O": 2.5, "CO2": 0.2,
                                  "N2": 0.1}))

    # 2) seeded generator spread over the ranges
    rng = np.random.default_rng(20240611)
    patterns = ["none", "CO2", "H2", "N2", "all", "CO2+H2", "all"]
    n_gen = 42
    for i in range(n_gen):
        T = round(float(rng.uniform(600.0, 1300.0)), 2)
        P = round(float(math.exp(rng.uniform(math.log(1.0),
                                             math.log(60.0)))), 3)
        sc = round(float(rng.uniform(1.5, 6.0)), 4)
        feed = {"CH4": 1.0, "H2O": sc}
        pat = patterns[i % len(patterns)]
        extra = [round(float(rng.uniform(0.01, 0.2)), 4) for _ in range(3)]
        if pat in ("CO2", "all", "CO2+H2"):
            feed["CO2"] = extra[0]
        if pat in ("H2", "all", "CO2+H2"):
            feed["H2"] = extra[1]
        if pat in ("N2", "all"):
            feed["N2"] = extra[2]
        cases.append((T, P, feed))

    # 3) feeds containing CO (e.g. recycle / off-gas containing streams)
    cases.append((650.0, 20.0, {"CH4": 1.0, "H2O": 3.0, "CO": 0.15,
                                "CO2": 0.1, "H2": 0.2}))
    cases.append((900.0, 5.0, {"CH4": 1.0, "H2O": 2.0, "CO": 0.2}))
    cases.append((1000.0, 35.0, {"CH4": 1.0, "H2O": 4.0, "CO": 0.1,
                                 "CO2": 0.05, "H2": 0.15, "N2": 0.05}))
    cases.append((1250.0, 50.0, {"CH4": 1.0, "H2O": 1.8, "CO": 0.05,
                                 "N2": 0.2}))
    cases.append((780.0, 12.0, {"CH4": 1.0, "H2O": 5.5, "CO": 0.2,
                                "H2": 0.2}))
    return cases


def hp_cases():
    """(kind, T_in_K, P_bar, feed) for adiabatic constant-pressure cases."""
    return [
        # high-temperature shift inlets: reformer outlet dry gas + steam
        ("shift", 623.15, 30.0, {"H2O": 0.45, "CO": 0.12, "CO2": 0.055,
                                 "H2": 0.48, "N2": 0.005}),
        ("shift", 633.15, 25.0, {"H2O": 0.40, "CO": 0.10, "CO2": 0.07,
                                 "H2": 0.50, "N2": 0.01}),
        ("shift", 600.0, 35.0, {"H2O": 0.55, "CO": 0.14, "CO2": 0.05,
                                "H2": 0.45}),
        ("shift", 700.0, 20.0, {"H2O": 0.35, "CO": 0.09, "CO2": 0.06,
                                "H2": 0.52, "N2": 0.02}),
        ("shift", 653.15, 28.0, {"H2O": 0.50, "CO": 0.11, "CO2": 0.065,
                                 "H2": 0.47, "N2": 0.003}),
        # low-temperature shift inlets (after HTS)
        ("shift", 473.15, 28.0, {"H2O": 0.30, "CO": 0.03, "CO2": 0.15,
                                 "H2": 0.60, "N2": 0.005}),
        ("shift", 480.0, 22.0, {"H2O": 0.25, "CO": 0.025, "CO2": 0.16,
                                "H2": 0.62, "N2": 0.01}),
        # pre-reformer-like: natural-gas/steam feed with recycle hydrogen
        ("full", 753.15, 30.0, {"CH4": 1.0, "H2O": 3.0, "H2": 0.05,
                                "CO2": 0.01, "N2": 0.01}),
        ("full", 723.15, 25.0, {"CH4": 1.0, "H2O": 2.5, "H2": 0.08}),
        ("full", 793.15, 35.0, {"CH4": 1.0, "H2O": 3.5, "H2": 0.03,
                                "N2": 0.02}),
        # hot steam-rich feed that cools by ~300 K (a temperature search
        # that plain Newton does not finish)
        ("full", 1058.680744646038, 1.7562738526608754,
         {"CH4": 1.0, "H2O": 4.993625800230868, "CO2": 0.018121932251066505,
          "H2": 0.047275141812904015, "N2": 0.003677059969671648}),
    ]


# --------------------------------------------------------------------------
# main
# --------------------------------------------------------------------------

def fmt(x):
    return repr(float(x))


def run_tp(gas, records, out_path):
    header = ("case,T_K,P_bar,n_CH4,n_H2O,n_CO,n_CO2,n_H2,n_N2,"
              "y_CH4,y_H2O,y_CO,y_CO2,y_H2,y_N2")
    rows = [header]
    worst_el = worst_ref = worst_shift = 0.0
    worst_ref_case = worst_shift_case = None
    worst_lnk = 0.0
    cases = tp_cases()
    for i, (T, P, feed) in enumerate(cases, start=1):
        n_in = feed_vector(gas, feed)
        gas.TPX = T, P * BAR, n_in
        equilibrate(gas, "TP")
        assert abs(gas.T / T - 1.0) < 1e-12, (i, gas.T)
        assert abs(gas.P / (P * BAR) - 1.0) < 1e-12, (i, gas.P)
        el = element_residual(gas, n_in)
        r1 = reaction_residual(gas, NU_REFORMING, P * BAR, T)
        r2 = reaction_residual(gas, NU_SHIFT, P * BAR, T)
        worst_el = max(worst_el, el)
        for nu in (NU_REFORMING, NU_SHIFT):
            worst_lnk = max(worst_lnk, abs(lnK_cantera(gas, nu, T)
                                           - lnK_direct(records, nu, T)))
        if abs(r1) >= worst_ref:
            worst_ref, worst_ref_case = abs(r1), i
        if abs(r2) >= worst_shift:
            worst_shift, worst_shift_case = abs(r2), i
        if (el > TOL_ELEMENT or abs(r1) > TOL_REACTION
                or abs(r2) > TOL_REACTION):
            raise SystemExit(f"TP case {i} failed checks: element {el:.2e}, "
                             f"reforming {r1:.2e}, shift {r2:.2e}")
        y = gas.X
        rows.append(",".join([str(i), fmt(T), fmt(P)]
                             + [fmt(v) for v in n_in]
                             + [fmt(v) for v in y]))
    with open(out_path, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(rows) + "\n")
    print(f"TP equilibrium: {len(cases)} cases -> {out_path}")
    print(f"  worst element balance (relative): {worst_el:.3e}")
    print(f"  worst reforming residual |sum nu ln(yP/P0) - ln K|: "
          f"{worst_ref:.3e} (case {worst_ref_case})")
    print(f"  worst shift residual     |sum nu ln(yP/P0) - ln K|: "
          f"{worst_shift:.3e} (case {worst_shift_case})")
    print(f"  worst |ln K (cantera g°) - ln K (species.yaml polynomials "
          f"evaluated directly)|: {worst_lnk:.3e}")
    if worst_lnk > TOL_REACTION:
        raise SystemExit("ln K check failed")
    return len(cases), worst_el, worst_ref, worst_shift


def run_hp(gas_full, gas_shift, records, out_path):
    header = ("case,kind,T_in_K,P_bar,n_CH4,n_H2O,n_CO,n_CO2,n_H2,n_N2,"
              "T_out_K,y_CH4,y_H2O,y_CO,y_CO2,y_H2,y_N2")
    rows = [header]
    worst = {"element": 0.0, "reforming": 0.0, "shift": 0.0, "enthalpy": 0.0}
    cases = hp_cases()
    for i, (kind, T_in, P, feed) in enumerate(cases, start=1):
        gas = gas_full if kind == "full" else gas_shift
        if kind == "shift":
            assert "CH4" not in gas.species_names and "CH4" not in feed
        n_in = feed_vector(gas, feed)
        gas.TPX = T_in, P * BAR, n_in
        H_in = total_enthalpy_direct(records, gas.species_names, n_in, T_in)
        equilibrate(gas, "HP")
        assert abs(gas.P / (P * BAR) - 1.0) < 1e-12
        n_out = moles_out(gas, n_in) * gas.X
        H_out = total_enthalpy_direct(records, gas.species_names, n_out,
                                      gas.T)
        dh = abs(H_out - H_in) / float(np.sum(n_in)) / (ct.gas_constant
                                                         / 1000.0 * T_in)
        el = element_residual(gas, n_in)
        r2 = reaction_residual(gas, NU_SHIFT, P * BAR)
        r1 = (reaction_residual(gas, NU_REFORMING, P * BAR)
              if kind == "full" else 0.0)
        worst["element"] = max(worst["element"], el)
        worst["shift"] = max(worst["shift"], abs(r2))
        worst["reforming"] = max(worst["reforming"], abs(r1))
        worst["enthalpy"] = max(worst["enthalpy"], dh)
        if (el > TOL_ELEMENT or abs(r1) > TOL_REACTION
                or abs(r2) > TOL_REACTION or dh > TOL_ENTHALPY):
            raise SystemExit(f"HP case {i} failed checks: element {el:.2e}, "
                             f"reforming {r1:.2e}, shift {r2:.2e}, "
                             f"enthalpy {dh:.2e}")
        full_n = [feed.get(s, 0.0) for s in SPECIES]
        y = {s: 0.0 for s in SPECIES}
        for k, s in enumerate(gas.species_names):
            y[s] = gas.X[k]
        rows.append(",".join([str(i), kind, fmt(T_in), fmt(P)]
                             + [fmt(v) for v in full_n]
                             + [fmt(gas.T)]
                             + [fmt(y[s]) for s in SPECIES]))
        print(f"  HP case {i:2d} {kind:5s} T_in {T_in:8.2f} K -> T_out "
              f"{gas.T:10.4f} K")
    with open(out_path, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(rows) + "\n")
    print(f"HP equilibrium: {len(cases)} cases -> {out_path}")
    print(f"  worst element balance (relative): {worst['element']:.3e}")
    print(f"  worst reforming residual (full cases): {worst['reforming']:.3e}")
    print(f"  worst shift residual: {worst['shift']:.3e}")
    print(f"  worst enthalpy balance |H_out - H_in| / (n_in R T_in): "
          f"{worst['enthalpy']:.3e}")
    return len(cases), worst


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--species", default=os.path.join(ROOT, "data",
                                                      "species.yaml"))
    ap.add_argument("--out-dir", default=os.path.join(ROOT, "tests", "data"))
    args = ap.parse_args()

    print(f"cantera {ct.__version__}, species data {args.species}")
    records = read_records(args.species)
    gas_full = make_solution(records, SPECIES)
    gas_shift = make_solution(records, [s for s in SPECIES if s != "CH4"])
    for k, s in enumerate(gas_full.species_names):
        print(f"  {s:4s} molar mass: species.yaml {records[s]['molar-mass']}, "
              f"cantera {gas_full.molecular_weights[k]:.6f}")
    check_thermo(gas_full, records)

    os.makedirs(args.out_dir, exist_ok=True)
    run_tp(gas_full, records,
           os.path.join(args.out_dir, "cantera_equilibrium.csv"))
    run_hp(gas_full, gas_shift, records, os.path.join(args.out_dir,
                                             "cantera_adiabatic.csv"))
    print(f"cantera solvers used: {SOLVER_USE}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
