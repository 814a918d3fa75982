//! Bindings of the spectrum layer: ion masses, A/q line lists, overlaps and clean charge
//! states. Line lists cross the boundary as dicts of equal-length columns; the Python side
//! hands the identifying columns back, and the core rebuilds (and re-checks) the lines.

use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::{guard, to_py};
use crate::error::{Error, Result};
use crate::spectrum::{
    aq_lines, clean_charge_states, ion_mass_u, isotope_label, overlaps, parse_species,
    resolve_isotope, AcceptanceWindow, Line, LineList, OverlapSettings, PeakShape, Peaks,
    SpeciesInput,
};

/// The identifying columns of a line list: z, mass number, charge, intensity, residual flag
/// and the isotope label (read for molecular lines, z = 0).
type Columns = (
    Vec<i64>,
    Vec<i64>,
    Vec<i64>,
    Vec<f64>,
    Vec<bool>,
    Vec<String>,
);

fn rebuild(columns: Columns) -> Result<LineList> {
    let (z, a, q, intensity, residual, labels) = columns;
    let n = z.len();
    if [
        a.len(),
        q.len(),
        intensity.len(),
        residual.len(),
        labels.len(),
    ]
    .iter()
    .any(|&m| m != n)
    {
        return Err(Error::invalid(
            "lines",
            "columns of different lengths",
            "z, mass_number, charge, intensity, residual and isotope must have one entry per line",
        ));
    }
    let lines = (0..n)
        .map(|i| Line::from_columns(z[i], a[i], &labels[i], q[i], intensity[i], residual[i]))
        .collect::<Result<Vec<_>>>()?;
    LineList::new(lines)
}

fn set_line_columns<'py>(d: &Bound<'py, PyDict>, prefix: &str, lines: &[&Line]) -> PyResult<()> {
    let py = d.py();
    let col = |f: &dyn Fn(&Line) -> f64| -> Vec<f64> { lines.iter().map(|l| f(l)).collect() };
    let key = |name: &str| format!("{prefix}{name}");
    d.set_item(
        key("isotope"),
        lines.iter().map(|l| l.isotope_label()).collect::<Vec<_>>(),
    )?;
    d.set_item(
        key("label"),
        lines.iter().map(|l| l.label()).collect::<Vec<_>>(),
    )?;
    d.set_item(key("z"), lines.iter().map(|l| l.z).collect::<Vec<_>>())?;
    d.set_item(
        key("mass_number"),
        lines.iter().map(|l| l.mass_number).collect::<Vec<_>>(),
    )?;
    d.set_item(
        key("charge"),
        lines.iter().map(|l| l.charge).collect::<Vec<_>>(),
    )?;
    d.set_item(key("mass_u"), to_py(py, col(&|l| l.mass_u)))?;
    d.set_item(key("m_over_q"), to_py(py, col(&|l| l.m_over_q)))?;
    d.set_item(key("a_over_q"), to_py(py, col(&|l| l.a_over_q)))?;
    d.set_item(key("intensity"), to_py(py, col(&|l| l.intensity)))?;
    d.set_item(
        key("residual"),
        lines.iter().map(|l| l.residual).collect::<Vec<_>>(),
    )?;
    Ok(())
}

fn line_dict<'py>(py: Python<'py>, list: &LineList) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    let lines: Vec<&Line> = list.lines().iter().collect();
    set_line_columns(&d, "", &lines)?;
    Ok(d)
}

/// Ion mass (u) of an isotope at a charge.
#[pyfunction]
fn _ion_mass_u(isotope: &str, charge: i64) -> PyResult<f64> {
    Ok(ion_mass_u(resolve_isotope(isotope)?, charge)?)
}

/// (Z, symbol, isotope label or None for a natural mix) of a species specification; for a
/// molecule (its electrons, its formula, None).
#[pyfunction]
fn _species_info(spec: &str) -> PyResult<(u32, String, Option<String>)> {
    if let crate::atoms::Substance::Molecule(f) = crate::atoms::parse_substance(spec)? {
        return Ok((f.electrons(), f.label(), None));
    }
    let s = parse_species(spec)?;
    let label = match s {
        crate::spectrum::Species::Isotope(_, iso) => Some(isotope_label(iso)),
        crate::spectrum::Species::Natural(_) => None,
    };
    Ok((s.element().z(), s.element().symbol().to_string(), label))
}

/// Line list of (spec, amount, fractions, residual) entries, as a dict of columns.
#[pyfunction]
fn _aq_lines<'py>(
    py: Python<'py>,
    species: Vec<(String, f64, Vec<f64>, bool)>,
) -> PyResult<Bound<'py, PyDict>> {
    let inputs: Vec<SpeciesInput> = species
        .into_iter()
        .map(|(spec, amount, fractions, residual)| SpeciesInput {
            spec,
            amount,
            fractions,
            residual,
        })
        .collect();
    let list = guard(py, || aq_lines(&inputs))?;
    line_dict(py, &list)
}

/// Re-check and re-sort a line list given by its identifying columns.
#[pyfunction]
fn _rebuild_lines<'py>(py: Python<'py>, columns: Columns) -> PyResult<Bound<'py, PyDict>> {
    let list = guard(py, || rebuild(columns))?;
    line_dict(py, &list)
}

