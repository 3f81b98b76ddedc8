"""Fuzzing campaign at a large budget: the library, the command line and the path grammar.

Run from the repository root (never by the test suite)::

    nice python benchmarks/fuzz/campaign.py --minutes 25 --library 100000 --cli 1200 \\
        --paths 200000 --out /tmp/fuzz-run

Three campaigns, every input rebuilt from ``--seed`` and its number (``--replay`` writes one
input back out):

- **library**: mutated sample documents (``tests/fuzz/fuzz_inputs.py``: bit flips,
  truncation, inserted XML constructs, entities, deep nesting, huge attributes, transforms
  with zeros and extreme scales, ``use`` cycles, extreme numbers, ...) through
  ``outlinebench.io.read_svg`` and through the ``check``, ``measure``, ``flatten`` and
  ``offset`` subcommands called in-process exactly as the command line calls them
  (``outlinebench.cli.main``), one forked worker per input and operation;
- **cli**: a share of the same documents through the real command line, ``python -m
  outlinebench check|measure|flatten|offset``, as separate processes;
- **paths**: grammar-aware path data (valid and broken) read by
  ``outlinebench.io.svg_path.read_path_data`` and compared with the independent reader of
  ``tests/fuzz/path_reference.py`` (same error offset, same kept subpaths and points).

What counts as a failure, per input and operation:

- crash: an exception other than an ``OutlinebenchError`` subclass (the library), or a
  traceback on stderr / an exit status other than 0, 1, 2 (the command line);
- hang: still running after the time cap (killed);
- memory: a ``MemoryError`` or a kill by the address-space limit, and any input whose peak
  resident memory above the worker's starting size exceeds the memory cap;
- non-finite output: NaN or infinity in JSON (before the JSON writer turns it into null),
  in text output or in a written cut file;
- an error or note line on stderr that does not name the input file;
- a numpy ``RuntimeWarning`` (recorded in-process; on stderr for the command line).

Caps (stated here and printed with the table):

- time per input and operation: ``--time-cap`` seconds (default 30, the issue's hang
  threshold) for the library, ``--cli-time-cap`` (default 60) for the command line, and 2 s
  per path-data input;
- memory: a hard address-space limit of ``--mem-limit-mb`` (default 4096) above the worker's
  starting size (``RLIMIT_AS``), and the stated cap of ``MEM_FLOOR_MB`` + ``MEM_MULTIPLE`` x
  the input's size in bytes for the peak resident memory above the worker's start.

The workers run at most ``--jobs`` at a time (default 2, the machine's cores) under
``nice``. The table goes to stdout; every failing input is kept in ``--out`` with a
``failures.jsonl`` line (seed, number, operation, class, message).
"""

from __future__ import annotations

import argparse
import io
import json
import math
import os
import random
import re
import resource
import signal
import sys
import tempfile
import time
import traceback
import warnings
from collections import Counter, defaultdict
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "tests" / "fuzz"))

sys.path.insert(0, str(ROOT))
from fuzz_inputs import (  # noqa: E402
    break_path_data,
    mutate_document,
    random_path_data,
    sample_bytes,
)

from outlinebench import limits  # noqa: E402

# Stated memory cap (outlinebench.limits): peak resident memory above the worker's start may
# not pass MEM_FLOOR_MB + MEM_MULTIPLE × input bytes.
MEM_FLOOR_MB = limits.MEMORY_FLOOR_MB
MEM_MULTIPLE = limits.MEMORY_PER_INPUT_BYTE
# Time cap per path-data input (seconds).
PATH_TIME_CAP = 2.0
OPERATIONS = ("read", "check", "measure", "flatten", "offset")
_NONFINITE_RE = re.compile(r"(?i)(?<![a-z])(nan|-?inf|-?infinity)(?![a-z])")


