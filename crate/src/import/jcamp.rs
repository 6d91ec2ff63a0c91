//! JCAMP-DX spectra: a pure decoder from text to data blocks, and an encoder
//! of the compressed XYDATA forms (used by the round-trip tests).
//!
//! Standard followed: R. S. McDonald and P. A. Wilks, "JCAMP-DX: A Standard
//! Form for Exchange of Infrared Spectra in Computer Readable Form",
//! Appl. Spectrosc. 42, 151-162 (1988), JCAMP-DX version 4.24 (IUPAC).
//!
//! What the standard fixes and this file follows:
//! - A file is labelled data records `##LABEL= value`; a label's value runs
//!   on until the next `##` line. Labels compare with case, spaces, `-`, `/`
//!   and `_` ignored. `$$` starts a comment that runs to the end of the line.
//! - A block runs from `##TITLE=` to `##END=`; a block whose DATA TYPE is
//!   LINK holds several blocks between its own TITLE and END.
//! - `##XYDATA=(X++(Y..Y))`: each line is an abscissa (in units of XFACTOR)
//!   and ordinates (in units of YFACTOR) at equal X steps. Ordinates are
//!   written in AFFN (plain numbers), PAC (a sign separates numbers), or
//!   ASDF: SQZ (`@`, `A`-`I`, `a`-`i` stand for a signed first digit), DIF
//!   (`%`, `J`-`R`, `j`-`r`: a signed first digit of the difference to the
//!   previous ordinate) and DUP (`S`-`Z`, `s`: the previous value or
//!   difference occurs this many times in all), mixed freely on a line.
//! - DIF Y-check: a line that ends in DIF form is followed by a line that
//!   begins with the same ordinate again, in absolute form, at its abscissa.
//! - `##XYPOINTS=(XY..XY)`: X,Y pairs.
//!
//! Choices where the standard is silent or files stray from it:
//! - `?` (a missing ordinate) decodes to NaN; a DIF right after `?` is
//!   refused (it has nothing to add to). A missing X is refused.
//! - `E`/`e` is an exponent only on a line that reads wholly, and within
//!   range, as plain numbers with exponents, each separated by a space,
//!   comma or sign (`1 1.5E-3 2E2`); otherwise it is SQZ +5/-5 (`20E0E0` is
//!   X 20, Y 50, 50; `100E12` is X 100, Y 512; `180E00000000306` is X 180,
//!   Y 500000000306).
//! - SQZ and DIF values may carry a decimal fraction (`A1.5`); values are
//!   kept as f64, exact for integers up to 2^53.
//! - X placement: the data lines are trusted. Where FIRSTX, LASTX, DELTAX
//!   and NPOINTS agree with them (within half a step) the X values run
//!   evenly from FIRSTX to LASTX (the header is written to more digits than
//!   the line abscissas); where one disagrees a note says so and the data
//!   lines' own figures are used; where a line's abscissa is off the even
//!   grid, each line's abscissa places its own points.
//! - FIRSTY, MINY and MAXY are checked against the data (to one unit of the
//!   last digit the header writes, or one YFACTOR unit); disagreements are notes.
//! - `Block::labels` holds every record of the block, TITLE and XYDATA
//!   included, but not `##END=`.
//! - Limits: at most [`MAX_POINTS`] points in a file (NPOINTS and DUP counts
//!   above it are refused before anything is allocated for them).

use std::fmt;

/// The most points one file may decode to, all blocks together (the cap is in `limits`).
pub use crate::limits::MAX_POINTS;

/// One data block of a JCAMP-DX file.
#[derive(Debug, Clone, PartialEq)]
pub struct Block {
    pub title: String,
    /// Labelled data records as written (label normalised: upper case, spaces, '-', '/', '_' removed, e.g. "XUNITS", "DATATYPE"), value trimmed, in file order; `$$` comments stripped.
    pub labels: Vec<(String, String)>,
    /// XUNITS as the file writes it, trimmed (e.g. "NANOMETERS", "1/CM").
    pub x_units: Option<String>,
    /// YUNITS likewise.
    pub y_units: Option<String>,
    /// Abscissas, after XFACTOR.
    pub x: Vec<f64>,
    /// Ordinates, after YFACTOR; NaN where the file writes `?`.
    pub y: Vec<f64>,
    /// Things the reader noticed and worked around, worded for a user, with line numbers where they apply.
    pub notes: Vec<String>,
}

/// Why a file could not be read: the line (counted from 1) and what was expected there.
#[derive(Debug, Clone, PartialEq)]
pub struct JcampError {
    pub line: usize,
    pub message: String,
}

impl fmt::Display for JcampError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "line {}: {}", self.line, self.message)
    }
}

impl std::error::Error for JcampError {}

fn err<T>(line: usize, message: impl Into<String>) -> Result<T, JcampError> {
    Err(JcampError { line, message: message.into() })
}

/// Every data block in file order (a LINK file yields several; a simple file one).
/// Blocks with no XYDATA/XYPOINTS (e.g. the LINK header block) are not returned.
pub fn parse(text: &str) -> Result<Vec<Block>, JcampError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut reader = Reader::default();
    let mut last_line = 0;
    for (no, line) in Lines::new(text) {
        last_line = no;
        reader.line(no, line)?;
    }
    reader.finish(last_line.max(1))
}

/// Lines split at LF, CRLF or CR, numbered from 1.
struct Lines<'a> {
    rest: Option<&'a str>,
    no: usize,
}

impl<'a> Lines<'a> {
    fn new(text: &'a str) -> Self {
        Lines { rest: Some(text), no: 0 }
    }
}

