#!/usr/bin/env python3
"""Build data/species.yaml, the syntrain species database.

Sources
-------
* Species in the NIST-JANAF Thermochemical Tables (4th ed., M. W. Chase Jr., J. Phys. Chem.
  Ref. Data Monograph 9, 1998), read from the PyPI package `janaf`: our own constrained
  fit of two-range NASA 7-coefficient polynomials (break at 1000 K).
* Species JANAF lacks: published NASA-7 sets shipped with cantera, copied unchanged:
  GRI-Mech 3.0 thermo (cantera `gri30.yaml`) for C2H6; NASA TM-4513
  (McBride, Gordon & Reno 1993, cantera `nasa_gas.yaml`) for C3H8, n-C4H10 and i-C4H10.

Fit
---
Minimax (least maximum error) fit of the relative Cp error at the JANAF rows of each range,
solved as a linear programme, subject to the equality constraints
  H(298.15 K) = JANAF dfH(298.15 K)      (elements in their reference state: 0)
  S(298.15 K) = JANAF S(298.15 K)
  Cp, dCp/dT, H and S of the two ranges equal at 1000 K.
Standard-state pressure 1 bar (as in JANAF). A minimax fit was chosen over plain least squares
because the binding check is the worst Cp row: with one quartic for 200..1000 K the worst Cp
error of CH4, H2, C2H4 and graphite is 20-35 % smaller than with least squares, and H, S and
log Kf, integrals of Cp anchored at 298.15 K, stay far inside their tolerances.

Every record is then checked against JANAF at every tabulated row 298.15..1500 K
(Cp, H-H298, dfH298, dfH(T), S, log10 Kf); the script fails if a tolerance is broken.
Records taken from cantera are cross-checked against `thermo`/`chemicals` (TRC ideal-gas Cp,
ATcT dfH298, S298) and against the other cantera file.

Run:  python3 tools/fit_species.py            (writes data/species.yaml, prints the checks)
Needs: janaf, cantera (3.x), numpy, scipy; thermo + chemicals for the cross-checks
(skipped with a note if they are missing).
"""

from __future__ import annotations

import math
import os
import sys

import numpy as np

import cantera
import janaf

R = 8.31446261815324  # J/(mol K)
TREF = 298.15
TBREAK = 1000.0
LN10 = math.log(10.0)

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OUT = os.path.join(ROOT, "data", "species.yaml")

# IUPAC 2013 conventional atomic weights (He, Ar: standard atomic weights), g/mol; these are
# also the values in cantera's element table and in src/thermo/database.rs.
ATOMIC_WEIGHTS = {"C": 12.011, "H": 1.008, "O": 15.999, "N": 14.007, "Ar": 39.95, "He": 4.002602}
ELEMENT_ORDER = ["C", "H", "O", "N", "Ar", "He"]

# Tolerances of the JANAF check (the brief) and our target (10x tighter).
TOL = {"cp_pct": 0.5, "dh_kj": 0.2, "dfh298_kj": 0.3, "logk": 0.005}

