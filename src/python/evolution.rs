//! The result of a charge-state evolution: fractions of every charge state over time, with
//! the quantities read from them (mean charge, peaks, interpolation, a summary).

use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;
use pyo3::types::PyDict;

use super::convert::{array2_arg, element_arg, float_arg, int_arg, times_arg};
use super::{matrix_to_py, to_py};
use crate::atoms::Element;
use crate::error::Error;
use crate::solve::evolution;

/// Charge-state fractions of one element over confinement time.
///
/// Parameters
/// ----------
/// element : str or int
///     Symbol, name or Z.
/// times_s : array_like, shape (T,)
///     Output times (s), ascending.
/// fractions : array_like, shape (T, Z+1)
///     Population of each charge state 0 … Z at each time (sums to 1 without losses).
/// label : str, optional
///     Description of the source settings, used in plots and tables.
#[pyclass(name = "Evolution", module = "chargecast", frozen, subclass)]
pub(crate) struct PyEvolution {
    element: &'static Element,
    times_s: Vec<f64>,
    fractions: ndarray::Array2<f64>,
    label: String,
}

impl PyEvolution {
    fn z(&self) -> u32 {
        self.fractions.ncols().saturating_sub(1) as u32
    }

    fn charge(&self, charge: &Bound<'_, PyAny>) -> PyResult<usize> {
        let q = int_arg("charge", charge)?;
        self.element.check_charge(q, self.z())?;
        Ok(q as usize)
    }

    fn peak_of(&self, q: usize) -> (f64, f64) {
        evolution::peak(&self.times_s, self.fractions.view(), q)
    }

    fn dominant(&self, threshold: f64) -> Vec<usize> {
        evolution::dominant_charges(self.fractions.view(), threshold)
    }

    /// An Evolution object (the Python package's class when it is loaded).
    pub(crate) fn result<'py>(
        py: Python<'py>,
        element: &'static Element,
        times_s: Vec<f64>,
        fractions: ndarray::Array2<f64>,
        label: String,
    ) -> PyResult<Bound<'py, PyAny>> {
        let value = PyEvolution {
            element,
            times_s,
            fractions,
            label,
        };
        super::results::into_result(py, "Evolution", value)
    }
}

