"""Ion masses, A/q line lists, overlaps and clean charge states (chargecast.spectrum)."""

from __future__ import annotations

import doctest
import math
import sys

import numpy as np
import periodictable
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from mendeleev import element as mendeleev_element
from scipy import constants
from scipy.special import erf

import chargecast as cc
import chargecast.spectrum as spectrum

# Electron mass in u and the atomic mass unit in eV, CODATA 2018 (Tiesinga et al., Rev. Mod. Phys.
# 93, 025010 (2021)), the set chargecast uses. scipy.constants carries a newer CODATA set: its values
# differ by 2e-14 u per electron, checked below so the two tables cannot drift apart unnoticed.
M_E_U = 5.48579909065e-4
U_EV = 931494102.42


def test_codata_2018_values_agree_with_scipy_to_its_revision():
    assert constants.physical_constants["electron mass in u"][0] == pytest.approx(M_E_U, rel=1e-10)
    u_mev = constants.physical_constants["atomic mass constant energy equivalent in MeV"][0]
    assert u_mev * 1e6 == pytest.approx(U_EV, rel=1e-8)


def mendeleev_ies_ev(symbol: str) -> list[float]:
    """Successive ionization energies (eV) from mendeleev's tables, step q → q+1 in order."""
    ies = mendeleev_element(symbol).ionenergies
    return [ies[k] for k in sorted(ies)]


def hand_ion_mass_u(symbol: str, mass_number: int, charge: int) -> float:
    """m_atom (periodictable) − q m_e (scipy) + Σ first q IEs (mendeleev) / c²."""
    atom = periodictable.elements.symbol(symbol)[mass_number].mass
    return atom - charge * M_E_U + sum(mendeleev_ies_ev(symbol)[:charge]) / U_EV


def gaussian_window_share(centre: float, fwhm: float, lo: float, hi: float) -> float:
    """Area of a unit Gaussian of this FWHM inside [lo, hi]: ½[erf(b) − erf(a)] (scipy)."""
    s = fwhm / (2.0 * math.sqrt(2.0 * math.log(2.0))) * math.sqrt(2.0)
    return 0.5 * (erf((hi - centre) / s) - erf((lo - centre) / s))


# --- ion masses


def test_carbon_12_is_exactly_12_u():
    # Definition of the unified atomic mass unit (common practice).
    assert cc.ion_mass_u("12C", 0) == 12.0


def test_atomic_masses_match_periodictable():
    # Neutral-atom masses of every naturally occurring isotope against the periodictable package.
    checked = 0
    for z in range(1, 95):
        el = cc.element(z)
        for iso in el.isotopes():
            mass_number, abundance = iso.mass_number, iso.abundance
            if abundance is None:
                continue
            ref = periodictable.elements[z][mass_number].mass
            got = cc.ion_mass_u(f"{mass_number}{el.symbol}", 0)
            assert abs(got - ref) < 1e-6, (el.symbol, mass_number, got, ref)
            checked += 1
    assert checked > 250


def test_binding_term_of_bare_uranium_is_the_sum_of_all_ionization_energies():
    # Hand calculation: B_92 = Σ of all 92 ionization energies of U (mendeleev's tables),
    # B/c² in u = B[eV] / 931494102.42 (CODATA 2018 u in eV, as in scipy.constants).
    total_ev = sum(mendeleev_ies_ev("U"))
    assert len(mendeleev_ies_ev("U")) == 92
    binding_u = total_ev / U_EV
    atom = cc.ion_mass_u("238U", 0)
    bare = cc.ion_mass_u("238U", 92)
    assert bare - (atom - 92 * M_E_U) == pytest.approx(binding_u, rel=1e-9)
    assert binding_u == pytest.approx(8.175e-4, rel=1e-3)  # ≈ 761.5 keV of binding


@pytest.mark.parametrize(
    ("symbol", "mass_number", "charge"), [("Kr", 84, 26), ("Ar", 40, 8), ("O", 16, 4), ("He", 4, 2)]
)
def test_ion_masses_match_a_hand_calculation(symbol, mass_number, charge):
    got = cc.ion_mass_u(f"{symbol}-{mass_number}", charge)
    assert got == pytest.approx(hand_ion_mass_u(symbol, mass_number, charge), abs=1e-8)


