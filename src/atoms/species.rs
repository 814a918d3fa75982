//! The one parser of species names: elements, isotopes and chemical formulas.
//!
//! * Elements: symbol ("Kr"), name ("krypton", any case) or atomic number ("36"), for the
//!   natural isotopic mix.
//! * Isotopes: "84Kr", "Kr84", "Kr-84", "krypton-84", "(84Kr)"; "D" and "T" are ²H and ³H.
//! * Molecules: formulas as chemists write them, **case-sensitively** — a capital letter
//!   starts every element symbol: "CO" is carbon monoxide, "Co" cobalt; "H2O", "CO2",
//!   "CH4", "NH3", "N2", "H2". Isotopologues: a mass number at the start ("13CO", "15N2")
//!   or in parentheses before a symbol ("(15N)2", "H(2H)O", "(13C)(18O)2"); "D2O", "HD".
//!
//! # The reading rule
//!
//! 1. A string is first read exactly as written. A single symbol with a trailing number is
//!    an isotope when the number is at least Z ("Kr84", "He3", "C12") and a molecule of
//!    that many atoms otherwise ("N2", "O2"); hydrogen is the exception: "H2" and "H3" are
//!    the molecules (write "2H", "H-2" or "D" for deuterium).
//! 2. A string written in capitals only that reads as a molecule but also names an element
//!    when case is ignored ("NO" / No, "HF" / Hf, "CS" / Cs, "SN" / Sn, "BI" / Bi, "TIN" /
//!    tin, read exactly as T + I + N) is refused with both readings — except the bundled molecules of
//!    `data/molecules.csv` ("CO" is always carbon monoxide). Write "No" or "nobelium" for
//!    the element, "N1O1" for the molecule.
//! 3. A string with no exact reading is read with case ignored as an element or isotope
//!    ("kr", "84kr", "XE", "argon"). If it could also be a formula with some other
//!    capitalisation ("co", "no2", "h2o"; only strings of at most three characters or with
//!    a digit or parenthesis are tried as formulas), it is refused, naming each reading.
//! 4. With a mass number at the start, later counts of 10 or more are refused ("12C16O"
//!    would be C₁₆O): put isotopes in parentheses, "(12C)(16O)".
//!
//! So no string that reads as a molecule ever resolves to an element, and element names
//! stay case-insensitive.

use std::collections::BTreeMap;

use super::{element_by_z, molecule, Element, Isotope};
use crate::error::{Error, Result};

/// An element in its natural isotopic mix, or one isotope of it.
#[derive(Clone, Copy, Debug)]
pub enum Species {
    Natural(&'static Element),
    Isotope(&'static Element, &'static Isotope),
}

impl Species {
    pub fn element(&self) -> &'static Element {
        match self {
            Species::Natural(e) | Species::Isotope(e, _) => e,
        }
    }

    /// The isotopes this species stands for with the share each gets: the natural abundances
    /// for an element, 1 for a single isotope (whether or not it occurs naturally).
    pub fn isotopes(&self) -> Vec<(&'static Isotope, f64)> {
        match self {
            Species::Isotope(_, iso) => vec![(*iso, 1.0)],
            Species::Natural(e) => e
                .natural_isotopes()
                .into_iter()
                .filter_map(|i| i.abundance.map(|a| (i, a)))
                .collect(),
        }
    }
}

/// Label of an isotope such as "84Kr".
pub fn isotope_label(isotope: &Isotope) -> String {
    let symbol = element_by_z(isotope.z as i64).map_or("?", |e| e.symbol());
    format!("{}{}", isotope.mass_number, symbol)
}

/// `count` atoms of one element, all of one isotope when `mass_number` is given (else in
/// the natural isotopic mix).
#[derive(Clone, Copy, Debug)]
pub struct FormulaPart {
    pub element: &'static Element,
    pub mass_number: Option<u32>,
    pub count: u32,
}