#[pymethods]
impl PyEvolution {
    #[new]
    #[pyo3(signature = (element=None, times_s=None, fractions=None, label=None))]
    fn new(
        element: Option<&Bound<'_, PyAny>>,
        times_s: Option<&Bound<'_, PyAny>>,
        fractions: Option<&Bound<'_, PyAny>>,
        label: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Self> {
        let label: String = match label {
            None => String::new(),
            Some(l) => l.extract().map_err(|_| {
                super::errors::argument_type_error(format!(
                    "invalid label: {} given, must be a str",
                    super::convert::type_name(l)
                ))
            })?,
        };
        let (element, times_s, fractions) = match (element, times_s, fractions) {
            (Some(e), Some(t), Some(f)) => (e, t, f),
            (None, None, None) => {
                return super::results::staged("Evolution", "BeamTrap.evolve or PhotonBeam.evolve")
            }
            _ => {
                return Err(Error::invalid(
                    "Evolution",
                    "missing arguments",
                    "give element, times_s and fractions",
                )
                .into())
            }
        };
        let element = element_arg(element)?;
        let times_s = times_arg(times_s)?;
        let fractions = array2_arg("fractions", fractions)?;
        if fractions.nrows() != times_s.len() || fractions.ncols() == 0 {
            return Err(Error::invalid(
                "fractions",
                format!("shape {:?}", fractions.shape()),
                &format!(
                    "must have shape (len(times_s), Z+1) for {} times",
                    times_s.len()
                ),
            )
            .into());
        }
        Ok(PyEvolution {
            element,
            times_s,
            fractions,
            label,
        })
    }

    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        self.element.symbol()
    }
    /// Atomic number (the highest charge state).
    #[getter(z)]
    fn z_py(&self) -> u32 {
        self.z()
    }
    /// Output times (s), shape (T,).
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.times_s.clone())
    }
    /// Fractions [T, Z+1] of every charge state at every time.
    #[getter]
    fn fractions<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray2<f64>> {
        matrix_to_py(py, self.fractions.clone())
    }
    /// Charge states 0 … Z.
    #[getter]
    fn charges<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<i64>> {
        numpy::IntoPyArray::into_pyarray((0..self.fractions.ncols() as i64).collect::<Vec<_>>(), py)
    }
    /// Description of the source settings.
    #[getter]
    fn label(&self) -> &str {
        &self.label
    }

    /// Mean charge Σ q·F_q / Σ F_q at every time.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (T,)
    ///     Mean charge (elementary charges); 0 where every fraction is 0.
    fn mean_charge<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, evolution::mean_charge(self.fractions.view()))
    }

    /// Time (s) and value of the largest fraction of one charge state on the time grid.
    ///
    /// Parameters
    /// ----------
    /// charge : int
    ///     Charge state, 0 … Z.
    ///
    /// Returns
    /// -------
    /// tuple of float
    ///     ``(time_s, fraction)``.
    fn peak(&self, charge: &Bound<'_, PyAny>) -> PyResult<(f64, f64)> {
        Ok(self.peak_of(self.charge(charge)?))
    }

    /// Fractions at one time, interpolated linearly between grid points.
    ///
    /// Parameters
    /// ----------
    /// time_s : float
    ///     Time (s) within the computed grid.
    ///
    /// Returns
    /// -------
    /// ndarray, shape (Z+1,)
    ///     Fraction of each charge state.
    fn at<'py>(
        &self,
        py: Python<'py>,
        time_s: &Bound<'_, PyAny>,
    ) -> PyResult<Bound<'py, PyArray1<f64>>> {
        let t = float_arg("time_s", time_s)?;
        let (first, last) = match (self.times_s.first(), self.times_s.last()) {
            (Some(a), Some(b)) => (*a, *b),
            _ => return Err(Error::invalid("time_s", t, "the evolution has no times").into()),
        };
        if !(first <= t && t <= last) {
            return Err(Error::invalid(
                "time_s",
                t,
                &format!("must lie within the computed grid {first} … {last} s"),
            )
            .into());
        }
        Ok(to_py(
            py,
            evolution::interpolate(&self.times_s, self.fractions.view(), t),
        ))
    }

    /// Charge states whose fraction ever exceeds ``threshold``.
    #[pyo3(signature = (threshold=None))]
    fn dominant_charges(&self, threshold: Option<&Bound<'_, PyAny>>) -> PyResult<Vec<usize>> {
        Ok(self.dominant(threshold_arg(threshold)?))
    }

    /// Per charge state that exceeds ``threshold``: peak fraction, time of peak, final fraction.
    ///
    /// Returns
    /// -------
    /// list of dict
    ///     Keys ``charge``, ``peak_fraction``, ``peak_time_s``, ``final_fraction``.
    #[pyo3(signature = (threshold=None))]
    fn summary<'py>(
        &self,
        py: Python<'py>,
        threshold: Option<&Bound<'_, PyAny>>,
    ) -> PyResult<Vec<Bound<'py, PyDict>>> {
        let threshold = threshold_arg(threshold)?;
        let Some(last) = self.fractions.nrows().checked_sub(1) else {
            return Ok(Vec::new());
        };
        self.dominant(threshold)
            .into_iter()
            .map(|q| {
                let (t, f) = self.peak_of(q);
                let d = PyDict::new(py);
                d.set_item("charge", q)?;
                d.set_item("peak_fraction", f)?;
                d.set_item("peak_time_s", t)?;
                d.set_item("final_fraction", self.fractions[[last, q]])?;
                Ok(d)
            })
            .collect()
    }
}

/// The fraction above which a charge state counts (default 0.01): a finite number.
fn threshold_arg(threshold: Option<&Bound<'_, PyAny>>) -> PyResult<f64> {
    match threshold {
        None => Ok(0.01),
        Some(t) => {
            let t = float_arg("threshold", t)?;
            if t.is_finite() {
                Ok(t)
            } else {
                Err(Error::invalid("threshold", t, "must be a finite fraction").into())
            }
        }
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyEvolution>()?;
    Ok(())
}