impl<'a> Iterator for Lines<'a> {
    type Item = (usize, &'a str);
    fn next(&mut self) -> Option<Self::Item> {
        let rest = self.rest?;
        self.no += 1;
        match rest.find(['\r', '\n']) {
            None => {
                self.rest = None;
                // A final line end does not open an empty last line.
                if rest.is_empty() && self.no > 1 {
                    return None;
                }
                Some((self.no, rest))
            }
            Some(i) => {
                let skip = if rest[i..].starts_with("\r\n") { 2 } else { 1 };
                self.rest = Some(&rest[i + skip..]);
                Some((self.no, &rest[..i]))
            }
        }
    }
}

fn strip_comment(line: &str) -> &str {
    match line.find("$$") {
        Some(i) => &line[..i],
        None => line,
    }
}

/// Label as the standard compares them: case, spaces, '-', '/' and '_' ignored.
fn normalise_label(raw: &str) -> String {
    raw.chars().filter(|c| !(c.is_whitespace() || matches!(c, '-' | '/' | '_'))).map(|c| c.to_ascii_uppercase()).collect()
}

/// A short excerpt of user text for a message.
fn excerpt(s: &str) -> String {
    let cut: String = s.chars().take(24).collect();
    let more = if s.chars().count() > 24 { "..." } else { "" };
    format!("\"{}{}\"", cut.escape_debug(), more)
}

/// A number for a message: ten significant digits at most.
fn show(v: f64) -> String {
    if !v.is_finite() {
        return format!("{v}");
    }
    let rounded: f64 = format!("{v:.9e}").parse().unwrap_or(v);
    format!("{rounded}")
}

// ---------------------------------------------------------------------------
// Reading: blocks, labels, data sections.

#[derive(Default)]
struct Reader {
    open: Vec<Open>,
    out: Vec<Block>,
    /// Points decoded so far in the whole file (against MAX_POINTS).
    total_points: usize,
    /// An outermost block has closed (text after it is noted, not refused).
    closed_any: bool,
    file_notes: Vec<String>,
    scratch: Vec<f64>,
}

struct Open {
    start_line: usize,
    title: String,
    labels: Vec<Label>,
    section: Section,
    data: Option<Data>,
    /// Blocks closed inside this one (a LINK block), and their places in `out`.
    children: Vec<usize>,
    child_count: usize,
}

struct Label {
    line: usize,
    name: String,
    value: String,
}

enum Section {
    /// Text lines continue this label's value.
    Label(usize),
    Data,
    /// Between the blocks of a LINK block: text here belongs to no record.
    Between,
}

enum Data {
    Xy(XyData),
    Points(PointsData),
}

struct XyData {
    label_line: usize,
    lines: Vec<LineStart>,
    y: Vec<f64>,
    /// The last data line ended in DIF form, so the next must repeat its last ordinate.
    pending_check: Option<usize>,
}

/// A data line's abscissa (as written, before XFACTOR) and the index of its first ordinate.
struct LineStart {
    line: usize,
    x: f64,
    /// The unit of the last digit of the abscissa as written.
    unit: f64,
    first: usize,
}

struct PointsData {
    label_line: usize,
    first_line: usize,
    last_line: usize,
    x: Vec<f64>,
    y: Vec<f64>,
}

impl Open {
    fn new(line: usize, title: String) -> Self {
        Open {
            start_line: line,
            labels: vec![Label { line, name: "TITLE".into(), value: title.clone() }],
            title,
            section: Section::Label(0),
            data: None,
            children: Vec::new(),
            child_count: 0,
        }
    }

    fn is_link(&self) -> bool {
        self.labels.iter().any(|l| l.name == "DATATYPE" && l.value.to_ascii_uppercase().contains("LINK"))
            || self.labels.iter().any(|l| l.name == "BLOCKS")
    }
}

impl Reader {
    fn line(&mut self, no: usize, raw: &str) -> Result<(), JcampError> {
        let content = strip_comment(raw);
        let t = content.trim_matches(|c: char| c.is_whitespace() || c == '\u{1a}');
        if let Some(rest) = t.strip_prefix("##") {
            return self.label(no, rest);
        }
        if t.is_empty() {
            return Ok(());
        }
        let Some(open) = self.open.last_mut() else {
            if self.closed_any {
                self.file_notes.push(format!("line {no}: text after the last ##END= is ignored"));
                return Ok(());
            }
            return err(no, format!("expected ##TITLE= to begin a JCAMP-DX block, found {}", excerpt(t)));
        };
        match open.section {
            Section::Label(i) => {
                if let Some(label) = open.labels.get_mut(i) {
                    label.value.push('\n');
                    label.value.push_str(t);
                    if i == 0 {
                        open.title = label.value.clone();
                    }
                }
                Ok(())
            }
            Section::Data => {
                let budget = MAX_POINTS.saturating_sub(self.total_points);
                let added = match &mut open.data {
                    Some(Data::Xy(d)) => d.line(no, t, budget, &mut self.scratch)?,
                    Some(Data::Points(d)) => d.line(no, t, budget)?,
                    None => 0,
                };
                self.total_points += added;
                Ok(())
            }
            Section::Between => {
                self.file_notes.push(format!("line {no}: text between the blocks of a LINK block is ignored"));
                Ok(())
            }
        }
    }

