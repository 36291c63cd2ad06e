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


def tower_workbook(path, storeys: int, boxes: int, combos: int) -> int:
    """A tower of `boxes` separate box cores (four walls each, a door in one), every pier with
    member actions and core actions at every storey, filled into the project's own template:
    the generator of `benchmarks/building_scale.py`, loaded from its file so the tests and the
    benchmark build the same towers. Returns the number of pier cases."""
    import importlib.util
    from pathlib import Path

    spec = importlib.util.spec_from_file_location(
        "building_scale", Path(__file__).resolve().parent.parent / "benchmarks" / "building_scale.py"
    )
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module.generate(Path(path), storeys, boxes, combos)
