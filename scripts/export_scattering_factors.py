#!/usr/bin/python3
"""Export Gaussian-fit atomic scattering factors for Z = 1..98 from gemmi.

Writes data/electron-scattering-factors.json (path relative to the repo root)
with, per element:
  - "electron": 5-Gaussian electron scattering factor fit
        fe(s) = sum_{i=1..5} a_i exp(-b_i s^2)
    International Tables for Crystallography Vol. C (2006), Table 4.3.2.2
    (fits of Peng, Ren, Dudarev & Whelan 1996, Acta Cryst. A52, 257),
    read from gemmi.Element(Z).c4322;
  - "xray": 4-Gaussian + constant X-ray scattering factor fit
        fx(s) = sum_{i=1..4} a_i exp(-b_i s^2) + c
    International Tables for Crystallography Vol. C, Table 6.1.1.4,
    read from gemmi.Element(Z).it92.
Units: a in Angstrom (electron) or electrons (X-ray), b in Angstrom^2,
s = sin(theta)/lambda in 1/Angstrom.

Run from the repo root:  /usr/bin/python3 scripts/export_scattering_factors.py
Needs Debian's python3-gemmi.
"""
import json
import os
import sys

import gemmi

Z_MAX = 98


def main() -> int:
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    out_path = os.path.join(root, "data", "electron-scattering-factors.json")
    elements = []
    for z in range(1, Z_MAX + 1):
        el = gemmi.Element(z)
        e, x = el.c4322, el.it92
        if e is None or x is None:
            raise SystemExit(f"gemmi has no coefficients for Z = {z}")
        elements.append({
            "Z": z,
            "symbol": el.name,
            "electron": {"a": list(e.a), "b": list(e.b)},
            "xray": {"a": list(x.a), "b": list(x.b), "c": x.c},
        })
    doc = {
        "header": {
            "description": "Gaussian fits of neutral-atom scattering factors, Z = 1..98",
            "electron": {
                "formula": "fe(s) = sum_{i=1..5} a_i exp(-b_i s^2)",
                "source": "International Tables for Crystallography Vol. C (2006), Table 4.3.2.2; "
                          "fits of Peng, Ren, Dudarev & Whelan (1996), Acta Cryst. A52, 257-276",
                "units": "a in Angstrom, b in Angstrom^2, s = sin(theta)/lambda in 1/Angstrom",
                "validRange": "0 <= s <= 2 1/Angstrom",
            },
            "xray": {
                "formula": "fx(s) = sum_{i=1..4} a_i exp(-b_i s^2) + c",
                "source": "International Tables for Crystallography Vol. C, Table 6.1.1.4 (gemmi calls it it92)",
                "units": "a and c in electrons, b in Angstrom^2, s = sin(theta)/lambda in 1/Angstrom",
            },
            "exportedFrom": f"gemmi {gemmi.__version__} (Element.c4322 and Element.it92)",
            "writtenBy": "scripts/export_scattering_factors.py",
        },
        "elements": elements,
    }
    tmp = out_path + ".tmp"
    # header indented for reading, one element per line for short diffs
    head = json.dumps(doc["header"], indent=2).replace("\n", "\n  ")
    rows = ",\n    ".join(json.dumps(e) for e in elements)
    with open(tmp, "w", encoding="utf-8") as f:
        f.write('{\n  "header": ' + head + ',\n  "elements": [\n    ' + rows + "\n  ]\n}\n")
    os.replace(tmp, out_path)
    print(f"wrote {len(elements)} elements to {os.path.relpath(out_path, root)}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
