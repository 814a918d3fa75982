"""The long fuzz run, started by hand: random calls into every public callable of
chargecast, each in a worker process with a memory cap and a watchdog.

    python3 tests/fuzz/run.py --calls 1000000 [--workers 2] [--seed 1] [--memory-mib 4096]
    python3 tests/fuzz/run.py --calls 3000 --only plan_mutated_scenario   # parse and plan mutated files

Each worker (this file with ``--worker``) caps its address space (``resource.setrlimit``)
and runs the calls it is sent one by one; the parent kills and replaces a worker that does
not answer within ``--watchdog`` seconds, and counts a worker that dies (abort, signal,
out of memory) as an abort. Call ``i`` is rebuilt from ``random.Random(f"{seed}:{i}")``
alone (``tests/fuzz/calls.py``), so the summary can show any failing call again. Prints a
summary: calls, documented errors, undocumented exceptions, bad outputs, aborts, calls over
2 s (by the smaller of wall and CPU time, so that a busy machine does not count other jobs'
time), with the first examples of each; exit status 1 if any of those is not zero.
Not collected by pytest (the quick hypothesis tests live in ``tests/python/test_fuzz.py``).
"""

from __future__ import annotations

import argparse
import json
import random
import selectors
import subprocess
import sys
import time
from collections import Counter, defaultdict
from pathlib import Path

HERE = Path(__file__).resolve().parent
SLOW_S = 2.0
# With --only NAME every call is of that public callable (e.g. Scenario: mutated files).
ONLY: str | None = None


def worker(memory_mib: int, only: str | None) -> None:
    import resource

    limit = memory_mib << 20
    resource.setrlimit(resource.RLIMIT_AS, (limit, limit))
    sys.path.insert(0, str(HERE))
    import calls  # noqa: PLC0415 - after the memory cap

    out = sys.stdout
    for line in sys.stdin:
        seed, i = line.split()
        rng = random.Random(f"{seed}:{i}")
        t0, c0 = time.perf_counter(), time.process_time()
        try:
            call = calls.make_call(rng, only)
            outcome, detail = calls.judge(call)
            what = repr(call)
        except BaseException as exc:  # noqa: BLE001 - a generator failure is reported, not fatal
            outcome, detail, what = (
                "undocumented",
                f"while building the call: {type(exc).__name__}: {exc}",
                "?",
            )
        wall, cpu = time.perf_counter() - t0, time.process_time() - c0
        # The cost of a call is the smaller of its wall and its CPU time (all threads): on a
        # shared machine the wall time counts other jobs, while an idle run takes at least
        # this long either way (one thread: wall = CPU; several: wall < CPU), so a call
        # that would take over 2 s alone is never missed.
        dt = min(wall, cpu)
        out.write(
            json.dumps(
                {"i": int(i), "outcome": outcome, "detail": detail, "what": what, "dt": dt, "wall": wall}
            )
            + "\n"
        )
        out.flush()


def describe(seed: int, i: int) -> str:
    """Rebuild call ``i`` (without running it) to show it."""
    sys.path.insert(0, str(HERE))
    import calls

    try:
        return repr(calls.make_call(random.Random(f"{seed}:{i}"), ONLY))
    except Exception as exc:  # noqa: BLE001
        return f"<call {i}: {exc}>"


