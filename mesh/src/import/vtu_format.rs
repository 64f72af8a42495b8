//! The VTK XML unstructured-grid format (`.vtu`) read into plain arrays:
//! one `<Piece>` with its points, cells and point/cell data arrays, each
//! array ASCII, base64 inline binary or appended (raw or base64), optionally
//! zlib-compressed. Layout from the VTK file-format document ("VTK File
//! Formats", XML section: data-array header, compressed-block header).
//!
//! Written for hostile input: every size read from a header is checked
//! against the bytes that hold it, and a compressed array against zlib's
//! largest possible expansion (1032 : 1, from the deflate format's longest
//! match per bit; zlib technical details, Adler & Gailly) and the machine's
//! free memory, before anything is allocated for it. XML structure comes
//! from quick-xml; every error carries the byte offset of the element at fault.

use std::io::Read;

use base64::Engine;
use quick_xml::events::{BytesStart, Event};

use super::msh_format::find;
use super::FormatError;
use crate::memory;

/// One named array of point or cell data, flattened.
#[derive(Debug, Default)]
pub(crate) struct NamedArray {
    pub name: String,
    /// Values per point or cell (`NumberOfComponents`, 1 when absent).
    pub components: usize,
    pub values: Vec<f64>,
}

/// The piece of an unstructured grid, as plain arrays.
#[derive(Debug, Default)]
pub(crate) struct VtuPiece {
    /// x y z per point.
    pub points: Vec<f64>,
    pub connectivity: Vec<f64>,
    /// End of each cell's node list in `connectivity`.
    pub offsets: Vec<f64>,
    /// VTK cell type codes.
    pub types: Vec<f64>,
    pub point_data: Vec<NamedArray>,
    pub cell_data: Vec<NamedArray>,
}

/// Largest expansion of zlib-compressed data (see the module comment).
const ZLIB_MAX_RATIO: u64 = 1032;

/// How binary data is laid out: the file-wide attributes of `<VTKFile>`.
#[derive(Clone, Copy)]
struct Encoding {
    header_bytes: usize,
    big_endian: bool,
    zlib: bool,
}

/// A `<DataArray>` before decoding.
#[derive(Default)]
struct RawArray {
    name: String,
    components: usize,
    scalar: String,
    format: String,
    offset: Option<usize>,
    text: Vec<u8>,
    /// Byte offset of the element in the file.
    at: usize,
}

#[derive(Clone, Copy, PartialEq)]
enum Section {
    None,
    Points,
    Cells,
    PointData,
    CellData,
}

/// Parses the bytes of a `.vtu` file.
pub(crate) fn parse(bytes: &[u8]) -> Result<VtuPiece, FormatError> {
    let err = |offset: usize, message: String| FormatError { offset, message };
    // Raw appended data is not XML: parse the markup before it, and slice it separately.
    let appended_at = find(bytes, b"<AppendedData");
    let markup = &bytes[..appended_at.unwrap_or(bytes.len())];
    let mut reader = quick_xml::Reader::from_reader(markup);
    let mut buf = Vec::new();
    let mut encoding: Option<Encoding> = None;
    let mut pieces = 0usize;
    let mut section = Section::None;
    let mut current: Option<RawArray> = None;
    let mut arrays: Vec<(Section, RawArray)> = Vec::new();
    loop {
        let at = reader.buffer_position() as usize;
        let event =
            reader.read_event_into(&mut buf).map_err(|e| err(reader.error_position() as usize, format!("not well-formed XML: {e}")))?;
        match event {
            Event::Eof => break,
            Event::Start(ref e) | Event::Empty(ref e) => {
                let empty = matches!(event, Event::Empty(_));
                match e.name().as_ref() {
                    b"VTKFile" => encoding = Some(file_encoding(e, at)?),
                    b"Piece" => {
                        pieces += 1;
                        if pieces > 1 {
                            return Err(err(at, "more than one <Piece>; expected exactly one".into()));
                        }
                    }
                    b"Points" => section = Section::Points,
                    b"Cells" => section = Section::Cells,
                    b"PointData" => section = Section::PointData,
                    b"CellData" => section = Section::CellData,
                    b"DataArray" => {
                        let array = data_array(e, at)?;
                        if empty {
                            arrays.push((section, array));
                        } else {
                            current = Some(array);
                        }
                    }
                    _ => {}
                }
                if empty && e.name().as_ref() != b"DataArray" {
                    section = Section::None;
                }
            }
            Event::Text(t) => {
                if let Some(a) = current.as_mut() {
                    // Keep the separators: ascii values are split on whitespace later.
                    a.text.extend_from_slice(&t);
                    a.text.push(b' ');
                }
            }
            Event::End(e) => match e.name().as_ref() {
                b"DataArray" => {
                    if let Some(a) = current.take() {
                        arrays.push((section, a));
                    }
                }
                b"Points" | b"Cells" | b"PointData" | b"CellData" => section = Section::None,
                _ => {}
            },
            _ => {}
        }
        buf.clear();
    }
    let Some(encoding) = encoding else { return Err(err(0, "no <VTKFile> element: not a VTK XML file".into())) };
    if pieces == 0 {
        return Err(err(0, "no <Piece> element".into()));
    }
    let appended = match appended_at {
        Some(start) => Some(appended_data(bytes, start)?),
        None => None,
    };
    let mut piece = VtuPiece::default();
    for (section, raw) in arrays {
        let at = raw.at;
        let values = decode(&raw, encoding, appended.as_ref()).map_err(|m| err(at, format!("DataArray `{}`: {m}", raw.name)))?;
        match section {
            Section::Points => piece.points = values,
            Section::Cells => match raw.name.as_str() {
                "connectivity" => piece.connectivity = values,
                "offsets" => piece.offsets = values,
                "types" => piece.types = values,
                _ => {}
            },
            Section::PointData => piece.point_data.push(NamedArray { name: raw.name, components: raw.components, values }),
            Section::CellData => piece.cell_data.push(NamedArray { name: raw.name, components: raw.components, values }),
            Section::None => {}
        }
    }
    Ok(piece)
}

