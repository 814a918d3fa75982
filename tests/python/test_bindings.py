"""The binding pattern: sources are compiled classes built in one validated step from keyword
arguments and read-only afterwards; results are the Python package's subclasses of compiled
result classes, with named fields, and cannot be made from nothing."""

from __future__ import annotations

import numpy as np
import pytest

import chargecast as cc
from chargecast import _core


@pytest.fixture(scope="module")
def beam() -> cc.ElectronBeam:
    return cc.ElectronBeam(5000.0, 0.2, radius_m=60e-6)


def test_a_trap_holds_the_settings_it_was_built_with(beam) -> None:
    photons = cc.PhotonBeam(1500.0, 1e20, bandwidth_ev=2.0)
    trap = cc.BeamTrap(
        beam,
        0.4,
        residual_gas_pa={"H2": 2e-9},
        ion_temperature_ev=70.0,
        gas_temperature_k=77.0,
        compensation=0.3,
        feed=(1, 5.0),
        processes=("ionization", "charge_exchange"),
        photon_beam=photons,
    )
    assert (trap.length_m, trap.ion_temperature_ev, trap.gas_temperature_k) == (0.4, 70.0, 77.0)
    assert trap.compensation == 0.3 and trap.feed == (1, 5.0) and trap.loss_per_s is None
    assert trap.residual_gas_pa == {"H2": 2e-9}
    assert trap.processes == ["ionization", "charge_exchange"]
    assert trap.photon_beam.bandwidth_ev == 2.0 and trap.beam.energy_ev == 5000.0
    # The defaults are the core's: 50 eV, 300 K, half the space charge compensated.
    plain = cc.BeamTrap(beam, 0.4)
    assert (plain.ion_temperature_ev, plain.gas_temperature_k, plain.compensation) == (50.0, 300.0, 0.5)
    assert plain.processes == [
        "ionization",
        "radiative_recombination",
        "charge_exchange",
        "excitation_autoionization",
        "dielectronic_recombination",
    ]


def test_sources_are_read_only_and_take_their_options_by_keyword(beam) -> None:
    trap = cc.BeamTrap(beam, 0.4)
    with pytest.raises(AttributeError):
        trap.compensation = 0.9  # type: ignore[misc]
    with pytest.raises(TypeError):
        cc.BeamTrap(beam, 0.4, {"H2": 1e-9})  # type: ignore[misc]
    with pytest.raises(TypeError):
        cc.PhotonBeam(100.0, 1.0, 0.5)  # type: ignore[misc]
    with pytest.raises(cc.InvalidParameterError, match="processes"):
        cc.BeamTrap(beam, 0.4, processes=("ionization", "fusion"))
    with pytest.raises(cc.InvalidParameterError, match="processes"):
        cc.BeamTrap(beam, 0.4, processes="ionization")
    with pytest.raises(cc.InvalidParameterError, match="feed"):
        cc.BeamTrap(beam, 0.4, feed=(-1, 1.0))
    with pytest.raises(cc.InvalidParameterError, match="loss_per_s"):
        cc.BeamTrap(beam, 0.4, loss_per_s=[1.0, -2.0])


def test_results_are_the_package_classes(beam) -> None:
    trap = cc.BeamTrap(beam, 0.4, residual_gas_pa={"H2": 1e-9})
    times = np.geomspace(1e-4, 1e-1, 8)
    photons = cc.PhotonBeam(1000.0, 1e21)
    source = cc.ElectronImpactSource(100.0)
    made = [
        (trap.evolve("Ne", times), cc.Evolution),
        (cc.evolve_batch([(trap, "Ne")], times)[0], cc.Evolution),
        (photons.evolve("Ne", times), cc.Evolution),
        (trap.best_energy("Ne", 8, [1000.0, 3000.0], times), cc.EnergyScan),
        (photons.best_energy("Ne", 8, [300.0, 1500.0], times), cc.PhotonEnergyScan),
        (cc.photon_thresholds("Ne", 1000.0), cc.PhotonThresholds),
        (cc.photon_selectivity(["Ne", "Xe"], 14.0), cc.PhotonSelectivity),
        (source.charge_yields("Ar"), cc.ChargeYields),
        (source.appearance_curves("Ar", [20.0, 60.0]), cc.AppearanceCurves),
    ]
    for obj, cls in made:
        assert type(obj) is cls, (type(obj), cls)
        assert hasattr(obj, "_repr_html_")


@pytest.mark.parametrize(
    "cls",
    [_core.EnergyScan, _core.PhotonThresholds, _core.PhotonSelectivity, _core.ChargeYields, cc.ChargeYields],
)
def test_result_classes_cannot_be_made_from_nothing(cls) -> None:
    with pytest.raises(TypeError, match="results"):
        cls()


def test_rows_have_named_fields() -> None:
    th = cc.photon_thresholds("Ar", 3300.0)
    row = th.rows[3]
    assert row.charge == 4 and row.threshold_ev == pytest.approx(th.threshold_ev[3])
    # Ar4+ comes from K holes, and (through shake-off and double Auger) from L holes too.
    assert [r.subshell for r in row.routes][0] == "1s" and 0 < row.routes[0].probability <= 1
    sel = cc.photon_selectivity(["Xe", "Ar"], 14.0).rows
    assert [(r.symbol, r.ionizes) for r in sel] == [("Xe", True), ("Ar", False)]
    carbon = {i.mass_number: i for i in cc.element("C").isotopes()}
    assert carbon[12].mass_u == 12.0 and carbon[14].abundance is None
    k_edge = cc.element("Ar").xray_levels()[0]
    assert (k_edge.edge, k_edge.subshell) == ("K", "1s") and k_edge.binding_ev > 3000.0


def test_an_evolution_made_from_arrays_checks_its_shape() -> None:
    evo = cc.Evolution("He", [0.0, 1.0], [[1.0, 0.0, 0.0], [0.2, 0.5, 0.3]], label="invented")
    assert evo.z == 2 and evo.label == "invented" and evo.charges.tolist() == [0, 1, 2]
    np.testing.assert_allclose(evo.at(0.5), [0.6, 0.25, 0.15])
    assert evo.dominant_charges(0.4) == [0, 1]
    with pytest.raises(cc.InvalidParameterError, match="fractions"):
        cc.Evolution("He", [0.0, 1.0], [[1.0, 0.0, 0.0]])
