"""chargecast — plans ion-source runs.

Charge-state distributions in electron-beam traps, photon beams and single-collision
electron sources; breeding times; ion yields; and the A/q (m/z) neighbourhood of every
ion in the source. Energies in eV, cross sections in cm², everything else SI; the unit
is in every parameter name.

Results are planning estimates. Ion sources involve high voltage, X-rays, intense photon
beams, strong magnets, cryogens and sometimes radioactive species: follow local codes,
the facility's radiation-safety officer and licensed practice.
"""

from __future__ import annotations

from chargecast import _core
from chargecast._core import (
    ArgumentTypeError,
    ChargecastError,
    ChargecastWarning,
    ChargeOutOfRangeError,
    InvalidParameterError,
    NoDataError,
    ScenarioError,
    UnknownElementError,
    UnknownGasError,
    memory_limit_bytes,
    set_memory_limit_bytes,
)

# --- atoms and electron-impact cross sections (foundation)
from chargecast.atoms import (
    Element,
    Ion,
    breeding_ladder,
    breeding_time_s,
    element,
    j_tau_c_cm2,
    lotz_cross_section_cm2,
    lotz_peak_energy_ev,
    lotz_rate_coefficient_cm3_s,
)

# --- electron beam, trap, evolution, general rate equations
from chargecast.beam_trap import BeamTrap, EnergyScan, evolve_batch
from chargecast.electron_beam import (
    ElectronBeam,
    brillouin_radius_m,
    effective_energy_ev,
    herrmann_radius_m,
)
from chargecast.evolution import Evolution
from chargecast.rate_equations import solve_rate_equations, steady_state_rate_equations
from chargecast.trap_dynamics import DynamicRun

# --- photon beams and the single-collision electron-impact source
# isort: split
from chargecast.electron_impact import AppearanceCurves, ChargeYields, ElectronImpactSource, appearance_curves
from chargecast.photon_beam import (
    PhotonBeam,
    PhotonEnergyScan,
    PhotonSelectivity,
    PhotonThresholds,
    photoionization_cross_section_cm2,
    photon_selectivity,
    photon_thresholds,
    subshell_photoionization_cross_sections_cm2,
    vacancy_relaxation,
)

# --- molecules: formulas, isotopologues, ionization energies, fragmentation patterns
# isort: split
from chargecast._core import Molecule, MoleculeYields, molecule

# --- spectrum: masses, A/q lines, overlaps
# isort: split
from chargecast.spectrum import (
    DEFAULT_RESIDUAL_GAS,
    ChargeStateRanking,
    LineList,
    OverlapReport,
    aq_lines,
    clean_charge_states,
    ion_mass_u,
    overlaps,
)

# --- radioactive-beam breeding cycle and residual-gas ions from pressures
# isort: split
from chargecast.rib import BreedingCycle, breeding_cycle, residual_gas_ions

# --- indirect and resonant processes (excitation–autoionization, dielectronic recombination)
# isort: split
from chargecast.indirect import (
    DrResonances,
    dielectronic_cross_section_cm2,
    dielectronic_rate_coefficient_cm3_s,
    dr_resonances,
    excitation_autoionization_cross_section_cm2,
    excitation_autoionization_rate_coefficient_cm3_s,
    ionization_cross_section_cm2,
)

# --- plasma source and its rate coefficients
# isort: split
from chargecast.plasma import (
    PlasmaSource,
    PlasmaState,
    charge_exchange_rate_coefficient_cm3_s,
    radiative_recombination_rate_coefficient_cm3_s,
)

# --- scenario files and reports
# isort: split
from chargecast.scenario import Report, Scenario, bundled_scenarios, load_scenario

# --- fits and Monte Carlo bands (cluster runs: chargecast.dask, imported on use)
# isort: split
from chargecast.fit import FitResult, PlasmaFitModel, TrapFitModel, fit_charge_distribution
from chargecast.uncertainty import EvolutionBands, best_energy_band

__version__: str = _core.__version__

__all__ = [
    "DrResonances",
    "dielectronic_cross_section_cm2",
    "dielectronic_rate_coefficient_cm3_s",
    "dr_resonances",
    "excitation_autoionization_cross_section_cm2",
    "excitation_autoionization_rate_coefficient_cm3_s",
    "ionization_cross_section_cm2",
    "AppearanceCurves",
    "ChargeYields",
    "ElectronImpactSource",
    "PhotonBeam",
    "PhotonEnergyScan",
    "PhotonSelectivity",
    "PhotonThresholds",
    "appearance_curves",
    "photoionization_cross_section_cm2",
    "photon_selectivity",
    "photon_thresholds",
    "subshell_photoionization_cross_sections_cm2",
    "vacancy_relaxation",
    "DEFAULT_RESIDUAL_GAS",
    "ChargeStateRanking",
    "LineList",
    "OverlapReport",
    "aq_lines",
    "clean_charge_states",
    "ion_mass_u",
    "overlaps",
    "BeamTrap",
    "ElectronBeam",
    "EnergyScan",
    "Evolution",
    "DynamicRun",
    "brillouin_radius_m",
    "effective_energy_ev",
    "evolve_batch",
    "herrmann_radius_m",
    "solve_rate_equations",
    "memory_limit_bytes",
    "set_memory_limit_bytes",
    "steady_state_rate_equations",
    "Element",
    "Ion",
    "breeding_ladder",
    "breeding_time_s",
    "element",
    "j_tau_c_cm2",
    "lotz_cross_section_cm2",
    "lotz_peak_energy_ev",
    "lotz_rate_coefficient_cm3_s",
    "ArgumentTypeError",
    "ChargecastError",
    "ChargecastWarning",
    "ChargeOutOfRangeError",
    "InvalidParameterError",
    "NoDataError",
    "ScenarioError",
    "UnknownElementError",
    "UnknownGasError",
    "Report",
    "Scenario",
    "bundled_scenarios",
    "load_scenario",
    "BreedingCycle",
    "breeding_cycle",
    "residual_gas_ions",
    "PlasmaSource",
    "PlasmaState",
    "charge_exchange_rate_coefficient_cm3_s",
    "radiative_recombination_rate_coefficient_cm3_s",
    "EvolutionBands",
    "FitResult",
    "PlasmaFitModel",
    "TrapFitModel",
    "best_energy_band",
    "fit_charge_distribution",
    # molecules
    "Molecule",
    "MoleculeYields",
    "molecule",
]
