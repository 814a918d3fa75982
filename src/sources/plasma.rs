//! The plasma ion source (ECR type): a magnetically confined plasma of hot electrons fed
//! with neutral gas, whose ions leave after a confinement time and form the extracted beam.
//! Turns the settings into a rate network per element, in densities (cm⁻³).
//!
//! # Model
//!
//! A zero-dimensional balance for each element X of the fed and residual gases (molecules
//! count as their atoms: the plasma is taken to dissociate them). States 0…Z are densities
//! n_q (cm⁻³); the neutral state is fed from the gas and pumped:
//!
//!   dn₀/dt = n_X/τ₀ − n₀/τ₀ − n_e S₀ n₀ + n_e α₁ n₁ + Σ_t n_t k_CX,1 n₁ + R Σ_{q≥1} n_q/τ_q
//!   dn_q/dt = n_e (S_{q−1} n_{q−1} − S_q n_q + α_{q+1} n_{q+1} − α_q n_q)
//!           + Σ_t n_t (k_CX,q+1 n_{q+1} − k_CX,q n_q) − n_q/τ_q
//!
//! with n_X = Σ_gas (atoms of X per molecule)·p/(k_B T_gas), τ₀ the neutral residence time,
//! R the wall recycling (the fraction of lost ions that come back as neutrals), and the
//! charge-exchange targets t every fed and residual gas at its full density p/(k_B T_gas)
//! (targets are not depleted). Without plasma n₀ = n_X.
//!
//! * S_q: Maxwellian ionization rate coefficient, Lotz in closed form
//!   ([`crate::processes::lotz::lotz_rate_coefficient_cm3_s`]), through
//!   [`ionization_rate_coefficient_cm3_s`], plus excitation–autoionization of ions
//!   ([`crate::processes::excitation_autoionization::rate_coefficient_cm3_s`]);
//! * α_q: Maxwellian average of Kim–Pratt radiative recombination in closed form
//!   ([`crate::processes::radiative_recombination_rate`]), through
//!   [`recombination_rate_coefficient_cm3_s`], plus dielectronic recombination by
//!   Burgess's general formula ([`crate::processes::dielectronic::rate_coefficient_cm3_s`]);
//! * k_CX: Müller–Salzborn at the mean ion speed of the ion temperature
//!   ([`crate::processes::charge_exchange::charge_exchange_rate_coefficient_cm3_s`]);
//! * the electron energy distribution is one Maxwellian or two (cold and hot, with the hot
//!   fraction f_h): every electron rate coefficient is (1 − f_h)·k(T_c) + f_h·k(T_h);
//! * confinement: τ_q = τ₁·q^α (α = [`DEFAULT_CONFINEMENT_EXPONENT`] by default; 0.5–1 is
//!   common practice) or one value per charge.
//!
//! Extracted current of charge q (eµA): I_q = η·q·e·n_q·V/τ_q, V the plasma volume and η the
//! fraction of the lost ions that reach the extraction (1 by default: an upper bound). In
//! steady state the fed atoms V·n_X/τ₀ equal the atoms leaving, V·[n₀/τ₀ + (1 − R)Σ n_q/τ_q]
//! (checked by the tests to round-off).
//!
//! # Validity and accuracy
//!
//! Rates only: no space charge or ambipolar potential (give τ_q), no quasi-neutrality
//! constraint (Σ q n_q is reported beside n_e), no molecular ions, non-relativistic Maxwellians (kT_e ≲ 50 keV). Accuracy is that of the rate
//! coefficients: Lotz ±30–40 % for ions, radiative recombination about ×1.5, charge exchange
//! about ×2 (from memory); hydrogen-like radiative recombination is within 2 % of the exact
//! hydrogenic values (see [`crate::processes::radiative_recombination_rate`]). The steady
//! state equals a long evolution to 1e-8 (tests).

