"""Plain data for JSON documents and caches: the one NaN-to-None helper of the package."""

from __future__ import annotations

import math


def finite_or_none(value):
    """A float that is NaN or infinite becomes None (JSON has no NaN); anything else is returned as is."""
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def plain(value):
    """``value`` as plain JSON-ready data: NaN/inf -> None, numpy scalars and arrays -> Python numbers and
    lists, tuples -> lists, sets -> sorted lists, dicts and lists converted throughout; str subclasses
    (rendered sentences) and other values are kept."""
    if isinstance(value, bool) or value is None or isinstance(value, str):
        return value
    if isinstance(value, float):
        return finite_or_none(value)
    if isinstance(value, int):
        return value
    if isinstance(value, dict):
        return {k: plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(v) for v in value]
    if isinstance(value, (set, frozenset)):
        return sorted(plain(v) for v in value)
    if hasattr(value, "tolist"):          # numpy arrays and scalars
        return plain(value.tolist())
    return value
