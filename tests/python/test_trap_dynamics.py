"""The beam trap's ion-dynamics model, checked from Python: beam heating against the
Spitzer/NRL expression written out independently with scipy.constants, the fixed-model
limit, and clear errors."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as sc

import chargecast as cc
from chargecast import _core

OFF = {
    "overlap": False,
    "heating": False,
    "exchange": False,
    "escape": False,
    "ionization_heating": False,
    "space_charge": False,
}


def _trap(residual: float = 1e-8) -> cc.BeamTrap:
    beam = cc.ElectronBeam(3000.0, 0.1, current_density_a_cm2=300.0)
    return cc.BeamTrap(beam, length_m=0.5, residual_gas_pa={"H2": residual}, ion_temperature_ev=1.0)


def test_beam_heating_matches_the_spitzer_expression():
    # dE/dt = 4π n_e (q e²/4πε₀)² lnΛ/(m_i v_e) (L. Spitzer 1962; NRL Plasma Formulary),
    # written out here with scipy.constants; lnΛ from the NRL electron–ion form with the
    # beam energy for T_e. Read off as the difference of the model's dU/dt with heating on
    # and off (the other terms, ionization carrying U up, are the same in both).
    trap = _trap(0.0)
    system = _core._dynamic_system(trap, {"Ar": 1.0}, dynamics=dict(OFF, heating=True))
    cold = _core._dynamic_system(trap, {"Ar": 1.0}, dynamics=OFF)
    y = np.array(system.initial_state, dtype=float)
    z = 18
    q = 10
    n_ions, kt = 1e6, 5.0
    # State layout of one species: N_0…N_Z, then U_0…U_Z, then the running totals.
    y[:] = 0.0
    y[q] = n_ions
    y[z + 1 + q] = n_ions * kt
    du = system.rhs(y)[z + 1 + q] - cold.rhs(y)[z + 1 + q]
    heating_ev_s = 1.5 * du / n_ions
    e_ev = 3000.0
    gamma = 1 + e_ev / (sc.m_e * sc.c**2 / sc.e)
    v = sc.c * np.sqrt(1 - 1 / gamma**2)
    n_e = 300.0e4 / (sc.e * v)
    n_e_cm3 = n_e * 1e-6
    log = (
        23.0 - np.log(np.sqrt(n_e_cm3) * q * e_ev**-1.5)
        if e_ev < 10 * q * q
        else 24.0 - np.log(np.sqrt(n_e_cm3) / e_ev)
    )
    k = q * sc.e**2 / (4 * np.pi * sc.epsilon_0)
    mass = 39.948 * sc.atomic_mass
    expect = 4 * np.pi * n_e * k**2 * log / (mass * v) / sc.e
    assert heating_ev_s == pytest.approx(expect, rel=1e-2)


def test_everything_off_equals_the_fixed_model():
    trap = _trap()
    times = np.geomspace(1e-5, 1.0, 30)
    run = _core._evolve_dynamic(trap, {"Ar": 1e6}, times, dynamics=OFF, rtol=1e-12)
    fixed = trap.evolve("Ar", times)
    assert np.max(np.abs(run.fractions("Ar") - fixed.fractions)) < 1e-9


def test_bad_dynamics_settings_are_clear_errors():
    trap = _trap()
    with pytest.raises(cc.InvalidParameterError, match="drift_tube_radius_m"):
        _core._evolve_dynamic(trap, {"Ar": 1.0}, [1e-3], drift_tube_radius_m=1e-6)
    with pytest.raises(cc.InvalidParameterError, match="keys are"):
        _core._evolve_dynamic(trap, {"Ar": 1.0}, [1e-3], dynamics={"cooling": True})
    with pytest.raises(cc.UnknownGasError):
        _core._evolve_dynamic(trap, {"Ar": 1.0}, [1e-3], gas_feed_pa={"Zz9": 1e-8})
