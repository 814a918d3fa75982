//! The checker: the values of a scenario (ranges, elements, isotopes, gases, the choice of
//! one source), after the TOML syntax and the serde schema. Every error names the file,
//! the line and the field, and says what is allowed.

use std::collections::BTreeMap;
use std::fmt::Display;

use toml::de::DeTable;

use super::defaults::*;
use super::positions::{clip, line_of, Positions};
use super::schema::*;
use super::settings::*;
use crate::atoms::{element, split_species, Element, Isotope};
use crate::error::{Error, Result};
use crate::processes::gases::gas;
use crate::sources::beam_trap::{
    Processes, TrapModel, DEFAULT_COMPENSATION, DEFAULT_GAS_TEMPERATURE_K,
    DEFAULT_ION_TEMPERATURE_EV,
};
use crate::sources::electron_beam::BeamSize;
use crate::sources::plasma::{Confinement, PlasmaSettings, DEFAULT_CONFINEMENT_EXPONENT};
use crate::sources::rib_cycle::{
    nuclide, BreedingCycle, DaughterCharge, Injection, DEFAULT_CAPTURE_EFFICIENCY,
    DEFAULT_MAX_NUCLIDES,
};
use crate::sources::uncertainty::UncertaintyFactors;

/// (name, value) pairs in file or alphabetical order.
type Pairs = Vec<(String, f64)>;

/// Read and check a scenario. `file` names the file in error messages.
///
/// Errors are [`Error::InvalidScenario`] whose message names the line and the field and
/// says what is allowed.
pub fn parse_scenario(text: &str, file: &str) -> Result<Scenario> {
    if text.len() > MAX_SCENARIO_BYTES {
        return Err(Error::InvalidScenario {
            file: file.to_string(),
            message: format!(
                "{} bytes is too large for a scenario: allowed at most {MAX_SCENARIO_BYTES} bytes (1 MiB)",
                text.len()
            ),
        });
    }
    let doc = DeTable::parse(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start));
        let message = clip(e.message().trim());
        Error::InvalidScenario {
            file: file.to_string(),
            message: match line {
                Some(l) => format!("line {l}: not valid TOML: {message}"),
                None => format!("not valid TOML: {message}"),
            },
        }
    })?;
    let pos = Positions::new(file, text, doc.get_ref());
    let raw: RawScenario = toml::from_str(text).map_err(|e| {
        let path = e.span().and_then(|s| pos.path_at(&s)).unwrap_or_default();
        let message = clip(&plain_serde_message(e.message()));
        if path.is_empty() {
            let line = e.span().map(|s| line_of(text, s.start));
            Error::InvalidScenario {
                file: file.to_string(),
                message: match line {
                    Some(l) => format!("line {l}: {message}"),
                    None => message,
                },
            }
        } else {
            pos.error(&path, message)
        }
    })?;
    Checker { pos: &pos }.check(raw)
}

/// serde's wording with the schema's words: "a whole number" for i64, "a number" for f64.
fn plain_serde_message(message: &str) -> String {
    message
        .trim()
        .replace("expected i64", "expected a whole number")
        .replace("expected f64", "expected a number")
        .replace("expected a sequence", "expected an array [ … ]")
        .replace("expected a map", "expected a table")
        .replace(", expected one of", ": allowed")
        // Tables with one or two fields: "expected `a`" / "expected `a` or `b`".
        .replace("`, expected `", "`: allowed `")
}

struct Checker<'p, 'a> {
    pos: &'p Positions<'a>,
}

impl Checker<'_, '_> {
    fn err(&self, path: &str, message: impl Display) -> Error {
        self.pos.error(path, message)
    }

    /// Re-label a core error as an error of the field at `path`.
    fn wrap<T>(&self, path: &str, r: Result<T>) -> Result<T> {
        r.map_err(|e| match e {
            Error::InvalidScenario { .. } => e,
            other => self.err(path, other),
        })
    }

    fn positive(&self, path: &str, v: f64, unit: &str) -> Result<f64> {
        if v.is_finite() && v > 0.0 {
            Ok(v)
        } else {
            Err(self.err(
                path,
                format!("{v} is not allowed: must be a finite number > 0 ({unit})"),
            ))
        }
    }

    fn non_negative(&self, path: &str, v: f64, unit: &str) -> Result<f64> {
        if v.is_finite() && v >= 0.0 {
            Ok(v)
        } else {
            Err(self.err(
                path,
                format!("{v} is not allowed: must be a finite number >= 0 ({unit})"),
            ))
        }
    }

    fn points(&self, path: &str, n: i64) -> Result<usize> {
        if (2..=MAX_POINTS).contains(&n) {
            Ok(n as usize)
        } else {
            Err(self.err(
                path,
                format!("{n} is not allowed: must be a whole number 2..={MAX_POINTS}"),
            ))
        }
    }

