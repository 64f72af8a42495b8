//! The sections of a Gmsh MSH 4.1 file (ASCII or little-endian binary) that
//! a mesh needs: `$MeshFormat`, `$PhysicalNames`, `$Entities`, `$Nodes` and
//! `$Elements`; other sections are skipped. Layout from the Gmsh reference
//! manual, section "MSH file format" (version 4.1).
//!
//! Written for hostile input: every count read from the file is checked
//! against the bytes left before anything is allocated for it, every number
//! is range-checked, the scan is linear in the file size, and every error
//! carries the line (ASCII) or byte offset (binary) where reading stopped.

use std::collections::HashMap;

use super::FormatError;

/// One block of nodes: tags and coordinates in file order.
#[derive(Debug, Default)]
pub(crate) struct NodeBlock {
    pub tags: Vec<u64>,
    pub coords: Vec<[f64; 3]>,
}

/// One block of elements of one type on one entity.
#[derive(Debug)]
pub(crate) struct ElementBlock {
    pub entity_dim: i32,
    pub entity_tag: i32,
    pub element_type: i32,
    /// Nodes per element of `element_type`.
    pub nodes_per_element: usize,
    /// Element tags, one per element.
    pub tags: Vec<u64>,
    /// Node tags, `nodes_per_element` per element.
    pub nodes: Vec<u64>,
    /// Byte offset of the block header, for messages.
    pub offset: usize,
}

/// The parts of an MSH file a mesh is built from.
#[derive(Debug, Default)]
pub(crate) struct MshData {
    pub ascii: bool,
    /// Physical tags of each (dimension, entity tag).
    pub physical_tags: HashMap<(i32, i32), Vec<i32>>,
    /// `$PhysicalNames`: (dimension, physical tag) → name.
    pub physical_names: HashMap<(i32, i32), String>,
    pub node_blocks: Vec<NodeBlock>,
    pub element_blocks: Vec<ElementBlock>,
    pub has_nodes: bool,
    pub has_elements: bool,
}

/// Name and node count of the Gmsh element types (Gmsh reference manual,
/// "MSH file format", element types 1–18, 92, 93), or `None` for other types.
pub(crate) fn element_type_info(t: i32) -> Option<(&'static str, usize)> {
    Some(match t {
        1 => ("Lin2", 2),
        2 => ("Tri3", 3),
        3 => ("Qua4", 4),
        4 => ("Tet4", 4),
        5 => ("Hex8", 8),
        6 => ("Pri6", 6),
        7 => ("Pyr5", 5),
        8 => ("Lin3", 3),
        9 => ("Tri6", 6),
        10 => ("Qua9", 9),
        11 => ("Tet10", 10),
        12 => ("Hex27", 27),
        13 => ("Pri18", 18),
        14 => ("Pyr14", 14),
        15 => ("Pnt", 1),
        16 => ("Qua8", 8),
        17 => ("Hex20", 20),
        18 => ("Pri15", 15),
        19 => ("Pyr13", 13),
        _ => return None,
    })
}

/// Parses the bytes of an MSH 4.1 file.
pub(crate) fn parse(bytes: &[u8]) -> Result<MshData, FormatError> {
    let mut r = Reader { bytes, at: 0, binary: false, size_t: 8 };
    let mut data = MshData { ascii: true, ..Default::default() };
    let mut seen_format = false;
    while let Some((name, start)) = r.next_section()? {
        match name.as_str() {
            "MeshFormat" => {
                r.mesh_format()?;
                data.ascii = !r.binary;
                seen_format = true;
            }
            _ if !seen_format => return Err(r.error_at(start, "the file must start with a $MeshFormat section")),
            "PhysicalNames" => r.physical_names(&mut data.physical_names)?,
            "Entities" => r.entities(&mut data.physical_tags)?,
            "Nodes" => {
                data.node_blocks = r.nodes()?;
                data.has_nodes = true;
            }
            "Elements" => {
                data.element_blocks = r.elements()?;
                data.has_elements = true;
            }
            _ => {
                r.skip_to_end(&name)?;
                continue;
            }
        }
        r.section_end(&name)?;
    }
    if !seen_format {
        return Err(r.error_at(0, "no $MeshFormat section: not a Gmsh MSH file"));
    }
    Ok(data)
}

/// A cursor over the file in ASCII or binary mode.
struct Reader<'a> {
    bytes: &'a [u8],
    at: usize,
    binary: bool,
    /// Bytes of a `size_t` in a binary file (4 or 8).
    size_t: usize,
}

