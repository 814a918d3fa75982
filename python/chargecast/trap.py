"""Electron beams and electron-beam traps: charge-state evolution, steady state, best
energy, ions per extraction, and the general rate-equation solver."""

from __future__ import annotations

import html
from collections.abc import Sequence
from typing import Any, Optional, Union

import numpy as np

from chargecast import _core
from chargecast._core import InvalidParameterError
from chargecast._util import (
    PALETTE,
    as_charges,
    as_float,
    as_float_array,
    as_int,
    as_times,
    element_symbol,
    inline_png,
    require_pyplot,
)
from chargecast.evolution import Evolution

ElectronBeam = _core.ElectronBeam


def _times(times_s: Any) -> np.ndarray:
    return as_times("times_s", times_s)


class BeamTrap:
    """An electron-beam ion trap: beam, trap length, residual gas and ion temperature.

    Ionization by the beam (Lotz), radiative recombination (Kim & Pratt) and charge
    exchange on the residual gas (Müller & Salzborn) make the rate network of each element.

    Parameters
    ----------
    beam : ElectronBeam
        The electron beam (energy, current, radius or current density).
    length_m : float
        Trap length (m).
    residual_gas_pa : dict of str to float, optional
        Partial pressures (Pa) of residual gases by formula, e.g. ``{"H2": 5e-9}``. Known
        gases: H2, He, N2, O2, CO, CO2, H2O, CH4, Ne, Ar, Kr, Xe.
    ion_temperature_ev : float
        Ion temperature kT (eV), sets the ion speed in charge-exchange collisions.
    gas_temperature_k : float
        Residual-gas temperature (K).
    compensation : float
        Fraction (0…1) of the electron space charge compensated by trapped ions; sets the
        ions per extraction.
    loss_per_s : array_like, optional
        Escape rate of each charge state 0…Z (s⁻¹), for one element only.
    feed : tuple (charge, rate_per_s), optional
        Continuous injection of that charge state (population units per second).
    processes : sequence of str, optional
        Subset of ``("ionization", "radiative_recombination", "charge_exchange",
        "multiple_ionization")``; the first three by default. ``"multiple_ionization"`` lets
        every subshell's ionization relax by Auger cascades (q → q+1+k) and adds direct
        double ionization (q → q+2); slower for heavy elements (the cascades are computed
        once per ion and cached).
    photon_beam : PhotonBeam, optional
        A photon beam crossing the trapped ions: its photoionization and relaxation jumps
        are added to the network (e.g. a synchrotron beam through the trap).

    Examples
    --------
    >>> beam = ElectronBeam(energy_ev=8000.0, current_a=0.3, radius_m=70e-6)
    >>> trap = BeamTrap(beam, length_m=0.6, residual_gas_pa={"H2": 5e-9}, ion_temperature_ev=50.0)
    >>> evo = trap.evolve("Ar", times_s=np.geomspace(1e-4, 1.0, 50))
    >>> round(float(evo.fractions[-1].sum()), 9)
    1.0
    >>> int(np.argmax(evo.fractions[-1]))
    18
    """

    _DEFAULT = ("ionization", "radiative_recombination", "charge_exchange")
    _ALL = (*_DEFAULT, "multiple_ionization")

    def __init__(
        self,
        beam: Any,
        length_m: float,
        residual_gas_pa: Optional[dict[str, float]] = None,
        ion_temperature_ev: float = 50.0,
        *,
        gas_temperature_k: float = 300.0,
        compensation: float = 0.5,
        loss_per_s: Any = None,
        feed: Optional[tuple[int, float]] = None,
        processes: Sequence[str] = _DEFAULT,
        photon_beam: Any = None,
    ) -> None:
        if not isinstance(beam, _core.ElectronBeam):
            raise InvalidParameterError(f"beam must be a chargecast.ElectronBeam, got {type(beam).__name__}")
        gas = residual_gas_pa or {}
        if not isinstance(gas, dict):
            raise InvalidParameterError("residual_gas_pa must be a dict {formula: pressure_pa}")
        gas_list = [(str(k), as_float(f"residual_gas_pa[{k!r}]", v)) for k, v in gas.items()]
        unknown = set(processes) - set(self._ALL)
        if unknown or isinstance(processes, str):
            raise InvalidParameterError(
                f"unknown processes {sorted(unknown) or processes!r}: allowed {self._ALL}"
            )
        loss = None if loss_per_s is None else as_float_array("loss_per_s", loss_per_s)[0].tolist()
        feed_charge, feed_rate = (None, 0.0)
        if feed is not None:
            if not isinstance(feed, (tuple, list)) or len(feed) != 2:
                raise InvalidParameterError("feed must be a tuple (charge, rate_per_s)")
            feed_charge, feed_rate = as_int("feed charge", feed[0]), as_float("feed rate_per_s", feed[1])
            if feed_charge < 0:
                raise InvalidParameterError(f"feed charge {feed_charge} must be >= 0")
        photons = None
        if photon_beam is not None:
            try:
                photons = (
                    float(photon_beam.photon_energy_ev),
                    float(photon_beam.flux_cm2_s),
                    float(photon_beam.bandwidth_ev),
                )
            except (AttributeError, TypeError, ValueError):
                raise InvalidParameterError(
                    f"photon_beam must be a chargecast.PhotonBeam, got {type(photon_beam).__name__}"
                ) from None
        self.photon_beam = photon_beam
        self.residual_gas_pa = dict(gas)
        self.ion_temperature_ev = ion_temperature_ev
        self._trap = _core._BeamTrap(
            beam,
            as_float("length_m", length_m),
            gas_list,
            as_float("ion_temperature_ev", ion_temperature_ev),
            as_float("gas_temperature_k", gas_temperature_k),
            as_float("compensation", compensation),
            loss,
            feed_charge,
            feed_rate,
            "ionization" in processes,
            "radiative_recombination" in processes,
            "charge_exchange" in processes,
            photons,
            "multiple_ionization" in processes,
        )
        self.length_m = float(length_m)
        self.compensation = float(compensation)

    @property
    def beam(self) -> Any:
        """The electron beam."""
        return self._trap.beam

    @property
    def electrons_in_trap(self) -> float:
        """Electrons inside the trap, N_e = I·L/(e·v)."""
        return float(self._trap.electrons_in_trap)

    def _label(self) -> str:
        b = self.beam
        return f"{b.energy_ev:g} eV, {b.current_density_a_cm2:.3g} A/cm²"

    def evolve(self, element: Union[str, int], times_s: Any, initial_charge: int = 0) -> Evolution:
        """Charge-state fractions over confinement time, starting from one charge state.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.
        times_s : array_like
            Output times (s), ascending, ≥ 0.
        initial_charge : int
            Charge state of the injected atoms or ions (0 = neutral atoms).

        Returns
        -------
        Evolution
            ``times_s``, ``charges``, ``fractions`` [T, Z+1], ``peak()``, ``plot()`` …
        """
        t = _times(times_s)
        fr = self._trap.evolve(element, t, as_int("initial_charge", initial_charge))
        return Evolution(element_symbol(element), t, fr, self._label())

    def steady_state(self, element: Union[str, int]) -> np.ndarray:
        """Equilibrium charge-state fractions (long-time limit).

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.

        Returns
        -------
        ndarray, shape (Z+1,)
            Fraction of each charge state.
        """
        return self._trap.steady_state(element)

    def rates(self, element: Union[str, int]) -> np.ndarray:
        """The element's rate matrix ``rates[from, to]`` (s⁻¹) in this trap.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.

        Returns
        -------
        ndarray, shape (Z+1, Z+1)
        """
        return self._trap.rates(element)

    def ions_per_extraction(self, fractions: Any) -> np.ndarray:
        """Ions of each charge state delivered per extraction.

        N_q = f·N_e·F_q / Σ_{q≥1} q·F_q: ions fill the trap until their charge compensates the
        fraction f (``compensation``) of the N_e electrons, shared by the fractions F.

        Parameters
        ----------
        fractions : array_like, shape (Z+1,)
            Charge-state fractions, e.g. ``evolution.at(t)``.

        Returns
        -------
        ndarray, shape (Z+1,)
            Ions per extraction of each charge state.
        """
        return self._trap.ions_per_extraction(as_float_array("fractions", fractions)[0])

    def best_energy(
        self,
        element: Union[str, int],
        charge: Union[int, Sequence[int]],
        energies_ev: Any,
        times_s: Any,
    ) -> EnergyScan:
        """The electron energy and confinement time that maximise one charge state (or a set).

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.
        charge : int or sequence of int
            Target charge state(s); with several, their summed fraction is maximised.
        energies_ev : array_like
            Electron energies (eV) to try; current density held fixed.
        times_s : array_like
            Confinement times (s), ascending.

        Returns
        -------
        EnergyScan
            ``best_energy_ev``, ``best_time_s``, ``best_fraction`` and the whole map
            ``fraction[energy, time]`` for plotting.
        """
        charges = as_charges(charge)
        e, _ = as_float_array("energies_ev", energies_ev)
        t = _times(times_s)
        d = self._trap.energy_time_map(element, charges, e, t)
        return EnergyScan(
            element_symbol(element),
            charges,
            e,
            t,
            d["fraction"],
            d["best_energy_ev"],
            d["best_time_s"],
            d["best_fraction"],
        )

    def sweep(
        self, elements: Sequence[Union[str, int]], energies_ev: Any, times_s: Any
    ) -> dict[str, np.ndarray]:
        """Evolutions of several elements at several beam energies, computed in parallel.

        Parameters
        ----------
        elements : sequence of str or int
            Elements to run.
        energies_ev : array_like
            Electron energies (eV).
        times_s : array_like
            Output times (s), ascending.

        Returns
        -------
        dict of str to ndarray
            ``{symbol: fractions[energy, time, charge]}``.
        """
        if isinstance(elements, (str, int)):
            elements = [elements]
        e, _ = as_float_array("energies_ev", energies_ev)
        return self._trap.sweep(list(elements), e, _times(times_s))

    def __repr__(self) -> str:
        return f"BeamTrap({self.beam!r}, length_m={self.length_m}, residual_gas_pa={self.residual_gas_pa})"