use super::beam_trap::{GasComponent, DEFAULT_GAS_TEMPERATURE_K};
use crate::atoms::{element, Element};
use crate::constants::ELEMENTARY_CHARGE_C;
use crate::error::{require_non_negative, require_positive, Error, Result};
use crate::network::RateNetwork;
use crate::processes::charge_exchange::{
    charge_exchange_rate_coefficient_cm3_s, gas_number_density_m3,
};
use crate::processes::gases::gas;
use crate::processes::ion_lotz::ionization_rate_coefficients_cm3_s;
use crate::processes::lotz::LotzConstants;
use crate::processes::radiative_recombination_rate::radiative_recombination_rate_coefficients_cm3_s;
use crate::solve::{evolve, steady_state};
use ndarray::Array2;

/// Exponent α of the confinement scaling τ_q = τ₁·q^α when none is given (the upper end of
/// the common-practice range 0.5–1: higher charges are held longer by the plasma potential).
pub const DEFAULT_CONFINEMENT_EXPONENT: f64 = 1.0;
/// Ion temperature kT_i (eV) when none is given (ECR plasma ions are a few eV or colder;
/// common practice).
pub const DEFAULT_PLASMA_ION_TEMPERATURE_EV: f64 = 1.0;
/// Neutral residence time τ₀ (s) when none is given: the time a thermal atom needs to cross
/// a 5 cm chamber (argon at 300 K moves at v̄ ≈ 400 m/s, computed).
pub const DEFAULT_NEUTRAL_RESIDENCE_TIME_S: f64 = 1.25e-4;
/// Plasma volume (m³) when none is given (100 cm³; common practice for a small source).
pub const DEFAULT_PLASMA_VOLUME_M3: f64 = 1e-4;

/// The ions' charge density Σ q·n_q above this multiple of n_e is reported: the particle
/// balance does not impose quasi-neutrality, so an over-fed source shows up this way.
pub const QUASI_NEUTRALITY_LIMIT: f64 = 1.0;

/// The note for ions whose charge density exceeds [`QUASI_NEUTRALITY_LIMIT`] × n_e, or None.
/// `settings` names the inputs to change: `"plasma."` in a scenario file, `""` in the API.
pub fn quasi_neutrality_note(
    ion_charge_density_cm3: f64,
    electron_density_cm3: f64,
    settings: &str,
) -> Option<String> {
    let ratio = ion_charge_density_cm3 / electron_density_cm3;
    (ratio > QUASI_NEUTRALITY_LIMIT).then(|| {
        format!(
            "the ions' charge density Σ q·n_q = {ion_charge_density_cm3:.3e} cm⁻³ is {ratio:.3} × n_e = {electron_density_cm3:.3e} cm⁻³: the source is not quasi-neutral (the balance does not impose it): lower {settings}gas_feed_pa or {settings}confinement_time_s, or raise {settings}electron_density_cm3"
        )
    })
}

/// The ion confinement time per charge.
#[derive(Clone, Debug, PartialEq)]
pub enum Confinement {
    /// τ_q = τ₁·q^α.
    Scaling { tau1_s: f64, exponent: f64 },
    /// τ_q for q = 1, 2, …, one value each (index 0 is charge 1).
    PerCharge(Vec<f64>),
}

impl Confinement {
    /// τ_q (s) for charge q ≥ 1 (None beyond the given values).
    pub fn time_s(&self, charge: u32) -> Option<f64> {
        match self {
            Confinement::Scaling { tau1_s, exponent } => {
                Some(tau1_s * f64::from(charge).powf(*exponent))
            }
            Confinement::PerCharge(t) => t.get(charge as usize - 1).copied(),
        }
    }

    fn check(&self) -> Result<()> {
        match self {
            Confinement::Scaling { tau1_s, exponent } => {
                require_positive("confinement_time_s", *tau1_s)?;
                if !exponent.is_finite() {
                    return Err(Error::invalid(
                        "confinement_exponent",
                        exponent,
                        "must be a finite number",
                    ));
                }
            }
            Confinement::PerCharge(t) => {
                if t.is_empty() {
                    return Err(Error::invalid(
                        "confinement_time_s",
                        "[]",
                        "give one time or one time per charge 1, 2, …",
                    ));
                }
                for (i, v) in t.iter().enumerate() {
                    require_positive(&format!("confinement_time_s[{i}] (charge {})", i + 1), *v)?;
                }
            }
        }
        Ok(())
    }
}

