"""The JSON view of a :class:`chargecast.Report`: the same content as the text, as data.

Non-finite numbers become ``null``. No model decision is made here: rows and thresholds
come from the report.
"""

from __future__ import annotations

import json
import math
from typing import Any

import numpy as np

from chargecast import _core

__all__ = ["scenario_dict", "to_dict", "to_json"]

# The fields of each source's settings, in the order the schema lists them.
_SOURCE_FIELDS = {
    "beam_trap": (
        "energy_ev",
        "current_a",
        "radius_m",
        "current_density_a_cm2",
        "magnetic_field_t",
        "cathode_radius_m",
        "cathode_temperature_k",
        "cathode_field_t",
        "length_m",
        "ion_temperature_ev",
        "gas_temperature_k",
        "compensation",
        "processes",
        "model",
    ),
    "photon_beam": ("photon_energy_ev", "flux_cm2_s", "bandwidth_ev"),
    "electron_impact": ("energy_ev", "energy_spread_ev"),
    "plasma": (
        "electron_temperature_ev",
        "hot_electron_temperature_ev",
        "hot_electron_fraction",
        "electron_density_cm3",
        "ion_temperature_ev",
        "confinement_time_s",
        "confinement_exponent",
        "gas_feed_pa",
        "gas_temperature_k",
        "neutral_residence_time_s",
        "wall_recycling",
        "plasma_volume_m3",
        "extraction_fraction",
    ),
}
# The beam trap's fields that only the dynamic model takes.
_DYNAMIC_FIELDS = (
    "axial_barrier_v",
    "drift_tube_radius_m",
    "gas_feed_pa",
    "dynamic_processes",
    "injected_atoms",
)


def _fields(obj: Any, names: tuple[str, ...]) -> dict[str, Any]:
    return {n: getattr(obj, n) for n in names}


def scenario_dict(scenario: Any) -> dict[str, Any]:
    """The checked scenario as JSON-compatible data (every default filled in)."""
    s = scenario
    src = s.source
    return {
        "file": s.file,
        "title": s.title,
        "description": s.description,
        "target": _fields(s.target, ("isotope", "symbol", "z", "mass_number", "charge")),
        "species": [
            _fields(sp, ("name", "symbol", "z", "mass_number", "amount", "initial_charge"))
            for sp in s.species
        ],
        "source": {
            "kind": src.kind,
            **_fields(src, _SOURCE_FIELDS[src.kind]),
            **(_fields(src, _DYNAMIC_FIELDS) if src.model == "dynamic" else {}),
        },
        "residual_gas_pa": s.residual_gas_pa,
        "residual_elements": s.residual_elements,
        "time": _fields(s.time, ("start_s", "stop_s", "points", "extraction_s")),
        "energy_scan": _fields(s.energy_scan, ("start_ev", "stop_ev", "points", "scale")),
        "separator": _fields(
            s.separator,
            (
                "resolving_power",
                "peak_shape",
                "aq_half_width",
                "relative_half_width",
                "window_fwhm",
                "aq_range",
            ),
        ),
    }