def test_isotope_spellings_agree():
    values = {cc.ion_mass_u(s, 10) for s in ("84Kr", "Kr84", "Kr-84", "kr-84", "krypton-84")}
    assert len(values) == 1
    assert cc.ion_mass_u("Au", 1) == cc.ion_mass_u("197Au", 1)  # single natural isotope


@pytest.mark.parametrize(
    ("isotope", "charge", "error"),
    [
        ("Kr", 2, cc.InvalidParameterError),  # several natural isotopes: which one?
        ("84Kr", 37, cc.ChargeOutOfRangeError),
        ("84Kr", -1, cc.ChargeOutOfRangeError),
        ("Kr-999", 1, cc.NoDataError),
        ("Qq12", 1, cc.UnknownElementError),
        ("84Kr86", 1, cc.InvalidParameterError),
        (84, 1, cc.InvalidParameterError),
        ("84Kr", 2.5, cc.InvalidParameterError),
    ],
)
def test_bad_ion_mass_inputs_raise_chargecast_errors(isotope, charge, error):
    with pytest.raises(error):
        cc.ion_mass_u(isotope, charge)


# --- line lists


def test_line_intensities_are_amount_times_abundance_times_fraction():
    lines = cc.aq_lines({"Ne": {1: 0.25, 2: 0.75}}, amounts={"Ne": 2.0}, residual_gas={})
    assert len(lines) == 6
    assert np.all(np.diff(lines.m_over_q) >= 0)
    abundance = {i.mass_number: i.abundance for i in cc.element("Ne").isotopes() if i.abundance is not None}
    for label, a, q, i in zip(lines.label, lines.mass_number, lines.charge, lines.intensity):
        expected = 2.0 * abundance[int(a)] * {1: 0.25, 2: 0.75}[int(q)]
        assert i == pytest.approx(expected, rel=1e-12), label
    assert np.allclose(lines.a_over_q, lines.mass_number / lines.charge)
    assert np.allclose(lines.m_over_q, lines.mass_u / lines.charge)


def test_default_residual_gas_adds_h_c_n_o_ar_at_charges_one_to_three():
    lines = cc.aq_lines({"84Kr": {26: 1.0}})
    residual = set(lines.isotope[lines.residual].tolist())
    assert {"1H", "12C", "14N", "16O", "40Ar"} <= residual
    assert set(lines.charge[lines.residual].tolist()) == {1, 2, 3}
    assert lines.select(~lines.residual).label.tolist() == ["84Kr26+"]


class _OneTime:
    """Stands for a source result at one time: exposes 1-D ``fractions``."""

    def __init__(self, fractions):
        self.fractions = np.asarray(fractions)


def test_fractions_from_arrays_mappings_and_result_objects_agree():
    f = np.zeros(11)
    f[3] = 1.0
    a = cc.aq_lines({"Ne": f}, residual_gas={})
    b = cc.aq_lines({"Ne": {3: 1.0}}, residual_gas={})
    c = cc.aq_lines({"Ne": _OneTime(f)}, residual_gas={})
    assert a.label.tolist() == b.label.tolist() == c.label.tolist()
    assert np.array_equal(a.intensity, c.intensity)


def test_a_whole_evolution_is_refused_with_a_hint():
    with pytest.raises(cc.InvalidParameterError, match=r"\.at\("):
        cc.aq_lines({"Ne": _OneTime(np.ones((3, 11)))})


@pytest.mark.parametrize(
    "kwargs",
    [
        {"species": {"Ne": np.ones(10)}},  # wrong length
        {"species": {"Ne": {1: -0.5}}},  # negative fraction
        {"species": {"Ne": {11: 0.5}}},  # charge above Z
        {"species": {"Ne": ["a"] * 11}},  # not numbers
        {"species": {"Ne": {1: 1.0}}, "amounts": {"Ne": -1.0}},
        {"species": {"Ne": {1: 1.0}}, "amounts": {"Ar": 1.0}},  # amount of an absent species
        {"species": {"Tc": np.ones(44)}},  # no natural isotope
        {"species": ["Ne"]},
        {"species": {"Ne": {1: 1.0}}, "residual_gas": {"Xx": 1.0}},
    ],
)
def test_bad_line_inputs_raise_chargecast_errors(kwargs):
    with pytest.raises(cc.ChargecastError):
        cc.aq_lines(**kwargs)