def _argv(op: str, path: str, out: str) -> list[str]:
    if op == "check":
        return ["check", path, "--json"]
    if op == "measure":
        return ["measure", path, "--json", "--joins"]
    if op == "flatten":
        return ["flatten", path, "--json", "--tolerance", "0.05", "-o", out]
    if op == "offset":
        return ["offset", path, "--distance", "1", "--json", "-o", out]
    raise ValueError(op)


def _vm_bytes() -> int:
    with open("/proc/self/statm") as fh:
        return int(fh.read().split()[0]) * os.sysconf("SC_PAGE_SIZE")


def _rss_kb() -> int:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss


def _limit_memory(extra_mb: float) -> None:
    cap = _vm_bytes() + int(extra_mb * 2**20)
    resource.setrlimit(resource.RLIMIT_AS, (cap, cap))


def _lines_without(stderr: str, path: str) -> list[str]:
    bad = []
    for line in stderr.splitlines():
        if not line.strip() or "Traceback" in stderr:
            continue
        if path not in line:
            bad.append(line)
    return bad


def _scan_cut_file(out: str) -> int:
    try:
        text = Path(out).read_text("utf-8", "replace")
    except OSError:
        return 0
    return len(_NONFINITE_RE.findall(text))


# -- the library worker (forked child) ---------------------------------------------------------
def _library_child(op: str, path: str, out: str, mem_mb: float) -> dict:  # noqa: C901 (older than the complexity gate; split when next changed)
    _limit_memory(mem_mb)
    import numpy as np

    from outlinebench.errors import OutlinebenchError
    from outlinebench.subcommands import _common

    nonfinite = [0]
    original = _common.clean_json

    def counting(obj):  # noqa: ANN001, ANN202
        if isinstance(obj, float) and not math.isfinite(obj):
            nonfinite[0] += 1
        elif isinstance(obj, dict):
            for v in obj.values():
                counting(v)
        elif isinstance(obj, (list, tuple)):
            for v in obj:
                counting(v)
        return obj

    def clean(obj):  # noqa: ANN001, ANN202
        counting(obj)
        return original(obj)

    _common.clean_json = clean
    res: dict = {"crash": None, "nonfinite": 0, "warnings": 0, "unnamed": [], "code": None}
    stdout, stderr = io.StringIO(), io.StringIO()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            with redirect_stdout(stdout), redirect_stderr(stderr):
                if op == "read":
                    from outlinebench.io import read_svg

                    r = read_svg(path)
                    for o in r.document.outlines:
                        for c in o.contours:
                            for s in c.segments:
                                if not np.all(np.isfinite(s)):
                                    nonfinite[0] += 1
                    if r.error is not None and path not in str(r.error):
                        res["unnamed"].append(str(r.error))
                    res["code"] = 0
                else:
                    from outlinebench import cli

                    res["code"] = cli.main(_argv(op, path, out))
        except OutlinebenchError as exc:  # read_svg raising is fine; its message must name it
            msg = str(exc)
            if path not in msg:
                res["unnamed"].append(msg)
            if "\n" in msg:
                res["unnamed"].append("two-line message: " + msg.replace("\n", "\\n"))
        except MemoryError:
            res["crash"] = "MemoryError"
        except SystemExit as exc:
            res["code"] = exc.code
        except BaseException as exc:  # noqa: BLE001 - every other exception is a crash
            tb = traceback.extract_tb(exc.__traceback__)
            here = [f for f in tb if "outlinebench" in f.filename] or tb
            f = here[-1]
            where = f"{Path(f.filename).parent.name}/{Path(f.filename).name}:{f.lineno}"
            res["crash"] = f"{type(exc).__name__} at {where}"
            res["message"] = str(exc)[:300]
    res["warnings"] = sum(issubclass(w.category, RuntimeWarning) for w in caught)
    if res["warnings"]:
        w0 = next(w for w in caught if issubclass(w.category, RuntimeWarning))
        res["warning"] = f"{Path(w0.filename).name}:{w0.lineno}: {w0.message}"
    text = stdout.getvalue()
    res["nonfinite"] = nonfinite[0] + len(_NONFINITE_RE.findall(text)) + _scan_cut_file(out)
    res["unnamed"] += _lines_without(stderr.getvalue(), path)
    return res


