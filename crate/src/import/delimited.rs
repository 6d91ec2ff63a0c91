//! Delimited text tables as instruments and spreadsheets write them: comma,
//! semicolon, tab or runs of spaces between fields; a decimal point or a
//! decimal comma; metadata lines before the table and after it (kept, not
//! parsed as data); a header naming quantity and unit; a UTF-8 byte order
//! mark; CRLF, LF or CR line ends; ascending or descending axis; extra
//! columns.
//!
//! Written by hand rather than with the `csv` crate: the hard part here is
//! telling which of several conventions a file follows (and a space-aligned
//! table, which `csv` does not read), not quoting, which spectra never use.

use super::{columns, Column, ImportError, Table, MAX_IMPORT_BYTES, MAX_POINTS};

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Delimiter {
    Tab,
    Semicolon,
    Comma,
    Whitespace,
}

impl Delimiter {
    fn name(self) -> &'static str {
        match self {
            Delimiter::Tab => "tab",
            Delimiter::Semicolon => "semicolon",
            Delimiter::Comma => "comma",
            Delimiter::Whitespace => "spaces",
        }
    }
}

/// One way of reading a line: the field delimiter and the decimal mark.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Convention {
    delimiter: Delimiter,
    decimal_comma: bool,
}

/// In order of preference when two read a file equally well.
const CONVENTIONS: [Convention; 7] = [
    Convention { delimiter: Delimiter::Tab, decimal_comma: false },
    Convention { delimiter: Delimiter::Comma, decimal_comma: false },
    Convention { delimiter: Delimiter::Semicolon, decimal_comma: false },
    Convention { delimiter: Delimiter::Whitespace, decimal_comma: false },
    Convention { delimiter: Delimiter::Semicolon, decimal_comma: true },
    Convention { delimiter: Delimiter::Tab, decimal_comma: true },
    Convention { delimiter: Delimiter::Whitespace, decimal_comma: true },
];

/// Lines used to choose the convention (the rest only has to follow it).
const SNIFF_LINES: usize = 400;
/// A run of at least this many numeric rows is data, not metadata.
const MIN_TABLE_ROWS: usize = 3;

impl Convention {
    fn fields<'a>(&self, line: &'a str) -> Vec<&'a str> {
        let mut fields: Vec<&str> = match self.delimiter {
            Delimiter::Whitespace => line.split_whitespace().collect(),
            Delimiter::Tab => line.split('\t').map(str::trim).collect(),
            Delimiter::Semicolon => line.split(';').map(str::trim).collect(),
            Delimiter::Comma => line.split(',').map(str::trim).collect(),
        };
        // A trailing delimiter (spreadsheets write them) is no field.
        while fields.len() > 1 && fields.last().is_some_and(|f| f.is_empty()) {
            fields.pop();
        }
        fields
    }

    fn number(&self, field: &str) -> Option<f64> {
        let field = field.trim();
        if field.is_empty() || !field.bytes().next().is_some_and(|b| b.is_ascii_digit() || b"+-.".contains(&b)) {
            return None;
        }
        let value = if self.decimal_comma {
            if field.contains('.') {
                return None;
            }
            field.replace(',', ".").parse::<f64>().ok()?
        } else {
            field.parse::<f64>().ok()?
        };
        value.is_finite().then_some(value)
    }

    /// The numbers of a data row, or `None` when the line is not one.
    fn row(&self, line: &str) -> Option<Vec<f64>> {
        let fields = self.fields(line);
        if fields.len() < 2 {
            return None;
        }
        fields.iter().map(|f| self.number(f)).collect()
    }
}

/// Splits text into lines (CRLF, LF or CR), without a byte order mark.
fn lines(text: &str) -> Vec<&str> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut out = Vec::new();
    let mut rest = text;
    while !rest.is_empty() {
        match rest.find(['\r', '\n']) {
            Some(i) => {
                out.push(&rest[..i]);
                let skip = if rest[i..].starts_with("\r\n") { 2 } else { 1 };
                rest = &rest[i + skip..];
            }
            None => {
                out.push(rest);
                rest = "";
            }
        }
    }
    out
}

