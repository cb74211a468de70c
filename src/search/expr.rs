//! The cut expression language: parser and evaluator.
//!
//! Grammar (whitespace is free; `and` is a keyword):
//!
//! ```text
//! cut        := comparison ( "and" comparison )*
//! comparison := sum ( op sum )+          chained: 250 <= met < 300
//! op         := "<" | "<=" | ">" | ">=" | "==" | "!="
//! sum        := product ( ("+" | "-") product )*
//! product    := unary ( ("*" | "/") unary )*
//! unary      := "-" unary | atom
//! atom       := number | observable | "(" sum ")"
//! observable := name [ "." attribute ] [ "(" integer ")" ]
//! ```
//!
//! A chained comparison `a op1 b op2 c` means `a op1 b and b op2 c`.
//! Observables come from [`super::observables`]; a comparison involving a
//! missing quantity (NaN) is false.

use super::observables::Observable;

/// A parse error: the message and the 0-based character position in the
/// cut text.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ExprError {
    /// Character position (0-based) of the offending token.
    pub position: usize,
    /// What is wrong.
    pub message: String,
}

impl ExprError {
    /// The message with the cut text and a caret under the position.
    pub fn render(&self, text: &str) -> String {
        format!(
            "{} at character {} of cut \"{text}\"\n    {text}\n    {}^",
            self.message,
            self.position + 1,
            " ".repeat(self.position)
        )
    }
}

/// Comparison operators.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CmpOp {
    /// `<`
    Lt,
    /// `<=`
    Le,
    /// `>`
    Gt,
    /// `>=`
    Ge,
    /// `==`
    Eq,
    /// `!=`
    Ne,
}

impl CmpOp {
    #[inline]
    fn apply(self, a: f64, b: f64) -> bool {
        if a.is_nan() || b.is_nan() {
            return false;
        }
        match self {
            CmpOp::Lt => a < b,
            CmpOp::Le => a <= b,
            CmpOp::Gt => a > b,
            CmpOp::Ge => a >= b,
            CmpOp::Eq => a == b,
            CmpOp::Ne => a != b,
        }
    }
}

/// Arithmetic expression; observables refer to slots of a value table
/// filled once per event.
#[derive(Debug, Clone, PartialEq)]
pub enum Expr {
    /// A number.
    Number(f64),
    /// The value in slot `i` of the event's table.
    Slot(usize),
    /// −x
    Neg(Box<Expr>),
    /// a + b, a − b, a × b, a / b
    Binary(char, Box<Expr>, Box<Expr>),
}

impl Expr {
    /// The value on the event's table. The leaves (a number, a slot: the
    /// operands of nearly every cut) are settled in place; only compound
    /// expressions take the call.
    #[inline(always)]
    fn eval(&self, values: &[f64]) -> f64 {
        match self {
            Expr::Number(x) => *x,
            Expr::Slot(i) => values.get(*i).copied().unwrap_or(f64::NAN),
            Expr::Neg(_) | Expr::Binary(..) => self.eval_compound(values),
        }
    }

    #[inline(never)]
    fn eval_compound(&self, values: &[f64]) -> f64 {
        match self {
            Expr::Neg(a) => -a.eval(values),
            Expr::Binary(op, a, b) => {
                let (a, b) = (a.eval(values), b.eval(values));
                match op {
                    '+' => a + b,
                    '-' => a - b,
                    '*' => a * b,
                    _ => a / b,
                }
            }
            Expr::Number(_) | Expr::Slot(_) => self.eval(values),
        }
    }

    fn has_slot(&self) -> bool {
        match self {
            Expr::Number(_) => false,
            Expr::Slot(_) => true,
            Expr::Neg(a) => a.has_slot(),
            Expr::Binary(_, a, b) => a.has_slot() || b.has_slot(),
        }
    }
}

/// One chained comparison.
#[derive(Debug, Clone, PartialEq)]
pub struct Comparison {
    operands: Vec<Expr>,
    ops: Vec<CmpOp>,
}

/// A parsed cut: a conjunction of comparisons, with its source text.
#[derive(Debug, Clone, PartialEq)]
pub struct Cut {
    text: String,
    terms: Vec<Comparison>,
}

/// Assigns each distinct observable a slot in the per-event value table.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct SlotTable {
    observables: Vec<Observable>,
}

impl SlotTable {
    /// Slot of `obs`, added when new.
    pub fn slot(&mut self, obs: Observable) -> usize {
        if let Some(i) = self.observables.iter().position(|o| *o == obs) {
            return i;
        }
        self.observables.push(obs);
        self.observables.len() - 1
    }

    /// Observables by slot.
    pub fn observables(&self) -> &[Observable] {
        &self.observables
    }
}

