"""Molecules: formulas, isotopologue patterns against molmass, ionization energies against the
cited table, molecular lines and the single-collision source on molecules."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import chargecast as cc

molmass = pytest.importorskip("molmass")

GASES = ["H2", "N2", "O2", "CO", "CO2", "H2O", "CH4", "NH3", "D2O", "13CO", "HD"]


@pytest.mark.parametrize("formula", GASES)
def test_masses_and_isotopologue_patterns_agree_with_molmass(formula: str) -> None:
    # molmass (PyPI): every isotopologue's mass to 1e-6 u (measured: below 2e-9 u); the
    # shares per nominal mass to 1e-3 (measured: at most 3.1e-4, for N2 — molmass's 14N
    # abundance 0.99636 against mendeleev's IUPAC 0.99620).
    import re

    m = cc.molecule(formula)
    ref = molmass.Formula(formula.replace("13C", "[13C]"))
    assert m.monoisotopic_mass_u == pytest.approx(ref.monoisotopic_mass, abs=1e-6)
    iso = m.isotopologues()
    by_nominal: dict[int, float] = {}
    for label, a, mass, share in zip(iso["label"], iso["mass_number"], iso["mass_u"], iso["abundance"]):
        by_nominal[int(a)] = by_nominal.get(int(a), 0.0) + share
        if share > 1e-9:
            explicit = re.sub(r"\((\d+)([A-Z][a-z]?)\)", r"[\1\2]", label)
            assert mass == pytest.approx(molmass.Formula(explicit).monoisotopic_mass, abs=1e-6), label
    for a, entry in ref.spectrum().items():
        if entry.fraction > 1e-6:
            assert by_nominal[a] == pytest.approx(entry.fraction, abs=1e-3), (formula, a)


def test_isotopologue_pattern_is_the_multinomial_over_mendeleev_abundances() -> None:
    # Independent check: the multinomial n!/∏k! ∏p^k written out with mendeleev's abundances
    # (the source of the isotope table; they need not sum to exactly 1) for CO2 and CH4.
    from mendeleev import element as mendeleev_element

    def pmf(k: tuple[int, ...], n: int, p: list[float]) -> float:
        out = float(math.factorial(n))
        for ki, pi in zip(k, p):
            out *= pi**ki / math.factorial(ki)
        return out

    def natural(symbol: str) -> list[tuple[int, float]]:
        isotopes = mendeleev_element(symbol).isotopes
        return [(i.mass_number, i.abundance / 100.0) for i in isotopes if i.abundance]

    for formula, counts in [("CO2", {"C": 1, "O": 2}), ("CH4", {"C": 1, "H": 4})]:
        iso = cc.molecule(formula).isotopologues()
        got = dict(zip(iso["label"], iso["abundance"]))
        (e1, n1), (e2, n2) = counts.items()
        i1, i2 = natural(e1), natural(e2)
        for k1 in np.ndindex(*([n1 + 1] * len(i1))):
            if sum(k1) != n1:
                continue
            p1 = pmf(k1, n1, [p for _, p in i1])
            for k2 in np.ndindex(*([n2 + 1] * len(i2))):
                if sum(k2) != n2:
                    continue
                p2 = pmf(k2, n2, [p for _, p in i2])
                parts = {}
                for (a, _), k in zip(i1, k1):
                    if k:
                        parts[(cc.element(e1).z, a)] = f"({a}{e1})" + (str(k) if k > 1 else "")
                for (a, _), k in zip(i2, k2):
                    if k:
                        parts[(cc.element(e2).z, a)] = f"({a}{e2})" + (str(k) if k > 1 else "")
                label = "".join(parts[key] for key in sorted(parts))
                if p1 * p2 > 1e-14:
                    assert got[label] == pytest.approx(p1 * p2, rel=1e-9, abs=1e-15), label


def test_ionization_energies_match_the_cited_table() -> None:
    # NIST Chemistry WebBook, IE (evaluated) (S. G. Lias): CO 14.014, H2O 12.621, NH3 10.070;
    # CH4 12.61 (CCCBDB experimental value); checked on those pages 2026-12-02.
    for formula, ie in [("CO", 14.014), ("H2O", 12.621), ("NH3", 10.070), ("CH4", 12.61)]:
        m = cc.molecule(formula)
        assert m.ionization_energies_ev[0] == pytest.approx(ie, abs=1e-9)
        assert "checked" in m.ionization_energy_sources[0]
    # From memory (NIST WebBook): H2 15.426, N2 15.581, O2 12.070, CO2 13.777.
    for formula, ie in [("H2", 15.426), ("N2", 15.581), ("O2", 12.070), ("CO2", 13.777)]:
        m = cc.molecule(formula)
        assert m.ionization_energies_ev[0] == pytest.approx(ie, abs=1e-3)
        assert "from memory" in m.ionization_energy_sources[0]


def test_formulas_and_elements_are_told_apart() -> None:
    assert cc.molecule("CO").name == "carbon monoxide"
    assert cc.element("Co").z == 27
    with pytest.raises(cc.InvalidParameterError, match="carbon monoxide"):
        cc.element("CO")
    with pytest.raises(cc.InvalidParameterError, match="(?i)nobelium"):
        cc.molecule("NO")
    with pytest.raises(cc.InvalidParameterError, match="(?i)cobalt"):
        cc.molecule("Co")
    with pytest.raises(cc.ArgumentTypeError):
        cc.molecule(28)  # type: ignore[arg-type]
    assert cc.element("argon").z == cc.element("Argon").z == 18


def test_aq_lines_takes_formulas() -> None:
    lines = cc.aq_lines({"CO": {1: 1.0}, "H2O": {1: 1.0}}, residual_gas={})
    main = [str(s) for s in lines.isotope[lines.intensity > 0.5]]
    assert main == ["(1H)2(16O)", "(12C)(16O)"]
    assert set(lines.z.tolist()) == {0}
    # Round trip through the core (select re-checks the lines).
    again = lines.select(lines.intensity > 1e-3)
    assert len(again) == int(np.sum(lines.intensity > 1e-3))
    # The m/z 28 doublet: R = m/Δm ≈ 2 500 (common practice).
    lines = cc.aq_lines({"N2": {1: 1.0}, "CO": {1: 1.0}}, residual_gas={})
    n2 = float(lines.m_over_q[list(lines.isotope).index("(14N)2")])
    co = float(lines.m_over_q[list(lines.isotope).index("(12C)(16O)")])
    assert 2400 < n2 / abs(n2 - co) < 2600
    # Molecular lines interfere with an atomic target: 28Si+ sits 0.018 u below CO+.
    report = cc.overlaps(
        {"28Si": {1: 1.0}, "CO": {1: 1.0}}, target=("28Si", 1), resolving_power=1000, residual_gas={}
    )
    assert "(12C)(16O)" in [str(s) for s in report.isotope]


def test_the_single_collision_source_on_molecules() -> None:
    src = cc.ElectronImpactSource(energy_ev=70.0)
    y = src.molecule_yields("CO2")
    assert y.ions[0] == "CO2" and y.charges[0] == 1
    assert y.shares.sum() == pytest.approx(1.0)
    assert y.cross_section_cm2.sum() == pytest.approx(y.total_cross_section_cm2)
    spectrum = cc.aq_lines(y.species(), residual_gas={})
    nominal = set(np.round(spectrum.a_over_q[spectrum.intensity > 1e-3]).astype(int).tolist())
    assert {12, 16, 22, 28, 44} <= nominal  # C+, O+, CO2 2+ (A/q 22), CO+, CO2+
    user = src.molecule_yields("CO2", pattern=[("CO2", 1, 1.0), ("O", 1, 1.0)])
    assert user.shares.tolist() == [0.5, 0.5]
    assert math.isnan(user.relative_uncertainty[0])
    with pytest.raises(cc.InvalidParameterError):
        src.molecule_yields("CO2", pattern=[("N2", 1, 1.0)])
    with pytest.raises(cc.ArgumentTypeError):
        src.molecule_yields("CO2", pattern=[1, 2])  # type: ignore[list-item]
    assert cc.ElectronImpactSource(energy_ev=10.0).molecule_yields("CO2").total_cross_section_cm2 == 0.0


SYMBOLS = [cc.element(z).symbol for z in range(1, 104)]


@settings(max_examples=100, deadline=None)
@given(st.lists(st.tuples(st.sampled_from(SYMBOLS), st.integers(1, 4)), min_size=2, max_size=3))
def test_no_formula_resolves_to_an_element(parts: list[tuple[str, int]]) -> None:
    formula = "".join(s if n == 1 else f"{s}{n}" for s, n in parts)
    with pytest.raises(cc.ChargecastError):
        cc.element(formula)
    with pytest.raises(cc.ChargecastError):
        cc.ion_mass_u(formula, 1)
    try:
        m = cc.molecule(formula)
    except cc.ChargecastError:
        return  # refused as ambiguous (capitals only, also an element): never an element
    assert sum(n for _, n in m.composition) >= 2


def test_molecule_yields_example_runs() -> None:
    # The method's docstring example (method docstrings are not collected by test_docs).
    import doctest

    doc = cc.ElectronImpactSource.molecule_yields.__doc__ or ""
    test = doctest.DocTestParser().get_doctest(doc, {}, "molecule_yields", None, 0)
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    runner.run(test)
    assert runner.failures == 0 and test.examples