    fn label(&mut self, no: usize, rest: &str) -> Result<(), JcampError> {
        let Some(eq) = rest.find('=') else {
            return err(no, format!("expected '=' after the label ##{}", excerpt(rest.trim())));
        };
        let name = normalise_label(&rest[..eq]);
        let value = rest[eq + 1..].trim().to_string();
        if name.is_empty() {
            return err(no, "expected a label name between ## and =");
        }
        match name.as_str() {
            "TITLE" => {
                if let Some(parent) = self.open.last() {
                    let nested_ok = self.open.len() == 1 && parent.is_link() && parent.data.is_none();
                    if !nested_ok {
                        return err(
                            no,
                            format!(
                                "##TITLE= while the block that begins at line {} is still open: expected ##END= before a new block (only a LINK block holds other blocks)",
                                parent.start_line
                            ),
                        );
                    }
                }
                if let Some(parent) = self.open.last_mut() {
                    parent.section = Section::Between;
                }
                self.open.push(Open::new(no, value));
                Ok(())
            }
            "END" => self.end(no),
            _ => {
                let Some(open) = self.open.last_mut() else {
                    return err(no, format!("##{}= outside a block: expected ##TITLE= to begin one", rest[..eq].trim()));
                };
                let form: String = value.chars().filter(|c| !c.is_whitespace()).collect::<String>().to_ascii_uppercase();
                let is_xy = name == "XYDATA";
                let is_points = name == "XYPOINTS";
                if is_xy || is_points {
                    if open.data.is_some() {
                        return err(
                            no,
                            format!(
                                "a second data table (##{name}=) in the block that begins at line {}: expected ##END= first",
                                open.start_line
                            ),
                        );
                    }
                    if is_xy && form != "(X++(Y..Y))" {
                        return err(no, format!("XYDATA form {} is not supported: expected (X++(Y..Y))", excerpt(&value)));
                    }
                    if is_points && form != "(XY..XY)" {
                        return err(no, format!("XYPOINTS form {} is not supported: expected (XY..XY)", excerpt(&value)));
                    }
                    open.data = Some(if is_xy {
                        Data::Xy(XyData { label_line: no, lines: Vec::new(), y: Vec::new(), pending_check: None })
                    } else {
                        Data::Points(PointsData { label_line: no, first_line: 0, last_line: no, x: Vec::new(), y: Vec::new() })
                    });
                    open.labels.push(Label { line: no, name, value });
                    open.section = Section::Data;
                    return Ok(());
                }
                open.labels.push(Label { line: no, name, value });
                open.section = Section::Label(open.labels.len() - 1);
                Ok(())
            }
        }
    }

    fn end(&mut self, no: usize) -> Result<(), JcampError> {
        let Some(open) = self.open.pop() else {
            self.file_notes.push(format!("line {no}: ##END= with no block open is ignored"));
            return Ok(());
        };
        let children = open.children.clone();
        let child_count = open.child_count;
        let link_blocks = open.labels.iter().find(|l| l.name == "BLOCKS").map(|l| (l.line, l.value.clone()));
        let block = finish_block(open, no)?;
        if let Some(parent) = self.open.last_mut() {
            parent.child_count += 1;
            if block.is_some() {
                parent.children.push(self.out.len());
            }
        } else {
            self.closed_any = true;
        }
        if let Some(b) = block {
            self.out.push(b);
        }
        // A LINK block closing: does it hold the number of blocks it announces?
        if let Some((line, value)) = link_blocks {
            let said = parse_number(&value, true).filter(|v| v.fract() == 0.0 && *v >= 0.0);
            if said != Some(child_count as f64) {
                let note = format!("line {line}: BLOCKS says {} but the LINK block holds {child_count} blocks", value.trim());
                for i in children {
                    if let Some(b) = self.out.get_mut(i) {
                        b.notes.push(note.clone());
                    }
                }
            }
        }
        Ok(())
    }

    fn finish(mut self, last_line: usize) -> Result<Vec<Block>, JcampError> {
        if let Some(open) = self.open.first() {
            let title = open.title.lines().next().unwrap_or("");
            return err(
                last_line,
                format!(
                    "the file ends inside the block that begins at line {} (##TITLE= {}): expected ##END=",
                    open.start_line,
                    excerpt(title)
                ),
            );
        }
        if self.out.is_empty() {
            return if self.closed_any {
                err(last_line, "the file has no ##XYDATA= or ##XYPOINTS= table: no spectrum to read")
            } else {
                err(1, "the file is empty: expected ##TITLE= to begin a JCAMP-DX block")
            };
        }
        if !self.file_notes.is_empty() {
            for b in &mut self.out {
                b.notes.extend(self.file_notes.iter().cloned());
            }
        }
        Ok(self.out)
    }
}

// ---------------------------------------------------------------------------
// Numbers.

/// A plain number (AFFN): sign, digits, point, digits, and with `exponent`
/// an E exponent. Starts at `s[i]`; returns the value and the end.
fn affn_at(s: &[u8], mut i: usize, exponent: bool, no: usize) -> Result<(f64, usize), JcampError> {
    let start = i;
    let negative = match s.get(i) {
        Some(b'-') => {
            i += 1;
            true
        }
        Some(b'+') => {
            i += 1;
            false
        }
        _ => false,
    };
    let int_start = i;
    while matches!(s.get(i), Some(b'0'..=b'9')) {
        i += 1;
    }
    let int_end = i;
    let mut digits = int_end - int_start;
    let mut fraction = false;
    if s.get(i) == Some(&b'.') {
        fraction = true;
        i += 1;
        let f = i;
        while matches!(s.get(i), Some(b'0'..=b'9')) {
            i += 1;
        }
        digits += i - f;
    }
    if digits == 0 {
        let what = String::from_utf8_lossy(&s[start..i.max(start + 1).min(s.len())]).into_owned();
        return err(no, format!("expected digits after {}", excerpt(&what)));
    }
    let mut exp = false;
    if exponent && matches!(s.get(i), Some(b'E' | b'e')) {
        let mut j = i + 1;
        if matches!(s.get(j), Some(b'+' | b'-')) {
            j += 1;
        }
        if matches!(s.get(j), Some(b'0'..=b'9')) {
            while matches!(s.get(j), Some(b'0'..=b'9')) {
                j += 1;
            }
            i = j;
            exp = true;
        }
    }
    // Fast path: short integers, the common case in compressed data.
    if !fraction && !exp && digits <= 15 {
        let v = digits_value(&s[int_start..int_end]);
        return Ok((if negative { -v } else { v }, i));
    }
    let v = std::str::from_utf8(&s[start..i]).ok().and_then(|t| t.parse::<f64>().ok());
    match v {
        Some(v) if v.is_finite() => Ok((v, i)),
        _ => err(no, format!("the number {} is out of range", excerpt(&String::from_utf8_lossy(&s[start..i])))),
    }
}

fn digits_value(d: &[u8]) -> f64 {
    let mut v: u64 = 0;
    for &c in d {
        v = v * 10 + u64::from(c - b'0');
    }
    v as f64
}

/// The digits after an ASDF character whose own digit is `first`: more
/// digits and, for values (not DUP counts), a decimal fraction.
fn asdf_digits(s: &[u8], mut i: usize, first: u8, fraction: bool, no: usize) -> Result<(f64, usize), JcampError> {
    let start = i;
    while matches!(s.get(i), Some(b'0'..=b'9')) {
        i += 1;
    }
    let int_end = i;
    if fraction && s.get(i) == Some(&b'.') {
        i += 1;
        while matches!(s.get(i), Some(b'0'..=b'9')) {
            i += 1;
        }
    }
    if i == int_end && int_end - start < 15 {
        let rest = digits_value(&s[start..int_end]);
        let scale = 10f64.powi((int_end - start) as i32);
        return Ok((f64::from(first) * scale + rest, i));
    }
    let mut text = String::with_capacity(i - start + 1);
    text.push(char::from(b'0' + first));
    text.push_str(std::str::from_utf8(&s[start..i]).unwrap_or("?"));
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok((v, i)),
        _ => err(no, format!("the number {} is out of range", excerpt(&text))),
    }
}