# -- process management ------------------------------------------------------------------------
class _Runner:
    """At most ``jobs`` children at a time; each killed when over its time cap."""

    def __init__(self, jobs: int) -> None:
        self.jobs = jobs
        self.live: dict[int, tuple[float, float, dict, str | None]] = {}
        self.done: list[tuple[dict, dict]] = []

    def start_fork(self, fn, args, meta: dict, cap: float) -> None:  # noqa: ANN001
        self._wait_slots()
        fd, rfd = tempfile.mkstemp(prefix="fz-res-")
        os.close(fd)  # (left open, the parent ran out of descriptors after ~1,000 inputs)
        pid = os.fork()
        if pid == 0:  # child
            code = 0
            try:
                os.nice(5)
                res = fn(*args)
                Path(rfd).write_text(json.dumps(res))
            except BaseException:  # noqa: BLE001
                code = 3
            finally:
                os._exit(code)
        self.live[pid] = (time.monotonic(), cap, meta, rfd)

    def start_exec(self, argv: list[str], env: dict, meta: dict, cap: float, mem_mb: float) -> None:
        self._wait_slots()
        pid = os.fork()
        if pid == 0:
            try:
                os.nice(5)
                # not the repository root: `python -m` puts the working folder first on
                # sys.path, which would shadow --package-root
                os.chdir(os.path.dirname(meta["stdout"]))
                cap_b = int(mem_mb * 2**20)
                resource.setrlimit(resource.RLIMIT_AS, (cap_b, cap_b))
                fo = os.open(meta["stdout"], os.O_WRONLY | os.O_CREAT | os.O_TRUNC)
                fe = os.open(meta["stderr"], os.O_WRONLY | os.O_CREAT | os.O_TRUNC)
                os.dup2(fo, 1)
                os.dup2(fe, 2)
                os.execve(argv[0], argv, env)
            finally:
                os._exit(127)
        self.live[pid] = (time.monotonic(), cap, meta, None)

    def _wait_slots(self) -> None:
        while len(self.live) >= self.jobs:
            self.poll(0.005)

    def poll(self, pause: float = 0.0) -> None:
        while True:
            try:
                pid, status, ru = os.wait4(-1, os.WNOHANG)
            except ChildProcessError:
                break
            if pid == 0:
                break
            t0, _, meta, rfile = self.live.pop(pid)
            res = {"elapsed": time.monotonic() - t0, "maxrss_kb": ru.ru_maxrss, "status": status}
            if meta.get("killed"):
                res["hang"] = True
            if rfile is not None:
                try:
                    res.update(json.loads(Path(rfile).read_text() or "{}"))
                except (OSError, ValueError):
                    pass
                finally:
                    Path(rfile).unlink(missing_ok=True)
                if "crash" not in res and not meta.get("killed"):
                    # died without a result: killed by the memory limit or a signal, or the
                    # worker itself failed (exit status 3: a harness error, not the input's)
                    res["crash"] = f"worker died (status {status})"
                    res["memory_kill"] = os.WIFSIGNALED(status) or status == 0
            self.done.append((meta, res))
        now = time.monotonic()
        for pid, (t0, cap, meta, _) in list(self.live.items()):
            if now - t0 > cap and not meta.get("killed"):
                meta["killed"] = True
                try:
                    os.kill(pid, signal.SIGKILL)
                except ProcessLookupError:
                    pass
        if pause:
            time.sleep(pause)

    def drain(self) -> None:
        while self.live:
            self.poll(0.01)


