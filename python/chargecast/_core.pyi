# Type stubs of the compiled extension module chargecast._core.
from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

class ChargecastError(ValueError): ...
class UnknownElementError(ChargecastError): ...
class ChargeOutOfRangeError(ChargecastError): ...
class NoDataError(ChargecastError): ...
class InvalidParameterError(ChargecastError): ...
class UnknownGasError(InvalidParameterError): ...
class ScenarioError(ChargecastError): ...

# --- atoms
# --- engine
# --- photon
from typing import Any  # noqa: E402

def _photoionization_subshells(
    element: str | int, charge: int, photon_energy_ev: NDArray[np.float64]
) -> tuple[list[str], list[float], list[list[str]], NDArray[np.float64]]: ...
def _vacancy_relaxation(
    element: str | int, charge: int, subshell: str
) -> tuple[NDArray[np.float64], int]: ...
def _photon_thresholds(
    element: str | int, photon_energy_ev: float
) -> list[tuple[int, float, float, list[tuple[str, float, float]]]]: ...
def _photon_selectivity(
    elements: list[str | int], photon_energy_ev: float
) -> list[tuple[str, float, bool, int, float]]: ...
def _photon_beam_check(photon_energy_ev: float, flux_cm2_s: float, bandwidth_ev: float) -> None: ...
def _photon_rates(
    element: str | int, photon_energy_ev: float, flux_cm2_s: float, bandwidth_ev: float
) -> NDArray[np.float64]: ...
def _photon_evolve(
    element: str | int,
    photon_energy_ev: float,
    flux_cm2_s: float,
    bandwidth_ev: float,
    times_s: NDArray[np.float64],
    initial_charge: int,
) -> NDArray[np.float64]: ...
def _photon_steady_state(
    element: str | int, photon_energy_ev: float, flux_cm2_s: float, bandwidth_ev: float
) -> NDArray[np.float64]: ...
def _photon_energy_time_map(
    element: str | int,
    charges: list[int],
    flux_cm2_s: float,
    bandwidth_ev: float,
    photon_energies_ev: NDArray[np.float64],
    times_s: NDArray[np.float64],
) -> dict[str, Any]: ...
def _impact_source_check(energy_ev: float, energy_spread_ev: float) -> None: ...
def _impact_cross_sections(
    element: str | int, energy_ev: float, energy_spread_ev: float
) -> tuple[NDArray[np.float64], NDArray[np.float64]]: ...
def _appearance_curves(
    element: str | int, energies_ev: NDArray[np.float64], energy_spread_ev: float
) -> NDArray[np.float64]: ...

# --- spectrum
_LineColumns = tuple[list[int], list[int], list[int], list[float], list[bool]]

def _ion_mass_u(isotope: str, charge: int) -> float: ...
def _species_info(spec: str) -> tuple[int, str, str | None]: ...
def _aq_lines(species: list[tuple[str, float, list[float], bool]]) -> dict[str, object]: ...
def _rebuild_lines(columns: _LineColumns) -> dict[str, object]: ...
def _overlaps(
    columns: _LineColumns,
    target: str,
    charge: int,
    resolving_power: float,
    shape: str,
    window_fwhm: float,
    search_fwhm: float,
) -> dict[str, object]: ...
def _clean_charge_states(
    columns: _LineColumns,
    target: str,
    window_kind: str,
    window_value: float,
    resolving_power: float | None = None,
    shape: str = "gaussian",
) -> dict[str, object]: ...
def _peak_profile(
    m_over_q: list[float], intensity: list[float], x: list[float], resolving_power: float, shape: str
) -> NDArray[np.float64]: ...

# --- scenario
def parse_scenario(text: str, filename: str = "<scenario>") -> dict[str, object]: ...
