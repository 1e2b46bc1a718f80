"""Fuzz the readers and the command line with mutated sample files, under time and memory limits.

Every input is a sample product (``sample_surfaces/*.stp``, ``*.igs``) or a
small geomdl JSON file, mutated by one to three of: byte flips, truncation,
dropped and duplicated lines, numeric extremes (NaN, infinity, 1e6, the largest
double, 2^63 - 1, 1e-300) in place of a number, swapped and recursive entity
references, odd line ends, and odd file names (spaces, non-UTF-8 bytes, a
leading dash). Each input goes through one of two paths:

``reader``  :func:`geometry.io.read_model` and the whole review
            (:func:`app.review.review_model`; ``--read-only`` skips it) in a
            long-lived child process; only a :class:`geometry.BattenError` may
            escape.
``cli``     ``batten check FILE --json OUT`` as a user runs it; the exit status
            must be 0, 1 or 2, stderr must hold no traceback, and the output is
            either complete JSON or absent.

Outcomes are counted: ``ok``, ``refused`` (a clean error), ``hang`` (past the
harness's wall-clock limit), ``crash`` (the process died), ``traceback``,
``exit3`` and ``memory`` (past the harness's address-space limit). Anything
but ``ok`` and ``refused`` is a failure; the inputs are kept in ``--keep``.

Usage::

    .venv/bin/python tools/fuzz.py --count 10000 --mode reader --seed 1 --keep /tmp/fuzz-failures
    .venv/bin/python tools/fuzz.py --count 200 --mode cli
"""

from __future__ import annotations

import argparse
import json
import os
import random
import re
import select
import shutil
import subprocess
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "sample_surfaces"
# Harness limits: far above what a sound sample needs, far below a runaway. The reader gets a
# processor-time budget whose wall-clock backstop (geometry.kernel.budget.WALL_CLOCK_FACTOR times it)
# ends well inside the harness's own limit, so a harness "hang" is one the budget failed to stop.
READ_BUDGET_S = 20.0
TIME_LIMIT_S = 600.0
MEMORY_LIMIT_BYTES = 6_000_000_000
EXTREMES = ("NaN", "1e6", "1.7976931348623157E308", "9223372036854775807.", "1e-300", "-inf", "0.")
FAILURES = ("hang", "crash", "traceback", "exit3", "memory")
_NUMBER = re.compile(rb"(?<![A-Za-z0-9_#.])[+-]?\d+\.\d*(?:[EeDd][+-]?\d+)?")
_REFERENCE = re.compile(rb"#\d+")


def _json_seed() -> bytes:
    record = {
        "type": "spline",
        "degree_u": 2,
        "degree_v": 2,
        "size_u": 3,
        "size_v": 3,
        "knotvector_u": [0, 0, 0, 1, 1, 1],
        "knotvector_v": [0, 0, 0, 1, 1, 1],
        "control_points": {
            "points": [[i * 10.0, j * 10.0, (i - 1) * (j - 1) * 3.0] for i in range(3) for j in range(3)],
            "weights": [1, 1, 1, 1, 1.5, 1, 1, 1, 1],
        },
    }
    return json.dumps({"shape": {"type": "surface", "data": [record]}}).encode()


def seeds(max_bytes: int | None = None) -> list[tuple[str, bytes]]:
    """(suffix, bytes) of every seed file, those larger than ``max_bytes`` left out."""
    files = sorted(SAMPLES.glob("*.stp")) + sorted(SAMPLES.glob("*.igs"))
    out = [(p.suffix, p.read_bytes()) for p in files if max_bytes is None or p.stat().st_size <= max_bytes]
    return [*out, (".json", _json_seed())]


def _lines(data: bytes) -> list[bytes]:
    return data.split(b"\n")


