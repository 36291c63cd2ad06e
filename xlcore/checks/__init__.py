"""The checks: each takes piers (or lintels, or the core) and actions, returns a result table."""

from __future__ import annotations

import numpy as np
import pandas as pd


def per_pier(df: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """Rows of `df` grouped by storey x pier: the first row of each group and each row's group,
    so what depends on the pier alone is worked out once per pier and spread to its rows."""
    keys = (df.storey.astype(str) + "\x1f" + df.pier_id.astype(str)).to_numpy()
    _, first, of = np.unique(keys, return_index=True, return_inverse=True)
    return first, of
