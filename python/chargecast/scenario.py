"""Scenario files: a planned run in one TOML file, and the report chargecast makes of it.

A scenario names a source and its settings, the species put into it, the residual gas, the
target isotope and charge state, the mass separator after the source and the time and
energy grids. :func:`load_scenario` reads and checks it (errors name the file, the line and
the field, and say what is allowed); :meth:`Scenario.run` computes the :class:`Report`:
stepwise breeding table, charge-state evolution, best energy and time, ions per extraction,
the A/q neighbourhood of the target and the recommended charge state, with text, JSON,
HTML and PNG views. ``chargecast plan FILE.toml`` does the same from the shell.

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
    ``amount`` -- relative amount > 0 (default 1; only ratios matter);
    ``initial_charge`` -- charge state in which it enters the source, 0 … Z−1 (default 0,
    neutral atoms). One species must provide the target isotope.
Source: exactly one of
    ``[trap]`` -- electron-beam ion trap: ``energy_ev``, ``current_a``, ``length_m``
    (required); the beam size by exactly one of ``radius_m``, ``current_density_a_cm2``
    or ``magnetic_field_t`` (Brillouin radius; with ``cathode_radius_m`` and
    ``cathode_temperature_k``, optional ``cathode_field_t`` = 0, the Herrmann radius);
    ``ion_temperature_ev`` (50), ``gas_temperature_k`` (300), ``compensation`` (0.5,
    fraction 0…1 of the electron space charge filled by ions: sets the ions per
    extraction), ``processes`` (default ``"ionization"``, ``"radiative_recombination"``,
    ``"charge_exchange"``; add ``"multiple_ionization"`` for Auger cascades after inner-shell
    ionization and direct double ionization).

    ``[photon_beam]`` -- ``photon_energy_ev``, ``flux_cm2_s`` (photons cm⁻² s⁻¹),
    ``bandwidth_ev`` (optional).

    ``[single_collision]`` -- the electron-impact source of a mass spectrometer, one
    collision per atom: ``energy_ev``, ``energy_spread_ev`` (0). Species enter neutral.
``[residual_gas_pa]`` (optional)
    Partial pressures (Pa) by formula: H2, He, N2, O2, CO, CO2, H2O, CH4, Ne, Ar, Kr, Xe.
    Drives charge exchange in a trap; its elements appear in the A/q spectrum, with
    ``residual_amount`` of ``[separator]`` (no residual-gas lines without this table).
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
    downstream (optional: limits the recommended charge state); ``residual_amount`` (0.05,
    residual-gas ions relative to the species' ions in the A/q spectrum).

Examples
--------
>>> import chargecast as cc
>>> scenario = cc.load_scenario(cc.bundled_scenarios()["demo"])
>>> scenario.target["isotope"], scenario.target["charge"]
('129Xe', 43)
>>> scenario.source["kind"]
'trap'
"""

from __future__ import annotations

import html
import json
import math
import os
from pathlib import Path
from typing import Any, Callable

import numpy as np

from chargecast import _core
from chargecast._core import ChargecastError, ScenarioError
from chargecast._util import PALETTE, inline_png, require_pyplot

__all__ = ["CAUTIONS", "Report", "Scenario", "bundled_scenarios", "load_scenario"]

#: Printed at the end of every report.
CAUTIONS = (
    "These results are planning estimates from empirical cross sections (typically within "
    "tens of percent), not a substitute for measurement. Ion sources involve high voltage, "
    "X-rays from electron beams, intense UV/X-ray photon beams, strong magnets and "
    "cryogens, and sometimes radioactive species: follow local codes, the facility's "
    "radiation-safety officer and licensed practice."
)

Progress = Callable[[int, int, str], None]

_SOURCE_NAMES = {
    "trap": "electron-beam trap",
    "photon_beam": "photon beam",
    "single_collision": "single-collision electron source",
}


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
        Naming the file, the line and the field, and what is allowed.

    Examples
    --------
    >>> s = load_scenario("demo")
    >>> s.time["points"] > 10
    True
    """
    p = Path(path)
    if not p.exists() and str(path) in bundled_scenarios():
        p = bundled_scenarios()[str(path)]
    try:
        text = p.read_text(encoding="utf-8")
    except OSError as exc:
        raise ScenarioError(f"{path}: cannot read the scenario file ({exc.strerror or exc})") from None
    except UnicodeDecodeError:
        raise ScenarioError(f"{path}: not a text file (a scenario is UTF-8 TOML)") from None
    return Scenario.from_text(text, str(p))


class Scenario:
    """A checked scenario: every field of the file with its defaults filled in.

    Attributes
    ----------
    file, title, description : str
    target : dict
        ``isotope`` ("129Xe"), ``symbol``, ``z``, ``mass_number``, ``charge``.
    species : list of dict
        ``name``, ``symbol``, ``z``, ``mass_number`` (None for a natural mix), ``amount``,
        ``initial_charge``.
    source : dict
        ``kind`` ("trap", "photon_beam" or "single_collision") and its settings.
    residual_gas_pa, residual_elements : dict
        Partial pressures (Pa) by formula; element shares of the residual atoms.
    time, energy_scan, separator : dict
        Grids and separator settings.
    lines : dict
        Line of every field in the file, by dotted path.

    Examples
    --------
    >>> text = '''
    ... [target]
    ... isotope = "40Ar"
    ... charge = 16
    ... [trap]
    ... energy_ev = 6000.0
    ... current_a = 0.1
    ... current_density_a_cm2 = 300.0
    ... length_m = 0.4
    ... '''
    >>> s = Scenario.from_text(text, "argon.toml")
    >>> s.separator["resolving_power"], s.lines["trap.energy_ev"]
    (200.0, 6)
    """

    def __init__(self, data: dict[str, Any]) -> None:
        self._data = data
        self.file: str = data["file"]
        self.title: str = data["title"]
        self.description: str = data["description"]
        self.target: dict[str, Any] = data["target"]
        self.species: list[dict[str, Any]] = data["species"]
        self.source: dict[str, Any] = data["source"]
        self.residual_gas_pa: dict[str, float] = data["residual_gas_pa"]
        self.residual_elements: dict[str, float] = data["residual_elements"]
        self.time: dict[str, Any] = data["time"]
        self.energy_scan: dict[str, Any] = data["energy_scan"]
        self.separator: dict[str, Any] = data["separator"]
        self.lines: dict[str, int] = data["lines"]

    @classmethod
    def from_text(cls, text: str, filename: str = "<scenario>") -> Scenario:
        """Read a scenario from TOML text; ``filename`` names it in error messages."""
        if not isinstance(text, str):
            raise ScenarioError(f"{filename}: the scenario text must be a str, got {type(text).__name__}")
        return cls(_core.parse_scenario(text, filename))

    @property
    def times_s(self) -> np.ndarray:
        """The confinement-time grid (s), log-spaced."""
        t = self.time
        return np.geomspace(t["start_s"], t["stop_s"], int(t["points"]))

    @property
    def energies_ev(self) -> np.ndarray:
        """The energy grid (eV) of the best-energy search."""
        e = self.energy_scan
        space = np.geomspace if e["scale"] == "log" else np.linspace
        return space(e["start_ev"], e["stop_ev"], int(e["points"]))

    @property
    def target_label(self) -> str:
        """The target ion, e.g. ``"129Xe43+"``."""
        return f"{self.target['isotope']}{self.target['charge']}+"

    def error(self, field: str, message: str) -> ScenarioError:
        """A ScenarioError about one field, naming the file and the field's line."""
        path = field
        while path and path not in self.lines:
            path = path.rsplit(".", 1)[0] if "." in path else ""
        where = f"line {self.lines[path]}, " if path else ""
        return ScenarioError(f"{self.file}: {where}field `{field}`: {message}")

    def make_source(self) -> Any:
        """The chargecast source object these settings describe (BeamTrap, PhotonBeam …)."""
        s = self.source
        kind = s["kind"]
        try:
            if kind == "trap":
                from chargecast.beam_trap import BeamTrap
                from chargecast.electron_beam import ElectronBeam

                size = {
                    k: s[k]
                    for k in ("radius_m", "current_density_a_cm2", "magnetic_field_t")
                    if s[k] is not None
                }
                if s["cathode_radius_m"] is not None:
                    size.update(
                        cathode_radius_m=s["cathode_radius_m"],
                        cathode_temperature_k=s["cathode_temperature_k"],
                        cathode_field_t=s["cathode_field_t"],
                    )
                beam = ElectronBeam(s["energy_ev"], s["current_a"], **size)
                return BeamTrap(
                    beam,
                    s["length_m"],
                    residual_gas_pa=dict(self.residual_gas_pa),
                    ion_temperature_ev=s["ion_temperature_ev"],
                    gas_temperature_k=s["gas_temperature_k"],
                    compensation=s["compensation"],
                    processes=tuple(s["processes"]),
                )
            import chargecast

            if kind == "photon_beam":
                cls = getattr(chargecast, "PhotonBeam", None)
                if cls is None:
                    raise self.error("photon_beam", "this build of chargecast has no photon-beam source")
                kw = {"bandwidth_ev": s["bandwidth_ev"]} if s["bandwidth_ev"] is not None else {}
                return cls(photon_energy_ev=s["photon_energy_ev"], flux_cm2_s=s["flux_cm2_s"], **kw)
            cls = getattr(chargecast, "ElectronImpactSource", None)
            if cls is None:
                raise self.error(
                    "single_collision", "this build of chargecast has no single-collision source"
                )
            return cls(energy_ev=s["energy_ev"], energy_spread_ev=s["energy_spread_ev"])
        except ScenarioError:
            raise
        except ChargecastError as exc:
            raise self.error(kind, str(exc)) from None

    def run(self, progress: Progress | None = None) -> Report:
        """Compute the report.

        Parameters
        ----------
        progress : callable, optional
            Called as ``progress(done, total, what)`` during long steps (the energy scan).

        Returns
        -------
        Report
        """
        return _Runner(self, progress).run()

    def __repr__(self) -> str:
        kind = _SOURCE_NAMES[self.source["kind"]]
        article = "an" if kind[0] in "aeiou" else "a"
        return f"Scenario({self.title or self.file!r}: {self.target_label} from {article} {kind})"