fn attribute(e: &BytesStart, key: &[u8]) -> Option<String> {
    e.attributes().flatten().find(|a| a.key.as_ref() == key).map(|a| String::from_utf8_lossy(&a.value).into_owned())
}

fn file_encoding(e: &BytesStart, at: usize) -> Result<Encoding, FormatError> {
    let err = |message: String| FormatError { offset: at, message };
    match attribute(e, b"type").as_deref() {
        Some("UnstructuredGrid") => {}
        other => return Err(err(format!("VTKFile type {other:?} is not an unstructured grid"))),
    }
    let header_bytes = match attribute(e, b"header_type").as_deref() {
        None | Some("UInt32") => 4,
        Some("UInt64") => 8,
        Some(other) => return Err(err(format!("header_type `{other}` must be UInt32 or UInt64"))),
    };
    let big_endian = match attribute(e, b"byte_order").as_deref() {
        None | Some("LittleEndian") => false,
        Some("BigEndian") => true,
        Some(other) => return Err(err(format!("byte_order `{other}` must be LittleEndian or BigEndian"))),
    };
    let zlib = match attribute(e, b"compressor").as_deref() {
        None | Some("") => false,
        Some("vtkZLibDataCompressor") => true,
        Some(other) => return Err(err(format!("compressor `{other}` is not supported (only vtkZLibDataCompressor)"))),
    };
    Ok(Encoding { header_bytes, big_endian, zlib })
}

fn data_array(e: &BytesStart, at: usize) -> Result<RawArray, FormatError> {
    let name = attribute(e, b"Name").unwrap_or_default();
    let offset = match attribute(e, b"offset") {
        None => None,
        Some(o) => Some(
            o.trim()
                .parse()
                .map_err(|_| FormatError { offset: at, message: format!("DataArray `{name}`: offset `{o}` is not a number") })?,
        ),
    };
    let components = match attribute(e, b"NumberOfComponents") {
        None => 1,
        Some(n) => n.trim().parse().ok().filter(|&n: &usize| n > 0).ok_or_else(|| FormatError {
            offset: at,
            message: format!("DataArray `{name}`: NumberOfComponents `{n}` is not a positive whole number"),
        })?,
    };
    Ok(RawArray {
        components,
        scalar: attribute(e, b"type").unwrap_or_default(),
        format: attribute(e, b"format").unwrap_or_else(|| "ascii".into()),
        offset,
        name,
        text: Vec::new(),
        at,
    })
}

/// The bytes of `<AppendedData>` after its `_` marker, and whether they are base64.
struct Appended<'a> {
    data: &'a [u8],
    base64: bool,
}

fn appended_data(bytes: &[u8], start: usize) -> Result<Appended<'_>, FormatError> {
    let err = |message: &str| FormatError { offset: start, message: message.into() };
    let close = bytes[start..].iter().position(|&b| b == b'>').ok_or_else(|| err("<AppendedData> tag is not closed"))? + start;
    let tag = &bytes[start..close];
    let base64 = if find(tag, b"\"raw\"").is_some() {
        false
    } else if find(tag, b"\"base64\"").is_some() {
        true
    } else {
        return Err(err("<AppendedData> encoding must be \"raw\" or \"base64\""));
    };
    let underscore = bytes[close..].iter().position(|&b| b == b'_').ok_or_else(|| err("<AppendedData> has no `_` marker"))? + close;
    let mut data = &bytes[underscore + 1..];
    // Ignore the closing tags (raw data may contain anything, so take the last ones).
    if let Some(end) = data.windows(15).rposition(|w| w == b"</AppendedData") {
        data = &data[..end];
    }
    Ok(Appended { data, base64 })
}

