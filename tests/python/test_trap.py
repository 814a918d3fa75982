"""The electron-beam trap end to end: physical networks against scipy, planning helpers,
result objects and error messages."""

from __future__ import annotations

import math

import matplotlib
import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.linalg import expm

import chargecast as cc

matplotlib.use("Agg")


def generator(rates: np.ndarray) -> np.ndarray:
    m = rates.T.copy()
    np.fill_diagonal(m, 0.0)
    m -= np.diag(rates.sum(axis=1) - np.diag(rates))
    return m


@pytest.fixture(scope="module")
def trap() -> cc.BeamTrap:
    beam = cc.ElectronBeam(energy_ev=20000.0, current_a=0.5, radius_m=50e-6)
    return cc.BeamTrap(beam, length_m=0.5, residual_gas_pa={"H2": 1e-8, "N2": 1e-9}, ion_temperature_ev=100.0)


@pytest.mark.parametrize("element", ["Ar", "Kr", "Xe", "U"])
def test_physical_networks_match_scipy_expm(trap, element) -> None:
    # Reference: scipy.linalg.expm of the same generator, at every output time.
    times = np.geomspace(1e-5, 3.0, 25)
    m = generator(trap.rates(element))
    y0 = np.zeros(m.shape[0])
    y0[0] = 1.0
    exact = np.array([expm(m * t) @ y0 for t in times])
    ours = trap.evolve(element, times).fractions
    assert np.abs(ours - exact).max() < 1e-8


@pytest.mark.parametrize("element", ["Ar", "Kr", "Xe"])
def test_physical_networks_match_scipy_radau(trap, element) -> None:
    # Reference: scipy.integrate.solve_ivp(method="Radau", rtol=1e-10, atol=1e-14).
    times = np.geomspace(1e-5, 1.0, 15)
    m = generator(trap.rates(element))
    y0 = np.zeros(m.shape[0])
    y0[0] = 1.0
    sol = solve_ivp(
        lambda t, y: m @ y, (0.0, times[-1]), y0, method="Radau", t_eval=times, rtol=1e-10, atol=1e-14, jac=m
    )
    assert np.abs(trap.evolve(element, times).fractions - sol.y.T).max() < 1e-8


def test_steady_state_is_the_long_time_limit(trap) -> None:
    evo = trap.evolve("Ar", [0.0, 1e4])
    np.testing.assert_allclose(evo.fractions[-1], trap.steady_state("Ar"), atol=1e-10)


def test_fractions_conserve_their_sum_and_stay_non_negative(trap) -> None:
    f = trap.evolve("Xe", np.geomspace(1e-6, 10.0, 200)).fractions
    assert np.abs(f.sum(axis=1) - 1.0).max() < 1e-12
    assert f.min() >= 0.0


def test_ionization_only_matches_the_bateman_closed_form() -> None:
    # H. Bateman, Proc. Cambridge Philos. Soc. 15, 423 (1910): populations of a decay chain.
    beam = cc.ElectronBeam(energy_ev=3000.0, current_a=0.1, radius_m=60e-6)
    trap = cc.BeamTrap(beam, 0.3, residual_gas_pa={}, ion_temperature_ev=10.0, processes=("ionization",))
    lam = np.array([trap.rates("C")[q, q + 1] for q in range(6)])
    t = 2e-4
    ours = trap.evolve("C", [t]).fractions[0]
    for n in range(6):
        coef = np.prod(lam[:n])
        s = sum(
            math.exp(-lam[i] * t) / np.prod([lam[j] - lam[i] for j in range(n + 1) if j != i])
            for i in range(n + 1)
        )
        assert ours[n] == pytest.approx(coef * s, rel=1e-8, abs=1e-14)


def test_breeding_time_matches_the_mean_arrival_time() -> None:
    # With ionization alone the mean time to arrive in q is Σ 1/λ_i (sum of exponential waits):
    # the stepwise breeding time (sources::breeding).
    beam = cc.ElectronBeam(energy_ev=5000.0, current_a=0.2, radius_m=60e-6)
    trap = cc.BeamTrap(beam, 0.3, residual_gas_pa={}, ion_temperature_ev=10.0, processes=("ionization",))
    lam = np.array([trap.rates("Ne")[q, q + 1] for q in range(8)])
    assert cc.breeding_time_s("Ne", 8, beam) == pytest.approx(np.sum(1 / lam), rel=1e-12)


def test_best_energy_is_the_maximum_of_direct_runs(trap) -> None:
    energies = np.array([3000.0, 6000.0, 12000.0])
    times = np.geomspace(1e-3, 1.0, 30)
    scan = trap.best_energy("Ar", 16, energies, times)
    direct = np.array(
        [
            cc.BeamTrap(
                cc.ElectronBeam(e, 0.5, current_density_a_cm2=trap.beam.current_density_a_cm2),
                0.5,
                residual_gas_pa={"H2": 1e-8, "N2": 1e-9},
                ion_temperature_ev=100.0,
            )
            .evolve("Ar", times)
            .fractions[:, 16]
            for e in energies
        ]
    )
    np.testing.assert_allclose(scan.fraction, direct, atol=1e-12)
    assert scan.best_fraction == pytest.approx(direct.max())
    assert scan.best_energy_ev == energies[np.unravel_index(direct.argmax(), direct.shape)[0]]


