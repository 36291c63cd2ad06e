"""The radial overload factor on straight parts of a factored interaction diagram: geometry of
the N-M plane, the same for every standard (the curve's points come from the standard).

Why here: the pier check (checks/axial.py) and AS 3600's rules (codes/as3600.py) both need it,
and it knows nothing of a standard; it was written twice before. Any consistent units."""

from __future__ import annotations

import numpy as np


def tension_side_utilisation(n_star, m_star, phi_nuot, phi_mo):
    """Radial overload factor lambda on the tension side of the factored interaction diagram
    drawn as the straight line from (0, phi Muo) to (phi Nuot, 0) (AS 3600 Table 2.2.2 practice;
    conservative for ACI 318, whose tension-side curve lies outside the line:
    docs/engineering-basis.md): (N*/lambda) / phi Nuot + (|M*|/lambda) / phi Muo = 1, so
    lambda = N*/phi Nuot + |M*|/phi Muo. `phi_nuot` negative (tension), N* <= 0."""
    n = np.asarray(n_star, dtype=float)
    m = np.abs(np.asarray(m_star, dtype=float))
    return n / np.asarray(phi_nuot, dtype=float) + m / np.asarray(phi_mo, dtype=float)


def ray_segment_utilisation(n_star, m_star, n1, m1, n2, m2):
    """Radial overload factor lambda where the ray from the origin through (N*, |M*|) crosses
    the straight segment (n1, m1)-(n2, m2) of a factored interaction diagram: the point
    (N*, |M*|) / lambda lies on the segment's line, lambda = (N* dm - |M*| dn) / (n1 dm - m1 dn)
    with dn = n2 - n1, dm = m2 - m1 (the cross product of the ray and the segment); inf where
    the ray is parallel to the segment."""
    n = np.asarray(n_star, dtype=float)
    m = np.abs(np.asarray(m_star, dtype=float))
    dn, dm = np.asarray(n2, dtype=float) - n1, np.asarray(m2, dtype=float) - m1
    den = n1 * dm - m1 * dn
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(den != 0, (n * dm - m * dn) / np.where(den != 0, den, 1.0), np.inf)