# ---------------------------------------------------------------- computing the report


class _Runner:
    """Computes every part of a report; each part is optional where a module is missing."""

    def __init__(self, scenario: Scenario, progress: Progress | None) -> None:
        self.s = scenario
        self.progress = progress or (lambda done, total, what: None)
        self.notes: list[str] = []

    def run(self) -> Report:
        s = self.s
        kind = s.source["kind"]
        source = s.make_source()
        r = Report(s, source)
        tsym, q = s.target["symbol"], int(s.target["charge"])
        r.ladder = self.ladder(source)
        if kind == "photon_beam":
            from chargecast.photon_beam import photon_thresholds

            r.thresholds = photon_thresholds(tsym, float(s.source["photon_energy_ev"]))
        if kind == "single_collision":
            self.single_collision(r, source)
        else:
            self.evolve(r, source)
            if kind == "trap":
                self.ions(r, source)
            r.scan = self.scan(source, tsym, q)
        self.spectrum(r, source)
        r.notes = self.notes
        return r

    # -- breeding table
    def ladder(self, source: Any) -> dict[str, list[Any]] | None:
        s = self.s
        from chargecast.atoms import element

        el: Any = element(s.target["symbol"])
        q = int(s.target["charge"])
        top = min(el.z, q + 2)
        kind = s.source["kind"]
        energy = s.source["photon_energy_ev"] if kind == "photon_beam" else s.source["energy_ev"]
        j = float(source.beam.current_density_a_cm2) if kind == "trap" else 1.0
        lad: dict[str, Any]
        if kind == "photon_beam":
            from chargecast.photon_beam import photoionization_cross_section_cm2

            flux = float(s.source["flux_cm2_s"])
            sigma = np.array(
                [float(photoionization_cross_section_cm2(el.symbol, c, energy)) for c in range(top)]
            )
            with np.errstate(divide="ignore"):
                # One charge per photon: an upper bound, since inner-shell holes add charges in jumps.
                step = np.where(sigma * flux > 0, 1.0 / (sigma * flux), np.inf)
            lad = {
                "ionization_energy_ev": np.asarray(el.ionization_energies_ev[:top]),
                "cross_section_cm2": sigma,
                "time_to_next_s": np.cumsum(step),
                "j_tau_c_cm2": [math.nan] * top,
            }
        else:
            from chargecast.atoms import breeding_ladder

            lad = breeding_ladder(el.symbol, top, float(energy), j)
        rows: dict[str, list[Any]] = {
            k: []
            for k in (
                "charge",
                "ionization_energy_ev",
                "threshold_ev",
                "subshell",
                "cross_section_cm2",
                "breeding_time_s",
                "j_tau_c_cm2",
            )
        }
        for i in range(top):
            ion_below = el.ion(i)
            rows["charge"].append(i + 1)
            rows["ionization_energy_ev"].append(float(lad["ionization_energy_ev"][i]))
            rows["threshold_ev"].append(float(el.ion(i + 1).threshold_ev))
            rows["subshell"].append(ion_below.ionized_subshell or "")
            rows["cross_section_cm2"].append(float(lad["cross_section_cm2"][i]))
            rows["breeding_time_s"].append(
                float(lad["time_to_next_s"][i]) if kind != "single_collision" else None
            )
            rows["j_tau_c_cm2"].append(float(lad["j_tau_c_cm2"][i]) if kind != "photon_beam" else None)
        rows["energy_ev"] = [float(energy)]
        rows["current_density_a_cm2"] = [j if kind == "trap" else None]
        rows["cross_section_kind"] = ["photoionization" if kind == "photon_beam" else "lotz"]
        return rows

    # -- time evolution
    def evolve(self, r: Report, source: Any) -> None:
        s = self.s
        times = s.times_s
        for sp in s.species:
            r.evolutions[sp["name"]] = source.evolve(
                sp["symbol"], times, initial_charge=int(sp["initial_charge"])
            )
        q = int(s.target["charge"])
        evo = r.target_evolution
        assert evo is not None
        t_peak, f_peak = evo.peak(q)
        t_ex = s.time["extraction_s"]
        r.extraction_time_s = float(t_ex) if t_ex is not None else t_peak
        r.extraction_chosen = "scenario" if t_ex is not None else "peak of the target"
        r.fractions_at_extraction = {name: e.at(r.extraction_time_s) for name, e in r.evolutions.items()}
        if f_peak < 1e-3:
            self.notes.append(
                f"{s.target['symbol']}{q}+ stays below 0.1 % on the time grid at this setting: "
                "see the best energy below, or extend [time] stop_s."
            )

    # -- ions per extraction (trap only)
    def ions(self, r: Report, trap: Any) -> None:
        s = self.s
        q = int(s.target["charge"])
        # Ions of all species share the compensated space charge in proportion to amount × mean charge.
        charge_load = {
            sp["name"]: sp["amount"] * float(np.dot(np.arange(len(f)), f))
            for sp, f in ((sp, r.fractions_at_extraction[sp["name"]]) for sp in s.species)
        }
        total_load = sum(charge_load.values())
        name = r.target_species["name"]
        frac = r.fractions_at_extraction[name]
        single = np.asarray(trap.ions_per_extraction(frac))
        share = charge_load[name] / total_load if total_load > 0 else 0.0
        per_charge = single * share
        iso = _isotope_share(r.target_species, s.target)
        r.ions = {
            "time_s": r.extraction_time_s,
            "electrons_in_trap": float(trap.electrons_in_trap),
            "compensation": float(trap.compensation),
            "species": name,
            "species_share_of_charge": share,
            "isotope_share": iso,
            "per_charge": per_charge * iso,
            "target": float(per_charge[q] * iso),
            "all_charges": float(per_charge.sum() * iso),
        }

    # -- best energy
    def scan(self, source: Any, symbol: str, q: int) -> Any:
        s = self.s
        energies, times = s.energies_ev, s.times_s
        own = s.source.get("energy_ev") or s.source.get("photon_energy_ev")
        if own is not None and energies[0] <= own <= energies[-1]:
            # The scenario's own setting is always on the grid, so "best" is never worse than it.
            energies = np.unique(np.append(energies, float(own)))
        self.progress(0, 1, "energy scan")
        scan = source.best_energy(symbol, q, energies, times)
        self.progress(1, 1, "energy scan")
        return scan

    # -- single collision: yields and appearance curves
    def single_collision(self, r: Report, source: Any) -> None:
        s = self.s
        q = int(s.target["charge"])
        r.yields = {sp["name"]: _yield_fractions(source, sp["symbol"]) for sp in s.species}
        r.fractions_at_extraction = dict(r.yields)
        self.progress(0, 1, "energy scan")
        curves = source.appearance_curves(s.target["symbol"], s.energies_ev)
        self.progress(1, 1, "energy scan")
        r.scan = _AppearanceScan(curves, q, float(s.source["energy_ev"]))
        if r.scan.best_cross_section_cm2 <= 0:
            self.notes.append(
                f"one collision never makes {s.target['symbol']}{q}+ on the energy grid: "
                "raise [energy_scan] stop_ev or choose a lower charge"
            )

    # -- A/q neighbourhood and the recommended charge state
    def spectrum(self, r: Report, source: Any) -> None:
        try:
            from chargecast.spectrum import aq_lines, clean_charge_states, overlaps
        except ImportError:
            self.notes.append("the A/q planning functions are not in this build: no neighbourhood")
            return
        s = self.s
        sep = s.separator
        species = {sp["name"]: r.fractions_at_extraction[sp["name"]] for sp in s.species}
        amounts = {sp["name"]: sp["amount"] for sp in s.species}
        residual = self.residual_lines(r, source)
        r.lines = aq_lines(species, amounts=amounts, residual_gas=residual)
        target = (s.target["isotope"], int(s.target["charge"]))
        r.overlap = overlaps(
            r.lines,
            target=target,
            resolving_power=sep["resolving_power"],
            shape=sep["peak_shape"],
            window_fwhm=sep["window_fwhm"],
        )
        r.ranking = clean_charge_states(
            r.lines,
            s.target["isotope"],
            aq_window=sep["aq_half_width"],
            relative_window=sep["relative_half_width"],
            resolving_power=sep["resolving_power"],
            shape=sep["peak_shape"],
            window_fwhm=sep["window_fwhm"],
        )
        rk = r.ranking
        ok = np.ones(len(rk.charge), dtype=bool)
        if sep["aq_range"] is not None:
            lo, hi = sep["aq_range"]
            ok = (rk.a_over_q >= lo) & (rk.a_over_q <= hi)
        # A charge state below 0.1 % of the isotope's ions is not a practical choice.
        ok &= rk.fraction >= 1e-3
        if ok.any():
            i = int(np.flatnonzero(ok)[0])
            r.recommended = {
                "charge": int(rk.charge[i]),
                "label": str(rk.label[i]),
                "a_over_q": float(rk.a_over_q[i]),
                "m_over_q": float(rk.m_over_q[i]),
                "fraction": float(rk.fraction[i]),
                "purity": float(rk.purity[i]),
                "score": float(rk.score[i]),
                "main_contaminant": rk.main_contaminant[i],
            }
        else:
            self.notes.append(
                "no charge state of the target isotope lies in the A/q range with ≥ 0.1 % of its ions"
            )

    def residual_lines(self, r: Report, source: Any) -> dict[str, Any]:
        """Residual-gas elements with their amounts and charge-state fractions (none without gas)."""
        s = self.s
        shares = s.residual_elements
        if not shares:
            return {}
        total = sum(sp["amount"] for sp in s.species) * float(s.separator["residual_amount"])
        out: dict[str, Any] = {}
        kind = s.source["kind"]
        for sym, share in shares.items():
            if kind == "single_collision":
                f = _yield_fractions(source, sym)
            else:
                # Residual gas keeps streaming in: its ions have every age from 0 to the
                # extraction time, so their fractions are the evolution's time average.
                t = np.geomspace(r.extraction_time_s * 1e-4, r.extraction_time_s, 200)
                evo = source.evolve(sym, t)
                w = np.gradient(t)
                f = (evo.fractions * w[:, None]).sum(axis=0) / w.sum()
            out[sym] = (total * share, f)
        return out


