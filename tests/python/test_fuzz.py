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


# --- every public callable, through the generator of the long run (tests/fuzz/) --------------
# The long run (python3 tests/fuzz/run.py --calls 1000000) draws the same calls, each in a
# capped worker process; here hypothesis drives the generator with a bounded example count,
# so that the whole file stays within a few minutes.

import random  # noqa: E402
import sys  # noqa: E402
from pathlib import Path  # noqa: E402

import pytest  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "fuzz"))
import calls as fuzz_calls  # noqa: E402

fuzz_calls.QUICK = True

# Derandomized: CI sees the same calls every run; the long run explores.
EVERY = settings(max_examples=150, deadline=None, derandomize=True, suppress_health_check=list(HealthCheck))


def assert_answer_or_documented(call: object, outcome: str, detail: str) -> None:
    assert outcome in ("ok", "documented"), f"{outcome}: {detail} <- {call!r}"


def test_every_public_callable_is_covered() -> None:
    names = fuzz_calls.public_callables()
    assert "BeamTrap" in names and "load_scenario" in names and "solve_rate_equations" in names
    assert len(names) > 40


@pytest.mark.parametrize("name", fuzz_calls.public_callables())
@EVERY
@given(st.randoms(use_true_random=False))
def test_public_callable_gives_an_answer_or_a_documented_error(name: str, rng: random.Random) -> None:
    call = fuzz_calls.make_call(rng, name)
    outcome, detail = fuzz_calls.judge(call)
    assert_answer_or_documented(call, outcome, detail)


@EVERY
@given(st.randoms(use_true_random=False))
def test_methods_of_results_give_an_answer_or_a_documented_error(rng: random.Random) -> None:
    for _ in range(4):
        call = fuzz_calls.make_call(rng)
        outcome, detail = fuzz_calls.judge(call)
        assert_answer_or_documented(call, outcome, detail)


def test_judge_catches_what_it_must() -> None:
    def raises_index_error(x: int) -> None:
        raise IndexError("x")

    def returns_nan_fractions(x: int) -> dict[str, object]:
        return {"fractions": np.array([0.5, np.nan])}

    def bare_type_error(x: int) -> None:
        raise TypeError("must be real number, not str")

    assert fuzz_calls.judge(fuzz_calls.Call("f", raises_index_error, [1], {}, ["x"]))[0] == "undocumented"
    assert fuzz_calls.judge(fuzz_calls.Call("f", returns_nan_fractions, [1], {}, ["x"]))[0] == "bad"
    assert (
        fuzz_calls.judge(fuzz_calls.Call("f", bare_type_error, [1], {}, ["energy_ev"]))[0] == "undocumented"
    )

    def interrupted(x: int) -> None:
        raise KeyboardInterrupt

    assert fuzz_calls.judge(fuzz_calls.Call("f", interrupted, [1], {}, ["x"]))[0] == "undocumented"
    assert fuzz_calls.judge(fuzz_calls.Call("f", cc.element, ["Qq"], {}, ["value"]))[0] == "documented"


def test_three_thousand_mutated_scenarios_parse_or_give_a_scenario_error() -> None:
    """The 3 000-file scenario mutation run: parse only (each file, a few ms)."""
    rng = random.Random(15)
    texts = [p.read_text("utf-8") for p in cc.bundled_scenarios().values()]
    outcomes = {"parsed": 0, "refused": 0}
    for i in range(3000):
        text = fuzz_calls.mutate_scenario(rng, rng.choice(texts))
        try:
            cc.Scenario.from_text(text, f"mutant{i}.toml")
            outcomes["parsed"] += 1
        except cc.ScenarioError as exc:
            msg = str(exc)
            assert f"mutant{i}.toml" in msg, msg
            assert len(msg) < 1500, msg[:300]  # a long bad value is quoted by a prefix
            outcomes["refused"] += 1
    assert outcomes["parsed"] > 50 and outcomes["refused"] > 500, outcomes