    fn check(&self, raw: RawScenario) -> Result<Scenario> {
        let target = self.target(raw.target)?;
        let plasma_species = raw.plasma.is_some();
        if plasma_species && raw.species.is_some() {
            return Err(self.err(
                "species",
                "a [plasma] source takes its species from plasma.gas_feed_pa (each fed gas's elements, natural isotopic mix): remove the [[species]] tables",
            ));
        }
        let species = if plasma_species {
            Vec::new()
        } else {
            self.species(raw.species, &target)?
        };
        let source = self.source(
            raw.beam_trap,
            raw.photon_beam,
            raw.electron_impact,
            raw.plasma,
        )?;
        let (residual_gas_pa, residual_elements) = self.residual_gas(raw.residual_gas_pa)?;
        self.dynamic_rules(&source, &species)?;
        // The core source checks its own ranges (compensation, temperatures, beam size).
        self.build(&source, &residual_gas_pa)?;
        let species = match &source {
            SourceSettings::Plasma(_) => self.plasma_species(&source, &residual_gas_pa, &target)?,
            _ => species,
        };
        let mut time = self.time(raw.time, &source, &target)?;
        let injection = self.injection(raw.injection, &source, &target, &mut time)?;
        let energy_scan = self.energy_scan(raw.energy_scan, &source, &target)?;
        let separator = self.separator(raw.separator)?;
        let uncertainty = self.uncertainty(raw.uncertainty, &source, injection.is_some())?;
        self.size(&species, &target, &time, &energy_scan)?;
        if let SourceSettings::ElectronImpact(_) = source {
            if let Some(s) = species.iter().find(|s| s.initial_charge != 0) {
                let i = species.iter().position(|x| x == s).unwrap_or(0);
                return Err(self.err(
                    &format!("species[{i}].initial_charge"),
                    "an electron-impact source ionizes neutral atoms in one collision: allowed 0 only",
                ));
            }
        }
        let lines = self.pos.lines();
        Ok(Scenario {
            file: self.pos.file.to_string(),
            title: raw.title.unwrap_or_default(),
            description: raw.description.unwrap_or_default(),
            target,
            species,
            source,
            residual_gas_pa,
            residual_elements,
            time,
            energy_scan,
            separator,
            injection,
            uncertainty,
            lines,
        })
    }

    /// The `[uncertainty]` table: a beam trap with the fixed model and no breeding cycle
    /// (the core's Monte Carlo samples the fixed model's rates); the core checks the factors.
    fn uncertainty(
        &self,
        raw: Option<RawUncertainty>,
        source: &SourceSettings,
        injection: bool,
    ) -> Result<Option<UncertaintySettings>> {
        let Some(raw) = raw else { return Ok(None) };
        match source {
            SourceSettings::BeamTrap(t) if !t.is_dynamic() => {}
            _ => {
                return Err(self.err(
                    "uncertainty",
                    "uncertainty bands need a [beam_trap] source with the fixed model (the Monte Carlo samples its process rates)",
                ))
            }
        }
        if injection {
            return Err(self.err(
                "uncertainty",
                "the bands cover the trap's own ions per extraction, not a breeding cycle's: leave out [uncertainty] or [injection]",
            ));
        }
        let n = raw.samples.unwrap_or(DEFAULT_UNCERTAINTY_SAMPLES);
        if !(2..=MAX_UNCERTAINTY_SAMPLES).contains(&n) {
            return Err(self.err(
                "uncertainty.samples",
                format!("{n} is not allowed: must be a whole number 2..={MAX_UNCERTAINTY_SAMPLES}"),
            ));
        }
        let seed = raw.seed.unwrap_or(DEFAULT_UNCERTAINTY_SEED);
        let seed = u64::try_from(seed).map_err(|_| {
            self.err(
                "uncertainty.seed",
                format!("{seed} is not allowed: must be a whole number >= 0"),
            )
        })?;
        let d = UncertaintyFactors::default();
        let factors = UncertaintyFactors::new(
            raw.ionization_factor.unwrap_or(d.ionization),
            raw.recombination_factor.unwrap_or(d.recombination),
            raw.charge_exchange_factor.unwrap_or(d.charge_exchange),
            raw.charge_correlation.unwrap_or(d.charge_correlation),
        )
        .map_err(|e| match &e {
            Error::InvalidParameter { name, .. } => self.err(&format!("uncertainty.{name}"), e),
            _ => self.err("uncertainty", e),
        })?;
        Ok(Some(UncertaintySettings {
            samples: n as usize,
            seed,
            factors,
        }))
    }

    /// The scenario's size limit, from the size model of `crate::limits`: the run keeps one
    /// evolution (time points × charge states, f64) per species and the target's energy ×
    /// time map (one more energy: the beam's own), estimated by the solver's own
    /// [`crate::solve::energy_map_memory_bytes`]. Beyond the memory limit the scenario is
    /// refused here, naming the estimate and the limit, before anything is computed; raise
    /// the limit (`chargecast.set_memory_limit_bytes`) or use fewer points.
    fn size(
        &self,
        species: &[SpeciesEntry],
        target: &Target,
        time: &TimeGrid,
        energy: &EnergyGrid,
    ) -> Result<()> {
        use crate::limits::{bytes_for, check_memory};
        let evolutions = species.iter().fold(0u64, |acc, s| {
            acc.saturating_add(bytes_for(&[time.points, s.z as usize + 1], 8))
        });
        let map = crate::solve::energy_map_memory_bytes(
            energy.points + 1,
            time.points,
            target.z as usize + 1,
        );
        let path = if self.pos.line("energy_scan.points").is_some() {
            "energy_scan.points"
        } else {
            "time.points"
        };
        self.wrap(
            path,
            check_memory(
                "the scenario's evolutions and energy × time map",
                evolutions.saturating_add(map),
            ),
        )
    }

    fn target(&self, raw: Option<RawTarget>) -> Result<Target> {
        let raw = raw.ok_or_else(|| {
            self.err(
                "",
                "missing table [target]: add it with isotope = \"…\" (e.g. \"129Xe\") and charge = … (the wanted charge state)",
            )
        })?;
        let (el, mass) = self.wrap("target.isotope", split_species(&raw.isotope))?;
        let iso = match mass {
            Some(a) => self.wrap("target.isotope", el.isotope(a))?,
            None => match el.natural_isotopes().as_slice() {
                [only] => *only,
                natural => {
                    let names: Vec<String> = natural
                        .iter()
                        .map(|i| format!("{}{}", i.mass_number, el.symbol()))
                        .collect();
                    return Err(self.err(
                        "target.isotope",
                        format!(
                            "{:?} names an element with several isotopes: give a mass number, one of {}",
                            raw.isotope,
                            if names.is_empty() { format!("{}…", el.symbol()) } else { names.join(", ") }
                        ),
                    ));
                }
            },
        };
        if raw.charge < 1 || raw.charge > i64::from(el.z()) {
            return Err(self.err(
                "target.charge",
                format!(
                    "{} is not allowed for {}: allowed 1..={}",
                    raw.charge,
                    el.symbol(),
                    el.z()
                ),
            ));
        }
        Ok(Target {
            isotope: label(el, iso),
            symbol: el.symbol().to_string(),
            z: el.z(),
            mass_number: iso.mass_number,
            charge: raw.charge as u32,
        })
    }

