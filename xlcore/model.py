"""Typed, validated input of one building. Small tables as models; actions as data frames."""

from __future__ import annotations

import pandas as pd
from pydantic import BaseModel, ConfigDict, computed_field

from xlcore import costs


class Settings(BaseModel):
    model_config = ConfigDict(frozen=True)

    project_name: str = ""
    standard: str = "AS 3600:2018"
    compare_standard: str = ""  # 'Also check to': a second standard for the comparison sheet
    phi_shear: float | None = None
    shear_height: str = "overall wall height"
    pier_fixity: str = "fixed-fixed"
    wall_nm: str = "composite section"
    accidental: float = 0.0
    wall_sharing: str = "one storey's stiffness"
    core_local_moment: str = "add V* h/2 beside openings"
    phi_compression: float | None = None
    phi_simplified: float | None = None
    ends_restrained: str = "no"
    compression_limit: float | None = None  # blank: the standard's trigger (codes.compression_flag_ratio)
    earthquake_combinations: str = ""

    ductility: str = "limited ductile (mu = 2)"
    eq_two_layers: str = "yes"
    eq_rho_min: float = 0.0025
    eq_slenderness: float = 20.0
    eq_tie_diameters: float = 6.0
    eq_tie_max: float = 150.0
    # ACI 318-19 Chapter 18 special structural walls (checks/special_walls.py)
    aci_special_walls: str = "yes"
    aci_mpr_mu: float = 1.5
    aci_storeys_above: float | None = None
    aci_delta_u: float | None = None

    @property
    def earthquake(self) -> set[str]:
        """Names of the earthquake combinations (Project setting, comma separated)."""
        return {n.strip() for n in self.earthquake_combinations.split(",") if n.strip()}

    @property
    def mu(self) -> int:
        """Structural ductility factor mu of the ductility setting (1, 2 or 3)."""
        return int(self.ductility.split("mu = ")[1].rstrip(")"))

    shrinkage_restrained: str = "yes"
    lintel_deep_ratio: float = 4.0
    phi_strut: float = 0.6
    phi_tie: float = 0.8
    lintel_beta_s: float | None = None
    lintel_beta_n: float = 0.8
    strut_stress: float = 0.9
    coupling_cap: float = 0.83
    concrete_prices: str = costs.DEFAULT_CONCRETE
    steel_price: float = costs.DEFAULT_STEEL
    grade_pour: str = "the core at one storey"
    poisson: float = 0.2
    aci_lambda: float = 1.0  # ACI 318-19 19.2.4 (lightweight concrete); AS 3600 ignores it


class Storey(BaseModel):
    model_config = ConfigDict(frozen=True)

    index: int  # 0 = lowest
    name: str
    level: float  # m
    height: float  # m, floor to floor
    slab: float  # mm, slab above
    row: int = 0  # source row on the storeys sheet

    @computed_field
    @property
    def clear_height(self) -> float:
        """Top of the lower slab to the soffit of the slab above [m]."""
        return self.height - self.slab / 1000.0


class WallRun(BaseModel):
    """One row of the walls sheet: a wall over a range of storeys."""

    model_config = ConfigDict(frozen=True)

    wall_id: str
    x1: float
    y1: float
    x2: float
    y2: float
    thickness: float
    storey_from: str
    storey_to: str
    fc: float
    fsy: float
    v_dia: float
    v_spacing: float
    v_layers: int
    h_dia: float
    h_spacing: float
    h_layers: int
    cover: float
    core: str = ""  # core (group) ID; "" = the one core of a building without core IDs
    row: int = 0

    @property
    def length(self) -> float:
        """Centreline length [m]."""
        return float(((self.x2 - self.x1) ** 2 + (self.y2 - self.y1) ** 2) ** 0.5)


class Opening(BaseModel):
    model_config = ConfigDict(frozen=True)

    wall_id: str
    storey_from: str
    storey_to: str
    offset: float
    width: float
    sill: float
    head: float
    label: str | None = None
    lintel_bars: float | None = None
    lintel_dia: float | None = None
    stirrup_dia: float | None = None
    stirrup_legs: float | None = None
    stirrup_spacing: float | None = None
    diag_bars: float | None = None
    diag_dia: float | None = None
    row: int = 0


class EndZone(BaseModel):
    """One row of the end-zones sheet: bars concentrated at one free edge of a wall's piers
    over a range of storeys. `which` is 'start' or 'end' (the wall's ends) or 'near' / 'far'
    (the jambs of the wall's `opening`-th opening from its start)."""

    model_config = ConfigDict(frozen=True)

    wall_id: str
    storey_from: str
    storey_to: str
    location: str
    which: str
    opening: int = 0
    bars: int
    dia: float
    length: float  # mm
    tie_dia: float | None = None
    tie_spacing: float | None = None
    row: int = 0


class Building(BaseModel):
    """Everything `compute` needs, already checked."""

    model_config = ConfigDict(frozen=True, arbitrary_types_allowed=True)

    settings: Settings
    storeys: list[Storey]
    walls: list[WallRun]
    openings: list[Opening]
    end_zones: list[EndZone] = []
    member_actions: pd.DataFrame  # columns: layout MEMBER_ACTIONS keys + "row"
    core_actions: pd.DataFrame  # columns: layout CORE_ACTIONS keys + "row"; core "" = building
    input_hash: str = ""

    @property
    def cores(self) -> list[str]:
        """Core IDs in order of first appearance on the walls sheet ([""] without core IDs)."""
        return list(dict.fromkeys(w.core for w in self.walls)) or [""]

    def storey_index(self) -> dict[str, int]:
        return {s.name: s.index for s in self.storeys}
