//! Molecules through the one species parser, and molecular lines on the m/z axis.

use chargecast::atoms::{
    element, parse_species, parse_substance, split_species, Molecule, Substance,
};
use chargecast::spectrum::{
    aq_lines, overlaps, resolve_isotope, OverlapSettings, PeakShape, SpeciesInput,
};
use proptest::prelude::*;

fn singly(spec: &str) -> SpeciesInput {
    let electrons = match parse_substance(spec).unwrap() {
        Substance::Molecule(f) => f.electrons(),
        Substance::Atom(a) => a.element().z(),
    };
    let mut fractions = vec![0.0; electrons as usize + 1];
    fractions[1] = 1.0;
    SpeciesInput {
        spec: spec.into(),
        amount: 1.0,
        fractions,
        residual: false,
    }
}

#[test]
fn the_m_over_z_28_doublet_needs_a_resolving_power_of_about_2500() {
    // Common practice: 14N2+ / 12C16O+ at m/z 28 need m/Δm ≈ 28.006/0.0112 ≈ 2 500.
    let list = aq_lines(&[singly("N2"), singly("CO")]).unwrap();
    let find = |label: &str| {
        list.lines()
            .iter()
            .find(|l| l.formula.as_deref() == Some(label))
            .unwrap()
            .clone()
    };
    let n2 = find("(14N)2");
    let co = find("(12C)(16O)");
    let r = n2.m_over_q / (n2.m_over_q - co.m_over_q).abs();
    assert!((2400.0..2600.0).contains(&r), "{r}");
    // The masses come from the isotope table (AME2020): 2 × 14.003074004 − mₑ.
    assert!((n2.mass_u - (2.0 * 14.003_074_004_25 - 5.485_799_09e-4)).abs() < 1e-8);
}

#[test]
fn molecular_lines_interfere_with_an_atomic_target() {
    // 28Si+ against CO+ and N2+ (hand calculation with AME2020 masses: 27.976927 vs
    // 27.994915 and 28.006148, so R ≈ 1 555 and 958).
    let list = aq_lines(&[singly("28Si"), singly("N2"), singly("CO")]).unwrap();
    let settings = OverlapSettings::new(500.0, PeakShape::Gaussian, 1.0, 20.0).unwrap();
    let report = overlaps(&list, resolve_isotope("28Si").unwrap(), 1, &settings).unwrap();
    let needed: Vec<(String, f64)> = report
        .interferences
        .iter()
        .map(|i| (i.line.isotope_label(), i.resolving_power_needed))
        .collect();
    let co = needed.iter().find(|(l, _)| l == "(12C)(16O)").unwrap().1;
    let n2 = needed.iter().find(|(l, _)| l == "(14N)2").unwrap().1;
    assert!((co - 1555.0).abs() < 5.0, "{co}");
    assert!((n2 - 958.0).abs() < 5.0, "{n2}");
    assert!(report.purity < 0.5, "{}", report.purity);
}

#[test]
fn a_molecule_is_refused_where_an_atom_is_needed() {
    for spec in ["CO", "H2O", "N2"] {
        assert!(resolve_isotope(spec).is_err(), "{spec}");
        assert!(Molecule::parse(spec).is_ok(), "{spec}");
    }
}

/// Element symbols written as chemists do, and counts.
fn symbol() -> impl Strategy<Value = String> {
    (1i64..=103).prop_map(|z| {
        chargecast::atoms::element_by_z(z)
            .unwrap()
            .symbol()
            .to_string()
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// No string naming a molecule resolves to an element or isotope anywhere a species is
    /// read: it parses as a molecule or is refused.
    #[test]
    fn formulas_never_resolve_to_elements(
        parts in proptest::collection::vec((symbol(), 1u32..5), 2..4),
    ) {
        let spec: String = parts
            .iter()
            .map(|(s, n)| if *n == 1 { s.clone() } else { format!("{s}{n}") })
            .collect();
        match parse_substance(&spec) {
            Ok(Substance::Molecule(f)) => prop_assert!(f.atoms() >= 2),
            Ok(Substance::Atom(a)) => prop_assert!(false, "{spec:?} read as {:?}", a.element().symbol()),
            Err(_) => {}
        }
        prop_assert!(parse_species(&spec).is_err());
        prop_assert!(split_species(&spec).is_err());
        prop_assert!(element(&spec).is_err());
    }

    /// A homonuclear molecule X_n with n below Z (or any H_n) is a molecule.
    #[test]
    fn homonuclear_molecules(z in 2i64..=103, n in 2u32..20) {
        let el = chargecast::atoms::element_by_z(z).unwrap();
        prop_assume!(n < el.z());
        let spec = format!("{}{n}", el.symbol());
        let is_molecule = matches!(parse_substance(&spec), Ok(Substance::Molecule(_)));
        prop_assert!(is_molecule, "{}", spec);
        prop_assert!(element(&spec).is_err());
    }
}
