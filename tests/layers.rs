//! The layers of the core, as the code imports them, one direction only:
//!
//!   data → atoms → processes → network → solve → sources → plan → python
//!
//! with `spectrum` beside `plan` (it may use atoms and processes; plan may use it), and the
//! shared `constants`, `error`, `interrupt` and `limits` below everything. This test reads every `src/**/*.rs`,
//! maps each file to its layer, and fails when a file refers to a module of a layer it may
//! not use (`use crate::x…`, a `crate::x::…` path in code, or a `super::…` chain that
//! climbs to the crate root), when a file outside `src/python` mentions pyo3 or the numpy
//! bindings, or when a file sits in no known layer (a new top-level module must be placed
//! here first). Comments are not read: a doc link is not an import.

use std::collections::BTreeSet;
use std::fs;
use std::path::{Path, PathBuf};

/// The chain of top-level modules, lowest first: each may use itself and those before it.
const CHAIN: &[&str] = &[
    "constants",
    "error",
    // Shared services that use only `error`: the interrupt flag and the memory limit.
    "interrupt",
    "limits",
    "atoms",
    "processes",
    "network",
    "solve",
    "sources",
    "plan",
    "python",
];

/// `spectrum` sits beside `plan`: it may use these (and itself); `plan` and everything
/// above it may use `spectrum`.
const SPECTRUM_USES: &[&str] = &[
    "constants",
    "error",
    "interrupt",
    "limits",
    "atoms",
    "processes",
];
const SPECTRUM: &str = "spectrum";
const FIRST_USER_OF_SPECTRUM: &str = "plan";

/// The crate root declares every module; it is not a layer of its own.
const ROOT: &str = "lib";

/// The top-level module a file under `src/` belongs to (`src/sources/beam_trap.rs` →
/// `sources`, `src/error.rs` → `error`, `src/lib.rs` → `lib`), and its module path below the
/// crate root (`["sources", "beam_trap"]`; `mod.rs` names its folder).
fn module_path(relative: &Path) -> Vec<String> {
    let mut parts: Vec<String> = relative
        .iter()
        .map(|p| p.to_string_lossy().into_owned())
        .collect();
    if let Some(last) = parts.pop() {
        let stem = last.trim_end_matches(".rs").to_string();
        if stem != "mod" {
            parts.push(stem);
        }
    }
    parts
}

/// Code without comments and without the contents of string literals (so that neither
/// a doc link nor a message text counts as an import).
fn code_only(source: &str) -> String {
    let mut out = String::with_capacity(source.len());
    let mut chars = source.chars().peekable();
    let mut in_string = false;
    let mut block_depth = 0usize;
    while let Some(c) = chars.next() {
        if block_depth > 0 {
            if c == '*' && chars.peek() == Some(&'/') {
                chars.next();
                block_depth -= 1;
            } else if c == '/' && chars.peek() == Some(&'*') {
                chars.next();
                block_depth += 1;
            } else if c == '\n' {
                out.push('\n');
            }
            continue;
        }
        if in_string {
            match c {
                '\\' => {
                    chars.next();
                }
                '"' => {
                    in_string = false;
                    out.push('"');
                }
                '\n' => out.push('\n'),
                _ => {}
            }
            continue;
        }
        match c {
            '"' => {
                in_string = true;
                out.push('"');
            }
            // A char literal holding a quote ('"' or '\"') must not open a string.
            '\'' if matches!(chars.peek(), Some('"') | Some('\\')) => {
                out.push('\'');
                if let Some(next) = chars.next() {
                    out.push(next);
                    if next == '\\' {
                        if let Some(escaped) = chars.next() {
                            out.push(escaped);
                        }
                    }
                }
            }
            '/' if chars.peek() == Some(&'/') => {
                for rest in chars.by_ref() {
                    if rest == '\n' {
                        out.push('\n');
                        break;
                    }
                }
            }
            '/' if chars.peek() == Some(&'*') => {
                chars.next();
                block_depth = 1;
            }
            _ => out.push(c),
        }
    }
    out
}