/// Every setting of a plasma source; [`PlasmaSettings::new`] fills the documented defaults.
#[derive(Clone, Debug, PartialEq)]
pub struct PlasmaSettings {
    /// Temperature kT_e (eV) of the (cold) Maxwellian electrons.
    pub electron_temperature_ev: f64,
    /// Total electron density n_e (cm⁻³).
    pub electron_density_cm3: f64,
    pub confinement: Confinement,
    /// Fed gases and their partial pressures (Pa), e.g. [("Ar", 1e-4), ("O2", 4e-4)].
    pub gas_feed_pa: Vec<(String, f64)>,
    /// Residual gases (Pa): ionized and charge-exchange targets like the feed, marked
    /// residual in the spectrum.
    pub residual_gas_pa: Vec<(String, f64)>,
    /// Temperature kT_h (eV) of a hot electron population (with `hot_electron_fraction`).
    pub hot_electron_temperature_ev: Option<f64>,
    /// Fraction 0…1 of the electrons in the hot population.
    pub hot_electron_fraction: f64,
    /// Ion temperature kT_i (eV): the ion speed in charge-exchange collisions.
    pub ion_temperature_ev: f64,
    /// Gas temperature (K) for n = p/(k_B T).
    pub gas_temperature_k: f64,
    /// Neutral residence time τ₀ (s).
    pub neutral_residence_time_s: f64,
    /// Wall recycling R (0…1): the fraction of lost ions that return as neutrals.
    pub wall_recycling: f64,
    /// Plasma volume V (m³) for the extracted currents.
    pub plasma_volume_m3: f64,
    /// Fraction η (0 < η ≤ 1) of the lost ions that reach the extraction.
    pub extraction_fraction: f64,
    /// User Lotz constants for every subshell (None: Lotz's fitted or simplified set).
    pub lotz_constants: Option<LotzConstants>,
}

impl PlasmaSettings {
    /// The required settings with every other at its documented default.
    pub fn new(
        electron_temperature_ev: f64,
        electron_density_cm3: f64,
        confinement: Confinement,
        gas_feed_pa: Vec<(String, f64)>,
    ) -> Self {
        PlasmaSettings {
            electron_temperature_ev,
            electron_density_cm3,
            confinement,
            gas_feed_pa,
            residual_gas_pa: Vec::new(),
            hot_electron_temperature_ev: None,
            hot_electron_fraction: 0.0,
            ion_temperature_ev: DEFAULT_PLASMA_ION_TEMPERATURE_EV,
            gas_temperature_k: DEFAULT_GAS_TEMPERATURE_K,
            neutral_residence_time_s: DEFAULT_NEUTRAL_RESIDENCE_TIME_S,
            wall_recycling: 0.0,
            plasma_volume_m3: DEFAULT_PLASMA_VOLUME_M3,
            extraction_fraction: 1.0,
            lotz_constants: None,
        }
    }
}

/// One element of the plasma: its atom density from the gases and whether it comes only
/// from residual gas.
#[derive(Clone, Debug)]
pub struct PlasmaSpecies {
    pub element: &'static Element,
    /// n_X (cm⁻³): atoms of the element per cm³ in the gas as fed.
    pub atom_density_cm3: f64,
    pub residual: bool,
}

/// A validated plasma source.
#[derive(Clone, Debug)]
pub struct PlasmaSource {
    settings: PlasmaSettings,
    gas_feed: Vec<GasComponent>,
    residual_gas: Vec<GasComponent>,
    species: Vec<PlasmaSpecies>,
}

fn fraction_0_1(name: &str, v: f64) -> Result<f64> {
    if v.is_finite() && (0.0..=1.0).contains(&v) {
        Ok(v)
    } else {
        Err(Error::invalid(name, v, "must lie in 0..=1"))
    }
}

