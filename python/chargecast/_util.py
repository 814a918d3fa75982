"""Small helpers shared by the Python layer: numpy conversion with chargecast errors,
optional-dependency imports with clear messages."""

from __future__ import annotations

from typing import Any

import numpy as np

from chargecast import _core
from chargecast._core import InvalidParameterError


def as_float_array(name: str, value: Any) -> tuple[np.ndarray, tuple[int, ...]]:
    """Convert ``value`` to a contiguous 1-D float64 array, remembering its shape.

    The rules are the core's: complex, bool, object and non-numeric input raises a
    TypeError naming ``name``.
    """
    arr = _core._as_float_array(name, value)
    return np.ascontiguousarray(arr.ravel()), arr.shape


def restore(out: np.ndarray, shape: tuple[int, ...]) -> Any:
    """Give ``out`` the caller's shape back; a scalar input gives a Python float."""
    if shape == ():
        return float(out[0])
    return out.reshape(shape)


def as_float(name: str, value: Any) -> float:
    """A single real number (int, float or numpy scalar; the core checks range).

    Bools, strings and complex numbers raise a TypeError naming ``name``; an int too large
    for a float64 raises InvalidParameterError.
    """
    return _core._as_float(name, value)


def as_int(name: str, value: Any) -> int:
    """A whole number (int or numpy integer; bools raise a TypeError naming ``name``)."""
    return _core._as_int(name, value)


def as_times(name: str, value: Any) -> np.ndarray:
    """Output times as a 1-D float64 array (the core checks order and sign)."""
    arr, shape = as_float_array(name, value)
    if len(shape) > 1:
        raise InvalidParameterError(f"{name} must be one-dimensional; got shape {shape}")
    return arr


def require_pandas() -> Any:
    try:
        import pandas as pd
    except ImportError:  # pragma: no cover - depends on the environment
        raise ImportError(
            "to_pandas() needs pandas: pip install 'chargecast[pandas]' (or pip install pandas)"
        ) from None
    return pd


def require_pyplot() -> Any:
    try:
        import matplotlib

        if matplotlib.get_backend().lower() not in ("agg", "module://matplotlib_inline.backend_inline"):
            pass
        import matplotlib.pyplot as plt
    except ImportError:  # pragma: no cover - depends on the environment
        raise ImportError(
            "plot() needs matplotlib: pip install 'chargecast[plot]' (or pip install matplotlib)"
        ) from None
    return plt


def inline_png(plot: Any, figsize: tuple[float, float] = (6.5, 3.6)) -> str:
    """A figure as an HTML ``<img>`` (base64 PNG), or ``""`` without matplotlib.

    ``plot`` is a callable taking ``ax=`` (a result's ``plot`` method); a plot that returns
    None draws nothing and gives ``""``. Used by every ``_repr_html_``.
    """
    try:
        import base64
        import io

        import matplotlib

        matplotlib.use("Agg", force=False)
        import matplotlib.pyplot as plt
    except ImportError:
        return ""
    fig, ax = plt.subplots(figsize=figsize)
    try:
        if plot(ax=ax) is None:
            return ""
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=80, bbox_inches="tight")
    finally:
        plt.close(fig)
    return '<br><img src="data:image/png;base64,' + base64.b64encode(buf.getvalue()).decode() + '">'


# Colour-blind-safe palette (Okabe & Ito 2008), used by every plot.
PALETTE = ["#0072B2", "#E69F00", "#009E73", "#D55E00", "#CC79A7", "#56B4E9", "#F0E442", "#000000"]


def require_type(name: str, value: Any, kind: Any, allowed: str) -> None:
    """Raise ``ArgumentTypeError`` (a ``TypeError``) naming ``name`` unless ``value`` is a
    ``kind``: the Python layer's one check for arguments the core does not see first."""
    kinds = kind if isinstance(kind, tuple) else (kind,)
    if not isinstance(value, kinds) or isinstance(value, bool) and bool not in kinds:
        raise _core.ArgumentTypeError(f"invalid {name}: {type(value).__name__} given, must be {allowed}")