    fn species(&self, raw: Option<Vec<RawSpecies>>, target: &Target) -> Result<Vec<SpeciesEntry>> {
        let Some(raw) = raw else {
            return Ok(vec![SpeciesEntry {
                name: target.isotope.clone(),
                symbol: target.symbol.clone(),
                z: target.z,
                mass_number: Some(target.mass_number),
                amount: 1.0,
                initial_charge: 0,
            }]);
        };
        if raw.is_empty() {
            return Err(self.err(
                "species",
                "empty: give at least one [[species]] table, or none for the target alone",
            ));
        }
        let mut out = Vec::with_capacity(raw.len());
        // Names seen so far: a set, so that a long list is checked in linear time.
        let mut seen = std::collections::HashSet::new();
        for (i, s) in raw.into_iter().enumerate() {
            let at = |f: &str| format!("species[{i}].{f}");
            let (el, mass) = self.wrap(&at("name"), split_species(&s.name))?;
            if let Some(a) = mass {
                self.wrap(&at("name"), el.isotope(a))?;
            }
            let amount = self.positive(
                &at("amount"),
                s.amount.unwrap_or(DEFAULT_AMOUNT),
                "relative amount",
            )?;
            let q = s.initial_charge.unwrap_or(0);
            if q < 0 || q >= i64::from(el.z()) {
                return Err(self.err(
                    &at("initial_charge"),
                    format!(
                        "{q} is not allowed for {}: allowed 0..={}",
                        el.symbol(),
                        el.z() - 1
                    ),
                ));
            }
            let name = match mass {
                Some(a) => format!("{a}{}", el.symbol()),
                None => el.symbol().to_string(),
            };
            if !seen.insert(name.clone()) {
                return Err(self.err(
                    &at("name"),
                    format!("{name} is listed twice: give each species once"),
                ));
            }
            out.push(SpeciesEntry {
                name,
                symbol: el.symbol().to_string(),
                z: el.z(),
                mass_number: mass,
                amount,
                initial_charge: q as u32,
            });
        }
        self.carries_target(&out, target, "species")?;
        Ok(out)
    }

    /// One species must provide the target isotope (an isotope given alone, or an element
    /// in which it occurs naturally); else an error at `path`.
    fn carries_target(&self, out: &[SpeciesEntry], target: &Target, path: &str) -> Result<()> {
        let carries_target = out.iter().any(|s| {
            s.z == target.z
                && match s.mass_number {
                    Some(a) => a == target.mass_number,
                    None => element(&s.symbol)
                        .ok()
                        .and_then(|e| e.isotope(target.mass_number).ok())
                        .is_some_and(|i| i.abundance.is_some()),
                }
        });
        if !carries_target {
            let remedy = if path == "species" {
                format!(
                    "add [[species]] name = \"{}\" (or the element {} if {} occurs naturally)",
                    target.isotope, target.symbol, target.isotope
                )
            } else {
                let fed: Vec<&str> = out.iter().map(|s| s.symbol.as_str()).collect();
                format!(
                    "feed a gas that brings {} (the fed gases bring {}; a plasma runs the natural isotopic mix)",
                    target.symbol,
                    fed.join(", ")
                )
            };
            return Err(self.err(
                path,
                format!(
                    "no species provides the target {}: {remedy}",
                    target.isotope
                ),
            ));
        }
        Ok(())
    }

    /// The species of a plasma: the elements of its fed gases, natural isotopic mix, in the
    /// core source's order, each with its fed atom density (cm⁻³) as its amount.
    fn plasma_species(
        &self,
        source: &SourceSettings,
        residual_gas_pa: &[(String, f64)],
        target: &Target,
    ) -> Result<Vec<SpeciesEntry>> {
        let built = self.wrap("plasma", source.build(residual_gas_pa))?;
        let crate::sources::Source::Plasma(p) = built else {
            return Err(self.err("plasma", "not a plasma source"));
        };
        let out: Vec<SpeciesEntry> = p
            .species()
            .iter()
            .filter(|sp| !sp.residual)
            .map(|sp| SpeciesEntry {
                name: sp.element.symbol().to_string(),
                symbol: sp.element.symbol().to_string(),
                z: sp.element.z(),
                mass_number: None,
                amount: sp.atom_density_cm3,
                initial_charge: 0,
            })
            .collect();
        self.carries_target(&out, target, "plasma.gas_feed_pa")?;
        Ok(out)
    }