/// A header number: the whole trimmed value must be one plain number.
fn parse_number(value: &str, exponent: bool) -> Option<f64> {
    let s = value.trim().as_bytes();
    if s.is_empty() {
        return None;
    }
    match affn_at(s, 0, exponent, 0) {
        Ok((v, end)) if end == s.len() => Some(v),
        _ => None,
    }
}

/// The unit of the last digit a number is written to ("0.0604" -> 1e-4, "1e-005" -> 1e-5, "2500" -> 1).
fn written_precision(value: &str) -> f64 {
    let s = value.trim().as_bytes();
    let e = s.iter().position(|c| matches!(c, b'E' | b'e')).unwrap_or(s.len());
    let decimals = s[..e].iter().position(|&c| c == b'.').map_or(0, |p| e - p - 1);
    let exp = std::str::from_utf8(s.get(e + 1..).unwrap_or(&[])).ok().and_then(|t| t.parse::<i32>().ok()).unwrap_or(0);
    let decimals = i32::try_from(decimals).unwrap_or(i32::MAX);
    10f64.powi(exp.saturating_sub(decimals).clamp(-300, 300))
}

// ---------------------------------------------------------------------------
// XYDATA lines.

#[derive(Clone, Copy, PartialEq)]
enum Last {
    None,
    Abs(f64),
    Dif(f64),
    /// A DUP count; `true` when it repeated a difference.
    Dup(bool),
}

struct Scanned {
    x: f64,
    unit: f64,
    ends_in_dif: bool,
}

/// Decodes one XYDATA line into `out` (cleared first): the abscissa, and
/// every ordinate as written (the Y-check value included). With `exponent`
/// the line is read as plain numbers only, and `None` says it is not that.
fn scan_xy_line(s: &[u8], exponent: bool, no: usize, budget: usize, out: &mut Vec<f64>) -> Result<Option<Scanned>, JcampError> {
    out.clear();
    let mut i = 0;
    while matches!(s.get(i), Some(b' ' | b'\t')) {
        i += 1;
    }
    if !matches!(s.get(i), Some(b'+' | b'-' | b'.' | b'0'..=b'9')) {
        let found = String::from_utf8_lossy(&s[i..]).into_owned();
        return err(no, format!("expected the X value (a number) at the start of the data line, found {}", excerpt(&found)));
    }
    let (x, j) = affn_at(s, i, exponent, no)?;
    let unit = written_precision(std::str::from_utf8(&s[i..j]).unwrap_or(""));
    i = j;
    let mut last = Last::None;
    let mut current = f64::NAN;
    while let Some(&c) = s.get(i) {
        match c {
            b' ' | b'\t' | b',' => i += 1,
            b'?' => {
                current = f64::NAN;
                out.push(current);
                last = Last::Abs(current);
                i += 1;
            }
            b'+' | b'-' | b'.' | b'0'..=b'9' => {
                let (v, j) = affn_at(s, i, exponent, no)?;
                current = v;
                out.push(v);
                last = Last::Abs(v);
                i = j;
            }
            // Read as plain numbers, a letter means the line is ASDF after all.
            b'A'..=b'Z' | b'a'..=b'z' | b'@' | b'%' if exponent => return Ok(None),
            b'@' | b'A'..=b'I' | b'a'..=b'i' => {
                let (digit, negative) = match c {
                    b'@' => (0, false),
                    b'A'..=b'I' => (c - b'A' + 1, false),
                    _ => (c - b'a' + 1, true),
                };
                let (v, j) = asdf_digits(s, i + 1, digit, true, no)?;
                current = if negative { -v } else { v };
                out.push(current);
                last = Last::Abs(current);
                i = j;
            }
            b'%' | b'J'..=b'R' | b'j'..=b'r' => {
                let (digit, negative) = match c {
                    b'%' => (0, false),
                    b'J'..=b'R' => (c - b'J' + 1, false),
                    _ => (c - b'j' + 1, true),
                };
                let (v, j) = asdf_digits(s, i + 1, digit, true, no)?;
                let d = if negative { -v } else { v };
                if last == Last::None {
                    return err(
                        no,
                        format!(
                            "a DIF value ({}) with no value before it: a line must begin with an absolute Y value (SQZ, PAC or AFFN)",
                            excerpt(&String::from_utf8_lossy(&s[i..j]))
                        ),
                    );
                }
                if current.is_nan() {
                    return err(no, "a DIF value follows the missing value '?': there is no value to add the difference to");
                }
                current += d;
                if !current.is_finite() {
                    return err(no, "the DIF values add up to a number out of range");
                }
                out.push(current);
                last = Last::Dif(d);
                i = j;
            }
            b'S'..=b'Z' | b's' => {
                let digit = if c == b's' { 9 } else { c - b'S' + 1 };
                let (count, j) = asdf_digits(s, i + 1, digit, false, no)?;
                if count > MAX_POINTS as f64 {
                    return err(no, format!("DUP count {} is above the limit of {MAX_POINTS} points", show(count)));
                }
                let repeats = (count as usize).saturating_sub(1);
                if out.len().saturating_add(repeats) > budget {
                    return err(no, format!("the data would hold more than {MAX_POINTS} points: refused"));
                }
                match last {
                    Last::None => return err(no, "a DUP count with no value before it to repeat"),
                    Last::Dup(_) => return err(no, "two DUP counts in a row: expected a value between them"),
                    Last::Abs(v) => {
                        out.extend(std::iter::repeat_n(v, repeats));
                        last = Last::Dup(false);
                    }
                    Last::Dif(d) => {
                        out.reserve(repeats);
                        for _ in 0..repeats {
                            current += d;
                            out.push(current);
                        }
                        if !current.is_finite() {
                            return err(no, "the DIF values add up to a number out of range");
                        }
                        last = Last::Dup(true);
                    }
                }
                i = j;
            }
            _ => {
                let ch = std::str::from_utf8(&s[i..]).ok().and_then(|r| r.chars().next()).unwrap_or(char::REPLACEMENT_CHARACTER);
                return err(
                    no,
                    format!("unexpected character {ch:?} in XYDATA: expected a number or an ASDF character (@A-Ia-i SQZ, %J-Rj-r DIF, S-Zs DUP)"),
                );
            }
        }
    }
    if out.len() > budget {
        return err(no, format!("the data would hold more than {MAX_POINTS} points: refused"));
    }
    Ok(Some(Scanned { x, unit, ends_in_dif: matches!(last, Last::Dif(_) | Last::Dup(true)) }))
}