fn gas_components(name: &str, gases: &[(String, f64)]) -> Result<Vec<GasComponent>> {
    let mut out: Vec<GasComponent> = Vec::new();
    for (g, p) in gases {
        require_non_negative(&format!("{name}[{g:?}]"), *p)?;
        let found = gas(g)?;
        if out.iter().any(|c| c.gas.formula == found.formula) {
            return Err(Error::invalid(
                name,
                format!("{g:?} twice"),
                "name each gas once",
            ));
        }
        out.push(GasComponent {
            gas: found,
            pressure_pa: *p,
        });
    }
    Ok(out)
}

impl PlasmaSource {
    /// Validate every setting once and work out the elements the gases bring.
    pub fn new(settings: PlasmaSettings) -> Result<Self> {
        let s = &settings;
        require_positive("electron_temperature_ev", s.electron_temperature_ev)?;
        require_positive("electron_density_cm3", s.electron_density_cm3)?;
        s.confinement.check()?;
        fraction_0_1("hot_electron_fraction", s.hot_electron_fraction)?;
        match s.hot_electron_temperature_ev {
            Some(t) => {
                require_positive("hot_electron_temperature_ev", t)?;
            }
            None if s.hot_electron_fraction > 0.0 => {
                return Err(Error::invalid(
                    "hot_electron_fraction",
                    s.hot_electron_fraction,
                    "a hot fraction needs hot_electron_temperature_ev",
                ))
            }
            None => {}
        }
        require_positive("ion_temperature_ev", s.ion_temperature_ev)?;
        require_positive("gas_temperature_k", s.gas_temperature_k)?;
        require_positive("neutral_residence_time_s", s.neutral_residence_time_s)?;
        fraction_0_1("wall_recycling", s.wall_recycling)?;
        require_positive("plasma_volume_m3", s.plasma_volume_m3)?;
        let eta = fraction_0_1("extraction_fraction", s.extraction_fraction)?;
        if eta == 0.0 {
            return Err(Error::invalid(
                "extraction_fraction",
                eta,
                "must lie in (0, 1]: some ions must reach the extraction",
            ));
        }
        if let Some(c) = s.lotz_constants {
            crate::processes::ion_lotz::check_constants(c)?;
        }
        let gas_feed = gas_components("gas_feed_pa", &s.gas_feed_pa)?;
        if !gas_feed.iter().any(|g| g.pressure_pa > 0.0) {
            return Err(Error::invalid(
                "gas_feed_pa",
                format!("{} gases, none with pressure > 0", gas_feed.len()),
                "feed at least one gas with a partial pressure > 0 Pa",
            ));
        }
        let residual_gas = gas_components("residual_gas_pa", &s.residual_gas_pa)?;
        let mut species: Vec<PlasmaSpecies> = Vec::new();
        for (components, residual) in [(&gas_feed, false), (&residual_gas, true)] {
            for g in components.iter() {
                let n_cm3 = gas_number_density_m3(g.pressure_pa, s.gas_temperature_k) * 1e-6;
                for (symbol, count) in g.gas.atoms {
                    let el = element(symbol)?;
                    let n = n_cm3 * f64::from(*count);
                    match species.iter_mut().find(|sp| std::ptr::eq(sp.element, el)) {
                        Some(sp) => sp.atom_density_cm3 += n,
                        None => species.push(PlasmaSpecies {
                            element: el,
                            atom_density_cm3: n,
                            residual,
                        }),
                    }
                }
            }
        }
        for sp in &species {
            if !sp.element.is_complete() {
                return Err(Error::NoData {
                    what: format!("charge-state network of {}", sp.element.symbol()),
                    why: "the ionization-energy chain is incomplete above Z = 103".into(),
                });
            }
            if let Confinement::PerCharge(t) = &s.confinement {
                if t.len() < sp.element.z() as usize {
                    return Err(Error::invalid(
                        "confinement_time_s",
                        format!("{} values", t.len()),
                        &format!(
                            "give one time per charge 1..={} of {} (the heaviest element fed)",
                            sp.element.z(),
                            sp.element.symbol()
                        ),
                    ));
                }
            }
        }
        Ok(PlasmaSource {
            settings,
            gas_feed,
            residual_gas,
            species,
        })
    }