/// Bytes per value and a reader of one value, for a VTK scalar type name.
fn scalar_size(name: &str) -> Option<usize> {
    Some(match name {
        "Int8" | "UInt8" => 1,
        "Int16" | "UInt16" => 2,
        "Int32" | "UInt32" | "Float32" => 4,
        "Int64" | "UInt64" | "Float64" => 8,
        _ => return None,
    })
}

fn value_of(name: &str, b: &[u8], big: bool) -> f64 {
    macro_rules! get {
        ($t:ty) => {{
            let a = b.try_into().unwrap_or_default();
            (if big { <$t>::from_be_bytes(a) } else { <$t>::from_le_bytes(a) }) as f64
        }};
    }
    match name {
        "Int8" => b[0] as i8 as f64,
        "UInt8" => b[0] as f64,
        "Int16" => get!(i16),
        "UInt16" => get!(u16),
        "Int32" => get!(i32),
        "UInt32" => get!(u32),
        "Float32" => get!(f32),
        "Int64" => get!(i64),
        "UInt64" => get!(u64),
        _ => get!(f64),
    }
}

fn decode(raw: &RawArray, enc: Encoding, appended: Option<&Appended>) -> Result<Vec<f64>, String> {
    let size = scalar_size(&raw.scalar).ok_or_else(|| format!("type `{}` is not a VTK scalar type", raw.scalar))?;
    let bytes = match raw.format.as_str() {
        "ascii" => {
            return raw
                .text
                .split(|b| b.is_ascii_whitespace())
                .filter(|t| !t.is_empty())
                .map(|t| {
                    std::str::from_utf8(t)
                        .ok()
                        .and_then(|s| s.parse().ok())
                        .ok_or_else(|| format!("`{}` is not a number", String::from_utf8_lossy(&t[..t.len().min(40)])))
                })
                .collect();
        }
        "binary" => {
            let text: Vec<u8> = raw.text.iter().filter(|b| !b.is_ascii_whitespace()).copied().collect();
            array_bytes(Source::Base64(&text), enc)?
        }
        "appended" => {
            let a = appended.ok_or("format is appended but the file has no <AppendedData>")?;
            let offset = raw.offset.ok_or("format is appended but the array has no offset")?;
            let data =
                a.data.get(offset..).ok_or_else(|| format!("offset {offset} lies beyond the {} bytes of appended data", a.data.len()))?;
            array_bytes(if a.base64 { Source::Base64(data) } else { Source::Raw(data) }, enc)?
        }
        other => return Err(format!("format `{other}` must be ascii, binary or appended")),
    };
    if !bytes.len().is_multiple_of(size) {
        return Err(format!("{} bytes is not a whole number of {} values", bytes.len(), raw.scalar));
    }
    Ok(bytes.chunks_exact(size).map(|b| value_of(&raw.scalar, b, enc.big_endian)).collect())
}

