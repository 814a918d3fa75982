//! Binding of the scenario reader: the checked scenario as plain Python dicts, lists and
//! numbers (the Python class `chargecast.Scenario` wraps them).

use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList};

use crate::sources::scenario::{parse_scenario as parse, Scenario, SourceSettings};

/// Read and check a scenario (TOML text); `filename` names it in error messages.
/// Raises `ScenarioError` naming the file, the line and the field.
#[pyfunction]
#[pyo3(signature = (text, filename="<scenario>"))]
fn parse_scenario<'py>(
    py: Python<'py>,
    text: &str,
    filename: &str,
) -> PyResult<Bound<'py, PyDict>> {
    let s = parse(text, filename)?;
    to_dict(py, &s)
}

fn to_dict<'py>(py: Python<'py>, s: &Scenario) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    d.set_item("file", &s.file)?;
    d.set_item("title", &s.title)?;
    d.set_item("description", &s.description)?;

    let t = PyDict::new(py);
    t.set_item("isotope", &s.target.isotope)?;
    t.set_item("symbol", &s.target.symbol)?;
    t.set_item("z", s.target.z)?;
    t.set_item("mass_number", s.target.mass_number)?;
    t.set_item("charge", s.target.charge)?;
    d.set_item("target", t)?;

    let species = PyList::empty(py);
    for sp in &s.species {
        let e = PyDict::new(py);
        e.set_item("name", &sp.name)?;
        e.set_item("symbol", &sp.symbol)?;
        e.set_item("z", sp.z)?;
        e.set_item("mass_number", sp.mass_number)?;
        e.set_item("amount", sp.amount)?;
        e.set_item("initial_charge", sp.initial_charge)?;
        species.append(e)?;
    }
    d.set_item("species", species)?;

    let src = PyDict::new(py);
    src.set_item("kind", s.source.kind())?;
    match &s.source {
        SourceSettings::Trap(t) => {
            src.set_item("energy_ev", t.energy_ev)?;
            src.set_item("current_a", t.current_a)?;
            src.set_item("radius_m", t.radius_m)?;
            src.set_item("current_density_a_cm2", t.current_density_a_cm2)?;
            src.set_item("magnetic_field_t", t.magnetic_field_t)?;
            src.set_item("cathode_radius_m", t.cathode_radius_m)?;
            src.set_item("cathode_temperature_k", t.cathode_temperature_k)?;
            src.set_item("cathode_field_t", t.cathode_field_t)?;
            src.set_item("length_m", t.length_m)?;
            src.set_item("ion_temperature_ev", t.ion_temperature_ev)?;
            src.set_item("gas_temperature_k", t.gas_temperature_k)?;
            src.set_item("compensation", t.compensation)?;
            src.set_item("processes", t.processes.clone())?;
        }
        SourceSettings::PhotonBeam {
            photon_energy_ev,
            flux_cm2_s,
            bandwidth_ev,
        } => {
            src.set_item("photon_energy_ev", photon_energy_ev)?;
            src.set_item("flux_cm2_s", flux_cm2_s)?;
            src.set_item("bandwidth_ev", bandwidth_ev)?;
        }
        SourceSettings::SingleCollision {
            energy_ev,
            energy_spread_ev,
        } => {
            src.set_item("energy_ev", energy_ev)?;
            src.set_item("energy_spread_ev", energy_spread_ev)?;
        }
    }
    d.set_item("source", src)?;

    let pairs = |v: &[(String, f64)]| -> PyResult<Bound<'py, PyDict>> {
        let m = PyDict::new(py);
        for (k, x) in v {
            m.set_item(k, x)?;
        }
        Ok(m)
    };
    d.set_item("residual_gas_pa", pairs(&s.residual_gas_pa)?)?;
    d.set_item("residual_elements", pairs(&s.residual_elements)?)?;

    let time = PyDict::new(py);
    time.set_item("start_s", s.time.start_s)?;
    time.set_item("stop_s", s.time.stop_s)?;
    time.set_item("points", s.time.points)?;
    time.set_item("extraction_s", s.time.extraction_s)?;
    d.set_item("time", time)?;

    let scan = PyDict::new(py);
    scan.set_item("start_ev", s.energy_scan.start_ev)?;
    scan.set_item("stop_ev", s.energy_scan.stop_ev)?;
    scan.set_item("points", s.energy_scan.points)?;
    scan.set_item("scale", if s.energy_scan.log { "log" } else { "linear" })?;
    d.set_item("energy_scan", scan)?;

    let sep = PyDict::new(py);
    let p = &s.separator;
    sep.set_item("resolving_power", p.resolving_power)?;
    sep.set_item("peak_shape", &p.peak_shape)?;
    sep.set_item("aq_half_width", p.aq_half_width)?;
    sep.set_item("relative_half_width", p.relative_half_width)?;
    sep.set_item("window_fwhm", p.window_fwhm)?;
    sep.set_item("aq_range", p.aq_range)?;
    sep.set_item("residual_amount", p.residual_amount)?;
    d.set_item("separator", sep)?;

    let lines = PyDict::new(py);
    for (k, l) in &s.lines {
        lines.set_item(k, l)?;
    }
    d.set_item("lines", lines)?;
    Ok(d)
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(parse_scenario, m)?)?;
    Ok(())
}
