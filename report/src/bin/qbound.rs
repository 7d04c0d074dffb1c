//! `qbound`: audit fixed-point datapaths, gate them in CI, write bit-exact
//! test vectors, describe formats.
//!
//! Exit status: 0 all is well; 1 `check` found a reason to fail; 2 a usage
//! or input error (bad option, missing file, malformed audit text); 3 an
//! internal error (the simulation measured an error outside the analysis'
//! bound: a bug in qbound, please report it with the file).

use std::io::{self, IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

use clap::{Parser, Subcommand, ValueEnum};
use qbound_report::gate::{self, SaturationPolicy};
use qbound_report::render::{self, Context, Style};
use qbound_report::simulate::{self, Control};
use qbound_report::{Datapath, Report, SimulationOptions, analyze, parse, vectors};

/// Set by the first Ctrl-C: long runs stop after their current batch and
/// report what they measured. A second Ctrl-C ends the process at once.
static STOP: AtomicBool = AtomicBool::new(false);

/// The exit status of a run that Ctrl-C cut short (128 + SIGINT, common
/// practice for shells).
const EXIT_INTERRUPTED: u8 = 130;

const EXIT_STATUS: &str = "\
Exit status:
  0  no finding (for `check`), or the command did its job
  1  `check` found a reason to fail (one line per reason)
  2  usage or input error: bad option, missing file, malformed audit text
  3  internal error: the simulation contradicted the analysis (a bug; please report it)
  130  stopped by Ctrl-C: the report of the vectors done so far was written

The audit supports but does not replace the verification that safety-related
firmware needs under its applicable safety standard and local practice.";

#[derive(Parser)]
#[command(
    name = "qbound",
    version,
    about = "Fixed-point datapath audits: ranges, overflow, sound error bounds, bit-exact simulation",
    after_help = EXIT_STATUS
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Audit a datapath file and print the report (the text format is in report/FORMAT.md)
    #[command(after_help = EXIT_STATUS)]
    Audit(AuditArgs),
    /// Gate a datapath in CI: exit 1 with one line per reason when a budget fails, a node can wrap,
    /// or a node can saturate where that is not allowed
    #[command(after_help = EXIT_STATUS)]
    Check(CheckArgs),
    /// Write bit-exact test vectors: vectors.csv (decimal and hex) and one NAME.hex per signal
    /// (one word per line, for $readmemh)
    #[command(after_help = EXIT_STATUS)]
    Vectors(VectorArgs),
    /// Describe formats: range, step, width, storage, resolution in dB
    Describe(DescribeArgs),
}

