"""Every input gets a right answer or a clear error: regression tests of the input rules
(types, shapes, ranges) and of results that used to come back as inf, NaN or negatives."""

from __future__ import annotations

import math

import numpy as np
import pytest

import chargecast as cc
from chargecast import InvalidParameterError


@pytest.fixture(scope="module")
def trap() -> cc.BeamTrap:
    beam = cc.ElectronBeam(8000.0, 0.3, radius_m=70e-6)
    return cc.BeamTrap(beam, 0.6, residual_gas_pa={"H2": 5e-9})


# --- types -----------------------------------------------------------------------------


def test_numpy_scalars_are_numbers() -> None:
    assert cc.element(np.int64(18)).symbol == "Ar"
    assert cc.element(np.int32(8)).symbol == "O"
    e = np.array([100.0, 1000.0])
    plain = cc.lotz_cross_section_cm2("Ar", 8, e)
    assert np.array_equal(cc.lotz_cross_section_cm2("Ar", np.int64(8), e), plain)
    beam = cc.ElectronBeam(np.float32(8000.0), np.float64(0.3), radius_m=np.float32(70e-6))
    assert beam.energy_ev == 8000.0


@pytest.mark.parametrize("bad", [True, np.bool_(True), "x", 1 + 2j, np.complex128(1.0), [1.0]])
def test_bad_scalar_is_a_type_error_naming_the_parameter(bad: object) -> None:
    with pytest.raises(TypeError, match="'?a'? = .*must be a real number"):
        cc.lotz_cross_section_cm2("Ar", 8, [1000.0], a=bad)


def test_bool_charge_is_not_a_number() -> None:
    with pytest.raises(TypeError, match="charge"):
        cc.lotz_cross_section_cm2("Ar", True, [1000.0])


def test_huge_integer_is_an_invalid_parameter_not_overflow() -> None:
    with pytest.raises(InvalidParameterError, match="invalid a"):
        cc.lotz_cross_section_cm2("Ar", 8, [1000.0], a=10**400)
    with pytest.raises(InvalidParameterError, match="charge"):
        cc.lotz_cross_section_cm2("Ar", 10**30, [1000.0])
    with pytest.raises(InvalidParameterError, match="energy_ev"):
        cc.ElectronBeam(10**400, 0.3, radius_m=1e-4)


@pytest.mark.parametrize(
    "bad",
    [np.array([1.0 + 1j, 2.0]), np.array([1.0, None], dtype=object), ["a", "b"], [True]],
)
def test_non_real_arrays_are_type_errors(bad: object) -> None:
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no numpy ComplexWarning cast on the way
        with pytest.raises(TypeError, match="energies_ev"):
            cc.lotz_cross_section_cm2("Ar", 8, bad)


def test_keyword_defaults_follow_the_same_rules() -> None:
    with pytest.raises(TypeError, match="energy_spread_ev"):
        cc.appearance_curves("Kr", [100.0], energy_spread_ev="wide")
    with pytest.raises(TypeError, match="bandwidth_ev"):
        cc.PhotonBeam(100.0, 1e20, bandwidth_ev=True)
    beam = cc.ElectronBeam(8000.0, 0.3, radius_m=70e-6)
    with pytest.raises(TypeError, match="compensation"):
        cc.BeamTrap(beam, 0.6, compensation=0.5j)


# --- grids and charges -------------------------------------------------------------------


def test_empty_time_grid_is_refused(trap: cc.BeamTrap) -> None:
    with pytest.raises(InvalidParameterError, match="times_s"):
        trap.evolve("Ar", np.array([]))
    with pytest.raises(InvalidParameterError, match="times_s"):
        cc.Evolution("Ar", [], np.zeros((0, 19)))


def test_empty_sweep_axes_are_refused(trap: cc.BeamTrap) -> None:
    # Found by the long fuzz run (seed 21): an empty element list ended in a bare ValueError.
    with pytest.raises(InvalidParameterError, match="elements"):
        trap.sweep([], [1000.0], [1e-3])
    with pytest.raises(InvalidParameterError, match="energies_ev"):
        trap.sweep(["Ar"], [], [1e-3])


def test_duplicate_target_charges_are_refused(trap: cc.BeamTrap) -> None:
    e, t = np.linspace(2000.0, 8000.0, 4), np.geomspace(1e-3, 1.0, 10)
    single = trap.best_energy("Ar", [16], e, t)
    assert single.best_fraction <= 1.0
    with pytest.raises(InvalidParameterError, match="more than once"):
        trap.best_energy("Ar", [16, 16], e, t)


