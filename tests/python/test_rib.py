"""Half-lives and decay channels, the radioactive-beam breeding cycle and the residual-gas
ions from partial pressures. External references are named beside each check."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
import scipy.constants as sc

import chargecast as cc

mendeleev_fetch = pytest.importorskip("mendeleev.fetch")

# mendeleev's half-life units in seconds, from scipy.constants (year: Julian year).
UNIT_S = {
    "ysec": sc.yocto,
    "zsec": sc.zepto,
    "asec": sc.atto,
    "psec": sc.pico,
    "nsec": sc.nano,
    "usec": sc.micro,
    "msec": sc.milli,
    "sec": 1.0,
    "minute": sc.minute,
    "hour": sc.hour,
    "day": sc.day,
    "year": sc.Julian_year,
    "kyear": sc.kilo * sc.Julian_year,
    "Myear": sc.mega * sc.Julian_year,
    "Gyear": sc.giga * sc.Julian_year,
    "Tyear": sc.tera * sc.Julian_year,
    "Pyear": sc.peta * sc.Julian_year,
    "Eyear": sc.exa * sc.Julian_year,
    "Zyear": sc.zetta * sc.Julian_year,
    "Yyear": sc.yotta * sc.Julian_year,
}


def test_half_lives_agree_with_mendeleev() -> None:
    # Reference: mendeleev (PyPI) table 'isotopes', every radioactive isotope with a half-life.
    iso = mendeleev_fetch.fetch_table("isotopes")
    checked = 0
    for r in iso.itertuples():
        if r.is_radioactive != 1 or r.half_life is None or math.isnan(r.half_life):
            continue
        want = float(r.half_life) * UNIT_S[r.half_life_unit]
        got = cc.element(int(r.atomic_number)).isotope(int(r.mass_number)).half_life_s
        assert got is not None, (r.atomic_number, r.mass_number)
        assert got == pytest.approx(want, rel=1e-5), (r.atomic_number, r.mass_number)
        checked += 1
    assert checked > 2800
    stable = cc.element("Rb").isotope(85)
    assert stable.half_life_s is None and not stable.is_radioactive and stable.decay_modes == []


def test_decay_channels_agree_with_mendeleev() -> None:
    # Reference: mendeleev 'isotopedecaymodes' for 97Rb: B- 100 %, of which B-n 25.5 %.
    rb97 = cc.element("Rb").isotope(97)
    assert rb97.half_life_s == pytest.approx(0.1691)
    assert dict(rb97.decay_modes) == pytest.approx({"beta-": 0.745, "beta-n": 0.255})
    # 40K: B- 89.28 %, B+ (and EC) 10.72 % (mendeleev).
    assert dict(cc.element("K").isotope(40).decay_modes) == pytest.approx(
        {"beta-": 0.8928, "beta+/EC": 0.1072}
    )
    with pytest.raises(cc.NoDataError):
        cc.element("Rb").isotope(300)


def small_trap() -> cc.BeamTrap:
    beam = cc.ElectronBeam(energy_ev=6000.0, current_a=0.3, radius_m=100e-6)
    return cc.BeamTrap(beam, 0.6, residual_gas_pa={"H2": 1e-9, "CO": 2e-10})


def test_cycle_bookkeeping_and_bateman_parent() -> None:
    run = cc.breeding_cycle(
        small_trap(),
        "97Rb",
        repetition_rate_hz=10.0,
        ions_per_s=1e6,
        capture_efficiency=0.7,
        max_nuclides=2,
        times_s=[0.02, 0.05],
    )
    assert run.nuclides == ["97Rb", "97Sr"]
    # The result names the daughters' entry-charge rule (the default: the parent's charge).
    assert run.daughter_charge == "parent"
    total = run.trapped + run.decayed + run.lost
    np.testing.assert_allclose(total, run.ions_per_bunch, rtol=1e-9)
    # Parent in the trap: captured × exp(−λ t) (Bateman 1910, first member), captured =
    # 0.7 × bunch × (1 − e^{−λT})/(λT) for arrivals spread over the period T.
    lam = math.log(2) / 0.1691
    captured = 0.7 * 1e5 * (-math.expm1(-lam * 0.1)) / (lam * 0.1)
    np.testing.assert_allclose(run.trapped, captured * np.exp(-lam * run.times_s), rtol=1e-9)
    np.testing.assert_allclose(run.efficiency.sum(), run.trapped[-1] / run.ions_per_bunch, rtol=1e-12)
    q, per_s = run.best_charge()
    assert per_s == pytest.approx(run.extracted_per_s("97Rb")[q])
    assert set(run.to_pandas().columns) == {"nuclide", "charge", "ions_per_s", "ions_per_bunch"}
    assert "97Rb" in repr(run)


def test_cycle_arguments_are_checked() -> None:
    trap = small_trap()
    with pytest.raises(cc.InvalidParameterError, match="exactly one"):
        cc.breeding_cycle(trap, "97Rb", repetition_rate_hz=10.0)
    with pytest.raises(cc.InvalidParameterError, match="one isotope"):
        cc.breeding_cycle(trap, "Rb", repetition_rate_hz=10.0, ions_per_s=1e6)
    with pytest.raises(cc.InvalidParameterError, match="cycle period"):
        cc.breeding_cycle(trap, "97Rb", repetition_rate_hz=10.0, ions_per_s=1e6, breeding_time_s=0.5)
    with pytest.raises(cc.InvalidParameterError, match="capture_efficiency"):
        cc.breeding_cycle(trap, "97Rb", repetition_rate_hz=10.0, ions_per_s=1e6, capture_efficiency=2.0)
    with pytest.raises(cc.InvalidParameterError, match="daughter_charge"):
        cc.breeding_cycle(trap, "97Rb", repetition_rate_hz=10.0, ions_per_s=1e6, daughter_charge="x")
    with pytest.raises(cc.ArgumentTypeError):
        cc.breeding_cycle("trap", "97Rb", repetition_rate_hz=10.0, ions_per_s=1e6)  # type: ignore[arg-type]


def test_residual_gas_ions_follow_the_pressures() -> None:
    # n = p / (k_B T) with k_B from scipy.constants; V = π r² L; early on every ion made
    # stays: N ≈ n V (j/e) σ_CO t, σ_CO = σ_C + σ_O the additivity rule (Otvos & Stevenson
    # 1956) over the neutral atoms' Lotz cross sections, and the CO⁺ ion dissociates into C⁺
    # or O⁺ as 4.5 : 1.7, the atomic ions of CO's 70 eV pattern in data/fragments.csv (NIST
    # Chemistry WebBook EI spectrum, from memory).
    trap = small_trap()
    t = 1e-5
    ions = cc.residual_gas_ions(trap, t)
    assert sorted(ions) == ["C", "H", "O"]
    n_cm3 = 2e-10 / (sc.k * 300.0) * 1e-6
    v_cm3 = math.pi * (100e-6 * 100) ** 2 * 60.0
    flux = 0.3 / (math.pi * (100e-6 * 100) ** 2) / sc.e
    sigma = sum(float(cc.lotz_cross_section_cm2(el, charge=0, energies_ev=6000.0)) for el in ("C", "O"))
    np.testing.assert_allclose(ions["C"].sum(), n_cm3 * v_cm3 * flux * sigma * t * 4.5 / 6.2, rtol=1e-9)
    np.testing.assert_allclose(ions["C"].sum() / ions["O"].sum(), 4.5 / 1.7, rtol=1e-6)
    twice = cc.BeamTrap(trap.beam, 0.6, residual_gas_pa={"H2": 2e-9, "CO": 4e-10})
    np.testing.assert_allclose(cc.residual_gas_ions(twice, t)["O"].sum(), 2 * ions["O"].sum(), rtol=1e-6)


def test_the_cycle_and_its_report_name_the_daughter_charge_rule() -> None:
    kept = cc.breeding_cycle(
        small_trap(),
        "97Rb",
        repetition_rate_hz=10.0,
        ions_per_s=1e6,
        max_nuclides=2,
        daughter_charge="electrons_kept",
        times_s=[0.02],
    )
    assert kept.daughter_charge == "electrons_kept"
    report = cc.load_scenario(cc.bundled_scenarios()["radioactive_beam"]).run()
    assert 'daughter_charge = "parent"' in cc.report_text.render(report)
    assert json.loads(report.to_json())["injection"]["daughter_charge"] == "parent"
