#!/usr/bin/env python3
"""Critical temperature, critical pressure and acentric factor of the gas species of
data/species.yaml, for the Peng-Robinson gas model.

All three values of every species come from one published table: Horstmann, Jablonieč,
Krafczyk, Fischer & Gmehling, "PSRK group contribution equation of state: comprehensive revision
and extension IV, including critical constants and alpha-function parameters for 1000
components", Fluid Phase Equilibria 227 (2005) 157-164, as tabulated in PyPI `chemicals`
(method key 'PSRK' of chemicals.critical.Tc/Pc and chemicals.acentric.omega).

Run:  pip install chemicals
      python3 tools/critical_constants.py          (prints the values as YAML blocks)
      python3 tools/critical_constants.py --write  (puts them into data/species.yaml)

tools/fit_species.py imports CRITICAL from here, so a regenerated species file keeps them.
"""
import os
import re
import sys

# name -> CAS registry number
CAS = {
    "CH4": "74-82-8", "C2H6": "74-84-0", "C3H8": "74-98-6", "n-C4H10": "106-97-8",
    "i-C4H10": "75-28-5", "C2H4": "74-85-1", "H2O": "7732-18-5", "H2": "1333-74-0",
    "CO": "630-08-0", "CO2": "124-38-9", "N2": "7727-37-9", "O2": "7782-44-7",
    "Ar": "7440-37-1", "He": "7440-59-7", "NH3": "7664-41-7",
}
METHOD = "PSRK"
SOURCE = ("Horstmann et al. 2005, Fluid Phase Equilib. 227:157-164 (PSRK revision IV table), "
          "as tabulated in PyPI chemicals {version} (method 'PSRK')")


def critical_constants():
    """{name: (Tc K, Pc Pa, omega, source)} from the one table."""
    import chemicals
    from chemicals import acentric, critical
    out = {}
    for name, cas in CAS.items():
        tc = critical.Tc(cas, method=METHOD)
        pc = critical.Pc(cas, method=METHOD)
        omega = acentric.omega(cas, method=METHOD)
        out[name] = (float(tc), float(pc), float(omega), SOURCE.format(version=chemicals.__version__))
    return out


def yaml_block(tc, pc, omega, source):
    return [
        "    critical:",
        f"      temperature-k: {tc!r}",
        f"      pressure-pa: {pc!r}",
        f"      acentric-factor: {omega!r}",
        f"      source: \"{source}\"",
    ]


def main():
    values = critical_constants()
    for name, v in values.items():
        print(f"{name}: Tc {v[0]} K, Pc {v[1]} Pa, omega {v[2]}")
    if "--write" not in sys.argv:
        for name, v in values.items():
            print(f"# {name}")
            print("\n".join(yaml_block(*v)))
        return
    path = os.path.join(os.path.dirname(__file__), "..", "data", "species.yaml")
    lines = open(path).read().split("\n")
    out, name = [], None
    skip = False
    for line in lines:
        m = re.match(r"  - name: (\S+)", line)
        if m:
            name = m.group(1)
        if line.startswith("    critical:"):
            skip = True
            continue
        if skip and line.startswith("      "):
            continue
        skip = False
        out.append(line)
        if line.startswith("    standard-pressure:") and name in values:
            out.extend(yaml_block(*values[name]))
    open(path, "w").write("\n".join(out))
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