def _yield_fractions(source: Any, symbol: str) -> np.ndarray:
    """Single-collision yields as fractions over charge 0 … Z (charge 0 left at zero)."""
    from chargecast.atoms import element

    y = source.charge_yields(symbol)
    out = np.zeros(element(symbol).z + 1)
    out[np.asarray(y.charges, dtype=int)] = y.yields
    return out


def _isotope_share(species: dict[str, Any], target: dict[str, Any]) -> float:
    if species["mass_number"] is not None:
        return 1.0
    from chargecast.atoms import element

    isotopes: Any = element(species["symbol"]).isotopes()
    for iso in isotopes:
        if int(iso.mass_number) == int(target["mass_number"]):
            return float(iso.abundance or 0.0)
    return 0.0


class _AppearanceScan:
    """The electron energy that maximises one charge state's partial cross section (single
    collision), with the appearance curves of the element behind it."""

    def __init__(self, curves: Any, charge: int, own_energy_ev: float) -> None:
        self.curves = curves
        self.element = curves.element
        self.charges = [charge]
        self.energies_ev = np.asarray(curves.energies_ev)
        self.own_energy_ev = own_energy_ev
        sigma = np.asarray(curves.cross_section_cm2)
        k = charge - 1
        self.sigma_q = sigma[:, k] if 0 <= k < sigma.shape[1] else np.zeros(len(self.energies_ev))
        total = sigma.sum(axis=1)
        self.share_q = np.divide(self.sigma_q, total, out=np.zeros_like(self.sigma_q), where=total > 0)
        i = int(np.argmax(self.sigma_q))
        self.best_energy_ev = float(self.energies_ev[i])
        self.best_cross_section_cm2 = float(self.sigma_q[i])
        self.best_fraction = float(self.share_q[i])
        self.best_time_s = None

    def plot(self, ax: Any | None = None) -> Any:
        """Appearance curves of the element, the target charge drawn bold, the best energy marked."""
        ax = self.curves.plot(ax=ax)
        q = self.charges[0]
        for line in ax.get_lines():
            if line.get_label() == f"{q}+":
                line.set_linewidth(2.6)
        if self.best_cross_section_cm2 > 0:
            ax.plot(
                [self.best_energy_ev],
                [self.best_cross_section_cm2],
                "*",
                color=PALETTE[1],
                markersize=13,
                markeredgecolor="black",
                linestyle="none",
                label=f"best for {q}+: {self.best_energy_ev:.4g} eV",
            )
        ax.axvline(
            self.own_energy_ev, color="black", lw=1, ls=":", label=f"scenario: {self.own_energy_ev:.4g} eV"
        )
        ax.legend(fontsize=7, loc="center left", bbox_to_anchor=(1.0, 0.5), frameon=False)
        # Plain numbers on an energy axis spanning a decade or two read better than powers of ten.
        from matplotlib.ticker import FuncFormatter

        plain = FuncFormatter(lambda v, _: f"{v:g}")
        ax.xaxis.set_major_formatter(plain)
        ax.xaxis.set_minor_formatter(FuncFormatter(lambda v, _: f"{v:g}" if str(f"{v:g}")[0] in "25" else ""))
        return ax


