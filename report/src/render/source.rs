//! Errors in audit text shown to a person: the line, a caret under the
//! place, and what was expected there.

use std::io::{self, Write};

use crate::model::parse::ParseError;

/// Write `err` (found in `text`, read from `file`) as
///
/// ```text
/// error: expected a format such as Q1.15, found `Q1.x`
///   --> fir.qbdp:3:11
///    |
///  3 | input x : Q1.x in [-1, 1]
///    |           ^^^^ expected a format such as Q1.15
/// ```
///
/// with `color` adding ANSI bold and red.
///
/// ```
/// let text = "input x : Q0.15 in [-1, 1\n";
/// let err = qbound_report::parse(text).unwrap_err();
/// let mut out = Vec::new();
/// qbound_report::render::source::parse_error(&err, text, "x.qbdp", false, &mut out)?;
/// let shown = String::from_utf8(out)?;
/// assert!(shown.contains("--> x.qbdp:1:"));
/// assert!(shown.contains("\n1 | input x : Q0.15 in [-1, 1\n"));
/// assert!(shown.contains('^'));
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
///
/// # Errors
/// Whatever writing to `out` returns.
pub fn parse_error(
    err: &ParseError,
    text: &str,
    file: &str,
    color: bool,
    out: &mut dyn Write,
) -> io::Result<()> {
    let (red, bold, reset) = if color {
        ("\x1b[1;31m", "\x1b[1m", "\x1b[0m")
    } else {
        ("", "", "")
    };
    let line = err.span.line;
    let src = text
        .lines()
        .nth(line.saturating_sub(1))
        .map(|s| s.replace('\t', " "));
    let (col, found) = locate(err, src.as_deref());
    let headline = if found.is_empty() {
        err.expected.clone()
    } else {
        format!("expected {}, found {}", err.expected, shown(&found))
    };
    writeln!(out, "{red}error{reset}{bold}: {headline}{reset}")?;
    writeln!(out, "  --> {file}:{line}:{col}")?;
    let Some(src) = src else {
        return Ok(());
    };
    let gutter = line.to_string().len();
    let pad = " ".repeat(gutter);
    writeln!(out, "{pad} |")?;
    writeln!(out, "{line} | {src}")?;
    let width = caret_width(&found, &src, col);
    let label = if found.is_empty() {
        "here".to_owned()
    } else {
        format!("expected {}", err.expected)
    };
    writeln!(
        out,
        "{pad} | {}{red}{}{reset} {label}",
        " ".repeat(col.saturating_sub(1)),
        "^".repeat(width)
    )?;
    Ok(())
}

/// The column and found text to show. When the position points at
/// blank space with nothing found there (`` ` ` ``), move to the word that
/// follows and show it: the person wants to see the offending word.
fn locate(err: &ParseError, src: Option<&str>) -> (usize, String) {
    let col = err.span.column;
    let blank = err.found.trim_matches('`').trim().is_empty() && err.found != "end of line";
    match src {
        Some(src) if blank && !err.found.is_empty() => {
            let chars: Vec<char> = src.chars().collect();
            let mut i = col.saturating_sub(1);
            while i < chars.len() && chars[i].is_whitespace() {
                i += 1;
            }
            let word: String = chars[i.min(chars.len())..]
                .iter()
                .take_while(|c| !c.is_whitespace() && !",()[]".contains(**c))
                .collect();
            if word.is_empty() {
                (col, err.found.clone())
            } else {
                (i + 1, format!("`{word}`"))
            }
        }
        _ => (col, err.found.clone()),
    }
}

/// The found text quoted, unless it is a description (`end of line`).
fn shown(found: &str) -> String {
    if found.contains(' ') || found.starts_with('`') {
        found.to_owned()
    } else {
        format!("`{found}`")
    }
}

/// Underline the found text when it appears at the column, else one caret.
fn caret_width(found: &str, src: &str, col: usize) -> usize {
    let f = found.trim_matches('`');
    let rest: String = src.chars().skip(col.saturating_sub(1)).collect();
    if !f.is_empty() && rest.starts_with(f) {
        f.chars().count()
    } else {
        1
    }
}
