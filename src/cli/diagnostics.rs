//! Rendering problems for people: design-file errors point into the file
//! (path:line:col, the offending text underlined, a help line).

use super::Failure;
use annotate_snippets::{AnnotationKind, Group, Level, Origin, Renderer, Snippet};
use coilwright::design::{DesignError, DesignErrors};
use std::io::{IsTerminal, Write};
use std::path::Path;

fn renderer() -> Renderer {
    let color = std::io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none();
    if color {
        Renderer::styled()
    } else {
        Renderer::plain()
    }
}

/// Renders design-file problems as text (one block per problem).
pub fn render_spec_errors(path: &Path, text: &str, errors: &DesignErrors) -> String {
    render_with(&renderer(), path, text, errors)
}

/// [`render_spec_errors`] without colour, for showing elsewhere than a
/// terminal (the workbench page).
pub fn render_spec_errors_plain(path: &Path, text: &str, errors: &DesignErrors) -> String {
    render_with(&Renderer::plain(), path, text, errors)
}

fn render_with(r: &Renderer, path: &Path, text: &str, errors: &DesignErrors) -> String {
    let path = path.display().to_string();
    let mut out = String::new();
    for e in &errors.errors {
        out.push_str(&render_one(r, &path, text, e));
        out.push_str("\n\n");
    }
    let n = errors.errors.len();
    out.push_str(&format!(
        "{n} problem{} in {path}; nothing was written\n",
        if n == 1 { "" } else { "s" }
    ));
    out
}

fn render_one(r: &Renderer, path: &str, text: &str, e: &DesignError) -> String {
    // Messages never repeat their key: the title is the key, then what is
    // wrong with it.
    let title = format!("{}: {}", e.key, e.message);
    let mut report: Vec<Group> = Vec::new();
    let main = Level::ERROR.primary_title(title.as_str());
    let group = match &e.span {
        Some(span) => {
            let span = span.start.min(text.len())..span.end.min(text.len());
            main.element(
                Snippet::source(text)
                    .path(path)
                    .annotation(AnnotationKind::Primary.span(span).label(e.key.as_str())),
            )
        }
        None => main.element(Origin::path(path)),
    };
    report.push(group);
    if let Some(help) = &e.help {
        report.push(Group::with_title(
            Level::HELP.secondary_title(help.as_str()),
        ));
    }
    r.render(&report)
}

/// Prints a failure to standard error.
pub fn render_failure(f: &Failure) {
    let text = match f {
        Failure::Spec { path, text, errors } => render_spec_errors(path, text, errors),
        Failure::BrokenPipe => return,
        Failure::Other(e) => {
            let mut s = format!("error: {e}");
            for cause in e.chain().skip(1) {
                s.push_str(&format!("\n  caused by: {cause}"));
            }
            s.push('\n');
            s
        }
    };
    let _ = std::io::stderr().write_all(text.as_bytes());
}