#[derive(Clone, Copy, ValueEnum)]
enum OutFormat {
    /// A table for the terminal
    Terminal,
    /// Markdown
    Md,
    /// The full report as JSON (exact rationals included)
    Json,
    /// One self-contained HTML file with SVG plots
    Html,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum ColorChoice {
    /// Colour when writing to a terminal and NO_COLOR is unset
    Auto,
    /// Always colour
    Always,
    /// Never colour
    Never,
}

#[derive(clap::Args)]
struct AuditArgs {
    /// The audit file
    file: PathBuf,
    /// Report format (default: terminal, or from the extension of -o: .md, .json, .html)
    #[arg(long, short = 'f', value_enum)]
    format: Option<OutFormat>,
    /// Write the report to this file instead of standard output
    #[arg(long, short = 'o', value_name = "FILE")]
    output: Option<PathBuf>,
    /// Random vectors of the simulation (0: analysis only)
    #[arg(long, value_name = "N", default_value_t = 10_000)]
    vectors: u64,
    /// Seed of the random vectors (decimal or 0x hex)
    #[arg(long, value_name = "S", value_parser = parse_seed)]
    seed: Option<u64>,
    /// No progress display
    #[arg(long, short = 'q')]
    quiet: bool,
    /// Colour in the terminal report
    #[arg(long, value_enum, default_value_t = ColorChoice::Auto)]
    color: ColorChoice,
}

#[derive(clap::Args)]
struct CheckArgs {
    /// The audit file
    file: PathBuf,
    /// Nodes where saturation is intended (repeat or separate with commas; `*` for all)
    #[arg(long, value_name = "NAME", value_delimiter = ',')]
    allow_saturation: Vec<String>,
    /// Also run a simulation with N random vectors (confirms the analysis; the gate itself
    /// rests on the sound bounds)
    #[arg(long, value_name = "N", default_value_t = 0)]
    simulate: u64,
    /// Seed of the simulation (decimal or 0x hex)
    #[arg(long, value_name = "S", value_parser = parse_seed)]
    seed: Option<u64>,
    /// Print nothing when the check passes
    #[arg(long, short = 'q')]
    quiet: bool,
}

#[derive(clap::Args)]
struct VectorArgs {
    /// The audit file
    file: PathBuf,
    /// Number of vectors (corners of the input box first when there are few)
    #[arg(long, short = 'n', value_name = "N", default_value_t = 1000)]
    count: u64,
    /// Seed (decimal or 0x hex); the same seed gives the same vectors
    #[arg(long, value_name = "S", default_value = "1", value_parser = parse_seed)]
    seed: u64,
    /// Directory for vectors.csv and the .hex files (created if missing)
    #[arg(long, value_name = "DIR")]
    out_dir: PathBuf,
    /// Print nothing on success
    #[arg(long, short = 'q')]
    quiet: bool,
}

#[derive(clap::Args)]
struct DescribeArgs {
    /// Formats such as Q1.15, UQ8.8, q0.31
    #[arg(required = true, value_name = "FORMAT")]
    formats: Vec<String>,
    /// Print JSON instead of text
    #[arg(long)]
    json: bool,
}

fn parse_seed(s: &str) -> Result<u64, String> {
    let r = match s.strip_prefix("0x").or_else(|| s.strip_prefix("0X")) {
        Some(h) => u64::from_str_radix(&h.replace('_', ""), 16),
        None => s.replace('_', "").parse(),
    };
    r.map_err(|_| format!("`{s}` is not a seed: give an integer such as 42 or 0x5eed"))
}

/// What went wrong, and which exit status it gives.
enum Failure {
    /// Usage or input error (status 2), already explained on stderr.
    Input,
    /// An internal error (status 3).
    Bug(String),
}

fn input_error(msg: &str, hint: &str) -> Failure {
    let mut e = io::stderr().lock();
    let (red, reset) = if io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none() {
        ("\x1b[1;31m", "\x1b[0m")
    } else {
        ("", "")
    };
    let _ = writeln!(e, "{red}error{reset}: {msg}");
    if !hint.is_empty() {
        let _ = writeln!(e, "  hint: {hint}");
    }
    Failure::Input
}

fn read_datapath(file: &Path) -> Result<(String, Datapath), Failure> {
    let shown = file.display().to_string();
    let text = match std::fs::read(file) {
        Ok(bytes) => match String::from_utf8(bytes) {
            // A UTF-8 byte-order mark (some Windows editors write one) is
            // not part of the text.
            Ok(t) => t.strip_prefix('\u{feff}').map(str::to_owned).unwrap_or(t),
            Err(e) => {
                let at = e.utf8_error().valid_up_to();
                let good = &e.as_bytes()[..at];
                let line = good.iter().filter(|&&b| b == b'\n').count() + 1;
                let start = good.iter().rposition(|&b| b == b'\n').map_or(0, |p| p + 1);
                let column = String::from_utf8_lossy(&good[start..]).chars().count() + 1;
                return Err(input_error(
                    &format!(
                        "{shown}:{line}:{column}: not UTF-8 text (byte 0x{:02x} cannot start or continue a character here)",
                        e.as_bytes()[at]
                    ),
                    "save the audit file as UTF-8 (see report/FORMAT.md)",
                ));
            }
        },
        Err(e) if e.kind() == io::ErrorKind::NotFound => {
            return Err(input_error(
                &format!("cannot read {shown}: no such file"),
                "give the path of an audit file, e.g. report/demos/load_cell.qbdp",
            ));
        }
        Err(e) => {
            return Err(input_error(
                &format!("cannot read {shown}: {e}"),
                if file.is_dir() {
                    "give an audit file, not a directory"
                } else {
                    "check the path and its permissions"
                },
            ));
        }
    };
    match parse(&text) {
        Ok(p) => Ok((text, p)),
        Err(err) => {
            let color = io::stderr().is_terminal() && std::env::var_os("NO_COLOR").is_none();
            let _ = render::source::parse_error(&err, &text, &shown, color, &mut io::stderr());
            Err(Failure::Input)
        }
    }
}

/// Run `f`, showing a spinner on stderr if it takes longer than a second
/// (never when `quiet` or when stderr is not a terminal).
fn with_progress<T: Send>(quiet: bool, message: &str, f: impl FnOnce() -> T + Send) -> T {
    if quiet || !io::stderr().is_terminal() {
        return f();
    }
    let done = AtomicBool::new(false);
    std::thread::scope(|s| {
        s.spawn(|| {
            for _ in 0..20 {
                std::thread::sleep(Duration::from_millis(50));
                if done.load(Ordering::Relaxed) {
                    return;
                }
            }
            let bar = indicatif::ProgressBar::new_spinner();
            bar.set_style(
                indicatif::ProgressStyle::with_template("{spinner} {msg} ({elapsed})")
                    .unwrap_or_else(|_| indicatif::ProgressStyle::default_spinner()),
            );
            bar.set_message(message.to_owned());
            bar.enable_steady_tick(Duration::from_millis(100));
            while !done.load(Ordering::Relaxed) {
                std::thread::sleep(Duration::from_millis(50));
            }
            bar.finish_and_clear();
        });
        let r = f();
        done.store(true, Ordering::Relaxed);
        r
    })
}

/// A progress bar on stderr for `total` steps (hidden when `quiet` or when
/// stderr is not a terminal).
fn progress_bar(quiet: bool, total: u64, what: &str) -> indicatif::ProgressBar {
    if quiet || !io::stderr().is_terminal() {
        return indicatif::ProgressBar::hidden();
    }
    let bar = indicatif::ProgressBar::new(total);
    bar.set_style(
        indicatif::ProgressStyle::with_template(
            "{spinner} {msg} [{bar:30}] {human_pos}/{human_len} ({per_sec}, about {eta} left; Ctrl-C stops and reports)",
        )
        .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar())
        .progress_chars("=> "),
    );
    bar.set_message(what.to_owned());
    bar.enable_steady_tick(Duration::from_millis(200));
    bar
}