# name, description, formula, elements, phase, source spec
#   ("janaf", index, T_low, T_high)           own fit
#   ("cantera", file, cantera name, label)    copied NASA-7 set
SPECIES = [
    ("CH4", "methane", "CH4", {"C": 1, "H": 4}, "gas", ("janaf", "C-067", 200.0, 3000.0)),
    ("C2H6", "ethane", "C2H6", {"C": 2, "H": 6}, "gas",
     ("cantera", "gri30.yaml", "C2H6", "GRI-Mech 3.0 thermo (GRI-Mech Version 3.0 7/30/99), as shipped in cantera gri30.yaml")),
    # Not GRI-Mech 3.0 for propane: its C3H8 record (L4/85) starts at 300 K, so it could not be
    # used at 298.15 K, and it is further from the independent data (see tests/data/README.md).
    ("C3H8", "propane", "C3H8", {"C": 3, "H": 8}, "gas",
     ("cantera", "nasa_gas.yaml", "C3H8",
      "NASA TM-4513 (McBride, Gordon & Reno 1993), as shipped in cantera nasa_gas.yaml")),
    ("n-C4H10", "n-butane", "C4H10", {"C": 4, "H": 10}, "gas",
     ("cantera", "nasa_gas.yaml", "C4H10,n-butane",
      "NASA TM-4513 (McBride, Gordon & Reno 1993), as shipped in cantera nasa_gas.yaml")),
    ("i-C4H10", "isobutane (2-methylpropane)", "C4H10", {"C": 4, "H": 10}, "gas",
     ("cantera", "nasa_gas.yaml", "C4H10,isobutane",
      "NASA TM-4513 (McBride, Gordon & Reno 1993), as shipped in cantera nasa_gas.yaml")),
    ("C2H4", "ethylene (ethene)", "C2H4", {"C": 2, "H": 4}, "gas", ("janaf", "C-128", 250.0, 3000.0)),
    ("H2O", "water vapour", "H2O", {"H": 2, "O": 1}, "gas", ("janaf", "H-064", 200.0, 3000.0)),
    ("H2", "hydrogen", "H2", {"H": 2}, "gas", ("janaf", "H-050", 200.0, 3000.0)),
    ("CO", "carbon monoxide", "CO", {"C": 1, "O": 1}, "gas", ("janaf", "C-093", 200.0, 3000.0)),
    ("CO2", "carbon dioxide", "CO2", {"C": 1, "O": 2}, "gas", ("janaf", "C-095", 200.0, 3000.0)),
    ("N2", "nitrogen", "N2", {"N": 2}, "gas", ("janaf", "N-023", 200.0, 3000.0)),
    ("O2", "oxygen", "O2", {"O": 2}, "gas", ("janaf", "O-029", 200.0, 3000.0)),
    ("Ar", "argon", "Ar", {"Ar": 1}, "gas", ("janaf", "Ar-001", 200.0, 3000.0)),
    ("He", "helium", "He", {"He": 1}, "gas", ("janaf", "He-001", 200.0, 3000.0)),
    ("NH3", "ammonia", "NH3", {"N": 1, "H": 3}, "gas", ("janaf", "H-083", 200.0, 3000.0)),
    ("C(gr)", "graphite", "C", {"C": 1}, "solid", ("janaf", "C-002", 200.0, 3000.0)),
]

# Element reference states (JANAF): name of our record and atoms per formula unit.
ELEMENT_REFERENCE = {"C": ("C(gr)", 1), "H": ("H2", 2), "O": ("O2", 2), "N": ("N2", 2),
                     "Ar": ("Ar", 1), "He": ("He", 1)}


# ---------------------------------------------------------------------------------------------
# NASA-7 evaluation
# ---------------------------------------------------------------------------------------------

def _cp_row(t):
    return np.array([1.0, t, t**2, t**3, t**4, 0.0, 0.0])


def _dcp_row(t):
    return np.array([0.0, 1.0, 2 * t, 3 * t**2, 4 * t**3, 0.0, 0.0])


def _h_row(t):  # H/R
    return np.array([t, t**2 / 2, t**3 / 3, t**4 / 4, t**5 / 5, 1.0, 0.0])


def _s_row(t):  # S/R
    return np.array([math.log(t), t, t**2 / 2, t**3 / 3, t**4 / 4, 0.0, 1.0])


class Nasa7:
    def __init__(self, tranges, low, high):
        self.tmin, self.tmid, self.tmax = (float(x) for x in tranges)
        self.low = [float(x) for x in low]
        self.high = [float(x) for x in high]

    def _c(self, t):
        return np.array(self.low if t < self.tmid else self.high)

    def cp(self, t):  # J/(mol K)
        return R * float(_cp_row(t) @ self._c(t))

    def h(self, t):  # J/mol
        return R * float(_h_row(t) @ self._c(t))

    def s(self, t):  # J/(mol K), 1 bar
        return R * float(_s_row(t) @ self._c(t))

    def g(self, t):
        return self.h(t) - t * self.s(t)

    def jumps(self):
        """(Cp/R, H/RT, S/R) jumps at the break temperature."""
        t = self.tmid
        lo, hi = np.array(self.low), np.array(self.high)
        return (abs(_cp_row(t) @ (lo - hi)), abs(_h_row(t) @ (lo - hi)) / t,
                abs(_s_row(t) @ (lo - hi)))


