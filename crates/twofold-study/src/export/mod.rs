//! Print-ready pages: the summary of an analysis (a page per response) and the blank run sheet.
//!
//! Every page is first laid out as SVG by our own writer ([`svg`], [`page`], [`charts`]); PNG
//! (300 dpi) and PDF (vector, font embedded) are rendered from that SVG ([`render`]). The same
//! input always gives byte-identical SVG: numbers go through [`crate::numbers`], nothing reads the clock,
//! and the date printed is the one the caller passes in.
//!
//! The summary shows what the app shows: [`build`] fills a [`SummaryInput`] from the project and
//! one [`crate::report::Report`] per response ([`section`] makes each response's part), and
//! [`summary`] only draws it: a page per response, then pages of more detail for whatever did
//! not fit. Long exports run on a worker thread with progress ([`job::ExportJob`]) so the window
//! never freezes.

use std::path::{Path, PathBuf};

pub mod build;
pub mod charts;
mod decision_facts;
pub mod fonts;
pub mod input;
pub mod job;
pub mod page;
pub mod render;
pub mod run_sheet;
pub mod section;
pub mod summary;
pub mod svg;

pub use build::{BuildOptions, export_summary, run_sheet_input, summary_input};
pub use input::SummaryInput;
pub use job::{ExportJob, Stage};
pub use page::Paper;
pub use render::Format;

/// Why an export failed.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ExportError {
    /// The file name does not end in a known extension.
    #[error("`{path}`: the file name must end in .png, .svg or .pdf")]
    UnknownFormat {
        /// The path as given.
        path: String,
    },
    /// The page could not be rendered (a fault in the program, not in the project).
    #[error("the page could not be rendered: {0}")]
    Render(String),
    /// Writing the file failed; the previous file, if any, is untouched.
    #[error("could not write `{path}`: {source}")]
    Write {
        /// The file being written.
        path: String,
        /// What the system reported.
        source: std::io::Error,
    },
    /// The project has nothing this export can show.
    #[error("nothing to export: {0}")]
    Nothing(String),
    /// The export was cancelled before anything was written.
    #[error("the export was cancelled; no file was written")]
    Cancelled,
}

/// What an export wrote.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ExportReport {
    /// Files written, in page order (one file unless a multi-page sheet went to PNG or SVG).
    pub paths: Vec<PathBuf>,
    /// Format of the files.
    pub format: Format,
    /// Pages in the document.
    pub pages: usize,
    /// Total bytes written.
    pub bytes: usize,
}

/// The pages of the summary as SVG documents, in order: one per response, then the pages of
/// more detail (if any).
pub fn summary_pages(input: &SummaryInput, paper: Paper) -> Vec<String> {
    summary::render_pages(input, paper)
}

/// Pages in the given format: PDF gives one document; SVG and PNG give one file per page.
pub fn encode_pages(
    pages: &[String],
    paper: Paper,
    format: Format,
    title: &str,
) -> Result<Vec<Vec<u8>>, ExportError> {
    match format {
        Format::Svg => Ok(pages.iter().map(|p| p.clone().into_bytes()).collect()),
        Format::Png => pages.iter().map(|p| render::png(p, paper)).collect(),
        Format::Pdf => Ok(vec![render::pdf(pages, title)?]),
    }
}

/// File names for `count` files at `path`: the path itself for one file, `stem-1.ext`,
/// `stem-2.ext`, ... for several (a multi-page sheet saved as PNG or SVG).
pub fn page_paths(path: &Path, count: usize) -> Vec<PathBuf> {
    if count <= 1 {
        return vec![path.to_path_buf()];
    }
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_default();
    let ext = path.extension().map(|s| s.to_string_lossy().into_owned());
    (1..=count)
        .map(|i| {
            let name = match &ext {
                Some(e) => format!("{stem}-{i}.{e}"),
                None => format!("{stem}-{i}"),
            };
            path.with_file_name(name)
        })
        .collect()
}

/// Renders `pages` in the format chosen by `path`'s extension and writes them atomically,
/// reporting each stage to `progress`; `cancelled` is checked between stages, and nothing is
/// written once it returns `true`.
pub fn write_pages(
    pages: &[String],
    paper: Paper,
    path: &Path,
    title: &str,
    progress: &dyn Fn(Stage),
    cancelled: &dyn Fn() -> bool,
) -> Result<ExportReport, ExportError> {
    let format = Format::from_path(path)?;
    if cancelled() {
        return Err(ExportError::Cancelled);
    }
    progress(Stage::Rendering);
    let files = encode_pages(pages, paper, format, title)?;
    if cancelled() {
        return Err(ExportError::Cancelled);
    }
    progress(Stage::Writing);
    let paths = page_paths(path, files.len());
    let mut bytes = 0;
    for (p, data) in paths.iter().zip(&files) {
        crate::files::write_atomic(p, data).map_err(|source| ExportError::Write {
            path: p.display().to_string(),
            source,
        })?;
        bytes += data.len();
    }
    progress(Stage::Finished);
    Ok(ExportReport {
        paths,
        format,
        pages: pages.len(),
        bytes,
    })
}

/// Lays out the summary and writes it to `path` (format from the extension): one PDF with all
/// pages, or one PNG or SVG file per page ([`page_paths`]).
pub fn write_summary(
    input: &SummaryInput,
    path: &Path,
    paper: Paper,
) -> Result<ExportReport, ExportError> {
    let pages = summary_pages(input, paper);
    write_pages(&pages, paper, path, &summary_title(input), &|_| {}, &|| {
        false
    })
}

/// The document title of a summary.
pub fn summary_title(input: &SummaryInput) -> String {
    if input.title.trim().is_empty() {
        "Experiment summary".to_string()
    } else {
        format!("{}: summary", input.title.trim())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn multi_page_names() {
        let p = page_paths(Path::new("out/sheet.png"), 3);
        assert_eq!(p[0], Path::new("out/sheet-1.png"));
        assert_eq!(p[2], Path::new("out/sheet-3.png"));
        assert_eq!(
            page_paths(Path::new("a.pdf"), 1),
            vec![PathBuf::from("a.pdf")]
        );
    }
}