def test_tables_pandas_and_html():
    lines = cc.aq_lines({"Ne": {1: 1.0}}, residual_gas={"Ar": 1.0})
    df = lines.to_pandas()
    assert list(df.columns)[:3] == ["label", "isotope", "z"]
    assert len(df) == len(lines)
    assert "<table>" in lines._repr_html_() and "20Ne1+" in lines._repr_html_()
    assert "20Ne1+" in repr(lines)
    report = cc.overlaps(lines, target=("20Ne", 1), resolving_power=500)
    assert "40Ar2+" in report._repr_html_()
    assert report.to_pandas()["label"].tolist() == ["40Ar2+"]


def test_to_pandas_without_pandas_says_how_to_install(monkeypatch):
    monkeypatch.setitem(sys.modules, "pandas", None)
    lines = cc.aq_lines({"Ne": {1: 1.0}}, residual_gas={})
    with pytest.raises(ImportError, match="pip install"):
        lines.to_pandas()


def test_plot_marks_target_and_interferers():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    lines = cc.aq_lines({"Ne": {1: 1.0}}, residual_gas={"Ar": 1.0})
    ax = lines.plot(resolving_power=2000, target=("20Ne", 1))
    assert ax.get_xlabel() == "m/q (u/e)"
    texts = [t.get_text() for t in ax.texts]
    assert any("20" in t and "Ne" in t for t in texts)
    assert any("40" in t and "Ar" in t for t in texts)
    legend = [t.get_text() for t in ax.get_legend().get_texts()]
    assert "target" in legend and "interferer" in legend
    ax2 = cc.overlaps(lines, target=("20Ne", 1), resolving_power=500, shape="triangular").plot()
    assert ax2.get_xlim()[0] < 19.98 < ax2.get_xlim()[1]
    lines.plot()  # whole spectrum, sticks only
    plt.close("all")


# --- overlaps


def test_gaussian_overlap_matches_the_erf_expression():
    lines = cc.aq_lines({"Ne": {1: 1.0}}, residual_gas={"Ar": 1.0})
    r = 800.0
    report = cc.overlaps(lines, target=("20Ne", 1), resolving_power=r, window_fwhm=1.4)
    t = report.target_m_over_q
    fwhm = t / r
    lo, hi = t - 0.7 * fwhm, t + 0.7 * fwhm
    assert report.window == pytest.approx((lo, hi), rel=1e-15)
    own = gaussian_window_share(t, fwhm, lo, hi)
    assert report.target_window_fraction == pytest.approx(own, rel=1e-13)
    (x,) = report.m_over_q
    share = gaussian_window_share(x, x / r, lo, hi)
    assert report.window_fraction[0] == pytest.approx(share, rel=1e-12)
    expected = report.intensity[0] * share / (report.target_intensity * own)
    assert report.contamination[0] == pytest.approx(expected, rel=1e-12)
    assert report.purity == pytest.approx(1.0 / (1.0 + expected), rel=1e-12)


def test_triangular_and_rectangular_overlaps_match_their_integrals():
    lines = cc.aq_lines({"Ne": {1: 1.0}}, residual_gas={"Ar": 1.0})
    r = 2500.0
    tri = cc.overlaps(lines, target=("20Ne", 1), resolving_power=r, shape="triangular")
    t, x = tri.target_m_over_q, tri.m_over_q[0]
    w_t, w_x = t / r, x / r
    lo, _hi = t - 0.5 * w_t, t + 0.5 * w_t
    # Triangle of half-base w: the part right of u = (lo − x)/w within the right flank is (1 − u)²/2.
    u = (lo - x) / w_x
    assert 0 < u < 1
    assert tri.window_fraction[0] == pytest.approx(0.5 * (1 - u) ** 2, rel=1e-12)
    assert tri.target_window_fraction == pytest.approx(0.75, rel=1e-12)
    rect = cc.overlaps(lines, target=("20Ne", 1), resolving_power=r, shape="rectangular")
    assert rect.target_window_fraction == pytest.approx(1.0)
    expected = max(0.0, (x + 0.5 * w_x - lo)) / w_x
    assert rect.window_fraction[0] == pytest.approx(expected, abs=1e-12)


def resolving_power_to_split(a: tuple[str, int, int], b: tuple[str, int, int]) -> float:
    """(m/q)/|Δ(m/q)| of the first ion, masses by hand (periodictable, mendeleev, scipy)."""
    ma = hand_ion_mass_u(*a) / a[2]
    mb = hand_ion_mass_u(*b) / b[2]
    return ma / abs(ma - mb)