/// ASDF characters that cannot be part of a plain number with an exponent.
fn is_asdf_not_e(c: u8) -> bool {
    matches!(c, b'@' | b'%' | b'A'..=b'D' | b'F'..=b'Z' | b'a'..=b'd' | b'f'..=b's')
}

impl XyData {
    /// One data line; returns the number of new points.
    fn line(&mut self, no: usize, t: &str, budget: usize, scratch: &mut Vec<f64>) -> Result<usize, JcampError> {
        let s = t.as_bytes();
        // Exponents only on lines that read wholly as plain numbers: "20E0E0" is
        // X 20 and SQZ 50, 50, and "100E12" is X 100 and SQZ 512, not 1e14 alone.
        let plain = !s.iter().any(|&c| is_asdf_not_e(c));
        let as_plain = if plain { scan_xy_line(s, true, no, budget, scratch).ok().flatten() } else { None };
        let scanned = match as_plain {
            Some(scanned) if !scratch.is_empty() => scanned,
            _ => match scan_xy_line(s, false, no, budget, scratch)? {
                Some(scanned) => scanned,
                None => return err(no, "expected a number or an ASDF character"),
            },
        };
        if scratch.is_empty() {
            return err(no, "expected Y values after the X value");
        }
        let before = self.y.len();
        let first = match (self.pending_check, self.y.last(), scratch.first()) {
            (Some(prev_line), Some(&prev), Some(&here)) => {
                let same = (prev.is_nan() && here.is_nan()) || (prev - here).abs() <= 1e-9 * prev.abs().max(here.abs());
                if !same {
                    return err(
                        no,
                        format!(
                            "Y-check failed: the line begins with {} but line {prev_line} ends with {}; in DIF form each line must begin by repeating the last Y value of the line before",
                            show(here),
                            show(prev)
                        ),
                    );
                }
                self.y.extend_from_slice(&scratch[1..]);
                before - 1
            }
            _ => {
                self.y.extend_from_slice(scratch);
                before
            }
        };
        self.lines.push(LineStart { line: no, x: scanned.x, unit: scanned.unit, first });
        self.pending_check = if scanned.ends_in_dif { Some(no) } else { None };
        Ok(self.y.len() - before)
    }
}

impl PointsData {
    fn line(&mut self, no: usize, t: &str, budget: usize) -> Result<usize, JcampError> {
        let s = t.as_bytes();
        let mut values: Vec<f64> = Vec::new();
        let mut i = 0;
        while let Some(&c) = s.get(i) {
            match c {
                b' ' | b'\t' | b',' | b';' => i += 1,
                b'?' => {
                    values.push(f64::NAN);
                    i += 1;
                }
                b'+' | b'-' | b'.' | b'0'..=b'9' => {
                    let (v, j) = affn_at(s, i, true, no)?;
                    values.push(v);
                    i = j;
                }
                _ => {
                    let ch = t.get(i..).and_then(|r| r.chars().next()).unwrap_or(char::REPLACEMENT_CHARACTER);
                    return err(no, format!("unexpected character {ch:?} in XYPOINTS: expected numbers in X,Y pairs"));
                }
            }
        }
        if !values.len().is_multiple_of(2) {
            return err(no, "XYPOINTS expects X,Y pairs: this line has an X value without its Y");
        }
        let n = values.len() / 2;
        if n > budget {
            return err(no, format!("the data would hold more than {MAX_POINTS} points: refused"));
        }
        for pair in values.chunks_exact(2) {
            if pair[0].is_nan() {
                return err(no, "a missing X value '?' in XYPOINTS: every point needs its X");
            }
            self.x.push(pair[0]);
            self.y.push(pair[1]);
        }
        if self.x.len() == n {
            self.first_line = no;
        }
        self.last_line = no;
        Ok(n)
    }
}

// ---------------------------------------------------------------------------
// Closing a block: factors, X placement, header checks.

/// A header number that is checked against the data: (line, value, text as written).
type Given = Option<(usize, f64, String)>;

/// A header number looked up by label: (line, text, value if it is a number).
struct HeaderNumber {
    line: usize,
    text: String,
    value: Option<f64>,
}

fn header(labels: &[Label], name: &str) -> Result<Option<HeaderNumber>, JcampError> {
    let mut found: Option<HeaderNumber> = None;
    for l in labels.iter().filter(|l| l.name == name) {
        if let Some(first) = &found {
            return err(l.line, format!("{name} is given a second time in one block (first at line {})", first.line));
        }
        found = Some(HeaderNumber { line: l.line, text: l.value.trim().to_string(), value: parse_number(&l.value, true) });
    }
    Ok(found)
}

