"""Axis ranges and curve thinning for plots of a line: one rule for the app's Profiles, the
Side-by-Side and the report's charts. Plain numbers, no Qt.

A value axis never spans less than a minimum (below it, round-off and tiny real changes would fill
the plot's height and read as a steep slope); its bounds are rounded outward to a nice step; an axis
keeps its range while new data still fit it and fill enough of it, so small edits leave it alone.
"""

from __future__ import annotations

import math

import numpy as np

from app import units

#: Smallest span of a value axis, SI (a difference): 2 K of temperature and 1 kPa of pressure are
#: below what a line design turns on (common practice: the resolution at which an engineer reads a
#: temperature or pressure profile).
MIN_SPAN_SI: dict[str, float] = {"temperature": 2.0, "pressure": 1000.0}
#: Smallest span relative to the size of the values, for quantities with a true zero (pressure).
MIN_RELATIVE_SPAN = 0.01


def minimum_span(quantity: str, system: str, values=()) -> float:
    """The smallest axis span for ``quantity`` in display units: an absolute floor
    (:data:`MIN_SPAN_SI`) and, for quantities with a true zero, 1 % of the values' size."""
    floor = MIN_SPAN_SI.get(quantity, 0.0) * units.unit(quantity, system).scale  # a span: the scale, no offset
    if quantity == "temperature":
        return floor
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v)]
    size = float(np.max(np.abs(v))) if v.size else 0.0
    return max(floor, MIN_RELATIVE_SPAN * size)


#: A kept value range must be filled this much by the new data (share of its span), else the axis
#: moves: small edits leave the axes (and their cached pictures) alone, a big change still fills
#: the plot. x moves sooner: empty width at the outlet end reads as a missing piece of line.
FILL_SHARE = {"x": 0.9, "y": 0.6}


def nice_step(span: float) -> float:
    """The smallest of 1, 2, 2.5 and 5 × 10^k that is at least ``span`` (> 0)."""
    base = 10.0 ** math.floor(math.log10(span))
    for m in (1.0, 2.0, 2.5, 5.0, 10.0):
        if m * base >= span * (1 - 1e-12):
            return m * base
    return 10.0 * base


def value_range(lo: float, hi: float, smallest: float) -> tuple[float, float]:
    """A view range for data between ``lo`` and ``hi``: at least ``smallest`` wide (centred on the
    data), a little room at both ends, and bounds rounded outward to a nice step of about 1/40 of the span."""
    if hi - lo < smallest:
        mid = (lo + hi) / 2
        lo, hi = mid - smallest / 2, mid + smallest / 2
    pad = 0.04 * (hi - lo)
    lo, hi = lo - pad, hi + pad
    step = nice_step((hi - lo) / 40)
    return math.floor(lo / step) * step, math.ceil(hi / step) * step


def position_range(lo: float, hi: float) -> tuple[float, float]:
    """A view range for positions ``lo``..``hi``: 2 % room at both ends, so the inlet and outlet
    boundaries are not drawn on the frame, and the outlet end rounded up to a nice step of about
    1/40 of the span, so a line made a little longer still fits."""
    pad = 0.02 * (hi - lo) if hi > lo else 1.0
    step = nice_step((hi - lo + 2 * pad) / 40)
    return lo - pad, math.ceil((hi + pad) / step) * step


def keeps(current: tuple[float, float], lo: float, hi: float, smallest: float, share: float) -> bool:
    """True if the view range ``current`` still suits data ``lo``..``hi``: the data lie inside it
    (clear of the frame) and fill at least ``share`` of it (a span below ``smallest`` counts as ``smallest``)."""
    c0, c1 = current
    span = c1 - c0
    if not (span > 0 and math.isfinite(span)):
        return False
    margin = 0.01 * span
    return c0 + margin <= lo and hi <= c1 - margin and max(hi - lo, smallest) >= share * span


def thin(x: np.ndarray, y: np.ndarray, x0: float, x1: float, columns: int) -> tuple[np.ndarray, np.ndarray]:
    """The points of a curve worth drawing at ``columns`` pixels across ``x0``..``x1``: where there
    are more than two points per pixel column, each column keeps its lowest and its highest point
    (so no peak is lost), plus the first and last point of the curve; points outside the view go,
    except one beyond each edge so the line still runs to the frame. ``x`` must be sorted; a curve
    with gaps (non-finite values) is returned whole, as its gaps would otherwise be bridged."""
    n = x.size
    if columns < 1 or n <= 2 * columns + 2 or not x1 > x0 or not np.isfinite(y).all():
        return x, y
    i0 = max(0, int(np.searchsorted(x, x0, "left")) - 1)
    i1 = min(n, int(np.searchsorted(x, x1, "right")) + 1)
    xs, ys = x[i0:i1], y[i0:i1]
    if xs.size <= 2 * columns + 2:
        keep = np.arange(xs.size)
    else:
        col = np.clip(((xs - x0) * (columns / (x1 - x0))).astype(np.int64), -1, columns)
        new_col = np.empty(xs.size, dtype=bool)
        new_col[0] = True
        np.not_equal(col[1:], col[:-1], out=new_col[1:])
        starts = np.flatnonzero(new_col)  # x sorted: each column is one run
        counts = np.diff(starts, append=xs.size)
        at = np.arange(xs.size)
        mask = np.zeros(xs.size, dtype=bool)
        for extreme in (np.minimum, np.maximum):  # the last point of each column at its extreme value
            hit = ys == np.repeat(extreme.reduceat(ys, starts), counts)
            mask[np.maximum.reduceat(np.where(hit, at, -1), starts)] = True
        mask[[0, -1]] = True
        keep = np.flatnonzero(mask)
    idx = keep + i0
    if i0 > 0 or i1 < n:  # the curve's own ends stay, so it still starts and ends where the line does
        idx = np.unique(np.concatenate(([0], idx, [n - 1])))
    return x[idx], y[idx]