    /// The settings this source was built from (change a field and call
    /// [`PlasmaSource::new`] again to vary it, e.g. in a fit).
    pub fn settings(&self) -> &PlasmaSettings {
        &self.settings
    }

    /// The elements of the fed and residual gases, feed first.
    pub fn species(&self) -> &[PlasmaSpecies] {
        &self.species
    }

    /// The species of `element`, or an error naming the elements fed.
    pub fn species_of(&self, element: &'static Element) -> Result<&PlasmaSpecies> {
        self.species
            .iter()
            .find(|sp| std::ptr::eq(sp.element, element))
            .ok_or_else(|| {
                Error::invalid(
                    "element",
                    element.symbol(),
                    &format!(
                        "must be one of the elements the gases bring: {}",
                        self.species
                            .iter()
                            .map(|sp| sp.element.symbol())
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                )
            })
    }

    /// An electron rate coefficient averaged over the electron energy distribution:
    /// (1 − f_h)·k(T_c) + f_h·k(T_h).
    fn electron_average(&self, k: impl Fn(f64) -> Result<f64>) -> Result<f64> {
        let s = &self.settings;
        let cold = k(s.electron_temperature_ev)?;
        match s.hot_electron_temperature_ev {
            Some(t) if s.hot_electron_fraction > 0.0 => {
                let f = s.hot_electron_fraction;
                Ok((1.0 - f) * cold + f * k(t)?)
            }
            _ => Ok(cold),
        }
    }

    /// Ionization rate coefficient q → q+1 (cm³ s⁻¹) over the electron distribution.
    pub fn ionization_rate_coefficient_cm3_s(
        &self,
        element: &'static Element,
        charge: u32,
    ) -> Result<f64> {
        self.electron_average(|t| {
            ionization_rate_coefficient_cm3_s(element, charge, t, self.settings.lotz_constants)
        })
    }

    /// Recombination rate coefficient q → q−1 (cm³ s⁻¹) over the electron distribution.
    pub fn recombination_rate_coefficient_cm3_s(
        &self,
        element: &'static Element,
        charge: u32,
    ) -> Result<f64> {
        self.electron_average(|t| recombination_rate_coefficient_cm3_s(element, charge, t))
    }

    /// Charge-exchange rate q → q−1 (s⁻¹) on every fed and residual gas.
    pub fn charge_exchange_rate_per_s(&self, element: &'static Element, charge: u32) -> f64 {
        if charge == 0 {
            return 0.0;
        }
        let s = &self.settings;
        let recombined_binding_ev = element
            .ionization_energies_ev()
            .get(charge as usize - 1)
            .copied()
            .unwrap_or(0.0);
        self.gas_feed
            .iter()
            .chain(&self.residual_gas)
            .map(|g| {
                gas_number_density_m3(g.pressure_pa, s.gas_temperature_k)
                    * 1e-6
                    * charge_exchange_rate_coefficient_cm3_s(
                        charge,
                        recombined_binding_ev,
                        g.gas.ionization_energy_ev,
                        s.ion_temperature_ev,
                        element.atomic_weight_u(),
                    )
            })
            .sum()
    }

    /// Confinement time τ_q (s) of charge q ≥ 1.
    pub fn confinement_time_s(&self, charge: u32) -> Result<f64> {
        self.settings.confinement.time_s(charge).ok_or_else(|| {
            Error::invalid(
                "charge",
                charge,
                "has no confinement time: give one per charge up to Z",
            )
        })
    }

    /// The rate network of `element` (densities in cm⁻³, feed in cm⁻³ s⁻¹).
    pub fn network(&self, element: &'static Element) -> Result<RateNetwork> {
        let sp = self.species_of(element)?;
        let s = &self.settings;
        let z = element.z();
        let n_e = s.electron_density_cm3;
        let mut net = RateNetwork::new(z as usize + 1)?;
        for q in 0..z {
            net.add_rate(
                q as usize,
                q as usize + 1,
                n_e * self.ionization_rate_coefficient_cm3_s(element, q)?,
            )?;
        }
        for q in 1..=z {
            let down = n_e * self.recombination_rate_coefficient_cm3_s(element, q)?
                + self.charge_exchange_rate_per_s(element, q);
            net.add_rate(q as usize, q as usize - 1, down)?;
            let tau = self.confinement_time_s(q)?;
            // Recycled ions come back as neutrals; the rest leave the plasma.
            if s.wall_recycling > 0.0 {
                net.add_rate(q as usize, 0, s.wall_recycling / tau)?;
            }
            net.set_loss(q as usize, (1.0 - s.wall_recycling) / tau)?;
        }
        net.set_loss(0, 1.0 / s.neutral_residence_time_s)?;
        net.set_feed(0, sp.atom_density_cm3 / s.neutral_residence_time_s)?;
        Ok(net)
    }

    /// Steady-state densities n_q (cm⁻³) of `element`, charge 0…Z.
    pub fn steady_state(&self, element: &'static Element) -> Result<Vec<f64>> {
        steady_state(&self.network(element)?)
    }

    /// Densities n_q (cm⁻³) at each time after the plasma is switched on in the gas at its
    /// fed density (n₀ = n_X, no ions, at t = 0), rows = times.
    pub fn evolve_densities(
        &self,
        element: &'static Element,
        times_s: &[f64],
    ) -> Result<Array2<f64>> {
        let net = self.network(element)?;
        let mut initial = vec![0.0; net.n_states()];
        initial[0] = self.species_of(element)?.atom_density_cm3;
        evolve(&net, &initial, times_s)
    }

    /// Charge-state fractions after switch-on (each row of [`Self::evolve_densities`]
    /// divided by its sum), the form every source's evolution takes; a plasma starts from
    /// its neutral gas, so `initial_charge` must be 0.
    pub fn evolve(
        &self,
        element: &'static Element,
        times_s: &[f64],
        initial_charge: u32,
    ) -> Result<Array2<f64>> {
        if initial_charge != 0 {
            return Err(Error::invalid(
                "initial_charge",
                initial_charge,
                "a plasma source starts from its neutral gas: use 0",
            ));
        }
        let mut d = self.evolve_densities(element, times_s)?;
        for mut row in d.rows_mut() {
            let total: f64 = row.sum();
            if total > 0.0 {
                row.mapv_inplace(|v| v / total);
            }
        }
        Ok(d)
    }

    /// Extracted current (eµA) of each charge state 0…Z for densities `densities_cm3`:
    /// I_q = η·q·e·n_q·V/τ_q (0 for the neutral).
    pub fn currents_eua(&self, densities_cm3: &[f64]) -> Result<Vec<f64>> {
        let s = &self.settings;
        let volume_cm3 = s.plasma_volume_m3 * 1e6;
        densities_cm3
            .iter()
            .enumerate()
            .map(|(q, n)| {
                if q == 0 {
                    return Ok(0.0);
                }
                let tau = self.confinement_time_s(q as u32)?;
                Ok(
                    s.extraction_fraction * q as f64 * ELEMENTARY_CHARGE_C * n * volume_cm3 / tau
                        * 1e6,
                )
            })
            .collect()
    }

    /// Atoms per second fed into the plasma volume, V·n_X/τ₀.
    pub fn feed_atoms_per_s(&self, element: &'static Element) -> Result<f64> {
        let s = &self.settings;
        Ok(
            self.species_of(element)?.atom_density_cm3 * s.plasma_volume_m3 * 1e6
                / s.neutral_residence_time_s,
        )
    }

    /// Atoms per second leaving the plasma volume at densities `densities_cm3`:
    /// V·[n₀/τ₀ + (1 − R)·Σ n_q/τ_q].
    pub fn outflow_atoms_per_s(&self, densities_cm3: &[f64]) -> Result<f64> {
        let s = &self.settings;
        let mut per_cm3 =
            densities_cm3.first().copied().unwrap_or(0.0) / s.neutral_residence_time_s;
        for (q, n) in densities_cm3.iter().enumerate().skip(1) {
            per_cm3 += (1.0 - s.wall_recycling) * n / self.confinement_time_s(q as u32)?;
        }
        Ok(per_cm3 * s.plasma_volume_m3 * 1e6)
    }

    /// The same source with another (cold) electron temperature (eV).
    pub fn with_energy(&self, electron_temperature_ev: f64) -> Result<Self> {
        let mut s = self.settings.clone();
        s.electron_temperature_ev = electron_temperature_ev;
        PlasmaSource::new(s)
    }
}

/// Electron-impact ionization rate coefficient q → q+1 (cm³ s⁻¹) of a Maxwellian at kT
/// (eV): every ionization channel of the plasma passes here, once.
///
/// Direct ionization (Lotz in closed form) plus excitation–autoionization.
pub fn ionization_rate_coefficient_cm3_s(
    element: &'static Element,
    charge: u32,
    temperature_ev: f64,
    lotz_constants: Option<LotzConstants>,
) -> Result<f64> {
    let direct = ionization_rate_coefficients_cm3_s(
        element,
        i64::from(charge),
        &[temperature_ev],
        lotz_constants,
    )?[0];
    // Excitation–autoionization adds to the direct channel (ions only; see its module).
    let indirect = if charge > 0 {
        crate::processes::excitation_autoionization::rate_coefficient_cm3_s(
            &element.ion(i64::from(charge))?,
            temperature_ev,
        )?
    } else {
        0.0
    };
    Ok(direct + indirect)
}

/// Electron–ion recombination rate coefficient q → q−1 (cm³ s⁻¹) of a Maxwellian at kT
/// (eV): every recombination channel of the plasma passes here, once.
///
/// Radiative recombination (Maxwellian Kim–Pratt) plus dielectronic recombination
/// (Burgess's general formula, `processes::dielectronic`).
pub fn recombination_rate_coefficient_cm3_s(
    element: &'static Element,
    charge: u32,
    temperature_ev: f64,
) -> Result<f64> {
    let radiative = radiative_recombination_rate_coefficients_cm3_s(
        element,
        i64::from(charge),
        &[temperature_ev],
    )?[0];
    // Dielectronic recombination (Burgess's general formula) beside the radiative channel.
    let dielectronic = crate::processes::dielectronic::rate_coefficient_cm3_s(
        &element.ion(i64::from(charge))?,
        temperature_ev,
    )?;
    Ok(radiative + dielectronic)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn demo() -> PlasmaSource {
        let mut s = PlasmaSettings::new(
            2_000.0,
            3e11,
            Confinement::Scaling {
                tau1_s: 2e-3,
                exponent: 1.0,
            },
            vec![("Ar".into(), 2e-5), ("O2".into(), 8e-5)],
        );
        s.hot_electron_temperature_ev = Some(30_000.0);
        s.hot_electron_fraction = 0.1;
        s.residual_gas_pa = vec![("H2".into(), 1e-6)];
        s.wall_recycling = 0.3;
        PlasmaSource::new(s).unwrap()
    }

    #[test]
    fn species_come_from_the_gases() {
        let p = demo();
        let names: Vec<_> = p.species().iter().map(|s| s.element.symbol()).collect();
        assert_eq!(names, ["Ar", "O", "H"]);
        assert!(p.species()[2].residual && !p.species()[1].residual);
        // O2 brings two atoms per molecule: n_O = 2·p/(k_B T).
        let n_o2 = gas_number_density_m3(8e-5, 300.0) * 1e-6;
        assert!((p.species()[1].atom_density_cm3 / (2.0 * n_o2) - 1.0).abs() < 1e-14);
    }

    #[test]
    fn steady_state_equals_long_evolution_and_conserves_atoms() {
        let p = demo();
        for sym in ["Ar", "O", "H"] {
            let el = element(sym).unwrap();
            let ss = p.steady_state(el).unwrap();
            let long = p.evolve_densities(el, &[0.0, 1e-3, 5.0]).unwrap();
            let total: f64 = ss.iter().sum();
            for (q, n) in ss.iter().enumerate() {
                assert!(*n >= 0.0);
                let d = (long[[2, q]] - n).abs();
                assert!(d <= 1e-8 * total, "{sym}{q}+: {} vs {n}", long[[2, q]]);
            }
            // Feed in = atoms out (the steady state of a linear balance).
            let (fed, out) = (
                p.feed_atoms_per_s(el).unwrap(),
                p.outflow_atoms_per_s(&ss).unwrap(),
            );
            assert!((out / fed - 1.0).abs() < 1e-10, "{sym}: {out:e} vs {fed:e}");
        }
    }

    #[test]
    fn evolution_fractions_start_neutral_and_sum_to_one() {
        let p = demo();
        let ar = element("Ar").unwrap();
        let f = p.evolve(ar, &[0.0, 1e-4, 1e-2], 0).unwrap();
        assert_eq!(f[[0, 0]], 1.0);
        for row in f.rows() {
            assert!((row.sum() - 1.0).abs() < 1e-12);
        }
        assert!(p.evolve(ar, &[1.0], 1).is_err());
    }

    #[test]
    fn currents_follow_n_over_tau() {
        let p = demo();
        let ar = element("Ar").unwrap();
        let ss = p.steady_state(ar).unwrap();
        let i = p.currents_eua(&ss).unwrap();
        // I_8 = 8 e n_8 V / τ_8, τ_8 = 2e-3·8 s, V = 100 cm³, in µA.
        let hand = 8.0 * ELEMENTARY_CHARGE_C * ss[8] * 100.0 / (2e-3 * 8.0) * 1e6;
        assert!((i[8] / hand - 1.0).abs() < 1e-12);
        assert_eq!(i[0], 0.0);
    }

    #[test]
    fn hotter_electrons_make_higher_charges() {
        let ar = element("Ar").unwrap();
        let mean = |t: f64| {
            let mut s = demo().settings().clone();
            s.electron_temperature_ev = t;
            s.hot_electron_fraction = 0.0;
            let ss = PlasmaSource::new(s).unwrap().steady_state(ar).unwrap();
            let ions: f64 = ss[1..].iter().sum();
            ss.iter()
                .enumerate()
                .skip(1)
                .map(|(q, n)| q as f64 * n)
                .sum::<f64>()
                / ions
        };
        assert!(mean(3_000.0) > mean(300.0));
    }

    #[test]
    fn settings_are_validated() {
        let good = demo().settings().clone();
        let bad = |f: &dyn Fn(&mut PlasmaSettings)| {
            let mut s = good.clone();
            f(&mut s);
            PlasmaSource::new(s).is_err()
        };
        assert!(bad(&|s| s.electron_temperature_ev = 0.0));
        assert!(bad(&|s| s.electron_density_cm3 = f64::NAN));
        assert!(bad(&|s| s.hot_electron_fraction = 1.5));
        assert!(bad(&|s| s.hot_electron_temperature_ev = None));
        assert!(bad(&|s| s.wall_recycling = -0.1));
        assert!(bad(&|s| s.extraction_fraction = 0.0));
        assert!(bad(&|s| s.gas_feed_pa = vec![("Ar".into(), 0.0)]));
        assert!(bad(
            &|s| s.gas_feed_pa = vec![("Ar".into(), 1e-5), ("ar".into(), 1e-5)]
        ));
        assert!(bad(&|s| s.gas_feed_pa = vec![("Zz".into(), 1e-5)]));
        assert!(bad(
            &|s| s.confinement = Confinement::PerCharge(vec![1e-3; 10])
        ));
        assert!(bad(&|s| s.confinement = Confinement::Scaling {
            tau1_s: -1.0,
            exponent: 1.0
        }));
        assert!(!bad(
            &|s| s.confinement = Confinement::PerCharge(vec![1e-3; 18])
        ));
        let p = demo();
        assert!(p.network(element("Kr").unwrap()).is_err());
    }
}