# ---------------------------------------------------------------- the report


class Report:
    """Everything ``chargecast plan`` prints, as data; made by :meth:`Scenario.run`.

    Attributes
    ----------
    scenario : Scenario
    source : object
        The BeamTrap (or photon / single-collision source) that was run.
    ladder : dict of lists
        Per charge state 1 … q+2 of the target element: ``ionization_energy_ev`` (to make
        it from the state below), ``threshold_ev`` (sum from the neutral), ``subshell``
        (the electron removed), ``cross_section_cm2`` (Lotz, at the beam energy),
        ``breeding_time_s`` and ``j_tau_c_cm2`` (stepwise, from the neutral).
    evolutions : dict of str to Evolution
        Per species (time sources).
    extraction_time_s : float
        Time at which the ions are extracted.
    scan : EnergyScan or None
        Target fraction over the energy × time grid, with the best point.
    ions : dict or None
        Ions per extraction (trap): ``per_charge`` (ndarray), ``target``, ``all_charges``.
    lines, overlap, ranking : LineList, OverlapReport, ChargeStateRanking or None
        The A/q spectrum, the target's interferers and the charge states ranked.
    recommended : dict or None
        The recommended charge state of the target isotope.
    notes : list of str
    cautions : str

    Examples
    --------
    >>> report = load_scenario("demo").run()
    >>> report.recommended["label"]
    '129Xe44+'
    >>> print(report.text().splitlines()[0])
    chargecast plan: Xenon-129 at A/q = 3 for a post-accelerator
    """

    def __init__(self, scenario: Scenario, source: Any) -> None:
        self.scenario = scenario
        self.source = source
        self.ladder: dict[str, list[Any]] | None = None
        self.evolutions: dict[str, Any] = {}
        self.yields: dict[str, np.ndarray] = {}
        self.extraction_time_s: float = math.nan
        self.extraction_chosen = ""
        self.fractions_at_extraction: dict[str, np.ndarray] = {}
        self.scan: Any = None
        self.thresholds: Any = None
        self.ions: dict[str, Any] | None = None
        self.lines: Any = None
        self.overlap: Any = None
        self.ranking: Any = None
        self.recommended: dict[str, Any] | None = None
        self.notes: list[str] = []
        self.cautions = CAUTIONS

    # -- data views
    @property
    def target_species(self) -> dict[str, Any]:
        """The species entry that provides the target isotope."""
        s = self.scenario
        for sp in s.species:
            if sp["z"] == s.target["z"] and sp["mass_number"] in (None, s.target["mass_number"]):
                return sp
        return s.species[0]

    @property
    def target_evolution(self) -> Any:
        """The Evolution of the species that provides the target (None for a single collision)."""
        return self.evolutions.get(self.target_species["name"])

    def evolution_summary(self, threshold: float = 0.01) -> list[dict[str, float]]:
        """Per charge state of the target element: peak fraction, its time, fraction at extraction."""
        evo = self.target_evolution
        if evo is None:
            y = self.yields.get(self.target_species["name"])
            return (
                []
                if y is None
                else [{"charge": q, "fraction": float(f)} for q, f in enumerate(y) if f > threshold]
            )
        at = self.fractions_at_extraction[self.target_species["name"]]
        rows = []
        for row in evo.summary(threshold):
            row = dict(row)
            row["fraction_at_extraction"] = float(at[row["charge"]])
            rows.append(row)
        return rows

    def to_dict(self) -> dict[str, Any]:
        """The report as JSON-compatible data (non-finite numbers become None)."""
        s = self.scenario
        out: dict[str, Any] = {
            "scenario": {k: v for k, v in s._data.items() if k != "lines"},
            "target": s.target_label,
            "breeding_ladder": self.ladder,
            "evolution": None,
            "best_energy": None,
            "ions_per_extraction": None,
            "aq_neighbourhood": None,
            "charge_state_ranking": None,
            "recommended_charge_state": self.recommended,
            "notes": self.notes,
            "cautions": self.cautions,
        }
        if self.target_evolution is not None:
            evo = self.target_evolution
            i = _time_index(evo.times_s, self.extraction_time_s)
            out["evolution"] = {
                "element": evo.element,
                "times_s": [float(s.time["start_s"]), float(s.time["stop_s"]), int(s.time["points"])],
                "extraction_time_s": self.extraction_time_s,
                "extraction_time_from": self.extraction_chosen,
                "mean_charge_at_extraction": float(evo.mean_charge()[i]),
                "charge_states": self.evolution_summary(),
            }
        elif self.yields:
            out["evolution"] = {"single_collision_yields": {k: v.tolist() for k, v in self.yields.items()}}
        if self.scan is not None:
            out["best_energy"] = {
                "charge": int(s.target["charge"]),
                "energies_ev": [
                    float(self.scan.energies_ev[0]),
                    float(self.scan.energies_ev[-1]),
                    len(self.scan.energies_ev),
                ],
                "best_energy_ev": self.scan.best_energy_ev,
                "best_time_s": self.scan.best_time_s,
                "best_fraction": self.scan.best_fraction,
            }
            if isinstance(self.scan, _AppearanceScan):
                out["best_energy"]["best_cross_section_cm2"] = self.scan.best_cross_section_cm2
        if self.thresholds is not None:
            th = self.thresholds
            out["one_photon"] = [
                {
                    "charge": int(q),
                    "threshold_ev": float(t),
                    "yield_per_photon": float(y),
                    "via": [
                        {
                            "subshell": x.subshell,
                            "binding_ev": float(x.binding_ev),
                            "probability": float(x.probability),
                        }
                        for x in routes
                    ],
                }
                for q, t, y, routes in zip(th.charges, th.threshold_ev, th.yield_per_photon, th.routes)
            ]
        if self.ions is not None:
            d = dict(self.ions)
            d["per_charge"] = {f"{q}+": float(n) for q, n in enumerate(d["per_charge"]) if n >= 0.5}
            out["ions_per_extraction"] = d
        if self.overlap is not None:
            o = self.overlap
            out["aq_neighbourhood"] = {
                "target": o.target,
                "m_over_q": o.target_m_over_q,
                "a_over_q": o.target_a_over_q,
                "resolving_power": o.resolving_power,
                "peak_shape": o.shape,
                "fwhm": o.fwhm,
                "window": list(o.window),
                "purity": o.purity,
                "interferers": [
                    {
                        "ion": str(o.label[i]),
                        "m_over_q": float(o.m_over_q[i]),
                        "a_over_q": float(o.a_over_q[i]),
                        "intensity": float(o.intensity[i]),
                        "residual_gas": bool(o.residual[i]),
                        "delta_m_over_q": float(o.delta_m_over_q[i]),
                        "separation_fwhm": float(o.separation_fwhm[i]),
                        "contamination": float(o.contamination[i]),
                        "resolving_power_needed": float(o.resolving_power_needed[i]),
                    }
                    for i in range(len(o.label))
                ],
            }
        if self.ranking is not None:
            rk = self.ranking
            out["charge_state_ranking"] = [
                {
                    "charge": int(rk.charge[i]),
                    "ion": str(rk.label[i]),
                    "a_over_q": float(rk.a_over_q[i]),
                    "fraction": float(rk.fraction[i]),
                    "purity": float(rk.purity[i]),
                    "score": float(rk.score[i]),
                    "main_contaminant": rk.main_contaminant[i],
                }
                for i in range(len(rk.charge))
            ]
        return _jsonable(out)

    def to_json(self, indent: int | None = 2) -> str:
        """The report as JSON text (same content as :meth:`text`)."""
        return json.dumps(self.to_dict(), indent=indent, allow_nan=False)

    # -- text
    def text(self) -> str:
        """The report as plain text with tables and units."""
        return "\n".join(_TextReport(self).lines())

    def __str__(self) -> str:
        return self.text()

    def __repr__(self) -> str:
        rec = self.recommended["label"] if self.recommended else "none"
        t = self.extraction_time_s
        return f"Report({self.scenario.target_label}: recommended {rec}, extraction {t:.3g} s)"

    def _repr_html_(self) -> str:
        parts = [f"<h4>{html.escape(self.scenario.title or self.scenario.file)}</h4>"]
        parts.append(f"<pre>{html.escape(self.text())}</pre>")
        for plot in (self.plot_evolution, self.plot_energy_map, self.plot_spectrum):
            parts.append(inline_png(plot, figsize=(7, 3.8)))
        return "".join(parts)

    # -- figures
    def plot_evolution(self, ax: Any | None = None) -> Any:
        """Charge states near the target over time, with the extraction time marked.

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(8, 4.5))
        q = int(self.scenario.target["charge"])
        evo = self.target_evolution
        if evo is None:
            return self.plot_yields(ax)
        # Six states around the target: enough context, and the palette's first six colours
        # (its yellow, hard to see as a line on white, is the seventh).
        near = [c for c in range(max(0, q - 3), min(evo.z, q + 2) + 1) if evo.fractions[:, c].max() > 1e-3]
        evo.plot(ax=ax, charges=near)
        for line in ax.get_lines():
            if line.get_label() == f"{q}+":
                line.set_linewidth(2.6)
        ax.axvline(self.extraction_time_s, color="black", lw=1, ls=":")
        ax.annotate(
            f"extraction {self.extraction_time_s:.3g} s",
            (self.extraction_time_s, 1.0),
            textcoords="offset points",
            xytext=(-4, -2),
            ha="right",
            va="top",
            fontsize=8,
        )
        ax.set_title(f"{evo.element} charge states near the target {q}+ ({_source_line(self)})", fontsize=10)
        if self.scenario.source["kind"] == "photon_beam":
            ax.set_xlabel("exposure time (s)")
        return ax

    def plot_yields(self, ax: Any | None = None) -> Any:
        """Single-collision charge yields of every species (grouped bars, log scale).

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(8, 4.5))
        q = int(self.scenario.target["charge"])
        names = list(self.yields)
        top = max(int(np.flatnonzero(y > 0).max()) if (y > 0).any() else 1 for y in self.yields.values())
        qs = np.arange(1, top + 1)
        width = 0.8 / max(1, len(names))
        floor = min(float(y[y > 0].min()) for y in self.yields.values() if (y > 0).any())
        for k, name in enumerate(names):
            y = self.yields[name][1 : top + 1]
            ax.bar(
                qs + (k - (len(names) - 1) / 2) * width,
                np.where(y > 0, y, np.nan),
                width,
                color=PALETTE[k % len(PALETTE)],
                label=name,
            )
        ax.set_yscale("log")
        ax.set_ylim(floor / 3, 1.5)
        ax.set_xticks(qs)
        ax.set_xticklabels([f"{c}+" + (" (target)" if c == q else "") for c in qs])
        ax.set_xlabel("charge state")
        ax.set_ylabel("fraction of the ions made")
        ax.legend(fontsize=8, frameon=False, title="species")
        e = self.scenario.source.get("energy_ev")
        ax.set_title(f"charge yields of one {e:g} eV electron collision", fontsize=10)
        return ax

    def plot_ladder(self, ax: Any | None = None) -> Any:
        """Stepwise breeding: σ of each step (Lotz, or photoionization for a photon beam) and the
        time to reach each charge state (the σ panel alone for a single-collision source).

        Returns
        -------
        matplotlib Axes (the breeding-time axis)
        """
        plt = require_pyplot()
        lad = self.ladder or {}
        q = int(self.scenario.target["charge"])
        charge = np.asarray(lad.get("charge", []), dtype=float)
        sigma = np.array([np.nan if v is None else v for v in lad.get("cross_section_cm2", [])], dtype=float)
        t = np.array([np.nan if v is None else v for v in lad.get("breeding_time_s", [])], dtype=float)
        kind = self.scenario.source["kind"]
        times_known = bool(np.isfinite(t).any())
        if ax is None and times_known:
            fig, (ax_s, ax) = plt.subplots(2, 1, figsize=(8, 5.5), sharex=True, height_ratios=[1, 1.3])
        elif ax is None:
            fig, ax_s = plt.subplots(figsize=(8, 3.5))
            ax = None
        else:
            fig, ax_s = ax.figure, None
        if ax_s is not None:
            ok = sigma > 0
            ax_s.semilogy(charge[ok], sigma[ok], "o-", color=PALETTE[0], ms=3, lw=1)
            what = "photoionization σ" if kind == "photon_beam" else "Lotz σ"
            ax_s.set_ylabel(f"{what} of step\n(q−1)+ → q+ (cm²)")
            if ax is None:
                ax_s.set_xlabel("charge state q")
            j = lad.get("current_density_a_cm2", [None])[0]
            e = lad.get("energy_ev", [math.nan])[0]
            sym = self.scenario.target["symbol"]
            title = {
                "trap": f"stepwise breeding of {sym} at {e:.5g} eV, {j or 0:.4g} A/cm² (ionization only)",
                "photon_beam": f"stepwise photoionization of {sym} at {e:.5g} eV (one charge per photon)",
                "single_collision": f"ionization steps of {sym}: Lotz cross sections at {e:.5g} eV",
            }[kind]
            ax_s.set_title(title, fontsize=10)
            from matplotlib.ticker import MaxNLocator

            ax_s.xaxis.set_major_locator(MaxNLocator(integer=True))
            ax_s.grid(True, which="major", alpha=0.3)
            ax_s.axvline(q, color=PALETTE[3], lw=1, ls="--", label=f"target {q}+")
        if ax is None:
            ax_s.legend(fontsize=8, frameon=False)
            fig.tight_layout()
            return ax_s
        ok = np.isfinite(t) & (t > 0)
        if ok.any():
            ax.semilogy(
                charge[ok],
                t[ok],
                "o-",
                color=PALETTE[0],
                ms=3,
                lw=1,
                label="time to reach q+ from the neutral",
            )
        blocked = np.isinf(t)
        if blocked.any():
            ax.plot(
                charge[blocked],
                np.full(int(blocked.sum()), np.nanmax(t[ok]) if ok.any() else 1.0),
                "x",
                color=PALETTE[3],
                ms=8,
                label="not reached: beam energy below the step's threshold",
            )
        ax.axvline(q, color=PALETTE[3], lw=1, ls="--", label=f"target {q}+")
        if math.isfinite(self.extraction_time_s):
            ax.axhline(
                self.extraction_time_s,
                color="black",
                lw=1,
                ls=":",
                label=f"extraction time {self.extraction_time_s:.3g} s",
            )
        ax.set_xlabel("charge state q")
        ax.set_ylabel("stepwise breeding time (s)")
        ax.grid(True, which="major", alpha=0.3)
        ax.legend(fontsize=8, frameon=True, framealpha=0.9, loc="lower right")
        fig.tight_layout()
        return ax

    def plot_energy_map(self, ax: Any | None = None) -> Any:
        """Target fraction over beam energy and time (EnergyScan.plot), the scenario's energy marked.

        Returns
        -------
        matplotlib Axes
        """
        if self.scan is None:
            return None
        ax = self.scan.plot(ax=ax)
        if self.scenario.source["kind"] == "photon_beam":
            ax.set_xlabel("exposure time (s)")
        energy = self.scenario.source.get("energy_ev") or self.scenario.source.get("photon_energy_ev")
        if energy is not None and hasattr(self.scan, "fraction"):
            ax.axhline(energy, color="white", lw=1, ls="--")
            ax.annotate(
                f"scenario: {energy:.4g} eV",
                (ax.get_xlim()[0], energy),
                textcoords="offset points",
                xytext=(4, 3),
                color="white",
                fontsize=8,
            )
        return ax

    def plot_spectrum(self, ax: Any | None = None) -> Any:
        """The A/q neighbourhood of the target at the separator's resolving power, the
        recommended charge state marked.

        Returns
        -------
        matplotlib Axes
        """
        if self.lines is None or self.overlap is None:
            return None
        sep = self.scenario.separator
        r = float(sep["resolving_power"])
        centre = self.overlap.target_m_over_q
        lo, hi = centre * (1 - 4.5 / r), centre * (1 + 4.5 / r)
        rec = self.recommended
        if rec is not None:
            lo, hi = min(lo, rec["m_over_q"] * (1 - 3 / r)), max(hi, rec["m_over_q"] * (1 + 3 / r))
        ax = self.lines.plot(
            ax=ax,
            resolving_power=r,
            target=(self.scenario.target["isotope"], int(self.scenario.target["charge"])),
            shape=sep["peak_shape"],
            m_over_q_range=(lo, hi),
        )
        # Labels of lines too weak to see only collide at the baseline; the table lists them.
        ymax = max(
            (
                float(v)
                for v in self.lines.intensity[(self.lines.m_over_q >= lo) & (self.lines.m_over_q <= hi)]
            ),
            default=0.0,
        )
        for text in list(ax.texts):
            xy = getattr(text, "xy", None)
            if xy is not None and xy[1] < 0.03 * ymax:
                text.remove()
        ax.axvspan(*self.overlap.window, color=PALETTE[3], alpha=0.12, lw=0, label="target acceptance window")
        if rec is not None and rec["label"] != self.overlap.target:
            i = int(np.flatnonzero(self.lines.label == rec["label"])[0])
            height = float(self.lines.intensity[i])
            ax.vlines([rec["m_over_q"]], 0.0, height, color=PALETTE[4], lw=2.2, label="recommended")
            ax.annotate(
                f"recommended {rec['label']}",
                (rec["m_over_q"], height),
                textcoords="offset points",
                xytext=(0, 16),
                ha="center",
                fontsize=8,
                color=PALETTE[4],
                arrowprops={"arrowstyle": "->", "color": PALETTE[4]},
            )
        top = max(
            (float(np.max(ln.get_ydata())) for ln in ax.get_lines() if len(ln.get_ydata())), default=ymax
        )
        ax.set_ylim(0.0, 1.12 * max(top, ymax, 1e-300))
        ax.legend(fontsize=8, frameon=False, loc="upper left", bbox_to_anchor=(1.0, 1.0))
        ax.set_title(f"A/q neighbourhood of {self.overlap.target} at R = {r:g}", fontsize=10)
        return ax

    def save_plots(self, directory: str | os.PathLike, dpi: int = 120) -> list[Path]:
        """Write the report's figures as PNG files.

        Parameters
        ----------
        directory : str or path-like
            Created if missing.
        dpi : int
            Resolution.

        Returns
        -------
        list of pathlib.Path
            ``evolution.png``, ``breeding_ladder.png``, ``energy_time_map.png``,
            ``aq_spectrum.png`` (those that apply to the source).
        """
        plt = require_pyplot()
        out = Path(directory)
        out.mkdir(parents=True, exist_ok=True)
        written = []
        for name, plot in (
            ("evolution", self.plot_evolution),
            ("breeding_ladder", self.plot_ladder),
            ("energy_time_map", self.plot_energy_map),
            ("aq_spectrum", self.plot_spectrum),
        ):
            if name == "breeding_ladder":
                ax = plot()
            else:
                fig, ax0 = plt.subplots(figsize=(8, 4.5))
                ax = plot(ax=ax0)
            if ax is None:
                plt.close("all")
                continue
            path = out / f"{name}.png"
            ax.figure.savefig(path, dpi=dpi, bbox_inches="tight")
            plt.close(ax.figure)
            written.append(path)
        return written


