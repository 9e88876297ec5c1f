"""The largest few of many values, as a full stable sort would give them, without sorting them
all."""

from __future__ import annotations

import numpy as np

__all__ = ["largest"]


def largest(values: np.ndarray, k: int) -> np.ndarray:
    """The indices of the ``k`` largest values, largest first, equal values in index order.

    Parameters:
        values: a one-dimensional array of numbers (no NaN).
        k: how many.
    Returns:
        the same indices as ``np.argsort(-values, kind="stable")[:k]``: one partition finds the
        k-th value, and only the values down to it (ties kept) are sorted.
    References:
        introselect (numpy.partition) followed by a stable sort (common practice).
    """
    if k <= 0:
        return np.zeros(0, dtype=int)
    cand = np.arange(len(values))
    if len(values) > k:
        cand = np.flatnonzero(values >= -np.partition(-values, k - 1)[k - 1])
    return cand[np.argsort(-values[cand], kind="stable")][:k]