def test_ions_per_extraction_share_the_compensated_charge(trap) -> None:
    # N_q = f·N_e·F_q/Σ q F_q with N_e = I L/(e v): checked against scipy.constants.
    from scipy.constants import c, e, m_e

    fr = trap.evolve("Kr", [0.1]).fractions[0]
    n = trap.ions_per_extraction(fr)
    gamma = 1 + 20000.0 / (m_e * c**2 / e)
    v = c * math.sqrt(1 - 1 / gamma**2)
    n_e = 0.5 * 0.5 / (e * v)
    assert trap.electrons_in_trap == pytest.approx(n_e, rel=1e-6)
    assert float(np.dot(np.arange(len(n)), n)) == pytest.approx(0.5 * n_e, rel=1e-9)


def test_sweep_matches_single_runs(trap) -> None:
    times = np.geomspace(1e-4, 1.0, 20)
    out = trap.sweep(["Ne", "Ar"], [2000.0, 8000.0], times)

    def fractions(symbol: str) -> np.ndarray:
        # A labelled sweep: an xarray Dataset, or a MultiIndex DataFrame without xarray.
        if hasattr(out, "data_vars"):
            return out["fraction"].sel(element=symbol).dropna("charge").values
        frame = out.xs(symbol, level="element")["fraction"]
        return frame.to_numpy().reshape(2, 20, -1)

    assert fractions("Ar").shape == (2, 20, 19)
    single = (
        cc.BeamTrap(
            cc.ElectronBeam(8000.0, 0.5, current_density_a_cm2=trap.beam.current_density_a_cm2),
            0.5,
            residual_gas_pa={"H2": 1e-8, "N2": 1e-9},
            ion_temperature_ev=100.0,
        )
        .evolve("Ne", times)
        .fractions
    )
    np.testing.assert_allclose(fractions("Ne")[1], single, atol=1e-14)


def test_brillouin_radius_follows_the_engineering_rule() -> None:
    # Common practice: r_B[µm] ≈ 150/B[T]·sqrt(I[A]/sqrt(E[keV])), within 3 % at 1–10 keV.
    for e_kev in (1.0, 3.0, 10.0):
        rule = 150e-6 / 2.0 * math.sqrt(0.5 / math.sqrt(e_kev))
        assert cc.brillouin_radius_m(0.5, e_kev * 1000, 2.0) == pytest.approx(rule, rel=0.03)


def test_evolution_helpers(trap) -> None:
    evo = trap.evolve("Ar", np.geomspace(1e-4, 1.0, 40))
    t, f = evo.peak(16)
    assert evo.fractions[:, 16].max() == f
    np.testing.assert_allclose(evo.at(evo.times_s[7]), evo.fractions[7])
    assert evo.mean_charge()[-1] > evo.mean_charge()[0]
    df = evo.to_pandas()
    assert df.shape == (40, 19) and df.index.name == "time_s"
    ax = evo.plot()
    assert ax.get_xscale() == "log" and "s" in ax.get_xlabel()
    assert "<table>" in evo._repr_html_()
    with pytest.raises(cc.ChargeOutOfRangeError):
        evo.peak(19)
    with pytest.raises(cc.InvalidParameterError):
        evo.at(5.0)


@pytest.mark.parametrize(
    ("kwargs", "error", "message"),
    [
        ({"residual_gas_pa": {"H2": -1e-9}}, cc.InvalidParameterError, "finite number >= 0"),
        ({"residual_gas_pa": {"Unobtainium": 1e-9}}, cc.UnknownGasError, "allowed"),
        ({"length_m": 0.0}, cc.InvalidParameterError, "length_m"),
        ({"ion_temperature_ev": float("nan")}, cc.InvalidParameterError, "ion_temperature_ev"),
        ({"compensation": 1.5}, cc.InvalidParameterError, "compensation"),
    ],
)
def test_bad_trap_settings_say_what_is_allowed(kwargs, error, message) -> None:
    beam = cc.ElectronBeam(5000.0, 0.1, radius_m=50e-6)
    args = {"length_m": 0.5, "residual_gas_pa": {"H2": 1e-9}, "ion_temperature_ev": 50.0} | kwargs
    with pytest.raises(error, match=message):
        cc.BeamTrap(beam, **args)


