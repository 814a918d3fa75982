//! Scenario files: one TOML document describing a planned run (the source and its
//! settings, the species and their amounts, the residual gas, the target isotope and
//! charge, the separator, the time and energy grids). Reading goes in three passes so every
//! error can name the file, the line and the field: the TOML syntax, the serde schema
//! (unknown fields, wrong types), then the values (ranges, elements, isotopes, gases).
//! The schema is documented field by field in `python/chargecast/scenario.py` and in the
//! commented example `python/chargecast/scenarios/reference.toml`.

use std::collections::BTreeMap;
use std::fmt::Display;

use serde::Deserialize;
use toml::de::{DeTable, DeValue};

use super::breeding::breeding_time_s;
use super::electron_beam::ElectronBeam;
use crate::atoms::{element, split_species, Element, Isotope};
use crate::error::{Error, Result};
use crate::processes::gases::gas;

// ---------------------------------------------------------------- the file as written

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawScenario {
    title: Option<String>,
    description: Option<String>,
    target: Option<RawTarget>,
    species: Option<Vec<RawSpecies>>,
    trap: Option<RawTrap>,
    photon_beam: Option<RawPhotonBeam>,
    single_collision: Option<RawSingleCollision>,
    residual_gas_pa: Option<BTreeMap<String, f64>>,
    time: Option<RawTime>,
    energy_scan: Option<RawEnergyScan>,
    separator: Option<RawSeparator>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTarget {
    isotope: String,
    charge: i64,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSpecies {
    name: String,
    amount: Option<f64>,
    initial_charge: Option<i64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTrap {
    energy_ev: f64,
    current_a: f64,
    radius_m: Option<f64>,
    current_density_a_cm2: Option<f64>,
    magnetic_field_t: Option<f64>,
    cathode_radius_m: Option<f64>,
    cathode_temperature_k: Option<f64>,
    cathode_field_t: Option<f64>,
    length_m: f64,
    ion_temperature_ev: Option<f64>,
    gas_temperature_k: Option<f64>,
    compensation: Option<f64>,
    processes: Option<Vec<String>>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPhotonBeam {
    photon_energy_ev: f64,
    flux_cm2_s: f64,
    bandwidth_ev: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSingleCollision {
    energy_ev: f64,
    energy_spread_ev: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTime {
    start_s: Option<f64>,
    stop_s: Option<f64>,
    points: Option<i64>,
    extraction_s: Option<f64>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawEnergyScan {
    start_ev: Option<f64>,
    stop_ev: Option<f64>,
    points: Option<i64>,
    scale: Option<String>,
}

#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSeparator {
    resolving_power: Option<f64>,
    peak_shape: Option<String>,
    aq_half_width: Option<f64>,
    relative_half_width: Option<f64>,
    window_fwhm: Option<f64>,
    aq_range: Option<Vec<f64>>,
    residual_amount: Option<f64>,
}

// ---------------------------------------------------------------- the checked scenario

/// The target ion: one isotope at one charge state.
#[derive(Clone, Debug, PartialEq)]
pub struct Target {
    /// Isotope label, mass number first ("129Xe").
    pub isotope: String,
    pub symbol: String,
    pub z: u32,
    pub mass_number: u32,
    pub charge: u32,
}

/// One species put into the source.
#[derive(Clone, Debug, PartialEq)]
pub struct SpeciesEntry {
    /// "Xe" for the natural isotopic mix, "129Xe" for one isotope.
    pub name: String,
    pub symbol: String,
    pub z: u32,
    pub mass_number: Option<u32>,
    /// Relative amount (any unit; only ratios matter).
    pub amount: f64,
    /// Charge state in which it enters the source (0 = neutral atoms).
    pub initial_charge: u32,
}

/// Electron-beam trap settings; exactly one of radius, current density or field sizes the beam.
#[derive(Clone, Debug, PartialEq)]
pub struct TrapSettings {
    pub energy_ev: f64,
    pub current_a: f64,
    pub radius_m: Option<f64>,
    pub current_density_a_cm2: Option<f64>,
    pub magnetic_field_t: Option<f64>,
    pub cathode_radius_m: Option<f64>,
    pub cathode_temperature_k: Option<f64>,
    pub cathode_field_t: f64,
    pub length_m: f64,
    pub ion_temperature_ev: f64,
    pub gas_temperature_k: f64,
    pub compensation: f64,
    pub processes: Vec<String>,
}

/// The source of a scenario.
#[derive(Clone, Debug, PartialEq)]
pub enum SourceSettings {
    Trap(TrapSettings),
    PhotonBeam {
        photon_energy_ev: f64,
        flux_cm2_s: f64,
        bandwidth_ev: Option<f64>,
    },
    SingleCollision {
        energy_ev: f64,
        energy_spread_ev: f64,
    },
}

impl SourceSettings {
    /// The table name that holds these settings in the file.
    pub fn kind(&self) -> &'static str {
        match self {
            SourceSettings::Trap(_) => "trap",
            SourceSettings::PhotonBeam { .. } => "photon_beam",
            SourceSettings::SingleCollision { .. } => "single_collision",
        }
    }
}

/// Confinement-time grid (log-spaced) and the time of extraction.
#[derive(Clone, Debug, PartialEq)]
pub struct TimeGrid {
    pub start_s: f64,
    pub stop_s: f64,
    pub points: usize,
    /// None: extract when the target charge state peaks.
    pub extraction_s: Option<f64>,
}

/// Grid of beam (electron or photon) energies for the best-energy search.
#[derive(Clone, Debug, PartialEq)]
pub struct EnergyGrid {
    pub start_ev: f64,
    pub stop_ev: f64,
    pub points: usize,
    pub log: bool,
}

/// The mass separator after the source.
#[derive(Clone, Debug, PartialEq)]
pub struct Separator {
    pub resolving_power: f64,
    pub peak_shape: String,
    pub aq_half_width: Option<f64>,
    pub relative_half_width: Option<f64>,
    pub window_fwhm: f64,
    pub aq_range: Option<(f64, f64)>,
    /// Residual-gas ions relative to the species' ions, for the A/q spectrum.
    pub residual_amount: f64,
}

/// A checked scenario with every default filled in.
#[derive(Clone, Debug, PartialEq)]
pub struct Scenario {
    pub file: String,
    pub title: String,
    pub description: String,
    pub target: Target,
    pub species: Vec<SpeciesEntry>,
    pub source: SourceSettings,
    /// Residual gases (formula, partial pressure in Pa).
    pub residual_gas_pa: Vec<(String, f64)>,
    /// Residual-gas elements (symbol, share of the residual atoms), from the gases'
    /// composition weighted by partial pressure; shares sum to 1 (empty without gas).
    pub residual_elements: Vec<(String, f64)>,
    pub time: TimeGrid,
    pub energy_scan: EnergyGrid,
    pub separator: Separator,
    /// Line (1-based) of every field and table written in the file, by dotted path
    /// (`trap.energy_ev`, `species[1].name`).
    pub lines: BTreeMap<String, usize>,
}

/// Processes a trap can include.
pub const PROCESSES: [&str; 4] = [
    "ionization",
    "radiative_recombination",
    "charge_exchange",
    "multiple_ionization",
];
/// The processes a trap includes when the scenario does not list them.
pub const DEFAULT_PROCESSES: [&str; 3] =
    ["ionization", "radiative_recombination", "charge_exchange"];
/// Peak shapes of the separator.
pub const PEAK_SHAPES: [&str; 3] = ["gaussian", "triangular", "rectangular"];
const MAX_POINTS: i64 = 100_000;
/// (name, value) pairs in file or alphabetical order.
type Pairs = Vec<(String, f64)>;

// ---------------------------------------------------------------- errors with positions

/// Where each field sits in the text: dotted path → (line, byte span).
struct Positions<'a> {
    file: &'a str,
    text: &'a str,
    spans: Vec<(String, std::ops::Range<usize>)>,
}

impl<'a> Positions<'a> {
    fn new(file: &'a str, text: &'a str, doc: &DeTable<'_>) -> Self {
        let mut spans = Vec::new();
        collect_table(doc, "", &mut spans);
        Positions { file, text, spans }
    }

    fn line_of_offset(&self, offset: usize) -> usize {
        let end = offset.min(self.text.len());
        self.text
            .as_bytes()
            .iter()
            .take(end)
            .filter(|b| **b == b'\n')
            .count()
            + 1
    }

    /// Line of a field, or of the nearest enclosing table written in the file.
    fn line(&self, path: &str) -> Option<usize> {
        let mut p = path.to_string();
        loop {
            if let Some((_, span)) = self.spans.iter().find(|(k, _)| *k == p) {
                return Some(self.line_of_offset(span.start));
            }
            match p.rfind(['.', '[']) {
                Some(i) => p.truncate(i),
                None => return None,
            }
        }
    }

    /// The innermost field whose key or value covers a byte span.
    fn path_at(&self, span: &std::ops::Range<usize>) -> Option<String> {
        self.spans
            .iter()
            .filter(|(_, s)| s.start <= span.start && span.end <= s.end.max(s.start + 1))
            .min_by_key(|(_, s)| s.end - s.start)
            .map(|(k, _)| k.clone())
    }

    fn error(&self, path: &str, message: impl Display) -> Error {
        let message = match (path.is_empty(), self.line(path)) {
            (true, _) => message.to_string(),
            (false, Some(line)) => format!("line {line}, field `{path}`: {message}"),
            (false, None) => format!("field `{path}`: {message}"),
        };
        Error::InvalidScenario {
            file: self.file.to_string(),
            message,
        }
    }
}

/// Record the span of every key (from the key to the end of its value) under `prefix`.
fn collect_table(
    table: &DeTable<'_>,
    prefix: &str,
    out: &mut Vec<(String, std::ops::Range<usize>)>,
) {
    for (key, value) in table.iter() {
        let path = if prefix.is_empty() {
            key.get_ref().to_string()
        } else {
            format!("{prefix}.{}", key.get_ref())
        };
        let (k, v) = (key.span(), value.span());
        // A table header's key comes first; a value written inline follows its key.
        let span = k.start.min(v.start)..k.end.max(v.end);
        out.push((path.clone(), span));
        collect_value(value.get_ref(), &path, out);
    }
}

fn collect_value(value: &DeValue<'_>, path: &str, out: &mut Vec<(String, std::ops::Range<usize>)>) {
    match value {
        DeValue::Table(t) => collect_table(t, path, out),
        DeValue::Array(items) => {
            for (i, item) in items.iter().enumerate() {
                let p = format!("{path}[{i}]");
                out.push((p.clone(), item.span()));
                collect_value(item.get_ref(), &p, out);
            }
        }
        _ => {}
    }
}

// ---------------------------------------------------------------- reading

/// Read and check a scenario. `file` names the file in error messages.
///
/// Errors are [`Error::InvalidScenario`] whose message names the line and the field and
/// says what is allowed.
pub fn parse_scenario(text: &str, file: &str) -> Result<Scenario> {
    let doc = DeTable::parse(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start));
        Error::InvalidScenario {
            file: file.to_string(),
            message: match line {
                Some(l) => format!("line {l}: not valid TOML: {}", e.message().trim()),
                None => format!("not valid TOML: {}", e.message().trim()),
            },
        }
    })?;
    let pos = Positions::new(file, text, doc.get_ref());
    let raw: RawScenario = toml::from_str(text).map_err(|e| {
        let path = e.span().and_then(|s| pos.path_at(&s)).unwrap_or_default();
        let message = plain_serde_message(e.message());
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
}

fn line_of(text: &str, offset: usize) -> usize {
    text.as_bytes()
        .iter()
        .take(offset.min(text.len()))
        .filter(|b| **b == b'\n')
        .count()
        + 1
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
        let species = self.species(raw.species, &target)?;
        let source = self.source(raw.trap, raw.photon_beam, raw.single_collision)?;
        let (residual_gas_pa, residual_elements) = self.residual_gas(raw.residual_gas_pa)?;
        let time = self.time(raw.time, &source, &target)?;
        let energy_scan = self.energy_scan(raw.energy_scan, &source, &target)?;
        let separator = self.separator(raw.separator)?;
        if let SourceSettings::SingleCollision { .. } = source {
            if let Some(s) = species.iter().find(|s| s.initial_charge != 0) {
                let i = species.iter().position(|x| x == s).unwrap_or(0);
                return Err(self.err(
                    &format!("species[{i}].initial_charge"),
                    "a single-collision source ionizes neutral atoms: allowed 0 only",
                ));
            }
        }
        let lines = self
            .pos
            .spans
            .iter()
            .map(|(k, s)| (k.clone(), self.pos.line_of_offset(s.start)))
            .collect();
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
            lines,
        })
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
        for (i, s) in raw.into_iter().enumerate() {
            let at = |f: &str| format!("species[{i}].{f}");
            let (el, mass) = self.wrap(&at("name"), split_species(&s.name))?;
            if let Some(a) = mass {
                self.wrap(&at("name"), el.isotope(a))?;
            }
            let amount =
                self.positive(&at("amount"), s.amount.unwrap_or(1.0), "relative amount")?;
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
            if out.iter().any(|o: &SpeciesEntry| o.name == name) {
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
            return Err(self.err(
                "species",
                format!(
                    "no species provides the target {}: add [[species]] name = \"{}\" (or the element {} if {} occurs naturally)",
                    target.isotope, target.isotope, target.symbol, target.isotope
                ),
            ));
        }
        Ok(out)
    }

    fn source(
        &self,
        trap: Option<RawTrap>,
        photon: Option<RawPhotonBeam>,
        single: Option<RawSingleCollision>,
    ) -> Result<SourceSettings> {
        let given = [trap.is_some(), photon.is_some(), single.is_some()]
            .iter()
            .filter(|g| **g)
            .count();
        if given != 1 {
            let path = if trap.is_some() && photon.is_some() {
                "photon_beam"
            } else if single.is_some() {
                "single_collision"
            } else {
                ""
            };
            return Err(self.err(
                path,
                format!(
                    "{} source tables given: give exactly one of [trap], [photon_beam] or [single_collision]",
                    if given == 0 { "no" } else { "several" }
                ),
            ));
        }
        if let Some(t) = trap {
            return self.trap(t).map(SourceSettings::Trap);
        }
        if let Some(p) = photon {
            return Ok(SourceSettings::PhotonBeam {
                photon_energy_ev: self.positive(
                    "photon_beam.photon_energy_ev",
                    p.photon_energy_ev,
                    "eV",
                )?,
                flux_cm2_s: self.non_negative(
                    "photon_beam.flux_cm2_s",
                    p.flux_cm2_s,
                    "photons cm⁻² s⁻¹",
                )?,
                bandwidth_ev: p
                    .bandwidth_ev
                    .map(|b| self.non_negative("photon_beam.bandwidth_ev", b, "eV"))
                    .transpose()?,
            });
        }
        let s = single.ok_or_else(|| self.err("", "no source table"))?;
        Ok(SourceSettings::SingleCollision {
            energy_ev: self.positive("single_collision.energy_ev", s.energy_ev, "eV")?,
            energy_spread_ev: self.non_negative(
                "single_collision.energy_spread_ev",
                s.energy_spread_ev.unwrap_or(0.0),
                "eV",
            )?,
        })
    }

    fn trap(&self, t: RawTrap) -> Result<TrapSettings> {
        let energy_ev = self.positive("trap.energy_ev", t.energy_ev, "eV")?;
        let current_a = self.positive("trap.current_a", t.current_a, "A")?;
        let sizes = [
            ("radius_m", t.radius_m),
            ("current_density_a_cm2", t.current_density_a_cm2),
            ("magnetic_field_t", t.magnetic_field_t),
        ];
        let given: Vec<&str> = sizes
            .iter()
            .filter(|(_, v)| v.is_some())
            .map(|(k, _)| *k)
            .collect();
        if given.len() != 1 {
            let path = given
                .get(1)
                .map_or("trap".to_string(), |k| format!("trap.{k}"));
            return Err(self.err(
                &path,
                format!(
                    "the beam size is {}: give exactly one of radius_m, current_density_a_cm2 or magnetic_field_t",
                    if given.is_empty() { "missing".to_string() } else { format!("given twice ({})", given.join(", ")) }
                ),
            ));
        }
        for (k, v) in sizes {
            if let Some(v) = v {
                self.positive(&format!("trap.{k}"), v, "")?;
            }
        }
        let cathode = [t.cathode_radius_m, t.cathode_temperature_k];
        if t.magnetic_field_t.is_none()
            && (cathode.iter().any(Option::is_some) || t.cathode_field_t.is_some())
        {
            let k = if t.cathode_radius_m.is_some() {
                "cathode_radius_m"
            } else if t.cathode_temperature_k.is_some() {
                "cathode_temperature_k"
            } else {
                "cathode_field_t"
            };
            return Err(self.err(
                &format!("trap.{k}"),
                "cathode settings size the beam with the magnetic field: give magnetic_field_t too (and no radius_m or current_density_a_cm2)",
            ));
        }
        if cathode.iter().filter(|c| c.is_some()).count() == 1 {
            let k = if t.cathode_radius_m.is_some() {
                "cathode_radius_m"
            } else {
                "cathode_temperature_k"
            };
            return Err(self.err(
                &format!("trap.{k}"),
                "give both cathode_radius_m and cathode_temperature_k (for the Herrmann radius) or neither (Brillouin radius)",
            ));
        }
        let cathode_field_t = t.cathode_field_t.unwrap_or(0.0);
        let beam = match (t.radius_m, t.current_density_a_cm2, t.magnetic_field_t) {
            (Some(r), _, _) => ElectronBeam::with_radius(energy_ev, current_a, r),
            (_, Some(j), _) => ElectronBeam::with_current_density(energy_ev, current_a, j),
            (_, _, Some(b)) => match (t.cathode_radius_m, t.cathode_temperature_k) {
                (Some(rc), Some(tc)) => {
                    ElectronBeam::with_herrmann(energy_ev, current_a, b, rc, tc, cathode_field_t)
                }
                _ => ElectronBeam::with_magnetic_field(energy_ev, current_a, b),
            },
            _ => Err(Error::invalid(
                "beam size",
                "none",
                "give one of radius_m, current_density_a_cm2, magnetic_field_t",
            )),
        };
        beam.map_err(|e| {
            let path = match &e {
                Error::InvalidParameter { name, .. } => format!("trap.{name}"),
                _ => "trap".to_string(),
            };
            self.err(&path, e)
        })?;
        let compensation = t.compensation.unwrap_or(0.5);
        if !(compensation.is_finite() && (0.0..=1.0).contains(&compensation)) {
            return Err(self.err(
                "trap.compensation",
                format!("{compensation} is not allowed: must lie in 0…1"),
            ));
        }
        let processes = match t.processes {
            None => DEFAULT_PROCESSES.iter().map(|p| p.to_string()).collect(),
            Some(list) => {
                for (i, p) in list.iter().enumerate() {
                    if !PROCESSES.contains(&p.as_str()) {
                        return Err(self.err(
                            &format!("trap.processes[{i}]"),
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
        Ok(TrapSettings {
            energy_ev,
            current_a,
            radius_m: t.radius_m,
            current_density_a_cm2: t.current_density_a_cm2,
            magnetic_field_t: t.magnetic_field_t,
            cathode_radius_m: t.cathode_radius_m,
            cathode_temperature_k: t.cathode_temperature_k,
            cathode_field_t,
            length_m: self.positive("trap.length_m", t.length_m, "m")?,
            ion_temperature_ev: self.positive(
                "trap.ion_temperature_ev",
                t.ion_temperature_ev.unwrap_or(50.0),
                "eV",
            )?,
            gas_temperature_k: self.positive(
                "trap.gas_temperature_k",
                t.gas_temperature_k.unwrap_or(300.0),
                "K",
            )?,
            compensation,
            processes,
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
        let raw = raw.unwrap_or(RawTime {
            start_s: None,
            stop_s: None,
            points: None,
            extraction_s: None,
        });
        let stop_s = match raw.stop_s {
            Some(s) => self.positive("time.stop_s", s, "s")?,
            None => default_stop_s(source, target),
        };
        let start_s = match raw.start_s {
            Some(s) => self.positive("time.start_s", s, "s")?,
            None => stop_s * 1e-5,
        };
        if start_s >= stop_s {
            return Err(self.err(
                "time.start_s",
                format!("{start_s} s is not before stop_s = {stop_s} s: start_s must be smaller"),
            ));
        }
        let points = self.points("time.points", raw.points.unwrap_or(300))?;
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
        let raw = raw.unwrap_or(RawEnergyScan {
            start_ev: None,
            stop_ev: None,
            points: None,
            scale: None,
        });
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
        let points = self.points("energy_scan.points", raw.points.unwrap_or(40))?;
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
        let raw = raw.unwrap_or(RawSeparator {
            resolving_power: None,
            peak_shape: None,
            aq_half_width: None,
            relative_half_width: None,
            window_fwhm: None,
            aq_range: None,
            residual_amount: None,
        });
        let shape = raw.peak_shape.unwrap_or_else(|| "gaussian".into());
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
                    return Err(self.err(
                        "separator.aq_range",
                        format!(
                        "{v:?} is not allowed: give [lowest, highest] A/q, 0 < lowest < highest"
                    ),
                    ))
                }
            },
        };
        Ok(Separator {
            resolving_power: self.positive(
                "separator.resolving_power",
                raw.resolving_power.unwrap_or(200.0),
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
                raw.window_fwhm.unwrap_or(1.0),
                "FWHM",
            )?,
            aq_range,
            residual_amount: self.non_negative(
                "separator.residual_amount",
                raw.residual_amount.unwrap_or(0.05),
                "relative amount",
            )?,
        })
    }
}

/// Without a [time] table: twenty times the stepwise breeding time of the target in a
/// trap (rounded up to a power of ten, 1 ms … 1000 s), else one second.
fn default_stop_s(source: &SourceSettings, target: &Target) -> f64 {
    let SourceSettings::Trap(t) = source else {
        return 1.0;
    };
    let j = match (t.radius_m, t.current_density_a_cm2) {
        (_, Some(j)) => j,
        (Some(r), None) => super::electron_beam::current_density_a_cm2(t.current_a, r),
        _ => {
            let r = t.magnetic_field_t.map_or(0.0, |b| {
                super::electron_beam::brillouin_radius_m(t.current_a, t.energy_ev, b)
            });
            super::electron_beam::current_density_a_cm2(t.current_a, r)
        }
    };
    let tau = element(&target.symbol)
        .and_then(|el| breeding_time_s(el, i64::from(target.charge), t.energy_ev, j, None))
        .unwrap_or(f64::INFINITY);
    if tau.is_finite() && tau > 0.0 {
        10f64.powf((20.0 * tau).log10().ceil()).clamp(1e-3, 1e3)
    } else {
        1.0
    }
}

/// Without an [energy_scan] table: from 0.8 to 6 times the energy that opens the target
/// charge state (the last step's ionization energy for stepwise sources, the sum of
/// ionization energies for a single collision).
fn default_energy_range(source: &SourceSettings, target: &Target) -> (f64, f64) {
    let ies = element(&target.symbol)
        .map(Element::ionization_energies_ev)
        .unwrap_or(&[]);
    let q = target.charge as usize;
    let base = match source {
        SourceSettings::SingleCollision { .. } => ies.iter().take(q).sum::<f64>(),
        _ => ies.get(q.saturating_sub(1)).copied().unwrap_or(0.0),
    };
    if base.is_finite() && base > 0.0 {
        (0.8 * base, 6.0 * base)
    } else {
        (10.0, 1e5)
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

[trap]
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
        assert_eq!(s.source.kind(), "trap");
        assert_eq!(s.separator.peak_shape, "gaussian");
        assert!(s.time.start_s < s.time.stop_s);
        // H2 brings two H per molecule, CO one C and one O at equal pressure: 2:1:1.
        let shares: BTreeMap<_, _> = s.residual_elements.iter().cloned().collect();
        assert!((shares["H"] - 0.5).abs() < 1e-12 && (shares["C"] - 0.25).abs() < 1e-12);
        assert_eq!(s.lines["trap.energy_ev"], 8);
        assert_eq!(s.lines["target"], 3);
    }

    #[test]
    fn unknown_field_names_line_field_and_allowed_fields() {
        let m = message(&GOOD.replace("energy_ev = 5000.0", "energy_kev = 5.0"));
        assert!(
            m.contains("line 8") && m.contains("trap.energy_kev") && m.contains("energy_ev"),
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
    fn syntax_errors_give_the_line() {
        let m = message("[target]\nisotope = \"40Ar\n");
        assert!(m.contains("line 2"), "{m}");
    }

    #[test]
    fn missing_source_and_target_are_explained() {
        assert!(message("[target]\nisotope = \"40Ar\"\ncharge = 3\n").contains("[trap]"));
        assert!(message(
            "[trap]\nenergy_ev = 1.0\ncurrent_a = 1.0\nradius_m = 1e-4\nlength_m = 1.0\n"
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
}
