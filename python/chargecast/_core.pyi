# Type stubs of the compiled extension module chargecast._core.
from __future__ import annotations

from typing import Any, final

__version__: str

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
@final
class Element:
    @property
    def z(self) -> int: ...
    @property
    def symbol(self) -> str: ...
    @property
    def name(self) -> str: ...
    @property
    def atomic_weight_u(self) -> float: ...
    @property
    def ionization_energies_ev(self) -> NDArray[np.float64]: ...
    @property
    def ionization_uncertainties_ev(self) -> NDArray[np.float64]: ...
    @property
    def ionization_energy_kinds(self) -> list[str]: ...
    @property
    def is_complete(self) -> bool: ...
    def ion(self, charge: int) -> Ion: ...
    def configuration(self, charge: int) -> str: ...
    def isotopes(self) -> list[tuple[int, float, float | None]]: ...
    def xray_levels(self) -> list[tuple[str, str, float, float, float]]: ...
    def __eq__(self, other: object, /) -> bool: ...
    def __hash__(self) -> int: ...

@final
class Ion:
    @property
    def element(self) -> Element: ...
    @property
    def charge(self) -> int: ...
    @property
    def electrons(self) -> int: ...
    @property
    def configuration(self) -> str: ...
    @property
    def ionization_energy_ev(self) -> float | None: ...
    @property
    def threshold_ev(self) -> float: ...
    @property
    def ionized_subshell(self) -> str | None: ...
    @property
    def valence_shell(self) -> tuple[int, int]: ...
    def subshells(self) -> list[tuple[str, int, float]]: ...

def element(value: str | int) -> Element: ...
def lotz_cross_section_cm2(
    element: str | int,
    charge: int,
    energy_ev: NDArray[np.float64],
    a: float | None = None,
    b: float | None = None,
    c: float | None = None,
) -> NDArray[np.float64]: ...
def lotz_rate_coefficient_cm3_s(
    element: str | int,
    charge: int,
    temperature_ev: NDArray[np.float64],
    a: float | None = None,
    b: float | None = None,
    c: float | None = None,
) -> NDArray[np.float64]: ...
def lotz_peak_energy_ev(
    element: str | int, charge: int, a: float | None = None, b: float | None = None, c: float | None = None
) -> float: ...
def _breeding_time_s(
    element: str | int,
    charge: int,
    energy_ev: NDArray[np.float64],
    current_density_a_cm2: float,
    a: float | None = None,
    b: float | None = None,
    c: float | None = None,
) -> NDArray[np.float64]: ...
def _breeding_ladder(
    element: str | int,
    charge: int,
    energy_ev: float,
    current_density_a_cm2: float,
    a: float | None = None,
    b: float | None = None,
    c: float | None = None,
) -> dict[str, Any]: ...

# --- engine
@final
class ElectronBeam:
    def __new__(
        cls,
        energy_ev: float,
        current_a: float,
        *,
        radius_m: float | None = None,
        current_density_a_cm2: float | None = None,
        magnetic_field_t: float | None = None,
        cathode_radius_m: float | None = None,
        cathode_temperature_k: float | None = None,
        cathode_field_t: float | None = None,
    ) -> ElectronBeam: ...
    @property
    def energy_ev(self) -> float: ...
    @property
    def current_a(self) -> float: ...
    @property
    def radius_m(self) -> float: ...
    @property
    def current_density_a_cm2(self) -> float: ...
    @property
    def speed_m_s(self) -> float: ...
    @property
    def electron_flux_per_cm2_s(self) -> float: ...
    def space_charge_depression_v(self, drift_tube_radius_m: float) -> float: ...

@final
class _BeamTrap:
    def __new__(
        cls,
        beam: ElectronBeam,
        length_m: float,
        residual_gas_pa: list[tuple[str, float]],
        ion_temperature_ev: float,
        gas_temperature_k: float,
        compensation: float,
        loss_per_s: list[float] | None,
        feed_charge: int | None,
        feed_per_s: float,
        ionization: bool,
        radiative_recombination: bool,
        charge_exchange: bool,
        photon_beam: tuple[float, float, float] | None = None,
        multiple_ionization: bool = False,
    ) -> _BeamTrap: ...
    @property
    def beam(self) -> ElectronBeam: ...
    @property
    def electrons_in_trap(self) -> float: ...
    def evolve(
        self, element: str | int, times_s: NDArray[np.float64], initial_charge: int
    ) -> NDArray[np.float64]: ...
    def steady_state(self, element: str | int) -> NDArray[np.float64]: ...
    def rates(self, element: str | int) -> NDArray[np.float64]: ...
    def ions_per_extraction(self, fractions: NDArray[np.float64]) -> NDArray[np.float64]: ...
    def with_energy(self, energy_ev: float) -> _BeamTrap: ...
    def energy_time_map(
        self,
        element: str | int,
        charges: list[int],
        energies_ev: NDArray[np.float64],
        times_s: NDArray[np.float64],
    ) -> dict[str, Any]: ...
    def sweep(
        self, elements: list[str | int], energies_ev: NDArray[np.float64], times_s: NDArray[np.float64]
    ) -> dict[str, NDArray[np.float64]]: ...

def _evolve_batch(
    traps: list[_BeamTrap], elements: list[str | int], times_s: NDArray[np.float64]
) -> list[NDArray[np.float64]]: ...
def solve_rate_equations(
    rates_per_s: NDArray[np.float64],
    initial: NDArray[np.float64],
    times_s: NDArray[np.float64],
    loss_per_s: NDArray[np.float64] | None = None,
    feed_per_s: NDArray[np.float64] | None = None,
) -> NDArray[np.float64]: ...
def steady_state_rate_equations(
    rates_per_s: NDArray[np.float64],
    loss_per_s: NDArray[np.float64] | None = None,
    feed_per_s: NDArray[np.float64] | None = None,
) -> NDArray[np.float64]: ...
def _electron_speed_m_s(energy_ev: float) -> float: ...
def _brillouin_radius_m(current_a: float, energy_ev: float, magnetic_field_t: float) -> float: ...
def _herrmann_radius_m(
    current_a: float,
    energy_ev: float,
    magnetic_field_t: float,
    cathode_radius_m: float,
    cathode_temperature_k: float,
    cathode_field_t: float,
) -> float: ...
def _effective_energy_ev(
    tube_to_cathode_v: float,
    current_a: float,
    beam_radius_m: float,
    drift_tube_radius_m: float,
    compensation: float,
) -> float: ...
def _electrons_in_trap(current_a: float, energy_ev: float, length_m: float) -> float: ...

# --- limits

def set_memory_limit_bytes(limit_bytes: int) -> None: ...
def memory_limit_bytes() -> int: ...

# --- photon

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
