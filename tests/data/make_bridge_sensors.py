#!/usr/bin/python3
"""Writes bridge_sensors.csv: an invented demo dataset (scenario of our own, not real data).

Twenty vibration sensors along a footbridge deck record 400 simultaneous samples after the
slow drift has been removed. Each sensor has independent Gaussian noise of variance 1 (in
the units of the file); a generator housed under the deck adds one interfering vibration
pattern with a fixed spatial shape, so the population covariance is I + (ell - 1) u u^T with
ell = 1.6 in the direction u. The critical spike for p/n = 20/400 is 1 + sqrt(0.05) = 1.224,
so the interference is just past the detection threshold (w near -2 to -2.5).

Run with Debian's /usr/bin/python3 (numpy); the fixed generator seed makes the file reproducible.
"""
import numpy as np

n, p, ell = 400, 20, 1.6
rng = np.random.default_rng(20261202)
k = np.arange(p)
u = np.sin(np.pi * (k + 0.5) / p) * (1 + 0.3 * np.cos(2 * np.pi * k / p))  # deck mode shape
u /= np.linalg.norm(u)
noise = rng.standard_normal((n, p))
source = rng.standard_normal(n) * np.sqrt(ell - 1.0)
x = noise + np.outer(source, u) + 0.25  # an uncentred offset: the columns are centred by the tool
with open("bridge_sensors.csv", "w") as f:
    f.write("# invented demo data: 400 samples x 20 sensors, one interfering source (make_bridge_sensors.py)\n")
    f.write(",".join(f"s{j + 1:02d}" for j in range(p)) + "\n")
    for row in x:
        f.write(",".join(f"{v:.6f}" for v in row) + "\n")
