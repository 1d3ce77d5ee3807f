//! Where keys are written in a scenario's text: a small scanner that knows
//! RON's strings, comments and brackets well enough to find the line and
//! column of each key (`curve`, `view.half_width`, `params.u`), so that a
//! problem found after parsing can still be reported at its place. Only
//! positions: what the values mean is `scenario`'s business.

/// A key as written in the text: `name:` (or `"name":` in a map).
#[derive(Clone, Debug)]
pub(super) struct KeyPos {
    pub(super) name: String,
    /// Bracket depth at the key (1 inside the outer parentheses).
    pub(super) depth: usize,
    /// Byte offset of the key's first character.
    pub(super) start: usize,
    /// Byte offset just after the ':'.
    pub(super) after_colon: usize,
}

/// 1-based line and column (in characters) of byte `offset` in `text`.
pub(super) fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let mut end = offset.min(text.len());
    while !text.is_char_boundary(end) {
        end -= 1;
    }
    let before = &text[..end];
    let line = before.matches('\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    (line, before[line_start..].chars().count() + 1)
}

/// Byte offset of 1-based `line` and `column` (in characters), clamped to the text.
pub(super) fn offset_of(text: &str, line: usize, column: usize) -> usize {
    let mut offset = 0;
    for (n, l) in text.split_inclusive('\n').enumerate() {
        if n + 1 == line.max(1) {
            let in_line = l
                .char_indices()
                .nth(column.saturating_sub(1))
                .map_or(l.len(), |(i, _)| i);
            return offset + in_line;
        }
        offset += l.len();
    }
    text.len()
}

/// Skips whitespace and comments from byte `i`; returns the next offset.
pub(super) fn skip_trivia(b: &[u8], mut i: usize) -> usize {
    loop {
        while i < b.len() && b[i].is_ascii_whitespace() {
            i += 1;
        }
        if b[i..].starts_with(b"//") {
            while i < b.len() && b[i] != b'\n' {
                i += 1;
            }
        } else if b[i..].starts_with(b"/*") {
            // RON block comments nest.
            let mut depth = 0usize;
            while i < b.len() {
                if b[i..].starts_with(b"/*") {
                    depth += 1;
                    i += 2;
                } else if b[i..].starts_with(b"*/") {
                    depth -= 1;
                    i += 2;
                    if depth == 0 {
                        break;
                    }
                } else {
                    i += 1;
                }
            }
        } else {
            return i;
        }
    }
}

/// If a string literal starts at `i`, returns (content start, content end,
/// offset after the literal, raw?).
pub(super) fn string_at(b: &[u8], i: usize) -> Option<(usize, usize, usize, bool)> {
    if b.get(i) == Some(&b'"') {
        let mut j = i + 1;
        while j < b.len() && b[j] != b'"' {
            j += if b[j] == b'\\' { 2 } else { 1 };
        }
        let end = j.min(b.len());
        return Some((i + 1, end, (end + 1).min(b.len()), false));
    }
    if b.get(i) == Some(&b'r') {
        let mut j = i + 1;
        let mut hashes = 0;
        while b.get(j) == Some(&b'#') {
            hashes += 1;
            j += 1;
        }
        if b.get(j) != Some(&b'"') {
            return None;
        }
        let start = j + 1;
        let mut k = start;
        while k < b.len() {
            if b[k] == b'"'
                && b[k + 1..]
                    .iter()
                    .take(hashes)
                    .filter(|&&c| c == b'#')
                    .count()
                    == hashes
            {
                return Some((start, k, (k + 1 + hashes).min(b.len()), true));
            }
            k += 1;
        }
        return Some((start, b.len(), b.len(), true));
    }
    None
}

pub(super) fn scan_keys(text: &str) -> Vec<KeyPos> {
    let b = text.as_bytes();
    let mut keys = Vec::new();
    let mut depth = 0usize;
    let mut i = 0;
    while i < b.len() {
        i = skip_trivia(b, i);
        if i >= b.len() {
            break;
        }
        let c = b[i];
        let (name, start, end) = if let Some((s, e, after, _)) = string_at(b, i) {
            (text.get(s..e).unwrap_or("").to_string(), i, after)
        } else if c.is_ascii_alphabetic() || c == b'_' {
            let mut j = i;
            while j < b.len() && (b[j].is_ascii_alphanumeric() || b[j] == b'_') {
                j += 1;
            }
            (text[i..j].to_string(), i, j)
        } else if c == b'\'' {
            // A char literal: skip it whole so `':'` is not a colon.
            let mut j = i + 1;
            while j < b.len() && b[j] != b'\'' {
                j += if b[j] == b'\\' { 2 } else { 1 };
            }
            i = j + 1;
            continue;
        } else {
            match c {
                b'(' | b'[' | b'{' => depth += 1,
                b')' | b']' | b'}' => depth = depth.saturating_sub(1),
                _ => {}
            }
            // Step over a whole UTF-8 character.
            i += 1;
            while i < b.len() && (b[i] & 0xC0) == 0x80 {
                i += 1;
            }
            continue;
        };
        let next = skip_trivia(b, end);
        if next < b.len() && b[next] == b':' {
            keys.push(KeyPos {
                name,
                depth,
                start,
                after_colon: next + 1,
            });
            i = next + 1;
        } else {
            i = end;
        }
    }
    keys
}

/// The key at dotted `path` (`view.half_width`, `params.u`): each part is
/// looked up among the keys nested inside the previous one.
pub(super) fn find_key<'a>(keys: &'a [KeyPos], path: &str) -> Option<&'a KeyPos> {
    let mut found: Option<&KeyPos> = None;
    for part in path.split('.') {
        let (from, min_depth) = match found {
            None => (0, 0),
            Some(k) => (k.start, k.depth),
        };
        let mut hit = None;
        for k in keys
            .iter()
            .filter(|k| k.start > from || (found.is_none() && k.start >= from))
        {
            if found.is_some() && k.depth <= min_depth {
                break;
            }
            if k.name == part && (found.is_some() || k.depth == 1) {
                hit = Some(k);
                break;
            }
        }
        found = Some(hit?);
    }
    found
}

/// Byte offset of `column` (1-based, in characters) of the `curve` text
/// inside the file, when the string is written without escapes before it.
pub(super) fn curve_column_offset(text: &str, key: &KeyPos, column: usize) -> Option<usize> {
    let b = text.as_bytes();
    let mut i = skip_trivia(b, key.after_colon);
    if b[i..].starts_with(b"Some") {
        i = skip_trivia(b, i + 4);
        if b.get(i) != Some(&b'(') {
            return None;
        }
        i = skip_trivia(b, i + 1);
    }
    let (start, end, _, raw) = string_at(b, i)?;
    let content = text.get(start..end)?;
    let mut offset = start;
    for (n, (byte_idx, ch)) in content.char_indices().enumerate() {
        if n + 1 == column {
            return Some(start + byte_idx);
        }
        if ch == '\\' && !raw {
            // Columns after an escape no longer match the file.
            return None;
        }
        offset = start + byte_idx + ch.len_utf8();
    }
    // A column just past the end (e.g. "unexpected end").
    Some(offset)
}
