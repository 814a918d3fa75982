"""Plasma source and its Maxwellian rate coefficients; external checks name their source."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import constants as C
from scipy.integrate import quad
from scipy.linalg import expm

import chargecast as cc

RY_EV = C.physical_constants["Rydberg constant times hc in eV"][0]


def kim_pratt_cm2(z_eff: float, n_eff: float, e_ev: float) -> float:
    # Kim & Pratt (1983) as written in physics notes: (8π/3√3)αƛ_e² χ ln(1 + χ/(2n²)).
    lam = C.hbar / (C.m_e * C.c) * 100.0
    chi = 2.0 * z_eff**2 * RY_EV / e_ev
    return 8 * np.pi / (3 * np.sqrt(3)) * C.alpha * lam**2 * chi * np.log1p(chi / (2 * n_eff**2))


@pytest.mark.parametrize("kt", [0.1, 0.8617, 10.0, 1000.0])
def test_rr_rate_coefficient_equals_scipy_quadrature(kt: float) -> None:
    # Bare hydrogen (Z_eff = 1, n_eff = 0.7): ⟨σv⟩ by scipy.integrate.quad over a Maxwellian.
    def integrand(e: float) -> float:
        v = np.sqrt(2 * e * C.e / C.m_e) * 100.0
        f = 2 * np.sqrt(e / np.pi) * kt**-1.5 * np.exp(-e / kt)
        return kim_pratt_cm2(1.0, 0.7, e) * v * f

    ref = quad(integrand, 0, 60 * kt, limit=400, points=[kt])[0]
    got = cc.radiative_recombination_rate_coefficient_cm3_s("H", charge=1, temperature_ev=kt)
    assert got == pytest.approx(ref, rel=1e-6)


def test_rr_hydrogen_against_exact_hydrogenic_case_a() -> None:
    # Exact hydrogenic case-A totals, Osterbrock & Ferland 2006 Table 2.1 after Storey &
    # Hummer 1995 (from memory): measured within 2 %; 5 % tolerance for the recalled digits.
    t_k = np.array([5e3, 1e4, 2e4])
    table = np.array([6.82e-13, 4.18e-13, 2.51e-13])
    got = cc.radiative_recombination_rate_coefficient_cm3_s("H", 1, t_k * C.k / C.e)
    np.testing.assert_allclose(got, table, rtol=0.05)


def test_cx_rate_coefficient_is_muller_salzborn_times_mean_speed() -> None:
    # Müller & Salzborn 1977 with I(O2) = 12.0697 eV (NIST WebBook, from memory); v̄ from scipy constants.
    sigma = 1.43e-12 * 8**1.17 * 12.0697**-2.76
    v = np.sqrt(8 * 2.0 * C.e / (np.pi * 39.948 * C.atomic_mass)) * 100.0
    got = cc.charge_exchange_rate_coefficient_cm3_s("Ar", 8, "O2", 2.0)
    assert got == pytest.approx(sigma * v, rel=1e-9)


def source(**kw: object) -> cc.PlasmaSource:
    args: dict[str, object] = dict(
        electron_temperature_ev=1500.0,
        electron_density_cm3=5e11,
        confinement_time_s=1e-3,
        gas_feed_pa={"Ar": 5e-7, "O2": 2e-6},
        residual_gas_pa={"H2": 2e-7},
        hot_electron_temperature_ev=20_000.0,
        hot_electron_fraction=0.1,
        wall_recycling=0.2,
    )
    args.update(kw)
    return cc.PlasmaSource(**args)  # type: ignore[arg-type]


def test_steady_state_is_the_null_vector_of_the_scipy_generator() -> None:
    # The long evolution by scipy.linalg.expm of the same rate matrix (with feed and losses
    # as an augmented state) equals the core's steady state.
    src = source()
    st = src.steady_state("Ar")
    m = src.rates("Ar")
    n = m.shape[0]
    gen = m.T - np.diag(m.sum(axis=1))
    tau = np.concatenate([[src.neutral_residence_time_s], st.confinement_times_s[1:]])
    loss = np.concatenate([[1.0], np.full(n - 1, 1.0 - src.wall_recycling)]) / tau
    gen -= np.diag(loss)
    feed = np.zeros(n)
    feed[0] = st.feed_atoms_per_s / (src.plasma_volume_m3 * 1e6)
    aug = np.zeros((n + 1, n + 1))
    aug[:n, :n] = gen
    aug[:n, n] = feed
    y0 = np.zeros(n + 1)
    y0[n] = 1.0
    y = expm(aug * 5.0) @ y0
    np.testing.assert_allclose(st.densities_cm3, y[:n], rtol=1e-7, atol=1e-9 * st.densities_cm3.sum())


def test_feed_equals_outflow_and_currents_positive() -> None:
    src = source()
    for el, st in src.steady_states().items():
        assert st.outflow_atoms_per_s == pytest.approx(st.feed_atoms_per_s, rel=1e-10), el
        assert (st.currents_eua >= 0).all() and st.currents_eua[0] == 0.0
    lines = src.beam_spectrum()
    assert lines.residual[lines.z == 1].all()
    assert not lines.residual[lines.z == 18].any()


def test_evolution_approaches_the_steady_state() -> None:
    src = source()
    evo = src.evolve("Ar", np.array([0.0, 1e-3, 5.0]))
    assert evo.fractions[0, 0] == 1.0
    np.testing.assert_allclose(evo.fractions[-1], src.steady_state("Ar").fractions, atol=1e-9)


def test_errors_name_the_parameter() -> None:
    with pytest.raises(cc.InvalidParameterError, match="hot_electron_fraction"):
        source(hot_electron_fraction=2.0)
    with pytest.raises(cc.UnknownGasError):
        source(gas_feed_pa={"Zz": 1e-6})
    with pytest.raises(cc.InvalidParameterError, match="confinement_time_s"):
        source(confinement_time_s=np.full(8, 1e-3))
    with pytest.raises(cc.InvalidParameterError, match="element"):
        source().steady_state("Kr")
    with pytest.raises(cc.InvalidParameterError, match="charge"):
        cc.radiative_recombination_rate_coefficient_cm3_s("H", 0, 1.0)


def test_to_pandas_and_repr() -> None:
    pytest.importorskip("pandas")
    st = source().steady_state("Ar")
    df = st.to_pandas()
    assert list(df.columns) == ["density_cm3", "fraction", "current_eua", "confinement_time_s"]
    assert "eµA" in repr(st)


def test_overfed_source_warns_about_quasi_neutrality() -> None:
    with pytest.warns(cc.ChargecastWarning, match="quasi-neutral"):
        source(gas_feed_pa={"Ar": 1e-4}).steady_states()