impl Cut {
    /// Parses `text`, registering its observables in `slots`.
    pub fn parse(text: &str, slots: &mut SlotTable) -> Result<Cut, ExprError> {
        let tokens = lex(text)?;
        let mut p = Parser {
            tokens,
            pos: 0,
            slots,
            end: text.chars().count(),
        };
        let mut terms = vec![p.comparison()?];
        while p.eat(&Tok::And) {
            terms.push(p.comparison()?);
        }
        if let Some((tok, at)) = p.tokens.get(p.pos) {
            let hint = match tok {
                Tok::Ident(u) if ["GeV", "TeV", "MeV", "rad", "gev"].contains(&u.as_str()) => {
                    "; units are implied (GeV, rad): write the number alone"
                }
                Tok::Ident(o) if o == "or" => "; only \"and\" combines comparisons",
                _ => "",
            };
            return Err(ExprError {
                position: *at,
                message: format!("unexpected {}{hint}", tok.describe()),
            });
        }
        Ok(Cut {
            text: text.trim().to_string(),
            terms,
        })
    }

    /// The cut as written.
    pub fn text(&self) -> &str {
        &self.text
    }

    /// True when the event (its value table) passes.
    pub fn passes(&self, values: &[f64]) -> bool {
        self.terms.iter().all(|c| {
            let mut left = c.operands[0].eval(values);
            c.ops.iter().zip(&c.operands[1..]).all(|(op, e)| {
                let right = e.eval(values);
                let ok = op.apply(left, right);
                left = right;
                ok
            })
        })
    }

    /// The interval [low, high] an observable in `slot` is restricted to by
    /// comparisons of the bare observable with a number (`met > 250`,
    /// `250 <= met < 300`); `None` on a side without such a bound.
    pub fn bounds_on(&self, slot: usize) -> (Option<f64>, Option<f64>) {
        let mut low: Option<f64> = None;
        let mut high: Option<f64> = None;
        for c in &self.terms {
            for (i, op) in c.ops.iter().enumerate() {
                let (a, b) = (&c.operands[i], &c.operands[i + 1]);
                let (value, op) = match (a, b) {
                    (Expr::Slot(s), Expr::Number(x)) if *s == slot => (*x, *op),
                    (Expr::Number(x), Expr::Slot(s)) if *s == slot => (*x, flip(*op)),
                    _ => continue,
                };
                match op {
                    CmpOp::Gt | CmpOp::Ge => low = Some(low.map_or(value, |l| l.max(value))),
                    CmpOp::Lt | CmpOp::Le => high = Some(high.map_or(value, |h| h.min(value))),
                    CmpOp::Eq => {
                        low = Some(low.map_or(value, |l| l.max(value)));
                        high = Some(high.map_or(value, |h| h.min(value)));
                    }
                    CmpOp::Ne => {}
                }
            }
        }
        (low, high)
    }
}

/// The operator seen from the other side (`a < b` ⇔ `b > a`).
fn flip(op: CmpOp) -> CmpOp {
    match op {
        CmpOp::Lt => CmpOp::Gt,
        CmpOp::Le => CmpOp::Ge,
        CmpOp::Gt => CmpOp::Lt,
        CmpOp::Ge => CmpOp::Le,
        other => other,
    }
}

#[derive(Debug, Clone, PartialEq)]
enum Tok {
    Number(f64),
    Ident(String),
    Cmp(CmpOp),
    Arith(char),
    LParen,
    RParen,
    Dot,
    And,
}

impl Tok {
    fn describe(&self) -> String {
        match self {
            Tok::Number(x) => format!("number {x}"),
            Tok::Ident(s) => format!("name \"{s}\""),
            Tok::Cmp(op) => format!("comparison \"{}\"", cmp_text(*op)),
            Tok::Arith(c) => format!("\"{c}\""),
            Tok::LParen => "\"(\"".into(),
            Tok::RParen => "\")\"".into(),
            Tok::Dot => "\".\"".into(),
            Tok::And => "\"and\"".into(),
        }
    }
}

fn cmp_text(op: CmpOp) -> &'static str {
    match op {
        CmpOp::Lt => "<",
        CmpOp::Le => "<=",
        CmpOp::Gt => ">",
        CmpOp::Ge => ">=",
        CmpOp::Eq => "==",
        CmpOp::Ne => "!=",
    }
}

