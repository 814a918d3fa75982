"""Fits of synthetic charge spectra, Monte Carlo bands and their cluster runs.

External references: the optimiser is scipy.optimize.least_squares (scipy); the coverage
target 68.3 % for a 1-σ interval of a Gaussian estimate is the normal distribution's
(scipy.stats.norm); the Dask runs compare against the local core bit for bit.
"""

from __future__ import annotations

import numpy as np
import pytest

import chargecast as cc

scipy = pytest.importorskip("scipy")
from scipy.stats import binom, norm  # noqa: E402

TIME_S = 0.1
TRUTH = {"current_density_a_cm2": 100.0, "pressure_pa": 3e-7}


def make_trap(j: float = 100.0, p: float = 3e-7, energy_ev: float = 2000.0, processes=None) -> cc.BeamTrap:
    beam = cc.ElectronBeam(energy_ev=energy_ev, current_a=0.05, current_density_a_cm2=j)
    kw = {} if processes is None else {"processes": processes}
    return cc.BeamTrap(beam, length_m=0.5, residual_gas_pa={"H2": p}, ion_temperature_ev=50.0, **kw)


def synthetic(truth_j: float, truth_p: float):
    model = cc.TrapFitModel(make_trap(truth_j, truth_p), "Ar", TIME_S)
    f = model.evaluate([{}])[0]
    q = np.flatnonzero(f > 0.003)
    sigma = 0.003 * f[q] + 3e-4
    return q, f[q], sigma


def fit_once(q, data, sigma, free):
    start = cc.TrapFitModel(make_trap(30.0, 1e-8), "Ar", TIME_S)
    return cc.fit_charge_distribution(
        start, dict(zip(q.tolist(), data)), free=free, uncertainties=dict(zip(q.tolist(), sigma))
    )


FREE = {"current_density_a_cm2": (10.0, 3000.0), "pressure_pa": (1e-9, 1e-5)}


def test_fit_recovers_noiseless_truth():
    q, f, s = synthetic(100.0, 3e-7)
    res = fit_once(q, f, s, FREE)
    assert res.success and res.unconstrained == []
    assert res.parameters["current_density_a_cm2"] == pytest.approx(100.0, rel=1e-4)
    assert res.parameters["pressure_pa"] == pytest.approx(3e-7, rel=1e-3)
    assert res.chi2 < 1e-6
    lo, hi = res.intervals["current_density_a_cm2"]
    assert lo < 100.0 < hi
    assert res.covariance.shape == (2, 2)


def test_fit_of_currents_profiles_the_scale():
    q, f, s = synthetic(100.0, 3e-7)
    currents = 1e-9 * q * f
    res = cc.fit_charge_distribution(
        cc.TrapFitModel(make_trap(30.0, 1e-8), "Ar", TIME_S),
        free=FREE,
        measured_currents_a=dict(zip(q.tolist(), currents)),
        uncertainties=dict(zip(q.tolist(), 1e-9 * q * s)),
    )
    assert res.parameters["current_density_a_cm2"] == pytest.approx(100.0, rel=1e-3)
    assert res.dof == len(q) - 3


def test_coverage_of_one_sigma_intervals():
    """200 noisy draws: the 1-σ interval covers the truth 60–76 % of the time (normal
    distribution: 68.3 %, scipy.stats.norm; 60–76 % is the binomial ±2.5σ band for 200)."""
    assert norm.cdf(1) - norm.cdf(-1) == pytest.approx(0.6827, abs=1e-4)
    q, f, s = synthetic(100.0, 3e-7)
    rng = np.random.default_rng(2026)
    hits = {"current_density_a_cm2": 0, "pressure_pa": 0}
    truth = TRUTH
    n = 200
    for _ in range(n):
        res = fit_once(q, f + rng.normal(0.0, s), s, FREE)
        for name in hits:
            lo, hi = res.intervals[name]
            hits[name] += lo <= truth[name] <= hi
    for name, k in hits.items():
        assert 0.60 * n <= k <= 0.76 * n, (name, k)
    # The band is wide enough not to be a test that cannot fail (binomial, scipy.stats).
    assert binom.cdf(0.60 * n, n, 0.30) > 0.99


def test_unconstrained_parameter_is_flagged_with_a_scan():
    # Fractions hardly depend on the compensation: it sets the ion count, and only through
    # the default energy spread (the space-charge width) the dielectronic resonance widths.
    q, f, s = synthetic(100.0, 3e-7)
    res = fit_once(q, f, s, {"current_density_a_cm2": (10.0, 3000.0), "compensation": (0.1, 0.9)})
    assert res.unconstrained == ["compensation"]
    values, chi2 = res.scans["compensation"]
    assert len(values) == 21 and np.ptp(chi2) < 1e-4 * chi2.mean()
    assert "unconstrained" in repr(res)


def test_fit_rejects_bad_input():
    q, f, s = synthetic(100.0, 3e-7)
    model = cc.TrapFitModel(make_trap(), "Ar", TIME_S)
    with pytest.raises(cc.InvalidParameterError, match="allowed"):
        cc.fit_charge_distribution(
            model, dict(zip(q.tolist(), f)), free={"colour": (0, 1)}, uncertainties=dict(zip(q.tolist(), s))
        )
    with pytest.raises(cc.InvalidParameterError, match="low < high"):
        cc.fit_charge_distribution(
            model,
            dict(zip(q.tolist(), f)),
            free={"energy_ev": (5.0, 1.0)},
            uncertainties=dict(zip(q.tolist(), s)),
        )
    with pytest.raises(cc.InvalidParameterError, match="1-sigma"):
        cc.fit_charge_distribution(model, dict(zip(q.tolist(), f)), free=FREE, uncertainties={1: 0.1})


