//! The audit text format (see `report/FORMAT.md` for the grammar): one
//! statement per line, parsed by hand so that every error carries the line,
//! the column and what was expected there.

use std::collections::HashMap;
use std::fmt;

use crate::arith::{Num, parse_decimal};
use crate::model::{Budget, Builder, Datapath, InputKind, ModelError, NodeId, Span};
use qbound::{Format, Overflow, Rounding};

/// The longest input accepted (bytes); longer text is refused with an
/// error rather than risk unbounded work.
pub const MAX_SOURCE_LEN: usize = 16 << 20;
/// The deepest nesting of parentheses and unary minus accepted.
pub const MAX_DEPTH: usize = 200;

/// A syntax or model error in audit text, with its position.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ParseError {
    /// Where the problem is (1-based line and column).
    pub span: Span,
    /// What the parser expected there (for syntax errors), or a
    /// description of the model error.
    pub expected: String,
    /// What it found (the offending text, or `end of line`).
    pub found: String,
}

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.found.is_empty() {
            write!(
                f,
                "line {}, column {}: {}",
                self.span.line, self.span.column, self.expected
            )
        } else {
            write!(
                f,
                "line {}, column {}: expected {}, found {}",
                self.span.line, self.span.column, self.expected, self.found
            )
        }
    }
}

impl std::error::Error for ParseError {}

/// Parse audit text into a [`Datapath`].
///
/// # Errors
/// A [`ParseError`] with line, column and what was expected, for every
/// malformed input (never a panic).
///
/// ```
/// let text = "\
/// input x : Q0.15 in [-1, 0.5]
/// const c = 0.3 : Q0.15 nearest-even
/// let y = rescale(c * x, Q0.15, nearest-even, saturate)
/// output y budget 1 ulp
/// ";
/// let path = qbound_report::parse(text)?;
/// assert_eq!(path.outputs().len(), 1);
/// # Ok::<(), qbound_report::ParseError>(())
/// ```
pub fn parse(text: &str) -> Result<Datapath, ParseError> {
    if text.len() > MAX_SOURCE_LEN {
        return Err(ParseError {
            span: Span { line: 1, column: 1 },
            expected: format!("a text of at most {MAX_SOURCE_LEN} bytes"),
            found: format!("{} bytes", text.len()),
        });
    }
    let mut st = State {
        b: Builder::new(),
        names: HashMap::new(),
    };
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut statements = 0usize;
    for (i, line) in text.lines().enumerate() {
        let mut c = Cursor {
            chars: line.chars().collect(),
            pos: 0,
            line: i + 1,
        };
        c.skip_ws();
        if c.at_end() {
            continue;
        }
        st.statement(&mut c)?;
        statements += 1;
    }
    if statements == 0 {
        return Err(ParseError {
            span: Span { line: 1, column: 1 },
            expected: "a datapath: the text holds no statement (only blanks and comments); \
                       declare inputs, constants, lets and at least one output (see report/FORMAT.md)"
                .to_owned(),
            found: String::new(),
        });
    }
    Ok(st.b.build())
}

const KEYWORDS: &[&str] = &[
    "input", "const", "let", "output", "rescale", "in", "quantize", "budget", "ulp", "ulps",
];

struct Cursor {
    chars: Vec<char>,
    pos: usize,
    line: usize,
}

impl Cursor {
    fn span(&self) -> Span {
        Span {
            line: self.line,
            column: self.pos + 1,
        }
    }

    fn span_at(&self, pos: usize) -> Span {
        Span {
            line: self.line,
            column: pos + 1,
        }
    }

    fn at_end(&self) -> bool {
        self.pos >= self.chars.len() || self.chars[self.pos] == '#'
    }

    fn peek(&self) -> Option<char> {
        if self.at_end() {
            None
        } else {
            Some(self.chars[self.pos])
        }
    }

    fn skip_ws(&mut self) {
        while self.pos < self.chars.len() && self.chars[self.pos].is_whitespace() {
            self.pos += 1;
        }
    }

    /// What is at the cursor, for error messages.
    fn found(&self) -> String {
        if self.at_end() {
            return "end of line".to_owned();
        }
        let rest: String = self.chars[self.pos..]
            .iter()
            .take_while(|c| !c.is_whitespace())
            .take(24)
            .collect();
        format!("`{rest}`")
    }

    fn error(&self, expected: impl Into<String>) -> ParseError {
        ParseError {
            span: self.span(),
            expected: expected.into(),
            found: self.found(),
        }
    }

    /// Consume the punctuation `p` (after whitespace) or fail.
    fn expect(&mut self, p: &str) -> Result<(), ParseError> {
        self.skip_ws();
        if self.eat(p) {
            Ok(())
        } else {
            Err(self.error(format!("`{p}`")))
        }
    }