/// How well a convention reads the sample: the longest run of data rows with
/// one field count (blank lines allowed), and that count.
fn score(convention: &Convention, sample: &[&str]) -> (usize, usize) {
    let mut best = (0, 0);
    let mut run = (0, 0);
    for line in sample {
        if line.trim().is_empty() {
            continue;
        }
        match convention.row(line) {
            Some(r) if r.len() == run.1 => run.0 += 1,
            Some(r) => run = (1, r.len()),
            None => run = (0, 0),
        }
        if run.0 > best.0 {
            best = run;
        }
    }
    best
}

/// Reads a delimited table; the first column is the spectral axis.
pub fn parse(text: &str) -> Result<Table, ImportError> {
    if text.len() as u64 > MAX_IMPORT_BYTES {
        return Err(ImportError::whole(format!("the file is {} bytes; the limit is {MAX_IMPORT_BYTES}", text.len())));
    }
    if text.contains('\0') {
        return Err(ImportError::whole("the file holds binary data (a NUL byte), not text"));
    }
    let all = lines(text);
    let sample: Vec<&str> = all.iter().copied().filter(|l| l.bytes().any(|b| b.is_ascii_digit())).take(SNIFF_LINES).collect();
    let (convention, (rows, width)) =
        CONVENTIONS
            .iter()
            .map(|c| (*c, score(c, &sample)))
            .fold((CONVENTIONS[0], (0, 0)), |best, cand| if cand.1 .0 > best.1 .0 { cand } else { best });
    if rows == 0 {
        return Err(ImportError::whole(
            "no table of numbers found: expected lines of two or more numbers (axis, then values) separated by commas, semicolons, tabs or spaces",
        ));
    }
    let conforming = |line: &str| convention.row(line).filter(|r| r.len() == width);
    // The table: from the first run of MIN_TABLE_ROWS conforming rows (or
    // the longest run, if shorter) to the last conforming row.
    let need = MIN_TABLE_ROWS.min(rows);
    let run = first_run(&all, need, &conforming).ok_or_else(|| ImportError::whole("no table of numbers found"))?;
    // Broken rows just above that run (a value the reader refused among the
    // first rows) still belong to the table: extend it up to the nearest line
    // that does not start with a number (the header or metadata).
    let mut start = run;
    while let Some(p) = (0..start).rev().find(|i| !all[*i].trim().is_empty()) {
        match convention.fields(all[p]).first() {
            Some(f) if convention.number(f).is_some() => start = p,
            _ => break,
        }
    }
    let end = (start..all.len()).rev().find(|i| conforming(all[*i]).is_some()).unwrap_or(start);

    let mut x = Vec::new();
    let mut values: Vec<Vec<f64>> = vec![Vec::new(); width - 1];
    // The file line of each point, for messages about the axis.
    let mut line_of = Vec::new();
    for (i, line) in all.iter().enumerate().take(end + 1).skip(start) {
        if line.trim().is_empty() {
            continue;
        }
        let row = conforming(line).ok_or_else(|| bad_row(&convention, line, i + 1, width))?;
        if x.len() >= MAX_POINTS {
            return Err(ImportError::at(i + 1, format!("more than {MAX_POINTS} points; the limit is {MAX_POINTS}")));
        }
        x.push(row[0]);
        line_of.push(i + 1);
        for (col, v) in values.iter_mut().zip(&row[1..]) {
            col.push(*v);
        }
    }
    check_axis(&x, &line_of)?;

    // Header: the last non-blank line before the table, when it splits into
    // as many fields; everything else before and after is metadata.
    let before: Vec<(usize, &str)> = all[..start].iter().enumerate().filter(|(_, l)| !l.trim().is_empty()).map(|(i, l)| (i, *l)).collect();
    let labels = before.last().and_then(|(_, l)| header_labels(&convention, l, width));
    let header_line = labels.as_ref().and(before.last().map(|(i, _)| *i));
    let metadata: Vec<String> = all
        .iter()
        .enumerate()
        .filter(|(i, l)| (*i < start || *i > end) && Some(*i) != header_line && !l.trim().is_empty())
        .map(|(_, l)| l.trim().to_string())
        .collect();
    let labels = labels.unwrap_or_else(|| vec![String::new(); width]);

    let mut notes = Vec::new();
    notes.push(format!(
        "{} points in {} columns, {}-separated{}",
        x.len(),
        width,
        convention.delimiter.name(),
        if convention.decimal_comma { ", decimal comma" } else { "" }
    ));
    if x.len() > 1 && x[0] > x[x.len() - 1] {
        notes.push("the axis descends".into());
    }
    if !metadata.is_empty() {
        notes.push(format!("{} metadata line(s) kept", metadata.len()));
    }
    let axis = match columns::recognise(&labels[0]) {
        Some(columns::ColumnKind::Axis(a)) => Some(a),
        _ => None,
    };
    let columns = labels[1..]
        .iter()
        .zip(values)
        .map(|(label, values)| Column { label: label.clone(), kind: columns::recognise(label), values })
        .collect();
    Ok(Table { metadata, x_label: labels[0].clone(), axis, x, columns, notes, format: "delimited" })
}