    fn source(
        &self,
        trap: Option<RawBeamTrap>,
        photon: Option<RawPhotonBeam>,
        single: Option<RawElectronImpact>,
        plasma: Option<RawPlasma>,
    ) -> Result<SourceSettings> {
        let given = [
            trap.is_some(),
            photon.is_some(),
            single.is_some(),
            plasma.is_some(),
        ]
        .iter()
        .filter(|g| **g)
        .count();
        if given != 1 {
            let path = if given == 0 {
                ""
            } else if plasma.is_some() {
                "plasma"
            } else if trap.is_some() && photon.is_some() {
                "photon_beam"
            } else if single.is_some() {
                "electron_impact"
            } else {
                ""
            };
            return Err(self.err(
                path,
                format!(
                    "{} source tables given: give exactly one of [beam_trap], [photon_beam], [electron_impact] or [plasma]",
                    if given == 0 { "no" } else { "several" }
                ),
            ));
        }
        if let Some(p) = plasma {
            return self.plasma(p).map(SourceSettings::Plasma);
        }
        if let Some(t) = trap {
            return self.trap(t).map(SourceSettings::BeamTrap);
        }
        if let Some(p) = photon {
            return Ok(SourceSettings::PhotonBeam(PhotonBeamSettings {
                photon_energy_ev: p.photon_energy_ev,
                flux_cm2_s: p.flux_cm2_s,
                bandwidth_ev: p.bandwidth_ev,
            }));
        }
        let s = single.ok_or_else(|| self.err("", "no source table"))?;
        Ok(SourceSettings::ElectronImpact(ElectronImpactSettings {
            energy_ev: s.energy_ev,
            energy_spread_ev: s.energy_spread_ev.unwrap_or(0.0),
        }))
    }

    fn trap(&self, t: RawBeamTrap) -> Result<BeamTrapSettings> {
        // The beam-size rule is the core's (BeamSize); its error names the field at fault.
        BeamSize::from_fields(
            t.radius_m,
            t.current_density_a_cm2,
            t.magnetic_field_t,
            t.cathode_radius_m,
            t.cathode_temperature_k,
            t.cathode_field_t,
        )
        .map_err(|e| {
            let path = match &e {
                Error::InvalidParameter { name, .. } => format!("beam_trap.{name}"),
                _ => "beam_trap".to_string(),
            };
            self.err(&path, e)
        })?;
        let cathode_field_t = t.cathode_field_t.unwrap_or(0.0);
        if let Some(b) = t.drift_tube_radius_m {
            if !(b.is_finite() && b > 0.0) {
                return Err(self.err(
                    "beam_trap.drift_tube_radius_m",
                    format!("the drift-tube radius must be a positive number of metres, not {b}"),
                ));
            }
        }
        let processes = match t.processes {
            None => Processes::default()
                .names()
                .into_iter()
                .map(str::to_string)
                .collect(),
            Some(list) => {
                for (i, p) in list.iter().enumerate() {
                    if !PROCESSES.contains(&p.as_str()) {
                        return Err(self.err(
                            &format!("beam_trap.processes[{i}]"),
                            format!(
                                "unknown process {p:?}: allowed \"{}\"",
                                PROCESSES.join("\", \"")
                            ),
                        ));
                    }
                }
                list
            }
        };
        Ok(BeamTrapSettings {
            energy_ev: t.energy_ev,
            current_a: t.current_a,
            radius_m: t.radius_m,
            current_density_a_cm2: t.current_density_a_cm2,
            magnetic_field_t: t.magnetic_field_t,
            cathode_radius_m: t.cathode_radius_m,
            cathode_temperature_k: t.cathode_temperature_k,
            cathode_field_t,
            length_m: t.length_m,
            ion_temperature_ev: t.ion_temperature_ev.unwrap_or(DEFAULT_ION_TEMPERATURE_EV),
            gas_temperature_k: t.gas_temperature_k.unwrap_or(DEFAULT_GAS_TEMPERATURE_K),
            compensation: t.compensation.unwrap_or(DEFAULT_COMPENSATION),
            processes,
            drift_tube_radius_m: t.drift_tube_radius_m,
            model: t.model.unwrap_or_else(|| TrapModel::NAMES[0].to_string()),
            axial_barrier_v: t.axial_barrier_v,
            gas_feed_pa: self.gas_feed(t.gas_feed_pa)?,
            dynamic_processes: self.dynamic_processes(t.dynamic_processes)?,
            injected_atoms: t
                .injected_atoms
                .map(|n| self.positive("beam_trap.injected_atoms", n, "atoms"))
                .transpose()?,
        })
    }

    /// The `[plasma]` table as the core's settings (defaults from the core's
    /// [`PlasmaSettings::new`]); the core constructor checks every range.
    fn plasma(&self, p: RawPlasma) -> Result<PlasmaSettings> {
        let confinement = match p.confinement_time_s {
            OneOrMany::One(tau1_s) => Confinement::Scaling {
                tau1_s,
                exponent: p
                    .confinement_exponent
                    .unwrap_or(DEFAULT_CONFINEMENT_EXPONENT),
            },
            OneOrMany::Many(times) => {
                if p.confinement_exponent.is_some() {
                    return Err(self.err(
                        "plasma.confinement_exponent",
                        "scales a single confinement_time_s (τ_q = τ₁·q^α): with one time per charge leave it out",
                    ));
                }
                Confinement::PerCharge(times)
            }
        };
        let feed = self.gas_pairs("plasma.gas_feed_pa", p.gas_feed_pa)?;
        let mut s = PlasmaSettings::new(
            p.electron_temperature_ev,
            p.electron_density_cm3,
            confinement,
            feed,
        );
        s.hot_electron_temperature_ev = p.hot_electron_temperature_ev;
        if let Some(f) = p.hot_electron_fraction {
            s.hot_electron_fraction = f;
        }
        if let Some(t) = p.ion_temperature_ev {
            s.ion_temperature_ev = t;
        }
        if let Some(t) = p.gas_temperature_k {
            s.gas_temperature_k = t;
        }
        if let Some(t) = p.neutral_residence_time_s {
            s.neutral_residence_time_s = t;
        }
        if let Some(r) = p.wall_recycling {
            s.wall_recycling = r;
        }
        if let Some(v) = p.plasma_volume_m3 {
            s.plasma_volume_m3 = v;
        }
        if let Some(e) = p.extraction_fraction {
            s.extraction_fraction = e;
        }
        Ok(s)
    }