fn factor(labels: &[Label], name: &str) -> Result<(f64, usize), JcampError> {
    match header(labels, name)? {
        None => Ok((1.0, 0)),
        Some(h) => match h.value {
            Some(v) if v.is_finite() && v != 0.0 => Ok((v, h.line)),
            _ => err(h.line, format!("{name} must be a finite number other than 0, found {}", excerpt(&h.text))),
        },
    }
}

/// A header value that is only checked: a note if it is not a number.
fn checked(labels: &[Label], name: &str, notes: &mut Vec<String>) -> Result<Given, JcampError> {
    Ok(match header(labels, name)? {
        None => None,
        Some(HeaderNumber { line, text, value: Some(v) }) => Some((line, v, text)),
        Some(HeaderNumber { line, text, value: None }) => {
            notes.push(format!("line {line}: {name} is not a number ({}) and is ignored", excerpt(&text)));
            None
        }
    })
}

/// Values times a factor. A factor of 10^-k (XFACTOR=.1, YFACTOR=.0001)
/// divides by 10^k instead, which gives the decimal the file meant as the
/// nearest double (11663 * 0.0001 is 1.1663000000000001; 11663 / 1e4 is 1.1663).
fn scaled(values: &[f64], factor: f64) -> Vec<f64> {
    let k = -factor.log10();
    if factor > 0.0 && (1.0..=15.0).contains(&k.round()) && (k - k.round()).abs() < 1e-9 {
        let divisor = 10f64.powi(k.round() as i32);
        values.iter().map(|v| v / divisor).collect()
    } else {
        values.iter().map(|v| v * factor).collect()
    }
}

fn finish_block(open: Open, end_line: usize) -> Result<Option<Block>, JcampError> {
    let Open { title, labels, data, .. } = open;
    let mut notes = Vec::new();
    let (xf, _) = factor(&labels, "XFACTOR")?;
    let (yf, yf_line) = factor(&labels, "YFACTOR")?;
    let npoints = match header(&labels, "NPOINTS")? {
        None => None,
        Some(h) => match h.value {
            Some(v) if v > MAX_POINTS as f64 => {
                return err(h.line, format!("NPOINTS {} is above the limit of {MAX_POINTS} points", h.text))
            }
            Some(v) if v >= 0.0 && v.fract() == 0.0 => Some((h.line, v as usize)),
            _ => return err(h.line, format!("NPOINTS must be a whole number of points, found {}", excerpt(&h.text))),
        },
    };
    let first_x = checked(&labels, "FIRSTX", &mut notes)?;
    let last_x = checked(&labels, "LASTX", &mut notes)?;
    let delta_x = checked(&labels, "DELTAX", &mut notes)?;
    let first_y = checked(&labels, "FIRSTY", &mut notes)?;
    let min_y = checked(&labels, "MINY", &mut notes)?;
    let max_y = checked(&labels, "MAXY", &mut notes)?;

    let Some(data) = data else { return Ok(None) };
    let (x, raw_y) = match data {
        Data::Xy(d) => place_xydata(d, xf, npoints, first_x, last_x, delta_x, end_line, &mut notes)?,
        Data::Points(d) => {
            if d.x.is_empty() {
                return err(d.label_line, format!("XYPOINTS has no data lines before line {end_line}"));
            }
            let x: Vec<f64> = scaled(&d.x, xf);
            check_points_header(&x, d.first_line, d.last_line, npoints, first_x, last_x, &mut notes);
            (x, d.y)
        }
    };
    if x.iter().any(|v| !v.is_finite()) {
        return err(end_line, "after XFACTOR an X value is out of range");
    }
    let y: Vec<f64> = scaled(&raw_y, yf);
    if y.iter().any(|v| v.is_infinite()) {
        return err(yf_line.max(1), "after YFACTOR a Y value is out of range");
    }
    check_y_header(&y, yf, first_y, min_y, max_y, &mut notes);

    let text = |name: &str| labels.iter().find(|l| l.name == name).map(|l| l.value.trim().to_string()).filter(|v| !v.is_empty());
    Ok(Some(Block {
        x_units: text("XUNITS"),
        y_units: text("YUNITS"),
        title,
        labels: labels.into_iter().map(|l| (l.name, l.value)).collect(),
        x,
        y,
        notes,
    }))
}