    fn eat(&mut self, p: &str) -> bool {
        self.skip_ws();
        let n = p.chars().count();
        if self.pos + n <= self.chars.len()
            && self.chars[self.pos..self.pos + n]
                .iter()
                .copied()
                .eq(p.chars())
        {
            self.pos += n;
            true
        } else {
            false
        }
    }

    /// A run of characters allowed by `ok` (after whitespace).
    fn word(&mut self, ok: impl Fn(char) -> bool) -> (Span, String) {
        self.skip_ws();
        let start = self.pos;
        while self.pos < self.chars.len() && ok(self.chars[self.pos]) {
            self.pos += 1;
        }
        (
            self.span_at(start),
            self.chars[start..self.pos].iter().collect(),
        )
    }

    fn ident(&mut self) -> Option<(Span, String)> {
        self.skip_ws();
        match self.peek() {
            Some(c) if c.is_ascii_alphabetic() || c == '_' => {}
            _ => return None,
        }
        Some(self.word(|c| c.is_ascii_alphanumeric() || c == '_'))
    }

    /// Peek at the identifier at the cursor without consuming it.
    fn peek_ident(&mut self) -> Option<String> {
        let save = self.pos;
        let r = self.ident().map(|(_, s)| s);
        self.pos = save;
        r
    }

    fn keyword(&mut self, kw: &str) -> bool {
        self.skip_ws();
        let save = self.pos;
        match self.ident() {
            Some((_, s)) if s == kw => true,
            _ => {
                self.pos = save;
                false
            }
        }
    }

    fn decimal(&mut self, what: &str) -> Result<(Span, Num), ParseError> {
        self.skip_ws();
        let start = self.pos;
        let mut prev = ' ';
        while self.pos < self.chars.len() {
            let c = self.chars[self.pos];
            let ok = c.is_ascii_digit()
                || c == '.'
                || c == 'e'
                || c == 'E'
                || ((c == '-' || c == '+') && (self.pos == start || prev == 'e' || prev == 'E'));
            if !ok {
                break;
            }
            prev = c;
            self.pos += 1;
        }
        let text: String = self.chars[start..self.pos].iter().collect();
        match parse_decimal(&text) {
            Some(v) => Ok((self.span_at(start), v)),
            None => {
                self.pos = start;
                Err(self.error(format!(
                    "{what} (an exact decimal such as -1.25, 0.1 or 3e-4)"
                )))
            }
        }
    }

    fn integer(&mut self, what: &str) -> Result<i32, ParseError> {
        self.skip_ws();
        let start = self.pos;
        let (_, w) = self.word(|c| c.is_ascii_digit());
        match w.parse::<i32>() {
            Ok(v) if !w.is_empty() && w.len() <= 4 => Ok(v),
            _ => {
                self.pos = start;
                Err(self.error(what.to_owned()))
            }
        }
    }

    fn format(&mut self) -> Result<Format, ParseError> {
        self.skip_ws();
        let start = self.pos;
        let (span, w) = self.word(|c| c.is_ascii_alphanumeric() || c == '.');
        w.parse::<Format>().map_err(|e| {
            self.pos = start;
            let mut err =
                self.error("a format such as Q1.15 (sign + 1 integer + 15 fraction bits) or UQ8.8");
            if let qbound::FormatError::TooWide { .. } | qbound::FormatError::Empty = e {
                err.expected = format!("a valid format: {e}");
            }
            err.span = span;
            err
        })
    }

    fn mode_word(&mut self) -> (Span, String) {
        self.word(|c| c.is_ascii_alphanumeric() || c == '-')
    }

    fn rounding(&mut self) -> Result<Rounding, ParseError> {
        self.skip_ws();
        let start = self.pos;
        let (_, w) = self.mode_word();
        Rounding::from_name(&w).ok_or_else(|| {
            self.pos = start;
            let names: Vec<&str> = Rounding::ALL.iter().map(|r| r.name()).collect();
            self.error(format!("a rounding mode ({})", names.join(", ")))
        })
    }

    fn overflow(&mut self) -> Result<Overflow, ParseError> {
        self.skip_ws();
        let start = self.pos;
        let (_, w) = self.mode_word();
        Overflow::from_name(&w).ok_or_else(|| {
            self.pos = start;
            let names: Vec<&str> = Overflow::ALL.iter().map(|r| r.name()).collect();
            self.error(format!("an overflow mode ({})", names.join(", ")))
        })
    }

