"""Independent computation of the replay scores with numpy, for reference/scoring_numpy_test.

Reads CSV rows "p_home,p_draw,p_away,outcome" (outcome 0 home, 1 draw, 2 away) and prints one
"name value" line per score, each computed straight from its textbook definition."""
import sys

import numpy as np

data = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
p = data[:, :3]
outcome = data[:, 3].astype(int)
onehot = np.eye(3)[outcome]

brier = np.sum((p - onehot) ** 2, axis=1).mean()
log_loss = (-np.log(np.maximum(p[np.arange(len(p)), outcome], 1e-15))).mean()
cum_gap = np.cumsum(p, axis=1)[:, :2] - np.cumsum(onehot, axis=1)[:, :2]
rps = (np.sum(cum_gap ** 2, axis=1) / 2.0).mean()

eces = []
for k in range(3):
    bins = np.clip(np.floor(p[:, k] * 10).astype(int), 0, 9)
    gap = 0.0
    for b in range(10):
        mask = bins == b
        if mask.any():
            gap += mask.sum() * abs(p[mask, k].mean() - onehot[mask, k].mean())
    eces.append(gap / len(p))
    counts = np.bincount(bins, minlength=10)
    print(f"bins{k} " + " ".join(str(c) for c in counts))

print(f"brier {brier:.17g}")
print(f"log_loss {log_loss:.17g}")
print(f"rps {rps:.17g}")
for k in range(3):
    print(f"ece{k} {eces[k]:.17g}")
print(f"ece {np.mean(eces):.17g}")