def mutate(data: bytes, rng: random.Random) -> tuple[bytes, str]:
    """One mutation of ``data``; returns the new bytes and its name."""
    kind = rng.choice(
        ["flip", "truncate", "drop_line", "dup_line", "extreme", "swap_ref", "self_ref", "line_ends", "digit"]
    )
    buf = bytearray(data)
    if kind == "flip" and buf:
        for _ in range(rng.randint(1, 8)):
            buf[rng.randrange(len(buf))] = rng.randrange(256)
        return bytes(buf), kind
    if kind == "truncate":
        return data[: rng.randrange(max(1, len(data)))], kind
    if kind in ("drop_line", "dup_line"):
        lines = _lines(data)
        at = rng.randrange(len(lines))
        lines[at : at + 1] = [] if kind == "drop_line" else [lines[at]] * rng.randint(2, 50)
        return b"\n".join(lines), kind
    if kind == "extreme":
        found = list(_NUMBER.finditer(data))
        if found:
            m = rng.choice(found)
            return data[: m.start()] + rng.choice(EXTREMES).encode() + data[m.end() :], kind
    if kind in ("swap_ref", "self_ref"):
        refs = list(_REFERENCE.finditer(data))
        if len(refs) > 2:
            a = rng.choice(refs)
            if kind == "swap_ref":
                b = rng.choice(refs)
                return data[: a.start()] + b.group() + data[a.end() :], kind
            # an entity that refers to itself: '#N = F(... #N ...)'
            line_start = data.rfind(b"\n", 0, a.start()) + 1
            own = _REFERENCE.match(data, line_start)
            if own:
                return data[: a.start()] + own.group() + data[a.end() :], kind
    if kind == "line_ends":
        return data.replace(b"\n", rng.choice([b"\r\n", b"\r", b"", b"\n\n"])), kind
    if kind == "digit" and buf:
        digits = [i for i, c in enumerate(buf) if 48 <= c <= 57]
        if digits:
            buf[rng.choice(digits)] = rng.randrange(48, 58)
            return bytes(buf), kind
    return data[:-1], "truncate"


def odd_name(rng: random.Random, suffix: str) -> bytes:
    """A file name as a user may have one: plain, with spaces, a leading dash or bytes that are not UTF-8."""
    stem = rng.choice([b"model", b"with space", b"-dash", b"caf\xe9", b"\xff\xfe", b"a&b<c>", b"x" * 120])
    return stem + suffix.encode()


def make_input(folder: Path, index: int, rng: random.Random, pool: list[tuple[str, bytes]]) -> tuple[bytes, str]:
    suffix, data = rng.choice(pool)
    names = []
    for _ in range(rng.randint(1, 3)):
        data, name = mutate(data, rng)
        names.append(name)
    sub = os.fsencode(folder) + b"/" + str(index).encode()
    os.makedirs(sub, exist_ok=True)
    path = sub + b"/" + odd_name(rng, suffix)
    with open(path, "wb") as fh:
        fh.write(data)
    return path, "+".join(names)


def _limit_memory() -> None:
    import resource

    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT_BYTES, MEMORY_LIMIT_BYTES))


# -- reader path: a long-lived child answering one path per line -------------------------------------------
def serve(review: bool) -> None:
    """Child side: read paths (hex of the bytes) from stdin, print one JSON outcome per line."""
    import warnings

    warnings.simplefilter("ignore", RuntimeWarning)
    from app.review.runner import ReviewSettings, review_model
    from geometry.errors import BattenError
    from geometry.io import ReadBudget, read_model

    settings = ReviewSettings(sections="x:2", read_budget=ReadBudget(timeout_s=READ_BUDGET_S))
    for line in sys.stdin:
        path = os.fsdecode(bytes.fromhex(line.strip()))
        try:
            model = read_model(path, settings.read_budget)
            if review:
                review_model(model, settings)
            outcome, detail = "ok", ""
        except BattenError as exc:
            outcome, detail = "refused", str(exc)[-200:]
        except MemoryError:
            outcome, detail = "memory", "MemoryError"
        except Exception as exc:
            outcome, detail = "traceback", f"{type(exc).__name__}: {exc}"[:300]
        print(json.dumps({"outcome": outcome, "detail": detail}), flush=True)


class ReaderChild:
    def __init__(self, review: bool):
        self.proc = None
        self.review = review

    def start(self) -> None:
        env = dict(os.environ, PYTHONPATH=str(ROOT))
        self.proc = subprocess.Popen(
            [sys.executable, __file__, "--serve", *(["--read-only"] if not self.review else [])],
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            stderr=subprocess.DEVNULL,
            env=env,
            preexec_fn=_limit_memory,
            text=True,
        )

    def run(self, path: bytes) -> tuple[str, str]:
        if self.proc is None or self.proc.poll() is not None:
            self.start()
        self.proc.stdin.write(path.hex() + "\n")
        self.proc.stdin.flush()
        ready, _, _ = select.select([self.proc.stdout], [], [], TIME_LIMIT_S)
        line = self.proc.stdout.readline() if ready else None
        if line:
            answer = json.loads(line)
            return answer["outcome"], answer["detail"]
        self.stop()
        return ("hang", "") if not ready else ("crash", "the reader process died")

    def stop(self) -> None:
        if self.proc is not None:
            self.proc.kill()
            self.proc.wait()
            self.proc = None


