"""Elements, ions, electron-impact ionization cross sections and stepwise breeding."""

from __future__ import annotations

from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import as_float, as_float_array, as_int, require_type, restore

Element = _core.Element
Ion = _core.Ion


def element(value: str | int) -> _core.Element:
    """Look up an element.

    Parameters
    ----------
    value : str or int
        Symbol (``"Kr"``), English name (``"krypton"``), case-insensitive, or atomic number.

    Returns
    -------
    Element
        With ``ionization_energies_ev`` (eV, step q → q+1), ``ion(q)``, ``isotopes()``,
        ``xray_levels()``.

    Examples
    --------
    >>> kr = element("krypton")
    >>> kr.z, kr.symbol
    (36, 'Kr')
    >>> round(float(kr.ionization_energies_ev[0]), 4)
    13.9996
    >>> kr.ion(8).configuration
    '1s2.2s2.2p6.3s2.3p6.3d10'
    """
    return _core.element(value)


def lotz_cross_section_cm2(
    element: str | int,
    charge: int,
    energies_ev: Any,
    a: Optional[float] = None,
    b: Optional[float] = None,
    c: Optional[float] = None,
) -> Any:
    """Lotz electron-impact single-ionization cross section of one ion.

    Sum over the ion's occupied subshells of the Lotz formula (Lotz 1967, 1968) with the
    subshell binding energies of the ion model. Typical accuracy ±30–40 % for ions; no
    excitation–autoionization, no multiple ionization.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the target ion, 0 … Z−1.
    energies_ev : float or array_like
        Electron energies (eV), > 0.
    a, b, c : float, optional
        Lotz constants for every subshell (a in cm² eV²). By default the simplified
        constants a = 4.5e-14, b = c = 0, with Lotz's fitted ones for H and He neutral.

    Returns
    -------
    float or ndarray
        Cross section (cm²), shaped like ``energies_ev``; 0 below threshold.

    Examples
    --------
    >>> s = lotz_cross_section_cm2("Ar", 17, [1e3, 1e4])
    >>> float(s[0]), f"{s[1]:.3e}"
    (0.0, '8.286e-22')
    """
    arr, shape = as_float_array("energies_ev", energies_ev)
    out = _core.lotz_cross_section_cm2(element, as_int("charge", charge), arr, a=a, b=b, c=c)
    return restore(out, shape)


def lotz_rate_coefficient_cm3_s(
    element: str | int,
    charge: int,
    temperatures_ev: Any,
    a: Optional[float] = None,
    b: Optional[float] = None,
    c: Optional[float] = None,
) -> Any:
    """Maxwellian-averaged Lotz ionization rate coefficient ⟨σv⟩.

    Closed form with the exponential integral E₁ (Lotz 1967).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the target ion, 0 … Z−1.
    temperatures_ev : float or array_like
        Electron temperatures kT (eV), > 0.
    a, b, c : float, optional
        Lotz constants, as in :func:`lotz_cross_section_cm2`.

    Returns
    -------
    float or ndarray
        Rate coefficient (cm³ s⁻¹), shaped like ``temperatures_ev``.

    Examples
    --------
    >>> k = lotz_rate_coefficient_cm3_s("Kr", 8, 2000.0)
    >>> 1e-10 < k < 1e-8
    True
    """
    arr, shape = as_float_array("temperatures_ev", temperatures_ev)
    out = _core.lotz_rate_coefficient_cm3_s(element, as_int("charge", charge), arr, a=a, b=b, c=c)
    return restore(out, shape)


def lotz_peak_energy_ev(element: str | int, charge: int) -> float:
    """Electron energy (eV) at which the Lotz cross section of step q → q+1 peaks.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the target ion, 0 … Z−1.

    Returns
    -------
    float
        Energy of the maximum (eV); about e ≈ 2.7 times the binding energy of the
        electron removed (common practice: run at 2.5–3 times that energy).

    Examples
    --------
    >>> round(lotz_peak_energy_ev("Ar", 17) / 4426.2, 2)
    2.72
    """
    return _core.lotz_peak_energy_ev(element, as_int("charge", charge))


