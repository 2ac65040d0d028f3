"""Time the command line as a user meets it: start-up, and read commands on a cached 10,000-contact workspace.

Run from the project root: ``python benchmarks/bench_cli.py [--workspace PATH] [--contacts N] [--runs 5]``
(``--startup-only`` skips the workspace). Aims: ``mynet --help`` and ``--version`` < 0.25 s; every
read command on a cached 10,000-contact workspace < 0.5 s (50,000 contacts: < 1 s; ``why`` < 0.2 s).

Each figure is the median (and the slowest) of ``--runs`` fresh processes: wall time, CPU time beside
it (on a busy machine the wall time grows, the CPU time does not) and peak resident memory, printed
beside two references measured in the same run: ``python -c pass`` (the interpreter alone) and
``python -c "import pandas"`` (one heavy library). Read commands run once untimed first (a first run
may fill a cache). The workspace is built once with :func:`bench_tui.build` (invented people at
``orgN.example``, a calendar of meetings with you) and analysed before timing, as after any
``mynet import``. ``PYTHONPATH=another-tree`` times that tree instead. Prints figures only; asserts
nothing.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

def run(argv: list[str], env: dict[str, str]) -> tuple[float, float, float, int]:
    """Wall seconds, CPU seconds and peak RSS (MiB) of one fresh process, and its exit code."""
    t = time.perf_counter()
    child = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env)
    _pid, status, usage = os.wait4(child.pid, 0)
    wall = time.perf_counter() - t
    child.returncode = os.waitstatus_to_exitcode(status)
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024, child.returncode


def measure(label: str, argv: list[str], runs: int, env: dict[str, str], ref: float | None = None,
            warm_up: bool = False) -> float:
    """Print the median wall and CPU time over ``runs`` fresh processes (after one untimed run with ``warm_up``)."""
    if warm_up:
        run(argv, env)  # a first run may fill a cache (today's warmth, the event index): timed reads come after
    times, cpus, peak, code = [], [], 0.0, 0
    for _ in range(runs):
        wall, cpu, rss, code = run(argv, env)
        times.append(wall)
        cpus.append(cpu)
        peak = max(peak, rss)
    med = statistics.median(times)
    ratio = f"  {med / ref:5.1f}x python -c pass" if ref else ""
    bad = "" if code == 0 else f"  (exit {code})"
    print(f"  {label:<38} median {med:6.3f} s (CPU {statistics.median(cpus):6.3f} s)  max {max(times):6.3f} s  "
          f"{peak:5.0f} MiB{ratio}{bad}")
    return med


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--workspace", type=Path, default=Path(tempfile.gettempdir()) / "mynet-bench-tui" / "ws.sqlite")
    ap.add_argument("--contacts", type=int, default=10_000)
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--startup-only", action="store_true")
    args = ap.parse_args()
    py = sys.executable
    mynet = [py, "-m", "mynet"]  # as the console script does (and PYTHONPATH=an-older-tree times that tree)
    env = dict(os.environ)
    print(f"start-up ({args.runs} fresh processes each; wall time, slowest, peak resident memory):")
    ref = measure("python -c pass (reference)", [py, "-c", "pass"], args.runs, env)
    measure('python -c "import pandas" (reference)', [py, "-c", "import pandas"], args.runs, env, ref)
    measure("mynet --help", [*mynet, "--help"], args.runs, env, ref)
    measure("mynet --version", [*mynet, "--version"], args.runs, env, ref)
    if args.startup_only:
        return
    ws = args.workspace
    if not ws.exists():
        import bench_tui

        ws.parent.mkdir(parents=True, exist_ok=True)
        bench_tui.build(ws, args.contacts)
    from mynet import open_workspace

    with open_workspace(ws) as w:  # analysed and cached, as after any import
        w.analysis()
        people = w.contacts(limit=2, with_groups=False)
        tie = w.ties(limit=1)[0]
    a, b = str(tie["a"]), str(tie["b"])
    target = str(people[1]["id"])
    env["MYNET_WORKSPACE"] = str(ws)
    print(f"cached read commands on {ws} ({args.runs} fresh processes each):")
    for label, extra in [
        ("contacts --limit 20", ["contacts", "--limit", "20"]),
        ("contacts --search org1 --limit 20", ["contacts", "--search", "org1.example", "--limit", "20"]),
        ("groups", ["groups"]),
        ("ties --limit 10", ["ties", "--limit", "10"]),
        (f"reach --to {target}", ["reach", "--to", target]),
        ("audit", ["audit"]),
        (f"why {a} {b}", ["why", a, b]),
        (f"show {a}", ["show", a]),
        ("brokers", ["brokers"]),
        ("contacts --limit 20 --json", ["contacts", "--limit", "20", "--json"]),
    ]:
        measure(label, [*mynet, *extra], args.runs, env, ref, warm_up=True)


if __name__ == "__main__":
    main()
