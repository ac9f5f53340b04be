#!/usr/bin/env python3
"""Batch audit and uncertainty: how fast, against looping the scalar bridge; and how it scales.

    python3 bench/batch.py [--rows 100000] [--scalar-sample 5000] [--full-scalar] [--repeat 3] [--json FILE]
                           [--scale 100000,1000000] [--scale-repeat 3] [--scale-only]
                           [--episodes 10000,100000] [--episodes-only]

Builds a seeded, invented audit file (--rows samples: COPD exacerbations, compensated and mixed disorders,
normal gases, venous and capillary samples, about 2 % of rows with a typing slip or a unit mix-up, units in
the header and now and then in a cell) and times:

- the batch: reading the CSV text, interpreting every row (numpy, frontends.batch.interpret_table), writing
  the output CSV and the summary; and end to end, file to file (tidewell.frontends.batch.run);
- the scalar bridge looped over the same rows (tidewell.bridge.handle_obj on each row's inputs, no CSV work
  at all, so the ratio favours the loop). By default a random sample of --scalar-sample rows is timed
  before and after the batch and the per-row mean is extrapolated to --rows (printed as extrapolated);
  --full-scalar loops over every row instead;
- the uncertainty calculation: 10,000 draws for three samples, best and median of max(--repeat, 5) runs
  after one warm call.

Times are wall clock; the scalar loop, the batch and the uncertainty runs are also given in this process's
CPU time (time.process_time), which other jobs on a shared machine disturb less (the CPU ratio is printed
beside the wall-clock one; neither replaces the other).

Scale (issue 19): the same invented file at each --scale size (10^5 and 10^6 rows by default; written row by
row, never held in memory) read, interpreted and written file to file by frontends.batch.run, each run in a
fresh process so that its peak resident memory (ru_maxrss) is its own, the sizes alternated --scale-repeat
times so they share the machine's load alike; printed side by side: median wall time, rows per second, median
CPU time, rows per CPU second, the largest peak RSS, and the ratio of the largest size's peak RSS to the
smallest's (the targets: at most 1.3 and at most 300 MB at 10^6 rows; at least 30,000 rows per second).

Episodes (issue 19): --episodes N,N writes the same invented file with an episode and a time column (6 gases
per episode, each episode's rows spread through the whole file) and runs it file to file without and with
``--episodes`` side by side, each run in a fresh process: median wall time, rows per second, peak RSS.
--episodes-only runs only these.

A benchmark, not a test: it prints figures (and the load of the machine) and passes no judgement. The
target of issue 9 is a batch at least 20 times faster than the scalar loop.
"""

from __future__ import annotations

import argparse
import csv
import io
import json
import os
import platform
import random
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "core"))

from tidewell import __version__, bridge  # noqa: E402
from tidewell.frontends import batch  # noqa: E402

COLUMNS = [
    "id",
    "ph",
    "pco2[kPa]",
    "po2[kPa]",
    "hco3[mmol/L]",
    "base_excess[mmol/L]",
    "fio2",
    "sample",
    "na[mmol/L]",
    "k[mmol/L]",
    "cl[mmol/L]",
    "albumin[g/L]",
    "lactate[mmol/L]",
    "glucose[mmol/L]",
    "spo2",
    "age",
    "hypercapnia_risk",
]


def _gas(rng: random.Random) -> tuple[float, float, float]:
    """(pH, PCO2 kPa, HCO3) of one invented scenario."""
    kind = rng.random()
    if kind < 0.25:  # COPD, chronic or acute-on-chronic hypercapnia
        pco2 = rng.uniform(6.5, 11.0)
        hco3 = rng.uniform(27, 38)
    elif kind < 0.45:  # metabolic acidosis, more or less compensated
        hco3 = rng.uniform(6, 21)
        pco2 = (1.5 * hco3 + 8 + rng.uniform(-5, 5)) / 7.50062
    elif kind < 0.55:  # metabolic alkalosis
        hco3 = rng.uniform(27, 45)
        pco2 = (40 + 0.7 * (hco3 - 24) + rng.uniform(-6, 6)) / 7.50062
    elif kind < 0.65:  # hyperventilation
        pco2 = rng.uniform(2.5, 4.6)
        hco3 = rng.uniform(16, 24)
    else:  # normal or nearly so
        pco2 = rng.uniform(4.4, 6.2)
        hco3 = rng.uniform(21, 28)
    ph = 6.1 + __import__("math").log10(hco3 / (0.0307 * pco2 * 7.50062))
    return ph, pco2, hco3