def _current_density(beam: Any, current_density_a_cm2: Optional[float]) -> float:
    if beam is not None and current_density_a_cm2 is not None:
        from chargecast._core import InvalidParameterError

        raise InvalidParameterError("give either beam or current_density_a_cm2, not both")
    if beam is not None:
        require_type("beam", beam, _core.ElectronBeam, "an ElectronBeam")
        return float(beam.current_density_a_cm2)
    if current_density_a_cm2 is None:
        from chargecast._core import InvalidParameterError

        raise InvalidParameterError("give beam=ElectronBeam(...) or current_density_a_cm2")
    return as_float("current_density_a_cm2", current_density_a_cm2)


def breeding_time_s(
    element: str | int,
    charge: int,
    beam: Any = None,
    *,
    energies_ev: Any = None,
    current_density_a_cm2: Optional[float] = None,
) -> Any:
    """Time to breed ``charge`` from the neutral by stepwise ionization alone.

    τ_q = Σ_{i<q} 1/λ_i with λ_i = (j/e)·σ_i(E) (Lotz); recombination, charge exchange and
    losses are ignored, so this is a lower bound on the real time.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Target charge state, 0 … Z.
    beam : ElectronBeam, optional
        Supplies the energy and current density.
    energies_ev : float or array_like, optional
        Electron energies (eV); override the beam's energy (vectorised).
    current_density_a_cm2 : float, optional
        Current density (A/cm²) when no beam is given.

    Returns
    -------
    float or ndarray
        Time (s); ``inf`` where the energy is below a step's threshold.

    Examples
    --------
    >>> t = breeding_time_s("Ar", 16, energies_ev=[2000.0, 10000.0], current_density_a_cm2=500.0)
    >>> bool(t[0] < t[1])
    True
    """
    j = _current_density(beam, current_density_a_cm2)
    if energies_ev is None:
        if beam is None:
            from chargecast._core import InvalidParameterError

            raise InvalidParameterError("give energies_ev or a beam")
        energies_ev = beam.energy_ev
    arr, shape = as_float_array("energies_ev", energies_ev)
    return restore(_core._breeding_time_s(element, as_int("charge", charge), arr, j), shape)


def j_tau_c_cm2(element: str | int, charge: int, energies_ev: Any) -> Any:
    """Ionization factor jτ needed to reach ``charge`` by stepwise ionization alone.

    jτ_q = e·Σ_{i<q} 1/σ_i(E), independent of the current density.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Target charge state, 0 … Z.
    energies_ev : float or array_like
        Electron energies (eV), > 0.

    Returns
    -------
    float or ndarray
        jτ (C/cm²); ``inf`` below threshold.

    Examples
    --------
    >>> round(j_tau_c_cm2("Ar", 18, 1e4) - j_tau_c_cm2("Ar", 17, 1e4))
    193
    """
    arr, shape = as_float_array("energies_ev", energies_ev)
    # jτ is the breeding time at a current density of 1 A/cm² (τ = jτ/j), in C/cm².
    return restore(_core._breeding_time_s(element, as_int("charge", charge), arr, 1.0), shape)


def breeding_ladder(
    element: str | int, charge: int, energy_ev: float, current_density_a_cm2: float
) -> dict[str, np.ndarray]:
    """Step-by-step breeding table from the neutral to ``charge``.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Target charge state, 0 … Z.
    energy_ev : float
        Electron energy (eV).
    current_density_a_cm2 : float
        Current density (A/cm²).

    Returns
    -------
    dict of ndarray
        Per step q → q+1: ``charge``, ``ionization_energy_ev``, ``cross_section_cm2``,
        ``rate_per_s``, ``time_to_next_s`` (cumulative, s), ``j_tau_c_cm2`` (cumulative),
        ``peak_energy_ev``.

    Examples
    --------
    >>> lad = breeding_ladder("Ne", 10, 5000.0, 200.0)
    >>> len(lad["charge"]), bool(lad["time_to_next_s"][-1] > lad["time_to_next_s"][0])
    (10, True)
    """
    d = _core._breeding_ladder(
        element,
        as_int("charge", charge),
        as_float("energy_ev", energy_ev),
        as_float("current_density_a_cm2", current_density_a_cm2),
    )
    d["charge"] = np.asarray(d["charge"], dtype=np.int64)
    return d