def test_argon_2_plus_and_neon_plus_share_m_over_q_20():
    # 40Ar2+ and 20Ne+ both sit near m/q 20 (common practice).
    needed = resolving_power_to_split(("Ne", 20, 1), ("Ar", 40, 2))
    assert 1700 < needed < 1850
    lines = cc.aq_lines({"20Ne": {1: 1.0}, "40Ar": {2: 1.0}}, residual_gas={})
    report = cc.overlaps(lines, target=("20Ne", 1), resolving_power=500)
    assert report.label.tolist() == ["40Ar2+"]
    assert report.resolving_power_needed[0] == pytest.approx(needed, rel=1e-6)
    assert report.purity < 0.9
    # At twice the needed resolving power the pair is 2 FWHM apart: Gaussian tails leave < 1 %.
    assert cc.overlaps(lines, target=("20Ne", 1), resolving_power=2 * needed).purity > 0.99


def test_oxygen_4_plus_helium_plus_and_carbon_3_plus_share_a_over_q_4():
    # 16O4+, 4He+ and 12C3+ all have A/q = 4 (common practice).
    lines = cc.aq_lines({"16O": {4: 1.0}, "4He": {1: 1.0}, "12C": {3: 1.0}}, residual_gas={})
    assert np.allclose(lines.a_over_q, 4.0)
    report = cc.overlaps(lines, target=("16O", 4), resolving_power=300)
    got = dict(zip(report.label.tolist(), report.resolving_power_needed.tolist()))
    assert got["4He1+"] == pytest.approx(resolving_power_to_split(("O", 16, 4), ("He", 4, 1)), rel=1e-6)
    assert got["12C3+"] == pytest.approx(resolving_power_to_split(("O", 16, 4), ("C", 12, 3)), rel=1e-6)
    assert 950 < got["4He1+"] < 1100
    assert 2900 < got["12C3+"] < 3400
    assert report.max_resolving_power_needed == pytest.approx(got["12C3+"])


def test_interferers_beyond_the_search_range_are_not_listed():
    lines = cc.aq_lines({"20Ne": {1: 1.0}, "40Ar": {2: 1.0}}, residual_gas={})
    far = cc.overlaps(lines, target=("20Ne", 1), resolving_power=1e5, search_fwhm=3.0)
    assert len(far) == 0
    assert far.purity == pytest.approx(1.0)


@pytest.mark.parametrize(
    "kwargs",
    [
        {"resolving_power": 0.0},
        {"resolving_power": -5.0},
        {"resolving_power": float("nan")},
        {"shape": "lorentzian"},
        {"shape": 3},
        {"window_fwhm": 0.0},
        {"search_fwhm": -1.0},
        {"target": ("20Ne", 3)},  # not in the list
        {"target": ("Ne", 1)},  # which isotope?
        {"target": "20Ne"},
        {"target": ("20Ne", 1.5)},
    ],
)
def test_bad_overlap_inputs_raise_chargecast_errors(kwargs):
    lines = cc.aq_lines({"Ne": {1: 1.0}}, residual_gas={})
    args = {"target": ("20Ne", 1), "resolving_power": 100.0, **kwargs}
    with pytest.raises(cc.ChargecastError):
        cc.overlaps(lines, **args)


# --- clean charge states


def test_clean_charge_states_avoid_residual_gas_coincidences():
    o = {3: 0.3, 4: 0.4, 5: 0.3}
    ranking = cc.clean_charge_states({"16O": o}, "16O", aq_window=0.01, residual_gas={"12C": {3: 1.0}})
    assert ranking.charge.tolist() == [3, 5, 4]
    assert ranking.fraction.tolist() == pytest.approx([0.3, 0.3, 0.4])
    assert ranking.purity[2] == pytest.approx(0.4 / 1.4)
    assert ranking.main_contaminant == [None, None, "12C3+"]
    assert ranking.to_pandas()["score"].iloc[0] == pytest.approx(0.3)