def test_residual_figure():
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    q, f, s = synthetic(100.0, 3e-7)
    axes = fit_once(q, f, s, FREE).plot()
    assert len(axes) == 2


# --- Monte Carlo bands


TIMES = np.geomspace(1e-4, 0.1, 30)


def test_bands_are_reproducible_and_conserve():
    trap = make_trap()
    a = trap.evolve("Ar", TIMES, samples=50, seed=3)
    b = trap.evolve("Ar", TIMES, samples=50, seed=3)
    assert np.array_equal(a.samples, b.samples)
    assert np.abs(a.samples.sum(axis=2) - 1).max() < 1e-10
    assert a.samples.min() >= 0
    lo, mid, hi = a.percentile([5, 50, 95])
    assert np.all(lo <= mid) and np.all(mid <= hi)
    t5, t50, t95 = a.peak_time_s(16)
    assert t5 <= t50 <= t95
    f5, _, f95 = a.peak_fraction(16)
    assert 0 < f5 <= f95 <= 1
    i5, _, i95 = a.ions_per_extraction(16, 0.05)
    assert 0 < i5 <= i95


def test_median_equals_nominal_within_sampling_error():
    """Ionization only, one factor per process (ρ = 1): the mean charge grows monotonically
    with the factor, so its median over samples is the nominal value (the factor's median
    is 1) up to the sampling error of a median, 1.2533 σ/√n (normal-distribution result)."""
    trap = make_trap(processes=["ionization"])
    n = 400
    bands = trap.evolve(
        "Ar", TIMES, samples=n, seed=1, factors={"ionization_factor": 1.4, "charge_correlation": 1.0}
    )
    mean_q = (bands.samples * np.arange(19)).sum(axis=2)
    nominal = bands.nominal.mean_charge()
    k = 15
    err = 1.2533 * mean_q[:, k].std() / np.sqrt(n)
    assert abs(np.median(mean_q[:, k]) - nominal[k]) < 4 * err


def test_bands_widen_with_the_factors():
    trap = make_trap()
    widths = []
    for f in (1.1, 1.3, 1.8):
        b = trap.evolve(
            "Ar",
            TIMES,
            samples=100,
            seed=5,
            factors={"ionization_factor": f, "recombination_factor": f, "charge_exchange_factor": f},
        )
        mq = (b.samples * np.arange(19)).sum(axis=2)[:, -1]
        widths.append(np.percentile(mq, 95) - np.percentile(mq, 5))
    assert widths[0] < widths[1] < widths[2]


def test_best_energy_band_and_bad_factors():
    trap = make_trap()
    lo, mid, hi = cc.best_energy_band(trap, "Ar", 16, [1000.0, 3000.0, 8000.0], TIMES, samples=20)
    assert 1000.0 <= lo <= mid <= hi <= 8000.0
    with pytest.raises(cc.InvalidParameterError, match="allowed"):
        trap.evolve("Ar", TIMES, samples=5, factors={"lotz": 2.0})
    with pytest.raises(cc.InvalidParameterError, match=">= 1"):
        trap.evolve("Ar", TIMES, samples=5, factors={"ionization_factor": 0.5})
    with pytest.raises(cc.InvalidParameterError, match="at least 1"):
        trap.evolve("Ar", TIMES, samples=0)


def test_band_figure():
    pytest.importorskip("matplotlib")
    import matplotlib

    matplotlib.use("Agg")
    ax = make_trap().evolve("Ar", TIMES, samples=20).plot([14, 16])
    assert len(ax.collections) >= 2


# --- cluster runs


@pytest.fixture(scope="module")
def client():
    distributed = pytest.importorskip("dask.distributed")
    cluster = distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
    )
    c = distributed.Client(cluster)
    yield c
    c.close()
    cluster.close()


def test_dask_samples_equal_local_bit_for_bit(client):
    trap = make_trap()
    local = trap.evolve("Ar", TIMES, samples=30, seed=9)
    remote = trap.evolve("Ar", TIMES, samples=30, seed=9, client=client, chunk=7)
    assert np.array_equal(local.samples, remote.samples)


def test_dask_cases_equal_local_bit_for_bit(client):
    trap = make_trap()
    energies = [2000.0, 5000.0]
    import chargecast.dask

    out = chargecast.dask.map_cases(client, trap, ["Ar", "Ne"], energies, TIMES)
    for el in ("Ar", "Ne"):
        for i, e in enumerate(energies):
            local = make_trap(energy_ev=e).evolve(el, TIMES).fractions
            assert np.array_equal(out[el][i], local)


def test_a_client_that_is_not_one_is_named():
    # The 1M-call fuzz run (seed 29): client="Ar" ended in AttributeError from dask.py.
    import chargecast.dask

    trap = make_trap()
    with pytest.raises(cc.ArgumentTypeError, match="client"):
        trap.evolve("Ar", TIMES, samples=3, client="Ar")
    with pytest.raises(cc.ArgumentTypeError, match="client"):
        chargecast.dask.map_cases(object(), trap, ["Ar"], [2000.0], TIMES)