# ---------------------------------------------------------------------------------------------
# JANAF
# ---------------------------------------------------------------------------------------------

def janaf_rows(index):
    """JANAF rows as a list of dicts (T, Cp, S, dH [kJ], dfH, dfG, logKf)."""
    df = janaf.Table(index).df
    rows = []
    for r in df.iter_rows(named=True):
        rows.append({"T": r["T(K)"], "Cp": r["Cp"], "S": r["S"], "dH": r["H-H(Tr)"],
                     "dfH": r["delta-f H"], "dfG": r["delta-f G"], "logKf": r["log Kf"]})
    return rows


def janaf_at(rows, t):
    for r in rows:
        if abs(r["T"] - t) < 1e-9:
            return r
    raise KeyError(t)


# ---------------------------------------------------------------------------------------------
# Constrained fit
# ---------------------------------------------------------------------------------------------

# Relative weights of the Cp rows in the minimax fit: the rows 298.15..1500 K (where the records
# are checked and the plant works) count fully; rows below 298.15 K and above 1500 K may carry
# twice the relative error.
WEIGHT_BELOW_298 = 0.5
WEIGHT_ABOVE_1500 = 0.5


def fit_janaf(rows, t_low, t_high):
    """Minimax (L-infinity) fit of the relative Cp error under the equality constraints.

    Unknowns: a1..a7 of the low range, a1..a7 of the high range, and the error bound e.
    Minimise e subject to |w_i (Cp_fit(T_i)/Cp_i - 1)| <= e for every JANAF row of each range,
    and the equality constraints of the module docstring. Solved as a linear programme (HiGHS),
    then the equality constraints are re-imposed exactly by a least-norm correction.
    """
    from scipy.optimize import linprog

    r298 = janaf_at(rows, TREF)
    dfh298 = r298["dfH"] * 1000.0
    s298 = r298["S"]
    a_ub, b_ub = [], []
    for r in rows:
        t = r["T"]
        if t < t_low - 1e-9 or t > t_high + 1e-9:
            continue
        blocks = []
        if t <= TBREAK + 1e-9:
            blocks.append(0)
        if t >= TBREAK - 1e-9:
            blocks.append(1)
        w = WEIGHT_BELOW_298 if t < TREF - 1e-9 else (WEIGHT_ABOVE_1500 if t > 1500.0 + 1e-9 else 1.0)
        for blk in blocks:
            row = np.zeros(15)
            row[7 * blk:7 * blk + 7] = w * _cp_row(t) / (r["Cp"] / R)
            row[14] = -1.0
            a_ub.append(row.copy())
            b_ub.append(w)
            row[:14] = -row[:14]
            a_ub.append(row)
            b_ub.append(-w)

    z = np.zeros(7)
    c_rows = [
        np.concatenate([_h_row(TREF), z]),
        np.concatenate([_s_row(TREF), z]),
        np.concatenate([_cp_row(TBREAK), -_cp_row(TBREAK)]),
        np.concatenate([_dcp_row(TBREAK), -_dcp_row(TBREAK)]),
        np.concatenate([_h_row(TBREAK), -_h_row(TBREAK)]),
        np.concatenate([_s_row(TBREAK), -_s_row(TBREAK)]),
    ]
    d = np.array([dfh298 / R, s298 / R, 0.0, 0.0, 0.0, 0.0])
    C = np.array(c_rows)
    A = np.array(a_ub)
    # Column scaling for conditioning.
    scale = np.ones(15)
    scale[:14] = np.max(np.abs(np.vstack([A[:, :14], C])), axis=0)
    Ceq = np.hstack([C, np.zeros((C.shape[0], 1))])
    cost = np.zeros(15)
    cost[14] = 1.0
    res = linprog(cost, A_ub=A / scale, b_ub=np.array(b_ub), A_eq=Ceq / scale, b_eq=d,
                  bounds=[(None, None)] * 15, method="highs")
    if res.status != 0:
        raise SystemExit(f"fit failed: {res.message}")
    y = res.x[:14]
    Cs = C / scale[:14]
    # Exact equality constraints: least-norm correction in the scaled variables.
    for _ in range(2):
        y = y + Cs.T @ np.linalg.solve(Cs @ Cs.T, d - Cs @ y)
    x = y / scale[:14]
    return Nasa7([t_low, TBREAK, t_high], x[:7], x[7:])