class EnergyScan:
    """Fraction of target charge state(s) over an energy × time grid, and its maximum."""

    def __init__(
        self,
        element: str,
        charges: list[int],
        energies_ev: np.ndarray,
        times_s: np.ndarray,
        fraction: np.ndarray,
        best_energy_ev: float,
        best_time_s: float,
        best_fraction: float,
    ) -> None:
        self.element = element
        self.charges = charges
        self.energies_ev = energies_ev
        self.times_s = times_s
        self.fraction = fraction
        self.best_energy_ev = best_energy_ev
        self.best_time_s = best_time_s
        self.best_fraction = best_fraction

    def _target(self) -> str:
        return "+".join(f"{q}+" for q in self.charges)

    def plot(self, ax: Optional[Any] = None) -> Any:
        """Energy × time map of the target fraction (log time axis), best point marked.

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(7, 4.5))
        t = np.where(self.times_s > 0, self.times_s, np.nan)
        mesh = ax.pcolormesh(t, self.energies_ev, self.fraction, shading="nearest", cmap="viridis", vmin=0)
        ax.figure.colorbar(mesh, ax=ax, label=f"fraction of {self.element}{self._target()}")
        ax.plot(
            [self.best_time_s],
            [self.best_energy_ev],
            marker="*",
            color=PALETTE[1],
            markersize=14,
            markeredgecolor="black",
            linestyle="none",
            label=f"best: {self.best_energy_ev:.4g} eV, {self.best_time_s:.3g} s ({self.best_fraction:.2f})",
        )
        ax.set_xscale("log")
        if self.energies_ev.max() / max(self.energies_ev.min(), 1e-300) > 20:
            ax.set_yscale("log")
        ax.set_xlabel("confinement time (s)")
        ax.set_ylabel("electron energy (eV)")
        ax.set_title(f"{self.element}{self._target()} over energy and time", fontsize=10)
        ax.legend(loc="lower left", fontsize=8)
        return ax

    def _repr_html_(self) -> str:
        head = html.escape(
            f"{self.element}{self._target()}: best {self.best_energy_ev:.4g} eV at "
            f"{self.best_time_s:.3g} s, fraction {self.best_fraction:.3f}"
        )
        return f"<b>{head}</b>" + inline_png(self.plot)

    def __repr__(self) -> str:
        return (
            f"EnergyScan({self.element}{self._target()}: best_energy_ev={self.best_energy_ev:.4g}, "
            f"best_time_s={self.best_time_s:.3g}, best_fraction={self.best_fraction:.3f})"
        )


def evolve_batch(cases: Sequence[tuple[BeamTrap, Union[str, int]]], times_s: Any) -> list[Evolution]:
    """Evolve many (trap, element) cases at once, in parallel (Rust threads, GIL released).

    Use it for sweeps over anything a trap holds — current, radius, length, residual gas,
    energy — and elements; atoms start neutral.

    Parameters
    ----------
    cases : sequence of (BeamTrap, str or int)
        Each trap with the element to run in it.
    times_s : array_like
        Output times (s), ascending, ≥ 0, shared by all cases.

    Returns
    -------
    list of Evolution
        One per case, in order.

    Examples
    --------
    >>> traps = [BeamTrap(ElectronBeam(6000.0, i, radius_m=60e-6), 0.5, {"H2": 1e-9}) for i in (0.1, 0.4)]
    >>> evos = evolve_batch([(t, "Ar") for t in traps], np.geomspace(1e-4, 0.1, 30))
    >>> bool(evos[1].mean_charge()[10] > evos[0].mean_charge()[10])  # more current, faster breeding
    True
    """
    cases = list(cases)
    for case in cases:
        if not (isinstance(case, tuple) and len(case) == 2 and isinstance(case[0], BeamTrap)):
            raise InvalidParameterError(f"each case must be a tuple (BeamTrap, element); got {case!r}")
    t = _times(times_s)
    arrays = _core._evolve_batch([c[0]._trap for c in cases], [c[1] for c in cases], t)
    return [Evolution(element_symbol(el), t, fr, trap._label()) for (trap, el), fr in zip(cases, arrays)]


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
        _times(times_s),
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


def brillouin_radius_m(current_a: float, energy_ev: float, magnetic_field_t: float) -> float:
    """Brillouin radius of a beam in a uniform field (Brillouin 1945), relativistic mass γm_e.

    Parameters
    ----------
    current_a : float
        Beam current (A).
    energy_ev : float
        Electron energy (eV).
    magnetic_field_t : float
        Field (T).

    Returns
    -------
    float
        Radius (m).

    Examples
    --------
    >>> round(brillouin_radius_m(1.0, 1000.0, 1.0) * 1e6)
    148
    """
    return _core._brillouin_radius_m(
        as_float("current_a", current_a),
        as_float("energy_ev", energy_ev),
        as_float("magnetic_field_t", magnetic_field_t),
    )


def herrmann_radius_m(
    current_a: float,
    energy_ev: float,
    magnetic_field_t: float,
    cathode_radius_m: float,
    cathode_temperature_k: float,
    cathode_field_t: float = 0.0,
) -> float:
    """Herrmann radius enclosing 80 % of the current (Herrmann 1958).

    Parameters
    ----------
    current_a, energy_ev, magnetic_field_t : float
        Beam current (A), electron energy (eV), field in the trap (T).
    cathode_radius_m, cathode_temperature_k, cathode_field_t : float
        Cathode radius (m), temperature (K) and the field at the cathode (T).

    Returns
    -------
    float
        Radius (m).

    Examples
    --------
    >>> r_b = brillouin_radius_m(0.5, 10000.0, 4.0)
    >>> herrmann_radius_m(0.5, 10000.0, 4.0, 1.5e-3, 1400.0, 0.0) > r_b
    True
    """
    return _core._herrmann_radius_m(
        as_float("current_a", current_a),
        as_float("energy_ev", energy_ev),
        as_float("magnetic_field_t", magnetic_field_t),
        as_float("cathode_radius_m", cathode_radius_m),
        as_float("cathode_temperature_k", cathode_temperature_k),
        as_float("cathode_field_t", cathode_field_t),
    )


def effective_energy_ev(
    tube_to_cathode_v: float,
    current_a: float,
    beam_radius_m: float,
    drift_tube_radius_m: float,
    compensation: float = 0.0,
) -> float:
    """Electron energy on the beam axis after the space-charge depression, solved self-consistently.

    E = e·U − e·ΔU(E)·(1 − f), ΔU = I/(4πε₀v)·(1 + 2 ln(b/a)).

    Parameters
    ----------
    tube_to_cathode_v : float
        Drift-tube potential relative to the cathode (V).
    current_a : float
        Beam current (A).
    beam_radius_m, drift_tube_radius_m : float
        Beam radius a and drift-tube radius b (m), b ≥ a.
    compensation : float
        Fraction f (0…1) of the electron space charge compensated by ions.

    Returns
    -------
    float
        Energy (eV).

    Examples
    --------
    >>> e = effective_energy_ev(10000.0, 0.5, 50e-6, 5e-3)
    >>> 9000.0 < e < 10000.0
    True
    """
    return _core._effective_energy_ev(
        as_float("tube_to_cathode_v", tube_to_cathode_v),
        as_float("current_a", current_a),
        as_float("beam_radius_m", beam_radius_m),
        as_float("drift_tube_radius_m", drift_tube_radius_m),
        as_float("compensation", compensation),
    )
