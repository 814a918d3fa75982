"""Property tests: random strings, numbers and arrays into the public API never crash the
interpreter and never raise anything but the documented exception classes."""

from __future__ import annotations

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import chargecast as cc

ANY_SCALAR = st.one_of(
    st.text(max_size=12),
    st.integers(min_value=-(2**70), max_value=2**70),
    st.floats(allow_nan=True, allow_infinity=True),
    st.none(),
    st.booleans(),
)
ELEMENTS = st.one_of(st.sampled_from(["Ar", "kr", "Xenon", "U", "H", "Og", "Ds", 1, 92, 118]), ANY_SCALAR)
CHARGES = st.one_of(st.integers(min_value=-5, max_value=120), ANY_SCALAR)
ENERGIES = st.one_of(
    ANY_SCALAR,
    st.lists(st.floats(allow_nan=True, allow_infinity=True), max_size=5),
    st.floats(min_value=1.0, max_value=1e6),
)
ALLOWED = (cc.ChargecastError,)
FAST = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _call(f, *args, **kwargs):
    try:
        f(*args, **kwargs)
    except ALLOWED:
        pass


@FAST
@given(ELEMENTS)
def test_element_lookup(value) -> None:
    _call(cc.element, value)


@FAST
@given(ELEMENTS, CHARGES)
def test_ion(value, charge) -> None:
    def f():
        el = cc.element(value)
        ion = el.ion(charge)
        ion.subshells()
        el.configuration(charge)

    _call(f)


@FAST
@given(ELEMENTS, CHARGES, ENERGIES)
def test_lotz(value, charge, energy) -> None:
    _call(cc.lotz_cross_section_cm2, value, charge, energy)
    _call(cc.lotz_rate_coefficient_cm3_s, value, charge, energy)
    _call(cc.lotz_peak_energy_ev, value, charge)
    _call(cc.j_tau_c_cm2, value, charge, energy)


@FAST
@given(ELEMENTS, CHARGES, ENERGIES, ANY_SCALAR)
def test_breeding(value, charge, energy, density) -> None:
    _call(cc.breeding_time_s, value, charge, energies_ev=energy, current_density_a_cm2=density)
    _call(cc.breeding_ladder, value, charge, energy, density)


@FAST
@given(ANY_SCALAR, ANY_SCALAR, ANY_SCALAR, ANY_SCALAR)
def test_electron_beam(energy, current, radius, field) -> None:
    _call(cc.ElectronBeam, energy, current, radius_m=radius)
    _call(cc.ElectronBeam, energy, current, magnetic_field_t=field)
    _call(cc.ElectronBeam, energy, current, current_density_a_cm2=radius)
    _call(cc.brillouin_radius_m, current, energy, field)
    _call(cc.effective_energy_ev, energy, current, radius, field)


@FAST
@given(
    st.dictionaries(
        st.one_of(st.sampled_from(["H2", "N2", "XX"]), st.text(max_size=4)), ANY_SCALAR, max_size=3
    ),
    ANY_SCALAR,
    st.lists(st.floats(allow_nan=True, allow_infinity=True), max_size=4),
)
def test_trap(gas, length, times) -> None:
    beam = cc.ElectronBeam(5000.0, 0.1, radius_m=50e-6)

    def f():
        trap = cc.BeamTrap(beam, length, residual_gas_pa=gas, ion_temperature_ev=30.0)
        trap.evolve("Ne", times)

    _call(f)


@FAST
@given(
    st.integers(min_value=1, max_value=6).flatmap(
        lambda n: st.tuples(
            st.lists(
                st.floats(allow_nan=True, allow_infinity=True, width=64), min_size=n * n, max_size=n * n
            ),
            st.lists(st.floats(min_value=-1, max_value=2), min_size=n, max_size=n),
        )
    ),
    st.lists(st.floats(allow_nan=True, allow_infinity=True), max_size=4),
)
def test_rate_equations(matrix_and_initial, times) -> None:
    flat, initial = matrix_and_initial
    n = len(initial)
    rates = np.array(flat).reshape(n, n)
    _call(cc.solve_rate_equations, rates, initial, times)
    _call(cc.steady_state_rate_equations, rates)


@FAST
@given(CHARGES, CHARGES, st.one_of(st.tuples(CHARGES, ANY_SCALAR), ANY_SCALAR), ELEMENTS)
def test_trap_charges_and_feed(initial, target, feed, element) -> None:
    beam = cc.ElectronBeam(5000.0, 0.1, radius_m=50e-6)
    trap = cc.BeamTrap(beam, 0.5, residual_gas_pa={"H2": 1e-9}, ion_temperature_ev=30.0)
    _call(trap.evolve, element, [0.0, 1e-3], initial_charge=initial)
    _call(trap.best_energy, element, target, [1000.0, 3000.0], [1e-3])
    _call(trap.steady_state, element)
    _call(trap.ions_per_extraction, [initial, target])

    def with_feed():
        cc.BeamTrap(
            beam, 0.5, residual_gas_pa={}, ion_temperature_ev=30.0, feed=feed, loss_per_s=[1.0] * 11
        ).evolve("Ne", [1e-3])

    _call(with_feed)
