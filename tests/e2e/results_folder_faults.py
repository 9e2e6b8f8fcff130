#!/usr/bin/python3
"""A design run's results folder under interruptions and faults, and its reproducibility.

Checks (common practice for crash-safe output, no source):
  * killed (SIGTERM or SIGKILL) at random moments, the folder holds either the previous complete
    results or a new complete, self-consistent set -- never a mix, never a partial file;
  * the user's own files in the folder survive every run, byte for byte;
  * a write that fails part-way (file size limit, as a full disk would) exits with code 3, says
    which file could not be written, and leaves the previous results exactly as they were;
  * a folder that cannot be created is a clear error with exit code 3;
  * the same config and seed give byte-identical files with 1 and 2 threads and on a repeat.

Usage: results_folder_faults.py <coilwright> <source dir> <work dir> [kills]
"""
import json
import os
import random
import resource
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

tool, src, work = Path(sys.argv[1]), Path(sys.argv[2]), Path(sys.argv[3])
kills = int(sys.argv[4]) if len(sys.argv) > 4 else 12
config = src / "tests" / "e2e" / "fault-search.toml"
env = dict(os.environ, SOURCE_DATE_EPOCH="1800000000")  # a fixed report date
failures = []


def check(ok, what):
    if not ok:
        failures.append(what)
        print("FAILED:", what, flush=True)


def run(out, *extra, threads=2, preexec=None, config_file=config):
    return subprocess.run([str(tool), "--quiet", "--threads", str(threads), "design", str(config_file), "--out", str(out), *extra],
                          env=env, capture_output=True, text=True, preexec_fn=preexec)


def files(folder):
    """Relative path -> bytes of every file below `folder`."""
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def ours(rel):
    return not (rel == "notes.txt" or rel.startswith("measurements/"))


def consistent(folder):
    """A complete, self-consistent set of results: every file summary.json names is there, the
    table has one row per design, and nothing of another run is left over."""
    try:
        summary = json.loads((folder / "summary.json").read_text())
    except (OSError, ValueError) as e:
        return f"summary.json unreadable: {e}"
    listed = {"summary.json", "designs.csv", "report.html"}
    for d in summary["designs"]:
        listed |= {d["file"], d["file"].replace(".toml", "-schedule.txt"), *d["maps"]}
    present = {rel for rel in files(folder) if ours(rel) and not rel.startswith("figures/")}
    if present != listed:
        return f"files {sorted(present ^ listed)} differ from those summary.json lists"
    rows = (folder / "designs.csv").read_text().strip().splitlines()[1:]
    if len(rows) != len(summary["designs"]):
        return f"designs.csv has {len(rows)} rows for {len(summary['designs'])} designs"
    if not any(p.name.endswith(".svg") for p in (folder / "figures").glob("*")):
        return "no figures"
    return None


work.mkdir(parents=True, exist_ok=True)
shutil.rmtree(work, ignore_errors=True)
work.mkdir(parents=True)

# Reproducibility: one thread, two threads, and a repeat give the same bytes.
t0 = time.monotonic()
one, two, again = work / "threads-1", work / "threads-2", work / "repeat"
r1 = run(one, threads=1)
full_time = time.monotonic() - t0
check(r1.returncode == 0, f"design exits 0 (got {r1.returncode}: {r1.stderr})")
check(run(two, threads=2).returncode == 0, "design with 2 threads exits 0")
check(run(again, threads=2).returncode == 0, "repeated design exits 0")
check(files(one) == files(two), "1 and 2 threads give byte-identical results")
check(files(two) == files(again), "a repeated run gives byte-identical results")
check(consistent(one) is None, f"a complete run is consistent: {consistent(one)}")
new_set = files(one)

# The previous results: another field and more designs, so that every file differs from the new run's.
previous = work / "previous"
other = work / "fault-search-previous.toml"
text = config.read_text()
other.write_text(text.replace('"100 uT"', '"90 uT"').replace('radius = "40 mm"', 'radius = "30 mm"').replace("designs = 2", "designs = 3"))
check(other.read_text() != text, "the previous run's config differs")
check(run(previous, config_file=other).returncode == 0, "the previous run exits 0")
(previous / "notes.txt").write_text("the user's notes, kept across runs\n")
(previous / "measurements").mkdir()
(previous / "measurements" / "run1.csv").write_bytes(b"x[mm],Bz[uT]\r\n0,100.0\r\n")
old_set = files(previous)
check(all(old_set[k] != v for k, v in new_set.items() if k in old_set and k != "notes.txt"),
      "the previous and the new runs differ in every file (so a mix would show)")

# Killed at random moments.
rng = random.Random(20261201)
outcomes = {}
for i in range(kills):
    folder = work / f"kill-{i:02}"
    shutil.copytree(previous, folder, symlinks=True)
    sig = signal.SIGKILL if i % 2 else signal.SIGTERM
    delay = rng.uniform(0.0, 1.2 * full_time)
    p = subprocess.Popen([str(tool), "--quiet", "--threads", "2", "design", str(config), "--out", str(folder)], env=env,
                         stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    time.sleep(delay)
    p.send_signal(sig)
    _, err = p.communicate()
    now = files(folder)
    user = {k: v for k, v in now.items() if not ours(k)}
    check(user == {k: v for k, v in old_set.items() if not ours(k)}, f"kill {i}: the user's files are intact")
    check(not any(name.startswith(".") for name in os.listdir(folder)), f"kill {i}: no temporary file in the folder")
    if now == old_set:
        outcome = "previous"
    elif now == {**new_set, **user}:
        outcome = "new (finished)"
    else:
        problem = consistent(folder)
        check(problem is None, f"kill {i} ({sig.name} after {delay:.2f} s): neither the previous nor a complete new set: {problem}")
        mixed = [k for k in now if ours(k) and k in old_set and now[k] == old_set[k]]
        check(not mixed, f"kill {i}: files {mixed} of the previous run sit beside new ones")
        outcome = "new (interrupted, best so far)"
    outcomes[outcome] = outcomes.get(outcome, 0) + 1
    print(f"kill {i:2}: {sig.name:7} after {delay:5.2f} s (exit {p.returncode}) -> {outcome}", flush=True)

# A later run clears the scratch folders that killed runs left beside the results.
last = work / "kill-00"
check(run(last).returncode == 0, "a run after the kills exits 0")
left = [n for n in os.listdir(work) if n.startswith(".kill-00.")]
check(not left, f"scratch folders of killed runs are cleared: {left}")


# A write that fails part-way, as on a full disk: the file size limit makes write() fail (EFBIG).
def limit_file_size():
    signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_FSIZE, (4096, 4096))


full = work / "disk-full"
shutil.copytree(previous, full, symlinks=True)
r = run(full, preexec=limit_file_size)
check(r.returncode == 3, f"a failed write exits with code 3 (got {r.returncode})")
check("cannot write" in r.stderr and "File too large" in r.stderr, f"a failed write says what failed: {r.stderr.strip()}")
check(files(full) == old_set, "a failed write leaves the previous results exactly as they were")
check(not [n for n in os.listdir(work) if n.startswith(".disk-full.")], "a failed write leaves no scratch folder")

# A folder that cannot be created, even by root.
r = run("/proc/coilwright-results")
check(r.returncode == 3, f"an unwritable folder exits with code 3 (got {r.returncode})")
check("cannot write the results folder '/proc/coilwright-results'" in r.stderr, f"an unwritable folder is named: {r.stderr.strip()}")

print(f"{kills} kills: {outcomes}; full run {full_time:.2f} s")
if failures:
    sys.exit(f"{len(failures)} check(s) failed")
print("all checks passed")
