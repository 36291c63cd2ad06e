"""Pier axial-bending solver speed: design capacity points per second, xlcore against the
concreteproperties library on the same section, in one run. Prints a table; not a test.

Run: python benchmarks/nm_speed.py   (needs the test extra for concreteproperties)
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from test_nm_reference_library import CASES, ours, reference  # noqa: E402

from xlcore.checks.axial import interaction  # noqa: E402
from xlcore.codes import as3600 as a  # noqa: E402
from xlcore.mechanics import nm  # noqa: E402


def main(rows: int = 100_000, reference_points: int = 10) -> None:
    print(f"{'section':<24}{'xlcore pts/s':>14}{'library pts/s':>15}{'ratio':>9}{'max diff %':>12}")
    for case in CASES:
        sec1 = ours(*case)
        squash = a.squash_load(sec1.fc, sec1.D * sec1.b - sec1.As, sec1.As, sec1.fsy)[0]
        n_star = np.linspace(-0.8 * 0.85 * sec1.As[0] * 500.0, 0.5 * 0.6 * squash, rows)
        big = nm.Rect(
            *(
                np.repeat(x, rows, axis=0)
                for x in (sec1.D, sec1.b, sec1.fc, sec1.fsy, sec1.d, sec1.A, sec1.alpha2, sec1.gamma)
            )
        )
        t = time.perf_counter()
        ours_phi_mu = interaction(big, n_star)["phi_mu"]
        ours_rate = rows / (time.perf_counter() - t)
        code, _ = reference(*case)
        pick = np.linspace(0, rows - 1, reference_points).astype(int)
        t = time.perf_counter()
        ref = [abs(code.ultimate_bending_capacity(theta=0, n_design=n_star[i])[0].m_xy) for i in pick]
        ref_rate = reference_points / (time.perf_counter() - t)
        diff = np.max(np.abs(ours_phi_mu[pick] / np.array(ref) - 1)) * 100
        label = f"{case[0]:.0f}x{case[1]:.0f} f'c {case[2]}"
        print(f"{label:<24}{ours_rate:>14,.0f}{ref_rate:>15,.1f}{ours_rate / ref_rate:>9,.0f}{diff:>12.3f}")


if __name__ == "__main__":
    main()
