//! `holecast scan`, `scan-merge` and `scan-slurm`: a grid of parameters, shards, resume, merge
//! and Slurm batch scripts. The computation and the file formats are in the library
//! (`holecast::scan`); this file reads and writes files and shows progress.

use std::fs::OpenOptions;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

use anyhow::{Context, Result, anyhow, bail};
use clap::Args;
use rayon::prelude::*;
use serde_json::Value;

use holecast::laser::LaserSpec;
use holecast::scan::axis::AxisSpec;
use holecast::scan::grid::{self, GridFile, GridKind};
use holecast::scan::record::{self, Log, PointRecord, Shard};
use holecast::scan::slurm::{self, BatchPlan};
use holecast::scan::{Combine, PointLimits, PointOutcome, ScanDefinition, ScanFile};
use holecast::target::TargetSpec;

use super::args::LaserArgs;
use super::commands::Global;
use super::output::{bytes_producer, write_atomic, write_set};
use super::progress::Progress;

/// `holecast scan`.
#[derive(Debug, Args)]
pub struct ScanArgs {
    /// Scan file (JSON; docs/scan-file.md, annotated example scans/intensity-demo.json).
    #[arg(long, value_name = "FILE", conflicts_with_all = ["target", "laser", "intensity", "wavelength", "axes", "zip", "orders", "energies", "returns", "group_delay"])]
    pub plan: Option<PathBuf>,
    /// Without a scan file: the target file.
    #[arg(long, value_name = "FILE", required_unless_present = "plan")]
    pub target: Option<PathBuf>,
    #[command(flatten)]
    pub laser: LaserArgs,
    /// Without a scan file: an axis, NAME=FROM:TO:COUNT, NAME=FROM:TO:+STEP,
    /// NAME=log:FROM:TO:COUNT or NAME=V1,V2,... (NAME: intensity, wavelength, ellipticity, cep,
    /// two-colour-phase, second-colour-ratio, fwhm, alignment, or an address such as
    /// target.channels[A].ip_ev). Repeat for more axes.
    #[arg(long = "axis", value_name = "NAME=VALUES", allow_hyphen_values = true)]
    pub axes: Vec<String>,
    /// Without a scan file: zip the axes (n-th values together) instead of every combination.
    #[arg(long)]
    pub zip: bool,
    /// Without a scan file: the common grid in harmonic orders FIRST:LAST:STEP.
    #[arg(long, value_name = "FIRST:LAST:STEP", conflicts_with = "energies")]
    pub orders: Option<String>,
    /// Without a scan file: the common grid in photon energies (eV) FIRST:LAST:STEP.
    #[arg(long, value_name = "FIRST:LAST:STEP")]
    pub energies: Option<String>,
    /// Without a scan file: highest return of the electron (1 to 8; default 1).
    #[arg(long, value_name = "N")]
    pub returns: Option<u32>,
    /// Without a scan file: also compute each family's group delay (three solves per energy).
    #[arg(long)]
    pub group_delay: bool,
    /// Compute shard K of N (points i with i mod N = K-1) into OUT/shard-K-of-N.jsonl.
    #[arg(long, value_name = "K/N")]
    pub shard: Option<String>,
    /// Stop after computing this many new points (the log keeps them; a rerun resumes).
    #[arg(long, value_name = "N")]
    pub max_points: Option<usize>,
    /// Output folder (created if missing). A folder holding an unfinished run of the same scan
    /// resumes it.
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// `holecast scan-merge`.
#[derive(Debug, Args)]
pub struct MergeArgs {
    /// Shard files, or folders holding them (every shard-K-of-N.jsonl inside).
    #[arg(value_name = "SHARDS", required = true)]
    pub shards: Vec<PathBuf>,
    /// Output folder.
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// `holecast scan-slurm`.
#[derive(Debug, Args)]
pub struct SlurmArgs {
    /// Scan file.
    #[arg(long, value_name = "FILE")]
    pub plan: PathBuf,
    /// Number of shards (array tasks).
    #[arg(long, value_name = "N")]
    pub shards: usize,
    /// CPUs per task (rayon threads per shard).
    #[arg(long, value_name = "C", default_value_t = 2)]
    pub cpus_per_task: usize,
    /// Wall time per task (Slurm time format).
    #[arg(long, value_name = "TIME", default_value = "01:00:00")]
    pub time: String,
    /// Memory per task (MB).
    #[arg(long, value_name = "MB", default_value_t = 2000)]
    pub mem_mb: usize,
    /// Partition.
    #[arg(long, value_name = "NAME")]
    pub partition: Option<String>,
    /// Job name.
    #[arg(long, value_name = "NAME", default_value = "holecast-scan")]
    pub job_name: String,
    /// The holecast binary the jobs run (default: this one).
    #[arg(long, value_name = "PATH")]
    pub binary: Option<PathBuf>,
    /// Results folder: scripts in OUT/slurm, shards in OUT/shards, logs in OUT/logs, merged
    /// files in OUT.
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// The files a complete scan writes.
const SCAN_NAMES: [&str; 3] = ["scan.npz", "scan.csv", "scan.svg"];

fn read(path: &Path, what: &str) -> Result<String> {
    std::fs::read_to_string(path).with_context(|| format!("cannot read {what} {}", path.display()))
}

fn read_target(path: &Path) -> Result<TargetSpec> {
    let text = read(path, "target file")?;
    let spec =
        TargetSpec::from_json(&text).map_err(|e| anyhow!("target file {}: {e}", path.display()))?;
    spec.validate()
        .map_err(|e| anyhow!("target file {}: {e}", path.display()))?;
    Ok(spec)
}

fn read_laser(path: &Path) -> Result<LaserSpec> {
    let text = read(path, "laser file")?;
    serde_json::from_str(&text).map_err(|e| anyhow!("laser file {}: {e}", path.display()))
}

/// The definition of a scan file (paths relative to it).
fn from_plan(path: &Path, global: &Global) -> Result<ScanDefinition> {
    let text = read(path, "scan file")?;
    let file =
        ScanFile::from_json(&text).map_err(|e| anyhow!("scan file {}: {e}", path.display()))?;
    let base = path.parent().unwrap_or(Path::new("."));
    let target = read_target(&base.join(&file.target))
        .with_context(|| format!("scan file {}, key target", path.display()))?;
    let laser = match &file.laser {
        Value::String(p) => read_laser(&base.join(p))
            .with_context(|| format!("scan file {}, key laser", path.display()))?,
        Value::Object(_) => serde_json::from_value(file.laser.clone())
            .map_err(|e| anyhow!("scan file {}, key laser: {e}", path.display()))?,
        other => bail!(
            "scan file {}, key laser: {other} is neither a laser-file path nor a laser document",
            path.display()
        ),
    };
    let definition = ScanDefinition::new(
        &file.axes,
        file.combine,
        file.returns,
        file.group_delay,
        target,
        laser,
    )
    .map_err(|e| anyhow!("scan file {}: {e}", path.display()))?;
    let g = grid::resolve(&definition, file.grid.as_ref(), &global.limits.orbits)
        .map_err(|e| anyhow!("scan file {}: {e}", path.display()))?;
    Ok(definition.with_grid(&g))
}

fn from_flags(args: &ScanArgs, global: &Global) -> Result<ScanDefinition> {
    let Some(target) = &args.target else {
        bail!("give a scan file (--plan FILE) or a target (--target FILE) with --axis");
    };
    if args.axes.is_empty() {
        bail!("give at least one --axis NAME=VALUES (or a scan file with --plan)");
    }
    let target = read_target(target)?;
    let (laser, _, _) = super::settings::laser(&args.laser)?;
    let axes: Vec<AxisSpec> = args
        .axes
        .iter()
        .map(|a| AxisSpec::from_flag(a))
        .collect::<Result<_, _>>()?;
    let combine = if args.zip {
        Combine::Zip
    } else {
        Combine::Product
    };
    let definition = ScanDefinition::new(
        &axes,
        combine,
        args.returns,
        args.group_delay,
        target,
        laser,
    )?;
    let given: Option<GridFile> = match (&args.orders, &args.energies) {
        (Some(o), _) => Some(grid::from_flag(GridKind::Order, "--orders", o)?),
        (None, Some(e)) => Some(grid::from_flag(GridKind::EnergyEv, "--energies", e)?),
        _ => None,
    };
    let g = grid::resolve(&definition, given.as_ref(), &global.limits.orbits)?;
    Ok(definition.with_grid(&g))
}

fn limits(global: &Global) -> PointLimits {
    PointLimits {
        orbits: global.limits.orbits,
        workload: global.limits.workload,
    }
}

/// Runs the missing points of `shard` into its log in `out`; returns whether the shard is
/// complete.
fn run_points(
    definition: &ScanDefinition,
    shard: Option<Shard>,
    out: &Path,
    max_points: Option<usize>,
    global: &Global,
) -> Result<(bool, PathBuf)> {
    std::fs::create_dir_all(out)
        .with_context(|| format!("cannot create output folder {}", out.display()))?;
    let path = out.join(shard.map_or(record::WHOLE_LOG.to_string(), |s| s.file_name()));
    let shard = shard.unwrap_or(Shard::WHOLE);
    let total = definition.point_count();
    let mine = shard.indices(total);
    let mut done = std::collections::BTreeSet::new();
    if path.exists() {
        let text = read(&path, "point log")?;
        let log = record::read_log(&text, &path.display().to_string())?;
        if log.header.hash != definition.hash() {
            bail!(
                "{} holds points of another scan (definition {} here, {} now: the scan file, \
                 target, laser or holecast version changed); use another --out or remove the file",
                path.display(),
                &log.header.hash[..12],
                &definition.hash()[..12]
            );
        }
        if (log.header.shard, log.header.shards) != (shard.number, shard.count) {
            bail!(
                "{} is shard {}/{}, not {}/{}",
                path.display(),
                log.header.shard,
                log.header.shards,
                shard.number,
                shard.count
            );
        }
        let file = OpenOptions::new()
            .write(true)
            .open(&path)
            .with_context(|| format!("cannot open {}", path.display()))?;
        file.set_len(log.complete_bytes as u64).with_context(|| {
            format!(
                "cannot truncate the partial last line of {}",
                path.display()
            )
        })?;
        done.extend(log.records.keys().copied());
    } else {
        std::fs::write(&path, record::header_line(definition, shard))
            .with_context(|| format!("cannot write {}", path.display()))?;
    }
    let mut todo: Vec<usize> = mine.iter().copied().filter(|i| !done.contains(i)).collect();
    if let Some(m) = max_points {
        todo.truncate(m);
    }
    if !global.quiet && !done.is_empty() {
        eprintln!(
            "resuming {}: {} of {} points already finished",
            path.display(),
            done.len(),
            mine.len()
        );
    }
    let file = OpenOptions::new()
        .append(true)
        .open(&path)
        .with_context(|| format!("cannot open {}", path.display()))?;
    let file = Mutex::new(file);
    let bar = Progress::new(global.quiet).bar("scan", "points");
    bar.set_length(todo.len() as u64);
    let limits = limits(global);
    let written: Result<Vec<()>> = todo
        .par_iter()
        .map(|&index| {
            let outcome = holecast::scan::evaluate_point(definition, index, &limits);
            let line = record::record_line(&PointRecord {
                index,
                values: definition.point_values(index),
                outcome,
            });
            let mut f = file.lock().unwrap_or_else(|e| e.into_inner());
            f.write_all(line.as_bytes())
                .with_context(|| format!("cannot append to {}", path.display()))?;
            bar.inc(1);
            Ok(())
        })
        .collect();
    bar.finish_and_clear();
    written?;
    let complete = done.len() + todo.len() == mine.len();
    Ok((complete, path))
}

/// Builds the outputs of complete logs and writes them into `out`.
fn write_outputs(logs: &[(String, Log)], out: &Path, global: &Global) -> Result<()> {
    let result = record::merge(logs)?;
    let (files, problem) = holecast::scan::outputs(&result)?;
    if let Some(p) = problem {
        eprintln!(
            "warning: scan.svg was not drawn: {p} (what to do: the data are in scan.npz and scan.csv)"
        );
    }
    let written = write_set(out, "scan", super::output::in_memory(files), &SCAN_NAMES)
        .with_context(|| format!("writing the outputs into {}", out.display()))?;
    if !global.quiet {
        for p in &written.files {
            eprintln!("wrote {}", p.display());
        }
    }
    let failed = result
        .points
        .iter()
        .filter(|p| matches!(p.outcome, PointOutcome::Failed { .. }))
        .count();
    let warned = result
        .points
        .iter()
        .filter(|p| matches!(&p.outcome, PointOutcome::Computed { warnings, .. } if !warnings.is_empty()))
        .count();
    println!(
        "{} points ({} failed, kept with their reason in point_reason); {} grid values ({}); \
         points with validity warnings: {warned} (point_warnings)",
        result.points.len(),
        failed,
        result.definition.grid_values.len(),
        result.definition.grid.name(),
    );
    if failed > 0 {
        eprintln!(
            "warning: {failed} points failed; their rows are kept with point_status = failed and \
             the reason in point_reason (what to do: read the reason; fix the range or lift the \
             limit it names)"
        );
    }
    Ok(())
}

fn read_logs(paths: &[PathBuf]) -> Result<Vec<(String, Log)>> {
    let mut files = Vec::new();
    for p in paths {
        if p.is_dir() {
            let mut inside: Vec<PathBuf> = std::fs::read_dir(p)
                .with_context(|| format!("cannot list {}", p.display()))?
                .filter_map(|e| e.ok().map(|e| e.path()))
                .filter(|f| {
                    f.file_name()
                        .and_then(|n| n.to_str())
                        .is_some_and(|n| n.starts_with("shard-") && n.ends_with(".jsonl"))
                })
                .collect();
            inside.sort();
            if inside.is_empty() {
                bail!("{} holds no shard files (shard-K-of-N.jsonl)", p.display());
            }
            files.extend(inside);
        } else {
            files.push(p.clone());
        }
    }
    files
        .iter()
        .map(|f| {
            let name = f.display().to_string();
            let text = read(f, "shard file")?;
            Ok((name.clone(), record::read_log(&text, &name)?))
        })
        .collect()
}

/// `holecast scan`.
pub fn scan(args: &ScanArgs, global: &Global) -> Result<()> {
    let definition = match &args.plan {
        Some(p) => from_plan(p, global)?,
        None => from_flags(args, global)?,
    };
    let shard = args.shard.as_deref().map(Shard::parse).transpose()?;
    let (complete, path) = run_points(&definition, shard, &args.out, args.max_points, global)?;
    if !complete {
        println!(
            "stopped after the point budget: finished points are in {}; run the same command \
             again to resume",
            path.display()
        );
        return Ok(());
    }
    if let Some(shard) = shard {
        println!(
            "shard {}/{} complete: {} (merge all shards with holecast scan-merge)",
            shard.number,
            shard.count,
            path.display()
        );
        return Ok(());
    }
    let logs = read_logs(std::slice::from_ref(&path))?;
    write_outputs(&logs, &args.out, global)
}

/// `holecast scan-merge`.
pub fn merge(args: &MergeArgs, global: &Global) -> Result<()> {
    let logs = read_logs(&args.shards)?;
    write_outputs(&logs, &args.out, global)
}

fn absolute(p: &Path) -> Result<PathBuf> {
    Ok(if p.is_absolute() {
        p.to_path_buf()
    } else {
        std::env::current_dir()?.join(p)
    })
}

/// `holecast scan-slurm`.
pub fn slurm(args: &SlurmArgs, global: &Global) -> Result<()> {
    let definition = from_plan(&args.plan, global)?;
    if args.shards == 0 {
        bail!("--shards 0: need at least one shard");
    }
    if args.cpus_per_task == 0 {
        bail!("--cpus-per-task 0: need at least one CPU");
    }
    let points = definition.point_count();
    if args.shards > points {
        bail!(
            "--shards {}: the scan has only {points} points",
            args.shards
        );
    }
    let out = absolute(&args.out)?;
    let binary = match &args.binary {
        Some(b) => absolute(b)?,
        None => {
            std::env::current_exe().context("cannot find this program's path; give --binary")?
        }
    };
    let plan = BatchPlan {
        binary: binary.display().to_string(),
        scan_file: absolute(&args.plan)?.display().to_string(),
        out: out.display().to_string(),
        shards: args.shards,
        cpus_per_task: args.cpus_per_task,
        time: args.time.clone(),
        mem_mb: args.mem_mb,
        partition: args.partition.clone(),
        name: args.job_name.clone(),
    };
    for d in ["slurm", "logs", "shards"] {
        std::fs::create_dir_all(out.join(d))
            .with_context(|| format!("cannot create {}", out.join(d).display()))?;
    }
    let array = out.join("slurm/scan-array.sbatch");
    let merge = out.join("slurm/scan-merge.sbatch");
    write_atomic(
        &array,
        bytes_producer(slurm::array_script(&plan).into_bytes()),
    )?;
    write_atomic(
        &merge,
        bytes_producer(slurm::merge_script(&plan).into_bytes()),
    )?;
    if !global.quiet {
        eprintln!(
            "wrote {} and {} ({points} points in {} shards, scan {})",
            array.display(),
            merge.display(),
            args.shards,
            &definition.hash()[..12]
        );
    }
    print!(
        "{}",
        slurm::submit_lines(&array.display().to_string(), &merge.display().to_string())
    );
    Ok(())
}