    /// The gases fed into a dynamic trap: known formulas, pressures >= 0 (Pa).
    fn gas_feed(&self, raw: Option<BTreeMap<String, f64>>) -> Result<Pairs> {
        self.gas_pairs("beam_trap.gas_feed_pa", raw.unwrap_or_default())
    }

    /// A table of gases by formula at `table`: known formulas, pressures >= 0 (Pa).
    fn gas_pairs(&self, table: &str, raw: BTreeMap<String, f64>) -> Result<Pairs> {
        raw.into_iter()
            .map(|(name, p)| {
                let path = format!("{table}.{name}");
                let g = self.wrap(&path, gas(&name))?;
                Ok((g.formula.to_string(), self.non_negative(&path, p, "Pa")?))
            })
            .collect()
    }

    /// The dynamic processes by name, each one of the core's names.
    fn dynamic_processes(&self, raw: Option<Vec<String>>) -> Result<Option<Vec<String>>> {
        let Some(list) = raw else { return Ok(None) };
        for (i, p) in list.iter().enumerate() {
            if !DYNAMIC_PROCESSES.contains(&p.as_str()) {
                return Err(self.err(
                    &format!("beam_trap.dynamic_processes[{i}]"),
                    format!(
                        "unknown dynamic process {p:?}: allowed \"{}\"",
                        DYNAMIC_PROCESSES.join("\", \"")
                    ),
                ));
            }
        }
        Ok(Some(list))
    }

    /// What only the dynamic model takes: injected atoms (the builder refuses the other
    /// dynamic fields with the fixed model), and species entering as neutral atoms.
    fn dynamic_rules(&self, source: &SourceSettings, species: &[SpeciesEntry]) -> Result<()> {
        let SourceSettings::BeamTrap(t) = source else {
            return Ok(());
        };
        if !t.is_dynamic() {
            if t.injected_atoms.is_some() {
                return Err(self.err(
                    "beam_trap.injected_atoms",
                    "belongs to the ion-dynamics model: add model = \"dynamic\" (the fixed model works with fractions, not numbers of atoms)",
                ));
            }
            return Ok(());
        }
        if let Some(i) = species.iter().position(|s| s.initial_charge != 0) {
            return Err(self.err(
                &format!("species[{i}].initial_charge"),
                "the dynamic model injects neutral atoms into the beam: allowed 0 only",
            ));
        }
        Ok(())
    }

    /// Build the core source: its constructors check the ranges of its settings, and an
    /// error names the field it came from.
    fn build(&self, source: &SourceSettings, residual_gas_pa: &[(String, f64)]) -> Result<()> {
        source.build(residual_gas_pa).map(|_| ()).map_err(|e| {
            let kind = source.kind();
            // A core name may carry a note after the field ("confinement_time_s[3]
            // (charge 4)"): the field is its first word, when the file has it.
            let path = match &e {
                Error::InvalidParameter { name, .. } => {
                    let field = format!("{kind}.{}", name.split(' ').next().unwrap_or(""));
                    if !name.contains(' ') || self.pos.line(&field).is_some() {
                        field
                    } else {
                        kind.to_string()
                    }
                }
                _ => kind.to_string(),
            };
            self.err(&path, e)
        })
    }

    fn residual_gas(&self, raw: Option<BTreeMap<String, f64>>) -> Result<(Pairs, Pairs)> {
        let mut gases = Vec::new();
        let mut atoms: BTreeMap<String, f64> = BTreeMap::new();
        for (name, p) in raw.unwrap_or_default() {
            let path = format!("residual_gas_pa.{name}");
            let g = self.wrap(&path, gas(&name))?;
            let p = self.non_negative(&path, p, "Pa")?;
            for (symbol, n) in g.atoms {
                *atoms.entry((*symbol).to_string()).or_default() += p * f64::from(*n);
            }
            gases.push((g.formula.to_string(), p));
        }
        let total: f64 = atoms.values().sum();
        let shares = if total > 0.0 {
            atoms
                .into_iter()
                .map(|(s, w)| (s, w / total))
                .filter(|(_, w)| *w > 0.0)
                .collect()
        } else {
            Vec::new()
        };
        Ok((gases, shares))
    }

    fn time(
        &self,
        raw: Option<RawTime>,
        source: &SourceSettings,
        target: &Target,
    ) -> Result<TimeGrid> {
        let raw = raw.unwrap_or_default();
        let stop_s = match raw.stop_s {
            Some(s) => self.positive("time.stop_s", s, "s")?,
            None => default_stop_s(source, target),
        };
        let start_s = match raw.start_s {
            Some(s) => self.positive("time.start_s", s, "s")?,
            None => stop_s * DEFAULT_START_OVER_STOP,
        };
        if start_s >= stop_s {
            return Err(self.err(
                "time.start_s",
                format!("{start_s} s is not before stop_s = {stop_s} s: start_s must be smaller"),
            ));
        }
        let points = self.points("time.points", raw.points.unwrap_or(DEFAULT_TIME_POINTS))?;
        let extraction_s = match raw.extraction_s {
            None => None,
            Some(t) if t.is_finite() && (start_s..=stop_s).contains(&t) => Some(t),
            Some(t) => {
                return Err(self.err(
                    "time.extraction_s",
                    format!(
                    "{t} s is not allowed: must lie within the time grid {start_s} … {stop_s} s"
                ),
                ))
            }
        };
        Ok(TimeGrid {
            start_s,
            stop_s,
            points,
            extraction_s,
        })
    }

