"""The solver under stress, through the public Python API: decay to underflow, huge times,
the memory limit and Ctrl-C during a long call.

References: scipy.linalg.expm (scipy) for the small networks; the closed form e^{-L t} for a
uniform loss L (common practice: it adds -L*I to the generator, which commutes with it).
Networks and traps are invented.
"""

import faulthandler
import os
import signal
import threading
import time

import numpy as np
import pytest
import scipy.linalg

import chargecast as cc


def expm_populations(rates, loss, initial, times):
    """N(t) = expm(t M) N(0) from scipy, M[to, from] with the loss on the diagonal."""
    m = np.asarray(rates, dtype=float).T - np.diag(np.asarray(rates).sum(axis=1) + loss)
    return np.array([scipy.linalg.expm(m * t) @ initial for t in times])


def test_one_state_with_loss_decays_to_exactly_zero():
    times = np.array([0.0, 1.0, 100.0, 700.0, 742.0])
    got = cc.solve_rate_equations(np.array([[0.0]]), np.array([1.0]), times, loss_per_s=np.array([1.0]))
    expected = expm_populations(np.array([[0.0]]), np.array([1.0]), np.array([1.0]), times)
    np.testing.assert_allclose(got[:3], expected[:3], rtol=1e-9, atol=0.0)
    # Near underflow the local tolerance has an absolute floor of 2.2e-308 (the smallest
    # normal number), so e^-700 ~ 1e-304 is only good to ~1e-4 relative.
    np.testing.assert_allclose(got[3], expected[3], rtol=1e-4, atol=0.0)
    assert got[4, 0] == 0.0  # e^-742 is below the smallest normal float64


def test_cycle_with_loss_matches_scipy_and_reaches_zero():
    rates = np.zeros((4, 4))
    for q in range(4):
        rates[q, (q + 1) % 4] = 5.0
    loss = np.ones(4)
    initial = np.array([1.0, 0.0, 0.0, 0.0])
    times = np.array([0.01, 0.3, 2.0, 30.0, 200.0, 742.0])
    got = cc.solve_rate_equations(rates, initial, times, loss_per_s=loss)
    expected = expm_populations(rates, loss, initial, times)
    np.testing.assert_allclose(got[:5], expected[:5], rtol=1e-8, atol=1e-300)
    assert (got[5] == 0.0).all()


def test_trap_with_escape_losses_decays_instead_of_failing():
    beam = cc.ElectronBeam(8000.0, 0.3, radius_m=70e-6)
    trap = cc.BeamTrap(beam, 0.6, residual_gas_pa={"H2": 5e-9}, loss_per_s=[10.0] * 19)
    times = np.geomspace(1e-4, 100.0, 50)
    fractions = np.asarray(trap.evolve("Ar", times).fractions)
    assert np.isfinite(fractions).all() and (fractions >= 0.0).all()
    normal = np.exp(-10.0 * times) > 1e-290
    np.testing.assert_allclose(fractions.sum(axis=1)[normal], np.exp(-10.0 * times[normal]), rtol=1e-9)
    assert (fractions[-1] == 0.0).all()


def test_huge_times_are_rejected_with_the_limit():
    trap = cc.BeamTrap(cc.ElectronBeam(8000.0, 2.0, radius_m=30e-6), 0.6, residual_gas_pa={"H2": 1e-9})
    with pytest.raises(cc.InvalidParameterError, match="must be at most .* s for this network"):
        trap.evolve("O", np.array([1e40]))
    rng = np.random.default_rng(5)
    rates = 10.0 ** rng.uniform(-3, 3, (20, 20))
    np.fill_diagonal(rates, 0.0)
    start = time.perf_counter()
    with pytest.raises(cc.InvalidParameterError, match="1e20"):
        cc.solve_rate_equations(rates, np.full(20, 0.05), np.array([1e308]))
    # Rejected up front, not after stepping (generous bound; not a timing test of the solver).
    assert time.perf_counter() - start < 30.0


def test_fractions_stay_in_range_up_to_the_limit():
    for energy, current in [(300.0, 0.01), (3000.0, 0.3), (30000.0, 2.0)]:
        trap = cc.BeamTrap(
            cc.ElectronBeam(energy, current, radius_m=200e-6), 0.6, residual_gas_pa={"H2": 1e-7}
        )
        for symbol in ["O", "Ar"]:
            fastest = trap.rates(symbol).sum(axis=1).max()
            times = np.geomspace(1e-6, 0.99e20 / fastest, 40)
            f = np.asarray(trap.evolve(symbol, times).fractions)
            assert np.isfinite(f).all() and (f >= 0.0).all() and (f <= 1.0).all()
            np.testing.assert_allclose(f.sum(axis=1), 1.0, rtol=0.0, atol=1e-12)