# -- the three campaigns -----------------------------------------------------------------------
class _Tally:
    def __init__(self) -> None:
        self.inputs = Counter()
        self.crashes = Counter()
        self.hangs = Counter()
        self.nonfinite = Counter()
        self.unnamed = Counter()
        self.warnings = Counter()
        self.memory = Counter()
        self.over_mem = Counter()
        self.peak_mb = defaultdict(float)
        self.max_s = defaultdict(float)
        self.classes: dict[str, Counter] = defaultdict(Counter)
        self.examples: dict[str, dict] = {}


def _record(
    t: _Tally, key: str, meta: dict, res: dict, base_kb: float, out_dir: Path, failures
) -> None:  # noqa: ANN001, E501
    t.inputs[key] += 1
    size = meta.get("size", 0)
    extra_mb = max(0.0, (res.get("maxrss_kb", 0) - base_kb) / 1024.0)
    if not res.get("hang"):
        t.peak_mb[key] = max(t.peak_mb[key], extra_mb)
        t.max_s[key] = max(t.max_s[key], res.get("elapsed", 0.0))
    found = []
    if res.get("hang"):
        t.hangs[key] += 1
        found.append(("hang", f"over {meta['cap']:g} s"))
    elif res.get("crash"):
        if res.get("memory_kill") or "MemoryError" in res["crash"]:
            t.memory[key] += 1
            found.append(("memory", res["crash"]))
        else:
            t.crashes[key] += 1
            found.append(("crash", res["crash"] + ": " + res.get("message", "")))
    if extra_mb > MEM_FLOOR_MB + MEM_MULTIPLE * size / 2**20 and not res.get("hang"):
        t.over_mem[key] += 1
        found.append(("over-memory-cap", f"{extra_mb:.0f} MB for {size} bytes"))
    if res.get("nonfinite"):
        t.nonfinite[key] += 1
        found.append(("non-finite", str(res["nonfinite"])))
    if res.get("unnamed"):
        t.unnamed[key] += 1
        found.append(("line-without-file", res["unnamed"][0][:200]))
    if res.get("warnings"):
        t.warnings[key] += 1
        found.append(("runtime-warning", res.get("warning", "")))
    for kind, msg in found:
        cls = f"{kind}: {msg.split(':')[0] if kind == 'crash' else msg[:80]}"
        if kind == "crash":
            cls = f"crash: {res['crash']}"
        t.classes[key][cls] += 1
        if (key, cls) not in t.examples:
            t.examples[(key, cls)] = {"number": meta["number"], "message": msg}
        rec = {"campaign": key, "number": meta["number"], "class": kind, "message": msg}
        rec["mutations"] = meta.get("mutations")
        failures.write(json.dumps(rec) + "\n")
        if meta.get("path") and kind != "runtime-warning":
            keep = out_dir / f"fail-{meta['number']}.svg"
            if not keep.exists():
                try:
                    keep.write_bytes(Path(meta["path"]).read_bytes())
                except OSError:
                    pass


def _document(seed: int, number: int, samples: list[bytes]) -> tuple[bytes, list[str]]:
    return mutate_document(random.Random(f"{seed}-doc-{number}"), samples)


def _paths_child(seed: int, first: int, count: int) -> dict:
    sys.path.insert(0, str(ROOT / "tests" / "fuzz"))
    from path_reference import disagreements

    from outlinebench.io.svg_path import read_path_data

    out = {"inputs": 0, "crash": Counter(), "hang": 0, "dis": Counter(), "examples": {}, "warn": 0}

    def alarm(signum, frame):  # noqa: ANN001, ANN202
        raise TimeoutError

    signal.signal(signal.SIGALRM, alarm)
    for number in range(first, first + count):
        rng = random.Random(f"{seed}-path-{number}")
        d = random_path_data(rng, long=rng.random() < 0.15)
        if rng.random() < 0.5:
            d = break_path_data(rng, d)
        out["inputs"] += 1
        signal.setitimer(signal.ITIMER_REAL, PATH_TIME_CAP)
        try:
            with warnings.catch_warnings(record=True) as caught:
                warnings.simplefilter("always")
                r = read_path_data(d)
            out["warn"] += sum(issubclass(w.category, RuntimeWarning) for w in caught)
            dis = disagreements(d, r.contours, r.error.offset if r.error else None)
        except TimeoutError:
            out["hang"] += 1
            continue
        except Exception as exc:  # noqa: BLE001
            key = f"{type(exc).__name__}"
            out["crash"][key] += 1
            out["examples"].setdefault(key, [number, d[:300]])
            continue
        finally:
            signal.setitimer(signal.ITIMER_REAL, 0)
        for x in dis:
            key = re.sub(r"[-0-9.e(), \[\]]+", " ", x)[:40].strip()
            out["dis"][key] += 1
            out["examples"].setdefault(key, [number, d[:300], x[:300]])
    return out


