//! Physical constants, CODATA 2018 (as in scipy.constants).

/// Rydberg energy in eV.
pub const RYDBERG_EV: f64 = 13.605_693_122_994;
/// Bohr radius in m.
pub const BOHR_RADIUS_M: f64 = 5.291_772_109_03e-11;
/// Fine-structure constant.
pub const ALPHA: f64 = 1.0 / 137.035_999_084;
/// Reduced Compton wavelength of the electron ħ/(m_e c) in m.
pub const REDUCED_COMPTON_M: f64 = 3.861_592_679_6e-13;
/// Electron rest energy in eV.
pub const ELECTRON_REST_EV: f64 = 510_998.950_00;
/// Atomic mass unit in eV/c².
pub const ATOMIC_MASS_UNIT_EV: f64 = 931_494_102.42;
/// Electron mass in u.
pub const ELECTRON_MASS_U: f64 = 5.485_799_090_65e-4;
/// Elementary charge in C.
pub const ELEMENTARY_CHARGE_C: f64 = 1.602_176_634e-19;
/// Electron mass in kg.
pub const ELECTRON_MASS_KG: f64 = 9.109_383_701_5e-31;
/// Atomic mass unit in kg.
pub const ATOMIC_MASS_UNIT_KG: f64 = 1.660_539_066_60e-27;
/// Speed of light in m/s.
pub const SPEED_OF_LIGHT_M_S: f64 = 299_792_458.0;
/// Vacuum permittivity in F/m.
pub const EPSILON_0: f64 = 8.854_187_812_8e-12;
/// Boltzmann constant in J/K.
pub const BOLTZMANN_J_K: f64 = 1.380_649e-23;
/// Boltzmann constant in eV/K.
pub const BOLTZMANN_EV_K: f64 = 8.617_333_262e-5;
/// Avogadro constant in 1/mol.
pub const AVOGADRO: f64 = 6.022_140_76e23;