/// The report of `path`, with a simulation of `vectors` random vectors
/// (none for 0). Returns whether Ctrl-C stopped the simulation.
fn run_report(
    path: &Datapath,
    vectors: u64,
    seed: Option<u64>,
    quiet: bool,
) -> Result<(Report, bool), Failure> {
    let analysis = with_progress(quiet, "analysing", || analyze(path));
    if vectors == 0 {
        return Ok((analysis.report(path), false));
    }
    let mut opts = SimulationOptions {
        random_vectors: vectors,
        ..SimulationOptions::default()
    };
    if let Some(s) = seed {
        opts.seed = s;
    }
    if !quiet && !io::stderr().is_terminal() && vectors >= 10_000_000 {
        eprintln!(
            "qbound: simulating {vectors} random vectors; Ctrl-C stops and reports the measurements so far"
        );
    }
    let bar = progress_bar(quiet, vectors, "simulating");
    let progress = |done: u64, _total: u64| bar.set_position(done);
    let control = Control {
        progress: Some(&progress),
        stop: Some(&STOP),
    };
    let sim =
        simulate::run(path, &analysis, &opts, control).map_err(|e| Failure::Bug(e.to_string()));
    bar.finish_and_clear();
    let sim = sim?;
    let interrupted = sim.summary.interrupted;
    Ok((
        qbound_report::verdict::assemble(path, &analysis, Some(&sim)),
        interrupted,
    ))
}

