#!/usr/bin/env python3
"""Times coilwright's Biot-Savart and magpylib on the same problem in one run.

10,000 straight segments (one polyline) x 10,000 observation points. Our
time comes from `cargo run --release --example field_bench`, which also dumps
the geometry and its result; magpylib (PyPI) then computes the same field
(in chunks of points to bound memory), the results are compared and the
speed ratio printed. Run from the repository root with the interop venv:

    .venv-interop/bin/python tests/interop/bench_field.py [N]
"""
import json
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import magpylib as magpy
import numpy as np

ROOT = Path(__file__).resolve().parents[2]


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 10_000
    with tempfile.TemporaryDirectory() as d:
        dump = Path(d) / "bench.json"
        out = subprocess.run(
            ["cargo", "run", "--quiet", "--release", "--example", "field_bench", "--",
             "--n", str(n), "--dump", str(dump)],
            cwd=ROOT, check=True, capture_output=True, text=True).stdout
        print(out.strip())
        data = json.loads(dump.read_text())
    verts = np.array(data["vertices"])
    pts = np.array(data["points"])
    ours = np.array(data["b"])
    line = magpy.current.Polyline(current=1.0, vertices=verts)
    t = time.perf_counter()
    chunk = max(1, 2_000_000 // len(verts))
    ref = np.concatenate([np.asarray(line.getB(pts[i:i + chunk])).reshape(-1, 3)
                          for i in range(0, len(pts), chunk)])
    secs = time.perf_counter() - t
    print(f"magpylib {magpy.__version__}: {len(verts) - 1} segments x {len(pts)} points in {secs:.3f} s")
    scale = np.abs(ref).max()
    diff = np.abs(ours - ref).max() / scale
    print(f"largest difference / largest |B|: {diff:.2e}")
    ratio = secs / data["seconds"]
    print(f"speed ratio magpylib / coilwright: {ratio:.1f}x (target >= 100x)")
    if diff > 1e-6:
        sys.exit("results differ")


if __name__ == "__main__":
    main()