def to_dict(report: Any) -> dict[str, Any]:
    """The report as JSON-compatible data.

    Parameters
    ----------
    report : chargecast.Report

    Returns
    -------
    dict
    """
    r = report
    s = r.scenario
    steps = r.ladder.steps
    ladder = {
        "charge": [st.charge for st in steps],
        "ionization_energy_ev": [st.ionization_energy_ev for st in steps],
        "threshold_ev": [st.threshold_ev for st in steps],
        "subshell": [st.subshell or "" for st in steps],
        "cross_section_cm2": [st.cross_section_cm2 for st in steps],
        "breeding_time_s": [st.breeding_time_s for st in steps],
        "j_tau_c_cm2": [st.j_tau_c_cm2 for st in steps],
        "energy_ev": [r.ladder.energy_ev],
        "current_density_a_cm2": [r.ladder.current_density_a_cm2],
        "cross_section_kind": [r.ladder.cross_section_kind],
    }
    rec = r.recommended
    out: dict[str, Any] = {
        "scenario": scenario_dict(s),
        "target": s.target.label,
        "model": r.model,
        "breeding_ladder": ladder,
        "evolution": None,
        "best_energy": None,
        "ions_per_extraction": None,
        "injection": None,
        "aq_neighbourhood": None,
        "charge_state_ranking": None,
        "recommended_charge_state": None
        if rec is None
        else _fields(
            rec,
            ("charge", "label", "a_over_q", "m_over_q", "fraction", "purity", "score", "main_contaminant"),
        ),
        "notes": r.notes,
        "warnings": [_fields(w, ("what", "value", "unit", "range", "message")) for w in r.warnings],
        "cautions": r.cautions,
    }
    evo = r.target_evolution
    if evo is not None:
        out["evolution"] = {
            "element": evo.element,
            "times_s": [s.time.start_s, s.time.stop_s, s.time.points],
            "extraction_time_s": r.extraction_time_s,
            "extraction_time_from": r.extraction_chosen,
            "mean_charge_at_extraction": r.mean_charge_at_extraction,
            "charge_states": [
                _fields(
                    x, ("charge", "peak_fraction", "peak_time_s", "final_fraction", "fraction_at_extraction")
                )
                for x in r.evolution_summary
            ],
        }
    else:
        out["evolution"] = {"electron_impact_yields": dict(r.fractions_at_extraction)}
    sc = r.best_energy
    e = sc.energies_ev
    out["best_energy"] = {
        "charge": s.target.charge,
        "energies_ev": [float(e[0]), float(e[-1]), len(e)],
        "best_energy_ev": sc.best_energy_ev,
        "best_time_s": sc.best_time_s,
        "best_fraction": sc.best_fraction,
    }
    if sc.kind == "appearance":
        out["best_energy"]["best_cross_section_cm2"] = sc.best_cross_section_cm2
    ro = r.robust_optimum
    if ro is not None:
        out["best_energy"]["robust"] = _fields(
            ro,
            (
                "spread_ev",
                "energy_ev",
                "time_s",
                "fraction",
                "sharp_energy_ev",
                "on_scan_edge",
                "at_last_time",
                "near_threshold",
                "sharp_near_threshold",
                "next_threshold_charge",
                "next_threshold_ev",
                "margin_ev",
                "tube_voltage_v",
            ),
        )
    if r.photon_thresholds is not None:
        out["one_photon"] = [
            {
                "charge": th.charge,
                "threshold_ev": th.threshold_ev,
                "yield_per_photon": th.yield_per_photon,
                "via": [_fields(rt, ("subshell", "binding_ev", "probability")) for rt in th.routes],
            }
            for th in r.photon_thresholds
        ]
    if r.ions is not None:
        d = r.ions
        out["ions_per_extraction"] = {
            **_fields(
                d,
                ("time_s", "electrons_in_trap", "compensation", "species", "species_share_of_charge"),
            ),
            "isotope_share": d.isotope_share,
            "per_charge": {f"{q}+": float(n) for q, n in enumerate(d.per_charge) if n >= 0.5},
            "target": d.target,
            "all_charges": d.all_charges,
        }
    c = r.injection
    if c is not None:
        out["injection"] = {
            "ions_per_bunch": c.ions_per_bunch,
            "repetition_rate_hz": c.repetition_rate_hz,
            "breeding_time_s": c.breeding_time_s,
            "daughter_charge": c.daughter_charge,
            "decayed_before_injection": c.decayed_before_injection,
            "not_captured": c.not_captured,
            "extracted_per_bunch": float(c.trapped[-1]),
            "decayed_per_bunch": float(c.decayed[-1]),
            "lost_per_bunch": float(c.lost[-1]),
            "efficiency": {f"{q}+": float(e) for q, e in enumerate(c.efficiency) if e > 0},
            "nuclides": [
                {
                    "nuclide": name,
                    "half_life_s": half,
                    "ions_per_s": {f"{q}+": float(n) for q, n in enumerate(c.extracted_per_s(name)) if n > 0},
                }
                for name, half in zip(c.nuclides, c.half_lives_s)
            ],
        }
    if r.dynamics is not None:
        out["dynamics"] = _dynamics(r.dynamics)
    if r.plasma is not None:
        out["plasma"] = _plasma(r.plasma)
    u = r.uncertainty
    if u is not None:
        out["uncertainty"] = {
            "samples": u.samples,
            "seed": u.seed,
            "factors": u.factors,
            "percentiles": list(_core.BAND_PERCENTILES),
            "peak_time_s": list(u.peak_time_s),
            "peak_fraction": list(u.peak_fraction),
            "ions_per_extraction": list(u.ions_per_extraction),
        }
    o = r.neighbourhood
    out["aq_neighbourhood"] = None if o is None else _neighbourhood(o)
    out["charge_state_ranking"] = [
        _fields(rk, ("charge", "ion", "a_over_q", "fraction", "purity", "score", "main_contaminant"))
        for rk in r.ranking
    ]
    return _jsonable(out)