/// Where an array's encoded bytes start: base64 text, or raw bytes.
enum Source<'a> {
    Base64(&'a [u8]),
    Raw(&'a [u8]),
}

/// Characters of base64 holding `n` bytes.
fn b64_len(n: usize) -> usize {
    n.div_ceil(3) * 4
}

fn base64_decode(text: &[u8]) -> Result<Vec<u8>, String> {
    base64::engine::general_purpose::STANDARD.decode(text).map_err(|e| format!("bad base64 data: {e}"))
}

/// A header number of `enc.header_bytes` bytes.
fn header_number(b: &[u8], enc: Encoding) -> u64 {
    match (enc.header_bytes, enc.big_endian) {
        (8, false) => u64::from_le_bytes(b.try_into().unwrap_or_default()),
        (8, true) => u64::from_be_bytes(b.try_into().unwrap_or_default()),
        (_, false) => u32::from_le_bytes(b.try_into().unwrap_or_default()) as u64,
        (_, true) => u32::from_be_bytes(b.try_into().unwrap_or_default()) as u64,
    }
}

/// A size from a header, accepted only when it is at most `available`.
fn bounded(n: u64, available: usize, what: &str) -> Result<usize, String> {
    usize::try_from(n)
        .ok()
        .filter(|&n| n <= available)
        .ok_or_else(|| format!("{what} of {n} bytes is larger than the {available} bytes the array holds"))
}

/// The decoded (and decompressed) bytes of one array.
fn array_bytes(src: Source, enc: Encoding) -> Result<Vec<u8>, String> {
    let hb = enc.header_bytes;
    let short = || "the data ends inside its header".to_string();
    // Header numbers: decoded from the start of the source.
    let (first, rest_start): (u64, usize) = match src {
        Source::Raw(b) => (header_number(b.get(..hb).ok_or_else(short)?, enc), hb),
        Source::Base64(t) => {
            let head = base64_decode(t.get(..b64_len(hb)).ok_or_else(short)?)?;
            (header_number(head.get(..hb).ok_or_else(short)?, enc), b64_len(hb))
        }
    };
    if !enc.zlib {
        return match src {
            Source::Raw(b) => {
                let n = bounded(first, b.len() - hb, "a header size")?;
                Ok(b[hb..hb + n].to_vec())
            }
            Source::Base64(t) => {
                let n = bounded(first, t.len(), "a header size")?;
                if t[rest_start - 1] == b'=' {
                    // Header and data encoded separately (as VTK writes them).
                    let chars =
                        t.get(rest_start..rest_start + b64_len(n)).ok_or_else(|| format!("the header says {n} bytes but fewer follow"))?;
                    let mut data = base64_decode(chars)?;
                    data.truncate(n);
                    Ok(data)
                } else {
                    let chars = t.get(..b64_len(hb + n)).ok_or_else(|| format!("the header says {n} bytes but fewer follow"))?;
                    let all = base64_decode(chars)?;
                    all.get(hb..hb + n).map(<[u8]>::to_vec).ok_or_else(|| format!("the header says {n} bytes but fewer follow"))
                }
            }
        };
    }
    // Compressed: [blocks][block size][last block size][compressed size of each block], then the blocks.
    let available = match src {
        Source::Raw(b) => b.len(),
        Source::Base64(t) => t.len(),
    };
    let blocks = bounded(first, available / hb, "a block count")?;
    let header_len = (3 + blocks) * hb;
    let (header, data) = match src {
        Source::Raw(b) => (b.get(..header_len).ok_or_else(short)?.to_vec(), b.get(header_len..).unwrap_or_default()),
        Source::Base64(t) => {
            (base64_decode(t.get(..b64_len(header_len)).ok_or_else(short)?)?, t.get(b64_len(header_len)..).unwrap_or_default())
        }
    };
    let number = |i: usize| header_number(&header[i * hb..(i + 1) * hb], enc);
    let (block_size, last_size) = (number(1), number(2));
    let compressed: Vec<u64> = (0..blocks).map(|i| number(3 + i)).collect();
    let compressed_total = compressed.iter().try_fold(0u64, |s, &c| s.checked_add(c)).ok_or("compressed block sizes overflow")?;
    let compressed_total = bounded(compressed_total, data.len(), "the compressed blocks")?;
    let block_sizes: Vec<u64> = (0..blocks).map(|i| if i + 1 == blocks && last_size != 0 { last_size } else { block_size }).collect();
    let total = block_sizes.iter().try_fold(0u64, |s, &c| s.checked_add(c)).ok_or("block sizes overflow")?;
    for (i, (&size, &packed)) in block_sizes.iter().zip(&compressed).enumerate() {
        if size > packed.saturating_mul(ZLIB_MAX_RATIO) + 64 {
            return Err(format!("block {i} claims {size} bytes from {packed} compressed bytes, more than zlib can expand to"));
        }
    }
    memory::check_allocation("the decompressed array", total).map_err(|e| e.to_string())?;
    let packed = match src {
        Source::Raw(_) => data[..compressed_total].to_vec(),
        Source::Base64(_) => {
            let mut d = base64_decode(data.get(..b64_len(compressed_total)).unwrap_or(data))?;
            d.truncate(compressed_total);
            d
        }
    };
    if packed.len() < compressed_total {
        return Err(format!("the header says {compressed_total} compressed bytes but {} follow", packed.len()));
    }
    let mut out = Vec::with_capacity(total as usize);
    let mut start = 0usize;
    for (i, (&size, &len)) in block_sizes.iter().zip(&compressed).enumerate() {
        let block = &packed[start..start + len as usize];
        start += len as usize;
        let before = out.len();
        flate2::read::ZlibDecoder::new(block)
            .take(size)
            .read_to_end(&mut out)
            .map_err(|e| format!("block {i} does not decompress: {e}"))?;
        if (out.len() - before) as u64 != size {
            return Err(format!("block {i} decompresses to {} bytes; its header says {size}", out.len() - before));
        }
    }
    Ok(out)
}