def main() -> int:  # noqa: C901 - one driver
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--seed", type=int, default=15)
    ap.add_argument("--library", type=int, default=100_000, help="documents through the library")
    ap.add_argument("--cli", type=int, default=1_200, help="command-line runs")
    ap.add_argument("--paths", type=int, default=200_000, help="path-data inputs")
    ap.add_argument("--minutes", type=float, default=600.0, help="overall time budget")
    ap.add_argument(
        "--time-cap", type=float, default=limits.TIME_PER_FILE_S, help="seconds per library input"
    )
    ap.add_argument("--cli-time-cap", type=float, default=60.0, help="seconds per CLI run")
    ap.add_argument("--mem-limit-mb", type=float, default=4096.0, help="hard memory limit")
    ap.add_argument("--jobs", type=int, default=2)
    ap.add_argument("--out", default=None, help="folder for failing inputs and failures.jsonl")
    ap.add_argument("--package-root", default=str(ROOT), help="where outlinebench is imported from")
    ap.add_argument("--replay", type=int, default=None, help="write document NUMBER and stop")
    args = ap.parse_args()
    sys.path.insert(0, args.package_root)
    samples = sample_bytes()
    if args.replay is not None:
        data, names = _document(args.seed, args.replay, samples)
        sys.stdout.buffer.write(data)
        print(f"\n<!-- mutations: {names} -->", file=sys.stderr)
        return 0
    import outlinebench  # noqa: F401 - imported once, before forking
    import outlinebench.cli  # noqa: F401
    import outlinebench.io  # noqa: F401

    out_dir = Path(args.out or tempfile.mkdtemp(prefix="fuzz-campaign-"))
    out_dir.mkdir(parents=True, exist_ok=True)
    work = Path(tempfile.mkdtemp(prefix="fz-work-"))
    failures = open(out_dir / "failures.jsonl", "w")  # noqa: SIM115
    t_start = time.monotonic()
    deadline = t_start + args.minutes * 60.0
    # Share of the budget: paths 15 %, library 60 %, command line 25 %.
    ends = {
        "paths": t_start + 0.15 * (deadline - t_start),
        "library": t_start + 0.75 * (deadline - t_start),
        "cli": deadline,
    }
    tally = _Tally()
    base_kb = _rss_kb()
    print(f"outlinebench from {outlinebench.__file__}", flush=True)

    # 1. path data ------------------------------------------------------------------------
    runner = _Runner(args.jobs)
    batch = 2_000
    paths_tot: dict = {"inputs": 0, "hang": 0, "warn": 0, "crash": Counter(), "dis": Counter()}
    examples: dict = {}
    started = 0
    while started < args.paths and time.monotonic() < ends["paths"]:
        n = min(batch, args.paths - started)
        cap = PATH_TIME_CAP * n
        runner.start_fork(_paths_child, (args.seed, started, n), {"number": started}, cap)
        started += n
        runner.poll()
    runner.drain()
    for _meta, res in runner.done:
        if "inputs" not in res:
            paths_tot["crash"]["worker died"] += 1
            continue
        paths_tot["inputs"] += res["inputs"]
        paths_tot["hang"] += res["hang"]
        paths_tot["warn"] += res["warn"]
        paths_tot["crash"].update(res["crash"])
        paths_tot["dis"].update(res["dis"])
        for k, v in res["examples"].items():
            examples.setdefault(k, v)

    # 2. library --------------------------------------------------------------------------
    runner = _Runner(args.jobs)
    number = 0
    while number < args.library and time.monotonic() < ends["library"]:
        data, names = _document(args.seed, number, samples)
        path = work / f"in-{number}.svg"
        path.write_bytes(data)
        for op in OPERATIONS:
            out = str(work / f"cut-{number}-{op}.svg")
            meta = {"number": number, "op": op, "size": len(data), "path": str(path),
                    "cap": args.time_cap, "mutations": names}  # fmt: skip
            runner.start_fork(
                _library_child, (op, str(path), out, args.mem_limit_mb), meta, args.time_cap
            )
            runner.poll()
            for m, r in runner.done:
                _record(tally, "library " + m["op"], m, r, base_kb, out_dir, failures)
                Path(str(work / f"cut-{m['number']}-{m['op']}.svg")).unlink(missing_ok=True)
            runner.done.clear()
        if number >= 2 * args.jobs:
            (work / f"in-{number - 2 * args.jobs}.svg").unlink(missing_ok=True)
        number += 1
    runner.drain()
    for m, r in runner.done:
        _record(tally, "library " + m["op"], m, r, base_kb, out_dir, failures)

    # 3. command line ---------------------------------------------------------------------
    runner = _Runner(args.jobs)
    env = dict(os.environ, PYTHONPATH=args.package_root, QT_QPA_PLATFORM="offscreen")
    env.pop("PYTHONWARNINGS", None)
    runs = 0
    k = 0
    # The command line's own start (interpreter, numpy, shapely): one clean run's peak.
    probe = {"number": -1, "op": "check", "size": 0, "path": "", "cap": args.cli_time_cap,
             "out": str(work / "probe.svg"), "stdout": str(work / "probe.o"),
             "stderr": str(work / "probe.e")}  # fmt: skip
    sample = str(ROOT / "samples" / "workshop-bracket.svg")
    argv = [sys.executable, "-m", "outlinebench", *_argv("check", sample, probe["out"])]
    runner.start_exec(argv, env, probe, args.cli_time_cap, args.mem_limit_mb + 2048)
    runner.drain()
    cli_base_kb = float(runner.done[0][1].get("maxrss_kb", 0)) if runner.done else 0.0
    runner.done.clear()
    while runs < args.cli and time.monotonic() < ends["cli"]:
        data, names = _document(args.seed, 10_000_000 + k, samples)
        path = work / f"cli-{k}.svg"
        path.write_bytes(data)
        for op in OPERATIONS[1:]:
            out = str(work / f"cli-cut-{k}-{op}.svg")
            meta = {"number": 10_000_000 + k, "op": op, "size": len(data), "path": str(path),
                    "cap": args.cli_time_cap, "mutations": names, "out": out,
                    "stdout": str(work / f"o-{k}-{op}"),
                    "stderr": str(work / f"e-{k}-{op}")}  # fmt: skip
            argv = [sys.executable, "-m", "outlinebench", *_argv(op, str(path), out)]
            runner.start_exec(argv, env, meta, args.cli_time_cap, args.mem_limit_mb + 2048)
            runs += 1
            runner.poll()
            _collect_cli(runner, tally, cli_base_kb, out_dir, failures)
        k += 1
    runner.drain()
    _collect_cli(runner, tally, cli_base_kb, out_dir, failures)
    failures.close()

    # table -------------------------------------------------------------------------------
    print()
    print(f"seed {args.seed}; {time.monotonic() - t_start:.0f} s; caps: {args.time_cap:g} s per "
          f"library input and operation, {args.cli_time_cap:g} s per command-line run, "
          f"{PATH_TIME_CAP:g} s per path-data input; memory {MEM_FLOOR_MB:g} MB + "
          f"{MEM_MULTIPLE:g} x input size above the worker's start (hard limit "
          f"{args.mem_limit_mb:g} MB)")  # fmt: skip
    head = ("| campaign | inputs | crashes | hangs | memory errors | over memory cap | "
            "non-finite outputs | lines without file name | RuntimeWarnings | "
            "peak extra memory (MB) | max time (s) |")  # fmt: skip
    print(head)
    print("|---" * 11 + "|")
    for key in sorted(tally.inputs):
        print(
            f"| {key} | {tally.inputs[key]} | {tally.crashes[key]} | {tally.hangs[key]} | "
            f"{tally.memory[key]} | {tally.over_mem[key]} | {tally.nonfinite[key]} | "
            f"{tally.unnamed[key]} | {tally.warnings[key]} | {tally.peak_mb[key]:.0f} | "
            f"{tally.max_s[key]:.1f} |"
        )
    dis = sum(paths_tot["dis"].values())
    print(
        f"| path data, grammar-aware | {paths_tot['inputs']} | {sum(paths_tot['crash'].values())}"
        f" | {paths_tot['hang']} | - | - | - | - | {paths_tot['warn']} | - | - |"
    )
    print(f"\npath data: {dis} disagreements with the independent reader")
    for k2, v in paths_tot["dis"].most_common(12):
        print(f"  {v:6d}  {k2}   e.g. {examples.get(k2)}")
    for k2, v in paths_tot["crash"].most_common(12):
        print(f"  {v:6d}  crash {k2}   e.g. {examples.get(k2)}")
    print("\nclasses (count, first input number):")
    for key in sorted(tally.classes):
        for cls, v in tally.classes[key].most_common(15):
            ex = tally.examples[(key, cls)]
            print(f"  {key:16s} {v:6d}  {cls[:110]}  [#{ex['number']}] {ex['message'][:160]!r}")
    print(f"\nfailing inputs and failures.jsonl in {out_dir}")
    return 0


