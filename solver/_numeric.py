"""Small numeric helpers for the hot paths of the solver."""

from __future__ import annotations

import numpy as np


def clip(values, lo, hi):
    """``np.clip`` without its per-call overhead (about 15 µs against 2 µs here), which
    dominates on the arrays of a few thousand cells that the march works on."""
    return np.minimum(np.maximum(values, lo), hi)