#[pyfunction]
#[allow(clippy::too_many_arguments)]
fn _overlaps<'py>(
    py: Python<'py>,
    columns: Columns,
    target: &str,
    charge: i64,
    resolving_power: f64,
    shape: &str,
    window_fwhm: f64,
    search_fwhm: f64,
) -> PyResult<Bound<'py, PyDict>> {
    let target = target.to_string();
    let shape = shape.to_string();
    let report = guard(py, || {
        let settings = OverlapSettings::new(
            resolving_power,
            PeakShape::parse(&shape)?,
            window_fwhm,
            search_fwhm,
        )?;
        let iso = resolve_isotope(&target)?;
        overlaps(&rebuild(columns)?, iso, charge, &settings)
    })?;
    let d = PyDict::new(py);
    set_line_columns(&d, "target_", &[&report.target])?;
    d.set_item("fwhm", report.fwhm)?;
    d.set_item("window", report.window)?;
    d.set_item("target_window_fraction", report.target_window_fraction)?;
    d.set_item("purity", report.purity)?;
    d.set_item("shape", report.settings.peaks.shape.label())?;
    let rows = &report.interferences;
    let lines: Vec<&Line> = rows.iter().map(|r| &r.line).collect();
    set_line_columns(&d, "", &lines)?;
    let col = |f: &dyn Fn(&crate::spectrum::Interference) -> f64| -> Vec<f64> {
        rows.iter().map(f).collect()
    };
    d.set_item("delta_m_over_q", to_py(py, col(&|r| r.delta_m_over_q)))?;
    d.set_item("separation_fwhm", to_py(py, col(&|r| r.separation_fwhm)))?;
    d.set_item("window_fraction", to_py(py, col(&|r| r.window_fraction)))?;
    d.set_item("contamination", to_py(py, col(&|r| r.contamination)))?;
    d.set_item(
        "resolving_power_needed",
        to_py(py, col(&|r| r.resolving_power_needed)),
    )?;
    Ok(d)
}

/// `window_kind` is "aq" (half-width in u/e), "relative" (half-width over m/q) or "fwhm"
/// (full width in FWHM, needs a resolving power).
#[pyfunction]
#[pyo3(signature = (columns, target, window_kind, window_value, resolving_power=None, shape="gaussian"))]
fn _clean_charge_states<'py>(
    py: Python<'py>,
    columns: Columns,
    target: &str,
    window_kind: &str,
    window_value: f64,
    resolving_power: Option<f64>,
    shape: &str,
) -> PyResult<Bound<'py, PyDict>> {
    let (target, shape, kind) = (
        target.to_string(),
        shape.to_string(),
        window_kind.to_string(),
    );
    let ranks = guard(py, || {
        let window = match kind.as_str() {
            "aq" => AcceptanceWindow::HalfWidth(window_value),
            "relative" => AcceptanceWindow::Relative(window_value),
            "fwhm" => AcceptanceWindow::Fwhm(window_value),
            other => {
                return Err(Error::invalid(
                    "window kind",
                    format!("{other:?}"),
                    "\"aq\", \"relative\" or \"fwhm\"",
                ))
            }
        };
        let peaks = resolving_power
            .map(|r| Peaks::new(r, PeakShape::parse(&shape)?))
            .transpose()?;
        clean_charge_states(&rebuild(columns)?, resolve_isotope(&target)?, window, peaks)
    })?;
    let d = PyDict::new(py);
    let lines: Vec<&Line> = ranks.iter().map(|r| &r.line).collect();
    set_line_columns(&d, "", &lines)?;
    let col = |f: &dyn Fn(&crate::spectrum::ChargeStateRank) -> f64| -> Vec<f64> {
        ranks.iter().map(f).collect()
    };
    d.set_item("fraction", to_py(py, col(&|r| r.fraction)))?;
    d.set_item("purity", to_py(py, col(&|r| r.purity)))?;
    d.set_item("score", to_py(py, col(&|r| r.score)))?;
    d.set_item("window_low", to_py(py, col(&|r| r.window.0)))?;
    d.set_item("window_high", to_py(py, col(&|r| r.window.1)))?;
    d.set_item(
        "main_contaminant",
        ranks
            .iter()
            .map(|r| r.main_contaminant.as_ref().map(|l| l.label()))
            .collect::<Vec<_>>(),
    )?;
    d.set_item(
        "main_contaminant_share",
        to_py(py, col(&|r| r.main_contaminant_share)),
    )?;
    Ok(d)
}

/// Σ intensity × peak height at every x: the peak spectrum to draw (peaks of height = intensity).
#[pyfunction]
fn _peak_profile<'py>(
    py: Python<'py>,
    m_over_q: Vec<f64>,
    intensity: Vec<f64>,
    x: Vec<f64>,
    resolving_power: f64,
    shape: &str,
) -> PyResult<Bound<'py, numpy::PyArray1<f64>>> {
    let shape = shape.to_string();
    let out = guard(py, || {
        let peaks = Peaks::new(resolving_power, PeakShape::parse(&shape)?)?;
        if m_over_q.len() != intensity.len() {
            return Err(Error::invalid(
                "intensity",
                intensity.len(),
                "one intensity per line",
            ));
        }
        let mut y = vec![0.0; x.len()];
        for (&c, &h) in m_over_q.iter().zip(&intensity) {
            let w = peaks.fwhm(c);
            for (yi, &xi) in y.iter_mut().zip(&x) {
                if (xi - c).abs() < 8.0 * w {
                    *yi += h * peaks.shape.height(c, w, xi);
                }
            }
        }
        Ok(y)
    })?;
    Ok(to_py(py, out))
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(_ion_mass_u, m)?)?;
    m.add_function(wrap_pyfunction!(_species_info, m)?)?;
    m.add_function(wrap_pyfunction!(_aq_lines, m)?)?;
    m.add_function(wrap_pyfunction!(_rebuild_lines, m)?)?;
    m.add_function(wrap_pyfunction!(_overlaps, m)?)?;
    m.add_function(wrap_pyfunction!(_clean_charge_states, m)?)?;
    m.add_function(wrap_pyfunction!(_peak_profile, m)?)?;
    Ok(())
}