# ---------------------------------------------------------------------------------------------
# Checks
# ---------------------------------------------------------------------------------------------

def formation(records, name, elements, t):
    """(dfH, dfG) in J/mol from our own records, elements in their reference state."""
    sp = records[name]
    dh, dg = sp.h(t), sp.g(t)
    for el, n in elements.items():
        ref, atoms = ELEMENT_REFERENCE[el]
        k = n / atoms
        dh -= k * records[ref].h(t)
        dg -= k * records[ref].g(t)
    return dh, dg


def check_against_janaf(records, name, elements, rows):
    sp = records[name]
    h298 = sp.h(TREF)
    r298 = janaf_at(rows, TREF)
    dfh298, _ = formation(records, name, elements, TREF)
    worst = {"cp_pct": (0.0, TREF), "dh_kj": (0.0, TREF), "dfh_T_kj": (0.0, TREF),
             "s": (0.0, TREF), "logk": (0.0, TREF)}
    for r in rows:
        t = r["T"]
        if t < TREF - 1e-9 or t > 1500.0 + 1e-9:
            continue
        e = {
            "cp_pct": 100.0 * (sp.cp(t) - r["Cp"]) / r["Cp"],
            "dh_kj": (sp.h(t) - h298) / 1000.0 - r["dH"],
            "s": sp.s(t) - r["S"],
        }
        dfh, dfg = formation(records, name, elements, t)
        e["dfh_T_kj"] = dfh / 1000.0 - r["dfH"]
        e["logk"] = -dfg / (R * t * LN10) - r["logKf"]
        for k, v in e.items():
            if abs(v) > abs(worst[k][0]):
                worst[k] = (v, t)
    worst["dfh298_kj"] = (dfh298 / 1000.0 - r298["dfH"], TREF)
    return worst


def jump_check(name, rec):
    jc, jh, js = rec.jumps()
    ok = jc <= 0.02 and jh <= 2e-3 and js <= 2e-3  # limits of src/thermo/database.rs
    return ok, (jc, jh, js)


# ---------------------------------------------------------------------------------------------
# Cross-check of the copied records
# ---------------------------------------------------------------------------------------------

CROSS_NAMES = {"C2H6": "ethane", "C3H8": "propane", "n-C4H10": "butane", "i-C4H10": "isobutane"}
OTHER_CANTERA = {"C2H6": ("nasa_gas.yaml", "C2H6"), "C3H8": ("gri30.yaml", "C3H8")}


def cantera_record(fname, cname):
    for s in cantera.Species.list_from_file(fname):
        if s.name == cname:
            th = s.input_data["thermo"]
            if th["model"] != "NASA7" or len(th["data"]) != 2:
                raise SystemExit(f"{fname}:{cname}: not a two-range NASA7 record")
            return Nasa7(th["temperature-ranges"], th["data"][0], th["data"][1]), th.get("note", "")
    raise SystemExit(f"{cname} not found in {fname}")


