//! Slurm batch scripts for a sharded scan: an array job with one task per shard and a merge
//! job that runs when every task has succeeded (`--dependency=afterok`). holecast shards and
//! merges; Slurm schedules. The scripts are plain text (this module writes no file).

/// What the scripts need.
#[derive(Clone, Debug)]
pub struct BatchPlan {
    /// The holecast binary (absolute path on the cluster).
    pub binary: String,
    /// The scan file (absolute path).
    pub scan_file: String,
    /// The folder of the results; shards go to `<out>/shards`, logs to `<out>/logs`.
    pub out: String,
    /// Number of shards (array tasks).
    pub shards: usize,
    /// CPUs per task (rayon threads).
    pub cpus_per_task: usize,
    /// Wall time per task (`HH:MM:SS` or any Slurm time).
    pub time: String,
    /// Memory per task (MB).
    pub mem_mb: usize,
    /// Partition, if any.
    pub partition: Option<String>,
    /// Job name.
    pub name: String,
}

fn sh_quote(s: &str) -> String {
    format!("'{}'", s.replace('\'', "'\\''"))
}

fn common(plan: &BatchPlan, what: &str) -> String {
    let mut s = format!(
        "#!/bin/bash\n# holecast scan: {what} (written by `holecast scan-slurm`)\n\
         #SBATCH --job-name={}\n",
        plan.name
    );
    if let Some(p) = &plan.partition {
        s.push_str(&format!("#SBATCH --partition={p}\n"));
    }
    s
}

/// The array job: task `K` runs shard `K/N` with `SLURM_CPUS_PER_TASK` rayon threads and
/// writes `<out>/shards/shard-K-of-N.jsonl` (a rerun resumes from its finished points) and its
/// log `<out>/logs/shard-K-of-N.{out,err}`.
pub fn array_script(plan: &BatchPlan) -> String {
    let mut s = common(plan, "array job, one task per shard");
    s.push_str(&format!(
        "#SBATCH --array=1-{n}\n#SBATCH --ntasks=1\n#SBATCH --cpus-per-task={c}\n\
         #SBATCH --mem={m}M\n#SBATCH --time={t}\n\
         #SBATCH --output={out}/logs/shard-%a-of-{n}.out\n\
         #SBATCH --error={out}/logs/shard-%a-of-{n}.err\n\
         set -euo pipefail\n\
         # rayon's threads: the CPUs Slurm gave this task.\n\
         export RAYON_NUM_THREADS=\"${{SLURM_CPUS_PER_TASK:-1}}\"\n\
         exec {bin} --quiet scan --plan {plan} --shard \"${{SLURM_ARRAY_TASK_ID}}/{n}\" \
         --out {shards}\n",
        n = plan.shards,
        c = plan.cpus_per_task,
        m = plan.mem_mb,
        t = plan.time,
        out = plan.out,
        bin = sh_quote(&plan.binary),
        plan = sh_quote(&plan.scan_file),
        shards = sh_quote(&format!("{}/shards", plan.out)),
    ));
    s
}

/// The merge job: combines the shards into `<out>` (scan.npz, scan.csv, scan.svg), byte for
/// byte what one process would have written.
pub fn merge_script(plan: &BatchPlan) -> String {
    let mut s = common(plan, "merge of the shards");
    s.push_str(&format!(
        "#SBATCH --ntasks=1\n#SBATCH --cpus-per-task=1\n#SBATCH --mem={m}M\n\
         #SBATCH --time={t}\n#SBATCH --output={out}/logs/merge.out\n\
         #SBATCH --error={out}/logs/merge.err\n\
         set -euo pipefail\n\
         exec {bin} --quiet scan-merge --out {dir} {shards}\n",
        m = plan.mem_mb,
        t = plan.time,
        out = plan.out,
        bin = sh_quote(&plan.binary),
        dir = sh_quote(&plan.out),
        shards = sh_quote(&format!("{}/shards", plan.out)),
    ));
    s
}

/// The commands that submit both jobs (the merge waits for every array task to succeed).
pub fn submit_lines(array_path: &str, merge_path: &str) -> String {
    format!(
        "array_id=$(sbatch --parsable {a})\nsbatch --dependency=afterok:${{array_id}} {m}\n",
        a = sh_quote(array_path),
        m = sh_quote(merge_path)
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scripts_carry_the_shards_threads_and_dependency() {
        let plan = BatchPlan {
            binary: "/opt/holecast".into(),
            scan_file: "/home/u/scan.json".into(),
            out: "/scratch/u/run".into(),
            shards: 7,
            cpus_per_task: 4,
            time: "01:00:00".into(),
            mem_mb: 2000,
            partition: None,
            name: "hc".into(),
        };
        let a = array_script(&plan);
        assert!(a.contains("#SBATCH --array=1-7\n"));
        assert!(a.contains("#SBATCH --cpus-per-task=4\n"));
        assert!(a.contains("RAYON_NUM_THREADS=\"${SLURM_CPUS_PER_TASK:-1}\""));
        assert!(a.contains("--shard \"${SLURM_ARRAY_TASK_ID}/7\""));
        assert!(a.contains("logs/shard-%a-of-7.out"));
        let m = merge_script(&plan);
        assert!(m.contains("scan-merge --out '/scratch/u/run' '/scratch/u/run/shards'"));
        let l = submit_lines("a.sbatch", "m.sbatch");
        assert!(l.contains("sbatch --dependency=afterok:${array_id} 'm.sbatch'"));
    }
}