/// X values for the ordinates of an XYDATA table, trusting the data lines
/// over the header (see the module notes), with a note for each disagreement.
#[allow(clippy::too_many_arguments)]
fn place_xydata(
    d: XyData,
    xf: f64,
    npoints: Option<(usize, usize)>,
    first_x: Given,
    last_x: Given,
    delta_x: Given,
    end_line: usize,
    notes: &mut Vec<String>,
) -> Result<(Vec<f64>, Vec<f64>), JcampError> {
    let n = d.y.len();
    let (Some(first_line), Some(last_line)) = (d.lines.first(), d.lines.last()) else {
        return err(d.label_line, format!("XYDATA has no data lines before line {end_line}"));
    };
    if let Some(line) = d.pending_check {
        notes.push(format!(
            "line {line}: the last data line ends in DIF form with no Y-check line after it, so its last values are not verified"
        ));
    }
    if let Some((line, said)) = npoints {
        if said != n {
            notes.push(format!("line {line}: NPOINTS says {said} but the data lines hold {n} points; the data lines are used"));
        }
    }
    let span = n.saturating_sub(1) as f64;
    // The coarsest digit in play: line abscissas (after XFACTOR) and the header's FIRSTX/LASTX.
    let line_unit = d.lines.iter().map(|l| l.unit).fold(0.0, f64::max) * xf.abs();
    let header_unit = [&first_x, &last_x].iter().filter_map(|g| g.as_ref().map(|(_, _, t)| written_precision(t))).fold(0.0, f64::max);
    let unit = line_unit.max(header_unit);
    let slop = |a: f64, b: f64| 1e-9 * a.abs().max(b.abs()).max(1.0);
    // Header and data name the same point when they agree to the digits written, and never a half step apart.
    let tol_for = |step: f64, a: f64, b: f64| if step == 0.0 { unit } else { (0.5 * step.abs()).min(unit) } + slop(a, b);
    let note_first = |x0: f64, notes: &mut Vec<String>, step: f64| match &first_x {
        Some((_, v, _)) if (v - x0).abs() <= tol_for(step, *v, x0) => *v,
        Some((line, _, text)) => {
            notes.push(format!(
                "line {line}: FIRSTX says {text} but the data begin at {} (line {}); the data lines are used",
                show(x0),
                first_line.line
            ));
            x0
        }
        None => x0,
    };
    let note_last = |xe: f64, notes: &mut Vec<String>, step: f64| match &last_x {
        Some((_, v, _)) if (v - xe).abs() <= tol_for(step, *v, xe) => *v,
        Some((line, _, text)) => {
            notes.push(format!(
                "line {line}: LASTX says {text} but the data end at {} (line {}); the data lines are used",
                show(xe),
                last_line.line
            ));
            xe
        }
        None => xe,
    };
    let even = |x0: f64, xe: f64| -> Vec<f64> {
        let step = if n > 1 { (xe - x0) / span } else { 0.0 };
        let mut x: Vec<f64> = (0..n).map(|i| x0 + i as f64 * step).collect();
        if let (Some(last), true) = (x.last_mut(), n > 1) {
            *last = xe;
        }
        x
    };

    // One line (or every line at one index): the step must come from the header.
    let Some(far) = d.lines.iter().rev().find(|l| l.first != first_line.first) else {
        let from_range = match (&first_x, &last_x, npoints) {
            (Some((_, a, _)), Some((_, b, _)), Some((_, m))) if m > 1 => Some((b - a) / (m - 1) as f64),
            _ => None,
        };
        let step =
            match (delta_x.as_ref().map(|g| g.1), from_range) {
                (Some(step), _) | (None, Some(step)) => step,
                (None, None) if n == 1 => 0.0,
                (None, None) => return err(
                    first_line.line,
                    "cannot place the X values: the data are on one line and the header gives neither DELTAX nor FIRSTX, LASTX and NPOINTS",
                ),
            };
        let x0 = note_first(first_line.x * xf - first_line.first as f64 * step, notes, step);
        let xe = note_last(x0 + span * step, notes, step);
        return Ok((even(x0, xe), d.y));
    };

    let s_g = (far.x - first_line.x) * xf / (far.first - first_line.first) as f64;
    if s_g == 0.0 || !s_g.is_finite() {
        return err(
            far.line,
            format!("the data lines do not advance in X (line {} and this line both start at {})", first_line.line, show(far.x)),
        );
    }
    let x0_data = first_line.x * xf - first_line.first as f64 * s_g;
    // Does every line start where the even steps from the first to the last line put it?
    let tol_line = (0.5 * s_g.abs()).min(2.0 * unit);
    let off: Vec<&LineStart> = d
        .lines
        .iter()
        .filter(|l| {
            let want = x0_data + l.first as f64 * s_g;
            (l.x * xf - want).abs() > tol_line + slop(want, l.x * xf)
        })
        .collect();

    if off.is_empty() {
        let x0 = note_first(x0_data, notes, s_g);
        let xe = note_last(last_line.x * xf + n.saturating_sub(1 + last_line.first) as f64 * s_g, notes, s_g);
        let step = (xe - x0) / span;
        if let Some((line, v, text)) = &delta_x {
            if (v - step).abs() * span > tol_for(step, *v, step) {
                notes.push(format!("line {line}: DELTAX says {text} but the data lines step by {}; the data lines are used", show(step)));
            }
        }
        return Ok((even(x0, xe), d.y));
    }

    // Uneven lines (a point lost or added): each line's abscissa places its own
    // points, at the typical step between lines (DELTAX where it is that step).
    let mut slopes: Vec<f64> = d
        .lines
        .windows(2)
        .filter(|w| w[1].first != w[0].first)
        .map(|w| (w[1].x - w[0].x) * xf / (w[1].first as f64 - w[0].first as f64))
        .filter(|v| v.is_finite())
        .collect();
    slopes.sort_by(f64::total_cmp);
    let median = slopes.get(slopes.len() / 2).copied().unwrap_or(s_g);
    let step = match &delta_x {
        Some((_, v, _)) if (v - median).abs() <= 0.05 * median.abs() => *v,
        Some((line, _, text)) => {
            notes.push(format!("line {line}: DELTAX says {text} but the data lines step by {}; the data lines are used", show(median)));
            median
        }
        None => median,
    };
    let first_off = off[0];
    let more = if off.len() > 1 { format!(" (and {} more lines)", off.len() - 1) } else { String::new() };
    notes.push(format!(
        "line {}: the line begins at X = {} but counting points from the start puts it at {}{more}; each line's X is used for its own points",
        first_off.line,
        show(first_off.x * xf),
        show(x0_data + first_off.first as f64 * s_g)
    ));
    let mut x = Vec::with_capacity(n);
    let mut k = 0;
    for i in 0..n {
        while d.lines.get(k + 1).is_some_and(|l| l.first <= i) {
            k += 1;
        }
        let anchor = d.lines.get(k).unwrap_or(first_line);
        x.push(anchor.x * xf + (i as f64 - anchor.first as f64) * step);
    }
    if let (Some(&a), Some(&b)) = (x.first(), x.last()) {
        note_first(a, notes, step);
        note_last(b, notes, step);
    }
    Ok((x, d.y))
}

fn check_points_header(
    x: &[f64],
    first_line: usize,
    last_line: usize,
    npoints: Option<(usize, usize)>,
    first_x: Given,
    last_x: Given,
    notes: &mut Vec<String>,
) {
    let n = x.len();
    if let Some((line, said)) = npoints {
        if said != n {
            notes.push(format!("line {line}: NPOINTS says {said} but the data lines hold {n} points; the data lines are used"));
        }
    }
    let (Some(&a), Some(&b)) = (x.first(), x.last()) else { return };
    let tol = if n > 1 { 0.5 * (b - a).abs() / (n - 1) as f64 } else { 1e-9 * a.abs().max(1.0) };
    if let Some((line, v, text)) = first_x {
        if (v - a).abs() > tol {
            notes.push(format!(
                "line {line}: FIRSTX says {text} but the data begin at {} (line {}); the data lines are used",
                show(a),
                first_line
            ));
        }
    }
    if let Some((line, v, text)) = last_x {
        if (v - b).abs() > tol {
            notes.push(format!(
                "line {line}: LASTX says {text} but the data end at {} (line {last_line}); the data lines are used",
                show(b)
            ));
        }
    }
}