fn is_ident(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// The first segment of the path that starts `rest`, or of every item of a group
/// (`{a, b::c, d::{e}}` → a, b, d).
fn path_heads(rest: &str) -> Vec<String> {
    let mut heads = Vec::new();
    let Some(group) = rest.strip_prefix('{') else {
        let name: String = rest.chars().take_while(|c| is_ident(*c)).collect();
        if !name.is_empty() {
            heads.push(name);
        }
        return heads;
    };
    let mut depth = 0usize;
    let mut item_start = true;
    let mut name = String::new();
    for c in group.chars() {
        if depth == 0 && item_start && is_ident(c) {
            name.push(c);
            continue;
        }
        if !name.is_empty() {
            heads.push(std::mem::take(&mut name));
        }
        match c {
            '{' => depth += 1,
            '}' if depth == 0 => break,
            '}' => depth -= 1,
            ',' if depth == 0 => item_start = true,
            c if c.is_whitespace() => {}
            _ if depth == 0 => item_start = false,
            _ => {}
        }
    }
    if !name.is_empty() {
        heads.push(name);
    }
    heads
}

/// The top-level modules a file refers to: after `crate::` (also `crate::{a, b::c}`), or
/// after a chain of `super::` long enough to reach the crate root from the file's module
/// (`file_depth` levels below it). A chain inside an inline module (`mod tests { … }`)
/// climbs one level less than counted here; such a chain then names a sibling module,
/// which maps to no layer and is ignored, so the approximation misses nothing a real path
/// to the root would reach.
fn referenced_modules(code: &str, file_depth: usize) -> BTreeSet<String> {
    let mut found = BTreeSet::new();
    let mut i = 0;
    while let Some(pos) = code[i..].find("crate::").map(|p| p + i) {
        let before = code[..pos].chars().next_back();
        i = pos + "crate::".len();
        if !before.is_some_and(|c| is_ident(c) || c == '$') {
            found.extend(path_heads(&code[i..]));
        }
    }
    let mut i = 0;
    while let Some(pos) = code[i..].find("super::").map(|p| p + i) {
        let before = code[..pos].chars().next_back();
        let mut supers = 0;
        let mut j = pos;
        while code[j..].starts_with("super::") {
            supers += 1;
            j += "super::".len();
        }
        i = j;
        if !before.is_some_and(is_ident) && supers >= file_depth {
            found.extend(path_heads(&code[j..]));
        }
    }
    found
}

fn position(module: &str) -> Option<usize> {
    CHAIN.iter().position(|m| *m == module)
}

fn is_layer(module: &str) -> bool {
    module == SPECTRUM || position(module).is_some()
}

/// Whether layer `user` may refer to layer `used` (both known layers).
fn may_use(user: &str, used: &str) -> bool {
    if user == used {
        return true;
    }
    if user == SPECTRUM {
        return SPECTRUM_USES.contains(&used);
    }
    let user_at = position(user);
    if used == SPECTRUM {
        return user_at >= position(FIRST_USER_OF_SPECTRUM);
    }
    position(used) < user_at
}

/// The layers `user` may refer to, for the message.
fn allowed_list(user: &str) -> String {
    let mut all: Vec<&str> = CHAIN.to_vec();
    all.push(SPECTRUM);
    all.retain(|m| may_use(user, m));
    all.join(", ")
}

/// Every breach of the layer rules in one file, as readable lines (empty = clean).
fn violations(relative: &Path, source: &str) -> Vec<String> {
    let path = module_path(relative);
    let shown = relative.display();
    let Some(top) = path.first().cloned() else {
        return vec![format!("{shown}: not a Rust module path")];
    };
    let code = code_only(source);
    let mut out = Vec::new();
    if top != "python" {
        for word in [
            "pyo3",
            "numpy::",
            "#[pyclass",
            "#[pyfunction",
            "#[pymethods",
        ] {
            if code.contains(word) {
                out.push(format!(
                    "{shown}: mentions `{word}`; pyo3 types live in src/python only"
                ));
            }
        }
    }
    if top == ROOT {
        return out;
    }
    if !is_layer(&top) {
        out.push(format!(
            "{shown}: module `{top}` is in no layer; add it to CHAIN in tests/layers.rs"
        ));
        return out;
    }
    for name in referenced_modules(&code, path.len()) {
        if is_layer(&name) && !may_use(&top, &name) {
            out.push(format!(
                "{shown}: layer `{top}` refers to `crate::{name}`, a layer it may not use \
                 (allowed: {})",
                allowed_list(&top)
            ));
        }
    }
    out
}

fn rust_files(dir: &Path, out: &mut Vec<PathBuf>) {
    let mut entries: Vec<PathBuf> = fs::read_dir(dir)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", dir.display()))
        .map(|e| e.expect("directory entry").path())
        .collect();
    entries.sort();
    for path in entries {
        if path.is_dir() {
            rust_files(&path, out);
        } else if path.extension().is_some_and(|e| e == "rs") {
            out.push(path);
        }
    }
}

#[test]
fn every_file_imports_only_its_own_and_lower_layers() {
    let src = Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut files = Vec::new();
    rust_files(&src, &mut files);
    assert!(files.len() > 20, "found only {} files", files.len());
    let mut all = Vec::new();
    for file in &files {
        let source = fs::read_to_string(file).expect("readable source");
        let relative = file.strip_prefix(&src).expect("below src");
        all.extend(violations(relative, &source));
    }
    assert!(all.is_empty(), "layer violations:\n{}", all.join("\n"));
}

// The checker's own logic, on planted sources.

fn check(path: &str, source: &str) -> Vec<String> {
    violations(Path::new(path), source)
}

#[test]
fn an_upward_use_is_caught() {
    let v = check(
        "processes/lotz.rs",
        "use crate::atoms::Ion;\nuse crate::sources::BeamTrap;\n",
    );
    assert_eq!(v.len(), 1, "{v:?}");
    assert!(v[0].contains("`crate::sources`"), "{v:?}");
    // The same module path written inline in code, and in a grouped use.
    assert_eq!(
        check("atoms/x.rs", "fn f() { crate::solve::evolve(a, b, c); }").len(),
        1
    );
    let grouped = check(
        "network/mod.rs",
        "use crate::{error::Result, sources::{beam_trap, photon_beam}, atoms};",
    );
    assert_eq!(grouped.len(), 1, "{grouped:?}");
    let grouped = check("atoms/x.rs", "use super::super::{error, plan::Report};");
    assert_eq!(grouped.len(), 1, "{grouped:?}");
    // spectrum sits beside plan: it may not use the solver or the sources.
    assert_eq!(
        check("spectrum/peaks.rs", "use crate::solve::evolve;").len(),
        1
    );
    assert!(check("spectrum/peaks.rs", "use crate::processes::lotz;").is_empty());
    assert_eq!(
        check("sources/x.rs", "use crate::spectrum::Peaks;").len(),
        1
    );
    assert!(check("python/x.rs", "use crate::spectrum::Peaks;").is_empty());
    // plan may use spectrum and sources, but not the bindings.
    assert!(check(
        "plan/run.rs",
        "use crate::spectrum::x; use crate::sources::y;"
    )
    .is_empty());
    assert_eq!(check("plan/run.rs", "use crate::python::z;").len(), 1);
}

#[test]
fn a_super_chain_to_the_root_is_caught_and_a_sibling_is_not() {
    // processes/lotz.rs sits two levels down: super::super:: is the crate root.
    assert_eq!(
        check("processes/lotz.rs", "use super::super::solve::evolve;").len(),
        1
    );
    // From a `mod tests` inside it, three supers reach the root.
    assert_eq!(
        check(
            "processes/lotz.rs",
            "mod tests { use super::super::super::plan::run; }"
        )
        .len(),
        1
    );
    assert!(check(
        "sources/beam_trap.rs",
        "use super::electron_beam::ElectronBeam;"
    )
    .is_empty());
    assert!(check("sources/mod.rs", "use super::sources::x;").is_empty());
    assert_eq!(check("sources/mod.rs", "use super::plan::x;").len(), 1);
}

#[test]
fn comments_and_strings_are_not_imports() {
    let source = "//! See [`crate::sources::BeamTrap`] and pyo3.\n\
                  /* crate::plan::run */\n\
                  /// uses crate::python\n\
                  fn f() -> &'static str { \"crate::solve:: and pyo3\" }\n\
                  const Q: char = '\"'; const B: char = '\\\"'; const S: &str = \"pyo3\";\n";
    assert!(
        check("atoms/mod.rs", source).is_empty(),
        "{:?}",
        check("atoms/mod.rs", source)
    );
    // A lookalike identifier is not the `crate` keyword.
    assert!(check("atoms/mod.rs", "let mycrate::solve = 1;").is_empty());
}

#[test]
fn pyo3_outside_the_bindings_and_unknown_modules_are_caught() {
    assert_eq!(
        check("sources/photon_beam.rs", "use pyo3::prelude::*;").len(),
        1
    );
    assert_eq!(
        check("atoms/element.rs", "#[pyclass]\npub struct Element;").len(),
        1
    );
    assert!(check(
        "python/engine.rs",
        "use pyo3::prelude::*; use crate::plan::x;"
    )
    .is_empty());
    let v = check("gadgets/mod.rs", "");
    assert!(v.len() == 1 && v[0].contains("in no layer"), "{v:?}");
    assert!(check(
        "lib.rs",
        "pub mod plan;\n#[cfg(feature = \"python\")]\nmod python;"
    )
    .is_empty());
}