fn audit(a: &AuditArgs) -> Result<ExitCode, Failure> {
    let style = match (a.format, &a.output) {
        (Some(OutFormat::Terminal), _) => Style::Terminal,
        (Some(OutFormat::Md), _) => Style::Markdown,
        (Some(OutFormat::Json), _) => Style::Json,
        (Some(OutFormat::Html), _) => Style::Html,
        (None, Some(o)) => {
            Style::from_extension(&o.display().to_string()).unwrap_or(Style::Terminal)
        }
        (None, None) => Style::Terminal,
    };
    let (text, path) = read_datapath(&a.file)?;
    let (report, interrupted) = run_report(&path, a.vectors, a.seed, a.quiet)?;
    let mut ctx = Context::new(&a.file.display().to_string());
    ctx.source = Some(text);
    ctx.color = match a.color {
        ColorChoice::Always => true,
        ColorChoice::Never => false,
        ColorChoice::Auto => {
            a.output.is_none()
                && io::stdout().is_terminal()
                && std::env::var_os("NO_COLOR").is_none()
        }
    } && style == Style::Terminal;
    match &a.output {
        Some(o) => {
            let written = std::fs::File::create(o).and_then(|f| {
                let mut w = io::BufWriter::new(f);
                render::render(&report, &ctx, style, &mut w)?;
                w.flush()
            });
            if let Err(e) = written {
                return Err(input_error(
                    &format!("cannot write {}: {e}", o.display()),
                    "check that the directory exists and is writable",
                ));
            }
            if !a.quiet {
                eprintln!("wrote {}", o.display());
            }
        }
        None => {
            let mut out = io::BufWriter::new(io::stdout().lock());
            // A closed pipe (`| head`) is not an error of ours.
            let _ = render::render(&report, &ctx, style, &mut out).and_then(|()| out.flush());
        }
    }
    if interrupted {
        eprintln!("qbound: interrupted by Ctrl-C: the report holds the vectors done so far");
        return Ok(ExitCode::from(EXIT_INTERRUPTED));
    }
    Ok(ExitCode::SUCCESS)
}

fn check(a: &CheckArgs) -> Result<ExitCode, Failure> {
    let (_, path) = read_datapath(&a.file)?;
    let (report, interrupted) = run_report(&path, a.simulate, a.seed, a.quiet)?;
    if interrupted {
        eprintln!("qbound: interrupted by Ctrl-C: no verdict");
        return Ok(ExitCode::from(EXIT_INTERRUPTED));
    }
    let policy = SaturationPolicy::from_names(&a.allow_saturation);
    let unknown = policy.unknown_names(&report);
    if !unknown.is_empty() {
        let names: Vec<&str> = report.nodes.iter().map(|n| n.label.as_str()).collect();
        return Err(input_error(
            &format!(
                "--allow-saturation names no node of {}: {}",
                a.file.display(),
                unknown.join(", ")
            ),
            &format!("the nodes are: {}", names.join(", ")),
        ));
    }
    let failures = gate::check(&report, &policy);
    let file = a.file.display();
    let mut out = io::stdout().lock();
    if failures.is_empty() {
        if !a.quiet {
            let _ = writeln!(
                out,
                "{file}: ok ({} nodes, {} outputs; budgets met by the sound bounds, no wrap, no unexpected saturation)",
                report.nodes.len(),
                report.outputs.len()
            );
        }
        return Ok(ExitCode::SUCCESS);
    }
    for f in &failures {
        let at = f.line.map(|l| format!(":{l}")).unwrap_or_default();
        let _ = writeln!(out, "{file}{at}: FAIL: {}", f.reason);
    }
    let _ = writeln!(
        out,
        "{file}: {} reason{} to fail",
        failures.len(),
        if failures.len() == 1 { "" } else { "s" }
    );
    Ok(ExitCode::from(1))
}

