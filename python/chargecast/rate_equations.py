"""The general rate-equation solver: populations of any network of states over time, and
its steady state."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._core import InvalidParameterError
from chargecast._util import as_float_array, as_times


def solve_rate_equations(
    rates_per_s: Any, initial: Any, times_s: Any, loss_per_s: Any = None, feed_per_s: Any = None
) -> np.ndarray:
    """Solve dN/dt = M·N + s for a general rate network.

    Parameters
    ----------
    rates_per_s : array_like, shape (n, n)
        ``rates_per_s[i, j]`` is the rate (s⁻¹) of the transition i → j (diagonal ignored).
    initial : array_like, shape (n,)
        Populations at t = 0.
    times_s : array_like, shape (T,)
        Output times (s), ascending, ≥ 0.
    loss_per_s : array_like, shape (n,), optional
        Escape rate of each state (s⁻¹).
    feed_per_s : array_like, shape (n,), optional
        Constant injection into each state (population per s).

    Returns
    -------
    ndarray, shape (T, n)
        Populations at each time.

    Examples
    --------
    >>> r = np.array([[0.0, 2.0], [1.0, 0.0]])
    >>> n = solve_rate_equations(r, [1.0, 0.0], [0.0, 50.0])
    >>> np.round(n[-1], 6).tolist()
    [0.333333, 0.666667]
    """
    r = _matrix("rates_per_s", rates_per_s)
    return _core.solve_rate_equations(
        r,
        as_float_array("initial", initial)[0],
        as_times("times_s", times_s),
        _optional("loss_per_s", loss_per_s),
        _optional("feed_per_s", feed_per_s),
    )


def steady_state_rate_equations(
    rates_per_s: Any, loss_per_s: Any = None, feed_per_s: Any = None
) -> np.ndarray:
    """Steady state of a general rate network (stationary distribution summing to 1, or the
    balance of feed and loss when they are given).

    Parameters
    ----------
    rates_per_s : array_like, shape (n, n)
        ``rates_per_s[i, j]`` is the rate (s⁻¹) of the transition i → j.
    loss_per_s, feed_per_s : array_like, shape (n,), optional
        Escape rates (s⁻¹) and constant injection (population per s).

    Returns
    -------
    ndarray, shape (n,)

    Examples
    --------
    >>> np.round(steady_state_rate_equations(np.array([[0.0, 2.0], [1.0, 0.0]])), 6).tolist()
    [0.333333, 0.666667]
    """
    r = _matrix("rates_per_s", rates_per_s)
    return _core.steady_state_rate_equations(
        r, _optional("loss_per_s", loss_per_s), _optional("feed_per_s", feed_per_s)
    )


def _matrix(name: str, value: Any) -> np.ndarray:
    try:
        m = np.ascontiguousarray(np.asarray(value, dtype=np.float64))
    except (TypeError, ValueError, OverflowError):
        raise InvalidParameterError(f"{name} must be a square matrix of numbers") from None
    if m.ndim != 2:
        raise InvalidParameterError(f"{name} must be a square matrix; got shape {m.shape}")
    return m


def _optional(name: str, value: Any) -> Optional[np.ndarray]:
    return None if value is None else as_float_array(name, value)[0]
