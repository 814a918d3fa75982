//! Where each field sits in the scenario text, so every error can name its line.
//!
//! Built once per file in time linear in its size: the line of an offset is a binary search
//! in the offsets of the newlines, and the span of a path a hash lookup, so a file with a
//! list of 100 000 entries parses in about the time it takes to read it (a line count per
//! field from the start of the text made such a file quadratic).

use std::collections::HashMap;
use std::fmt::Display;
use std::ops::Range;

use toml::de::{DeTable, DeValue};

use super::schema::MAX_QUOTE_CHARS;
use crate::error::Error;

/// Line (1-based) of a byte offset in `text`: for a single lookup (an error before the
/// [`Positions`] of the file exist); [`Lines`] answers many.
pub fn line_of(text: &str, offset: usize) -> usize {
    Lines::new(text).line(offset)
}

/// The byte offsets of every newline of a text, for line numbers by binary search.
pub(crate) struct Lines {
    newlines: Vec<usize>,
}

impl Lines {
    pub fn new(text: &str) -> Self {
        let newlines = text
            .bytes()
            .enumerate()
            .filter(|(_, b)| *b == b'\n')
            .map(|(i, _)| i)
            .collect();
        Lines { newlines }
    }

    /// Line (1-based) of a byte offset: one more than the newlines before it.
    pub fn line(&self, offset: usize) -> usize {
        self.newlines.partition_point(|&n| n < offset) + 1
    }
}

/// Dotted path (`beam_trap.energy_ev`, `species[1].name`) → byte span of every key and
/// value written in the file.
pub(crate) struct Positions<'a> {
    pub file: &'a str,
    pub spans: Vec<(String, Range<usize>)>,
    /// Index in `spans` by path (the first one written, as a linear search would find).
    index: HashMap<String, usize>,
    lines: Lines,
}

impl<'a> Positions<'a> {
    pub fn new(file: &'a str, text: &'a str, doc: &DeTable<'_>) -> Self {
        let mut spans = Vec::new();
        collect_table(doc, "", &mut spans);
        let mut index = HashMap::with_capacity(spans.len());
        for (i, (k, _)) in spans.iter().enumerate() {
            index.entry(k.clone()).or_insert(i);
        }
        Positions {
            file,
            spans,
            index,
            lines: Lines::new(text),
        }
    }

    /// Line of a field, or of the nearest enclosing table written in the file.
    pub fn line(&self, path: &str) -> Option<usize> {
        let mut p = path.to_string();
        loop {
            if let Some(&i) = self.index.get(&p) {
                return Some(self.lines.line(self.spans[i].1.start));
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
            .map(|(k, s)| (k.clone(), self.lines.line(s.start)))
            .collect()
    }

    /// A scenario error about the field at `path` ("" for the file as a whole).
    pub fn error(&self, path: &str, message: impl Display) -> Error {
        let message = clip(&message.to_string());
        let path = &clip(path);
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

/// An error message with every over-long word (a value or key quoted from the file) cut to
/// [`MAX_QUOTE_CHARS`] characters and "…", and the whole to a few lines: a bad value of
/// 400 kB is quoted by its prefix, not echoed.
pub(crate) fn clip(message: &str) -> String {
    const MAX_WORD: usize = 2 * MAX_QUOTE_CHARS;
    const MAX_MESSAGE: usize = 1000;
    let mut out = String::with_capacity(message.len().min(MAX_MESSAGE + 4));
    for (i, word) in message.split(' ').enumerate() {
        if i > 0 {
            out.push(' ');
        }
        if word.chars().count() > MAX_WORD {
            out.extend(word.chars().take(MAX_QUOTE_CHARS));
            out.push('…');
        } else {
            out.push_str(word);
        }
        if out.len() > MAX_MESSAGE {
            let cut = (0..=MAX_MESSAGE)
                .rev()
                .find(|&c| out.is_char_boundary(c))
                .unwrap_or(0);
            out.truncate(cut);
            out.push('…');
            break;
        }
    }
    out
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
    fn long_values_are_quoted_by_a_prefix() {
        let long = format!("unknown gas \"{}\": allowed H2, He", "x".repeat(400_000));
        let got = clip(&long);
        assert!(got.len() < 100, "{got}");
        assert!(got.starts_with("unknown gas \"xxxx"), "{got}");
        assert!(got.contains("x… allowed H2, He"), "{got}");
        let many = "word ".repeat(100_000);
        assert!(clip(&many).len() <= 1004);
        assert_eq!(clip("short text stays"), "short text stays");
    }

    #[test]
    fn lines_count_from_one() {
        assert_eq!(line_of("a\nb\nc", 0), 1);
        assert_eq!(line_of("a\nb\nc", 2), 2);
        assert_eq!(line_of("a\nb\nc", 4), 3);
        assert_eq!(line_of("a\n", 99), 2);
        assert_eq!(line_of("", 0), 1);
        let lines = Lines::new("x\n\ny\n");
        let got: Vec<usize> = (0..6).map(|o| lines.line(o)).collect();
        assert_eq!(got, [1, 1, 2, 3, 3, 4]);
    }
}
