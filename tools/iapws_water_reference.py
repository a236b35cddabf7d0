"""IAPWS-IF97 reference numbers for liquid water and steam in heaters, coolers and a desuperheater.

Writes tests/data/iapws97_heater.csv and tests/data/iapws97_desuperheater.csv and prints them.
Source: IAPWS-IF97 (IAPWS R7-97(2012)) as computed by the PyPI package `iapws` (1.5.5), class
IAPWS97 (regions 1 and 2; region 4 for the saturation temperature). CI does not run this
script; the CSV files are committed.

    pip install iapws==1.5.5
    python3 tools/iapws_water_reference.py
"""

import csv
import pathlib

from iapws import IAPWS97

DATA = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data"

# Heater and cooler cases at constant pressure: (name, pressure MPa, inlet K, outlet K).
# Invented duties typical of a hydrogen plant's steam system (common practice), not a real plant.
HEATER_CASES = [
    ("bfw-to-superheated-steam", 3.0, 423.15, 673.15),
    ("cold-water-to-steam", 4.0, 298.15, 723.15),
    ("deaerated-water-to-steam", 0.5, 378.15, 523.15),
    ("bfw-preheat-stays-liquid", 3.0, 303.15, 423.15),
    ("steam-condensed", 2.0, 573.15, 373.15),
]

# Desuperheater: superheated steam with spray water mixed adiabatically at one pressure:
# (name, pressure MPa, steam K, water K, kg water per kg steam).
DESUPERHEATER_CASES = [
    ("spray-bfw-into-steam", 3.0, 723.15, 423.15, 0.1),
    ("spray-cold-water-into-steam", 4.0, 773.15, 303.15, 0.15),
]


def heater_rows():
    rows = []
    for name, p, t_in, t_out in HEATER_CASES:
        a = IAPWS97(T=t_in, P=p)
        b = IAPWS97(T=t_out, P=p)
        t_s = IAPWS97(P=p, x=0).T
        rows.append(
            {
                "case": name,
                "pressure_MPa": p,
                "t_in_K": t_in,
                "t_out_K": t_out,
                "t_sat_K": t_s,
                "phase_in": "liquid" if t_in < t_s else "vapour",
                "phase_out": "liquid" if t_out < t_s else "vapour",
                "h_in_kJ_kg": a.h,
                "h_out_kJ_kg": b.h,
                "dh_kJ_kg": b.h - a.h,
            }
        )
    return rows


def desuperheater_rows():
    rows = []
    for name, p, t_steam, t_water, ratio in DESUPERHEATER_CASES:
        s = IAPWS97(T=t_steam, P=p)
        w = IAPWS97(T=t_water, P=p)
        h_mix = (s.h + ratio * w.h) / (1.0 + ratio)
        out = IAPWS97(P=p, h=h_mix)
        rows.append(
            {
                "case": name,
                "pressure_MPa": p,
                "t_steam_K": t_steam,
                "t_water_K": t_water,
                "water_per_steam_kg_kg": ratio,
                "h_mix_kJ_kg": h_mix,
                "t_out_K": out.T,
                "region_out": out.region,
            }
        )
    return rows


def write(name, rows):
    path = DATA / name
    with path.open("w", newline="") as f:
        writer = csv.DictWriter(f, fieldnames=list(rows[0].keys()), lineterminator="\n")
        writer.writeheader()
        for row in rows:
            writer.writerow({k: repr(float(v)) if isinstance(v, float) else v for k, v in row.items()})
    print(f"# {path.relative_to(DATA.parent.parent)}")
    print(path.read_text(), end="")


if __name__ == "__main__":
    write("iapws97_heater.csv", heater_rows())
    write("iapws97_desuperheater.csv", desuperheater_rows())
