"""The plasma fit model: free kT_e and n_e·τ recovered from a synthetic extracted-beam
distribution made by a direct PlasmaSource (noise from numpy's seeded generator)."""

from __future__ import annotations

import numpy as np
import pytest

import chargecast as cc

pytest.importorskip("scipy")

TRUTH = {"electron_temperature_ev": 1500.0, "ne_tau_s_cm3": 2e11 * 1e-3}


def source(**kw: float) -> cc.PlasmaSource:
    base = dict(
        electron_temperature_ev=800.0,
        electron_density_cm3=5e10,
        confinement_time_s=1e-3,
        gas_feed_pa={"Ar": 7e-7, "O2": 2.8e-6},
        hot_electron_temperature_ev=2e4,
        hot_electron_fraction=0.1,
    )
    base.update(kw)
    return cc.PlasmaSource(**base)


def test_the_model_returns_the_extracted_beam_of_a_direct_source() -> None:
    truth = source(electron_temperature_ev=1500.0, electron_density_cm3=2e11)
    model = cc.PlasmaFitModel(source(), "Ar")
    f = model.evaluate([TRUTH])[0]
    # n_q/τ_q from the direct source's own densities and confinement times.
    st = truth.steady_state("Ar")
    flux = st.densities_cm3[1:] / st.confinement_times_s[1:]
    np.testing.assert_allclose(f[1:], flux / flux.sum(), rtol=1e-10)
    assert f[0] == 0.0
    with pytest.raises(cc.ChargecastError):
        model.evaluate([{"ne_tau_s_cm3": 1e8, "electron_density_cm3": 1e11}])
    with pytest.raises(cc.ChargecastError):
        cc.PlasmaFitModel(source(), "Kr")


def test_synthetic_data_recover_te_and_ne_tau_within_their_intervals() -> None:
    model = cc.PlasmaFitModel(source(), "Ar")
    clean = model.evaluate([TRUTH])[0]
    charges = [q for q in range(1, 19) if clean[q] > 0.01]
    rng = np.random.default_rng(7)
    sigma = {q: 0.03 * clean[q] + 1e-4 for q in charges}
    data = {q: clean[q] + rng.normal(0.0, sigma[q]) for q in charges}
    fit = cc.fit_charge_distribution(
        model,
        data,
        free={"electron_temperature_ev": (200.0, 2e4), "ne_tau_s_cm3": (1e7, 1e10)},
        uncertainties=sigma,
    )
    assert not fit.unconstrained
    for name, true in TRUTH.items():
        lo, hi = fit.intervals[name]
        # 3-σ: the 1-σ interval widened threefold in the fitted (log10) coordinate.
        x, s = np.log10(fit.parameters[name]), (np.log10(hi) - np.log10(lo)) / 2
        assert abs(np.log10(true) - x) < 3 * s, (name, fit.parameters[name], (lo, hi))
        assert hi / lo < 1.5, (name, lo, hi)  # constrained to better than ±25 %