def _collect_cli(runner: _Runner, tally: _Tally, base_kb: float, out_dir: Path, failures) -> None:  # noqa: ANN001, E501
    for m, r in runner.done:
        try:
            err = Path(m["stderr"]).read_text("utf-8", "replace")
            text = Path(m["stdout"]).read_text("utf-8", "replace")
        except OSError:
            err = text = ""
        code = os.waitstatus_to_exitcode(r["status"]) if "status" in r else None
        if not r.get("hang"):
            if "Traceback" in err:
                last = [ln for ln in err.strip().splitlines() if ln and not ln.startswith(" ")]
                where = re.findall(r'File "([^"]*outlinebench[^"]*)", line (\d+)', err)
                loc = f" at {Path(where[-1][0]).name}:{where[-1][1]}" if where else ""
                r["crash"] = (last[-1].split(":")[0] if last else "traceback") + loc
                r["message"] = last[-1][:300] if last else ""
            elif code not in (0, 1, 2):
                r["crash"] = f"exit status {code}"
                r["memory_kill"] = code in (-9, 137) or "MemoryError" in err
            if "MemoryError" in err:
                r["memory_kill"] = True
        r["nonfinite"] = len(_NONFINITE_RE.findall(text)) + _scan_cut_file(m["out"])
        r["unnamed"] = [] if "Traceback" in err else _lines_without(err, m["path"])
        r["warnings"] = err.count("RuntimeWarning")
        if r["warnings"]:
            r["warning"] = next(ln for ln in err.splitlines() if "RuntimeWarning" in ln)[:200]
        _record(tally, "cli " + m["op"], m, r, base_kb, out_dir, failures)
        for f in (m["stderr"], m["stdout"], m["out"]):
            Path(f).unlink(missing_ok=True)
    runner.done.clear()


if __name__ == "__main__":
    sys.exit(main())