def test_bad_beams_and_times() -> None:
    with pytest.raises(cc.InvalidParameterError, match="current_a"):
        cc.ElectronBeam(5000.0, 0.0, radius_m=50e-6)
    with pytest.raises(cc.InvalidParameterError, match="exactly one"):
        cc.ElectronBeam(5000.0, 0.1, radius_m=50e-6, magnetic_field_t=2.0)
    trap = cc.BeamTrap(
        cc.ElectronBeam(5000.0, 0.1, radius_m=50e-6), 0.5, residual_gas_pa={}, ion_temperature_ev=50.0
    )
    with pytest.raises(cc.InvalidParameterError, match="ascending"):
        trap.evolve("Ar", [0.1, 0.01])
    with pytest.raises(cc.InvalidParameterError, match=">= 0"):
        trap.evolve("Ar", [-1.0])
    with pytest.raises(cc.NoDataError):
        trap.evolve("Ds", [0.1])


def test_a_photon_beam_through_the_trap_adds_its_rates() -> None:
    # The combined network is the sum of the trap's and the photon beam's rate matrices.
    beam = cc.ElectronBeam(3000.0, 0.2, radius_m=60e-6)
    photons = cc.PhotonBeam(1500.0, 1e22)
    plain = cc.BeamTrap(beam, 0.5, residual_gas_pa={"H2": 1e-9}, ion_temperature_ev=50.0)
    crossed = cc.BeamTrap(
        beam, 0.5, residual_gas_pa={"H2": 1e-9}, ion_temperature_ev=50.0, photon_beam=photons
    )
    np.testing.assert_allclose(crossed.rates("Ne"), plain.rates("Ne") + photons.rates("Ne"), rtol=1e-12)
    # Photons add ionization on top of the electron beam's against the same recombination
    # and charge exchange, so the equilibrium bare fraction grows.
    assert crossed.steady_state("Ne")[10] > plain.steady_state("Ne")[10]
    with pytest.raises(cc.InvalidParameterError, match="PhotonBeam"):
        cc.BeamTrap(beam, 0.5, residual_gas_pa={}, ion_temperature_ev=50.0, photon_beam="bright")


def test_multiple_ionization_network_matches_scipy_expm() -> None:
    # Auger cascades make jumps q -> q+1+k; the solver's band path against scipy.linalg.expm.
    beam = cc.ElectronBeam(energy_ev=20000.0, current_a=0.5, radius_m=50e-6)
    processes = ("ionization", "radiative_recombination", "charge_exchange", "multiple_ionization")
    trap = cc.BeamTrap(beam, 0.5, residual_gas_pa={"H2": 1e-8}, ion_temperature_ev=100.0, processes=processes)
    rates = trap.rates("Kr")
    assert np.count_nonzero(np.triu(rates, 3)) > 0  # jumps of three and more charges exist
    times = np.geomspace(1e-5, 1.0, 12)
    m = generator(rates)
    y0 = np.zeros(m.shape[0])
    y0[0] = 1.0
    exact = np.array([expm(m * t) @ y0 for t in times])
    assert np.abs(trap.evolve("Kr", times).fractions - exact).max() < 1e-8


def test_multiple_ionization_keeps_the_lotz_total_and_adds_double() -> None:
    # Sum over final charges of the cascade-resolved rates = single-ionization Lotz rate
    # (each subshell ionized once) + direct double ionization (processes::vacancy_jumps).
    beam = cc.ElectronBeam(energy_ev=5000.0, current_a=0.2, radius_m=60e-6)
    single = cc.BeamTrap(
        beam, 0.5, residual_gas_pa={}, ion_temperature_ev=50.0, processes=("ionization",)
    ).rates("Ar")
    multi = cc.BeamTrap(
        beam,
        0.5,
        residual_gas_pa={},
        ion_temperature_ev=50.0,
        processes=("ionization", "multiple_ionization"),
    ).rates("Ar")
    out_single = np.triu(single, 1).sum(axis=1)
    out_multi = np.triu(multi, 1).sum(axis=1)
    assert np.all(out_multi >= out_single * (1 - 1e-12))
    assert np.all(out_multi[:16] <= out_single[:16] * 1.2)  # double ionization is a small addition


def test_evolve_batch_matches_single_runs_and_checks_its_cases() -> None:
    beam_a = cc.ElectronBeam(4000.0, 0.1, radius_m=60e-6)
    beam_b = cc.ElectronBeam(9000.0, 0.3, radius_m=40e-6)
    traps = [
        cc.BeamTrap(beam_a, 0.4, residual_gas_pa={"H2": 1e-9}),
        cc.BeamTrap(beam_b, 0.6, residual_gas_pa={"N2": 5e-10}, ion_temperature_ev=80.0),
    ]
    times = np.geomspace(1e-4, 1.0, 25)
    evos = cc.evolve_batch([(traps[0], "Ne"), (traps[1], "Kr")], times)
    np.testing.assert_array_equal(evos[0].fractions, traps[0].evolve("Ne", times).fractions)
    np.testing.assert_array_equal(evos[1].fractions, traps[1].evolve("Kr", times).fractions)
    with pytest.raises(cc.InvalidParameterError, match="tuple"):
        cc.evolve_batch([traps[0]], times)
    with pytest.raises(cc.UnknownElementError):
        cc.evolve_batch([(traps[0], "Xx")], times)