def test_memory_limit_refuses_with_estimate_and_limit():
    default = cc.memory_limit_bytes()
    assert default == 2 * 1024**3
    rates = np.array([[0.0, 1.0], [1.0, 0.0]])
    try:
        cc.set_memory_limit_bytes(2**20)
        with pytest.raises(cc.InvalidParameterError, match="more than the limit of 1.049 MB") as info:
            cc.solve_rate_equations(rates, np.array([1.0, 0.0]), np.linspace(0.0, 1.0, 100_000))
        assert "the evolution needs about 1.6" in str(info.value)
        with pytest.raises(cc.InvalidParameterError, match="at least"):
            cc.set_memory_limit_bytes(10)
        with pytest.raises(cc.InvalidParameterError, match="at least"):
            cc.set_memory_limit_bytes(-1)
        with pytest.raises(cc.InvalidParameterError, match="whole number"):
            cc.set_memory_limit_bytes(2.5e9)
    finally:
        cc.set_memory_limit_bytes(default)
    got = cc.solve_rate_equations(rates, np.array([1.0, 0.0]), np.linspace(0.0, 1.0, 100_000))
    assert got.shape == (100_000, 2)


def _interrupt_soon(delay_s):
    """Send SIGINT to this process from another thread after `delay_s`."""
    timer = threading.Timer(delay_s, os.kill, args=(os.getpid(), signal.SIGINT))
    timer.start()
    return timer


@pytest.fixture
def watchdog():
    """The overall timeout: dump the stacks and exit the test process after 30 s.

    The calls below take about a minute when left to run (measured on the development
    machine), and KeyboardInterrupt would still be raised once they returned; the watchdog
    is what fails the test if Ctrl-C is not honoured during the call.
    """
    faulthandler.dump_traceback_later(30, exit=True)
    yield
    faulthandler.cancel_dump_traceback_later()


def test_ctrl_c_interrupts_a_long_solve(watchdog):
    rng = np.random.default_rng(0)
    n = 400
    rates = 10.0 ** rng.uniform(-3, 3, (n, n))
    np.fill_diagonal(rates, 0.0)
    initial = np.zeros(n)
    initial[0] = 1.0
    times = np.geomspace(1e-6, 1e3, 20_000)
    timer = _interrupt_soon(0.5)
    try:
        with pytest.raises(KeyboardInterrupt):
            cc.solve_rate_equations(rates, initial, times)
    finally:
        timer.cancel()
    # The flag was cleared: the next call runs normally.
    got = cc.solve_rate_equations(rates, initial, times[:5])
    np.testing.assert_allclose(got.sum(axis=1), 1.0, atol=1e-12)


def test_ctrl_c_interrupts_a_parallel_batch(watchdog):
    traps = [
        cc.BeamTrap(cc.ElectronBeam(5000.0 + 0.1 * k, 0.3, radius_m=70e-6), 0.6, residual_gas_pa={"H2": 1e-8})
        for k in range(40_000)
    ]
    times = np.geomspace(1e-5, 10.0, 10)
    timer = _interrupt_soon(0.5)
    try:
        with pytest.raises(KeyboardInterrupt):
            cc.evolve_batch([(t, "U") for t in traps], times)
    finally:
        timer.cancel()
    assert len(cc.evolve_batch([(traps[0], "Ar")], times[:3])) == 1


def test_ctrl_c_interrupts_an_energy_scan(watchdog):
    trap = cc.BeamTrap(cc.ElectronBeam(8000.0, 0.3, radius_m=70e-6), 0.6, residual_gas_pa={"H2": 5e-9})
    energies = np.linspace(1000.0, 30000.0, 200_000)
    timer = _interrupt_soon(0.5)
    try:
        with pytest.raises(KeyboardInterrupt):
            trap.best_energy("Ar", 16, energies, np.geomspace(1e-4, 10.0, 50))
    finally:
        timer.cancel()
    best = trap.best_energy("Ar", 16, energies[:20], np.geomspace(1e-4, 10.0, 50))
    assert 0.0 < best.best_fraction <= 1.0
