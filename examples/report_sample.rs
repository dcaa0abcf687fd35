//! Writes the report files of the sample design into a folder:
//! `cargo run --example report_sample DIR`.
use coilwright::spec::Design;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = std::path::PathBuf::from(
        std::env::args()
            .nth(1)
            .unwrap_or_else(|| "out-report".into()),
    );
    let d = Design::sample();
    let layout = coilwright::geometry::build(&d)?;
    let a = coilwright::physics::analyse(&d, &layout)?;
    for f in coilwright::export::report::files(&d, &a)? {
        let p = dir.join(&f.path);
        std::fs::create_dir_all(p.parent().unwrap_or(&dir))?;
        std::fs::write(&p, &f.bytes)?;
    }
    Ok(())
}