impl PartialEq for FormulaPart {
    fn eq(&self, other: &Self) -> bool {
        self.element.z() == other.element.z()
            && self.mass_number == other.mass_number
            && self.count == other.count
    }
}

/// A chemical formula of two or more atoms; parts of the same element and isotope are
/// merged, in the order first written.
#[derive(Clone, Debug, PartialEq)]
pub struct Formula {
    parts: Vec<FormulaPart>,
}

/// Most atoms a formula may hold (a guard against absurd input, far above any gas).
pub const MAX_FORMULA_ATOMS: u32 = 1000;

impl Formula {
    pub fn parts(&self) -> &[FormulaPart] {
        &self.parts
    }

    /// Number of atoms.
    pub fn atoms(&self) -> u32 {
        self.parts.iter().map(|p| p.count).sum()
    }

    /// Number of electrons of the neutral molecule (Σ Z × count): the highest charge.
    pub fn electrons(&self) -> u32 {
        self.parts.iter().map(|p| p.element.z() * p.count).sum()
    }

    /// Atoms per element, isotopes ignored: Z → count.
    pub fn composition(&self) -> BTreeMap<u32, u32> {
        let mut out = BTreeMap::new();
        for p in &self.parts {
            *out.entry(p.element.z()).or_insert(0) += p.count;
        }
        out
    }

    /// The formula as written back by the parser: "H2O", "(13C)O", "(2H)2O".
    pub fn label(&self) -> String {
        let mut out = String::new();
        for p in &self.parts {
            match p.mass_number {
                Some(a) => out.push_str(&format!("({a}{})", p.element.symbol())),
                None => out.push_str(p.element.symbol()),
            }
            if p.count > 1 {
                out.push_str(&p.count.to_string());
            }
        }
        out
    }
}

/// What a species string names: an element or isotope, or a molecule.
#[derive(Clone, Debug)]
pub enum Substance {
    Atom(Species),
    Molecule(Formula),
}

/// Read any species string by the module's rule (elements, isotopes, formulas).
pub fn parse_substance(spec: &str) -> Result<Substance> {
    let s = spec.trim();
    if s.is_empty() {
        return Err(bad_species(spec));
    }
    if s.bytes().all(|c| c.is_ascii_digit()) {
        let z: i64 = s.parse().map_err(|_| unknown_element(spec))?;
        return element_by_z(z)
            .map(|e| Substance::Atom(Species::Natural(e)))
            .map_err(|_| unknown_element(spec));
    }
    match read_exact(s) {
        Some(Ok(Substance::Molecule(f))) => {
            // Rule 2: capitals only and also an element when case is ignored.
            if s.bytes().all(|c| c.is_ascii_uppercase()) && !molecule::is_bundled(&f) {
                if let Some(e) = element_ignoring_case(s) {
                    return Err(ambiguous(
                        spec,
                        &[
                            format!("{} (write {:?} or {:?})", e.name(), e.symbol(), e.name()),
                            format!("the molecule {} (write {:?})", f.label(), spaced_counts(&f)),
                        ],
                    ));
                }
            }
            Ok(Substance::Molecule(f))
        }
        Some(other) => other,
        None => read_ignoring_case(spec, s),
    }
}

/// Read an isotope or element specification (see the module doc); a mass number must name
/// an isotope in the table, and a molecule is refused.
pub fn parse_species(spec: &str) -> Result<Species> {
    match parse_substance(spec)? {
        Substance::Atom(s) => Ok(s),
        Substance::Molecule(f) => Err(molecule_not_atom(spec, &f)),
    }
}

/// The element and the mass number if one was given (checked against the isotope table).
pub fn split_species(spec: &str) -> Result<(&'static Element, Option<u32>)> {
    Ok(match parse_species(spec)? {
        Species::Natural(e) => (e, None),
        Species::Isotope(e, iso) => (e, Some(iso.mass_number)),
    })
}

