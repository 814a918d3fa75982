"""Fitting a measured charge-state distribution: which source settings explain it.

A *fit model* is anything that can be rebuilt from named parameters and return a
charge-state distribution. It has

* ``element`` (symbol) and ``z``;
* ``parameters()`` — the nominal value of every parameter it can vary, ``{name: value}``;
* ``evaluate(points)`` — for a list of ``{name: value}`` dicts, the fractions ``[len, Z+1]``
  (in one batch, so the core evolves the variants in parallel with the GIL released);
* ``ions_scale(point)`` (optional) — ions per unit fraction, for measured currents.

``TrapFitModel`` wraps a ``BeamTrap`` (the fixed model) at one confinement time.
``PlasmaFitModel`` wraps a ``PlasmaSource``: its parameters are ``electron_temperature_ev``
(the cold kT_e), ``ne_tau_s_cm3`` (n_e·τ₁, varied through n_e at the source's τ₁),
``electron_density_cm3``, ``confinement_time_s`` (τ₁ of the scaling) and
``hot_electron_fraction``; it rebuilds the source for each point and returns the charge
distribution of the extracted beam at steady state, F_q ∝ n_q/τ_q (what an analysing
magnet measures; the extracted current is then ∝ q·F_q, as the current fit assumes).

The optimiser is ``scipy.optimize.least_squares`` (trust-region reflective, bounds
honoured; optional extra ``chargecast[fit]``). Parameters that span decades (current
density, jτ, time, pressure) are fitted in log10, the others linearly. The Jacobian comes
from forward finite differences, all n+1 points evaluated in one core batch. The covariance
is (JᵀJ)⁻¹ of the σ-weighted residuals at the optimum (scaled by nothing: the stated
uncertainties are taken as true), the 1-σ interval of a log parameter is
[10^(x−σ), 10^(x+σ)]. A parameter is reported unconstrained when JᵀJ is singular
(condition > 1e12) or its σ exceeds half its bound span in the fitted coordinate; the result
then holds a χ² scan over its bounds (other parameters at the best fit).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, require_pyplot, require_type

#: Parameters of the trap model, whether they are fitted in log10, and their unit.
TRAP_PARAMETERS: dict[str, tuple[bool, str]] = {
    "energy_ev": (False, "eV"),
    "current_density_a_cm2": (True, "A/cm²"),
    "jtau_a_s_cm2": (True, "A s/cm²"),
    "time_s": (True, "s"),
    "pressure_pa": (True, "Pa"),
    "ion_temperature_ev": (True, "eV"),
    "compensation": (False, "1"),
}

#: Parameters of the plasma model, whether they are fitted in log10, and their unit.
PLASMA_PARAMETERS: dict[str, tuple[bool, str]] = {
    "electron_temperature_ev": (True, "eV"),
    "ne_tau_s_cm3": (True, "s/cm³"),
    "electron_density_cm3": (True, "cm⁻³"),
    "confinement_time_s": (True, "s"),
    "hot_electron_fraction": (False, "1"),
}

#: Condition number of JᵀJ above which the fit is called degenerate.
SINGULAR_CONDITION = 1e12
#: A parameter with σ above this share of its (fitted-coordinate) bound span is unconstrained.
UNCONSTRAINED_SHARE = 0.5


def trap_settings(trap: Any) -> dict[str, Any]:
    """Constructor keywords that rebuild ``trap`` (beam by energy, current and current
    density). A trap with a photon beam cannot be rebuilt this way."""
    if trap.photon_beam is not None:
        raise _core.InvalidParameterError(
            "invalid trap: a trap with a photon beam cannot be rebuilt from its settings "
            "(fit and cluster runs support electron-beam traps without photon beams)"
        )
    beam = trap.beam
    loss = trap.loss_per_s
    return {
        "beam": {
            "energy_ev": beam.energy_ev,
            "current_a": beam.current_a,
            "current_density_a_cm2": beam.current_density_a_cm2,
        },
        "length_m": trap.length_m,
        "residual_gas_pa": dict(trap.residual_gas_pa),
        "ion_temperature_ev": trap.ion_temperature_ev,
        "gas_temperature_k": trap.gas_temperature_k,
        "compensation": trap.compensation,
        "loss_per_s": None if loss is None else np.asarray(loss).tolist(),
        "feed": trap.feed,
        "processes": list(trap.processes),
    }


def build_trap(settings: Mapping[str, Any]) -> Any:
    """The trap of ``trap_settings`` output."""
    from chargecast.beam_trap import BeamTrap
    from chargecast.electron_beam import ElectronBeam

    s = dict(settings)
    beam = ElectronBeam(**s.pop("beam"))
    return BeamTrap(beam, **s)


def rebuild_trap(trap: Any, **changes: float) -> Any:
    """``trap`` with some settings changed: ``energy_ev``, ``current_density_a_cm2``,
    ``pressure_pa`` (all residual gases scaled to this total), ``ion_temperature_ev``,
    ``compensation``."""
    s = trap_settings(trap)
    for name, value in changes.items():
        if name in ("energy_ev", "current_density_a_cm2"):
            s["beam"][name] = value
        elif name == "pressure_pa":
            total = sum(s["residual_gas_pa"].values())
            if total <= 0:
                raise _core.InvalidParameterError(
                    "invalid free parameter pressure_pa: the trap has no residual gas to scale"
                )
            s["residual_gas_pa"] = {g: p * value / total for g, p in s["residual_gas_pa"].items()}
        elif name in ("ion_temperature_ev", "compensation"):
            s[name] = value
        else:
            raise _core.InvalidParameterError(f"invalid trap setting {name!r}")
    return build_trap(s)


class TrapFitModel:
    """The fixed beam-trap model of ``element`` at confinement time ``time_s`` as a fit
    model (see the module documentation).

    Parameters
    ----------
    trap : BeamTrap
    element : str or int
    time_s : float
        Confinement time (s) at which the distribution was measured.
    initial_charge : int
        Charge of the injected atoms or ions.

    Examples
    --------
    >>> import chargecast as cc
    >>> trap = cc.BeamTrap(cc.ElectronBeam(energy_ev=2000.0, current_a=0.05, radius_m=1e-4), length_m=0.5)
    >>> model = cc.TrapFitModel(trap, "Ar", time_s=0.1)
    >>> model.evaluate([{"energy_ev": 3000.0}]).shape
    (1, 19)
    """

    def __init__(self, trap: Any, element: Any, time_s: float, initial_charge: int = 0):
        require_type("trap", trap, _core.BeamTrap, "a BeamTrap")
        self.trap = trap
        el = _core.element(element)
        self.element = el.symbol
        self.z = int(el.z)
        self.time_s = _core._as_float("time_s", time_s)
        self.initial_charge = _core._as_int("initial_charge", initial_charge)
        trap_settings(trap)  # fails early for traps that cannot be rebuilt

    def parameters(self) -> dict[str, float]:
        """Nominal value of every parameter this model can vary."""
        b = self.trap.beam
        return {
            "energy_ev": b.energy_ev,
            "current_density_a_cm2": b.current_density_a_cm2,
            "jtau_a_s_cm2": b.current_density_a_cm2 * self.time_s,
            "time_s": self.time_s,
            "pressure_pa": float(sum(self.trap.residual_gas_pa.values())),
            "ion_temperature_ev": self.trap.ion_temperature_ev,
            "compensation": self.trap.compensation,
        }

    def log_scaled(self, name: str) -> bool:
        """Whether ``name`` is fitted in log10."""
        return TRAP_PARAMETERS[name][0]

    def _trap_and_time(self, point: Mapping[str, float]) -> tuple[Any, float]:
        p = self.parameters()
        p.update(point)
        if "jtau_a_s_cm2" in point:
            if "current_density_a_cm2" in point:
                raise _core.InvalidParameterError(
                    "invalid free parameters: jtau_a_s_cm2 and current_density_a_cm2 together "
                    "(jτ fixes j at the model's time; free one of them)"
                )
            p["current_density_a_cm2"] = p["jtau_a_s_cm2"] / p["time_s"]
        changes = {
            k: p[k] for k in ("energy_ev", "current_density_a_cm2", "ion_temperature_ev", "compensation")
        }
        if p["pressure_pa"] > 0:
            changes["pressure_pa"] = p["pressure_pa"]
        return rebuild_trap(self.trap, **changes), p["time_s"]

    def evaluate(self, points: Sequence[Mapping[str, float]]) -> np.ndarray:
        """Fractions ``[len(points), Z+1]`` at each point (one parallel core batch per
        distinct time)."""
        built = [self._trap_and_time(pt) for pt in points]
        out = np.empty((len(points), self.z + 1))
        for t in sorted({t for _, t in built}):
            idx = [i for i, (_, ti) in enumerate(built) if ti == t]
            pops = _core._evolve_traps(
                [built[i][0] for i in idx], self.element, [t], initial_charge=self.initial_charge
            )
            out[idx] = pops[:, 0, :]
        return out

    def ions_scale(self, point: Mapping[str, float]) -> float:
        """Ions per extraction per unit fraction is not a constant of the fixed model; the
        current fit profiles an overall scale instead, so this returns 1."""
        return 1.0


class PlasmaFitModel:
    """A plasma source's extracted beam at steady state as a fit model (see the module
    documentation): fractions F_q = (n_q/τ_q) / Σ_q' (n_q'/τ_q') of the ions leaving, q ≥ 1.

    Parameters
    ----------
    source : PlasmaSource
        The nominal source (every setting not fitted is kept; the confinement must be the
        scaling τ_q = τ₁·q^α to fit ``confinement_time_s`` or ``ne_tau_s_cm3``).
    element : str or int
        One of the source's elements.

    Examples
    --------
    >>> import chargecast as cc
    >>> src = cc.PlasmaSource(electron_temperature_ev=1500.0, electron_density_cm3=2e11,
    ...                       confinement_time_s=1e-3, gas_feed_pa={"Ar": 7e-7})
    >>> model = cc.PlasmaFitModel(src, "Ar")
    >>> f = model.evaluate([{"electron_temperature_ev": 3000.0}])
    >>> f.shape, round(float(f[0].sum()), 12)
    ((1, 19), 1.0)
    """

    def __init__(self, source: Any, element: Any):
        from chargecast.plasma import PlasmaSource

        require_type("source", source, _core.PlasmaSource, "a PlasmaSource")
        self._class = PlasmaSource
        self.source = source
        el = _core.element(element)
        if el.symbol not in source.elements:
            raise _core.InvalidParameterError(
                f"invalid element {el.symbol!r}: allowed one of the source's elements "
                f"{', '.join(source.elements)}"
            )
        self.element = el.symbol
        self.z = int(el.z)

    def _settings(self) -> dict[str, Any]:
        s = self.source
        return {
            "electron_temperature_ev": s.electron_temperature_ev,
            "electron_density_cm3": s.electron_density_cm3,
            "confinement_time_s": s.confinement_time_s,
            "confinement_exponent": s.confinement_exponent,
            "gas_feed_pa": dict(s.gas_feed_pa),
            "residual_gas_pa": dict(s.residual_gas_pa),
            "hot_electron_temperature_ev": s.hot_electron_temperature_ev,
            "hot_electron_fraction": s.hot_electron_fraction,
            "ion_temperature_ev": s.ion_temperature_ev,
            "gas_temperature_k": s.gas_temperature_k,
            "neutral_residence_time_s": s.neutral_residence_time_s,
            "wall_recycling": s.wall_recycling,
            "plasma_volume_m3": s.plasma_volume_m3,
            "extraction_fraction": s.extraction_fraction,
        }

    def _tau1_s(self) -> float | None:
        tau = self.source.confinement_time_s
        return float(tau) if self.source.confinement_exponent is not None else None

    def parameters(self) -> dict[str, float]:
        """Nominal value of every parameter this model can vary."""
        s = self.source
        out = {
            "electron_temperature_ev": s.electron_temperature_ev,
            "electron_density_cm3": s.electron_density_cm3,
            "hot_electron_fraction": s.hot_electron_fraction,
        }
        tau1 = self._tau1_s()
        if tau1 is not None:
            out["confinement_time_s"] = tau1
            out["ne_tau_s_cm3"] = s.electron_density_cm3 * tau1
        return out

    def log_scaled(self, name: str) -> bool:
        """Whether ``name`` is fitted in log10."""
        return PLASMA_PARAMETERS[name][0]

    def _source(self, point: Mapping[str, float]) -> Any:
        if "ne_tau_s_cm3" in point and "electron_density_cm3" in point:
            raise _core.InvalidParameterError(
                "invalid free parameters: ne_tau_s_cm3 and electron_density_cm3 together "
                "(n_e·τ fixes n_e at the model's τ₁; free one of them)"
            )
        s = self._settings()
        for name in ("electron_temperature_ev", "electron_density_cm3", "hot_electron_fraction"):
            if name in point:
                s[name] = float(point[name])
        if "confinement_time_s" in point:
            s["confinement_time_s"] = float(point["confinement_time_s"])
        if "ne_tau_s_cm3" in point:
            s["electron_density_cm3"] = float(point["ne_tau_s_cm3"]) / float(s["confinement_time_s"])
        return self._class(**s)

    def evaluate(self, points: Sequence[Mapping[str, float]]) -> np.ndarray:
        """Extracted-beam fractions ``[len(points), Z+1]`` at each point (0 for the neutral)."""
        out = np.zeros((len(points), self.z + 1))
        for i, pt in enumerate(points):
            state = self._source(pt).steady_state(self.element)
            q = np.arange(self.z + 1)
            flux = np.where(q > 0, state.currents_eua / np.maximum(q, 1), 0.0)
            total = flux.sum()
            out[i] = flux / total if total > 0 else flux
        return out

    def ions_scale(self, point: Mapping[str, float]) -> float:
        """The current fit profiles an overall scale, so this returns 1."""
        return 1.0


class FitResult:
    """Best fit of a measured charge-state distribution.

    Attributes
    ----------
    parameters : dict
        Best-fit value of every free parameter (its own unit).
    sigma : dict
        1-σ uncertainty of each free parameter in its own unit (delta method for log ones).
    intervals : dict
        1-σ interval ``(low, high)`` of each free parameter.
    covariance : ndarray
        Covariance of the fitted coordinates (log10 for log parameters), in ``names`` order.
    names : list of str
        Free parameters in covariance order; ``log_scaled`` says which are log10.
    chi2, dof, reduced_chi2 : float, int, float
        χ² of the σ-weighted residuals, degrees of freedom, χ²/dof.
    unconstrained : list of str
        Parameters the data do not constrain; ``scans[name]`` = (values, χ²).
    charges, measured, uncertainties, model : ndarray
        The fitted charges, data, their 1-σ and the best-fit model (same units as the data).
    """

    element: str
    names: list[str]
    log_scaled: dict[str, bool]
    parameters: dict[str, float]
    sigma: dict[str, float]
    intervals: dict[str, tuple[float, float]]
    covariance: np.ndarray
    chi2: float
    dof: int
    reduced_chi2: float
    unconstrained: list[str]
    scans: dict[str, tuple[np.ndarray, np.ndarray]]
    charges: np.ndarray
    measured: np.ndarray
    uncertainties: np.ndarray
    model: np.ndarray
    quantity: str
    success: bool
    evaluations: int

    def __init__(self, **kw: Any):
        self.__dict__.update(kw)

    @property
    def residuals(self) -> np.ndarray:
        """(measured − model)/σ at each fitted charge."""
        return (self.measured - self.model) / self.uncertainties

    def plot(self, axes: Optional[Any] = None) -> Any:
        """Data with error bars and the best fit (top), normalised residuals (bottom).

        Returns
        -------
        ndarray of two matplotlib Axes
        """
        plt = require_pyplot()
        if axes is None:
            _, axes = plt.subplots(2, 1, figsize=(7, 5), sharex=True, gridspec_kw={"height_ratios": [3, 1.3]})
        top, bottom = axes
        q = self.charges
        top.errorbar(q, self.measured, yerr=self.uncertainties, fmt="o", color=PALETTE[0], label="measured")
        top.step(q, self.model, where="mid", color=PALETTE[3], label="best fit")
        top.set_ylabel(self.quantity)
        top.set_title(
            f"{self.element}: χ²/dof = {self.chi2:.1f}/{self.dof}"
            + (f"; unconstrained: {', '.join(self.unconstrained)}" if self.unconstrained else ""),
            fontsize=9,
        )
        top.legend(fontsize=8)
        bottom.axhspan(-1, 1, color=PALETTE[2], alpha=0.18, linewidth=0)
        bottom.bar(q, self.residuals, color=PALETTE[1], width=0.6)
        bottom.axhline(0, color="black", linewidth=0.8)
        bottom.set_xlabel("charge state q")
        bottom.set_ylabel("(data − fit)/σ")
        return axes

    def __repr__(self) -> str:
        parts = []
        for n in self.names:
            lo, hi = self.intervals[n]
            flag = " (unconstrained)" if n in self.unconstrained else ""
            parts.append(f"{n}={self.parameters[n]:.4g} [{lo:.4g}, {hi:.4g}]{flag}")
        return f"FitResult({self.element}: " + ", ".join(parts) + f"; χ²={self.chi2:.3g}, dof={self.dof})"


def _data(values: Any, z: int, name: str) -> tuple[np.ndarray, np.ndarray]:
    """Charges and values of a dict {charge: value} or an array over 0…Z (NaN = not measured)."""
    if isinstance(values, Mapping):
        q = np.array([_core._as_int(f"{name} charge", k) for k in values], dtype=int)
        v = np.array([_core._as_float(f"{name}[{k}]", x) for k, x in values.items()], dtype=float)
    else:
        arr = np.asarray(_core._as_float_array(name, values), dtype=float).reshape(-1)
        if len(arr) != z + 1:
            raise _core.InvalidParameterError(
                f"invalid {name}: {len(arr)} values, give one per charge 0..={z} "
                "(NaN where not measured) or a dict"
            )
        q = np.flatnonzero(np.isfinite(arr))
        v = arr[q]
    if np.any((q < 0) | (q > z)):
        raise _core.InvalidParameterError(f"invalid {name}: charges must lie in 0..={z}")
    return q, v


def fit_charge_distribution(
    model: Any,
    measured_fractions: Any = None,
    free: Optional[Mapping[str, tuple[float, float]]] = None,
    *,
    uncertainties: Any,
    measured_currents_a: Any = None,
    scan_points: int = 21,
) -> FitResult:
    """Fit the free parameters of ``model`` to a measured charge-state distribution.

    Parameters
    ----------
    model : TrapFitModel or any fit model (see ``chargecast.fit``)
    measured_fractions : dict {charge: fraction} or array over 0…Z, optional
        Measured fractions (1); NaN or missing charges are not fitted.
    free : dict {name: (low, high)}
        Free parameters and their bounds in their own units, e.g.
        ``{"jtau_a_s_cm2": (1, 1e3), "pressure_pa": (1e-10, 1e-6)}``; names from
        ``model.parameters()``. The start is the model's nominal value (clipped into bounds).
    uncertainties : dict or array
        1-σ uncertainty of every measured value, same layout and unit as the data.
    measured_currents_a : dict or array, optional
        Instead of fractions: currents per charge (A), ∝ q·F_q; an overall scale is fitted
        analytically (one more degree of freedom used).
    scan_points : int
        Points of the χ² scan of an unconstrained parameter.

    Returns
    -------
    FitResult

    Examples
    --------
    >>> import chargecast as cc
    >>> beam = cc.ElectronBeam(energy_ev=2000.0, current_a=0.05, current_density_a_cm2=100.0)
    >>> trap = cc.BeamTrap(beam, length_m=0.5, residual_gas_pa={"H2": 3e-7})
    >>> model = cc.TrapFitModel(trap, "Ar", time_s=0.1)
    >>> f = model.evaluate([{}])[0]
    >>> data = {q: f[q] for q in range(13, 17)}
    >>> fit = cc.fit_charge_distribution(model, data, free={"current_density_a_cm2": (10, 1000)},
    ...                                  uncertainties={q: 0.01 for q in data})
    >>> round(fit.parameters["current_density_a_cm2"])
    100
    """
    if not (callable(getattr(model, "evaluate", None)) and callable(getattr(model, "parameters", None))):
        raise _core.ArgumentTypeError(
            f"invalid model: {type(model).__name__} given, must be a fit model such as TrapFitModel"
        )
    require_type("free", free, Mapping, "a dict {name: (low, high)}")
    try:
        from scipy.optimize import least_squares
    except ImportError as exc:  # pragma: no cover - exercised only without scipy
        raise ImportError("fitting needs scipy: pip install chargecast[fit]") from exc
    if (measured_fractions is None) == (measured_currents_a is None):
        raise _core.InvalidParameterError(
            "invalid data: give exactly one of measured_fractions and measured_currents_a"
        )
    if not free:
        raise _core.InvalidParameterError("invalid free: give at least one {name: (low, high)}")
    currents = measured_currents_a is not None
    name = "measured_currents_a" if currents else "measured_fractions"
    charges, data = _data(measured_currents_a if currents else measured_fractions, model.z, name)
    q_sig, sig = _data(uncertainties, model.z, "uncertainties")
    if not np.array_equal(np.sort(q_sig), np.sort(charges)) or np.any(~(sig > 0)):
        raise _core.InvalidParameterError(
            "invalid uncertainties: give a positive 1-sigma value for every measured charge"
        )
    order = np.argsort(charges)
    charges, data = charges[order], data[order]
    sig = sig[np.argsort(q_sig)]
    nominal = model.parameters()
    names = list(free)
    logs, lows, highs, start = [], [], [], []
    for n in names:
        if n not in nominal:
            raise _core.InvalidParameterError(f"invalid free parameter {n!r}: allowed {', '.join(nominal)}")
        lo, hi = (float(b) for b in free[n])
        is_log = model.log_scaled(n)
        if not (lo < hi) or (is_log and lo <= 0):
            raise _core.InvalidParameterError(
                f"invalid bounds for {n}: ({lo}, {hi}); need low < high" + (", both > 0" if is_log else "")
            )
        to = math.log10 if is_log else float
        logs.append(is_log)
        lows.append(to(lo))
        highs.append(to(hi))
        x0 = to(min(max(nominal[n], lo), hi))
        start.append(
            min(max(x0, lows[-1] + 1e-9 * (highs[-1] - lows[-1])), highs[-1] - 1e-9 * (highs[-1] - lows[-1]))
        )
    lows_a, highs_a = np.array(lows), np.array(highs)

    def point(x: np.ndarray) -> dict[str, float]:
        return {n: (10.0**v if lg else float(v)) for n, v, lg in zip(names, x, logs)}

    def predict(fr: np.ndarray) -> np.ndarray:
        y = fr[..., charges]
        if not currents:
            return y
        m = y * charges
        w = 1.0 / sig**2
        scale = (m * data * w).sum(axis=-1, keepdims=True) / np.maximum(
            (m * m * w).sum(axis=-1, keepdims=True), 1e-300
        )
        return m * scale

    def residuals_many(xs: list[np.ndarray]) -> np.ndarray:
        return (predict(model.evaluate([point(x) for x in xs])) - data) / sig

    steps = 1e-6 * np.maximum(highs_a - lows_a, 1e-12)

    def fun(x: np.ndarray) -> np.ndarray:
        return residuals_many([x])[0]

    def jac(x: np.ndarray) -> np.ndarray:
        xs = [x]
        h = []
        for i in range(len(x)):
            # Step inwards from an upper bound so every point stays feasible.
            hi_ = steps[i] if x[i] + steps[i] <= highs_a[i] else -steps[i]
            xi = x.copy()
            xi[i] += hi_
            xs.append(xi)
            h.append(hi_)
        r = residuals_many(xs)
        return ((r[1:] - r[0]) / np.array(h)[:, None]).T

    # A coarse grid over the bounds (one core batch) picks the start, so the local optimiser
    # does not stall in a far-off valley; the model's nominal point competes with it.
    per_axis = min(5, max(2, int(round(256 ** (1.0 / len(names))))))
    axes = [
        np.linspace(lo + 0.1 * (hi - lo), hi - 0.1 * (hi - lo), per_axis) for lo, hi in zip(lows_a, highs_a)
    ]
    grid = [np.array(start)] + [np.array(g) for g in np.stack(np.meshgrid(*axes), -1).reshape(-1, len(names))]
    chi_grid = (residuals_many(grid) ** 2).sum(axis=1)
    x_start = grid[int(np.nanargmin(np.where(np.isfinite(chi_grid), chi_grid, np.inf)))]
    sol = least_squares(fun, x_start, jac=jac, bounds=(lows_a, highs_a), method="trf", x_scale="jac")
    x = sol.x
    r = fun(x)
    j = jac(x)
    jtj = j.T @ j
    dof = len(data) - len(names) - (1 if currents else 0)
    cond = np.linalg.cond(jtj) if np.all(np.isfinite(jtj)) else np.inf
    if cond < SINGULAR_CONDITION:
        cov = np.linalg.inv(jtj)
    else:
        cov = np.linalg.pinv(jtj)
    sd = np.sqrt(np.clip(np.diag(cov), 0, None))
    unconstrained = []
    for i, n in enumerate(names):
        if cond >= SINGULAR_CONDITION and np.abs(np.linalg.svd(jtj)[2][-1, i]) > 0.3:
            unconstrained.append(n)
        elif sd[i] > UNCONSTRAINED_SHARE * (highs_a[i] - lows_a[i]):
            unconstrained.append(n)
    best = point(x)
    sigma, intervals = {}, {}
    for i, n in enumerate(names):
        if logs[i]:
            sigma[n] = best[n] * math.log(10) * sd[i]
            intervals[n] = (10 ** (x[i] - sd[i]), 10 ** (x[i] + sd[i]))
        else:
            sigma[n] = float(sd[i])
            intervals[n] = (x[i] - sd[i], x[i] + sd[i])
    scans: dict[str, tuple[np.ndarray, np.ndarray]] = {}
    for n in unconstrained:
        i = names.index(n)
        line = np.linspace(lows_a[i], highs_a[i], max(int(scan_points), 2))
        xs = []
        for g in line:
            xg = x.copy()
            xg[i] = g
            xs.append(xg)
        chi = (residuals_many(xs) ** 2).sum(axis=1)
        scans[n] = (10**line if logs[i] else line, chi)
    chi2 = float((r**2).sum())
    return FitResult(
        element=model.element,
        names=names,
        log_scaled=dict(zip(names, logs)),
        parameters=best,
        sigma=sigma,
        intervals=intervals,
        covariance=cov,
        chi2=chi2,
        dof=dof,
        reduced_chi2=chi2 / dof if dof > 0 else float("nan"),
        unconstrained=unconstrained,
        scans=scans,
        charges=charges,
        measured=data,
        uncertainties=sig,
        model=predict(model.evaluate([best]))[0],
        quantity="current (A)" if currents else "fraction",
        success=bool(sol.success),
        evaluations=int(sol.nfev),
    )