fn lex(text: &str) -> Result<Vec<(Tok, usize)>, ExprError> {
    let chars: Vec<char> = text.chars().collect();
    let mut out = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        let c = chars[i];
        let start = i;
        if c.is_whitespace() {
            i += 1;
            continue;
        }
        if c.is_ascii_digit() || (c == '.' && chars.get(i + 1).is_some_and(char::is_ascii_digit)) {
            while i < chars.len() && (chars[i].is_ascii_digit() || chars[i] == '.') {
                i += 1;
            }
            if i < chars.len() && (chars[i] == 'e' || chars[i] == 'E') {
                let mut j = i + 1;
                if j < chars.len() && (chars[j] == '+' || chars[j] == '-') {
                    j += 1;
                }
                if j < chars.len() && chars[j].is_ascii_digit() {
                    i = j;
                    while i < chars.len() && chars[i].is_ascii_digit() {
                        i += 1;
                    }
                }
            }
            let s: String = chars[start..i].iter().collect();
            let x: f64 = s.parse().map_err(|_| ExprError {
                position: start,
                message: format!("malformed number \"{s}\""),
            })?;
            if i < chars.len() && (chars[i].is_alphabetic() || chars[i] == '_') {
                return Err(ExprError {
                    position: i,
                    message: format!(
                        "a number must not run into a name (\"{s}{}…\"); units are implied (GeV, rad)",
                        chars[i]
                    ),
                });
            }
            out.push((Tok::Number(x), start));
            continue;
        }
        if c.is_ascii_alphabetic() || c == '_' {
            while i < chars.len() && (chars[i].is_ascii_alphanumeric() || chars[i] == '_') {
                i += 1;
            }
            let s: String = chars[start..i].iter().collect();
            out.push((if s == "and" { Tok::And } else { Tok::Ident(s) }, start));
            continue;
        }
        let next = chars.get(i + 1).copied();
        let (tok, len) = match (c, next) {
            ('<', Some('=')) => (Tok::Cmp(CmpOp::Le), 2),
            ('>', Some('=')) => (Tok::Cmp(CmpOp::Ge), 2),
            ('=', Some('=')) => (Tok::Cmp(CmpOp::Eq), 2),
            ('!', Some('=')) => (Tok::Cmp(CmpOp::Ne), 2),
            ('<', _) => (Tok::Cmp(CmpOp::Lt), 1),
            ('>', _) => (Tok::Cmp(CmpOp::Gt), 1),
            ('+' | '-' | '*' | '/', _) => (Tok::Arith(c), 1),
            ('(', _) => (Tok::LParen, 1),
            (')', _) => (Tok::RParen, 1),
            ('.', _) => (Tok::Dot, 1),
            ('=', _) => {
                return Err(ExprError {
                    position: i,
                    message: "single \"=\": write \"==\" to compare".into(),
                });
            }
            ('&', Some('&')) => {
                return Err(ExprError {
                    position: i,
                    message: "write \"and\" to combine comparisons".into(),
                });
            }
            _ => {
                return Err(ExprError {
                    position: i,
                    message: format!("unexpected character '{c}'"),
                });
            }
        };
        out.push((tok, start));
        i += len;
    }
    Ok(out)
}

struct Parser<'s> {
    tokens: Vec<(Tok, usize)>,
    pos: usize,
    slots: &'s mut SlotTable,
    end: usize,
}