# --- bad outputs -------------------------------------------------------------------------


@pytest.mark.parametrize("bad", [-0.5, math.nan, math.inf, 1.5])
def test_ions_per_extraction_refuses_non_fractions(trap: cc.BeamTrap, bad: float) -> None:
    with pytest.raises(InvalidParameterError, match="fraction"):
        trap.ions_per_extraction([0.5, bad, 1.0])


def test_subnormal_beam_inputs_are_refused() -> None:
    with pytest.raises(InvalidParameterError, match="current_density_a_cm2"):
        cc.ElectronBeam(8000.0, 0.3, radius_m=5e-324)
    with pytest.raises(InvalidParameterError, match="radius_m"):
        cc.ElectronBeam(8000.0, 0.3, current_density_a_cm2=5e-324)
    with pytest.raises(InvalidParameterError, match="brillouin_radius_m"):
        cc.brillouin_radius_m(5e-324, 8000.0, 1.0)
    with pytest.raises(InvalidParameterError, match="effective_energy_ev"):
        cc.effective_energy_ev(5e-324, 0.0, 1e-4, 1e-3)


def test_wide_drift_tube_gives_a_finite_depression() -> None:
    beam = cc.ElectronBeam(8000.0, 0.3, radius_m=70e-6)
    v = beam.space_charge_depression_v(1e308)
    # 1 + 2 ln(b/a) with ln b − ln a; checked against numpy's logs.
    ratio = (1.0 + 2.0 * (np.log(1e308) - np.log(70e-6))) / (1.0 + 2.0 * (np.log(5e-3) - np.log(70e-6)))
    assert math.isfinite(v)
    assert v == pytest.approx(beam.space_charge_depression_v(5e-3) * ratio, rel=1e-12)


def test_cold_cathode_is_refused() -> None:
    with pytest.raises(InvalidParameterError, match="cathode_temperature_k"):
        cc.herrmann_radius_m(0.5, 1e4, 1.0, 1e-3, 0.0)


def test_lotz_rate_has_its_limits_at_extreme_temperatures() -> None:
    k = cc.lotz_rate_coefficient_cm3_s("Ar", 8, np.array([1e-300, 5e-324, 1e308, 1.7e308]))
    assert np.all(np.isfinite(k))
    assert k[0] == 0.0 and k[1] == 0.0
    assert 0.0 < k[3] < k[2]


def test_photon_thresholds_far_above_every_edge_is_a_clear_error() -> None:
    with pytest.raises(InvalidParameterError, match="photon_energy_ev"):
        cc.photon_thresholds("Ar", 1.8e308)


def test_evolution_on_a_single_time_answers_every_method(trap: cc.BeamTrap) -> None:
    import matplotlib

    matplotlib.use("Agg")
    evo = trap.evolve("Ar", np.array([0.0]))
    assert evo.mean_charge()[0] == 0.0
    assert evo.dominant_charges(0.5) == [0]
    repr(evo)
    evo.summary()
    assert evo.peak(0) == (0.0, 1.0)
    assert evo.at(0.0)[0] == 1.0
    evo.plot()


def test_sequence_arguments_name_the_parameter_and_numpy_scalars_are_one_charge() -> None:
    # Found by the fuzz run (tests/fuzz/run.py, seed 15): bare "not iterable" TypeErrors.
    trap = cc.BeamTrap(cc.ElectronBeam(8000.0, 0.1, current_density_a_cm2=300.0), 0.6)
    scan = trap.best_energy("Ar", np.int64(16), [8000.0, 9000.0], [0.1, 1.0])
    assert 0.0 < scan.best_fraction <= 1.0
    with pytest.raises(cc.ArgumentTypeError, match="cases"):
        cc.evolve_batch(None, [1.0])  # type: ignore[arg-type]
    with pytest.raises(cc.ArgumentTypeError, match="elements"):
        cc.photon_selectivity(1.0, 100.0)  # type: ignore[arg-type]
    with pytest.raises(cc.ArgumentTypeError, match="elements"):
        trap.sweep(1.5, "Ar", [1.0])  # type: ignore[arg-type]
    evo = trap.evolve("Ar", [0.1, 1.0])
    with pytest.raises(cc.ArgumentTypeError, match="threshold"):
        evo.summary(threshold=np.array(["a", "b"]))
    with pytest.raises(cc.ArgumentTypeError, match="label"):
        cc.Evolution("Ar", [0.1], np.ones((1, 19)) / 19, label=0.5)  # type: ignore[arg-type]