def cross_check(records):
    """Compare copied records with thermo/chemicals and the other cantera file."""
    out = {}
    try:
        from chemicals import CAS_from_any, Hfg, S0g
        from thermo import HeatCapacityGas
    except ImportError:
        print("  (thermo/chemicals not installed: cross-check skipped)")
        return out
    temps = [300.0, 400.0, 500.0, 600.0, 700.0, 800.0, 900.0, 1000.0, 1100.0, 1200.0,
             1300.0, 1400.0, 1500.0]
    for name, common in CROSS_NAMES.items():
        rec = records[name]
        cas = CAS_from_any(common)
        hcg = HeatCapacityGas(CASRN=cas)
        hcg.method = "TRCIG"
        worst_cp = (0.0, None)
        for t in temps:
            if not rec.tmin <= t <= rec.tmax:
                continue
            ref = hcg.T_dependent_property(t)
            d = 100.0 * (rec.cp(t) - ref) / ref
            if abs(d) > abs(worst_cp[0]):
                worst_cp = (d, t)
        # H(T)-H(298.15) by integrating the TRC Cp.
        worst_dh = (0.0, None)
        for t in temps:
            if not rec.tmin <= t <= rec.tmax:
                continue
            ref = hcg.T_dependent_property_integral(TREF, t)
            d = ((rec.h(t) - rec.h(TREF)) - ref) / 1000.0
            if abs(d) > abs(worst_dh[0]):
                worst_dh = (d, t)
        el = dict(SPECIES_BY_NAME[name][3])
        dfh_ours, _ = formation(records, name, el, TREF)
        hf_atct = Hfg(cas, method="ATCT_G")
        hf_web = Hfg(cas, method="WEBBOOK")
        s_ref = S0g(cas)
        row = {
            "cp": worst_cp, "dh": worst_dh,
            "dfh_atct": (dfh_ours - hf_atct) / 1000.0,
            "dfh_webbook": (dfh_ours - hf_web) / 1000.0,
            "s298": rec.s(TREF) - s_ref,
            "ours_dfh": dfh_ours / 1000.0, "atct": hf_atct / 1000.0,
            "ours_s298": rec.s(TREF), "ref_s298": s_ref,
        }
        if name in OTHER_CANTERA:
            other, note = cantera_record(*OTHER_CANTERA[name])
            wc, wh, wg = (0.0, None), (0.0, None), (0.0, None)
            for t in temps:
                if not (rec.tmin <= t <= rec.tmax and other.tmin <= t <= other.tmax):
                    continue
                d = 100.0 * (rec.cp(t) - other.cp(t)) / other.cp(t)
                if abs(d) > abs(wc[0]):
                    wc = (d, t)
                d = (rec.h(t) - other.h(t)) / 1000.0
                if abs(d) > abs(wh[0]):
                    wh = (d, t)
                d = (rec.g(t) - other.g(t)) / 1000.0
                if abs(d) > abs(wg[0]):
                    wg = (d, t)
            row["other"] = (OTHER_CANTERA[name][0], note, wc, wh, wg)
        out[name] = row
    return out


# ---------------------------------------------------------------------------------------------
# Reactions
# ---------------------------------------------------------------------------------------------

REFORMING = {"CH4": -1, "H2O": -1, "CO": 1, "H2": 3}
SHIFT = {"CO": -1, "H2O": -1, "CO2": 1, "H2": 1}


def reaction_dh(records, nu, t):
    return sum(n * records[s].h(t) for s, n in nu.items())


def reaction_dg(records, nu, t):
    return sum(n * records[s].g(t) for s, n in nu.items())


def root_lnk(records, nu, lo=500.0, hi=1500.0):
    from scipy.optimize import brentq
    return brentq(lambda t: reaction_dg(records, nu, t), lo, hi, xtol=1e-10)


def janaf_root_lnk(nu):
    """T where sum(nu dfG) = 0 from the JANAF dfG columns alone (cubic spline in T through the
    rows 500..1500 K), as an estimate independent of our polynomials."""
    from scipy.interpolate import CubicSpline
    from scipy.optimize import brentq
    tables = {s: janaf_rows(JANAF_INDEX[s]) for s in nu}
    temps = [r["T"] for r in tables["CO"] if 500 <= r["T"] <= 1500]
    vals = [sum(n * janaf_at(tables[s], t)["dfG"] for s, n in nu.items()) for t in temps]
    spline = CubicSpline(temps, vals)
    for i in range(len(temps) - 1):
        if vals[i] * vals[i + 1] <= 0:
            return brentq(spline, temps[i], temps[i + 1], xtol=1e-10), temps[i], temps[i + 1]
    return None


def janaf_logk_floor(rows):
    """Largest |-dfG/(R T ln 10) - log Kf| within JANAF's own columns, 298.15..1500 K: the
    rounding floor of a log Kf check."""
    worst = 0.0
    for r in rows:
        t = r["T"]
        if TREF - 1e-9 <= t <= 1500.0 + 1e-9:
            worst = max(worst, abs(-r["dfG"] * 1000.0 / (R * t * LN10) - r["logKf"]))
    return worst


# ---------------------------------------------------------------------------------------------
# Output
# ---------------------------------------------------------------------------------------------