fn write_vectors(a: &VectorArgs) -> Result<ExitCode, Failure> {
    let (_, path) = read_datapath(&a.file)?;
    let set = match vectors::test_vectors(&path, a.count, a.seed) {
        Ok(s) => s,
        Err(e) => return Err(input_error(&e.to_string(), "")),
    };
    let bar = progress_bar(a.quiet, a.count, "writing vectors");
    let progress = |done: u64| {
        bar.set_position(done);
        !STOP.load(Ordering::Relaxed)
    };
    let written = set.write_dir(&a.out_dir, &progress);
    bar.finish_and_clear();
    match written {
        Ok((files, stats)) => {
            if stats.panicked_rows > 0 {
                eprintln!(
                    "warning: in {} of {} vectors a rescale whose overflow mode is `panic` overflowed; \
those rows hold the saturated value, which panicking firmware never produces \
(see the node's overflow verdict in `qbound audit`)",
                    stats.panicked_rows, stats.rows
                );
            }
            if !a.quiet {
                println!(
                    "wrote {} vectors ({} corners first, then random; seed {}) to {}:",
                    stats.rows,
                    set.corners.min(stats.rows),
                    a.seed,
                    a.out_dir.display()
                );
                for (f, s) in files.iter().skip(1).zip(set.signals()) {
                    println!(
                        "  {:<28} {} ({} bits)",
                        f.display(),
                        s.format,
                        s.format.width()
                    );
                }
                println!("  {}", files[0].display());
            }
            if stats.rows < a.count {
                eprintln!(
                    "qbound: interrupted by Ctrl-C after {} of {} vectors",
                    stats.rows, a.count
                );
                return Ok(ExitCode::from(EXIT_INTERRUPTED));
            }
            Ok(ExitCode::SUCCESS)
        }
        Err(e) => Err(input_error(
            &e.to_string(),
            "check that the directory can be created and written",
        )),
    }
}

fn describe(a: &DescribeArgs) -> Result<ExitCode, Failure> {
    let mut descs = Vec::new();
    for f in &a.formats {
        match f.parse::<qbound::Format>() {
            Ok(fmt) => descs.push(qbound_report::describe::describe(fmt)),
            Err(e) => {
                return Err(input_error(
                    &format!("`{f}` is not a format: {e}"),
                    "write Q<int>.<frac> or UQ<int>.<frac>, at most 128 bits, e.g. Q1.15 or UQ8.8",
                ));
            }
        }
    }
    let mut out = io::stdout().lock();
    if a.json {
        let text = serde_json::to_string_pretty(&descs).map_err(|e| Failure::Bug(e.to_string()))?;
        let _ = writeln!(out, "{text}");
    } else {
        for (i, d) in descs.iter().enumerate() {
            if i > 0 {
                let _ = writeln!(out);
            }
            let _ = d.write_text(&mut out);
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    // First Ctrl-C: stop after the current batch and report; second: now.
    let _ = ctrlc::set_handler(|| {
        if STOP.swap(true, Ordering::SeqCst) {
            std::process::exit(i32::from(EXIT_INTERRUPTED));
        }
    });
    let r = match &cli.command {
        Command::Audit(a) => audit(a),
        Command::Check(a) => check(a),
        Command::Vectors(a) => write_vectors(a),
        Command::Describe(a) => describe(a),
    };
    match r {
        Ok(code) => code,
        Err(Failure::Input) => ExitCode::from(2),
        Err(Failure::Bug(msg)) => {
            eprintln!("internal error: {msg}");
            eprintln!("  this is a bug in qbound: please report it with the audit file");
            ExitCode::from(3)
        }
    }
}