/// The error for a molecule given where an element or isotope is needed.
pub fn molecule_not_atom(spec: &str, f: &Formula) -> Error {
    let what = molecule::bundled_name(f).unwrap_or("a molecule");
    let hint = element_ignoring_case(spec.trim())
        .map(|e| format!(" ({} is {:?})", e.name(), e.symbol()))
        .unwrap_or_default();
    Error::invalid(
        "species",
        format!("{:?}", short(spec)),
        &format!(
            "{:?} is the formula of {what}; give an element or isotope here{hint}",
            f.label()
        ),
    )
}

/// The formula with every count written out ("N1O1"): the molecule's unambiguous spelling.
fn spaced_counts(f: &Formula) -> String {
    f.parts
        .iter()
        .map(|p| match p.mass_number {
            Some(a) => format!("({a}{}){}", p.element.symbol(), p.count),
            None => format!("{}{}", p.element.symbol(), p.count),
        })
        .collect()
}

fn bad_species(spec: &str) -> Error {
    Error::invalid(
        "species",
        format!("{:?}", short(spec)),
        "give an element (\"Kr\", \"krypton\", 36), an isotope (\"84Kr\", \"Kr84\", \"Kr-84\") or a chemical formula written with capital letters starting each symbol (\"CO\", \"H2O\", \"13CO\", \"(15N)2\")",
    )
}

fn unknown_element(spec: &str) -> Error {
    Error::UnknownElement {
        given: short(spec),
        max_z: super::all_elements().map_or(118, |e| e.len() as u32),
    }
}

fn ambiguous(spec: &str, readings: &[String]) -> Error {
    Error::invalid(
        "species",
        format!("{:?}", short(spec)),
        &format!(
            "it could be {}; formulas are case-sensitive (a capital letter starts each element symbol): write the one you mean",
            readings.join(" or ")
        ),
    )
}

/// An element by symbol or name with case ignored (the old lookup, for rule 3).
fn element_ignoring_case(letters: &str) -> Option<&'static Element> {
    super::all_elements().ok()?.iter().find(|e| {
        e.symbol().eq_ignore_ascii_case(letters) || e.name().eq_ignore_ascii_case(letters)
    })
}

/// A symbol exactly as written, with the implied mass number of "D" and "T".
fn symbol_exact(symbol: &str) -> Option<(&'static Element, Option<u32>)> {
    let elements = super::all_elements().ok()?;
    match symbol {
        "D" => elements.first().map(|h| (h, Some(2))),
        "T" => elements.first().map(|h| (h, Some(3))),
        _ => elements
            .iter()
            .find(|e| e.symbol() == symbol)
            .map(|e| (e, None)),
    }
}

struct Token<'a> {
    /// Mass number written before the symbol (at the start or inside parentheses).
    mass: Option<u32>,
    symbol: &'a str,
    count: Option<u32>,
    paren: bool,
}

/// Digits at `*i`: Ok(None) when there are none, Err on overflow.
fn digits(s: &str, i: &mut usize) -> std::result::Result<Option<u32>, ()> {
    let start = *i;
    while s.as_bytes().get(*i).is_some_and(u8::is_ascii_digit) {
        *i += 1;
    }
    if *i == start {
        return Ok(None);
    }
    s[start..*i].parse().map(Some).map_err(|_| ())
}

/// Split a formula written exactly as chemists do; None if it is not of that form.
fn tokenize_exact(s: &str) -> Option<Vec<Token<'_>>> {
    if !s.is_ascii() {
        return None;
    }
    let b = s.as_bytes();
    let mut i = 0;
    let mut out = Vec::new();
    while i < b.len() {
        let paren = b[i] == b'(';
        if paren {
            i += 1;
        }
        let mass = if paren || out.is_empty() {
            digits(s, &mut i).ok()?
        } else {
            None
        };
        if !b.get(i).is_some_and(u8::is_ascii_uppercase) {
            return None;
        }
        let start = i;
        i += 1;
        while b.get(i).is_some_and(u8::is_ascii_lowercase) {
            i += 1;
        }
        let symbol = &s[start..i];
        if paren {
            if b.get(i) != Some(&b')') {
                return None;
            }
            i += 1;
        }
        let count = digits(s, &mut i).ok()?;
        out.push(Token {
            mass,
            symbol,
            count,
            paren,
        });
    }
    Some(out)
}

