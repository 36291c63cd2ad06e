"""Model objects for tests, so that one place spells a wall's fields."""

from __future__ import annotations

from xlcore.model import Storey, WallRun

WALL_DEFAULTS = dict(
    thickness=200.0,
    fc=40.0,
    fsy=500.0,
    v_dia=12.0,
    v_spacing=200.0,
    v_layers=2,
    h_dia=12.0,
    h_spacing=200.0,
    h_layers=2,
    cover=30.0,
)


def storey(
    name: str = "L1", height: float = 3.2, slab: float = 200.0, index: int = 0, level: float = 0.0
) -> Storey:
    return Storey(index=index, name=name, level=level, height=height, slab=slab)


def wall(
    wall_id: str = "W1",
    x1: float = 0.0,
    y1: float = 0.0,
    x2: float = 3.0,
    y2: float = 0.0,
    storeys: tuple[str, str] = ("L1", "L1"),
    **fields,
) -> WallRun:
    """A wall run with typical bars (N12 @ 200 both ways, two layers); override any field."""
    return WallRun(
        wall_id=wall_id,
        x1=x1,
        y1=y1,
        x2=x2,
        y2=y2,
        storey_from=storeys[0],
        storey_to=storeys[1],
        **(WALL_DEFAULTS | fields),
    )