# ---------------------------------------------------------------- text rendering


def _source_line(r: Report) -> str:
    src = r.scenario.source
    kind = src["kind"]
    if kind == "trap":
        b = r.source.beam
        j = b.current_density_a_cm2
        return (
            f"{b.energy_ev:.5g} eV, {b.current_a:.3g} A, {j:.0f} A/cm²"
            if j >= 100
            else f"{b.energy_ev:.5g} eV, {b.current_a:.3g} A, {j:.3g} A/cm²"
        )
    if kind == "photon_beam":
        return f"{src['photon_energy_ev']:.5g} eV photons, {src['flux_cm2_s']:.3g} cm⁻² s⁻¹"
    return f"{src['energy_ev']:.5g} eV electrons, single collision"


def _table(header: list[str], rows: list[list[str]]) -> list[str]:
    widths = [max([len(h)] + [len(r[j]) for r in rows]) for j, h in enumerate(header)]
    out = ["  ".join(h.rjust(w) for h, w in zip(header, widths))]
    out.append("  ".join("-" * w for w in widths))
    out += ["  ".join(c.rjust(w) for c, w in zip(r, widths)) for r in rows]
    return out


def _g(v: Any, fmt: str = ".4g") -> str:
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return "–"
    if isinstance(v, float) and math.isinf(v):
        return "never"
    return format(v, fmt)