fn first_run(all: &[&str], need: usize, conforming: &dyn Fn(&str) -> Option<Vec<f64>>) -> Option<usize> {
    let mut run_start = None;
    let mut count = 0;
    for (i, line) in all.iter().enumerate() {
        if line.trim().is_empty() {
            continue;
        }
        if conforming(line).is_some() {
            if count == 0 {
                run_start = Some(i);
            }
            count += 1;
            if count >= need {
                return run_start;
            }
        } else {
            count = 0;
        }
    }
    None
}

/// Says what is wrong with a line inside the table.
fn bad_row(convention: &Convention, line: &str, line_no: usize, width: usize) -> ImportError {
    let fields = convention.fields(line);
    if fields.len() != width {
        return ImportError::at(line_no, format!("{width} columns expected, found {}", fields.len()));
    }
    let (k, field) = fields.iter().enumerate().find(|(_, f)| convention.number(f).is_none()).unwrap_or((0, &""));
    ImportError::at(line_no, format!("column {} is not a number: \"{}\"", k + 1, truncate(field, 40)))
}

fn truncate(s: &str, max: usize) -> String {
    if s.chars().count() <= max {
        s.to_string()
    } else {
        s.chars().take(max).collect::<String>() + "…"
    }
}

/// The axis must run one way, without repeats (a spectrum, not a log).
fn check_axis(x: &[f64], line_of: &[usize]) -> Result<(), ImportError> {
    if x.len() < 2 {
        return Err(ImportError::whole("the table has fewer than 2 points"));
    }
    let rising = x[1] > x[0];
    for k in 1..x.len() {
        let ok = if rising { x[k] > x[k - 1] } else { x[k] < x[k - 1] };
        if !ok {
            return Err(ImportError::at(
                line_of.get(k).copied().unwrap_or(0),
                format!("the axis must {} throughout; {} follows {}", if rising { "rise" } else { "fall" }, x[k], x[k - 1]),
            ));
        }
    }
    Ok(())
}

/// Header fields for a table of `width` columns. A space-separated header
/// such as "Wavelength [nm]   CD [mdeg]" is split at tabs or runs of two or
/// more spaces, since single spaces sit inside its names.
fn header_labels(convention: &Convention, line: &str, width: usize) -> Option<Vec<String>> {
    if convention.row(line).is_some() {
        return None;
    }
    let mut fields: Vec<String> = convention.fields(line).iter().map(|f| f.trim().to_string()).collect();
    if convention.delimiter == Delimiter::Whitespace && fields.len() != width {
        fields = line.split('\t').flat_map(|part| part.split("  ")).map(str::trim).filter(|f| !f.is_empty()).map(str::to_string).collect();
    }
    (fields.len() == width).then_some(fields)
}
