//! Parse an audit file, analyse and simulate it, print the report as JSON.
//! `cargo run -p qbound-report --example audit_file -- path/to/file.qbdp`
fn main() -> Result<(), Box<dyn std::error::Error>> {
    let path = std::env::args().nth(1).ok_or("usage: audit_file FILE")?;
    let text = std::fs::read_to_string(&path)?;
    let dp = qbound_report::parse(&text)?;
    let a = qbound_report::analyze(&dp);
    let r = qbound_report::simulate(&dp, &a, &qbound_report::SimulationOptions::default())?;
    println!("{}", r.to_json());
    Ok(())
}
