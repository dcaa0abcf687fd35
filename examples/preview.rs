//! Writes SVG previews of the sample design into a folder (default
//! `preview-sample`): `cargo run --example preview -- DIR`.
use coilwright::{design::Design, export, geometry};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = std::env::args()
        .nth(1)
        .unwrap_or_else(|| "preview-sample".into());
    let design = Design::sample();
    let layout = geometry::build(&design)?;
    std::fs::create_dir_all(&dir)?;
    for f in export::previews(&layout, &[]) {
        let name = f.path.rsplit('/').next().unwrap_or(&f.path).to_string();
        std::fs::write(std::path::Path::new(&dir).join(name), f.bytes)?;
    }
    Ok(())
}