class _TextReport:
    def __init__(self, report: Report) -> None:
        self.r = report
        self.s = report.scenario

    def lines(self) -> list[str]:
        s, r = self.s, self.r
        out = [f"chargecast plan: {s.title or Path(s.file).name}"]
        if s.description:
            out.append(s.description)
        out.append(f"scenario file: {s.file}")
        out.append(
            f"target: {s.target_label} (Z = {s.target['z']}, A/q = "
            f"{s.target['mass_number'] / s.target['charge']:.4f})"
        )
        out += self.source()
        out += self.ladder()
        out += self.one_photon()
        out += self.evolution()
        out += self.best_energy()
        out += self.ions()
        out += self.neighbourhood()
        out += self.recommendation()
        if r.notes:
            out += ["", "Notes"] + [f"  - {n}" for n in r.notes]
        out += ["", "Cautions", *_wrap(r.cautions, 88)]
        return out

    def source(self) -> list[str]:
        s, r = self.s, self.r
        src = s.source
        out = ["", f"Source: {_SOURCE_NAMES[src['kind']]}"]
        if src["kind"] == "trap":
            b = r.source.beam
            out.append(
                f"  beam {b.energy_ev:.6g} eV, {b.current_a:.4g} A, radius {b.radius_m * 1e6:.4g} µm, "
                f"current density {b.current_density_a_cm2:.4g} A/cm²; trap length {src['length_m']:.4g} m, "
                f"ion temperature {src['ion_temperature_ev']:.4g} eV"
            )
        elif src["kind"] == "photon_beam":
            out.append(f"  photons {src['photon_energy_ev']:.6g} eV, flux {src['flux_cm2_s']:.4g} cm⁻² s⁻¹")
        else:
            out.append(f"  electrons {src['energy_ev']:.6g} eV, spread {src['energy_spread_ev']:.4g} eV")
        species = ", ".join(
            f"{sp['name']} ×{sp['amount']:g}"
            + (f" (enters {sp['initial_charge']}+)" if sp["initial_charge"] else "")
            for sp in s.species
        )
        out.append(f"  species: {species}")
        if s.residual_gas_pa:
            out.append(
                "  residual gas: " + ", ".join(f"{k} {v:.3g} Pa" for k, v in s.residual_gas_pa.items())
            )
        return out

    def ladder(self) -> list[str]:
        lad = self.r.ladder
        if not lad:
            return []
        s = self.s
        q = int(s.target["charge"])
        e = lad["energy_ev"][0]
        kind = s.source["kind"]
        sigma_name, time_name = "σ Lotz (cm²)", "breeding time (s)"
        if kind == "trap":
            j = lad["current_density_a_cm2"][0]
            head = (
                f"Stepwise ionization of {s.target['symbol']} at {e:.6g} eV, {j:.4g} A/cm² "
                "(ionization only: a lower bound on the time)"
            )
        elif kind == "photon_beam":
            flux = s.source["flux_cm2_s"]
            head = (
                f"Stepwise photoionization of {s.target['symbol']} at {e:.6g} eV, "
                f"{flux:.3g} photons cm⁻² s⁻¹ "
                "(one charge per photon: an upper bound on the time)"
            )
            sigma_name, time_name = "σ photo (cm²)", "time (s)"
        else:
            head = f"Ionization steps of {s.target['symbol']} (Lotz cross sections at {e:.6g} eV)"
        header = ["charge", "IE (eV)", "threshold (eV)", "subshell", sigma_name, time_name, "jτ (C/cm²)"]
        # Columns that mean nothing for this source are left out (they stay in the JSON).
        ncol = {"trap": 7, "photon_beam": 6, "single_collision": 5}[kind]
        header = header[:ncol]
        rows = []
        keep = _ladder_rows(lad["charge"], lad["subshell"], q)
        for i, c in enumerate(lad["charge"]):
            if i not in keep:
                if i - 1 in keep:
                    rows.append(["⋮"] + [""] * (ncol - 1))
                continue
            mark = " ◀" if c == q else ""
            rows.append(
                [
                    f"{c}+{mark}",
                    _g(lad["ionization_energy_ev"][i], ".5g"),
                    _g(lad["threshold_ev"][i], ".6g"),
                    lad["subshell"][i] or "–",
                    _g(lad["cross_section_cm2"][i], ".3e"),
                    _g(lad["breeding_time_s"][i], ".3e"),
                    _g(lad["j_tau_c_cm2"][i], ".3e"),
                ][:ncol]
            )
        out = ["", head, *_table(header, rows)]
        out.append(
            "  IE: energy to make q+ from (q−1)+; threshold: sum from the neutral; subshell: the electron "
            "removed; σ at the beam energy"
        )
        if len(keep) < len(lad["charge"]):
            out.append(
                "  (rows shown: the first steps, each newly opened subshell and the steps near the target; "
                "--json lists all)"
            )
        return out

    def one_photon(self) -> list[str]:
        th = self.r.thresholds
        if th is None:
            return []
        header = ["charge", "Σ IE (eV)", "yield per photon", "via subshell (probability)"]
        rows = [
            [
                f"{q}+",
                f"{t:.6g}",
                _g(float(y), ".3g"),
                ", ".join(f"{x.subshell} ({x.probability:.2g})" for x in routes) or "–",
            ]
            for q, t, y, routes in zip(th.charges, th.threshold_ev, th.yield_per_photon, th.routes)
            if y >= 1e-4
        ]
        return [
            "",
            f"One photon of {th.photon_energy_ev:.6g} eV on neutral {th.element}: charges it can make "
            f"(up to {th.max_charge}+ by energy; rows with yield ≥ 1e-4)",
            *_table(header, rows),
        ]

    def evolution(self) -> list[str]:
        r = self.r
        rows = r.evolution_summary()
        if not rows:
            return []
        q = int(self.s.target["charge"])
        if r.target_evolution is None:
            header = ["charge", "yield (fraction)"]
            table = [
                [f"{x['charge']}+" + (" ◀" if x["charge"] == q else ""), _g(x["fraction"], ".4f")]
                for x in rows
            ]
            return [
                "",
                f"Single-collision yields of {self.s.target['symbol']} (fraction of the ions made)",
                *_table(header, table),
            ]
        evo = r.target_evolution
        header = ["charge", "peak fraction", "peak time (s)", "at extraction"]
        table = [
            [
                f"{x['charge']}+" + (" ◀" if x["charge"] == q else ""),
                _g(x["peak_fraction"], ".4f"),
                _g(x["peak_time_s"], ".3e"),
                _g(x["fraction_at_extraction"], ".4f"),
            ]
            for x in rows
            if max(1, q - 5) <= x["charge"] <= q + 3
        ]
        i = _time_index(evo.times_s, r.extraction_time_s)
        return [
            "",
            f"Charge-state evolution of {evo.element} ({evo.times_s[0]:.3g} … {evo.times_s[-1]:.3g} s, "
            f"{len(evo.times_s)} times; states near {q}+ above 1 %)",
            *_table(header, table),
            f"  extraction at {r.extraction_time_s:.4g} s ({r.extraction_chosen}); mean charge there "
            f"{evo.mean_charge()[i]:.2f}",
        ]

    def best_energy(self) -> list[str]:
        sc = self.r.scan
        if sc is None:
            return []
        s = self.s
        q = int(s.target["charge"])
        what = "photon" if s.source["kind"] == "photon_beam" else "electron"
        e = sc.energies_ev
        out = [
            "",
            f"Best {what} energy for {s.target['symbol']}{q}+ "
            f"({len(e)} energies {e[0]:.4g} … {e[-1]:.4g} eV)",
        ]
        if isinstance(sc, _AppearanceScan):
            k = int(np.argmin(np.abs(sc.energies_ev - sc.own_energy_ev)))
            out[-1] += ": the largest partial cross section of one collision"
            out.append(
                f"  best: {sc.best_energy_ev:.5g} eV, σ({q}+) = {sc.best_cross_section_cm2:.3e} cm², "
                f"{sc.best_fraction:.4f} of the ions made"
            )
            out.append(
                f"  near the scenario's {sc.own_energy_ev:.5g} eV ({sc.energies_ev[k]:.4g} eV on the grid): "
                f"σ({q}+) = {sc.sigma_q[k]:.3e} cm², {sc.share_q[k]:.4f} of the ions made"
            )
            return out
        line = f"  best: {sc.best_energy_ev:.5g} eV"
        if sc.best_time_s is not None:
            line += f" at {sc.best_time_s:.3g} s"
        out.append(line + f", fraction {sc.best_fraction:.4f}")
        evo = self.r.target_evolution
        if evo is not None:
            t, f = evo.peak(q)
            energy = s.source.get("energy_ev") or s.source.get("photon_energy_ev")
            out.append(f"  at the scenario's {energy:.5g} eV: peak fraction {f:.4f} at {t:.3g} s")
        return out

    def ions(self) -> list[str]:
        d = self.r.ions
        if d is None:
            return []
        s = self.s
        q = int(s.target["charge"])
        per = d["per_charge"]
        qs = [c for c in range(max(1, q - 3), min(len(per) - 1, q + 3) + 1)]
        header = ["ion", "ions per extraction"]
        rows = [
            [f"{s.target['isotope']}{c}+" + (" ◀" if c == q else ""), _g(float(per[c]), ".3e")]
            for c in qs
            if per[c] >= 0.5 or c == q
        ]
        out = [
            "",
            f"Ions per extraction at {d['time_s']:.4g} s (N_e = {d['electrons_in_trap']:.4g} electrons, "
            f"compensation {d['compensation']:.3g})",
            *_table(header, rows),
        ]
        out.append(
            f"  {s.target_label}: {d['target']:.3e} ions per extraction; all charge states of "
            f"{s.target['isotope']}: {d['all_charges']:.3e}"
        )
        out.append(
            "  N_q = f·N_e·F_q / Σ q·F_q, shared among species by amount × mean charge"
            + (f"; isotopic share {d['isotope_share']:.4g}" if d["isotope_share"] != 1.0 else "")
        )
        return out

    def neighbourhood(self) -> list[str]:
        o = self.r.overlap
        if o is None:
            return []
        header = [
            "ion",
            "m/q (u/e)",
            "A/q",
            "intensity",
            "Δ(m/q)",
            "sep. (FWHM)",
            "contamination",
            "R needed",
        ]
        rows = [
            [
                str(o.label[i]) + (" (gas)" if o.residual[i] else ""),
                f"{o.m_over_q[i]:.5f}",
                f"{o.a_over_q[i]:.4f}",
                _g(float(o.intensity[i]), ".3g"),
                f"{o.delta_m_over_q[i]:+.5f}",
                f"{o.separation_fwhm[i]:.2f}",
                _g(float(o.contamination[i]), ".3g"),
                f"{o.resolving_power_needed[i]:.0f}",
            ]
            for i in range(len(o.label))
        ]
        out = [
            "",
            f"A/q neighbourhood of {o.target} (m/q {o.target_m_over_q:.5f} u/e, A/q {o.target_a_over_q:.4f}; "
            f"R = {o.resolving_power:g}, {o.shape} peaks, FWHM {o.fwhm:.4g} u/e)",
        ]
        if rows:
            out += _table(header, rows)
        else:
            out.append("  no other line within reach at this resolving power")
        out.append(f"  purity of {o.target} in its window: {o.purity:.4f}")
        strong = o.contamination > 0.01
        if strong.any():
            need = float(np.max(o.resolving_power_needed[strong]))
            verdict = "resolved" if need <= o.resolving_power else "NOT resolved"
            out.append(
                f"  resolving power needed to split every interferer above 1 % contamination: {need:.0f} "
                f"(separator: {o.resolving_power:g}: {verdict})"
            )
        return out

    def recommendation(self) -> list[str]:
        rk = self.r.ranking
        if rk is None:
            return []
        sep = self.s.separator
        q = int(self.s.target["charge"])
        header = ["ion", "A/q", "fraction", "purity", "score", "main contaminant"]
        lo, hi = sep["aq_range"] if sep["aq_range"] is not None else (-math.inf, math.inf)
        rows: list[list[str]] = []
        for i in range(len(rk.charge)):
            if len(rows) >= 8:
                break
            if not lo <= rk.a_over_q[i] <= hi or rk.fraction[i] < 1e-3:
                continue
            mark = " ◀" if int(rk.charge[i]) == q else ""
            cont = rk.main_contaminant[i]
            rows.append(
                [
                    f"{rk.label[i]}{mark}",
                    f"{rk.a_over_q[i]:.4f}",
                    f"{rk.fraction[i]:.4f}",
                    f"{rk.purity[i]:.4f}",
                    f"{rk.score[i]:.4f}",
                    "–" if cont is None else f"{cont} ({rk.main_contaminant_share[i]:.2g})",
                ]
            )
        rng = f", A/q {lo:g} … {hi:g}" if sep["aq_range"] is not None else ""
        out = ["", f"Charge states of {self.s.target['isotope']} ranked by fraction × purity{rng}"]
        out += _table(header, rows) if rows else ["  none with at least 0.1 % of the isotope's ions"]
        rec = self.r.recommended
        if rec is not None:
            same = " (the target itself)" if rec["charge"] == q else ""
            t_ex = self.r.extraction_time_s
            at = f" at {t_ex:.3g} s" if math.isfinite(t_ex) else ""
            out.append(
                f"Recommended charge state: {rec['label']}{same}: A/q {rec['a_over_q']:.4f}, "
                f"{rec['fraction'] * 100:.3g} % of the isotope's ions{at}, "
                f"purity {rec['purity']:.4f}"
            )
            evo = self.r.target_evolution
            if evo is not None and rec["charge"] != q:
                t, f = evo.peak(rec["charge"])
                out.append(
                    f"  {rec['label']} itself peaks at {f * 100:.3g} % of the element's ions at {t:.3g} s: "
                    "consider retuning the extraction time for it"
                )
        return out


def _ladder_rows(charges: list[int], subshells: list[str], target: int) -> set[int]:
    """Rows worth printing: all for short ladders, else the first two, every row where a new
    subshell opens, and the last few steps up to the target and beyond."""
    n = len(charges)
    if n <= 16:
        return set(range(n))
    keep = {0, 1}
    keep |= {i for i in range(1, n) if subshells[i] != subshells[i - 1]}
    keep |= {i for i, c in enumerate(charges) if c >= target - 4}
    return keep


def _wrap(text: str, width: int) -> list[str]:
    import textwrap

    return textwrap.wrap(text, width, initial_indent="  ", subsequent_indent="  ")


def _time_index(times: np.ndarray, t: float) -> int:
    return int(np.argmin(np.abs(np.asarray(times) - t)))


def _jsonable(x: Any) -> Any:
    if isinstance(x, dict):
        return {str(k): _jsonable(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_jsonable(v) for v in x]
    if isinstance(x, np.ndarray):
        return _jsonable(x.tolist())
    if isinstance(x, (np.integer,)):
        return int(x)
    if isinstance(x, (float, np.floating)):
        v = float(x)
        return v if math.isfinite(v) else None
    return x