fn atom(el: &'static Element, mass: Option<u32>) -> Result<Substance> {
    Ok(Substance::Atom(match mass {
        None => Species::Natural(el),
        Some(a) => Species::Isotope(el, el.isotope(a)?),
    }))
}

/// Rule 1 (and 4): the exact reading, None when the string is not an exact formula.
pub(super) fn read_exact(s: &str) -> Option<Result<Substance>> {
    let tokens = tokenize_exact(s)?;
    let mut parts: Vec<FormulaPart> = Vec::with_capacity(tokens.len());
    for t in &tokens {
        let (element, implied) = symbol_exact(t.symbol)?;
        let mass_number = match (t.mass, implied) {
            (Some(m), Some(i)) if m != i => {
                return Some(Err(Error::invalid(
                    "species",
                    format!("{s:?}"),
                    &format!("{} already means {i}H: drop the mass number", t.symbol),
                )))
            }
            (m, i) => m.or(i),
        };
        if t.count == Some(0) {
            return Some(Err(Error::invalid(
                "species",
                format!("{:?}", short(s)),
                "an atom count must be 1 or more",
            )));
        }
        parts.push(FormulaPart {
            element,
            mass_number,
            count: t.count.unwrap_or(1),
        });
    }
    let leading_mass = tokens.first().is_some_and(|t| t.mass.is_some() && !t.paren);
    if leading_mass && tokens.iter().any(|t| t.count.is_some_and(|c| c >= 10)) {
        return Some(Err(Error::invalid(
            "species",
            format!("{:?}", short(s)),
            "a count of 10 or more after a leading mass number is ambiguous (\"12C16O\" would be C16O): put each isotope in parentheses, e.g. \"(12C)(16O)\"",
        )));
    }
    if let ([t], [p]) = (tokens.as_slice(), parts.as_slice()) {
        let z = p.element.z();
        return Some(match t.count {
            None | Some(1) => atom(p.element, p.mass_number),
            // "Kr84", "He3": a mass number after a bare symbol (never for hydrogen).
            Some(n)
                if t.mass.is_none() && !t.paren && p.mass_number.is_none() && z > 1 && n >= z =>
            {
                atom(p.element, Some(n))
            }
            Some(_) => molecule_of(parts),
        });
    }
    Some(molecule_of(parts))
}

fn molecule_of(written: Vec<FormulaPart>) -> Result<Substance> {
    let mut parts: Vec<FormulaPart> = Vec::with_capacity(written.len());
    let mut atoms: u32 = 0;
    for p in written {
        if let Some(a) = p.mass_number {
            p.element.isotope(a)?;
        }
        atoms = atoms.saturating_add(p.count);
        match parts
            .iter_mut()
            .find(|q| q.element.z() == p.element.z() && q.mass_number == p.mass_number)
        {
            Some(q) => q.count = q.count.saturating_add(p.count),
            None => parts.push(p),
        }
    }
    if atoms > MAX_FORMULA_ATOMS {
        return Err(Error::invalid(
            "species",
            format!("a formula of {atoms} atoms"),
            &format!("formulas may hold at most {MAX_FORMULA_ATOMS} atoms"),
        ));
    }
    Ok(Substance::Molecule(Formula { parts }))
}

