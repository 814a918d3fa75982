"""The solver under stress, through the public Python API: decay to underflow, huge times,
the memory limit and Ctrl-C during a long call.

References: scipy.linalg.expm (scipy) for the small networks; the closed form e^{-L t} for a
uniform loss L (common practice: it adds -L*I to the generator, which commutes with it).
Networks and traps are invented.
"""

import os
import signal
import subprocess
import sys
import textwrap
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


# --- Ctrl-C during a long call ------------------------------------------------------------
#
# Each case runs in a child interpreter of its own, so that no state left by other tests (signal
# handlers, threads, the process-wide stop flag) takes part, and so that a call that ignores
# Ctrl-C fails its own test with the child's stacks instead of hanging the test run.
#
# The child sets a huge GIL switch interval: the thread that sends SIGINT then gets the GIL only
# once the main thread has released it, i.e. inside the long call (the core runs with the GIL
# released). The signal therefore lands during the call, not before or after it, whatever the
# speed of the machine. The calls below take from seconds to minutes when left to run (measured
# on the development machine); an honoured Ctrl-C ends them within a fraction of a second.

_CHILD_PRELUDE = """
import faulthandler, os, signal, sys, threading
import numpy as np
import chargecast as cc

faulthandler.enable()
sys.setswitchinterval(1000.0)


def interrupted(call):
    timer = threading.Timer(0.2, os.kill, args=(os.getpid(), signal.SIGINT))
    timer.start()
    try:
        call()
    except KeyboardInterrupt:
        return True
    finally:
        timer.cancel()
    return False


def invented_trap(energy_ev, h2_pa):
    beam = cc.ElectronBeam(energy_ev, 0.3, radius_m=70e-6)
    return cc.BeamTrap(beam, 0.6, residual_gas_pa={"H2": h2_pa})


"""

#: How long a child may run before it counts as hung (the uninterrupted calls take longer).
HANG_S = 120.0


def _native_stacks(pid: int) -> str:
    """Every thread's native stack of a running process, from gdb when the machine has it."""
    try:
        out = subprocess.run(
            ["gdb", "-batch", "-p", str(pid), "-ex", "thread apply all bt 30"],
            capture_output=True,
            text=True,
            timeout=60,
        )
    except (OSError, subprocess.TimeoutExpired) as exc:
        return f"(no native stacks: {exc})"
    return out.stdout[-20_000:]


def _run_child(body: str) -> None:
    """Run `body` after the prelude in a fresh interpreter; fail with its stacks if it hangs
    and with its stderr if it fails or does not finish."""
    env = dict(os.environ, PYTHONFAULTHANDLER="1")
    proc = subprocess.Popen(
        [sys.executable, "-c", _CHILD_PRELUDE + textwrap.dedent(body) + '\nprint("ok")\n'],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env=env,
    )
    try:
        out, err = proc.communicate(timeout=HANG_S)
    except subprocess.TimeoutExpired:
        native = _native_stacks(proc.pid)
        proc.send_signal(signal.SIGABRT)  # faulthandler prints the Python stacks
        try:
            out, err = proc.communicate(timeout=30)
        except subprocess.TimeoutExpired:
            proc.kill()
            out, err = proc.communicate()
        pytest.fail(
            f"Ctrl-C was not honoured within {HANG_S:.0f} s.\nPython stacks:\n{err[-20_000:]}"
            f"\nNative stacks:\n{native}"
        )
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.communicate()
    assert proc.returncode == 0, err
    assert out.split() == ["ok"], out + err


def test_ctrl_c_interrupts_a_long_solve():
    _run_child(
        """
        rng = np.random.default_rng(0)
        n = 800
        rates = 10.0 ** rng.uniform(-3, 3, (n, n))
        np.fill_diagonal(rates, 0.0)
        initial = np.zeros(n)
        initial[0] = 1.0
        times = np.geomspace(1e-6, 1e3, 2_000)
        assert interrupted(lambda: cc.solve_rate_equations(rates, initial, times))
        # The stop request was cleared: the next call runs normally.
        got = cc.solve_rate_equations(rates, initial, times[:5])
        np.testing.assert_allclose(got.sum(axis=1), 1.0, atol=1e-12)
        """
    )


def test_ctrl_c_interrupts_a_parallel_batch():
    _run_child(
        """
        trap = invented_trap(5000.0, 1e-8)
        times = np.geomspace(1e-5, 10.0, 10)
        assert interrupted(lambda: cc.evolve_batch([(trap, "U")] * 100_000, times))
        assert len(cc.evolve_batch([(trap, "Ar")], times[:3])) == 1
        """
    )


def test_ctrl_c_interrupts_an_energy_scan():
    _run_child(
        """
        trap = invented_trap(8000.0, 5e-9)
        energies = np.linspace(1000.0, 30000.0, 200_000)
        times = np.geomspace(1e-4, 10.0, 50)
        assert interrupted(lambda: trap.best_energy("Ar", 16, energies, times))
        assert 0.0 < trap.best_energy("Ar", 16, energies[:20], times).best_fraction <= 1.0
        """
    )
