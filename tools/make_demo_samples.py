"""Invented laboratory samples of the demo plant's shift converters: flowsheets/demo-samples.csv.

A year of weekly samples (52 dates from 2026-01-05) of the HTS and LTS outlets of
flowsheets/demo-train.yaml, made from syntrain's own solver: the approach of each converter grows
slowly and linearly (HTS 6 -> 10 K, LTS 5 -> 9 K over the year, invented), every week's outlets
are solved by `syntrain sweep --cases`, then "measured": the outlet temperature with a
thermocouple error of 0.5 K (standard deviation) and each dry mol % with analyser noise of half
the default accuracy of `syntrain evaluate` (common practice, from memory: H2 0.3, CO 0.02,
CO2 0.05, CH4 0.02, N2 0.05 mol %), rounded as a laboratory reports them (0.01 mol %, CO and CH4
0.001 mol %). Seeded: the file is the same on every run. Invented data, for the demo only.

    cargo build --release
    python3 tools/make_demo_samples.py [path/to/syntrain]
"""

import csv
import datetime
import pathlib
import random
import subprocess
import sys
import tempfile

ROOT = pathlib.Path(__file__).resolve().parent.parent
BINARY = sys.argv[1] if len(sys.argv) > 1 else str(ROOT / "target" / "release" / "syntrain")
SEED = 20260105
WEEKS = 52
START = datetime.date(2026, 1, 5)
HTS = (6.0, 10.0)  # approach K at the first and last sample (invented)
LTS = (5.0, 9.0)
ACCURACY = {"H2": 0.3, "CO": 0.02, "CO2": 0.05, "CH4": 0.02, "N2": 0.05}
DECIMALS = {"H2": 2, "CO": 3, "CO2": 2, "CH4": 3, "N2": 2}


def main():
    rng = random.Random(SEED)
    approaches = []
    for k in range(WEEKS):
        f = k / (WEEKS - 1)
        approaches.append((HTS[0] + f * (HTS[1] - HTS[0]), LTS[0] + f * (LTS[1] - LTS[0])))
    with tempfile.TemporaryDirectory() as tmp:
        cases = pathlib.Path(tmp) / "cases.csv"
        out = pathlib.Path(tmp) / "out.csv"
        with cases.open("w", newline="") as f:
            w = csv.writer(f)
            w.writerow(["units.hts.approach.shift", "units.lts.approach.shift"])
            for h, l in approaches:
                w.writerow([f"{h:.6f} K", f"{l:.6f} K"])
        subprocess.run(
            [BINARY, "sweep", str(ROOT / "flowsheets" / "demo-train.yaml"), "--cases", str(cases),
             "--columns", "streams.hts-exit.*,streams.lts-exit.*", "--output", str(out)],
            check=True,
        )
        rows = list(csv.DictReader(out.open()))
    species = list(ACCURACY)
    with (ROOT / "flowsheets" / "demo-samples.csv").open("w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["sample", "unit", "temperature_C", "pressure_bar"] + species)
        for k, row in enumerate(rows):
            assert row["status"] == "ok", row["status"]
            date = (START + datetime.timedelta(days=7 * k)).isoformat()
            for unit, stream in (("hts", "hts-exit"), ("lts", "lts-exit")):
                t = float(row[f"streams.{stream}.temperature_K"]) - 273.15 + rng.gauss(0, 0.5)
                p = float(row[f"streams.{stream}.pressure_bar"])
                cells = [date, unit, f"{t:.1f}", f"{p:.1f}"]
                for s in species:
                    v = float(row[f"streams.{stream}.dry_mol_pct.{s}"])
                    v += rng.gauss(0, ACCURACY[s] / 2)
                    cells.append(f"{max(v, 0.0):.{DECIMALS[s]}f}")
                w.writerow(cells)
    print(f"wrote flowsheets/demo-samples.csv: {WEEKS} weeks of hts and lts samples")


if __name__ == "__main__":
    main()