def _plasma(p: Any) -> dict[str, Any]:
    """The plasma's steady state: per element the fractions and extracted currents (eµA)
    by charge, the target's current and the steady-state temperature scan."""
    return {
        "electron_density_cm3": p.electron_density_cm3,
        "ion_charge_density_cm3": p.ion_charge_density_cm3,
        "isotope_share": p.isotope_share,
        "target_current_eua": p.target_current_eua,
        "elements": [
            {
                "symbol": e.symbol,
                "residual_gas": e.residual,
                "atom_density_cm3": e.atom_density_cm3,
                "mean_ion_charge": e.mean_ion_charge,
                "total_current_eua": e.total_current_eua,
                "fractions": {f"{q}+": float(f) for q, f in enumerate(e.fractions) if f > 0},
                "currents_eua": {f"{q}+": float(i) for q, i in enumerate(e.currents_eua) if q > 0 and i > 0},
            }
            for e in p.elements
        ],
        "temperature_scan": {
            "electron_temperature_ev": [float(t) for t in p.scan_temperatures_ev],
            "target_fraction": [float(f) for f in p.scan_target_fraction],
            "target_current_eua": [float(i) for i in p.scan_target_current_eua],
            "best_temperature_ev": p.best_temperature_ev,
            "best_current_eua": p.best_current_eua,
        },
    }


def _neighbourhood(o: Any) -> dict[str, Any]:
    return {
        "target": o.target,
        "m_over_q": o.m_over_q,
        "a_over_q": o.a_over_q,
        "resolving_power": o.resolving_power,
        "peak_shape": o.peak_shape,
        "fwhm": o.fwhm,
        "window": list(o.window),
        "purity": o.purity,
        "interferers": [
            _fields(
                i,
                (
                    "ion",
                    "m_over_q",
                    "a_over_q",
                    "intensity",
                    "residual_gas",
                    "delta_m_over_q",
                    "separation_fwhm",
                    "contamination",
                    "resolving_power_needed",
                ),
            )
            for i in o.interferers
        ],
    }


def _dynamics(d: Any) -> dict[str, Any]:
    """The ion-dynamics section: settings, rows at the extraction time, the bookkeeping."""
    return {
        "axial_barrier_v": d.axial_barrier_v,
        "drift_tube_radius_m": d.drift_tube_radius_m,
        "gas_feed_pa": d.gas_feed_pa,
        "processes": d.processes,
        "injected_atoms": d.injected_atoms,
        "target_species": d.target_species,
        "extraction_time_s": d.extraction_time_s,
        "target_and_neighbours": [
            _fields(row, ("charge", "ions", "temperature_ev", "overlap", "escape_per_s"))
            for row in d.target_rows
        ],
        "species": [
            _fields(sp, ("label", "fed_only", "ions", "mean_charge", "mean_temperature_ev", "escape_per_s"))
            for sp in d.species_rows
        ],
        "compensation": d.compensation,
        "well_depth_v": d.well_depth_v,
        "aq_intensity_unit": "ions per extraction (analyte and gas ions alike)",
        "bookkeeping": {
            "particles": d.particles,
            "energy_ev": d.energy_ev,
            "particle_balance": d.particle_balance,
            "energy_balance": d.energy_balance,
        },
    }


def to_json(report: Any, indent: int | None = 2) -> str:
    """The report as JSON text (same content as the text view)."""
    return json.dumps(to_dict(report), indent=indent, allow_nan=False)


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
