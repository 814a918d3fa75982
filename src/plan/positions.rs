//! Where each field sits in the scenario text, so every error can name its line.

use std::fmt::Display;
use std::ops::Range;

use toml::de::{DeTable, DeValue};

use crate::error::Error;

/// Line (1-based) of a byte offset in `text`: the one line-number helper of the parser.
pub fn line_of(text: &str, offset: usize) -> usize {
    text.as_bytes()
        .iter()
        .take(offset.min(text.len()))
        .filter(|b| **b == b'\n')
        .count()
        + 1
}

/// Dotted path (`beam_trap.energy_ev`, `species[1].name`) → byte span of every key and
/// value written in the file.
pub(crate) struct Positions<'a> {
    pub file: &'a str,
    pub text: &'a str,
    pub spans: Vec<(String, Range<usize>)>,
}

impl<'a> Positions<'a> {
    pub fn new(file: &'a str, text: &'a str, doc: &DeTable<'_>) -> Self {
        let mut spans = Vec::new();
        collect_table(doc, "", &mut spans);
        Positions { file, text, spans }
    }

    /// Line of a field, or of the nearest enclosing table written in the file.
    pub fn line(&self, path: &str) -> Option<usize> {
        let mut p = path.to_string();
        loop {
            if let Some((_, span)) = self.spans.iter().find(|(k, _)| *k == p) {
                return Some(line_of(self.text, span.start));
            }
            match p.rfind(['.', '[']) {
                Some(i) => p.truncate(i),
                None => return None,
            }
        }
    }

    /// The innermost field whose key or value covers a byte span.
    pub fn path_at(&self, span: &Range<usize>) -> Option<String> {
        self.spans
            .iter()
            .filter(|(_, s)| s.start <= span.start && span.end <= s.end.max(s.start + 1))
            .min_by_key(|(_, s)| s.end - s.start)
            .map(|(k, _)| k.clone())
    }

    /// Line of every field and table, by dotted path.
    pub fn lines(&self) -> std::collections::BTreeMap<String, usize> {
        self.spans
            .iter()
            .map(|(k, s)| (k.clone(), line_of(self.text, s.start)))
            .collect()
    }

    /// A scenario error about the field at `path` ("" for the file as a whole).
    pub fn error(&self, path: &str, message: impl Display) -> Error {
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
fn collect_table(table: &DeTable<'_>, prefix: &str, out: &mut Vec<(String, Range<usize>)>) {
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

fn collect_value(value: &DeValue<'_>, path: &str, out: &mut Vec<(String, Range<usize>)>) {
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lines_count_from_one() {
        assert_eq!(line_of("a\nb\nc", 0), 1);
        assert_eq!(line_of("a\nb\nc", 2), 2);
        assert_eq!(line_of("a\nb\nc", 4), 3);
        assert_eq!(line_of("a\n", 99), 2);
    }
}
