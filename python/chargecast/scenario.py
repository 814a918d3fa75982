"""Scenario files: a planned run in one TOML file, and the report chargecast makes of it.

A scenario names a source and its settings, the species put into it, the residual gas, the
target isotope and charge state, the mass separator after the source and the time and
energy grids. :func:`load_scenario` reads and checks it (errors name the file, the line and
the field, and say what is allowed); :meth:`Scenario.run` computes the :class:`Report` in
the core (``chargecast`` Rust layer ``plan``): stepwise breeding table, charge-state
evolution, best energy and time, ions per extraction, the A/q neighbourhood of the target
and the recommended charge state. Its text, JSON, HTML and PNG views live in
``report_text``, ``report_json``, ``report_html`` and ``report_figures``.
``chargecast plan FILE.toml`` does the same from the shell.

This docstring is the schema's one reference (with the commented
``scenarios/reference.toml``); a test fails when it and the parser disagree.

Schema
------
Units are in the field names (SI, energies in eV). Fields marked *optional* may be left
out; the default is given. ``python/chargecast/scenarios/reference.toml`` is a commented
example with every field.

Top level
    ``title`` (str, optional), ``description`` (str, optional).
``[target]`` (required)
    ``isotope`` -- ``"129Xe"``, ``"Xe129"`` or ``"Xe-129"`` (an element alone only if it
    has one natural isotope, e.g. ``"Bi"``); ``charge`` -- the wanted charge state, 1 … Z.
``[[species]]`` (optional, repeatable; default: the target isotope alone)
    ``name`` -- element (``"Ne"``, natural isotopic mix) or isotope (``"22Ne"``);
    ``amount`` -- amount > 0 (default 1): in a beam trap only ratios matter (the species
    share the compensated space charge in proportion to amount × mean charge, so the A/q
    spectrum holds absolute ions per extraction); for a photon beam or a single collision
    it is the species' partial pressure (Pa), on the scale of the residual-gas partial pressures;
    ``initial_charge`` -- charge state in which it enters the source, 0 … Z−1 (default 0,
    neutral atoms). One species must provide the target isotope.
Source: exactly one of
    ``[beam_trap]`` -- electron-beam ion trap: ``energy_ev``, ``current_a``, ``length_m``
    (required); the beam size by exactly one of ``radius_m``, ``current_density_a_cm2``
    or ``magnetic_field_t`` (Brillouin radius; with ``cathode_radius_m`` and
    ``cathode_temperature_k``, optional ``cathode_field_t`` = 0, the Herrmann radius);
    ``ion_temperature_ev`` (50), ``gas_temperature_k`` (300), ``compensation`` (0.5,
    fraction 0…1 of the electron space charge filled by ions: sets the ions per
    extraction), ``processes`` (default ``"ionization"``, ``"radiative_recombination"``,
    ``"charge_exchange"``; add ``"multiple_ionization"`` for Auger cascades after inner-shell
    ionization and direct double ionization); ``drift_tube_radius_m`` (optional: the
    report then gives the tube-to-cathode voltage of the best energy after the
    space-charge depression).

    ``model`` -- the ion model: ``"fixed"`` (default: the ions of each species stay inside
    the beam at ``ion_temperature_ev``, linear rate equations) or ``"dynamic"`` (the ion
    dynamics of every species together: beam heating, energy exchange, escape over the
    barriers with evaporative cooling, overlap with the beam and the space-charge limit;
    ``ion_temperature_ev`` is then the injected atoms' temperature). The dynamic model
    takes: ``axial_barrier_v`` (100, V, >= 0), ``drift_tube_radius_m`` (5e-3, m, larger
    than the beam), ``gas_feed_pa`` (an inline table of neutral gases fed continuously,
    e.g. ``{ N2 = 2e-9 }``, Pa, the gases of the residual-gas table; default none; a fed
    gas's elements join the run as species of their own), ``dynamic_processes`` (the
    processes on, default ``"overlap"``, ``"heating"``, ``"exchange"``, ``"escape"``,
    ``"space_charge"``, ``"residual_gas_ions"`` (the residual gas is ionized like a fed
    gas, its molecules dissociated into atomic ions; leave it out to keep the residual gas a
    charge-exchange target only); add ``"ionization_heating"``), ``injected_atoms`` (atoms of all
    species injected into the beam at t = 0, > 0; default: as many as ions at the target
    charge would fill ``compensation`` of the electrons' charge). With the dynamic model
    species enter neutral, the report adds temperatures, escape fluxes (leaky-mode
    delivery), overlaps, compensation, well depth and the bookkeeping, and the energy scan
    stays on the fixed model (the report says so). The other models refuse these fields.

    ``[photon_beam]`` -- ``photon_energy_ev``, ``flux_cm2_s`` (photons cm⁻² s⁻¹),
    ``bandwidth_ev`` (optional).

    ``[electron_impact]`` -- the electron-impact source of a mass spectrometer, one
    collision per atom: ``energy_ev``, ``energy_spread_ev`` (0). Species enter neutral.

    ``[plasma]`` -- a plasma (ECR-type) ion source, model ``"plasma_balance"``:
    ``electron_temperature_ev`` (cold electrons, kT_e > 0), ``electron_density_cm3``
    (n_e > 0) and ``confinement_time_s`` (required: τ₁ > 0 of τ_q = τ₁·q^α, or an array of
    one time per charge 1 … Z of the heaviest element fed); ``confinement_exponent`` (α,
    1; only with a single time); ``gas_feed_pa`` (required inline table of the fed gases,
    e.g. ``{ Ar = 7e-7, O2 = 2.8e-6 }``, Pa >= 0, at least one > 0: the species are the
    elements of these gases, natural isotopic mix, so leave out the species tables; several
    gases mix); ``hot_electron_temperature_ev`` and ``hot_electron_fraction`` (0, 0 … 1:
    a second, hot Maxwellian); ``ion_temperature_ev`` (1); ``gas_temperature_k`` (300);
    ``neutral_residence_time_s`` (1.25e-4); ``wall_recycling`` (0, fraction 0 … 1 of the
    lost ions that return as neutrals); ``plasma_volume_m3`` (1e-4); ``extraction_fraction``
    (1, 0 < η <= 1 of the lost ions reaching the extraction). The ions leave continuously
    from the steady state: the report gives the fractions and the extracted current per
    charge in eµA of every element, the analysed-beam A/q spectrum weighted by current
    (mixing and residual gas included) at the separator's resolving power, and the
    steady state over the cold temperatures of the energy scan; the evolution shows the
    switch-on.
``[residual_gas_pa]`` (optional)
    Partial pressures (Pa) by formula: H2, He, N2, O2, CO, CO2, H2O, CH4, Ne, Ar, Kr, Xe.
    Drives charge exchange in a trap; its elements appear in the A/q spectrum: in a beam
    trap as absolute ions per extraction (gas density × beam volume × Lotz ionization of
    each atom, bred over the extraction time), otherwise weighted by the partial pressure
    of their atoms (no residual-gas lines without this table).
``[time]`` (optional)
    Log-spaced confinement times: ``start_s`` (stop_s × 1e-5), ``stop_s`` (twenty times
    the stepwise breeding time of the target in a trap, rounded up to a power of ten;
    1 s otherwise), ``points`` (300), ``extraction_s`` (default: when the target peaks).
``[energy_scan]`` (optional)
    Beam energies tried for the best energy: ``start_ev``, ``stop_ev`` (0.8 … 6 times the
    energy that opens the target charge state), ``points`` (40), ``scale`` (``"log"`` or
    ``"linear"``).
``[separator]`` (optional)
    ``resolving_power`` (200, (m/q)/FWHM), ``peak_shape`` (``"gaussian"``,
    ``"triangular"`` or ``"rectangular"``), the acceptance window around each charge
    state: ``aq_half_width`` (u/e) or ``relative_half_width`` (fraction of m/q), else
    ``window_fwhm`` (1) FWHM wide; ``aq_range`` = [lowest, highest] A/q accepted
    downstream (optional: limits the recommended charge state).
``[injection]`` (optional, beam trap only)
    Radioactive-beam breeding cycle of the target isotope: ``repetition_rate_hz``
    (required, extractions per second); exactly one of ``ions_per_s`` (continuous 1+ beam,
    accumulated upstream between injections) or ``ions_per_bunch``;
    ``capture_efficiency`` (0.5, fraction of each bunch captured); ``breeding_time_s``
    (the time table's extraction_s, else 1/repetition_rate_hz; becomes the extraction time);
    ``isotope`` (the target isotope; must be it); ``injected_charge`` (1);
    ``daughter_charge`` (``"parent"``: daughters enter at the parent's charge state, or
    ``"electrons_kept"``); ``max_nuclides`` (8, nuclides followed along the decay chains).
    The decay daughters appear in the A/q spectrum as isobaric contaminants.

``[uncertainty]`` (optional, beam trap with the fixed model, no breeding cycle)
    Monte Carlo bands over the process rates, each rate scaled by a lognormal factor:
    ``samples`` (200, 2 … 100 000), ``seed`` (0, a whole number >= 0; the same seed gives
    the same bits), the 1-σ factors ``ionization_factor`` (1.35), ``recombination_factor``
    (1.5), ``charge_exchange_factor`` (2; each >= 1, 1 = exact) and ``charge_correlation``
    (0.5, 0 … 1: how much of a process's spread the charge states share). The report gives
    the 5/50/95 % range of the target's peak time, peak fraction and ions per extraction,
    and the evolution figure shades the band of the target's fraction.

Limits
    A scenario file holds at most 1 MiB (``chargecast._core.MAX_SCENARIO_BYTES``; a longer
    file is refused without being read further); each grid has 2 … 100 000 points; and
    the run's estimated memory -- one evolution (time points × charge states) per species
    plus the energy × time map of the target -- must stay within
    chargecast.memory_limit_bytes() (2 GiB unless raised with
    chargecast.set_memory_limit_bytes), else the scenario is refused naming the estimate
    and the limit. Error messages quote at most a short prefix of a bad value.

Examples
--------
>>> import chargecast as cc
>>> scenario = cc.load_scenario(cc.bundled_scenarios()["demo"])
>>> scenario.target.isotope, scenario.target.charge
('129Xe', 43)
>>> scenario.source.kind
'beam_trap'
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any, Callable

from chargecast import _core, report_figures, report_html, report_json, report_text
from chargecast._core import ScenarioError

__all__ = ["Report", "Scenario", "bundled_scenarios", "load_scenario"]

Progress = Callable[[int, int, str], None]


def bundled_scenarios() -> dict[str, Path]:
    """The example scenarios shipped with chargecast, by name.

    Returns
    -------
    dict of str to pathlib.Path
        ``{"demo": …/demo.toml, "reference": …}``.

    Examples
    --------
    >>> "demo" in bundled_scenarios()
    True
    """
    folder = Path(__file__).resolve().parent / "scenarios"
    return {p.stem: p for p in sorted(folder.glob("*.toml"))}


def load_scenario(path: str | os.PathLike) -> Scenario:
    """Read and check a scenario file.

    Parameters
    ----------
    path : str or path-like
        A TOML file following the schema in this module's documentation, or the name of a
        bundled scenario (``"demo"``).

    Returns
    -------
    Scenario

    Raises
    ------
    ScenarioError
        Naming the file, the line and the field, and what is allowed; also for a file that
        cannot be read or holds more than ``MAX_SCENARIO_BYTES`` (1 MiB), which is read no
        further.

    Examples
    --------
    >>> s = load_scenario("demo")
    >>> s.time.points > 10
    True
    """
    if not isinstance(path, (str, os.PathLike)):
        raise TypeError(f"path: must be a str or path-like (a scenario file), got {type(path).__name__}")
    p = Path(path)
    name = _short(str(path))
    try:
        if str(path) in bundled_scenarios() and not p.exists():
            p = bundled_scenarios()[str(path)]
        # Read at most one byte past the limit: a path such as /dev/zero or a large data file
        # is refused at once instead of being read without bound.
        with open(p, "rb") as f:
            data = f.read(_core.MAX_SCENARIO_BYTES + 1)
    except OSError as exc:
        raise ScenarioError(f"{name}: cannot read the scenario file ({exc.strerror or exc})") from None
    if len(data) > _core.MAX_SCENARIO_BYTES:
        raise ScenarioError(
            f"{name}: larger than {_core.MAX_SCENARIO_BYTES} bytes (1 MiB), the most a scenario file may hold"
        )
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise ScenarioError(f"{name}: not a text file (a scenario is UTF-8 TOML)") from None
    return Scenario.from_text(text, str(p))


def _short(name: str, keep: int = 60) -> str:
    """A file name as quoted in a one-line message: at most ``keep`` characters."""
    return name if len(name) <= keep else f"{name[: keep // 2]}…{name[-keep // 2 :]}"


class Scenario(_core.Scenario):
    """A checked scenario: every field of the file with its defaults filled in.

    Attributes
    ----------
    file, title, description : str
    target : ScenarioTarget
        ``isotope`` ("129Xe"), ``symbol``, ``z``, ``mass_number``, ``charge``, ``label``.
    species : list of ScenarioSpecies
        ``name``, ``symbol``, ``z``, ``mass_number`` (None for a natural mix), ``amount``,
        ``initial_charge``.
    source : SourceSettings
        ``kind`` ("beam_trap", "photon_beam", "electron_impact" or "plasma") and its
        settings (the fields of other kinds are None).
    residual_gas_pa, residual_elements : dict
        Partial pressures (Pa) by formula; element shares of the residual atoms.
    time, energy_scan, separator : TimeGrid, EnergyGrid, SeparatorSettings
    times_s, energies_ev : ndarray
        The time (s) and energy (eV) grids.
    lines : dict
        Line of every field in the file, by dotted path.

    Examples
    --------
    >>> text = '''
    ... [target]
    ... isotope = "40Ar"
    ... charge = 16
    ... [beam_trap]
    ... energy_ev = 6000.0
    ... current_a = 0.1
    ... current_density_a_cm2 = 300.0
    ... length_m = 0.4
    ... '''
    >>> s = Scenario.from_text(text, "argon.toml")
    >>> s.separator.resolving_power, s.lines["beam_trap.energy_ev"]
    (200.0, 6)
    """

    @classmethod
    def from_text(cls, text: str, filename: str = "<scenario>") -> Scenario:
        """Read a scenario from TOML text; ``filename`` names it in error messages.

        Raises ``ScenarioError`` for a bad scenario and ``TypeError`` (naming the parameter)
        when ``text`` or ``filename`` is not a str.
        """
        return cls(text, filename)

    @property
    def target_label(self) -> str:
        """The target ion, e.g. ``"129Xe43+"``."""
        return str(self.target.label)

    def run(self, progress: Progress | None = None) -> Report:
        """Compute the report (in the core, with the GIL released).

        Parameters
        ----------
        progress : callable, optional
            Called as ``progress(done, total, what)`` during the energy scan.

        Returns
        -------
        Report
        """
        return Report(self, progress)

    def __repr__(self) -> str:
        kind = report_text.SOURCE_NAMES[self.source.kind]
        article = "an" if kind[0] in "aeiou" else "a"
        return f"Scenario({self.title or self.file!r}: {self.target_label} from {article} {kind})"


class Report(_core.Report):
    """Everything ``chargecast plan`` prints, as data, computed in the core; made by
    :meth:`Scenario.run`.

    Attributes
    ----------
    scenario : Scenario
    ladder : Ladder
        ``steps`` per charge state 1 … q+2 of the target element: ``ionization_energy_ev``,
        ``threshold_ev``, ``subshell``, ``cross_section_cm2``, ``breeding_time_s``,
        ``j_tau_c_cm2``.
    evolutions, target_evolution : SpeciesEvolution
        ``times_s``, ``fractions`` [T, Z+1] per species (time sources).
    extraction_time_s, extraction_chosen
        When the ions are extracted and why.
    best_energy : BestEnergy
        The energy scan and its best point.
    ions : IonsPerExtraction or None
        Beam trap: ``per_charge``, ``target``, ``all_charges``.
    aq_lines, neighbourhood, ranking
        The A/q spectrum, the target's interferers and the charge states ranked.
    recommended : Recommendation or None
    model : str
        The model of the evolution: ``"fixed"`` or ``"dynamic"`` (beam trap), ``"fixed"``
        (photon beam), ``"single_collision"`` (electron impact), ``"plasma_balance"``
        (plasma).
    uncertainty : UncertaintyBands or None
        ``[uncertainty]``: ``peak_time_s``, ``peak_fraction``, ``ions_per_extraction`` as
        (5 %, 50 %, 95 %), ``target_fraction`` [3, T] on the time grid, ``samples``,
        ``seed``, ``factors``.
    plasma : PlasmaReport or None
        Plasma source: ``elements`` (``symbol``, ``residual``, ``densities_cm3``,
        ``fractions``, ``currents_eua`` per charge 0 … Z, ``total_current_eua``,
        ``mean_ion_charge``), ``target_current_eua``, ``ion_charge_density_cm3`` beside
        ``electron_density_cm3``, and the steady-state scan ``scan_temperatures_ev``,
        ``scan_target_fraction``, ``scan_target_current_eua``, ``best_temperature_ev``,
        ``best_current_eua``.
    dynamics : DynamicReport or None
        Model ``"dynamic"``: at the extraction time, ``target_rows`` (the target charge and
        its neighbours: ``ions``, ``temperature_ev``, ``overlap``, ``escape_per_s`` in
        ions/s) and ``species_rows``; ``compensation``, ``well_depth_v``; the bookkeeping
        (``particles``, ``energy_ev``, ``particle_balance``, ``energy_balance``); and
        ``run``, the whole ``DynamicRun`` with the histories ``ions(species)``,
        ``temperatures_ev(species)``, ``overlap(species)``, ``escape_per_s(species)``
        [T, Z+1] on ``times_s``.
    notes : list of str
    cautions : str

    Examples
    --------
    >>> report = load_scenario("demo").run()
    >>> report.recommended.label
    '129Xe44+'
    >>> print(report.text().splitlines()[0])
    chargecast plan: Xenon-129 at A/q = 3 for a post-accelerator
    """

    def __init__(self, scenario: Scenario, progress: Progress | None = None) -> None:
        self.scenario = scenario

    def text(self) -> str:
        """The report as plain text with tables and units."""
        return report_text.render(self)

    def to_dict(self) -> dict[str, Any]:
        """The report as JSON-compatible data (non-finite numbers become None)."""
        return report_json.to_dict(self)

    def to_json(self, indent: int | None = 2) -> str:
        """The report as JSON text (same content as :meth:`text`)."""
        return report_json.to_json(self, indent)

    def __str__(self) -> str:
        return self.text()

    def __repr__(self) -> str:
        rec = self.recommended.label if self.recommended else "none"
        t = self.extraction_time_s
        at = f", extraction {t:.3g} s" if t is not None else ""
        return f"Report({self.scenario.target_label}: recommended {rec}{at})"

    def _repr_html_(self) -> str:
        return report_html.to_html(self)

    def plot(self, ax: Any | None = None) -> Any:
        """The charge-state evolution near the target (yields for a single collision)."""
        return report_figures.plot_evolution(self, ax)

    def save_plots(self, directory: str | os.PathLike, dpi: int = 120) -> list[Path]:
        """Write the report's figures as PNG files (see :func:`report_figures.save_plots`)."""
        return report_figures.save_plots(self, directory, dpi)