    fn energy_scan(
        &self,
        raw: Option<RawEnergyScan>,
        source: &SourceSettings,
        target: &Target,
    ) -> Result<EnergyGrid> {
        let raw = raw.unwrap_or_default();
        let (lo, hi) = default_energy_range(source, target);
        let start_ev = match raw.start_ev {
            Some(e) => self.positive("energy_scan.start_ev", e, "eV")?,
            None => lo,
        };
        let stop_ev = match raw.stop_ev {
            Some(e) => self.positive("energy_scan.stop_ev", e, "eV")?,
            None => hi.max(start_ev * 4.0),
        };
        if start_ev >= stop_ev {
            return Err(self.err(
                "energy_scan.start_ev",
                format!(
                    "{start_ev} eV is not below stop_ev = {stop_ev} eV: start_ev must be smaller"
                ),
            ));
        }
        let points = self.points(
            "energy_scan.points",
            raw.points.unwrap_or(DEFAULT_ENERGY_POINTS),
        )?;
        let log = match raw.scale.as_deref() {
            None | Some("log") => true,
            Some("linear") => false,
            Some(other) => {
                return Err(self.err(
                    "energy_scan.scale",
                    format!("unknown scale {other:?}: allowed \"log\" or \"linear\""),
                ))
            }
        };
        Ok(EnergyGrid {
            start_ev,
            stop_ev,
            points,
            log,
        })
    }

    fn separator(&self, raw: Option<RawSeparator>) -> Result<Separator> {
        let raw = raw.unwrap_or_default();
        let shape = raw.peak_shape.unwrap_or_else(|| DEFAULT_PEAK_SHAPE.into());
        if !PEAK_SHAPES.contains(&shape.as_str()) {
            return Err(self.err(
                "separator.peak_shape",
                format!(
                    "unknown shape {shape:?}: allowed \"{}\"",
                    PEAK_SHAPES.join("\", \"")
                ),
            ));
        }
        if raw.aq_half_width.is_some() && raw.relative_half_width.is_some() {
            return Err(self.err(
                "separator.relative_half_width",
                "give aq_half_width or relative_half_width, not both (neither: a window one FWHM wide)",
            ));
        }
        let aq_range = match raw.aq_range {
            None => None,
            Some(v) => match v.as_slice() {
                [lo, hi] if lo.is_finite() && hi.is_finite() && *lo > 0.0 && lo < hi => {
                    Some((*lo, *hi))
                }
                _ => {
                    // A long list is described by its length, not echoed.
                    let given = if v.len() == 2 {
                        format!("{v:?}")
                    } else {
                        format!("a list of {} numbers", v.len())
                    };
                    return Err(self.err(
                        "separator.aq_range",
                        format!(
                            "{given} is not allowed: give [lowest, highest] A/q, 0 < lowest < highest"
                        ),
                    ));
                }
            },
        };
        Ok(Separator {
            resolving_power: self.positive(
                "separator.resolving_power",
                raw.resolving_power.unwrap_or(DEFAULT_RESOLVING_POWER),
                "(m/q)/FWHM",
            )?,
            peak_shape: shape,
            aq_half_width: raw
                .aq_half_width
                .map(|w| self.positive("separator.aq_half_width", w, "u/e"))
                .transpose()?,
            relative_half_width: raw
                .relative_half_width
                .map(|w| self.positive("separator.relative_half_width", w, "fraction of m/q"))
                .transpose()?,
            window_fwhm: self.positive(
                "separator.window_fwhm",
                raw.window_fwhm.unwrap_or(DEFAULT_WINDOW_FWHM),
                "FWHM",
            )?,
            aq_range,
        })
    }

    /// The `[injection]` table: the core cycle checks every value (named `injection.…`);
    /// the breeding time becomes the extraction time, so it must lie on the time grid.
    fn injection(
        &self,
        raw: Option<RawInjection>,
        source: &SourceSettings,
        target: &Target,
        time: &mut TimeGrid,
    ) -> Result<Option<BreedingCycle>> {
        let Some(raw) = raw else { return Ok(None) };
        if !matches!(source, SourceSettings::BeamTrap(_)) {
            return Err(self.err(
                "injection",
                "a breeding cycle needs a [beam_trap] source (the ions are captured and bred in the trap)",
            ));
        }
        let (z, a) = match &raw.isotope {
            Some(spec) => self.wrap("injection.isotope", nuclide(spec))?,
            None => (target.z, target.mass_number),
        };
        if (z, a) != (target.z, target.mass_number) {
            return Err(self.err(
                "injection.isotope",
                format!(
                    "the injected isotope must be the target isotope {} (the plan ranks its charge states)",
                    target.isotope
                ),
            ));
        }
        let injection = match (raw.ions_per_s, raw.ions_per_bunch) {
            (Some(r), None) => {
                Injection::PerSecond(self.positive("injection.ions_per_s", r, "ions/s")?)
            }
            (None, Some(n)) => {
                Injection::PerBunch(self.positive("injection.ions_per_bunch", n, "ions")?)
            }
            _ => {
                return Err(self.err(
                    "injection.ions_per_s",
                    "give exactly one of ions_per_s (a continuous 1+ beam) or ions_per_bunch",
                ))
            }
        };
        let rate = self.positive("injection.repetition_rate_hz", raw.repetition_rate_hz, "Hz")?;
        let breeding = match raw.breeding_time_s {
            Some(t) => self.positive("injection.breeding_time_s", t, "s")?,
            None => time.extraction_s.unwrap_or(1.0 / rate),
        };
        if !(time.start_s..=time.stop_s).contains(&breeding) {
            return Err(self.err(
                "injection.breeding_time_s",
                format!(
                    "{breeding} s must lie within the time grid {} … {} s (it is the extraction time)",
                    time.start_s, time.stop_s
                ),
            ));
        }
        let charge = raw.injected_charge.unwrap_or(1);
        let charge = u32::try_from(charge).map_err(|_| {
            self.err(
                "injection.injected_charge",
                format!("{charge}: allowed 0..=Z"),
            )
        })?;
        let max = raw.max_nuclides.unwrap_or(DEFAULT_MAX_NUCLIDES as i64);
        // Range checked by the core cycle; a negative count is refused here.
        let max = usize::try_from(max).map_err(|_| {
            self.err(
                "injection.max_nuclides",
                format!("{max}: allowed a whole number >= 1"),
            )
        })?;
        let daughter = self.wrap(
            "injection.daughter_charge",
            DaughterCharge::parse(raw.daughter_charge.as_deref().unwrap_or("parent")),
        )?;
        let cycle = self.wrap(
            "injection",
            BreedingCycle::new(
                z,
                a,
                injection,
                raw.capture_efficiency.unwrap_or(DEFAULT_CAPTURE_EFFICIENCY),
                rate,
                breeding,
                charge,
                daughter,
                max,
            ),
        )?;
        time.extraction_s = Some(breeding);
        Ok(Some(cycle))
    }
}