def test_clean_charge_states_with_peaks_uses_the_erf_window_shares():
    lines = cc.aq_lines({"16O": {4: 1.0}, "12C": {3: 0.5}}, residual_gas={})
    r = 5000.0
    ranking = cc.clean_charge_states(lines, "16O", resolving_power=r)
    i = {lab: k for k, lab in enumerate(lines.label.tolist())}
    t, x = lines.m_over_q[i["16O4+"]], lines.m_over_q[i["12C3+"]]
    lo, hi = t - 0.5 * t / r, t + 0.5 * t / r
    signal = gaussian_window_share(t, t / r, lo, hi)
    foreign = 0.5 * gaussian_window_share(x, x / r, lo, hi)
    assert ranking.purity[0] == pytest.approx(signal / (signal + foreign), rel=1e-12)
    relative = cc.clean_charge_states(lines, "16O", relative_window=0.5 / r)
    assert relative.purity[0] == pytest.approx(1.0)  # sticks: 12C3+ lies outside ±1/(2R)


@pytest.mark.parametrize(
    "kwargs",
    [
        {},  # no window
        {"aq_window": 0.1, "relative_window": 0.01},
        {"aq_window": -0.1},
        {"relative_window": 0.0},
        {"resolving_power": 0.0},
        {"aq_window": 0.1, "target_isotope": "13C"},  # absent
        {"aq_window": 0.1, "target_isotope": 16},
    ],
)
def test_bad_clean_inputs_raise_chargecast_errors(kwargs):
    args = {"target_isotope": "16O", "residual_gas": {}, **kwargs}
    with pytest.raises(cc.ChargecastError):
        cc.clean_charge_states({"16O": {4: 1.0}}, **args)


# --- random inputs raise only ChargecastError

_specs = st.one_of(
    st.sampled_from(
        ["Kr", "84Kr", "Kr-84", "Ne", "20Ne", "H", "U", "Tc", "99Tc", "Au", "Xx", "", "12C", "Og"]
    ),
    st.text(max_size=8),
)
_numbers = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(-(10**6), 10**6),
    st.just(True),
    st.none(),
    st.text(max_size=3),
)
_fractions = st.one_of(
    st.lists(st.floats(allow_nan=True, allow_infinity=True, width=32), max_size=40),
    st.dictionaries(st.integers(-3, 100), _numbers, max_size=4),
    _numbers,
)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(spec=st.one_of(_specs, _numbers), charge=st.one_of(st.integers(-5, 200), _numbers))
def test_random_ion_mass_inputs_raise_only_chargecast_errors(spec, charge):
    try:
        value = cc.ion_mass_u(spec, charge)
    except cc.ChargecastError:
        return
    assert math.isfinite(value) and value > 0


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    species=st.dictionaries(_specs, _fractions, max_size=3),
    amounts=st.one_of(st.none(), st.dictionaries(_specs, _numbers, max_size=2)),
    residual=st.one_of(st.none(), st.dictionaries(_specs, st.one_of(_numbers, _fractions), max_size=2)),
)
def test_random_line_inputs_raise_only_chargecast_errors(species, amounts, residual):
    try:
        lines = cc.aq_lines(species, amounts=amounts, residual_gas=residual)
    except cc.ChargecastError:
        return
    assert np.all(np.diff(lines.m_over_q) >= 0)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    target=st.one_of(st.tuples(_specs, st.integers(-3, 40)), _numbers),
    r=_numbers,
    shape=st.one_of(st.sampled_from(["gaussian", "triangular", "rectangular", "x"]), _numbers),
    window=_numbers,
    search=_numbers,
    aq=st.one_of(st.none(), _numbers),
)
def test_random_overlap_and_clean_inputs_raise_only_chargecast_errors(target, r, shape, window, search, aq):
    lines = cc.aq_lines({"Kr": {24: 0.3, 25: 0.4, 26: 0.3}}, residual_gas={"O": 1.0, "Ar": 1.0})
    try:
        report = cc.overlaps(
            lines, target=target, resolving_power=r, shape=shape, window_fwhm=window, search_fwhm=search
        )
        assert 0.0 <= report.purity <= 1.0
    except cc.ChargecastError:
        pass
    iso = target[0] if isinstance(target, tuple) else target
    try:
        ranking = cc.clean_charge_states(
            lines, iso, aq_window=aq, resolving_power=r, shape=shape, window_fwhm=window
        )
        assert np.all(np.diff(ranking.score) <= 0)
    except cc.ChargecastError:
        pass


def test_docstring_examples_run():
    failures, tried = doctest.testmod(spectrum, optionflags=doctest.NORMALIZE_WHITESPACE | doctest.ELLIPSIS)
    assert tried > 10
    assert failures == 0
