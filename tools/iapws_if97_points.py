"""Reference points of IAPWS-IF97 Regions 1 and 2 for tests/if97.rs and the boiler tests.

Writes tests/data/iapws97_points.csv: liquid, saturated and superheated water and steam at
1-120 bar from PyPI `iapws` (class IAPWS97 and its Region 1/2 functions, the industrial
formulation IAPWS R7-97(2012)), with h0, the enthalpy of the ideal-gas part of Region 2 alone.

Writes tests/data/iapws97_boiler.csv: the specific enthalpies a boiler's steam balance needs
(feed water, saturated liquid at the steam pressure, saturated or superheated steam) and the
steam raised per MW of heat, m = (1 - b) Q / [(1 - b) h_steam + b h_liq_sat - h_fw], for invented
steam conditions of a hydrogen plant (common practice, no real plant).

    pip install iapws==1.5.5
    python3 tools/iapws_if97_points.py
"""

import csv
import os

import iapws
from iapws.iapws97 import IAPWS97, Region2_cp0, _Region1, _Region2

HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, "..", "tests", "data")
R = 0.461526  # kJ/(kg K), IAPWS-IF97 eq. (1)


def h0(t_k):
    """Enthalpy of the ideal-gas part of Region 2, kJ/kg (eq. 16): R T tau gamma0_tau."""
    tau = 540.0 / t_k
    _, _, _, got, _, _ = Region2_cp0(tau, 1.0)
    return R * t_k * tau * got


def points():
    rows = []
    # (case, region, T in K or None for saturation, p in MPa)
    cases = [
        ("liquid-20C-1bar", 1, 293.15, 0.1),
        ("liquid-105C-45bar", 1, 378.15, 4.5),
        ("liquid-150C-30bar", 1, 423.15, 3.0),
        ("liquid-250C-120bar", 1, 523.15, 12.0),
        ("steam-150C-1bar", 2, 423.15, 0.1),
        ("steam-400C-40bar", 2, 673.15, 4.0),
        ("steam-500C-120bar", 2, 773.15, 12.0),
        ("steam-800C-10bar", 2, 1073.15, 1.0),
        ("steam-300C-20bar", 2, 573.15, 2.0),
    ]
    for case, region, t, p in cases:
        fn = _Region1 if region == 1 else _Region2
        r = fn(t, p)
        rows.append((case, region, t, p, r["v"], r["h"], r["s"], r["cp"], h0(t)))
    for case, p in [("saturated-5bar", 0.5), ("saturated-40bar", 4.0), ("saturated-120bar", 12.0)]:
        for region, x in [(1, 0), (2, 1)]:
            st = IAPWS97(P=p, x=x)
            t = st.T
            fn = _Region1 if region == 1 else _Region2
            r = fn(t, p)
            name = case + ("-liquid" if region == 1 else "-steam")
            rows.append((name, region, t, p, r["v"], r["h"], r["s"], r["cp"], h0(t)))
    with open(os.path.join(DATA, "iapws97_points.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "region", "t_K", "p_MPa", "v_m3_kg", "h_kJ_kg", "s_kJ_kgK",
                    "cp_kJ_kgK", "h0_kJ_kg"])
        for row in rows:
            w.writerow([row[0], row[1]] + [repr(float(v)) for v in row[2:]])


def boiler():
    cases = [
        # case, steam pressure MPa, steam temperature K or None, feed water T K, feed water p MPa,
        # blowdown fraction of the feed water
        ("saturated-40bar", 4.0, None, 378.15, 4.5, 0.02),
        ("superheated-40bar-400C", 4.0, 673.15, 378.15, 4.5, 0.02),
        ("saturated-40bar-no-blowdown", 4.0, None, 378.15, 4.5, 0.0),
    ]
    with open(os.path.join(DATA, "iapws97_boiler.csv"), "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["case", "steam_p_MPa", "steam_t_K", "t_sat_K", "fw_t_K", "fw_p_MPa",
                    "blowdown", "h_fw_kJ_kg", "h_liq_sat_kJ_kg", "h_steam_kJ_kg",
                    "steam_kg_s_per_MW"])
        for case, p, t, t_fw, p_fw, b in cases:
            sat_l = IAPWS97(P=p, x=0)
            steam = IAPWS97(P=p, x=1) if t is None else IAPWS97(P=p, T=t)
            fw = IAPWS97(P=p_fw, T=t_fw)
            q = 1000.0  # kW
            m = (1 - b) * q / ((1 - b) * steam.h + b * sat_l.h - fw.h)
            values = (p, steam.T, sat_l.T, t_fw, p_fw, b, fw.h, sat_l.h, steam.h, m)
            w.writerow([case] + [repr(float(v)) for v in values])


if __name__ == "__main__":
    print("iapws", iapws.__version__)
    points()
    boiler()
