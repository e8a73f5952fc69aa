#!/usr/bin/env bash
# Slurm job for a long capgap sweep: MPI across the allocated nodes, always
# started with --resume, so a pre-empted, timed-out or requeued job simply
# continues from its checkpoint (results/<name>.h5.ckpt) and loses at most
# the work in flight (about sweep.checkpoint_seconds of computation).
#
# Submit:   sbatch configs/slurm_job.sh configs/demo.ini
# Extend a finished sweep (more errors per point, same streams):
#           sbatch configs/slurm_job.sh configs/demo.ini --set sweep.stop_bit_errors=1000
#
# Needs capgap built with -DCAPGAP_MPI=ON (OpenMPI from Debian: openmpi-bin,
# libopenmpi-dev) on a file system every node sees. Not run on a real Slurm
# cluster in this repository's CI; `bash -n` checks its syntax there.
#
#SBATCH --job-name=capgap
#SBATCH --nodes=2
#SBATCH --ntasks-per-node=1         # one capgap rank per node ...
#SBATCH --cpus-per-task=32          # ... using all its cores as threads
#SBATCH --time=12:00:00
#SBATCH --requeue                   # pre-emption puts the job back in the queue
#SBATCH --open-mode=append          # keep the log of earlier attempts
#SBATCH --signal=B:USR1@300         # warn the script 5 min before the time limit
#SBATCH --output=capgap-%j.log
set -euo pipefail

config="${1:?usage: sbatch configs/slurm_job.sh CONFIG [capgap run options...]}"
shift
capgap="${CAPGAP:-build/capgap}"
output="${OUTPUT:-results/$(basename "${config%.*}").h5}"
threads="${SLURM_CPUS_PER_TASK:-0}"
mkdir -p "$(dirname "$output")"  # capgap wants the directory of -o to exist

echo "capgap job ${SLURM_JOB_ID:-?} attempt ${SLURM_RESTART_COUNT:-0} on ${SLURM_JOB_NODELIST:-?}"

# mpirun reads the allocation from Slurm (srun --mpi=pmix works as well).
mpirun --map-by ppr:1:node --bind-to none \
  "$capgap" run "$config" -o "$output" --resume --threads "$threads" "$@" &
launcher=$!

# Near the time limit: requeue this job, then let capgap save and stop
# (mpirun passes SIGTERM to every rank; rank 0 rewrites the checkpoint at once).
# On pre-emption Slurm itself signals every process and requeues the job.
requeued=0
on_time_limit() {
  requeued=1
  scontrol requeue "${SLURM_JOB_ID}" || true
  kill -TERM "$launcher" 2>/dev/null || true
}
trap on_time_limit USR1

status=0
wait "$launcher" || status=$?
# A trapped signal ends `wait` early: wait again for capgap to finish saving.
if (( requeued )); then
  status=0
  wait "$launcher" || status=$?
fi

case "$status" in
  0)  echo "capgap: sweep complete: $output" ;;
  75) echo "capgap: stopped with the checkpoint saved; the requeued job resumes it" ;;
  *)  echo "capgap: exit status $status (pre-emption or a lost rank: the next attempt resumes;" \
           "1 on the first attempt usually means a config error, see above)" ;;
esac
exit "$status"
