"""Electron beams: the ElectronBeam class and the beam formulas (Brillouin and Herrmann
radii, the space-charge depression of the beam energy)."""

from __future__ import annotations

from chargecast import _core
from chargecast._util import as_float

ElectronBeam = _core.ElectronBeam


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
