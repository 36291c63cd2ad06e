"""Cost proxy for comparing design changes: concrete by grade and reinforcement by mass.

The default prices are illustrative only, not market data; the Project sheet sets real ones.
"""

from __future__ import annotations

import re

import numpy as np

STEEL_DENSITY = 7850.0  # kg/m^3
DEFAULT_CONCRETE = "20:230, 25:240, 32:260, 40:285, 50:315, 65:370, 80:430, 100:520"
DEFAULT_STEEL = 2400.0  # per tonne


def parse_concrete_prices(text: str) -> dict[float, float]:
    """'32:260, 40:285' -> {32.0: 260.0, 40.0: 285.0}. Raises ValueError naming the bad part."""
    prices: dict[float, float] = {}
    for part in re.split(r"[,;]", str(text)):
        part = part.strip()
        if not part:
            continue
        m = re.fullmatch(r"(\d+(?:\.\d+)?)\s*[:=]\s*(\d+(?:\.\d+)?)", part)
        if not m:
            raise ValueError(f"{part!r} is not 'grade:price'")
        prices[float(m.group(1))] = float(m.group(2))
    if not prices:
        raise ValueError("no 'grade:price' pairs")
    return prices


def concrete_price(prices: dict[float, float], fc):
    """Price for a grade (or an array of grades), interpolated between the grades given and
    extended flat beyond them."""
    grades = sorted(prices)
    out = np.interp(fc, grades, [prices[g] for g in grades])
    return float(out) if np.ndim(out) == 0 else out


def per_metre_height(Lw_mm, tw_mm, rho_v, rho_h, concrete_per_m3, steel_per_t):
    """Cost of one metre height of pier: concrete plus vertical and horizontal steel."""
    area = Lw_mm * tw_mm / 1e6  # m^2
    steel_t = (rho_v + rho_h) * area * STEEL_DENSITY / 1000.0
    return area * concrete_per_m3 + steel_t * steel_per_t


def bars_per_metre_height(area_mm2, steel_per_t):
    """Cost of one metre height of vertical bars of total area `area_mm2` (end-zone bars)."""
    return np.asarray(area_mm2, dtype=float) / 1e6 * STEEL_DENSITY / 1000.0 * steel_per_t


def over_height(per_metre, height_mm):
    """A cost per metre height of pier over a height given in mm (the storey's clear height:
    a change of bars or thickness is built over the pier's whole storey)."""
    return np.asarray(per_metre, dtype=float) * np.asarray(height_mm, dtype=float) / 1000.0


def grade_premium(prices: dict[float, float], fc_now, fc_new, volume_m3):
    """Added cost of concrete `volume_m3` placed at grade `fc_new` instead of `fc_now` (no
    credit where the concrete is already at or above `fc_new`: it stays as it is)."""
    now = concrete_price(prices, np.asarray(fc_now, dtype=float))
    new = concrete_price(prices, np.asarray(fc_new, dtype=float))
    up = np.asarray(fc_new, dtype=float) > np.asarray(fc_now, dtype=float)
    return np.where(up, np.asarray(volume_m3, dtype=float) * (new - now), 0.0)
