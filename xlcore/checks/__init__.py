"""The checks: each takes piers (or lintels, or the core) and actions, returns a result table."""

from __future__ import annotations

import numpy as np
import pandas as pd


def per_pier(df: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """Rows of `df` grouped by storey x pier: the first row of each group and each row's group,
    so what depends on the pier alone is worked out once per pier and spread to its rows."""
    # integer codes of the two columns, not joined text (a Python string per row: 0.14 s of
    # the L tower's 360 000 rows, against 0.03 s); each row's first row of its pier is the same
    storey, _ = pd.factorize(df.storey)
    pier, piers = pd.factorize(df.pier_id)
    key = storey.astype(np.int64) * len(piers) + pier
    _, first, of = np.unique(key, return_index=True, return_inverse=True)
    return first, of


def plain(*columns) -> list[list]:
    """Columns as lists of Python numbers: formatting those into working text is several times
    faster than formatting numpy scalars (what iterating an array or a Series yields)."""
    return [np.asarray(c).tolist() for c in columns]


def once_per(df: pd.DataFrame, keys: list, make) -> np.ndarray:
    """Working text made by `make` (rows -> list of str) once per distinct combination of the
    `keys` columns (or arrays), and spread to every row that has it."""
    codes = pd.MultiIndex.from_arrays([df[k] if isinstance(k, str) else k for k in keys]).factorize(
        use_na_sentinel=False
    )[0]
    _, first = np.unique(codes, return_index=True)
    return np.asarray(make(df.iloc[first]), dtype=object)[codes]
