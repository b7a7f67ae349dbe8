"""The Touchstone file read back by an independent reader (scikit-rf, from PyPI).

Run by `make test-interop`: `halfrail touchstone` writes the demo's two-port and
`halfrail sweep --csv` the same sweep's magnitudes; scikit-rf's reading of the
file must give the same frequencies and |S11|, |S21|, |S12|, |S22| in dB.
Prints the closing line the test runners read: 'N passed, N failed'.
"""
import csv
import subprocess
import sys
import tempfile

import numpy as np
import skrf

halfrail, design = sys.argv[1], sys.argv[2]
checks = []


def check(name, ok):
    checks.append(ok)
    print(("ok     " if ok else "FAILED ") + name)


with tempfile.TemporaryDirectory() as tmp:
    path = f"{tmp}/stage.s2p"
    with open(path, "w") as f:
        f.write(subprocess.run([halfrail, "touchstone", design], check=True, capture_output=True, text=True).stdout)
    network = skrf.Network(path)
    rows = list(csv.DictReader(subprocess.run([halfrail, "sweep", design, "--csv"], check=True, capture_output=True, text=True).stdout.splitlines()))

f_csv = np.array([float(r["f_hz"]) for r in rows])
check("same number of frequencies", len(network.f) == len(f_csv))
check("same frequencies", np.allclose(network.f, f_csv, rtol=1e-9))
check("reference impedance 50 Ω", np.allclose(network.z0, 50.0))
for (i, j), key in {(0, 0): "s11_db", (1, 0): "s21_db", (0, 1): "s12_db", (1, 1): "s22_db"}.items():
    ours = np.array([float(r[key]) for r in rows])
    check(f"{key} agrees", np.allclose(network.s_db[:, i, j], ours, atol=1e-6))
passed = sum(checks)
print(f"{passed} passed, {len(checks) - passed} failed")
sys.exit(0 if passed == len(checks) else 1)
