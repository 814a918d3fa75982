"""Every public function and class documents itself with an example that runs (numpydoc,
units in the text); the compiled classes' examples run here, the Python modules' examples
run through pytest's doctest collection."""

from __future__ import annotations

import doctest
import inspect

import pytest

import chargecast as cc

RESULT_CLASSES = {
    # Result objects made by the functions whose examples show them.
    "AppearanceCurves",
    "ChargeYields",
    "PhotonEnergyScan",
    "PhotonSelectivity",
    "PhotonThresholds",
    "ChargeStateRanking",
    "LineList",
    "OverlapReport",
    "EnergyScan",
    "Report",
    "Scenario",
    "EvolutionBands",
    "FitResult",
}


def public_callables():
    for name in cc.__all__:
        obj = getattr(cc, name)
        if inspect.isclass(obj) and issubclass(obj, Exception):
            continue
        if callable(obj):
            yield name, obj


@pytest.mark.parametrize(("name", "obj"), list(public_callables()))
def test_public_callables_have_examples(name, obj) -> None:
    doc = inspect.getdoc(obj) or ""
    assert doc, f"{name} has no docstring"
    if name not in RESULT_CLASSES:
        assert ">>>" in doc, f"{name} has no example"


@pytest.mark.parametrize(
    "cls",
    [
        cc.Element,
        cc.Ion,
        cc.ElectronBeam,
        cc.BeamTrap,
        cc.PhotonBeam,
        cc.ElectronImpactSource,
        cc.evolve_batch,
        cc.photon_thresholds,
        cc.photon_selectivity,
        cc.appearance_curves,
        cc.molecule,
        cc.Molecule,
        cc.MoleculeYields,
    ],
)
def test_compiled_class_examples_run(cls) -> None:
    finder = doctest.DocTestFinder(recurse=False)
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    tests = finder.find(cls, cls.__name__, globs={})
    assert tests and tests[0].examples
    for t in tests:
        runner.run(t)
    assert runner.failures == 0