/// The formula strings, in proper case, that `s` could mean with its case ignored (only
/// those that read exactly as molecules), at most a handful.
fn formula_readings(s: &str) -> Vec<String> {
    const MAX_READINGS: usize = 8;
    if s.len() > 40
        || !s
            .bytes()
            .all(|c| c.is_ascii_alphanumeric() || c == b'(' || c == b')')
    {
        return Vec::new();
    }
    let lower = s.to_ascii_lowercase();
    let b = lower.as_bytes();
    // Walk the string keeping every way of cutting its letters into symbols.
    let mut pending: Vec<(usize, String)> = vec![(0, String::new())];
    let mut done: Vec<String> = Vec::new();
    while let Some((pos, text)) = pending.pop() {
        if pos == b.len() {
            done.push(text);
            if done.len() > 64 {
                break;
            }
            continue;
        }
        let c = b[pos];
        if !c.is_ascii_alphabetic() {
            pending.push((pos + 1, format!("{text}{}", c as char)));
            continue;
        }
        for len in [1, 2] {
            let Some(piece) = lower.get(pos..pos + len) else {
                continue;
            };
            if !piece.bytes().all(|x| x.is_ascii_alphabetic()) {
                continue;
            }
            let mut sym = piece.to_string();
            sym[..1].make_ascii_uppercase();
            if symbol_exact(&sym).is_some() {
                pending.push((pos + len, format!("{text}{sym}")));
            }
        }
    }
    let mut out: Vec<String> = Vec::new();
    for cand in done {
        if matches!(read_exact(&cand), Some(Ok(Substance::Molecule(_)))) && !out.contains(&cand) {
            out.push(cand);
        }
        if out.len() >= MAX_READINGS {
            break;
        }
    }
    out.sort();
    out
}

/// Rule 3: no exact reading; read as an element or isotope with case ignored, refusing
/// strings that could also be formulas.
fn read_ignoring_case(spec: &str, s: &str) -> Result<Substance> {
    let lead: String = s.chars().take_while(char::is_ascii_digit).collect();
    let rest = &s[lead.len()..];
    let letters: String = rest.chars().take_while(char::is_ascii_alphabetic).collect();
    let after = &rest[letters.len()..];
    let hyphen = after.starts_with('-');
    let tail = after.strip_prefix('-').unwrap_or(after);
    let is_name = letters.len() > 2 && element_ignoring_case(&letters).is_some();
    // A hyphen sits between a symbol or name and a trailing mass number only.
    let hyphen_ok = !hyphen || (!tail.is_empty() && lead.is_empty());
    let shape_ok = !letters.is_empty() && tail.chars().all(|c| c.is_ascii_digit()) && hyphen_ok;
    let atom_reading: Option<Result<Substance>> = if !shape_ok
        || (!lead.is_empty() && !tail.is_empty())
    {
        None
    } else {
        match element_ignoring_case(&letters) {
            None => Some(Err(unknown_element(spec))),
            Some(el) => {
                let mass = if !lead.is_empty() {
                    Some(lead.as_str())
                } else if !tail.is_empty() {
                    Some(tail)
                } else {
                    None
                };
                match mass.map(str::parse::<u32>).transpose() {
                    Err(_) => Some(Err(bad_species(spec))),
                    // "n2", "h2": a count, not a mass number (rule 1).
                    Ok(Some(n)) if !hyphen && lead.is_empty() && (el.z() == 1 || n < el.z()) => {
                        (n == 1).then(|| atom(el, None))
                    }
                    Ok(m) => Some(atom(el, m)),
                }
            }
        }
    };
    // Words of many letters without digits ("kryptonite") are misspelt names, not formulas.
    let formula_like = s.len() <= 3 || s.bytes().any(|c| c.is_ascii_digit() || c == b'(');
    let formulas = if is_name || hyphen || !formula_like {
        Vec::new()
    } else {
        formula_readings(s)
    };
    let formula_text = |fs: &[String]| -> Vec<String> {
        fs.iter()
            .map(|f| format!("the molecule {f} (write {f:?})"))
            .collect()
    };
    match (atom_reading, formulas.is_empty()) {
        (Some(Ok(a)), true) => Ok(a),
        (Some(Ok(Substance::Atom(sp))), false) => {
            let e = sp.element();
            let mut readings = vec![match sp {
                Species::Isotope(_, iso) => {
                    format!("{} (write {:?})", e.name(), isotope_label(iso))
                }
                Species::Natural(_) => format!("{} (write {:?})", e.name(), e.symbol()),
            }];
            readings.extend(formula_text(&formulas));
            Err(ambiguous(spec, &readings))
        }
        (_, false) => Err(ambiguous(spec, &formula_text(&formulas))),
        (Some(Err(e)), true) => Err(e),
        (None, true) => {
            if letters.is_empty() || !shape_ok || (!lead.is_empty() && !tail.is_empty()) {
                Err(bad_species(spec))
            } else {
                Err(unknown_element(spec))
            }
        }
    }
}

