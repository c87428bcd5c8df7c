//! A small reader for the JSON lines this crate writes, so that resumed
//! runs, merges and summaries can read records back without a JSON
//! dependency. It accepts the JSON grammar of RFC 8259 (objects, arrays,
//! strings with escapes, numbers, true/false/null) and keeps numbers as
//! their source text.

/// A parsed JSON value.
#[derive(Clone, Debug, PartialEq)]
pub enum Json {
    /// `null`.
    Null,
    /// `true` or `false`.
    Bool(bool),
    /// A number, as written.
    Number(String),
    /// A string, unescaped.
    String(String),
    /// An array.
    Array(Vec<Json>),
    /// An object, keys in source order.
    Object(Vec<(String, Json)>),
}

impl Json {
    /// Parses one complete JSON text (surrounding white space allowed);
    /// `None` if it is not valid JSON or has trailing characters.
    ///
    /// Example: `Json::parse("{\"a\":[1,null]}")` is an object whose key
    /// `a` holds the array `[1, null]`.
    pub fn parse(text: &str) -> Option<Json> {
        let mut p = Parser {
            s: text.as_bytes(),
            i: 0,
            depth: 0,
        };
        let v = p.value()?;
        p.ws();
        if p.i == p.s.len() {
            Some(v)
        } else {
            None
        }
    }

    /// The value under `key` if this is an object that has it.
    pub fn get(&self, key: &str) -> Option<&Json> {
        match self {
            Json::Object(kv) => kv.iter().find(|(k, _)| k == key).map(|(_, v)| v),
            _ => None,
        }
    }

    /// The value as a non-negative integer, if it is one.
    pub fn as_u64(&self) -> Option<u64> {
        match self {
            Json::Number(s) => s.parse().ok(),
            _ => None,
        }
    }

    /// The value as a string slice, if it is a string.
    pub fn as_str(&self) -> Option<&str> {
        match self {
            Json::String(s) => Some(s),
            _ => None,
        }
    }

    /// The elements, if this is an array.
    pub fn as_array(&self) -> Option<&[Json]> {
        match self {
            Json::Array(v) => Some(v),
            _ => None,
        }
    }

    /// True for `null`.
    pub fn is_null(&self) -> bool {
        matches!(self, Json::Null)
    }
}

/// Nesting deeper than this is rejected (the records nest four levels).
const MAX_DEPTH: usize = 64;

struct Parser<'a> {
    s: &'a [u8],
    i: usize,
    depth: usize,
}

impl Parser<'_> {
    fn ws(&mut self) {
        while let Some(b' ' | b'\t' | b'\n' | b'\r') = self.s.get(self.i) {
            self.i += 1;
        }
    }

    fn eat(&mut self, lit: &[u8]) -> Option<()> {
        if self.s.get(self.i..self.i + lit.len())? == lit {
            self.i += lit.len();
            Some(())
        } else {
            None
        }
    }

    fn value(&mut self) -> Option<Json> {
        self.ws();
        match *self.s.get(self.i)? {
            b'n' => self.eat(b"null").map(|_| Json::Null),
            b't' => self.eat(b"true").map(|_| Json::Bool(true)),
            b'f' => self.eat(b"false").map(|_| Json::Bool(false)),
            b'"' => self.string().map(Json::String),
            b'[' => self.nested(|p| p.array()),
            b'{' => self.nested(|p| p.object()),
            _ => self.number(),
        }
    }

    fn nested(&mut self, f: impl FnOnce(&mut Self) -> Option<Json>) -> Option<Json> {
        self.depth += 1;
        if self.depth > MAX_DEPTH {
            return None;
        }
        let v = f(self);
        self.depth -= 1;
        v
    }

    fn array(&mut self) -> Option<Json> {
        self.eat(b"[")?;
        let mut out = Vec::new();
        self.ws();
        if self.eat(b"]").is_some() {
            return Some(Json::Array(out));
        }
        loop {
            out.push(self.value()?);
            self.ws();
            if self.eat(b",").is_some() {
                continue;
            }
            self.eat(b"]")?;
            return Some(Json::Array(out));
        }
    }

    fn object(&mut self) -> Option<Json> {
        self.eat(b"{")?;
        let mut out = Vec::new();
        self.ws();
        if self.eat(b"}").is_some() {
            return Some(Json::Object(out));
        }
        loop {
            self.ws();
            let k = self.string()?;
            self.ws();
            self.eat(b":")?;
            let v = self.value()?;
            out.push((k, v));
            self.ws();
            if self.eat(b",").is_some() {
                continue;
            }
            self.eat(b"}")?;
            return Some(Json::Object(out));
        }
    }

    fn number(&mut self) -> Option<Json> {
        let start = self.i;
        if self.s.get(self.i) == Some(&b'-') {
            self.i += 1;
        }
        let digits = |p: &mut Self| {
            let st = p.i;
            while p.s.get(p.i).is_some_and(u8::is_ascii_digit) {
                p.i += 1;
            }
            p.i > st
        };
        if !digits(self) {
            return None;
        }
        if self.s.get(self.i) == Some(&b'.') {
            self.i += 1;
            if !digits(self) {
                return None;
            }
        }
        if let Some(b'e' | b'E') = self.s.get(self.i) {
            self.i += 1;
            if let Some(b'+' | b'-') = self.s.get(self.i) {
                self.i += 1;
            }
            if !digits(self) {
                return None;
            }
        }
        let text = std::str::from_utf8(&self.s[start..self.i]).ok()?;
        Some(Json::Number(text.to_string()))
    }

    fn hex4(&mut self) -> Option<u32> {
        let h = std::str::from_utf8(self.s.get(self.i..self.i + 4)?).ok()?;
        let v = u32::from_str_radix(h, 16).ok()?;
        self.i += 4;
        Some(v)
    }

    fn string(&mut self) -> Option<String> {
        self.eat(b"\"")?;
        let mut out: Vec<u8> = Vec::new();
        loop {
            let b = *self.s.get(self.i)?;
            self.i += 1;
            match b {
                b'"' => return String::from_utf8(out).ok(),
                b'\\' => {
                    let e = *self.s.get(self.i)?;
                    self.i += 1;
                    let c: char = match e {
                        b'"' => '"',
                        b'\\' => '\\',
                        b'/' => '/',
                        b'b' => '\u{8}',
                        b'f' => '\u{c}',
                        b'n' => '\n',
                        b'r' => '\r',
                        b't' => '\t',
                        b'u' => {
                            let hi = self.hex4()?;
                            if (0xD800..0xDC00).contains(&hi) {
                                self.eat(b"\\u")?;
                                let lo = self.hex4()?;
                                if !(0xDC00..0xE000).contains(&lo) {
                                    return None;
                                }
                                char::from_u32(0x10000 + ((hi - 0xD800) << 10) + (lo - 0xDC00))?
                            } else {
                                char::from_u32(hi)?
                            }
                        }
                        _ => return None,
                    };
                    let mut buf = [0u8; 4];
                    out.extend_from_slice(c.encode_utf8(&mut buf).as_bytes());
                }
                0..=0x1f => return None,
                _ => out.push(b),
            }
        }
    }
}