# -- command-line path -------------------------------------------------------------------------------------------
def run_cli(path: bytes, out_dir: Path) -> tuple[str, str]:
    out = out_dir / "out.json"
    out.unlink(missing_ok=True)
    cmd = [os.fsencode(ROOT / ".venv" / "bin" / "batten"), b"check", path, b"--quiet", b"--jobs", b"1"]
    cmd += [b"--sections", b"x:2", b"--read-timeout", str(READ_BUDGET_S).encode(), b"--json", os.fsencode(out)]
    try:
        done = subprocess.run(cmd, capture_output=True, timeout=TIME_LIMIT_S, preexec_fn=_limit_memory)
    except subprocess.TimeoutExpired:
        return "hang", ""
    err = done.stderr.decode("utf-8", "replace")
    leftovers = [p.name for p in out_dir.iterdir() if p.name.endswith(".part.json")]
    if done.returncode < 0:
        return "crash", f"signal {-done.returncode}"
    if "Traceback" in err or leftovers:
        return "traceback", (err or str(leftovers))[-300:]
    if "MemoryError" in err:
        return "memory", err[-200:]
    if done.returncode == 3:
        return "exit3", err[-300:]
    if done.returncode in (0, 1):
        try:
            json.loads(out.read_text())
        except (OSError, ValueError) as exc:
            return "traceback", f"exit {done.returncode} but no complete JSON ({exc})"
        return "ok", ""
    return "refused", err.strip().splitlines()[-1][-200:] if err.strip() else ""


def campaign(
    count: int,
    mode: str,
    seed: int,
    keep: Path | None,
    review: bool = True,
    report_every: int = 100,
    max_seed_bytes: int | None = None,
) -> Counter:
    """Run ``count`` mutated inputs; returns the outcome counts."""
    rng = random.Random(seed)
    pool = seeds(max_seed_bytes)
    counts: Counter = Counter()
    child = ReaderChild(review) if mode == "reader" else None
    started = time.time()
    with tempfile.TemporaryDirectory(prefix="batten-fuzz-") as tmp:
        folder = Path(tmp)
        try:
            for i in range(count):
                path, how = make_input(folder, i, rng, pool)
                outcome, detail = child.run(path) if child else run_cli(path, Path(os.fsdecode(os.path.dirname(path))))
                counts[outcome] += 1
                if outcome in FAILURES:
                    print(f"{outcome}: input {i} ({how}): {detail}", file=sys.stderr, flush=True)
                    if keep is not None:
                        keep.mkdir(parents=True, exist_ok=True)
                        shutil.copyfile(path, keep / f"{i}-{outcome}{Path(os.fsdecode(path)).suffix}")
                shutil.rmtree(os.path.dirname(path), ignore_errors=True)
                if report_every and (i + 1) % report_every == 0:
                    rate = (i + 1) / (time.time() - started)
                    print(f"{i + 1} inputs, {rate:.2f}/s: {dict(counts)}", file=sys.stderr, flush=True)
        finally:
            if child:
                child.stop()
    return counts


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--count", type=int, default=100)
    parser.add_argument("--mode", choices=("reader", "cli"), default="reader")
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--keep", type=Path, help="copy failing inputs here")
    parser.add_argument("--read-only", action="store_true", help="reader path: read only, no review (faster)")
    parser.add_argument("--max-seed-kb", type=int, help="leave out sample files larger than this (long runs)")
    parser.add_argument("--serve", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.serve:
        serve(review=not args.read_only)
        return 0
    max_bytes = args.max_seed_kb * 1024 if args.max_seed_kb else None
    counts = campaign(args.count, args.mode, args.seed, args.keep, not args.read_only, max_seed_bytes=max_bytes)
    mode = f"{args.mode}{' (read only)' if args.read_only else ''}"
    print(json.dumps({"mode": mode, "seed": args.seed, "inputs": args.count, **counts}))
    return 1 if any(counts[k] for k in FAILURES) else 0


if __name__ == "__main__":
    sys.exit(main())