/// A user-given name as quoted in an error message: at most 40 characters, so a huge value
/// does not flood the message.
fn short(spec: &str) -> String {
    let mut out: String = spec.chars().take(40).collect();
    if spec.chars().count() > 40 {
        out.push('…');
    }
    out
}

/// One isotope from a specification; an element alone is accepted when it has a single
/// naturally occurring isotope ("Au" → 197Au).
pub fn resolve_isotope(spec: &str) -> Result<&'static Isotope> {
    match parse_species(spec)? {
        Species::Isotope(_, iso) => Ok(iso),
        Species::Natural(e) => {
            let natural = e.natural_isotopes();
            match natural.as_slice() {
                [only] => Ok(*only),
                _ => {
                    let names: Vec<String> = natural.iter().map(|i| isotope_label(i)).collect();
                    Err(Error::invalid(
                        "isotope",
                        format!("{spec:?}"),
                        &if names.is_empty() {
                            format!(
                                "{} has no natural isotope; give a mass number, e.g. \"{}{}\"",
                                e.symbol(),
                                e.isotopes().first().map_or(0, |i| i.mass_number),
                                e.symbol()
                            )
                        } else {
                            format!(
                                "{} has several isotopes, name one of {}",
                                e.symbol(),
                                names.join(", ")
                            )
                        },
                    ))
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::element;
    use super::*;

    fn iso(spec: &str) -> (u32, u32) {
        match parse_species(spec).unwrap() {
            Species::Isotope(_, i) => (i.z, i.mass_number),
            Species::Natural(e) => (e.z(), 0),
        }
    }

    #[test]
    fn every_isotope_spelling_is_read() {
        for spec in ["84Kr", "Kr84", "Kr-84", "kr-84", " 84kr ", "krypton-84"] {
            assert_eq!(iso(spec), (36, 84), "{spec}");
        }
        assert_eq!(iso("Kr"), (36, 0));
        assert_eq!(iso("krypton"), (36, 0));
        assert_eq!(iso("36"), (36, 0));
    }

    #[test]
    fn malformed_specs_are_invalid_parameters() {
        for spec in [
            "", "84Kr86", "Kr-", "-84Kr", "Kr 84", "K r", "84-Kr", "Kr84x",
        ] {
            let err = parse_species(spec);
            assert!(err.is_err(), "{spec:?} accepted");
        }
        assert!(matches!(
            parse_species("Xx12"),
            Err(Error::UnknownElement { .. })
        ));
        assert!(matches!(parse_species("Kr-300"), Err(Error::NoData { .. })));
    }

    fn molecule(spec: &str) -> String {
        match parse_substance(spec) {
            Ok(Substance::Molecule(f)) => f.label(),
            other => panic!("{spec:?} gave {other:?}"),
        }
    }

    #[test]
    fn formulas_are_read_case_sensitively() {
        for (spec, label, electrons) in [
            ("CO", "CO", 14),
            ("H2O", "H2O", 10),
            ("CO2", "CO2", 22),
            ("CH4", "CH4", 10),
            ("NH3", "NH3", 10),
            ("N2", "N2", 14),
            ("H2", "H2", 2),
            ("O2", "O2", 16),
            ("D2O", "(2H)2O", 10),
            ("HD", "H(2H)", 2),
            ("13CO", "(13C)O", 14),
            ("(15N)2", "(15N)2", 14),
            ("15N2", "(15N)2", 14),
            ("H(2H)O", "H(2H)O", 10),
            ("(13C)(18O)2", "(13C)(18O)2", 22),
            ("CH3OH", "CH4O", 18),
            ("N1O1", "NO", 15),
            (" CO ", "CO", 14),
        ] {
            assert_eq!(molecule(spec), label, "{spec}");
            if let Ok(Substance::Molecule(f)) = parse_substance(spec) {
                assert_eq!(f.electrons(), electrons, "{spec}");
            }
        }
        // The same letters in other cases are elements.
        assert_eq!(iso("Co"), (27, 0));
        assert_eq!(iso("No"), (102, 0));
        assert_eq!(iso("Hf"), (72, 0));
        assert_eq!(iso("D"), (1, 2));
        assert_eq!(iso("T"), (1, 3));
        assert_eq!(iso("H"), (1, 0));
        assert_eq!(iso("He3"), (2, 3));
        assert_eq!(iso("C12"), (6, 12));
        assert_eq!(iso("(84Kr)"), (36, 84));
        assert_eq!(iso("XE"), (54, 0));
        assert_eq!(iso("KR-84"), (36, 84));
        for name in ["argon", "Argon", "ARGON", "carbon", "Carbon", "tin", "Tin"] {
            assert!(parse_species(name).is_ok(), "{name}");
        }
    }

    #[test]
    fn ambiguous_spellings_name_both_readings() {
        for (spec, a, b) in [
            ("co", "cobalt", "CO"),
            ("NO", "nobelium", "N1O1"),
            ("HF", "hafnium", "H1F1"),
            ("CS", "cesium", "C1S1"),
            ("SN", "tin", "S1N1"),
            ("BI", "bismuth", "B1I1"),
            ("TIN", "tin", "\"Sn\""),
            ("cs", "cesium", "CS"),
            ("no", "nobelium", "NO"),
        ] {
            let err = parse_substance(spec).unwrap_err().to_string();
            assert!(
                err.to_lowercase().contains(a) && err.contains(b),
                "{spec}: {err}"
            );
        }
        // Only a formula reading, but in the wrong case.
        for (spec, want) in [("h2o", "H2O"), ("n2", "N2"), ("h2", "H2"), ("ch4", "CH4")] {
            let err = parse_substance(spec).unwrap_err().to_string();
            assert!(err.contains(&format!("{want:?}")), "{spec}: {err}");
        }
        // A leading mass number with a later count of 10 or more.
        assert!(parse_substance("12C16O").is_err());
        assert_eq!(molecule("(12C)(16O)"), "(12C)(16O)");
        assert!(parse_substance("3DO").is_err());
        assert!(parse_substance("C0O").is_err());
        assert!(parse_substance("C2000").is_err());
    }

    #[test]
    fn molecules_never_resolve_to_elements() {
        for spec in [
            "CO", "H2", "N2", "H2O", "CO2", "13CO", "D2O", "HD", "(15N)2", "CH4",
        ] {
            let err = parse_species(spec).unwrap_err().to_string();
            assert!(err.contains("formula of"), "{spec}: {err}");
            assert!(element(spec).is_err(), "{spec}");
            assert!(split_species(spec).is_err(), "{spec}");
        }
        let err = element("CO").unwrap_err().to_string();
        assert!(
            err.contains("carbon monoxide") && err.contains("\"Co\""),
            "{err}"
        );
    }

    #[test]
    fn a_single_isotope_is_resolved_from_a_monoisotopic_element_only() {
        assert_eq!(resolve_isotope("Au").unwrap().mass_number, 197);
        assert!(resolve_isotope("Kr").is_err());
        assert!(resolve_isotope("Tc").is_err());
        assert_eq!(isotope_label(resolve_isotope("Kr-84").unwrap()), "84Kr");
    }
}