    fn end(&mut self) -> Result<(), ParseError> {
        self.skip_ws();
        if self.at_end() {
            Ok(())
        } else {
            Err(self.error("end of line"))
        }
    }
}

struct State {
    b: Builder,
    names: HashMap<String, NodeId>,
}

fn model_error(span: Span, e: &ModelError) -> ParseError {
    ParseError {
        span,
        expected: e.to_string(),
        found: String::new(),
    }
}

impl State {
    fn new_name(&self, c: &mut Cursor, what: &str) -> Result<(Span, String), ParseError> {
        let Some((span, name)) = c.ident() else {
            return Err(c.error(format!(
                "{what} (a letter or `_`, then letters, digits, `_`)"
            )));
        };
        if KEYWORDS.contains(&name.as_str()) {
            return Err(ParseError {
                span,
                expected: format!("{what}, not the keyword `{name}`"),
                found: String::new(),
            });
        }
        if self.names.contains_key(&name) {
            return Err(ParseError {
                span,
                expected: format!("the name `{name}` is already defined"),
                found: String::new(),
            });
        }
        Ok((span, name))
    }

    fn statement(&mut self, c: &mut Cursor) -> Result<(), ParseError> {
        let start = c.span();
        let Some(kw) = c.peek_ident() else {
            return Err(c.error("a statement: `input`, `const`, `let` or `output`"));
        };
        match kw.as_str() {
            "input" => {
                c.keyword("input");
                self.input(c)
            }
            "const" => {
                c.keyword("const");
                self.constant(c)
            }
            "let" => {
                c.keyword("let");
                let (span, name) = self.new_name(c, "a name")?;
                c.expect("=")?;
                let id = self.expr(c, 0)?;
                c.end()?;
                self.bind(span, &name, id)
            }
            "output" => {
                c.keyword("output");
                self.output(c)
            }
            _ => {
                c.pos = start.column - 1;
                Err(c.error("a statement: `input`, `const`, `let` or `output`"))
            }
        }
    }

    /// Name node `id` (a fresh node gets the name; an existing named node
    /// gets an alias).
    fn bind(&mut self, span: Span, name: &str, id: NodeId) -> Result<(), ParseError> {
        if self.b.name_of(id).is_none() {
            self.b.name(id, name).map_err(|e| model_error(span, &e))?;
            self.b.set_span(id, span);
        }
        self.names.insert(name.to_owned(), id);
        Ok(())
    }

    fn input(&mut self, c: &mut Cursor) -> Result<(), ParseError> {
        let (span, name) = self.new_name(c, "an input name")?;
        c.expect(":")?;
        let format = c.format()?;
        if !c.keyword("in") {
            return Err(c.error("`in` and the input's range [lo, hi]"));
        }
        c.expect("[")?;
        let (_, lo) = c.decimal("the lower end of the range")?;
        c.expect(",")?;
        let (_, hi) = c.decimal("the upper end of the range")?;
        c.expect("]")?;
        let kind = if c.keyword("quantize") {
            InputKind::Quantized(c.rounding()?)
        } else {
            InputKind::Exact
        };
        c.end()?;
        let id = self
            .b
            .input(&name, format, lo, hi, kind)
            .map_err(|e| model_error(span, &e))?;
        self.b.set_span(id, span);
        self.names.insert(name, id);
        Ok(())
    }

    fn constant(&mut self, c: &mut Cursor) -> Result<(), ParseError> {
        let (span, name) = self.new_name(c, "a constant name")?;
        c.expect("=")?;
        let (_, value) = c.decimal("the constant's value")?;
        c.expect(":")?;
        let format = c.format()?;
        c.skip_ws();
        let rounding = if c.at_end() {
            Rounding::NearestTiesEven
        } else {
            c.rounding()?
        };
        c.end()?;
        let id = self
            .b
            .constant(&name, value, format, rounding)
            .map_err(|e| model_error(span, &e))?;
        self.b.set_span(id, span);
        self.names.insert(name, id);
        Ok(())
    }

    fn output(&mut self, c: &mut Cursor) -> Result<(), ParseError> {
        let (span, name) = match c.ident() {
            Some(x) => x,
            None => return Err(c.error("an output name")),
        };
        let id = if c.eat("=") {
            if self.names.contains_key(&name) {
                return Err(ParseError {
                    span,
                    expected: format!("the name `{name}` is already defined"),
                    found: String::new(),
                });
            }
            let id = self.expr(c, 0)?;
            self.bind(span, &name, id)?;
            id
        } else {
            match self.names.get(&name) {
                Some(&id) => id,
                None => {
                    return Err(ParseError {
                        span,
                        expected: format!(
                            "`{name}` is not defined (write `output {name} = <expression>` or define it first)"
                        ),
                        found: String::new(),
                    });
                }
            }
        };
        let budget = if c.keyword("budget") {
            let (_, v) = c.decimal("the error budget")?;
            if c.keyword("ulp") || c.keyword("ulps") {
                Some(Budget::Ulps(v))
            } else {
                Some(Budget::Absolute(v))
            }
        } else {
            None
        };
        c.end()?;
        self.b
            .output(&name, id, budget)
            .map_err(|e| model_error(span, &e))
    }

