//! Checks of a run's pictures and report page: every PNG decodes with the
//! size it was drawn at and is not blank; `index.html` is well formed and
//! every image it shows exists.

use std::path::Path;

use olli_app::job::Job;
use olli_app::report::{self, Options, Picture};

/// Width and height of every picture olli draws (line charts 900 × 600,
/// contours 900 × 700).
const SIZES: [(u32, u32); 2] = [(900, 600), (900, 700)];

/// Width, height and the standard deviation of the grey levels of a PNG.
pub fn png_stats(path: &Path) -> (u32, u32, f64) {
    let file = std::fs::File::open(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let mut reader = png::Decoder::new(std::io::BufReader::new(file)).read_info().unwrap();
    let mut pixels = vec![0u8; reader.output_buffer_size()];
    let info = reader.next_frame(&mut pixels).unwrap();
    assert_eq!(info.color_type, png::ColorType::Rgb);
    let grey: Vec<f64> = pixels[..info.buffer_size()].chunks(3).map(|p| (p[0] as f64 + p[1] as f64 + p[2] as f64) / 3.0).collect();
    let mean = grey.iter().sum::<f64>() / grey.len() as f64;
    let variance = grey.iter().map(|g| (g - mean).powi(2)).sum::<f64>() / grey.len() as f64;
    (info.width, info.height, variance.sqrt())
}

/// Tags that HTML writes without a closing tag.
const VOID: [&str; 4] = ["meta", "img", "br", "hr"];

/// Checks that `html` is well formed (doctype, every element closed in
/// order, only known entities) and returns the `src` of every image.
pub fn check_html(html: &str) -> Vec<String> {
    assert!(html.starts_with("<!DOCTYPE html>"), "no doctype");
    let mut open: Vec<String> = Vec::new();
    let mut images = Vec::new();
    let mut rest = html;
    while let Some(start) = rest.find('<') {
        let text = &rest[..start];
        check_entities(text);
        let end = rest[start..].find('>').unwrap_or_else(|| panic!("unclosed tag at `{}`", &rest[start..]));
        let tag = &rest[start + 1..start + end];
        rest = &rest[start + end + 1..];
        if tag.starts_with('!') {
            continue;
        }
        if let Some(name) = tag.strip_prefix('/') {
            assert_eq!(open.pop().as_deref(), Some(name), "closing </{name}> does not match");
            continue;
        }
        let name = tag.split_whitespace().next().unwrap_or("").to_string();
        assert!(!name.is_empty() && name.chars().all(|c| c.is_ascii_alphanumeric()), "bad tag <{tag}>");
        assert_eq!(tag.matches('"').count() % 2, 0, "unbalanced quotes in <{tag}>");
        check_entities(tag);
        if name == "img" {
            let src = tag.split("src=\"").nth(1).and_then(|s| s.split('"').next()).expect("img without src");
            images.push(src.to_string());
            assert!(tag.contains("alt=\""), "img without alt");
        }
        if !VOID.contains(&name.as_str()) {
            open.push(name);
        }
    }
    assert!(open.is_empty(), "unclosed elements {open:?}");
    images
}

fn check_entities(text: &str) {
    for (i, _) in text.match_indices('&') {
        let entity = &text[i..text[i..].find(';').map_or(text.len(), |e| i + e + 1)];
        assert!(["&amp;", "&lt;", "&gt;", "&quot;"].contains(&entity), "bad entity `{entity}`");
    }
}

/// Draws the report of the run in `folder` and checks every picture and
/// the page; returns the pictures.
pub fn check_report(job: Option<&Job>, folder: &Path) -> Vec<Picture> {
    let pictures = report::write_report(folder, folder, job, &Options::default()).unwrap_or_else(|e| panic!("{e}"));
    for p in &pictures {
        let (w, h, spread) = png_stats(&folder.join(&p.file));
        assert!(SIZES.contains(&(w, h)), "{}: {w} × {h}", p.file);
        // A blank picture has spread 0; text and lines alone give several grey levels.
        assert!(spread > 10.0, "{}: grey-level spread {spread:.1}", p.file);
    }
    let html = std::fs::read_to_string(folder.join("index.html")).unwrap();
    let images = check_html(&html);
    assert_eq!(images.len(), pictures.len());
    for src in &images {
        assert!(folder.join(src).is_file(), "index.html shows {src}, which does not exist");
    }
    assert!(html.contains("Caution"));
    pictures
}

/// The file names of `pictures`.
pub fn names(pictures: &[Picture]) -> Vec<&str> {
    pictures.iter().map(|p| p.file.as_str()).collect()
}