def make_csv(rows: int, seed: int = 7) -> str:
    out = io.StringIO()
    write_rows(out, rows, seed)
    return out.getvalue()


#: gases per episode in the files with an episode column
EPISODE_GASES = 6


def write_rows(out, rows: int, seed: int = 7, *, episodes: bool = False) -> None:
    """The invented audit file of :func:`make_csv` written to a stream row by row (a 10^7-row file never
    sits in memory). ``episodes``: two more columns, ``episode`` and ``time`` (minutes): rows / 6 episodes
    of 6 gases an hour apart, each episode's rows spread through the whole file (row n belongs to episode
    n mod rows/6), the hardest order for grouping; the other cells are the same."""
    rng = random.Random(seed)
    writer = csv.writer(out)
    writer.writerow(COLUMNS + (["episode", "time"] if episodes else []))
    count = max(1, rows // EPISODE_GASES)
    for n in range(rows):
        ph, pco2, hco3 = _gas(rng)
        ph = min(max(ph, 6.8), 7.75)
        fio2 = rng.choice(["0.21", "0.21", "0.24", "0.28", "28%", "0.35", "0.4", "0.6"])
        site = rng.choice(["arterial"] * 8 + ["venous", "capillary"])
        po2 = f"{rng.uniform(5.5, 13.5):.1f}" if site != "venous" or rng.random() < 0.3 else ""
        pco2_cell = f"{pco2:.2f}"
        if rng.random() < 0.03:  # now and then a cell in another unit
            pco2_cell = f"{pco2 * 7.50062:.0f} mmHg"
        if rng.random() < 0.01:  # a unit mix-up: kPa value in the mmHg sense
            pco2_cell = f"{pco2:.1f} mmHg"
        ph_cell = f"{ph:.2f}" if rng.random() > 0.01 else f"{ph * 100:.0f}"  # a missing decimal point
        chem = rng.random() < 0.6
        writer.writerow(
            [
                f"G{n:06d}",
                ph_cell,
                pco2_cell,
                po2,
                f"{hco3 * rng.uniform(0.98, 1.02):.1f}",
                "" if rng.random() < 0.5 else f"{hco3 - 24.8 + 16.2 * (ph - 7.4):.1f}",
                fio2,
                site,
                f"{rng.uniform(128, 148):.0f}" if chem else "",
                f"{rng.uniform(3.0, 6.0):.1f}" if chem else "",
                f"{rng.uniform(90, 112):.0f}" if chem else "",
                f"{rng.uniform(20, 45):.0f}" if chem and rng.random() < 0.5 else "",
                f"{rng.uniform(0.6, 9):.1f}" if rng.random() < 0.5 else "",
                f"{rng.uniform(4, 20):.1f}" if rng.random() < 0.4 else "",
                f"{rng.uniform(80, 100):.0f}" if rng.random() < 0.4 else "",
                f"{rng.uniform(18, 95):.0f}",
                rng.choice(["yes", "no", ""]),
            ]
            + ([f"E{n % count:07d}", str(n // count * 60)] if episodes else [])
        )


def time_scalar(table, indices) -> tuple[float, float]:
    """Seconds per row of the scalar bridge on the rows ``indices`` (inputs prepared beforehand): wall clock
    and this process's CPU time (the machine is shared: CPU time is less disturbed by other jobs)."""
    requests = [{"calc": "blood_gas", "inputs": batch.row_inputs(table, i)} for i in indices]
    start, cpu = time.perf_counter(), time.process_time()
    for request in requests:
        bridge.handle_obj(request)
    return (time.perf_counter() - start) / len(requests), (time.process_time() - cpu) / len(requests)


def time_batch(text: str, repeat: int) -> dict:
    runs = []
    for _ in range(repeat):
        c0, t0 = time.process_time(), time.perf_counter()
        table = batch.read_table(text)
        t1 = time.perf_counter()
        audit = batch.interpret_table(table)
        t2 = time.perf_counter()
        out = io.StringIO()
        batch.write_csv(table, audit, out)
        counts = batch.summary(audit)
        t3, c3 = time.perf_counter(), time.process_time()
        runs.append(
            {
                "read": t1 - t0,
                "interpret": t2 - t1,
                "write_and_summary": t3 - t2,
                "total": t3 - t0,
                "total_cpu": c3 - c0,
            }
        )
    best = min(runs, key=lambda r: r["total"])
    return {"best": best, "runs": runs, "scalar_rows": audit.scalar_rows, "counts": counts, "table": table}


def time_file_to_file(text: str, repeat: int) -> list[float]:
    times = []
    with tempfile.TemporaryDirectory() as tmp:
        source, target = Path(tmp) / "in.csv", Path(tmp) / "out.csv"
        source.write_text(text, encoding="utf-8")
        for _ in range(repeat):
            start = time.perf_counter()
            batch.run(str(source), str(target), progress=False, stdout=io.StringIO(), stderr=io.StringIO())
            times.append(time.perf_counter() - start)
    return times


SURENESS_SAMPLES = {
    "COPD exacerbation (pH, PCO2, HCO3)": {"ph": 7.24, "pco2": {"value": 9.3, "unit": "kPa"}, "hco3": 29.7},
    "with PO2, FiO2, age": {
        "ph": 7.24,
        "pco2": {"value": 9.3, "unit": "kPa"},
        "hco3": 29.7,
        "po2": {"value": 7.1, "unit": "kPa"},
        "fio2": 0.28,
        "age": 71,
    },
    "full chemistry": {
        "ph": 7.21,
        "pco2": {"value": 3.1, "unit": "kPa"},
        "hco3": 9.0,
        "po2": {"value": 12.5, "unit": "kPa"},
        "na": 136,
        "k": 5.1,
        "cl": 101,
        "albumin": {"value": 30, "unit": "g/L"},
        "lactate": {"value": 6.2, "unit": "mmol/L"},
        "glucose": {"value": 14, "unit": "mmol/L"},
        "urea": {"value": 9, "unit": "mmol/L"},
        "measured_osmolality": 310,
        "spo2": 96,
        "age": 54,
    },
}


def _as_request(sample: dict) -> dict:
    units_ = {
        "hco3": "mmol/L",
        "na": "mmol/L",
        "k": "mmol/L",
        "cl": "mmol/L",
        "measured_osmolality": "mOsm/kg",
    }
    return {k: ({"value": v, "unit": units_[k]} if k in units_ else v) for k, v in sample.items()}


def time_sureness(repeat: int) -> dict:
    out = {}
    for name, sample in SURENESS_SAMPLES.items():
        request = {"calc": "uncertainty", "inputs": {"sample": _as_request(sample), "draws": 10_000}}
        response = bridge.handle_obj(request)  # warm: imports numpy and the module once
        assert response["ok"], response
        times, cpu = [], []
        for _ in range(repeat):
            start, cpu_start = time.perf_counter(), time.process_time()
            bridge.handle_obj(request)
            times.append(time.perf_counter() - start)
            cpu.append(time.process_time() - cpu_start)
        out[name] = {
            "best_s": min(times),
            "median_s": statistics.median(times),
            "cpu_best_s": min(cpu),
            "cpu_median_s": statistics.median(cpu),
            "runs": times,
        }
    return out


def _child(rows: int, path: str, episodes: bool = False) -> int:
    """One file-to-file run in this fresh process (``--child``; ``--child-episodes`` adds the episode
    file): prints wall and CPU seconds and the peak resident memory of the process as JSON."""
    import resource

    with tempfile.TemporaryDirectory() as tmp:
        start, cpu = time.perf_counter(), time.process_time()
        counts = batch.run(
            path,
            str(Path(tmp) / "out.csv"),
            progress=False,
            stdout=io.StringIO(),
            stderr=io.StringIO(),
            episodes=str(Path(tmp) / "episodes.csv") if episodes else None,
        )
        wall, cpu = time.perf_counter() - start, time.process_time() - cpu
    peak_kb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss  # kilobytes on Linux
    print(json.dumps({"rows": counts["rows"], "wall_s": wall, "cpu_s": cpu, "peak_rss_mb": peak_kb / 1024}))
    return 0


def time_scale(sizes: list[int], repeat: int, seed: int = 7) -> dict:
    """``frontends.batch.run`` file to file at each size, each run in a fresh process (peak RSS is per
    process), the sizes alternated ``repeat`` times so that they share the machine's load alike."""
    runs: dict[int, list[dict]] = {n: [] for n in sizes}
    with tempfile.TemporaryDirectory() as tmp:
        paths = {}
        for n in sizes:
            paths[n] = Path(tmp) / f"gases-{n}.csv"
            with open(paths[n], "w", encoding="utf-8", newline="") as f:
                write_rows(f, n, seed)
        load_before = os.getloadavg()
        for _ in range(repeat):
            for n in sizes:
                done = subprocess.run(
                    [sys.executable, __file__, "--child", str(n), str(paths[n])],
                    capture_output=True,
                    text=True,
                    check=True,
                )
                runs[n].append(json.loads(done.stdout))
        load_after = os.getloadavg()
        sizes_mb = {n: paths[n].stat().st_size / 1e6 for n in sizes}
    table = {}
    for n in sizes:
        wall = statistics.median(r["wall_s"] for r in runs[n])
        cpu = statistics.median(r["cpu_s"] for r in runs[n])
        table[n] = {
            "csv_mb": round(sizes_mb[n], 1),
            "wall_s_median": round(wall, 2),
            "rows_per_s": round(n / wall),
            "cpu_s_median": round(cpu, 2),
            "rows_per_cpu_s": round(n / cpu),
            "peak_rss_mb_max": round(max(r["peak_rss_mb"] for r in runs[n]), 1),
            "runs_wall_s": [round(r["wall_s"], 2) for r in runs[n]],
        }
    first, last = sizes[0], sizes[-1]
    return {
        "load_average_1min": [round(load_before[0], 2), round(load_after[0], 2)],
        "repeat": repeat,
        "sizes": table,
        "peak_rss_ratio_largest_to_smallest": round(
            table[last]["peak_rss_mb_max"] / table[first]["peak_rss_mb_max"], 3
        ),
    }


def time_episodes(sizes: list[int], repeat: int, seed: int = 7) -> dict:
    """The file with an episode column at each size, file to file without and with ``--episodes``, each run
    in a fresh process, the two arms and the sizes alternated ``repeat`` times."""
    runs: dict[tuple[int, bool], list[dict]] = {(n, e): [] for n in sizes for e in (False, True)}
    with tempfile.TemporaryDirectory() as tmp:
        paths = {}
        for n in sizes:
            paths[n] = Path(tmp) / f"episodes-{n}.csv"
            with open(paths[n], "w", encoding="utf-8", newline="") as f:
                write_rows(f, n, seed, episodes=True)
        load_before = os.getloadavg()
        for _ in range(repeat):
            for n in sizes:
                for with_episodes in (False, True):
                    flag = "--child-episodes" if with_episodes else "--child"
                    done = subprocess.run(
                        [sys.executable, __file__, flag, str(n), str(paths[n])],
                        capture_output=True,
                        text=True,
                        check=True,
                    )
                    runs[(n, with_episodes)].append(json.loads(done.stdout))
        load_after = os.getloadavg()
    table = {}
    for (n, with_episodes), got in runs.items():
        wall = statistics.median(r["wall_s"] for r in got)
        cpu = statistics.median(r["cpu_s"] for r in got)
        table[f"{n}{' --episodes' if with_episodes else ''}"] = {
            "rows": n,
            "episodes": n // EPISODE_GASES if with_episodes else 0,
            "wall_s_median": round(wall, 2),
            "rows_per_s": round(n / wall),
            "cpu_s_median": round(cpu, 2),
            "rows_per_cpu_s": round(n / cpu),
            "peak_rss_mb_max": round(max(r["peak_rss_mb"] for r in got), 1),
            "runs_wall_s": [round(r["wall_s"], 2) for r in got],
        }
    return {
        "load_average_1min": [round(load_before[0], 2), round(load_after[0], 2)],
        "repeat": repeat,
        "runs": table,
    }


def print_episodes(result: dict) -> None:
    print(
        f"episodes (frontends.batch.run file to file without and with --episodes, {EPISODE_GASES} gases per "
        f"episode spread through the file; one process per run, median of {result['repeat']}; load average "
        f"1 min before/after: {result['load_average_1min']}):"
    )
    print(
        f"  {'run':>22} {'episodes':>9} {'time s':>8} {'rows/s':>9} {'CPU s':>8} {'rows/CPU s':>11} "
        f"{'peak RSS MB':>12}"
    )
    for name, t in result["runs"].items():
        print(
            f"  {name:>22} {t['episodes']:>9,} {t['wall_s_median']:>8.2f} {t['rows_per_s']:>9,} "
            f"{t['cpu_s_median']:>8.2f} {t['rows_per_cpu_s']:>11,} {t['peak_rss_mb_max']:>12.1f}"
        )


def print_scale(scale: dict) -> None:
    print(
        f"scale (frontends.batch.run file to file, one process per run, median of {scale['repeat']}; "
        f"load average 1 min before/after: {scale['load_average_1min']}):"
    )
    print(
        f"  {'rows':>12} {'CSV MB':>8} {'time s':>8} {'rows/s':>9} {'CPU s':>8} {'rows/CPU s':>11} "
        f"{'peak RSS MB':>12}"
    )
    for n, t in scale["sizes"].items():
        print(
            f"  {n:>12,} {t['csv_mb']:>8.1f} {t['wall_s_median']:>8.2f} {t['rows_per_s']:>9,} "
            f"{t['cpu_s_median']:>8.2f} {t['rows_per_cpu_s']:>11,} {t['peak_rss_mb_max']:>12.1f}"
        )
    print(f"  peak RSS, largest / smallest: {scale['peak_rss_ratio_largest_to_smallest']}")


def main() -> int:
    parser = argparse.ArgumentParser(
        description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter
    )
    parser.add_argument("--rows", type=int, default=100_000)
    parser.add_argument("--scalar-sample", type=int, default=5_000)
    parser.add_argument("--full-scalar", action="store_true", help="loop the scalar bridge over every row")
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--json", metavar="FILE")
    parser.add_argument("--quick", action="store_true", help="CI: 2,000 rows, 200 scalar, one repeat")
    parser.add_argument(
        "--scale",
        default="100000,1000000",
        metavar="N,N",
        help="file sizes (rows) of the constant-memory runs, smallest first ('' for none)",
    )
    parser.add_argument("--scale-repeat", type=int, default=3, metavar="N", help="runs of each size")
    parser.add_argument("--scale-only", action="store_true", help="only the constant-memory runs")
    parser.add_argument(
        "--episodes",
        default="",
        metavar="N,N",
        help="file sizes (rows) of the runs with an episode column, without and with --episodes",
    )
    parser.add_argument("--episodes-only", action="store_true", help="only the episode runs")
    parser.add_argument("--child", nargs=2, metavar=("ROWS", "PATH"), help=argparse.SUPPRESS)
    parser.add_argument("--child-episodes", nargs=2, metavar=("ROWS", "PATH"), help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        return _child(int(args.child[0]), args.child[1])
    if args.child_episodes:
        return _child(int(args.child_episodes[0]), args.child_episodes[1], episodes=True)
    if args.quick:
        args.rows, args.scalar_sample, args.repeat, args.full_scalar = 2_000, 200, 1, False
        args.scale, args.scale_repeat = "2000,20000", 1
        args.episodes = args.episodes or "2000"
    sizes = [int(n) for n in args.scale.split(",") if n.strip()]
    episode_sizes = [int(n) for n in args.episodes.split(",") if n.strip()]
    only = [
        (name, timer, shown, wanted)
        for name, timer, shown, wanted in (
            ("episodes", time_episodes, print_episodes, episode_sizes if args.episodes_only else None),
            ("scale", time_scale, print_scale, sizes if args.scale_only else None),
        )
        if wanted is not None
    ]
    if only:
        name, timer, shown, wanted = only[0]
        result = timer(wanted, args.scale_repeat)
        shown(result)
        if args.json:
            Path(args.json).write_text(json.dumps({name: result}, indent=2) + "\n", encoding="utf-8")
        return 0

    load_before = os.getloadavg()
    text = make_csv(args.rows)
    table = batch.read_table(text)
    rng = random.Random(1)
    if args.full_scalar:
        indices_a, indices_b = list(range(len(table))), []
    else:
        indices_a = rng.sample(range(len(table)), min(args.scalar_sample, len(table)))
        indices_b = rng.sample(range(len(table)), min(args.scalar_sample, len(table)))
    scalar_a = time_scalar(table, indices_a)
    result = time_batch(text, args.repeat)
    files = time_file_to_file(text, args.repeat)
    scalar_b = time_scalar(table, indices_b) if indices_b else scalar_a
    (scalar_a, scalar_a_cpu), (scalar_b, scalar_b_cpu) = scalar_a, scalar_b
    per_row = (scalar_a + scalar_b) / 2
    scalar_total = per_row * args.rows
    scalar_total_cpu = (scalar_a_cpu + scalar_b_cpu) / 2 * args.rows
    best_cpu = min(r["total_cpu"] for r in result["runs"])
    best = result["best"]
    sure = time_sureness(max(args.repeat, 5))
    load_after = os.getloadavg()

    report = {
        "engine": __version__,
        "python": platform.python_version(),
        "numpy": __import__("numpy").__version__,
        "cpus": os.cpu_count(),
        "load_average_1min": [round(load_before[0], 2), round(load_after[0], 2)],
        "rows": args.rows,
        "csv_bytes": len(text.encode()),
        "rows_read_by_the_scalar_reader": result["scalar_rows"],
        "rows_with_errors": result["counts"]["with_errors"],
        "batch_best_s": {k: round(v, 3) for k, v in best.items()},
        "batch_totals_s": [round(r["total"], 3) for r in result["runs"]],
        "file_to_file_s": [round(t, 3) for t in files],
        "scalar_per_row_ms": [round(scalar_a * 1e3, 4), round(scalar_b * 1e3, 4)],
        "scalar_rows_timed": len(indices_a) + len(indices_b),
        "scalar_total_s": round(scalar_total, 1),
        "scalar_total_is": "measured" if args.full_scalar else "extrapolated from the rows timed",
        "ratio_interpret_only": round(scalar_total / best["interpret"], 1),
        "ratio_csv_in_to_csv_out": round(scalar_total / best["total"], 1),
        "ratio_file_to_file": round(scalar_total / min(files), 1),
        "cpu_s": {
            "scalar_total": round(scalar_total_cpu, 1),
            "batch_csv_in_to_csv_out_best": round(best_cpu, 3),
        },
        "ratio_csv_in_to_csv_out_cpu": round(scalar_total_cpu / best_cpu, 1),
        "uncertainty_10000_draws": {
            k: {kk: round(vv, 4) for kk, vv in v.items() if kk != "runs"} for k, v in sure.items()
        },
    }
    print(
        f"Tidewell {__version__}, Python {report['python']}, numpy {report['numpy']}, {report['cpus']} CPUs"
    )
    print(f"load average (1 min) before/after: {report['load_average_1min']}")
    errors = result["counts"]["with_errors"]
    print(f"{args.rows:,} rows, {report['csv_bytes'] / 1e6:.1f} MB of CSV; {errors} rows with errors;")
    print(f"  {result['scalar_rows']} rows read by the scalar reader (the rest on arrays)")
    totals = [r["total"] for r in result["runs"]]
    print(
        f"batch (best of {args.repeat}): read {best['read']:.2f} s, interpret {best['interpret']:.2f} s, "
        f"write + summary {best['write_and_summary']:.2f} s, total {best['total']:.2f} s "
        f"(runs: {', '.join(f'{t:.2f}' for t in totals)} s)"
    )
    print(f"file to file (tidewell.frontends.batch.run): {', '.join(f'{t:.2f}' for t in files)} s")
    print(
        f"scalar bridge: {per_row * 1e3:.3f} ms per row ({report['scalar_total_is']}: "
        f"{report['scalar_rows_timed']:,} rows timed) -> {scalar_total:.0f} s for {args.rows:,} rows"
    )
    print(
        f"ratio: {report['ratio_interpret_only']}x interpreting, "
        f"{report['ratio_csv_in_to_csv_out']}x CSV text in to CSV text out, "
        f"{report['ratio_file_to_file']}x file to file"
    )
    print(
        f"CPU time of this process: scalar loop {scalar_total_cpu:.1f} s, batch CSV text in to CSV text out "
        f"{best_cpu:.2f} s (best of {args.repeat}) -> {report['ratio_csv_in_to_csv_out_cpu']}x"
    )
    for name, t in sure.items():
        best_ms, median_ms = t["best_s"] * 1e3, t["median_s"] * 1e3
        print(
            f"uncertainty, 10,000 draws, {name}: best {best_ms:.0f} ms, median {median_ms:.0f} ms "
            f"(CPU best {t['cpu_best_s'] * 1e3:.0f} ms, median {t['cpu_median_s'] * 1e3:.0f} ms)"
        )
    if sizes:
        report["scale"] = scale = time_scale(sizes, args.scale_repeat)
        print_scale(scale)
    if episode_sizes:
        report["episodes"] = episodes = time_episodes(episode_sizes, args.scale_repeat)
        print_episodes(episodes)
    if args.json:
        Path(args.json).write_text(json.dumps(report, indent=2) + "\n", encoding="utf-8")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
