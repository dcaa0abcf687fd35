//! Writes the report files of the sample design into a folder:
//! `cargo run --example report_sample DIR [rect]`.
use coilwright::design::Design;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dir = std::path::PathBuf::from(
        std::env::args()
            .nth(1)
            .unwrap_or_else(|| "out-report".into()),
    );
    let mut d = Design::sample();
    if std::env::args().nth(2).as_deref() == Some("rect") {
        d.coil.shape = coilwright::design::Shape::Rectangle {
            width: 24.0,
            height: 16.0,
        };
        d.coil.inner_diameter = 6.0;
        d.coil.turns = 12.0;
        d.drive.source = coilwright::design::Source::Voltage(5.0);
        d.drive.frequency = Some(200e3);
    }
    let layout = coilwright::geometry::build(&d)?;
    let a = coilwright::physics::analyse(&d, &layout)?;
    for f in coilwright::export::report::files(&d, &layout, &a)? {
        let p = dir.join(&f.path);
        std::fs::create_dir_all(p.parent().unwrap_or(&dir))?;
        std::fs::write(&p, &f.bytes)?;
    }
    Ok(())
}