    fn node_error(span: Span, e: &ModelError) -> ParseError {
        model_error(span, e)
    }

    /// expr := sum (('<<' | '>>') integer)*
    fn expr(&mut self, c: &mut Cursor, depth: usize) -> Result<NodeId, ParseError> {
        let mut a = self.sum(c, depth)?;
        loop {
            let span = c.span();
            let sign = if c.eat("<<") {
                1
            } else if c.eat(">>") {
                -1
            } else {
                return Ok(a);
            };
            let k = c.integer("a shift count (0 to 256)")?;
            a = self
                .b
                .shift(a, sign * k)
                .map_err(|e| Self::node_error(span, &e))?;
            self.b.set_span(a, span);
        }
    }

    /// sum := product (('+' | '-') product)*
    fn sum(&mut self, c: &mut Cursor, depth: usize) -> Result<NodeId, ParseError> {
        let mut a = self.product(c, depth)?;
        loop {
            c.skip_ws();
            let span = c.span();
            let r = if c.eat("+") {
                let b = self.product(c, depth)?;
                self.b.add(a, b)
            } else if c.peek() == Some('-') {
                c.pos += 1;
                let b = self.product(c, depth)?;
                self.b.sub(a, b)
            } else {
                return Ok(a);
            };
            a = r.map_err(|e| Self::node_error(span, &e))?;
            self.b.set_span(a, span);
        }
    }

    /// product := unary ('*' unary)*
    fn product(&mut self, c: &mut Cursor, depth: usize) -> Result<NodeId, ParseError> {
        let mut a = self.unary(c, depth)?;
        loop {
            c.skip_ws();
            let span = c.span();
            if !c.eat("*") {
                return Ok(a);
            }
            let b = self.unary(c, depth)?;
            a = self.b.mul(a, b).map_err(|e| Self::node_error(span, &e))?;
            self.b.set_span(a, span);
        }
    }

    /// unary := '-' unary | primary
    fn unary(&mut self, c: &mut Cursor, depth: usize) -> Result<NodeId, ParseError> {
        if depth > MAX_DEPTH {
            return Err(c.error(format!("at most {MAX_DEPTH} nested parentheses or signs")));
        }
        c.skip_ws();
        let span = c.span();
        if c.peek() == Some('-') {
            c.pos += 1;
            let a = self.unary(c, depth + 1)?;
            let n = self.b.neg(a).map_err(|e| Self::node_error(span, &e))?;
            self.b.set_span(n, span);
            return Ok(n);
        }
        self.primary(c, depth)
    }

    /// primary := name | '(' expr ')' | 'rescale' '(' expr ',' format ','
    /// rounding ',' overflow ')'
    fn primary(&mut self, c: &mut Cursor, depth: usize) -> Result<NodeId, ParseError> {
        c.skip_ws();
        if c.eat("(") {
            let a = self.expr(c, depth + 1)?;
            c.expect(")")?;
            return Ok(a);
        }
        let save = c.pos;
        let Some((span, name)) = c.ident() else {
            let mut e = c.error("a name, `(`, `-` or `rescale(`");
            if c.peek().is_some_and(|ch| ch.is_ascii_digit() || ch == '.') {
                e.expected
                    .push_str(" (numbers are declared with `const NAME = VALUE : FORMAT`)");
            }
            return Err(e);
        };
        if name == "rescale" {
            c.expect("(")?;
            let a = self.expr(c, depth + 1)?;
            c.expect(",")?;
            let f = c.format()?;
            c.expect(",")?;
            let r = c.rounding()?;
            c.expect(",")?;
            let o = c.overflow()?;
            c.expect(")")?;
            let id = self
                .b
                .rescale(a, f, r, o)
                .map_err(|e| Self::node_error(span, &e))?;
            self.b.set_span(id, span);
            return Ok(id);
        }
        match self.names.get(&name) {
            Some(&id) => Ok(id),
            None => {
                c.pos = save;
                Err(ParseError {
                    span,
                    expected: format!(
                        "`{name}` is not defined (define it with `input`, `const` or `let` on an earlier line)"
                    ),
                    found: String::new(),
                })
            }
        }
    }
}