def fnum(x):
    """Full-precision float text that every YAML 1.1/1.2 reader takes as a float."""
    s = repr(float(x))
    if "e" in s:
        mant, exp = s.split("e")
        if "." not in mant:
            mant += ".0"
        s = f"{mant}e{exp}"
    elif "." not in s and "inf" not in s and "nan" not in s:
        s += ".0"
    return s


def molar_mass(elements):
    return sum(ATOMIC_WEIGHTS[e] * n for e, n in elements.items())


def write_yaml(entries):
    # Critical constants for the Peng-Robinson gas model (tools/critical_constants.py).
    sys.path.insert(0, os.path.dirname(__file__))
    import critical_constants
    CRITICAL = critical_constants.critical_constants()
    lines = [
        "# syntrain species database. Standard-state pressure 1 bar. H includes the formation",
        "# enthalpy at 298.15 K (elements in their reference state have H(298.15 K) = 0).",
        "# Made by tools/fit_species.py; do not edit by hand.",
        "# Molar masses from the IUPAC 2013 conventional atomic weights (C 12.011, H 1.008,",
        "# O 15.999, N 14.007, Ar 39.95; He 4.002602 standard atomic weight).",
        "# NASA-7: Cp/R = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4;",
        "#         H/(RT) = a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5 + a6/T;",
        "#         S/R = a1 ln T + a2 T + a3 T^2/2 + a4 T^3/3 + a5 T^4/4 + a7; R = 8.31446261815324 J/(mol K).",
        "# Keys: atoms = atoms per molecule by element; nasa7: from-k, break-k and to-k bound the two",
        "# ranges (K), below-break and above-break hold a1..a7 of each range.",
        "species:",
    ]
    for e in entries:
        els = ", ".join(f"{k}: {e['elements'][k]}" for k in ELEMENT_ORDER if k in e["elements"])
        rec = e["record"]
        lines += [
            f"  - name: {e['name']}",
            f"    description: {e['description']}",
            f"    formula: {e['formula']}",
            f"    atoms: {{{els}}}",
            f"    phase: {e['phase']}",
            f"    molar-mass: {round(molar_mass(e['elements']), 6)!r}",
            f"    source: \"{e['source']}\"",
            "    standard-pressure: 1 bar",
        ]
        if e["name"] in CRITICAL:
            lines += critical_constants.yaml_block(*CRITICAL[e["name"]])
        lines += [
            "    nasa7:",
            f"      from-k: {fnum(rec.tmin)}",
            f"      break-k: {fnum(rec.tmid)}",
            f"      to-k: {fnum(rec.tmax)}",
            f"      below-break: [{', '.join(fnum(a) for a in rec.low)}]",
            f"      above-break: [{', '.join(fnum(a) for a in rec.high)}]",
        ]
    text = "\n".join(lines) + "\n"
    os.makedirs(os.path.dirname(OUT), exist_ok=True)
    with open(OUT, "w") as f:
        f.write(text)
    return text


SPECIES_BY_NAME = {s[0]: s for s in SPECIES}
JANAF_INDEX = {s[0]: s[5][1] for s in SPECIES if s[5][0] == "janaf"}