fn label(el: &Element, iso: &Isotope) -> String {
    format!("{}{}", iso.mass_number, el.symbol())
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"
title = "test"
[target]
isotope = "40Ar"
charge = 16

[beam_trap]
energy_ev = 5000.0
current_a = 0.1
radius_m = 50e-6
length_m = 0.5

[residual_gas_pa]
H2 = 1e-8
CO = 1e-8
"#;

    fn message(text: &str) -> String {
        match parse_scenario(text, "s.toml") {
            Err(Error::InvalidScenario { file, message }) => {
                assert_eq!(file, "s.toml");
                message
            }
            other => panic!("expected a scenario error, got {other:?}"),
        }
    }

    #[test]
    fn good_file_gets_defaults() {
        let s = parse_scenario(GOOD, "s.toml").unwrap();
        assert_eq!(s.target.isotope, "40Ar");
        assert_eq!(s.species.len(), 1);
        assert_eq!(s.species[0].name, "40Ar");
        assert_eq!(s.source.kind(), "beam_trap");
        assert_eq!(s.separator.peak_shape, "gaussian");
        assert!(s.time.start_s < s.time.stop_s);
        // H2 brings two H per molecule, CO one C and one O at equal pressure: 2:1:1.
        let shares: BTreeMap<_, _> = s.residual_elements.iter().cloned().collect();
        assert!((shares["H"] - 0.5).abs() < 1e-12 && (shares["C"] - 0.25).abs() < 1e-12);
        assert_eq!(s.lines["beam_trap.energy_ev"], 8);
        assert_eq!(s.lines["target"], 3);
    }

    #[test]
    fn unknown_field_names_line_field_and_allowed_fields() {
        let m = message(&GOOD.replace("energy_ev = 5000.0", "energy_kev = 5.0"));
        assert!(
            m.contains("line 8") && m.contains("beam_trap.energy_kev") && m.contains("energy_ev"),
            "{m}"
        );
    }

    #[test]
    fn wrong_type_names_line_and_field() {
        let m = message(&GOOD.replace("charge = 16", "charge = \"sixteen\""));
        assert!(m.contains("line 5") && m.contains("target.charge"), "{m}");
    }

    #[test]
    fn unknown_element_and_gas_are_reported_where_written() {
        let m = message(&GOOD.replace("\"40Ar\"", "\"40Qx\""));
        assert!(
            m.contains("line 4") && m.contains("target.isotope") && m.contains("Qx"),
            "{m}"
        );
        let m = message(&GOOD.replace("CO = 1e-8", "SF6 = 1e-8"));
        assert!(
            m.contains("line 15") && m.contains("residual_gas_pa.SF6") && m.contains("H2"),
            "{m}"
        );
    }

    #[test]
    fn out_of_range_values_say_what_is_allowed() {
        let m = message(&GOOD.replace("charge = 16", "charge = 19"));
        assert!(m.contains("target.charge") && m.contains("1..=18"), "{m}");
        let m = message(&GOOD.replace("length_m = 0.5", "length_m = -0.5"));
        assert!(m.contains("line 11") && m.contains("> 0"), "{m}");
        let m = message(&GOOD.replace(
            "radius_m = 50e-6",
            "radius_m = 50e-6\nmagnetic_field_t = 3.0",
        ));
        assert!(m.contains("exactly one"), "{m}");
    }

    #[test]
    fn dynamic_settings_are_checked_where_written() {
        let dynamic = GOOD.replace("length_m = 0.5", "length_m = 0.5\nmodel = \"dynamic\"");
        let s = parse_scenario(&dynamic, "s.toml").unwrap();
        let SourceSettings::BeamTrap(t) = &s.source else {
            panic!("a beam trap")
        };
        assert!(t.is_dynamic() && t.gas_feed_pa.is_empty() && t.injected_atoms.is_none());
        let m = message(&GOOD.replace("length_m = 0.5", "length_m = 0.5\nmodel = \"hot\""));
        assert!(
            m.contains("line 12") && m.contains("beam_trap.model") && m.contains("\"dynamic\""),
            "{m}"
        );
        // The dynamic model's fields with the fixed model name the field and the remedy.
        for (field, line) in [
            ("gas_feed_pa = { N2 = 1e-9 }", "beam_trap.gas_feed_pa"),
            ("axial_barrier_v = 50.0", "beam_trap.axial_barrier_v"),
            (
                "dynamic_processes = [\"heating\"]",
                "beam_trap.dynamic_processes",
            ),
            ("injected_atoms = 1e6", "beam_trap.injected_atoms"),
        ] {
            let m = message(&GOOD.replace("length_m = 0.5", &format!("length_m = 0.5\n{field}")));
            assert!(
                m.contains("line 12")
                    && m.contains(line)
                    && (m.contains("model = \"dynamic\"") || m.contains("model=\"dynamic\"")),
                "{m}"
            );
        }
        let m = message(&dynamic.replace("model", "gas_feed_pa = { SF6 = 1e-9 }\nmodel"));
        assert!(
            m.contains("line 12") && m.contains("beam_trap.gas_feed_pa.SF6") && m.contains("N2"),
            "{m}"
        );
        let m = message(&dynamic.replace("model", "gas_feed_pa = { N2 = -1.0 }\nmodel"));
        assert!(
            m.contains("beam_trap.gas_feed_pa.N2") && m.contains(">= 0"),
            "{m}"
        );
        let m = message(&dynamic.replace(
            "model",
            "dynamic_processes = [\"heating\", \"cooling\"]\nmodel",
        ));
        assert!(
            m.contains("beam_trap.dynamic_processes[1]") && m.contains("ionization_heating"),
            "{m}"
        );
        let m = message(&dynamic.replace("model", "injected_atoms = 0.0\nmodel"));
        assert!(
            m.contains("beam_trap.injected_atoms") && m.contains("> 0"),
            "{m}"
        );
        let m = message(&dynamic.replace("model", "drift_tube_radius_m = 1e-6\nmodel"));
        assert!(
            m.contains("beam_trap.drift_tube_radius_m") && m.contains("beam radius"),
            "{m}"
        );
        let m = message(&format!(
            "{dynamic}\n[[species]]\nname = \"Ar\"\ninitial_charge = 1\n"
        ));
        assert!(
            m.contains("species[0].initial_charge") && m.contains("neutral"),
            "{m}"
        );
    }

    #[test]
    fn syntax_errors_give_the_line() {
        let m = message("[target]\nisotope = \"40Ar\n");
        assert!(m.contains("line 2"), "{m}");
    }

    #[test]
    fn missing_source_and_target_are_explained() {
        assert!(message("[target]\nisotope = \"40Ar\"\ncharge = 3\n").contains("[beam_trap]"));
        assert!(message(
            "[beam_trap]\nenergy_ev = 1.0\ncurrent_a = 1.0\nradius_m = 1e-4\nlength_m = 1.0\n"
        )
        .contains("[target]"));
    }

    #[test]
    fn species_names_parse() {
        for (spec, z, a) in [
            ("Xe", 54, None),
            ("129Xe", 54, Some(129)),
            ("Xe-129", 54, Some(129)),
            ("xenon", 54, None),
        ] {
            let (el, m) = split_species(spec).unwrap();
            assert_eq!((el.z(), m), (z, a), "{spec}");
        }
        assert!(split_species("12-C").is_err());
    }

    /// A list of 80 000 entries (once quadratic: a line count from the start of the text
    /// per field) is refused with its line and a short message.
    #[test]
    fn long_lists_are_refused_with_a_short_message() {
        let list = vec!["2.9"; 80_000].join(", ");
        let text = format!(
            "[target]\nisotope = \"40Ar\"\ncharge = 16\n[beam_trap]\nenergy_ev = 6000.0\n\
             current_a = 0.1\nradius_m = 5e-5\nlength_m = 0.4\n[separator]\naq_range = [{list}]\n"
        );
        let err = parse_scenario(&text, "long.toml").unwrap_err().to_string();
        assert!(
            err.contains("line 10") && err.contains("separator.aq_range"),
            "{err}"
        );
        assert!(
            err.contains("a list of 80000 numbers") && err.len() < 200,
            "{err}"
        );
        let name = "x".repeat(400_000);
        let text = format!("[target]\nisotope = \"{name}\"\ncharge = 1\n");
        let err = parse_scenario(&text, "name.toml").unwrap_err().to_string();
        assert!(err.contains("line 2") && err.len() < 300, "{err}");
    }

    /// A valid list of 70 000 entries, one a line: every entry gets its own line.
    #[test]
    fn long_valid_lists_get_every_line() {
        let list = vec!["\"ionization\""; 70_000].join(",\n");
        let text = format!(
            "[target]\nisotope = \"40Ar\"\ncharge = 16\n[beam_trap]\nenergy_ev = 6000.0\n\
             current_a = 0.1\nradius_m = 5e-5\nlength_m = 0.4\nprocesses = [\n{list}]\n"
        );
        let s = parse_scenario(&text, "long.toml").unwrap();
        assert_eq!(s.lines["beam_trap.processes[0]"], 10);
        assert_eq!(s.lines["beam_trap.processes[69999]"], 70_009);
        assert_eq!(s.lines["beam_trap.length_m"], 8);
    }

    #[test]
    fn scenarios_beyond_a_mebibyte_or_the_memory_limit_are_refused() {
        let text = format!("# {}\n", "x".repeat(MAX_SCENARIO_BYTES));
        let err = parse_scenario(&text, "big.toml").unwrap_err().to_string();
        assert!(
            err.contains("too large") && err.contains("1048576"),
            "{err}"
        );
        let text = "[target]\nisotope = \"40Ar\"\ncharge = 16\n[beam_trap]\nenergy_ev = 6000.0\n\
             current_a = 0.1\nradius_m = 5e-5\nlength_m = 0.4\n[time]\npoints = 100000\n\
             [energy_scan]\npoints = 100000\n";
        let err = parse_scenario(text, "huge.toml").unwrap_err().to_string();
        assert!(
            err.contains("energy_scan.points") && err.contains("limit"),
            "{err}"
        );
    }
}
