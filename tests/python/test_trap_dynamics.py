"""The beam trap's ion-dynamics model, checked from Python: beam heating against the
Spitzer/NRL expression written out independently with scipy.constants, the nonlinear solve
against scipy's Radau on the exported right-hand side, the steady state against a long
evolution, the fixed-model limit, the published qualitative behaviour, and clear errors."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as sc
from scipy.integrate import solve_ivp

import chargecast as cc
from chargecast import _core


def _beam() -> cc.ElectronBeam:
    return cc.ElectronBeam(3000.0, 0.1, current_density_a_cm2=300.0)


def _trap(residual: float = 1e-8, **dynamic) -> cc.BeamTrap:
    return cc.BeamTrap(
        _beam(),
        length_m=0.5,
        residual_gas_pa={"H2": residual},
        ion_temperature_ev=1.0,
        model="dynamic",
        **dynamic,
    )


def test_beam_heating_matches_the_spitzer_expression():
    # dE/dt = 4π n_e (q e²/4πε₀)² lnΛ/(m_i v_e) (L. Spitzer 1962; NRL Plasma Formulary),
    # written out here with scipy.constants; lnΛ from the NRL electron–ion form with the
    # beam energy for T_e. Read off as the difference of the model's dU/dt with heating on
    # and off (the other terms, ionization carrying U up, are the same in both).
    system = _core._dynamic_system(_trap(0.0, dynamic_processes=["heating"]), {"Ar": 1.0})
    cold = _core._dynamic_system(_trap(0.0, dynamic_processes=[]), {"Ar": 1.0})
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
    times = np.geomspace(1e-5, 1.0, 30)
    run = _trap(dynamic_processes=[]).evolve({"Ar": 1e6}, times, rtol=1e-12)
    fixed = cc.BeamTrap(_beam(), length_m=0.5, residual_gas_pa={"H2": 1e-8}, ion_temperature_ev=1.0)
    evo = fixed.evolve("Ar", times)
    assert np.max(np.abs(run.fractions("Ar") - evo.fractions)) < 1e-9
    # Each result names its model; the fixed model stays the default.
    assert fixed.model == "fixed" and "fixed model" in evo.label
    assert run.model == "dynamic" and isinstance(run, cc.DynamicRun)


def test_the_solve_matches_scipy_radau_on_the_exported_rhs():
    # scipy.integrate.solve_ivp(method="Radau", rtol=1e-10) on the right-hand side exported
    # from the core, every process on, argon with a nitrogen coolant fed in. The exported
    # rhs is defined for any state (negative trial values count as empty populations), so
    # Radau's trial stages stay finite; the core's absolute tolerances are passed as atol.
    trap = _trap(gas_feed_pa={"N2": 1e-8}, axial_barrier_v=200.0)
    loads = {"Ar": 1e7}
    system = _core._dynamic_system(trap, loads)
    y0 = np.array(system.initial_state)
    times = np.array([1e-4, 1e-3, 1e-2])
    ref = solve_ivp(
        lambda _t, y: system.rhs(y),
        (0.0, times[-1]),
        y0,
        method="Radau",
        rtol=1e-10,
        atol=system.atol(1e-10),
        jac=lambda _t, y: system.jacobian(y),
        t_eval=times,
    )
    assert ref.success and np.all(np.isfinite(ref.y))
    run = trap.evolve(loads, times, rtol=1e-10)
    for k, name in enumerate(run.species):
        ours = run.ions(name)
        theirs = np.clip(np.array([system.populations(ref.y[:, i], k) for i in range(len(times))]), 0, None)
        total = max(theirs.sum(axis=1).max(), 1.0)
        assert np.max(np.abs(ours - theirs)) / total < 1e-6, name


def test_steady_state_equals_a_long_evolution():
    trap = _trap(gas_feed_pa={"Ne": 1e-9}, axial_barrier_v=50.0)
    steady = trap.steady_state({})
    assert steady.steady_method == "newton" and np.isinf(steady.times_s[0])
    long = trap.evolve({}, [3e3])
    ours, theirs = steady.ions("Ne")[0], long.ions("Ne")[0]
    assert np.max(np.abs(ours - theirs)) / theirs.sum() < 1e-6
    t_ours, t_theirs = steady.temperatures_ev("Ne")[0], long.temperatures_ev("Ne")[0]
    resolved = theirs > 1e-6 * theirs.sum()
    assert np.allclose(t_ours[resolved], t_theirs[resolved], rtol=1e-6)
    # At the steady state the feed balances the escape (the bookkeeping holds rates).
    assert steady.particle_balance < 1e-6 and steady.fed[0] > 0


def test_bookkeeping_balances():
    run = _trap(gas_feed_pa={"N2": 1e-8}).evolve({"Ar": 1e7}, np.geomspace(1e-4, 0.1, 20))
    assert run.particle_balance < 1e-9
    assert run.energy_balance < 1e-6
    last = -1
    total = run.initial_particles + run.fed[last] - run.escaped[last]
    assert run.trapped[last] == pytest.approx(total, rel=1e-9)


def test_light_ions_leave_first():
    # Penetrante et al., Phys. Rev. A 43, 4861 (1991): light, low-charged ions escape first.
    run = _trap(axial_barrier_v=100.0).evolve({"Ar": 1e7, "Ne": 1e7}, [0.05])
    left = {name: run.ions(name)[0, 1:].sum() for name in ("Ar", "Ne")}
    assert left["Ne"] < left["Ar"]


def test_a_light_coolant_raises_high_charge_states_and_cools():
    # Penetrante et al. (1991); Levine et al. (1988): nitrogen fed in as a light coolant
    # takes heat from the heavy ions and escapes with it; the heavy ions stay colder, closer
    # to the beam axis, and ionize further. Argon here (krypton behaves alike, slower to run).
    beam = cc.ElectronBeam(6000.0, 0.2, current_density_a_cm2=400.0)

    def run(feed):
        trap = cc.BeamTrap(
            beam, length_m=0.6, residual_gas_pa={"H2": 1e-9}, model="dynamic", axial_barrier_v=300.0, **feed
        )
        return trap.evolve({"Ar": 1e8}, [0.1, 0.5])

    hot, cooled = run({}), run({"gas_feed_pa": {"N2": 1e-8}})
    assert cooled.fractions("Ar")[-1, 17:].sum() > hot.fractions("Ar")[-1, 17:].sum()
    assert np.all(cooled.temperatures_ev("Ar")[-1, 16:] < 0.5 * hot.temperatures_ev("Ar")[-1, 16:])


def test_a_deeper_barrier_holds_ions_longer():
    # Penetrante et al. (1991); M. A. Levine et al., Physica Scripta T22, 157 (1988).
    held = [
        _trap(axial_barrier_v=v).evolve({"Ar": 1e7}, [0.05]).ions("Ar")[0, 1:].sum() for v in (20.0, 200.0)
    ]
    assert held[1] > held[0]


def test_no_coolant_no_coolant_ions():
    run = _trap(0.0).evolve({"Ar": 1e7}, [1e-3])
    assert run.species == ["Ar"]
    # The residual H2 is a source of hydrogen ions by default, a charge-exchange target only
    # without "residual_gas_ions".
    assert _trap().evolve({"Ar": 1e7}, [1e-3]).species == ["Ar", "H"]
    only_cx = ["overlap", "heating", "exchange", "escape", "space_charge"]
    assert _trap(dynamic_processes=only_cx).evolve({"Ar": 1e7}, [1e-3]).species == ["Ar"]
    with pytest.raises(cc.InvalidParameterError, match="the run holds Ar"):
        run.ions("N")
    fed = _trap(0.0, gas_feed_pa={"N2": 1e-8}).evolve({"Ar": 1e7}, [1e-3])
    assert fed.species == ["Ar", "N"] and fed.ions("N")[0].sum() > 0


def test_an_element_name_alone_works_for_both_models():
    dynamic = _trap()
    run = dynamic.evolve("Ar", [1e-3])
    assert run.initial_particles == pytest.approx(1e-3 * dynamic.electrons_in_trap)
    fixed = cc.BeamTrap(_beam(), length_m=0.5)
    assert fixed.evolve({"Ar": 5.0}, [1e-3]).fractions == pytest.approx(fixed.evolve("Ar", [1e-3]).fractions)


def test_result_views():
    pytest.importorskip("pandas")
    run = _trap().evolve({"Ar": 1e7}, [1e-4, 1e-3])
    frame = run.to_pandas()
    # Two times × (Ar 0…18 and H 0…1 from the residual H2).
    assert len(frame) == 2 * (19 + 2) and frame.attrs["model"] == "dynamic"
    assert "model='dynamic'" in repr(run)
    assert run.compensation.shape == run.well_depth_v.shape == (2,)
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    axes = run.plot("Ar")
    assert len(axes) == 2


def test_bad_dynamics_settings_are_clear_errors():
    with pytest.raises(cc.InvalidParameterError, match="drift_tube_radius_m"):
        _trap(drift_tube_radius_m=1e-6)
    with pytest.raises(cc.InvalidParameterError, match="each must be one of"):
        _trap(dynamic_processes=["cooling"])
    with pytest.raises(cc.UnknownGasError):
        _trap(gas_feed_pa={"Zz9": 1e-8})
    with pytest.raises(cc.InvalidParameterError, match='model="dynamic"'):
        cc.BeamTrap(_beam(), length_m=0.5, axial_barrier_v=100.0)
    with pytest.raises(cc.InvalidParameterError, match="must be one of"):
        cc.BeamTrap(_beam(), length_m=0.5, model="hot")
    with pytest.raises(cc.InvalidParameterError, match="fixed model"):
        _trap().best_energy("Ar", 16, [3000.0], [1e-3])
    with pytest.raises(cc.InvalidParameterError, match="rtol"):
        _trap().evolve("Ar", [1e-3], rtol=1.0)