def main():
    records, entries, tables = {}, [], {}
    print(f"janaf {janaf.__version__}, cantera {cantera.__version__}, numpy {np.__version__}")
    for name, desc, formula, elements, phase, src in SPECIES:
        if src[0] == "janaf":
            _, index, t_low, t_high = src
            rows = janaf_rows(index)
            tables[name] = rows
            rec = fit_janaf(rows, t_low, t_high)
            table = janaf.Table(index)
            source = (f"own constrained minimax fit of Cp to NIST-JANAF (Chase 1998), table {index} "
                      f"{table.name} {table.formula}, {t_low:g}-{t_high:g} K; PyPI janaf {janaf.__version__}")
        else:
            _, fname, cname, label = src
            rec, note = cantera_record(fname, cname)
            source = f"{label}, species {cname}, note '{' '.join(note.split()) or '-'}'; coefficients copied unchanged"
        records[name] = rec
        entries.append({"name": name, "description": desc, "formula": formula,
                        "elements": elements, "phase": phase, "source": source, "record": rec})

    failed = False
    print("\nContinuity at the break (Cp/R, H/RT, S/R jumps; limits 0.02, 2e-3, 2e-3):")
    for e in entries:
        ok, (jc, jh, js) = jump_check(e["name"], e["record"])
        flag = "" if ok else "   <-- FAILS the Rust reader"
        failed |= not ok
        print(f"  {e['name']:8s} {jc:.2e} {jh:.2e} {js:.2e}{flag}")

    print("\nWorst deviation from JANAF, rows 298.15..1500 K "
          "(value @ T); tolerances Cp 0.5 %, H-H298 0.2 kJ/mol, dfH298 0.3 kJ/mol, logKf 0.005")
    hdr = f"  {'species':8s} {'Cp %':>18s} {'H-H298 kJ/mol':>18s} {'dfH298 kJ':>10s} {'dfH(T) kJ':>18s} {'S J/molK':>18s} {'log10 Kf':>18s} {'JANAF floor':>11s}"
    print(hdr)
    summary = {}
    for e in entries:
        name = e["name"]
        if name not in tables:
            continue
        w = check_against_janaf(records, name, e["elements"], tables[name])
        summary[name] = w
        f = lambda k, fmt: f"{fmt.format(w[k][0])} @{w[k][1]:g}"
        print(f"  {name:8s} {f('cp_pct', '{:+.4f}'):>18s} {f('dh_kj', '{:+.4f}'):>18s} "
              f"{w['dfh298_kj'][0]:+10.5f} {f('dfh_T_kj', '{:+.4f}'):>18s} {f('s', '{:+.4f}'):>18s} "
              f"{f('logk', '{:+.5f}'):>18s} {janaf_logk_floor(tables[name]):11.5f}")
        for k in TOL:
            if abs(w[k][0]) > TOL[k]:
                failed = True
                print(f"    FAIL {name} {k} {w[k][0]} > {TOL[k]}")
            elif abs(w[k][0]) > TOL[k] / 10:
                print(f"    note: {name} {k} {w[k][0]:+.5f} is within tolerance but not 10x inside")

    print("\nCross-check of the copied records (ours - reference):")
    cc = cross_check(records)
    for name, row in cc.items():
        print(f"  {name:8s} Cp vs thermo TRCIG {row['cp'][0]:+.3f} % @{row['cp'][1]:g}; "
              f"H-H298 vs integral of TRCIG {row['dh'][0]:+.3f} kJ/mol @{row['dh'][1]:g}; "
              f"dfH298 {row['ours_dfh']:.3f} vs ATcT {row['atct']:.3f} ({row['dfh_atct']:+.3f}), "
              f"vs WebBook ({row['dfh_webbook']:+.3f}) kJ/mol; "
              f"S298 {row['ours_s298']:.3f} vs chemicals S0g {row['ref_s298']:.3f} ({row['s298']:+.3f}) J/molK")
        if "other" in row:
            fname, note, wc, wh, wg = row["other"]
            print(f"           vs {fname} ({note}): Cp {wc[0]:+.3f} % @{wc[1]:g}, H {wh[0]:+.3f} kJ/mol @{wh[1]:g}, "
                  f"G {wg[0]:+.3f} kJ/mol @{wg[1]:g}")

    print("\nReactions from our records:")
    for label, nu, jref in (("reforming CH4 + H2O = CO + 3 H2", REFORMING, None),
                            ("shift CO + H2O = CO2 + H2", SHIFT, None)):
        dh = reaction_dh(records, nu, TREF) / 1000.0
        jdh = sum(n * janaf_at(tables[s], TREF)["dfH"] for s, n in nu.items())
        t0 = root_lnk(records, nu)
        jt = janaf_root_lnk(nu)
        print(f"  {label}: dH298 = {dh:+.4f} kJ/mol (JANAF dfH sum {jdh:+.3f}); "
              f"ln K = 0 at {t0:.2f} K (JANAF dfG columns alone, cubic spline in T "
              f"between {jt[1]:g} and {jt[2]:g} K: {jt[0]:.2f} K)")

    write_yaml(entries)
    print(f"\nwrote {os.path.relpath(OUT, ROOT)}")
    if failed:
        print("CHECKS FAILED")
        sys.exit(1)


if __name__ == "__main__":
    main()
