//! The schema documentation and the parser agree: every documented field is accepted, and
//! every accepted field is documented — in the loader's docstring (the schema's reference)
//! and in the commented example `reference.toml`. The parser's accepted fields are read from
//! its own "unknown field … allowed …" errors, table by table.

use std::collections::{BTreeMap, BTreeSet};

use chargecast::plan::defaults::{DYNAMIC_PROCESSES, MODELS, PEAK_SHAPES, PROCESSES};
use chargecast::plan::parse_scenario;
use chargecast::Error;

const LOADER: &str = include_str!("../python/chargecast/scenario.py");
const REFERENCE: &str = include_str!("../python/chargecast/scenarios/reference.toml");

/// Tables of the schema as the parser knows them (`""` is the top level). A map table
/// (`residual_gas_pa`, keyed by gas formula) has no fixed fields and is left out here.
const TABLES: [&str; 12] = [
    "",
    "target",
    "species",
    "beam_trap",
    "photon_beam",
    "electron_impact",
    "plasma",
    "time",
    "energy_scan",
    "separator",
    "injection",
    "uncertainty",
];

type Fields = BTreeMap<String, BTreeSet<String>>;

/// The names between backticks after "allowed" in a parser error.
fn allowed_in(message: &str) -> BTreeSet<String> {
    let at = message
        .find("allowed")
        .unwrap_or_else(|| panic!("no allowed list in {message}"));
    let tail = &message[at + 7..];
    tail.split('`')
        .skip(1)
        .step_by(2)
        .map(str::to_string)
        .collect()
}

/// What the parser accepts in each table, provoked with an unknown field.
fn accepted() -> Fields {
    TABLES
        .iter()
        .map(|t| {
            let text = match *t {
                "" => "zzz_unknown = 1\n".to_string(),
                "species" => "[[species]]\nzzz_unknown = 1\n".to_string(),
                t => format!("[{t}]\nzzz_unknown = 1\n"),
            };
            match parse_scenario(&text, "probe.toml") {
                Err(Error::InvalidScenario { message, .. }) => {
                    assert!(message.contains("zzz_unknown"), "{t}: {message}");
                    (t.to_string(), allowed_in(&message))
                }
                other => panic!("{t}: expected an unknown-field error, got {other:?}"),
            }
        })
        .collect()
}

/// ``name`` tokens of the loader's "Schema" section, by the ``[table]`` they follow;
/// table markers themselves count as fields of the top level.
fn documented(doc: &str) -> Fields {
    let start = doc.find("Schema\n------").expect("a Schema section");
    let end = start
        + doc[start..]
            .find("Examples\n--------")
            .expect("an Examples section");
    let values: BTreeSet<&str> = PROCESSES
        .iter()
        .chain(PEAK_SHAPES.iter())
        .chain(MODELS.iter())
        .chain(DYNAMIC_PROCESSES.iter())
        .copied()
        .chain(["log", "linear"])
        .collect();
    let mut out = Fields::new();
    let mut table = String::new();
    for token in doc[start..end].split("``").skip(1).step_by(2) {
        let name = token.trim_start_matches('[').trim_end_matches(']');
        if token.starts_with('[') {
            out.entry(String::new())
                .or_default()
                .insert(name.to_string());
            table = name.to_string();
        } else if name
            .chars()
            .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_')
            && !values.contains(name)
        {
            out.entry(table.clone())
                .or_default()
                .insert(name.to_string());
        }
    }
    out
}

/// Keys written (or commented out) under each table header of reference.toml.
fn in_reference(text: &str) -> Fields {
    let mut out = Fields::new();
    let mut table = String::new();
    for line in text.lines() {
        let l = line.trim_start_matches('#').trim();
        if l.starts_with('[') {
            let name = l.split(']').next().unwrap().trim_start_matches('[');
            out.entry(String::new())
                .or_default()
                .insert(name.to_string());
            table = name.to_string();
        } else if let Some((key, _)) = l.split_once('=') {
            let key = key.trim();
            if !key.is_empty()
                && key
                    .chars()
                    .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_')
            {
                out.entry(table.clone())
                    .or_default()
                    .insert(key.to_string());
            }
        }
    }
    out
}

fn compare(what: &str, written: &Fields, accepted: &Fields) -> Vec<String> {
    let mut problems = Vec::new();
    for (table, fields) in accepted {
        let doc = written.get(table).cloned().unwrap_or_default();
        for f in fields.difference(&doc) {
            problems.push(format!(
                "{what}: [{table}] {f} is accepted but not documented"
            ));
        }
    }
    for (table, fields) in written {
        if table == "residual_gas_pa" {
            continue; // keyed by gas formula, checked against the gas table by the checker
        }
        let ok = accepted.get(table).cloned().unwrap_or_default();
        for f in fields.difference(&ok) {
            problems.push(format!(
                "{what}: [{table}] {f} is documented but not accepted"
            ));
        }
    }
    problems
}

#[test]
fn docstring_and_parser_agree() {
    let problems = compare("loader docstring", &documented(LOADER), &accepted());
    assert!(problems.is_empty(), "{problems:#?}");
}

#[test]
fn reference_file_and_parser_agree() {
    let problems = compare("reference.toml", &in_reference(REFERENCE), &accepted());
    assert!(problems.is_empty(), "{problems:#?}");
}

#[test]
fn a_planted_disagreement_is_found_both_ways() {
    let accepted = accepted();
    let doc = LOADER.replace("``ion_temperature_ev``", "``ion_temperature_kev``");
    let problems = compare("planted", &documented(&doc), &accepted);
    assert!(problems
        .iter()
        .any(|p| p.contains("ion_temperature_ev is accepted but not documented")));
    assert!(problems
        .iter()
        .any(|p| p.contains("ion_temperature_kev is documented but not accepted")));
}