impl<'a> Reader<'a> {
    fn error_at(&self, offset: usize, message: impl Into<String>) -> FormatError {
        FormatError { offset: offset.min(self.bytes.len()), message: message.into() }
    }

    fn error(&self, message: impl Into<String>) -> FormatError {
        self.error_at(self.at, message)
    }

    fn remaining(&self) -> usize {
        self.bytes.len() - self.at
    }

    /// Where the next item starts (after blank space in a text file).
    fn here(&mut self) -> usize {
        if !self.binary {
            self.skip_whitespace();
        }
        self.at
    }

    fn skip_whitespace(&mut self) {
        while self.at < self.bytes.len() && self.bytes[self.at].is_ascii_whitespace() {
            self.at += 1;
        }
    }

    /// The next whitespace-delimited token.
    fn token(&mut self, what: &str) -> Result<&'a [u8], FormatError> {
        self.skip_whitespace();
        let start = self.here();
        while self.at < self.bytes.len() && !self.bytes[self.at].is_ascii_whitespace() {
            self.at += 1;
        }
        if start == self.at {
            return Err(self.error(format!("the file ends where {what} should be")));
        }
        Ok(&self.bytes[start..self.at])
    }

    /// The next section header `$Name`, skipping blank space between sections.
    fn next_section(&mut self) -> Result<Option<(String, usize)>, FormatError> {
        self.skip_whitespace();
        if self.at == self.bytes.len() {
            return Ok(None);
        }
        let start = self.here();
        let token = self.token("a section")?;
        match token.strip_prefix(b"$") {
            Some(name) if !name.is_empty() && !name.starts_with(b"End") => {
                // Binary data starts right after the header's line break.
                if self.binary {
                    self.at += self.bytes[self.at..].iter().take(2).position(|&b| b == b'\n').map_or(0, |i| i + 1);
                }
                Ok(Some((String::from_utf8_lossy(name).into_owned(), start)))
            }
            _ => Err(self.error_at(start, format!("expected a section header like $Nodes, found `{}`", shorten(token)))),
        }
    }

    /// Expects `$End<name>` next.
    fn section_end(&mut self, name: &str) -> Result<(), FormatError> {
        self.skip_whitespace();
        let start = self.here();
        let expected = format!("$End{name}");
        let token = self.token(&expected)?;
        if token != expected.as_bytes() {
            return Err(self.error_at(start, format!("expected {expected}, found `{}`", shorten(token))));
        }
        Ok(())
    }

    /// Skips an unknown section up to and including `$End<name>` (linear scan).
    fn skip_to_end(&mut self, name: &str) -> Result<(), FormatError> {
        let end = format!("$End{name}");
        match find(&self.bytes[self.at..], end.as_bytes()) {
            Some(i) => {
                self.at += i + end.len();
                Ok(())
            }
            None => Err(self.error(format!("section ${name} has no {end}"))),
        }
    }

    /// `version file-type data-size`, and in a binary file the endianness test integer.
    fn mesh_format(&mut self) -> Result<(), FormatError> {
        let start = self.here();
        let version = self.token("the format version")?;
        if version != b"4.1" {
            return Err(self.error_at(start, format!("MSH version `{}` is not supported; save the mesh as MSH 4.1", shorten(version))));
        }
        let start = self.here();
        self.binary = match self.token("the file type")? {
            b"0" => false,
            b"1" => true,
            other => return Err(self.error_at(start, format!("file type `{}` must be 0 (ASCII) or 1 (binary)", shorten(other)))),
        };
        let start = self.here();
        self.size_t = match self.token("the data size")? {
            b"8" => 8,
            b"4" => 4,
            other => return Err(self.error_at(start, format!("data size `{}` must be 4 or 8 (bytes of a size_t)", shorten(other)))),
        };
        if self.binary {
            // One newline, then the integer 1 in the file's byte order.
            if self.bytes.get(self.at) == Some(&b'\r') {
                self.at += 1;
            }
            if self.bytes.get(self.at) != Some(&b'\n') {
                return Err(self.error("expected a line break before the binary endianness test"));
            }
            self.at += 1;
            let start = self.here();
            let one = self.take(4, "the endianness test")?;
            if one != [1, 0, 0, 0] {
                return Err(
                    self.error_at(start, "the endianness test value is not 1 in little-endian order (big-endian files are not supported)")
                );
            }
        }
        Ok(())
    }

    fn take(&mut self, n: usize, what: &str) -> Result<&'a [u8], FormatError> {
        if self.remaining() < n {
            return Err(self.error(format!("the file ends inside {what}")));
        }
        let s = &self.bytes[self.at..self.at + n];
        self.at += n;
        Ok(s)
    }

    fn size(&mut self, what: &str) -> Result<u64, FormatError> {
        let start = self.here();
        if self.binary {
            let s = self.take(self.size_t, what)?;
            Ok(if s.len() == 8 { u64::from_le_bytes(s.try_into().unwrap_or_default()) } else { u32_le(s) as u64 })
        } else {
            let t = self.token(what)?;
            parse_text(t).ok_or_else(|| self.error_at(start, format!("{what} `{}` is not a non-negative integer", shorten(t))))
        }
    }

    fn int(&mut self, what: &str) -> Result<i32, FormatError> {
        let start = self.here();
        if self.binary {
            Ok(u32_le(self.take(4, what)?) as i32)
        } else {
            let t = self.token(what)?;
            parse_text(t).ok_or_else(|| self.error_at(start, format!("{what} `{}` is not a 32-bit integer", shorten(t))))
        }
    }

    fn double(&mut self, what: &str) -> Result<f64, FormatError> {
        let start = self.here();
        if self.binary {
            let s = self.take(8, what)?;
            Ok(f64::from_le_bytes(s.try_into().unwrap_or_default()))
        } else {
            let t = self.token(what)?;
            parse_text(t).ok_or_else(|| self.error_at(start, format!("{what} `{}` is not a number", shorten(t))))
        }
    }

    /// Checks that `count` items of at least `bytes_each` bytes can fit in
    /// what is left of the file, before anything is allocated for them.
    /// In ASCII each item is `numbers_each` numbers of at least one byte.
    fn fits(&self, count: u64, numbers_each: usize, binary_bytes_each: usize, start: usize, what: &str) -> Result<usize, FormatError> {
        let each = if self.binary { binary_bytes_each } else { numbers_each };
        match usize::try_from(count).ok().filter(|&c| c.checked_mul(each).is_some_and(|b| b <= self.remaining())) {
            Some(c) => Ok(c),
            None => Err(self.error_at(
                start,
                format!("{what} {count} cannot fit in the {} bytes left in the file (a corrupted count?)", self.remaining()),
            )),
        }
    }

    fn physical_names(&mut self, out: &mut HashMap<(i32, i32), String>) -> Result<(), FormatError> {
        // Always text, even in binary files.
        let binary = std::mem::replace(&mut self.binary, false);
        let start = self.here();
        let n = self.size("the number of physical names")?;
        let n = self.fits(n, 3, 3, start, "physical name count")?;
        for _ in 0..n {
            let dim = self.int("a physical name's dimension")?;
            let tag = self.int("a physical name's tag")?;
            self.skip_whitespace();
            let line_start = self.at;
            let line_end = self.bytes[self.at..].iter().position(|&b| b == b'\n').map_or(self.bytes.len(), |i| self.at + i);
            let name = String::from_utf8_lossy(&self.bytes[line_start..line_end]);
            out.insert((dim, tag), name.trim().trim_matches('"').to_string());
            self.at = line_end;
        }
        self.binary = binary;
        Ok(())
    }

    fn entities(&mut self, out: &mut HashMap<(i32, i32), Vec<i32>>) -> Result<(), FormatError> {
        let start = self.here();
        let mut counts = [0usize; 4];
        for (d, c) in counts.iter_mut().enumerate() {
            let n = self.size("an entity count")?;
            // A point has a tag, three coordinates and a physical tag count.
            *c = self.fits(n, 5, 4 + 3 * 8 + self.size_t, start, &format!("dimension-{d} entity count"))?;
        }
        for (dim, &count) in counts.iter().enumerate() {
            for _ in 0..count {
                let tag = self.int("an entity tag")?;
                for _ in 0..if dim == 0 { 3 } else { 6 } {
                    self.double("an entity's bounding coordinate")?;
                }
                let start = self.here();
                let n = self.size("a physical tag count")?;
                let n = self.fits(n, 1, 4, start, "physical tag count")?;
                let mut tags = Vec::with_capacity(n);
                for _ in 0..n {
                    tags.push(self.int("a physical tag")?);
                }
                out.insert((dim as i32, tag), tags);
                if dim > 0 {
                    let start = self.here();
                    let n = self.size("a bounding entity count")?;
                    let n = self.fits(n, 1, 4, start, "bounding entity count")?;
                    for _ in 0..n {
                        self.int("a bounding entity tag")?;
                    }
                }
            }
        }
        Ok(())
    }

    fn nodes(&mut self) -> Result<Vec<NodeBlock>, FormatError> {
        let start = self.here();
        let blocks = self.size("the number of node blocks")?;
        let blocks = self.fits(blocks, 4, 3 * 4 + self.size_t, start, "node block count")?;
        for _ in 0..3 {
            self.size("a node count or tag bound")?;
        }
        let mut out = Vec::with_capacity(blocks);
        for _ in 0..blocks {
            let dim = self.int("a node block's entity dimension")?;
            self.int("a node block's entity tag")?;
            let start = self.here();
            let parametric = self.int("the parametric flag")?;
            if !(0..=1).contains(&parametric) || !(0..=3).contains(&dim) {
                return Err(self.error_at(start, format!("parametric flag {parametric} or entity dimension {dim} out of range")));
            }
            let extra = if parametric == 1 { dim as usize } else { 0 };
            let start = self.here();
            let n = self.size("the number of nodes in a block")?;
            let n = self.fits(n, 4 + extra, self.size_t + (3 + extra) * 8, start, "node count")?;
            let mut block = NodeBlock { tags: Vec::with_capacity(n), coords: Vec::with_capacity(n) };
            for _ in 0..n {
                block.tags.push(self.size("a node tag")?);
            }
            for _ in 0..n {
                let mut x = [0.0; 3];
                for c in &mut x {
                    *c = self.double("a node coordinate")?;
                }
                for _ in 0..extra {
                    self.double("a parametric coordinate")?;
                }
                block.coords.push(x);
            }
            out.push(block);
        }
        Ok(out)
    }

    fn elements(&mut self) -> Result<Vec<ElementBlock>, FormatError> {
        let start = self.here();
        let blocks = self.size("the number of element blocks")?;
        let blocks = self.fits(blocks, 4, 3 * 4 + self.size_t, start, "element block count")?;
        for _ in 0..3 {
            self.size("an element count or tag bound")?;
        }
        let mut out = Vec::with_capacity(blocks);
        for _ in 0..blocks {
            let offset = self.at;
            let entity_dim = self.int("an element block's entity dimension")?;
            let entity_tag = self.int("an element block's entity tag")?;
            let start = self.here();
            let element_type = self.int("an element type")?;
            let Some((_, per)) = element_type_info(element_type) else {
                return Err(self.error_at(start, format!("unsupported Gmsh element type {element_type}")));
            };
            let start = self.here();
            let n = self.size("the number of elements in a block")?;
            let n = self.fits(n, 1 + per, (1 + per) * self.size_t, start, "element count")?;
            let mut block = ElementBlock {
                entity_dim,
                entity_tag,
                element_type,
                nodes_per_element: per,
                tags: Vec::with_capacity(n),
                nodes: Vec::with_capacity(n * per),
                offset,
            };
            for _ in 0..n {
                block.tags.push(self.size("an element tag")?);
                for _ in 0..per {
                    block.nodes.push(self.size("an element's node tag")?);
                }
            }
            out.push(block);
        }
        Ok(out)
    }
}

fn u32_le(s: &[u8]) -> u32 {
    u32::from_le_bytes(s.try_into().unwrap_or_default())
}

fn parse_text<T: std::str::FromStr>(t: &[u8]) -> Option<T> {
    std::str::from_utf8(t).ok()?.parse().ok()
}

/// At most 40 characters of a token, for messages.
fn shorten(t: &[u8]) -> String {
    let s = String::from_utf8_lossy(&t[..t.len().min(40)]).into_owned();
    if t.len() > 40 {
        s + "…"
    } else {
        s
    }
}

/// First position of `needle` in `hay` (a linear scan for the first byte, then a compare).
pub(crate) fn find(hay: &[u8], needle: &[u8]) -> Option<usize> {
    let (&first, rest) = needle.split_first()?;
    let mut from = 0;
    while let Some(i) = hay[from..].iter().position(|&b| b == first) {
        let at = from + i;
        if hay[at + 1..].starts_with(rest) {
            return Some(at);
        }
        from = at + 1;
    }
    None
}
