//! The result of an energy × time scan: the fraction of the target charge state(s) over the
//! grid and its maximum (electron-beam energy for a trap, photon energy for a photon beam).

use numpy::{PyArray1, PyArray2};
use pyo3::prelude::*;

use super::{matrix_to_py, to_py};
use crate::atoms::Element;
use crate::error::{Error, Result};
use crate::sources::energy_map::EnergyTimeMap;

/// Fraction of target charge state(s) over an energy × time grid, and its maximum.
///
/// ``fraction[energy, time]`` is the summed fraction of ``charges`` (atoms start neutral);
/// ``best_energy_ev``, ``best_time_s`` and ``best_fraction`` mark its largest value.
#[pyclass(name = "EnergyScan", module = "chargecast", frozen, subclass)]
pub(crate) struct PyEnergyScan {
    element: &'static Element,
    charges: Vec<u32>,
    map: EnergyTimeMap,
}

impl PyEnergyScan {
    /// The scan as the Python class registered as `name` ("EnergyScan" or
    /// "PhotonEnergyScan").
    pub(crate) fn result<'py>(
        py: Python<'py>,
        name: &str,
        element: &'static Element,
        charges: Vec<u32>,
        map: EnergyTimeMap,
    ) -> PyResult<Bound<'py, PyAny>> {
        let value = PyEnergyScan {
            element,
            charges,
            map,
        };
        super::results::into_result(py, name, value)
    }
}

fn fraction_matrix(map: &EnergyTimeMap) -> Result<ndarray::Array2<f64>> {
    let (rows, cols) = (map.fraction.len(), map.times_s.len());
    let flat: Vec<f64> = map.fraction.iter().flatten().copied().collect();
    ndarray::Array2::from_shape_vec((rows, cols), flat)
        .map_err(|e| Error::invalid("grid", e, "internal shape error"))
}

#[pymethods]
impl PyEnergyScan {
    #[new]
    fn new() -> PyResult<Self> {
        super::results::staged(
            "EnergyScan",
            "BeamTrap.best_energy or PhotonBeam.best_energy",
        )
    }
    /// Element symbol.
    #[getter]
    fn element(&self) -> &str {
        self.element.symbol()
    }
    /// Target charge states (their fractions are summed).
    #[getter]
    fn charges(&self) -> Vec<u32> {
        self.charges.clone()
    }
    /// Energies of the grid (eV).
    #[getter]
    fn energies_ev<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.map.energies_ev.clone())
    }
    /// Times of the grid (s).
    #[getter]
    fn times_s<'py>(&self, py: Python<'py>) -> Bound<'py, PyArray1<f64>> {
        to_py(py, self.map.times_s.clone())
    }
    /// Target fraction [energies, times].
    #[getter]
    fn fraction<'py>(&self, py: Python<'py>) -> PyResult<Bound<'py, PyArray2<f64>>> {
        Ok(matrix_to_py(py, fraction_matrix(&self.map)?))
    }
    /// Energy of the largest target fraction (eV).
    #[getter]
    fn best_energy_ev(&self) -> f64 {
        self.map.best_energy_ev
    }
    /// Time of the largest target fraction (s).
    #[getter]
    fn best_time_s(&self) -> f64 {
        self.map.best_time_s
    }
    /// The largest target fraction.
    #[getter]
    fn best_fraction(&self) -> f64 {
        self.map.best_fraction
    }
}

pub(crate) fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_class::<PyEnergyScan>()?;
    Ok(())
}