impl Parser<'_> {
    fn peek(&self) -> Option<&Tok> {
        self.tokens.get(self.pos).map(|(t, _)| t)
    }

    fn at(&self) -> usize {
        self.tokens.get(self.pos).map_or(self.end, |(_, p)| *p)
    }

    fn eat(&mut self, tok: &Tok) -> bool {
        if self.peek() == Some(tok) {
            self.pos += 1;
            true
        } else {
            false
        }
    }

    fn found(&self) -> String {
        self.peek()
            .map_or_else(|| "the end of the cut".to_string(), Tok::describe)
    }

    fn comparison(&mut self) -> Result<Comparison, ExprError> {
        let start = self.at();
        let mut operands = vec![self.sum()?];
        let mut ops = Vec::new();
        while let Some(Tok::Cmp(op)) = self.peek() {
            ops.push(*op);
            self.pos += 1;
            operands.push(self.sum()?);
        }
        if ops.is_empty() {
            return Err(ExprError {
                position: self.at(),
                message: format!(
                    "expected a comparison (<, <=, >, >=, ==, !=), found {}",
                    self.found()
                ),
            });
        }
        if !operands.iter().any(Expr::has_slot) {
            return Err(ExprError {
                position: start,
                message: "comparison of numbers only; a cut must involve an observable".into(),
            });
        }
        Ok(Comparison { operands, ops })
    }

    fn sum(&mut self) -> Result<Expr, ExprError> {
        let mut e = self.product()?;
        while let Some(Tok::Arith(c @ ('+' | '-'))) = self.peek() {
            let c = *c;
            self.pos += 1;
            e = Expr::Binary(c, Box::new(e), Box::new(self.product()?));
        }
        Ok(e)
    }

    fn product(&mut self) -> Result<Expr, ExprError> {
        let mut e = self.unary()?;
        while let Some(Tok::Arith(c @ ('*' | '/'))) = self.peek() {
            let c = *c;
            self.pos += 1;
            e = Expr::Binary(c, Box::new(e), Box::new(self.unary()?));
        }
        Ok(e)
    }

    fn unary(&mut self) -> Result<Expr, ExprError> {
        if self.eat(&Tok::Arith('-')) {
            return Ok(Expr::Neg(Box::new(self.unary()?)));
        }
        self.atom()
    }

    fn atom(&mut self) -> Result<Expr, ExprError> {
        let at = self.at();
        match self.peek().cloned() {
            Some(Tok::Number(x)) => {
                self.pos += 1;
                Ok(Expr::Number(x))
            }
            Some(Tok::LParen) => {
                self.pos += 1;
                let e = self.sum()?;
                if !self.eat(&Tok::RParen) {
                    return Err(ExprError {
                        position: self.at(),
                        message: format!("expected \")\", found {}", self.found()),
                    });
                }
                Ok(e)
            }
            Some(Tok::Ident(name)) => {
                self.pos += 1;
                let mut attribute = None;
                if self.eat(&Tok::Dot) {
                    match self.peek().cloned() {
                        Some(Tok::Ident(a)) => {
                            self.pos += 1;
                            attribute = Some(a);
                        }
                        _ => {
                            return Err(ExprError {
                                position: self.at(),
                                message: format!(
                                    "expected an attribute (pt, eta, abs_eta, phi) after \"{name}.\", found {}",
                                    self.found()
                                ),
                            });
                        }
                    }
                }
                let mut argument = None;
                if self.peek() == Some(&Tok::LParen) {
                    self.pos += 1;
                    let arg_at = self.at();
                    match self.peek().cloned() {
                        Some(Tok::Number(x)) if x.fract() == 0.0 && (0.0..1e15).contains(&x) => {
                            self.pos += 1;
                            // invariant: x is a non-negative integer below 1e15.
                            argument = Some(x as u64);
                        }
                        _ => {
                            return Err(ExprError {
                                position: arg_at,
                                message: format!(
                                    "expected a non-negative integer argument, found {}",
                                    self.found()
                                ),
                            });
                        }
                    }
                    if !self.eat(&Tok::RParen) {
                        return Err(ExprError {
                            position: self.at(),
                            message: format!("expected \")\", found {}", self.found()),
                        });
                    }
                }
                let obs = Observable::resolve(&name, attribute.as_deref(), argument).map_err(
                    |message| ExprError {
                        position: at,
                        message,
                    },
                )?;
                Ok(Expr::Slot(self.slots.slot(obs)))
            }
            _ => Err(ExprError {
                position: at,
                message: format!(
                    "expected a number, an observable or \"(\", found {}",
                    self.found()
                ),
            }),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str) -> Result<(Cut, SlotTable), ExprError> {
        let mut slots = SlotTable::default();
        Cut::parse(text, &mut slots).map(|c| (c, slots))
    }

    #[test]
    fn chained_range_and_arithmetic() {
        let (cut, slots) = parse("250 <= met < 300 and n_electrons + n_muons == 0").unwrap();
        assert_eq!(slots.observables().len(), 3);
        // Slots: met, n_electrons, n_muons.
        assert!(cut.passes(&[250.0, 0.0, 0.0]));
        assert!(!cut.passes(&[300.0, 0.0, 0.0]));
        assert!(!cut.passes(&[270.0, 1.0, 0.0]));
        assert!(!cut.passes(&[f64::NAN, 0.0, 0.0]));
        assert_eq!(cut.bounds_on(0), (Some(250.0), Some(300.0)));
    }

    #[test]
    fn precedence_and_sign() {
        let (cut, _) = parse("-met + 2 * ht / 4 > -(1)").unwrap();
        // −100 + 2·300/4 = 50 > −1.
        assert!(cut.passes(&[100.0, 300.0]));
        // −100 + 2·100/4 = −50.
        assert!(!cut.passes(&[100.0, 100.0]));
    }

    #[test]
    fn errors_point_at_the_character() {
        let cases = [
            ("met >> 250", 5),
            ("met > ", 6),
            ("mett > 250", 0),
            ("jet1.pt > 250GeV", 13),
            ("met = 250", 4),
            ("met > 250 && n_jets < 4", 10),
            ("met > 250 or ht > 3", 10),
            ("met > 250 GeV", 10),
            ("jet1. > 3", 6),
            ("min_dphi_jets_met(x) > 0.4", 18),
            ("1 < 2", 0),
            ("met", 3),
            ("(met > 3", 5),
        ];
        for (text, position) in cases {
            let err = parse(text).unwrap_err();
            assert_eq!(err.position, position, "{text}: {}", err.render(text));
        }
        let err = parse("met > 250 GeV").unwrap_err();
        assert!(err.message.contains("units are implied"), "{}", err.message);
    }
}