class Worker:
    def __init__(self, memory_mib: int) -> None:
        self.proc = subprocess.Popen(
            [sys.executable, str(Path(__file__).resolve()), "--worker", "--memory-mib", str(memory_mib)]
            + (["--only", ONLY] if ONLY else []),
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            stderr=subprocess.DEVNULL,
            text=True,
            bufsize=1,
        )
        self.job: int | None = None
        self.sent_at = 0.0

    def send(self, seed: int, i: int) -> None:
        assert self.proc.stdin is not None
        self.job, self.sent_at = i, time.monotonic()
        self.proc.stdin.write(f"{seed} {i}\n")
        self.proc.stdin.flush()

    def kill(self) -> None:
        self.proc.kill()
        self.proc.wait()


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument("--calls", type=int, default=10000)
    ap.add_argument("--workers", type=int, default=2)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--memory-mib", type=int, default=4096, help="address-space cap of each worker (MiB)")
    ap.add_argument("--watchdog", type=float, default=30.0, help="seconds before a silent worker is killed")
    ap.add_argument("--examples", type=int, default=5, help="examples shown per kind of failure")
    ap.add_argument("--only", default=None, help="call only this public callable (e.g. Scenario)")
    ap.add_argument("--worker", action="store_true", help=argparse.SUPPRESS)
    args = ap.parse_args()
    global ONLY
    ONLY = args.only
    if args.worker:
        worker(args.memory_mib, args.only)
        return 0

    counts: Counter[str] = Counter()
    examples: dict[str, list[str]] = defaultdict(list)
    by_callable: Counter[str] = Counter()
    failing: Counter[str] = Counter()  # (callable, exception type) of undocumented and bad
    slowest: list[tuple[float, str]] = []
    sel = selectors.DefaultSelector()
    workers = [Worker(args.memory_mib) for _ in range(args.workers)]
    next_i, done, start = 0, 0, time.monotonic()

    def note(kind: str, text: str) -> None:
        counts[kind] += 1
        if len(examples[kind]) < args.examples:
            examples[kind].append(text)

    def feed(w: Worker) -> None:
        nonlocal next_i
        if next_i < args.calls:
            w.send(args.seed, next_i)
            next_i += 1
        else:
            w.job = None

    for w in workers:
        assert w.proc.stdout is not None
        sel.register(w.proc.stdout, selectors.EVENT_READ, w)
        feed(w)
    last_print = time.monotonic()
    while done < args.calls:
        for key, _ in sel.select(timeout=1.0):
            w = key.data
            line = w.proc.stdout.readline()
            if not line:  # the worker died: an abort (signal, allocation failure, rlimit)
                code = w.proc.wait()
                i = w.job
                sel.unregister(key.fileobj)
                note("aborts", f"exit {code}: {describe(args.seed, i) if i is not None else '?'}")
                done += 1
                nw = Worker(args.memory_mib)
                assert nw.proc.stdout is not None
                sel.register(nw.proc.stdout, selectors.EVENT_READ, nw)
                workers[workers.index(w)] = nw
                feed(nw)
                continue
            r = json.loads(line)
            done += 1
            counts["calls"] += 1
            by_callable[r["what"].split("(")[0]] += 1
            counts[r["outcome"]] += 1
            if r["outcome"] in ("undocumented", "bad"):
                failing[f"{r['what'].split('(')[0]}: {r['detail'].split(':')[0]}"] += 1
                key_ = "undocumented exceptions" if r["outcome"] == "undocumented" else "bad outputs"
                if len(examples[key_]) < args.examples:
                    examples[key_].append(f"{r['detail']}  <-  {r['what']}")
            if r["dt"] > SLOW_S:
                note("calls over 2 s", f"{r['dt']:.1f} s: {r['what']}")
            slowest.append((r["dt"], r["what"]))
            slowest = sorted(slowest, reverse=True)[:5]
            feed(w)
        now = time.monotonic()
        for w in list(workers):
            if w.job is not None and now - w.sent_at > args.watchdog:
                i = w.job
                sel.unregister(w.proc.stdout)
                w.kill()
                note("calls over 2 s", f"watchdog ({args.watchdog:.0f} s): {describe(args.seed, i)}")
                counts["watchdog kills"] += 1
                done += 1
                nw = Worker(args.memory_mib)
                sel.register(nw.proc.stdout, selectors.EVENT_READ, nw)
                workers[workers.index(w)] = nw
                feed(nw)
        if now - last_print > 30:
            last_print = now
            print(
                f"  {done}/{args.calls} calls, {now - start:.0f} s: undocumented {counts['undocumented']}, "
                f"bad {counts['bad']}, aborts {counts['aborts']}, over 2 s {counts['calls over 2 s']}",
                file=sys.stderr,
                flush=True,
            )
    for w in workers:
        w.kill()

    total = time.monotonic() - start
    print(
        f"chargecast fuzz run: seed {args.seed}, {args.workers} workers, "
        f"{args.memory_mib} MiB cap each, {total:.0f} s"
    )
    print(f"  calls                    {done}")
    print(f"  accepted                 {counts['ok']}")
    print(f"  documented errors        {counts['documented']}")
    print(f"  undocumented exceptions  {counts['undocumented']}")
    print(f"  bad outputs              {counts['bad']}")
    print(f"  aborts                   {counts['aborts']}")
    print(
        f"  calls over 2 s           {counts['calls over 2 s']} (watchdog kills {counts['watchdog kills']})"
    )
    print(f"  callables exercised      {len(by_callable)}")
    for kind in ("undocumented exceptions", "bad outputs", "aborts", "calls over 2 s"):
        if examples[kind]:
            print(f"\n{kind}, first {len(examples[kind])}:")
            for e in examples[kind]:
                print(f"  {e}")
    if failing:
        print("\nundocumented exceptions and bad outputs by callable:")
        for what, n in failing.most_common():
            print(f"  {n:7d}  {what}")
    print("\nslowest calls:")
    for dt, what in slowest:
        print(f"  {dt:7.2f} s  {what}")
    bad = counts["undocumented"] + counts["bad"] + counts["aborts"] + counts["calls over 2 s"]
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
