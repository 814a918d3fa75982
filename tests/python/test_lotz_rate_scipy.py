"""Lotz Maxwellian rate coefficients against scipy.integrate.quad over the binding's own
cross section (the closed form with E1 must equal the numerical Maxwellian average)."""

import numpy as np
import pytest
from scipy import constants as sc
from scipy.integrate import quad

import chargecast as cc


def _sigma_cm2(symbol, charge, energy_ev, lotz):
    values = cc.lotz_cross_section_cm2(symbol, charge, energies_ev=np.array([energy_ev]), **lotz)
    return float(np.asarray(values).ravel()[0])


def _maxwellian_rate_cm3_s(symbol, charge, kt_ev, lotz):
    """<sigma v> over f(E) = 2 sqrt(E/pi) kT^-3/2 exp(-E/kT), v = sqrt(2E/m_e) (scipy)."""

    def integrand(e_ev):
        v_cm_s = np.sqrt(2.0 * e_ev * sc.e / sc.m_e) * 100.0
        f = 2.0 * np.sqrt(e_ev / np.pi) * kt_ev**-1.5 * np.exp(-e_ev / kt_ev)
        return _sigma_cm2(symbol, charge, e_ev, lotz) * v_cm_s * f

    bindings = sorted({float(b) for _, _, b in cc.element(symbol).ion(charge).subshells()})
    edges = [*bindings, bindings[-1] + 80.0 * kt_ev]
    total = 0.0
    for lo, hi in zip(edges[:-1], edges[1:]):
        value, _ = quad(integrand, lo, hi, epsabs=0.0, epsrel=1e-11, limit=400)
        total += value
    return total


CASES = [
    ("Ar", 8, 300.0, {}),
    ("Kr", 20, 2000.0, {}),
    ("He", 0, 30.0, {}),
    ("Xe", 26, 5000.0, {}),
    ("Ar", 0, 15.0, {"a": 4.0e-14, "b": 0.6, "c": 0.4}),
    ("Xe", 10, 500.0, {"a": 4.2e-14, "b": 0.3, "c": 1.2}),
]


@pytest.mark.parametrize(("symbol", "charge", "kt_ev", "lotz"), CASES)
def test_rate_coefficient_equals_scipy_quad(symbol, charge, kt_ev, lotz):
    closed = cc.lotz_rate_coefficient_cm3_s(symbol, charge, temperatures_ev=kt_ev, **lotz)
    numeric = _maxwellian_rate_cm3_s(symbol, charge, kt_ev, lotz)
    assert numeric > 0.0
    assert float(closed) == pytest.approx(numeric, rel=1e-6)