fn check_y_header(y: &[f64], yf: f64, first_y: Given, min_y: Given, max_y: Given, notes: &mut Vec<String>) {
    let finite = y.iter().copied().filter(|v| v.is_finite());
    let lo = finite.clone().fold(f64::INFINITY, f64::min);
    let hi = finite.fold(f64::NEG_INFINITY, f64::max);
    let agrees = |said: f64, text: &str, actual: f64| {
        // One unit of the last digit written: writers truncate as often as they round.
        let tol = written_precision(text).max(yf.abs()) + 1e-12 * said.abs();
        (said - actual).abs() <= tol
    };
    if let (Some((line, v, text)), Some(&y0)) = (first_y, y.first()) {
        if y0.is_finite() && !agrees(v, &text, y0) {
            notes
                .push(format!("line {line}: header FIRSTY says {text} but the first Y value is {}; the header value is ignored", show(y0)));
        }
    }
    if lo.is_finite() {
        if let Some((line, v, text)) = min_y {
            if !agrees(v, &text, lo) {
                notes.push(format!(
                    "line {line}: header MINY says {text} but the smallest Y value is {}; the header value is ignored",
                    show(lo)
                ));
            }
        }
        if let Some((line, v, text)) = max_y {
            if !agrees(v, &text, hi) {
                notes.push(format!(
                    "line {line}: header MAXY says {text} but the largest Y value is {}; the header value is ignored",
                    show(hi)
                ));
            }
        }
    }
}

// ---------------------------------------------------------------------------
// Encoder (for round-trip tests), written from the same standard.

/// Ordinate forms of `##XYDATA=(X++(Y..Y))` lines.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Form {
    /// Plain numbers separated by spaces.
    Affn,
    /// Every number led by its sign.
    Pac,
    /// SQZ: the first digit and sign folded into one character.
    Sqz,
    /// DIF: differences, with the Y-check line convention.
    Dif,
    /// DIF with repeated differences counted by DUP.
    DifDup,
    /// SQZ with repeated values counted by DUP.
    SqzDup,
}

/// `(X++(Y..Y))` data lines (each ended by '\n', no labels) for ordinates `y`
/// starting at `first_x` in steps of `delta_x`. Each line carries `per_line`
/// new ordinates (at least 1); in the DIF forms a line that follows a DIF
/// line begins with the Y-check value, and a last Y-check line closes the table.
pub fn encode_xydata(first_x: f64, delta_x: f64, y: &[i64], form: Form, per_line: usize) -> String {
    let per_line = per_line.max(1);
    let dif = matches!(form, Form::Dif | Form::DifDup);
    let dup = matches!(form, Form::DifDup | Form::SqzDup);
    let mut out = String::new();
    let mut start = 0;
    let mut ended_in_dif = false;
    let mut tokens: Vec<String> = Vec::with_capacity(per_line + 1);
    while start < y.len() {
        let end = (start + per_line).min(y.len());
        let from = if dif && ended_in_dif { start - 1 } else { start };
        tokens.clear();
        for i in from..end {
            let v = i128::from(y[i]);
            tokens.push(match form {
                Form::Affn => v.to_string(),
                Form::Pac => format!("{v:+}"),
                Form::Sqz | Form::SqzDup => asdf(v, b'@', b'A', b'a'),
                Form::Dif | Form::DifDup if i == from => asdf(v, b'@', b'A', b'a'),
                Form::Dif | Form::DifDup => asdf(v - i128::from(y[i - 1]), b'%', b'J', b'j'),
            });
        }
        ended_in_dif = dif && end - from >= 2;
        write_line(&mut out, first_x + from as f64 * delta_x, &tokens, form, dup);
        start = end;
    }
    if ended_in_dif {
        if let Some(&last) = y.last() {
            let check = [asdf(i128::from(last), b'@', b'A', b'a')];
            write_line(&mut out, first_x + (y.len() - 1) as f64 * delta_x, &check, form, false);
        }
    }
    out
}

/// One ASDF token: `zero` for 0, else the first digit becomes `pos` + d - 1 or `neg` + d - 1.
fn asdf(v: i128, zero: u8, pos: u8, neg: u8) -> String {
    let digits = v.unsigned_abs().to_string();
    let mut bytes = digits.into_bytes();
    if let Some(first) = bytes.first_mut() {
        let d = *first - b'0';
        *first = match (d, v < 0) {
            (0, _) => zero,
            (d, false) => pos + d - 1,
            (d, true) => neg + d - 1,
        };
    }
    String::from_utf8(bytes).unwrap_or_default()
}

fn write_line(out: &mut String, x: f64, tokens: &[String], form: Form, dup: bool) {
    use std::fmt::Write;
    let _ = write!(out, "{x}");
    let sep = match form {
        Form::Affn => " ",
        _ => "",
    };
    if form == Form::Pac {
        out.push(' ');
    }
    let mut i = 0;
    while i < tokens.len() {
        let mut run = 1;
        while dup && tokens.get(i + run) == Some(&tokens[i]) {
            run += 1;
        }
        out.push_str(sep);
        out.push_str(&tokens[i]);
        if run > 1 {
            // DUP: S..Z are 1..8, s is 9, for the first digit of the count.
            out.push_str(&dup_token(run));
        }
        i += run;
    }
    out.push('\n');
}

/// A DUP count: its first digit 1..8 becomes S..Z, 9 becomes s.
fn dup_token(count: usize) -> String {
    let mut bytes = count.to_string().into_bytes();
    if let Some(first) = bytes.first_mut() {
        *first = match *first - b'0' {
            9 => b's',
            d => b'S' + d - 1,
        };
    }
    String::from_utf8(bytes).unwrap_or_default()
}
